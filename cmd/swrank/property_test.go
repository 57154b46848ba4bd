package main

import (
	"bytes"
	"encoding/json"
	"fmt"
	"math"
	"math/rand/v2"
	"os"
	"path/filepath"
	"reflect"
	"strings"
	"testing"

	"github.com/gocarina/gocsv"

	"swrank/devices"
	q "swrank/devices/quantity"
)

// propertyPoints are operating points across every topology: buck with a
// synchronous switch and with a diode, boost, custom, class E, class D,
// and the decision path (paralleled copies, worst case) of the buck.
var propertyPoints = [][]string{
	{"--vin", "12", "--vout", "1.2", "--iout", "10", "--fsw", "500k", "--vdrive", "5"},
	{"--vin", "48", "--vout", "12", "--iout", "4", "--fsw", "200k", "--vdrive", "10", "--rectifier", "diode", "--diode-vf", "0.5"},
	{"--topology", "boost", "--vin", "12", "--vout", "36", "--iout", "2", "--fsw", "300k", "--vdrive", "10"},
	{"--topology", "custom", "--vblock", "60", "--ion", "4", "--ioff", "6", "--irms", "3", "--fsw", "1M", "--vdrive", "5", "--pout", "180"},
	{"--topology", "class-e", "--vin", "12", "--pout", "10", "--fsw", "6.78M", "--ql", "10", "--vdrive", "5"},
	{"--topology", "class-d", "--vin", "48", "--pout", "50", "--fsw", "1M", "--f0", "900k", "--ql", "5", "--dead-time", "40n", "--vdrive", "5"},
	{"--vin", "12", "--vout", "1.2", "--iout", "10", "--fsw", "500k", "--vdrive", "5", "--parallel", "auto"},
}

// rankedJSON is what the property reads of rank's JSON, plain or decisions.
type rankedJSON struct {
	OperatingPoint *struct {
		PoutW float64 `json:"pout_w"`
	} `json:"operating_point"`
	// Results hold every part: ranked, screened (set_aside) and, with
	// not_evaluated and line, set aside before evaluation.
	Results []map[string]any `json:"results"`
}

// TestRankRefusesNoAcceptedRow is the property "what rank would refuse,
// check reports first": for every row check accepts, rank at every point
// of propertyPoints gives a result or a stated set-aside reason, never an
// error; a part set aside before evaluation is one check warned of; and
// no passing part loses more than the power its stage processes, or has a
// negative share (evaluate screens such results as not physical). Run
// over the demo, the test libraries that check accepts whole, and 300
// perturbed rows of the demo.
func TestRankRefusesNoAcceptedRow(t *testing.T) {
	if testing.Short() {
		t.Skip("the property runs every library at every point")
	}
	dir := t.TempDir()
	demo := filepath.Join(dir, "demo.csv")
	if err := os.WriteFile(demo, devices.DemoCSV(), 0o644); err != nil {
		t.Fatal(err)
	}
	libs := []string{demo, perturbedLibrary(t, dir, 300, 19)}
	for _, pattern := range []string{"../../testdata/cli/*.csv", "../../testdata/decisions/*.csv", "../../testdata/dialects/*", "../../devices/testdata/parts/*.csv"} {
		files, _ := filepath.Glob(pattern)
		libs = append(libs, files...)
	}
	rows, runs, ranked, screened, aside := 0, 0, 0, 0, 0
	for _, lib := range libs {
		f, err := os.Open(lib)
		if err != nil {
			t.Fatal(err)
		}
		l, probs := (devices.ReadOptions{}).Check(f, lib)
		f.Close()
		if probs.Fatal() || len(l.Parts) == 0 {
			continue // not a library check accepts: rank refuses it whole, with the located problems
		}
		_, checkOut, _ := runCLI(t, "check", lib)
		checkOut = strings.ReplaceAll(checkOut, "\n  ", " ") // the lines as written, unwrapped
		rows += len(l.Parts)
		for _, pt := range propertyPoints {
			runs++
			a := append([]string{"rank", "--parts", lib, "--format", "json", "--all"}, pt...)
			code, out, errOut := runCLI(t, a...)
			if code != 0 && code != 3 { // 3: no part passes, the reasons stated
				t.Errorf("%v: code %d, stderr %s", a, code, errOut)
				continue
			}
			var doc rankedJSON
			if err := json.Unmarshal([]byte(out), &doc); err != nil {
				t.Fatalf("%v: %v", a, err)
			}
			seen := map[string]bool{}
			for _, r := range doc.Results {
				part, _ := r["part"].(string)
				name, _, _ := strings.Cut(part, " ×")
				seen[name] = true
				if why, _ := r["not_evaluated"].(string); why != "" && r["line"] != nil {
					aside++
					line, _ := r["line"].(float64)
					if !strings.Contains(checkOut, fmt.Sprintf("%s:%d: rank sets this part aside", lib, int(line))) {
						t.Errorf("%v: %q set aside (%q) without check's warning first:\n%s", a, part, why, checkOut)
					}
					continue
				}
				if r["set_aside"] == true {
					screened++
					if rs, _ := r["reasons"].([]any); len(rs) == 0 {
						t.Errorf("%v: %q set aside without a reason", a, part)
					}
					continue
				}
				ranked++
				total, _ := r["total_w"].(float64)
				if doc.OperatingPoint != nil && doc.OperatingPoint.PoutW > 0 && total > doc.OperatingPoint.PoutW {
					t.Errorf("%v: %q ranked with %g W lost of %g W processed", a, part, total, doc.OperatingPoint.PoutW)
				}
				shares := r
				if l, ok := r["losses"].(map[string]any); ok {
					shares = l // the decision path nests them
				}
				n := 0
				for k, v := range shares {
					if x, ok := v.(float64); ok && strings.HasSuffix(k, "_w") {
						n++
						if !(x >= 0) {
							t.Errorf("%v: %q ranked with %s = %g", a, part, k, x)
						}
					}
				}
				if n < 10 {
					t.Errorf("%v: %q: %d loss shares in %v", a, part, n, r)
				}
			}
			for _, p := range l.Parts {
				if !seen[p.Name] {
					t.Errorf("%v: accepted row %q (line %d) neither ranked nor set aside", a, p.Name, p.Line)
				}
			}
		}
	}
	t.Logf("%d accepted rows × %d points (%d runs of rank): %d results ranked, %d screened, %d set aside before evaluation",
		rows, len(propertyPoints), runs, ranked, screened, aside)
	if rows < 300 {
		t.Errorf("only %d rows", rows)
	}
}

