package main

import (
	"bytes"
	"encoding/json"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// runSw runs the command line in-process.
func runSw(t *testing.T, args ...string) (int, string, string) {
	t.Helper()
	var out, errb bytes.Buffer
	code := run(args, &out, &errb)
	return code, out.String(), errb.String()
}

// decoded runs a command that prints JSON and decodes it.
func decoded(t *testing.T, v any, args ...string) {
	t.Helper()
	code, out, errOut := runSw(t, args...)
	if code != 0 {
		t.Fatalf("%v: exit %d: %s", args, code, errOut)
	}
	if err := json.Unmarshal([]byte(out), v); err != nil {
		t.Fatalf("%v: %v\n%s", args, err, out)
	}
}

func closeTo(t *testing.T, what string, got, want, rel float64) {
	t.Helper()
	if math.IsNaN(got) || math.Abs(got-want) > rel*math.Abs(want) {
		t.Errorf("%s = %.9g, want %.9g (±%g relative)", what, got, want, rel)
	}
}

const decisionsDir = "../../testdata/decisions"

// The flags equivalent to testdata/decisions/stage.toml.
var linearFlags = []string{"--parts", decisionsDir + "/linear.csv", "--topology", "custom", "--vblock", "100", "--irms", "20",
	"--pout", "1k", "--fsw", "200k", "--vdrive", "10", "--tj", "25"}

type plainRank struct {
	Results []struct {
		Part   string  `json:"part"`
		TotalW float64 `json:"total_w"`
	} `json:"results"`
}

// A design file gives the same ranking as the same values as flags; a flag
// given on the command line overrides the file; the parts path is relative
// to the design file.
func TestDesignRoundTrip(t *testing.T) {
	var fromFlags, fromFile plainRank
	decoded(t, &fromFlags, append([]string{"rank", "--format", "json"}, linearFlags...)...)
	decoded(t, &fromFile, "rank", "--format", "json", "--design", decisionsDir+"/stage.toml")
	if len(fromFlags.Results) == 0 || len(fromFlags.Results) != len(fromFile.Results) {
		t.Fatalf("results: %d from flags, %d from the file", len(fromFlags.Results), len(fromFile.Results))
	}
	for i := range fromFlags.Results {
		if fromFlags.Results[i] != fromFile.Results[i] {
			t.Errorf("row %d: flags %+v, file %+v", i, fromFlags.Results[i], fromFile.Results[i])
		}
	}
	// Hand values (linear.csv's header): lin-a at 20 A and 200 kHz loses
	// 400·2 mΩ + 200 kHz·2 µJ = 1.2 W.
	for _, r := range fromFile.Results {
		if r.Part == "lin-a" {
			closeTo(t, "lin-a total", r.TotalW, 1.2, 1e-9)
		}
	}
	// Override: --fsw 100k on the command line beats the file's 200k:
	// lin-a 0.8 W + 100 kHz·2 µJ = 1.0 W.
	var over plainRank
	decoded(t, &over, "rank", "--format", "json", "--design", decisionsDir+"/stage.toml", "--fsw", "100k")
	for _, r := range over.Results {
		if r.Part == "lin-a" {
			closeTo(t, "lin-a at 100 kHz", r.TotalW, 1.0, 1e-9)
		}
	}
}

// Bad design files give the file, line, column and key of the problem.
func TestDesignErrors(t *testing.T) {
	dir := t.TempDir()
	tests := []struct {
		name, src string
		want      []string
	}{
		{"bad value", "parts = \"x.csv\"\n[stage]\nvin = 12\nfsw = \"fast\"\n", []string{"bad value.toml:4:1: stage.fsw:"}},
		{"unknown key", "[stage]\nvin = 12\nvoltage = 3\n", []string{"unknown key.toml:3:1: stage.voltage:", "unknown key"}},
		{"wrong section", "[stage]\nvdrive = 5\n", []string{"wrong section.toml:2:1: stage.vdrive:", "another section"}},
		{"unknown table", "[stages]\nvin = 12\n", []string{"unknown table.toml:", "stages"}},
		{"syntax", "[stage]\nvin = = 12\n", []string{"syntax.toml:2:"}},
		{"array value", "[stage]\nvin = [12, 13]\n", []string{"array value.toml:2:", "stage.vin"}},
		{"point without weight", "[[point]]\nname = \"a\"\niout = 3\n", []string{"point without weight.toml:1:1: point.1:", "weight"}},
		{"point bad key", "[[point]]\nweight = 1\nparts = \"x\"\n", []string{"point bad key.toml:3:1: point.1.parts:"}},
		{"bad weight", "[[point]]\nweight = -1\n", []string{"bad weight.toml:2:1: point.1.weight:"}},
	}
	for _, tc := range tests {
		path := filepath.Join(dir, tc.name+".toml")
		if err := os.WriteFile(path, []byte(tc.src), 0o644); err != nil {
			t.Fatal(err)
		}
		code, _, errOut := runSw(t, "rank", "--design", path, "--demo", "--vin", "12", "--vout", "1.2", "--iout", "10", "--fsw", "500k", "--vdrive", "5")
		if code == 0 {
			t.Errorf("%s: exit 0", tc.name)
			continue
		}
		for _, w := range tc.want {
			if !strings.Contains(errOut, w) {
				t.Errorf("%s: error %q lacks %q", tc.name, errOut, w)
			}
		}
	}
}

type weightedRank struct {
	Profile []struct {
		Point  string  `json:"point"`
		Weight float64 `json:"weight"`
	} `json:"profile"`
	Results []struct {
		Part         string  `json:"part"`
		N            int     `json:"n"`
		TotalW       float64 `json:"total_w"`
		SingleTotalW float64 `json:"single_total_w"`
		EffWeighted  float64 `json:"eff_weighted_pct"`
		SetAside     bool    `json:"set_aside"`
		Points       []struct {
			TotalW float64 `json:"total_w"`
			Eff    float64 `json:"eff_pct"`
		} `json:"points"`
		Tried []struct {
			N      int     `json:"n"`
			TotalW float64 `json:"total_w"`
		} `json:"tried"`
	} `json:"results"`
}

// Hand losses of linear.csv's parts at I_rms = 20 A·x and 200 kHz:
// P(x) = 400·x²·R + 200 kHz·E₁, E₁ = E_oss(100 V) + Qg·10 V.
var linearLoss = map[string]func(x float64) float64{
	"lin-a":  func(x float64) float64 { return 400*x*x*2e-3 + 200e3*2e-6 },
	"lin-b":  func(x float64) float64 { return 400*x*x*4e-3 + 200e3*1e-6 },
	"lin-c":  func(x float64) float64 { return 400*x*x*8e-3 + 200e3*0.25e-6 },
	"case-d": func(x float64) float64 { return 400*x*x*4e-3 + 200e3*2e-6 },
}

// rank --weighting euro against Σ wᵢ·ηᵢ worked from the models with the
// published weights (European weighted efficiency as used by EN 50530):
// 0.03·η5 + 0.06·η10 + 0.13·η20 + 0.10·η30 + 0.48·η50 + 0.20·η100.
func TestRankWeighting(t *testing.T) {
	var r weightedRank
	decoded(t, &r, append([]string{"rank", "--format", "json", "--weighting", "euro"}, linearFlags...)...)
	loads := []float64{0.05, 0.10, 0.20, 0.30, 0.50, 1}
	weights := []float64{0.03, 0.06, 0.13, 0.10, 0.48, 0.20}
	prev := 200.0
	n := 0
	for _, res := range r.Results {
		f, ok := linearLoss[res.Part]
		if !ok {
			continue
		}
		n++
		want := 0.0
		for i, x := range loads {
			want += weights[i] * 1000 * x / (1000*x + f(x))
			closeTo(t, res.Part+" point loss", res.Points[i].TotalW, f(x), 1e-9)
		}
		closeTo(t, res.Part+" weighted efficiency", res.EffWeighted, 100*want, 1e-12)
		if res.EffWeighted > prev {
			t.Errorf("%s out of order", res.Part)
		}
		prev = res.EffWeighted
	}
	if n != 4 {
		t.Errorf("%d of the 4 hand parts ranked", n)
	}
}

// Named points with weights 3 and 1 become 0.75 and 0.25; the full point
// at 20 A, the light one at 2 A and 100 W.
func TestRankDesignPoints(t *testing.T) {
	var r weightedRank
	decoded(t, &r, "rank", "--format", "json", "--design", decisionsDir+"/points.toml")
	if len(r.Profile) != 2 || r.Profile[0].Point != "full" || r.Profile[1].Point != "light" {
		t.Fatalf("points %+v", r.Profile)
	}
	closeTo(t, "full weight", r.Profile[0].Weight, 0.75, 1e-12)
	closeTo(t, "light weight", r.Profile[1].Weight, 0.25, 1e-12)
	for _, res := range r.Results {
		if res.Part != "lin-a" {
			continue
		}
		// lin-a: full 0.8 + 0.4 = 1.2 W of 1 kW, light 4·2 mΩ + 0.4 = 0.408 W of 100 W.
		closeTo(t, "lin-a weighted", res.EffWeighted, 100*(0.75*1000/1001.2+0.25*100/100.408), 1e-12)
	}
}

// rank --parallel auto, a hand calculation from P(N) = I_rms²·R₁/N +
// N·f·E₁ (common practice for identical paralleled devices), with I_rms
// 20 A, R₁ 4 mΩ, E₁ 2 µJ at 200 kHz: P(N) = 1.6/N +
// 0.4·N W → 2.0, 1.6, 1.733, 2.0 for N = 1..4, N_opt 2; and the other
// parts by the same model (lin-a 0.8/N + 0.4·N: a tie at 1 and 2 goes to
// 1; lin-b 1.6/N + 0.2·N: 3; lin-c 3.2/N + 0.05·N: 4, the limit).
func TestRankParallelAuto(t *testing.T) {
	var r weightedRank
	decoded(t, &r, append([]string{"rank", "--format", "json", "--parallel", "auto", "--parallel-max", "4"}, linearFlags...)...)
	want := map[string]int{"case-d ×2": 2, "lin-a": 1, "lin-b ×3": 3, "lin-c ×4": 4}
	seen := 0
	for _, res := range r.Results {
		n, ok := want[res.Part]
		if !ok {
			continue
		}
		seen++
		if res.N != n {
			t.Errorf("%s: N = %d, want %d", res.Part, res.N, n)
		}
		if strings.HasPrefix(res.Part, "case-d") {
			for i, w := range []float64{2.0, 1.6, 1.6/3 + 1.2, 2.0} {
				if res.Tried[i].N != i+1 {
					t.Errorf("case-d count %d: %d", i, res.Tried[i].N)
				}
				closeTo(t, "case-d P(N)", res.Tried[i].TotalW, w, 1e-9)
			}
			closeTo(t, "case-d total", res.TotalW, 1.6, 1e-9)
			closeTo(t, "case-d single", res.SingleTotalW, 2.0, 1e-9)
		}
	}
	if seen != len(want) {
		t.Errorf("found %d of %d parts: %+v", seen, len(want), r.Results)
	}
}
