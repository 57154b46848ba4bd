package main

import (
	"encoding/csv"
	"strings"
	"testing"
)

type compareOut struct {
	Rows []struct {
		Part           string   `json:"part"`
		Status         string   `json:"status"`
		TotalW         float64  `json:"total_w"`
		DeltaW         *float64 `json:"total_delta_w"`
		DeltaPct       *float64 `json:"total_delta_pct"`
		EffDelta       *float64 `json:"eff_delta_pts"`
		Decides        string   `json:"decided_by"`
		NewScreens     []string `json:"new_screens"`
		PackageDiffers bool     `json:"package_differs"`
		Verdict        string   `json:"verdict"`
	} `json:"candidates"`
}

// compare against losses worked by hand from the models (linear.csv's
// header) at 10 A rms, 100 kHz, 100 V, 10 V drive, 25 °C, Pout 1 kW:
//
//	lin-b (fitted): 100·4 mΩ + 100 kHz·(0.9 µJ + 0.1 µJ) = 0.4 + 0.09 + 0.01 = 0.50 W
//	lin-a:          0.2 + 0.19 + 0.01 = 0.40 W: better by 0.1 W (20 %), decided by conduction (−0.2 W)
//	lin-c:          0.8 + 0.015 + 0.01 = 0.825 W: worse by 0.325 W (65 %), decided by conduction (+0.4 W)
//	low-volt:       lin-a's losses, but 100 V is above 80 % of its 110 V, and another package.
func TestCompare(t *testing.T) {
	base := []string{"compare", "--parts", decisionsDir + "/linear.csv", "--topology", "custom", "--vblock", "100", "--irms", "10",
		"--pout", "1k", "--fsw", "100k", "--vdrive", "10", "--tj", "25", "--fitted", "lin-b"}
	var c compareOut
	decoded(t, &c, append(base, "--format", "json", "lin-a", "lin-c", "low-volt")...)
	if len(c.Rows) == 0 || c.Rows[0].Status != "fit" || c.Rows[0].Part != "lin-b" {
		t.Fatalf("the fitted part first: %+v", c.Rows)
	}
	closeTo(t, "fitted total", c.Rows[0].TotalW, 0.5, 1e-9)
	cands := c.Rows[1:]
	want := map[string]struct {
		total, delta float64
		decides      string
		verdict      []string
	}{
		"lin-a":    {0.4, -0.1, "conduction", []string{"better by 100", "(20.0 %)", "decided by conduction (−200 mW)"}},
		"lin-c":    {0.825, 0.325, "conduction", []string{"worse by 325 mW (65.0 %)", "decided by conduction (+400 mW)"}},
		"low-volt": {0.4, -0.1, "conduction", []string{"fails voltage margin", "package PKG-B instead of PKG-A"}},
	}
	if len(cands) != 3 {
		t.Fatalf("%d candidates", len(cands))
	}
	// Passing candidates first, by loss: lin-a, lin-c, then low-volt (screened).
	if cands[0].Part != "lin-a" || cands[1].Part != "lin-c" || cands[2].Part != "low-volt" {
		t.Errorf("order %s, %s, %s", cands[0].Part, cands[1].Part, cands[2].Part)
	}
	for _, x := range cands {
		w := want[x.Part]
		closeTo(t, x.Part+" total", x.TotalW, w.total, 1e-9)
		if x.Status == "out" {
			// Set aside: nothing is diffed against it.
			if x.DeltaW != nil || x.EffDelta != nil {
				t.Errorf("%s set aside, yet diffed: %+v", x.Part, x)
			}
		} else {
			closeTo(t, x.Part+" Δ total", *x.DeltaW, w.delta, 1e-9)
			closeTo(t, x.Part+" Δ total %", *x.DeltaPct, 100*w.delta/0.5, 1e-9)
			// Efficiency change in points: 100·(1000/(1000 + P) − 1000/1000.5).
			closeTo(t, x.Part+" Δ efficiency", *x.EffDelta, 100*(1000/(1000+w.total)-1000/1000.5), 1e-6)
		}
		if x.Decides != w.decides {
			t.Errorf("%s decided by %q", x.Part, x.Decides)
		}
		for _, v := range w.verdict {
			if !strings.Contains(x.Verdict, v) {
				t.Errorf("%s verdict %q lacks %q", x.Part, x.Verdict, v)
			}
		}
	}
	if cands[2].PackageDiffers != true || len(cands[2].NewScreens) != 1 || cands[2].NewScreens[0] != "voltage margin" {
		t.Errorf("low-volt: %+v", cands[2])
	}

	// Every other part when no candidate is named; the same figures in the
	// table, CSV and Markdown forms.
	var all compareOut
	decoded(t, &all, append(base, "--format", "json")...)
	if len(all.Rows) != 5 {
		t.Errorf("all candidates: %d rows, want the fitted part and 4", len(all.Rows))
	}
	code, out, errOut := runSw(t, append(base, "lin-a")...)
	if code != 0 || !strings.Contains(out, "lin-a: better by 100") || !strings.Contains(out, "fitted lin-b: total 500 mW") {
		t.Errorf("table: exit %d %s\n%s", code, errOut, out)
	}
	code, out, _ = runSw(t, append(base, "--format", "csv", "lin-a")...)
	rows, err := csv.NewReader(strings.NewReader(out)).ReadAll()
	if code != 0 || err != nil || len(rows) != 3 || rows[2][0] != "lin-a" {
		t.Fatalf("csv: exit %d, %v, %q", code, err, out)
	}
	hdr := rows[0]
	for i, h := range hdr {
		if h == "total_delta_w" {
			if rows[2][i] != "-0.1" {
				t.Errorf("csv total_delta_w %q", rows[2][i])
			}
		}
	}
	if code, out, _ := runSw(t, append(base, "--format", "markdown", "lin-a")...); code != 0 || !strings.Contains(out, "| lin-a") {
		t.Errorf("markdown: %q", out)
	}
	// Errors.
	if code, _, e := runSw(t, base[:len(base)-2]...); code == 0 || !strings.Contains(e, "--fitted") {
		t.Errorf("no --fitted: exit %d, %q", code, e)
	}
	if code, _, e := runSw(t, append(base, "nosuch")...); code == 0 || !strings.Contains(e, "nosuch") {
		t.Errorf("unknown candidate: exit %d, %q", code, e)
	}
}
