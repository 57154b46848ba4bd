package main

import (
	"encoding/csv"
	"encoding/xml"
	"errors"
	"io"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

type sweepOut struct {
	Variable string `json:"variable"`
	Scale    string `json:"scale"`
	Grid     []struct {
		X      float64 `json:"fsw_hz"`
		Part   string  `json:"part"`
		TotalW float64 `json:"total_w"`
		Best   bool    `json:"best"`
	} `json:"grid"`
	Crossovers []struct {
		X    float64 `json:"x"`
		From string  `json:"from_part"`
		To   string  `json:"to_part"`
		Kind string  `json:"kind"`
	} `json:"crossovers"`
}

var sweepBase = []string{"sweep", "--parts", decisionsDir + "/linear.csv", "--topology", "custom", "--vblock", "100", "--irms", "10",
	"--vdrive", "10", "--tj", "25", "--var", "fsw", "--from", "10k", "--to", "1M"}

// The sweep's crossovers against pairs with an analytic crossover: the
// losses of linear.csv's parts at 10 A are a + b·f lines (0.2 + 2e-6·f,
// 0.4 + 1e-6·f, 0.8 + 0.25e-6·f W), so the best part changes from lin-a to
// lin-b at 200 kHz and from lin-b to lin-c at 0.4/0.75e-6 = 533.333 kHz.
// On a 3-point log grid (10 kHz, 100 kHz, 1 MHz) lin-b is best at no grid
// point: the crossovers must come from refinement, not from the grid.
func TestSweepCrossovers(t *testing.T) {
	for _, steps := range []string{"3", "25"} {
		var s sweepOut
		decoded(t, &s, append(sweepBase, "--steps", steps, "--format", "json", "lin-a", "lin-b", "lin-c")...)
		if s.Scale != "log" || s.Variable != "fsw" || len(s.Grid) == 0 || len(s.Grid)%3 != 0 {
			t.Fatalf("sweep %+v", s)
		}
		if len(s.Crossovers) != 2 {
			t.Fatalf("%s steps: crossovers %+v", steps, s.Crossovers)
		}
		for i, w := range []struct {
			x        float64
			from, to string
		}{{200e3, "lin-a", "lin-b"}, {0.4 / 0.75e-6, "lin-b", "lin-c"}} {
			c := s.Crossovers[i]
			if math.Abs(c.X-w.x) > 1e-6*w.x || c.From != w.from || c.To != w.to || c.Kind != "equal loss" {
				t.Errorf("%s steps, crossover %d: %+v, want %s → %s at %.9g Hz", steps, i, c, w.from, w.to, w.x)
			}
		}
		for _, l := range s.Grid {
			a := map[string][2]float64{"lin-a": {0.2, 2e-6}, "lin-b": {0.4, 1e-6}, "lin-c": {0.8, 0.25e-6}}[l.Part]
			closeTo(t, l.Part+" loss", l.TotalW, a[0]+a[1]*l.X, 1e-9)
		}
	}
	// The table and CSV forms, and --components.
	code, out, errOut := runSw(t, append(sweepBase, "--steps", "5", "lin-a", "lin-b", "lin-c")...)
	if code != 0 || !strings.Contains(out, "at 200 kHz: lin-a → lin-b (equal loss") {
		t.Errorf("table: exit %d %s\n%s", code, errOut, out)
	}
	code, out, _ = runSw(t, append(sweepBase, "--steps", "5", "--format", "csv", "--components", "lin-a", "lin-b")...)
	rows, err := csv.NewReader(strings.NewReader(out)).ReadAll()
	if code != 0 || err != nil || len(rows) != 1+5*2 || rows[0][0] != "fsw_hz" {
		t.Errorf("csv: exit %d, %v, %d rows\n%s", code, err, len(rows), out)
	}
	// The best parts by default (--top), and errors.
	var top sweepOut
	decoded(t, &top, append(sweepBase, "--steps", "5", "--top", "2", "--format", "json")...)
	parts := map[string]bool{}
	for _, g := range top.Grid {
		parts[g.Part] = true
	}
	if len(parts) != 2 {
		t.Errorf("--top 2: parts %v", parts)
	}
	for _, bad := range [][]string{
		{"--steps", "1"}, {"--var", "temperature"}, {"--scale", "cubic"}, {"--from", "2M"}, {"--parallel", "auto"}, {"--plot", "x.pdf"},
	} {
		if code, _, _ := runSw(t, append(append([]string{}, sweepBase...), bad...)...); code == 0 {
			t.Errorf("%v: exit 0", bad)
		}
	}
}

// A plot renders to an SVG that parses and names each part, its axes and
// the crossovers; the file is replaced whole.
func TestSweepPlot(t *testing.T) {
	dir := t.TempDir()
	svg := filepath.Join(dir, "loss.svg")
	if err := os.WriteFile(svg, []byte("old"), 0o644); err != nil {
		t.Fatal(err)
	}
	code, _, errOut := runSw(t, append(sweepBase, "--steps", "9", "--plot", svg, "lin-a", "lin-b", "lin-c")...)
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errOut)
	}
	f, err := os.Open(svg)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	dec := xml.NewDecoder(f)
	var texts []string
	root := ""
	inText := false
	for {
		tok, err := dec.Token()
		if errors.Is(err, io.EOF) {
			break
		}
		if err != nil {
			t.Fatalf("the SVG does not parse: %v", err)
		}
		switch x := tok.(type) {
		case xml.StartElement:
			if root == "" {
				root = x.Name.Local
			}
			inText = x.Name.Local == "text"
		case xml.EndElement:
			inText = false
		case xml.CharData:
			if inText {
				texts = append(texts, string(x))
			}
		}
	}
	if root != "svg" {
		t.Errorf("root element %q", root)
	}
	all := strings.Join(texts, "\n")
	for _, want := range []string{"lin-a", "lin-b", "lin-c", "switching frequency (Hz)", "total stage loss (W)", "crossover", "200 kHz", "100 kHz"} {
		if !strings.Contains(all, want) {
			t.Errorf("the SVG's text lacks %q:\n%s", want, all)
		}
	}
	ents, _ := os.ReadDir(dir)
	if len(ents) != 1 {
		t.Errorf("files left: %v", ents)
	}
	// PNG by the extension; never over an input file.
	png := filepath.Join(dir, "loss.png")
	if code, _, e := runSw(t, append(sweepBase, "--steps", "5", "--plot", png, "lin-a")...); code != 0 {
		t.Errorf("png: exit %d %s", code, e)
	} else if b, _ := os.ReadFile(png); len(b) < 8 || string(b[1:4]) != "PNG" {
		t.Error("not a PNG")
	}
	if code, _, _ := runSw(t, append(sweepBase, "--plot", decisionsDir+"/linear.csv")...); code == 0 {
		t.Error("plot over the parts library accepted")
	}
}
