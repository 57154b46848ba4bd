package main

import (
	"bytes"
	"encoding/csv"
	"encoding/json"
	"path/filepath"
	"strconv"
	"strings"
	"testing"
	"unicode/utf8"

	"swrank/rank/report"
)

// The labels a reader tripped on, each through the command line: what the
// output must say and what it must not.
func TestLabels(t *testing.T) {
	buck := []string{"--demo", "--vin", "12", "--vout", "1.2", "--iout", "10", "--fsw", "500k", "--vdrive", "5"}
	cases := []struct {
		name    string
		args    []string
		want    []string
		notWant []string
	}{
		{"the hottest junction is a result, not the limit", args([]string{"rank"}, buck, []string{"--parallel", "2"}),
			[]string{"Tj °C"}, []string{"Tj max"}},
		{"a partner is named once, not joined to every part", args([]string{"rank", "--position", "control", "--partner", "slate-25-sync"}, buck),
			[]string{"the other place holds slate-25-sync in every row"}, []string{" + slate-25-sync"}},
		{"one part is a part", []string{"rank", "--parts", cliDir + "hand_a.csv", "--topology", "custom", "--vblock", "12", "--ion", "10",
			"--ioff", "10", "--irms", "5", "--fsw", "500k", "--vdrive", "5"},
			[]string{": 1 part\n"}, []string{"1 parts"}},
		{"a tiny share prints as 0, not in picowatts", args([]string{"rank", "--wide", "--all"}, buck), nil, []string{" pW"}},
		{"the derating limit is named with its value", args([]string{"rank"}, buck),
			[]string{"exceeds the derating limit 24.0 V (80 % of vds_max 30.0 V, --derate)", "voltage derating limit:"}, nil},
		{"class D has its own columns", []string{"rank", "--demo", "--topology", "class-d", "--vin", "48", "--pout", "50", "--fsw", "1M",
			"--f0", "900k", "--ql", "5", "--dead-time", "40n", "--vdrive", "5"},
			[]string{"soft turn-on"}, []string{"C to add", "f limit", "shunt"}},
		{"class E has its own columns", []string{"rank", "--demo", "--topology", "class-e", "--vin", "12", "--pout", "10", "--fsw", "6.78M",
			"--ql", "10", "--vdrive", "5"},
			[]string{"peak V", "C to add"}, []string{"soft turn-on"}},
		{"the weights are said to be scaled", args([]string{"rank", "--weighting", "10%:2,50%:5,100%:3"}, buck),
			[]string{"scaled to sum to 1", "weight 0.2:", "weight 0.5:"}, nil},
		{"a default ambient says so", args([]string{"rank"}, buck), []string{"ambient 25.0 °C (the default; --ta sets it)"}, nil},
		{"a given ambient is the one used", args([]string{"rank", "--ta", "40"}, buck), []string{"ambient 40.0 °C"}, []string{"(the default; --ta"}},
		{"the default dead time says it can be set", args([]string{"rank"}, buck), []string{"dead time 20.0 ns (the default", "--dead-time sets it"}, nil},
		{"a given dead time is not called the default", args([]string{"rank", "--dead-time", "5n"}, buck), []string{"dead time 5.00 ns"}, []string{"--dead-time sets it"}},
		{"each edge's own dead time is named", args([]string{"rank", "--dead-time-sync-on", "15n", "--dead-time-ctrl-on", "30n"}, buck),
			[]string{"dead time 15.0 ns before the sync switch turns on, 30.0 ns before the\n    control switch does"}, []string{"--dead-time sets it"}},
		{"equal edges given are not called the default", args([]string{"rank", "--dead-time-sync-on", "30n", "--dead-time-ctrl-on", "30n"}, buck),
			[]string{"dead time 30.0 ns\n"}, []string{"--dead-time sets it", "before the sync switch"}},
		{"the sync switch's own driver is named", args([]string{"rank", "--sync-vdrive", "10", "--sync-rsrc", "1"}, buck),
			[]string{"sync switch's own drive 10.0 V / 0 V, source 1.00 Ω, sink 1.00 Ω, external resistor 0 Ω"}, nil},
		{"one driver is one drive line", args([]string{"rank"}, buck), nil, []string{"own drive"}},
		{"a runaway junction has no temperature in explain", args([]string{"explain"}, buck, []string{"pebble-30"}),
			[]string{"Tj, runaway", "Tj none: runaway"}, []string{"Tj 0 °C", "0.000 °C"}},
		{"an overshoot past vds_max is an avalanche, not a number", args([]string{"explain"}, buck, []string{"pebble-30"}),
			[]string{"the part would avalanche"}, []string{"50.5 V"}},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			code, out, e := runCLI(t, c.args...)
			if code != 0 && code != 3 { // 3: no part passes; the output is written all the same
				t.Fatalf("exit %d: %s", code, e)
			}
			for _, w := range c.want {
				if !strings.Contains(out, w) {
					t.Errorf("lacks %q:\n%s", w, out)
				}
			}
			for _, w := range c.notWant {
				if strings.Contains(out, w) {
					t.Errorf("holds %q:\n%s", w, out)
				}
			}
		})
	}
}