// perturbedLibrary writes a library of n rows that check accepts, made
// from the demo's rows with six given values of each scaled by 10^u, u
// uniform in [−2, 2] (seeded), rows check rejects dropped; it returns its
// path.
func perturbedLibrary(t *testing.T, dir string, n int, seed uint64) string {
	t.Helper()
	demo, err := devices.Demo()
	if err != nil {
		t.Fatal(err)
	}
	rng := rand.New(rand.NewPCG(seed, seed^0x5eed))
	var kept []devices.Part
	for try := 0; len(kept) < n && try < 50*n; try++ {
		p := demo.Parts[try%len(demo.Parts)]
		p.Name = fmt.Sprintf("PERT-%04d", try)
		v := reflect.ValueOf(&p).Elem()
		var given []reflect.Value
		for i := 0; i < v.NumField(); i++ {
			f := v.Field(i)
			switch {
			case f.Kind() == reflect.Float64 && f.Addr().Type().Implements(reflect.TypeFor[interface{ Kind() q.Kind }]()):
				given = append(given, f)
			case f.Kind() == reflect.Struct && f.NumField() == 2 && f.Field(1).Kind() == reflect.Bool && f.Field(1).Bool() &&
				f.Field(0).Kind() == reflect.Float64:
				given = append(given, f.Field(0))
			}
		}
		rng.Shuffle(len(given), func(i, j int) { given[i], given[j] = given[j], given[i] })
		for _, f := range given[:min(6, len(given))] {
			f.SetFloat(f.Float() * math.Pow(10, 4*rng.Float64()-2))
		}
		b, err := gocsv.MarshalBytes([]devices.Part{p})
		if err != nil {
			t.Fatal(err)
		}
		if l, probs := (devices.ReadOptions{}).Check(bytes.NewReader(b), "row.csv"); !probs.Fatal() && len(l.Parts) == 1 {
			kept = append(kept, p)
		}
	}
	if len(kept) < n {
		t.Fatalf("only %d perturbed rows accepted", len(kept))
	}
	b, err := gocsv.MarshalBytes(kept)
	if err != nil {
		t.Fatal(err)
	}
	path := filepath.Join(dir, "perturbed.csv")
	if err := os.WriteFile(path, b, 0o644); err != nil {
		t.Fatal(err)
	}
	return path
}
