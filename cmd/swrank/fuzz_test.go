package main

import (
	"encoding/json"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"swrank/devices"
)

// fuzzPoints are three operating points: a synchronous buck, a class E
// stage and a custom cell with a stated output power.
var fuzzPoints = [][]string{
	{"--vin", "12", "--vout", "1.2", "--iout", "10", "--fsw", "500k", "--vdrive", "5"},
	{"--topology", "class-e", "--vin", "12", "--pout", "10", "--fsw", "6.78M", "--ql", "10", "--vdrive", "5"},
	{"--topology", "custom", "--vblock", "60", "--ion", "4", "--ioff", "6", "--irms", "3", "--fsw", "1M", "--vdrive", "5", "--pout", "180"},
}

// FuzzRankLibrary feeds arbitrary bytes as a parts library through the
// whole way: load, rank at three points, every renderer (table, CSV,
// JSON, Markdown). No panic; a refused library exits 1 with a message; an
// accepted one exits 0 (3 when no part passes) with no NaN or infinity
// printed, no control character in the output, and every loss share of a
// ranked part ≥ 0.
// Seeded with every bad-input file of the tests and the hostile library.
func FuzzRankLibrary(f *testing.F) {
	for _, pattern := range []string{"../../devices/testdata/parts/*.csv", "../../testdata/cli/*.csv", "../../testdata/dialects/*", "../../testdata/decisions/*.csv"} {
		files, _ := filepath.Glob(pattern)
		for _, name := range files {
			b, err := os.ReadFile(name)
			if err != nil {
				f.Fatal(err)
			}
			f.Add(b)
		}
	}
	f.Fuzz(func(t *testing.T, b []byte) {
		path := filepath.Join(t.TempDir(), "lib.csv")
		if err := os.WriteFile(path, b, 0o644); err != nil {
			t.Fatal(err)
		}
		lib, probs := (devices.ReadOptions{}).Check(strings.NewReader(string(b)), path)
		// A NaN or an infinity may be printed only as the user's own text.
		ownText := false
		for _, p := range lib.Parts {
			s := strings.ToLower(p.Name + p.Package + p.Notes)
			ownText = ownText || strings.Contains(s, "nan") || strings.Contains(s, "inf") || strings.Contains(s, "n/a")
		}
		for _, pt := range fuzzPoints {
			for _, format := range []string{"table", "csv", "json", "markdown"} {
				a := append([]string{"rank", "--parts", path, "--all", "--format", format}, pt...)
				code, out, errOut := runCLI(t, a...)
				if probs.Fatal() {
					if code != 1 || out != "" || errOut == "" {
						t.Fatalf("%v: refused library: code %d, stdout %q, stderr %q", a, code, out, errOut)
					}
					continue
				}
				if code != 0 && code != 3 { // 3: no part passes, the reasons stated
					t.Fatalf("%v: accepted library: code %d, stderr %q", a, code, errOut)
				}
				if r, ok := controlFree(out); !ok {
					t.Fatalf("%v: control character %U in:\n%s", a, r, out)
				}
				if !ownText {
					for _, bad := range []string{"NaN", "Inf", "n/a"} {
						if strings.Contains(out, bad) {
							t.Fatalf("%v: %s printed:\n%s", a, bad, out)
						}
					}
				}
				if format != "json" {
					continue
				}
				var doc struct {
					Results []map[string]any `json:"results"`
				}
				if err := json.Unmarshal([]byte(out), &doc); err != nil {
					t.Fatalf("%v: %v", a, err)
				}
				for _, r := range doc.Results {
					if r["set_aside"] == true {
						continue
					}
					for k, v := range r {
						if x, ok := v.(float64); ok && strings.HasSuffix(k, "_w") && !(x >= 0) {
							t.Fatalf("%v: %v ranked with %s = %g", a, r["part"], k, x)
						}
					}
				}
			}
		}
	})
}