// The README's examples print at most 100 columns when the output is not
// a terminal (the width the table falls back to): every swrank command of
// README.md that prints the text table, run as TestDocExamples runs it,
// with the exit status the README states.
func TestREADMEExamplesFitWidth(t *testing.T) {
	root, err := filepath.Abs("../..")
	if err != nil {
		t.Fatal(err)
	}
	exs := docExamples(t, filepath.Join(root, "README.md"))
	if len(exs) < 5 {
		t.Fatalf("found %d examples in README.md; the extraction is broken", len(exs))
	}
	t.Chdir(t.TempDir())
	for _, ex := range exs {
		var out, errb bytes.Buffer
		if code := runIO(exampleArgs(root, ex), strings.NewReader(""), &out, &errb); code != ex.code {
			t.Errorf("%s: swrank %s: exit %d, want %d\n%s", ex.where, strings.Join(ex.args, " "), code, ex.code, errb.String())
			continue
		}
		if !tableOutput(ex.args) {
			continue
		}
		for i, l := range strings.Split(out.String(), "\n") {
			if n := utf8.RuneCountInString(l); n > 100 {
				t.Errorf("%s: swrank %s: line %d is %d columns: %q", ex.where, strings.Join(ex.args, " "), i+1, n, l)
			}
		}
	}
}

// tableOutput reports whether a command line prints the text table: not
// CSV, JSON or Markdown, and not characterise (a library row).
func tableOutput(args []string) bool {
	if len(args) > 0 && args[0] == "characterise" {
		return false
	}
	for i, a := range args {
		if f, v, ok := strings.Cut(a, "="); ok && strings.TrimLeft(f, "-") == "format" {
			return v == "table"
		}
		if strings.TrimLeft(a, "-") == "format" && i+1 < len(args) {
			return args[i+1] == "table"
		}
	}
	return true
}

// Every command's CSV holds plain numbers in its number columns (or an
// empty cell for unknown), never text such as "118 mW", and its JSON
// carries the schema version; the same quantity has the same name in every
// command.
func TestMachineFormatsPlain(t *testing.T) {
	buck := []string{"--demo", "--vin", "12", "--vout", "1.2", "--iout", "10", "--fsw", "500k", "--vdrive", "5"}
	cases := []struct {
		name string
		args []string
	}{
		{"rank", args([]string{"rank"}, buck)},
		{"rank, the decision path", args([]string{"rank", "--parallel", "2"}, buck)},
		{"rank over a profile", args([]string{"rank", "--weighting", "euro"}, buck)},
		{"compare", args([]string{"compare", "--fitted", "basalt-40"}, buck)},
		{"sweep", args([]string{"sweep", "--var", "fsw", "--from", "100k", "--to", "1M", "--steps", "4"}, buck)},
		{"sweep with components", args([]string{"sweep", "--components", "--var", "iout", "--from", "2", "--to", "10", "--steps", "3"}, buck)},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			code, out, e := runCLI(t, append(c.args, "--format", "csv")...)
			if code != 0 {
				t.Fatalf("csv: exit %d: %s", code, e)
			}
			rows, err := csv.NewReader(strings.NewReader(out)).ReadAll()
			if err != nil || len(rows) < 2 {
				t.Fatalf("csv: %v\n%s", err, out)
			}
			for j, h := range rows[0] {
				f, ok := report.FieldOf(h)
				if !ok {
					t.Errorf("column %q is not a documented field", h)
					continue
				}
				if f.Kind != report.KindNumber {
					continue
				}
				for i, r := range rows[1:] {
					if _, err := strconv.ParseFloat(r[j], 64); r[j] != "" && err != nil {
						t.Errorf("row %d, %s: %q is not a plain number", i+1, h, r[j])
					}
				}
			}
			code, out, e = runCLI(t, append(c.args, "--format", "json")...)
			var doc struct {
				Version int `json:"schema_version"`
			}
			if code != 0 || json.Unmarshal([]byte(out), &doc) != nil || doc.Version != report.SchemaVersion {
				t.Errorf("json: exit %d, version %d: %s", code, doc.Version, e)
			}
			if strings.Contains(out, "NaN") || strings.Contains(out, "Inf") {
				t.Errorf("json holds a value that is not a number")
			}
		})
	}
}
