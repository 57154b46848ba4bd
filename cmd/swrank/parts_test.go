package main

import (
	"encoding/json"
	"strings"
	"testing"

	"swrank/rank/report"
)

// parts lists every part with its ratings, package, technology and the
// count of values the models would estimate for it.
func TestParts(t *testing.T) {
	const cli = "../../testdata/cli/"
	for _, c := range []struct {
		name string
		args []string
		code int
		want []string // in stdout, or in stderr when code != 0
	}{
		{"demo table", []string{"parts", "--demo"}, 0, []string{"library demo: 23 parts", "slate-30-lo", "DFN 5x6", "100 A", "est:"}},
		{"two files csv", []string{"parts", cli + "lib.csv", cli + "hand_a.csv", "--format", "csv"}, 0,
			[]string{"part,technology,package,vds_max_v,id_max_a,estimated,estimates\n", "low-r,si,box-8,30,80,", "hand-a,si,"}},
		{"markdown", []string{"parts", "--format", "markdown", cli + "lib.csv"}, 0, []string{"| small-q"}},
		{"no library", []string{"parts"}, 2, []string{"parts takes one or more library files"}},
		{"bad library", []string{"parts", cli + "bad_unit.csv"}, 1, []string{"bad_unit.csv:"}},
		{"bad format", []string{"parts", "--demo", "--format", "xml"}, 2, []string{"see swrank parts -h"}},
	} {
		t.Run(c.name, func(t *testing.T) {
			code, out, e := runCLI(t, c.args...)
			if code != c.code {
				t.Fatalf("exit %d, want %d: %s", code, c.code, e)
			}
			got := out
			if code != 0 {
				got = e
			}
			for _, w := range c.want {
				if !strings.Contains(got, w) {
					t.Errorf("output lacks %q:\n%s", w, got)
				}
			}
		})
	}
	// The count is the number of estimate flags of the prepared part: the
	// demo's minimal row has many, a complete row none.
	code, out, _ := runCLI(t, "parts", "--demo", "--format", "json")
	var rep struct {
		Parts []report.PartsListJSON `json:"parts"`
	}
	if err := json.Unmarshal([]byte(out), &rep); code != 0 || err != nil {
		t.Fatalf("json: exit %d, %v", code, err)
	}
	est := map[string]int{}
	for _, p := range rep.Parts {
		est[p.Part] = p.Estimated
		if p.Estimated != strings.Count(p.Estimates, ",")+1 && p.Estimates != "" {
			t.Errorf("%s: %d estimated but codes %q", p.Part, p.Estimated, p.Estimates)
		}
	}
	if est["slate-30-lo"] != 0 || est["basalt-60-lite"] < 5 {
		t.Errorf("estimates: slate-30-lo %d (want 0), basalt-60-lite %d (want ≥ 5)", est["slate-30-lo"], est["basalt-60-lite"])
	}
}
