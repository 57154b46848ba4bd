package main

import (
	"bytes"
	"encoding/csv"
	"encoding/json"
	"encoding/xml"
	"io"
	"os"
	"path/filepath"
	"slices"
	"strconv"
	"strings"
	"testing"
	"unicode/utf8"
)

// hostileNames are the part names of testdata/cli/hostile.csv.
var hostileNames = []string{"OSC\x1b]0;owned\x07\x1b[2J", "=1+2", "@SUM(A1)|pipe", "µFET-Ω 4.5 mΩ", "-2+3"}

// controlFree reports the first character of s a terminal could act on:
// a C0 control other than the line end, DEL, or a C1 control (ECMA-48).
func controlFree(s string) (rune, bool) {
	for _, r := range s {
		if r < 0x20 && r != '\n' || r >= 0x7f && r <= 0x9f || r == '\u202e' {
			return r, false
		}
	}
	return 0, true
}

// TestHostileLibrary runs the hostile library through every renderer:
// nothing in it reaches the output as a control character; names keep
// their printable Unicode; CSV cells that begin like a formula keep their
// neutralising prefix (OWASP, "CSV Injection": = + - @ tab CR) while
// numbers stay numbers; JSON decodes to the names as written; Markdown
// escapes the pipe; the SVG plot is well-formed XML.
func TestHostileLibrary(t *testing.T) {
	const lib = "../../testdata/cli/hostile.csv"
	custom := []string{"--parts", lib, "--topology", "custom", "--vblock", "12", "--ion", "3", "--ioff", "4", "--irms", "2", "--fsw", "300k", "--vdrive", "5", "--all"}
	run := func(a ...string) (string, string) {
		t.Helper()
		code, out, errOut := runCLI(t, a...)
		if code != 0 {
			t.Fatalf("%q: code %d, stderr %q", a, code, errOut)
		}
		for _, s := range []string{out, errOut} {
			if r, ok := controlFree(s); !ok {
				t.Errorf("%q: control character %U in the output:\n%s", a, r, s)
			}
		}
		return out, errOut
	}
	for _, format := range []string{"table", "markdown"} {
		for _, extra := range [][]string{nil, {"--parallel", "auto"}} {
			out, _ := run(append(append(append([]string{"rank"}, custom...), "--format", format), extra...)...)
			for _, want := range []string{`OSC\x1b]0;owned\a\x1b[2J`, "µFET-Ω 4.5 mΩ", "=1+2"} {
				if !strings.Contains(out, want) {
					t.Errorf("%s %v: output lacks %q:\n%s", format, extra, want, out)
				}
			}
			if format == "markdown" && !strings.Contains(out, `@SUM(A1)\|pipe`) {
				t.Errorf("markdown %v: the pipe is not escaped:\n%s", extra, out)
			}
		}
	}
	out, _ := run(append(append([]string{"rank"}, custom...), "--format", "csv")...)
	rows, err := csv.NewReader(strings.NewReader(out)).ReadAll()
	if err != nil || len(rows) != 6 {
		t.Fatalf("csv: %v, %d rows", err, len(rows))
	}
	part, total := slices.Index(rows[0], "part"), slices.Index(rows[0], "total_w")
	if part < 0 || total < 0 {
		t.Fatalf("csv: no part or total_w column in %q", rows[0])
	}
	got := map[string]bool{}
	for _, row := range rows[1:] {
		got[row[part]] = true
		if _, err := strconv.ParseFloat(row[total], 64); err != nil {
			t.Errorf("csv: total %q is not a number", row[total])
		}
	}
	for _, want := range []string{`OSC\x1b]0;owned\a\x1b[2J`, "'=1+2", "'@SUM(A1)|pipe", "µFET-Ω 4.5 mΩ", "'-2+3"} {
		if !got[want] {
			t.Errorf("csv: no part cell %q in %v", want, got)
		}
	}
	for _, extra := range [][]string{nil, {"--parallel", "auto"}} {
		out, _ = run(append(append(append([]string{"rank"}, custom...), "--format", "json"), extra...)...)
		var doc struct {
			Results []struct {
				Part string `json:"part"`
			} `json:"results"`
		}
		if err := json.Unmarshal([]byte(out), &doc); err != nil || len(doc.Results) != len(hostileNames) {
			t.Fatalf("json %v: %v, %d results", extra, err, len(doc.Results))
		}
		names := map[string]bool{}
		for _, r := range doc.Results {
			names[r.Part] = true
		}
		for _, n := range hostileNames {
			if !names[n] {
				t.Errorf("json %v: name %q not kept as written", extra, n)
			}
		}
	}
	for _, name := range hostileNames {
		run(append(append([]string{"explain"}, custom[:len(custom)-1]...), "--", name)...)
	}
	run(append(append([]string{"compare"}, custom[:len(custom)-1]...), "--fitted", hostileNames[0])...)
	plot := filepath.Join(t.TempDir(), "p.svg")
	run(append(append([]string{"sweep", "--var", "fsw", "--from", "100k", "--to", "1M", "--plot", plot}, append(custom[:len(custom)-1:len(custom)-1], "--")...), hostileNames...)...)
	svg, err := os.ReadFile(plot)
	if err != nil {
		t.Fatal(err)
	}
	// Tabs and line ends are XML white space between the elements.
	if r, ok := controlFree(strings.NewReplacer("\t", "", "\r", "").Replace(string(svg))); !ok || !utf8.Valid(svg) {
		t.Errorf("svg: control character %U", r)
	}
	dec := xml.NewDecoder(bytes.NewReader(svg))
	for {
		if _, err := dec.Token(); err == io.EOF {
			break
		} else if err != nil {
			t.Fatalf("svg is not well-formed XML: %v", err)
		}
	}
	if !bytes.Contains(svg, []byte(`@SUM(A1)|pipe`)) {
		t.Errorf("svg lacks a legend name")
	}
	// An error that quotes a hostile name.
	code, _, errOut := runCLI(t, append(append([]string{"explain"}, custom[:len(custom)-1]...), "--", "NO\x1b]0;x\x07")...)
	if r, ok := controlFree(errOut); code != 1 || !ok || !strings.Contains(errOut, `no part named "NO\x1b]0;x\a"`) {
		t.Errorf("explain: code %d, control %U: %q", code, r, errOut)
	}
	// A problem that quotes a hostile name or column.
	bad := filepath.Join(t.TempDir(), "bad.csv")
	if err := os.WriteFile(bad, []byte("part,vds\x1b[2J\n\x1b]0;x\x07,1\n"), 0o644); err != nil {
		t.Fatal(err)
	}
	code, out, errOut = runCLI(t, "check", bad)
	if r, ok := controlFree(out + errOut); code != 1 || !ok || !strings.Contains(out, `bad.csv:1:2: vds\x1b[2j: unknown column`) {
		t.Errorf("check: code %d, control %U:\n%s", code, r, out)
	}
}
