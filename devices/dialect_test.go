package devices

import (
	"bytes"
	"errors"
	"os"
	"reflect"
	"strings"
	"testing"
)

// TestDialects reads the spreadsheet exports of testdata/dialects with
// every decoder: the European export (byte-order mark, CRLF, semicolons,
// decimal commas) and the tab-separated one give the parts of the plain
// CSV file; a header whose separator cannot be told is one problem naming
// what the header holds.
func TestDialects(t *testing.T) {
	plain, err := Load("../testdata/dialects/plain.csv")
	if err != nil {
		t.Fatal(err)
	}
	if plain.Dialect != Comma || !plain.Dialect.Plain() || len(plain.Parts) != 3 {
		t.Fatalf("plain.csv: dialect %v, %d parts", plain.Dialect, len(plain.Parts))
	}
	for _, c := range []struct {
		file    string
		dialect Dialect
		name    string
		errText string // the one problem's message, when the file is refused
	}{
		{"european.csv", Dialect{Sep: ';', DecimalComma: true}, "semicolon-separated, decimal commas accepted", ""},
		{"tabs.tsv", Dialect{Sep: '\t', DecimalComma: true}, "tab-separated, decimal commas accepted", ""},
		{"pipes.csv", Comma, "", `f.csv:1: cannot tell the cell separator: the header line "part|package|technology|notes|price|vds_max|id_max|vgs_max|v"… has no comma, semicolon or tab between column names`},
		{"ambiguous.csv", Comma, "", `f.csv:1: cannot tell the cell separator: the header line "Teil;Spannung,Strom" has 1 comma and 1 semicolon, and neither gives more known column names`},
	} {
		b, err := os.ReadFile("../testdata/dialects/" + c.file)
		if err != nil {
			t.Fatal(err)
		}
		for _, d := range decoders {
			lib, probs := check(bytes.NewReader(b), "f.csv", d.kind, ReadOptions{})
			if c.errText != "" {
				if len(probs) != 1 || probs.Error() != c.errText || !errors.Is(probs, ErrSeparator) || !probs.Fatal() {
					t.Errorf("%s (%s): %v", c.file, d.name, probs)
				}
				continue
			}
			if len(probs) > 0 {
				t.Errorf("%s (%s): %v", c.file, d.name, probs)
				continue
			}
			if lib.Dialect != c.dialect || lib.Dialect.String() != c.name || lib.Dialect.Plain() {
				t.Errorf("%s (%s): dialect %+v %q", c.file, d.name, lib.Dialect, lib.Dialect)
			}
			if len(lib.Parts) != len(plain.Parts) {
				t.Fatalf("%s (%s): %d parts", c.file, d.name, len(lib.Parts))
			}
			for i := range lib.Parts {
				got, want := lib.Parts[i], plain.Parts[i]
				got.Line, want.Line = 0, 0
				if !reflect.DeepEqual(got, want) {
					t.Errorf("%s (%s): part %d\n%+v\nwant\n%+v", c.file, d.name, i, got, want)
				}
			}
		}
	}
}

// TestDecimalCommaProblems checks that a bad number in a semicolon file is
// located and quoted as written, by every decoder alike, and that a
// decimal comma in a plain CSV file stays a cell separator.
func TestDecimalCommaProblems(t *testing.T) {
	const head = "part;vds_max;id_max;vgs_max;vgs_th;rds_on;rds_on_vgs;qg;qg_vgs;qgs;qgd;v_plateau;coss;cap_vds;price\n"
	in := head + "P1;30;40;20;1,8;4,5x;10;12n;10;3,5n;2,5n;3,0;450p;15;1,2,3\n"
	var first string
	for _, d := range decoders {
		_, probs := check(strings.NewReader(in), "eu.csv", d.kind, ReadOptions{})
		if first == "" {
			first = probs.Error()
		}
		if probs.Error() != first {
			t.Errorf("%s: %v\nwant %v", d.name, probs, first)
		}
	}
	for _, want := range []string{`eu.csv:2:6: rds_on: "4,5x"`, `eu.csv:2:15: price: "1,2,3"`} {
		if !strings.Contains(first, want) {
			t.Errorf("problems %q lack %q", first, want)
		}
	}
	_, probs := (ReadOptions{}).Check(strings.NewReader(strings.ReplaceAll(head, ";", ",")+"P1,30,40,20,1,8\n"), "plain.csv")
	if !errors.Is(probs, ErrFieldCount) {
		t.Errorf("a decimal comma in plain CSV: %v", probs)
	}
}

// TestCurveDecimalCommas checks the decimal commas of rds_on_curve.
func TestCurveDecimalCommas(t *testing.T) {
	for in, want := range map[string]string{
		"25:1 100:1,4 150:1,75": "25:1 100:1.4 150:1.75",
		"25:1, 100:1,4":         "25:1, 100:1.4",
		"25:1 100:1.4":          "25:1 100:1.4",
		",":                     ",",
	} {
		if got := curveDecimalCommas(in); got != want {
			t.Errorf("%q: %q, want %q", in, got, want)
		}
	}
}
