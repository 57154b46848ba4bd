package devices

import (
	"errors"
	"os"
	"slices"
	"strings"
	"testing"
)

// TestClosestColumns checks the suggestions for misspelt column names.
func TestClosestColumns(t *testing.T) {
	tests := []struct {
		in   string
		want []string
	}{
		{"rth_ja_", []string{"rth_ja"}},
		{"rdson", []string{"rds_on"}},
		{"qg_vsg", []string{"qg_vgs"}}, // two characters swapped: one edit
		{"vgsth_max", []string{"vgs_th_max"}},
		{"coss_", []string{"coss", "coss2"}}, // one edit from each
		{"tx", []string{"tr", "tf"}},
		{"colour", nil},
		{"vendor_ref", nil},
		{"gate_charge", nil},
	}
	for _, tt := range tests {
		if got := closestColumns(tt.in); !slices.Equal(got, tt.want) {
			t.Errorf("closestColumns(%q) = %q, want %q", tt.in, got, tt.want)
		}
	}
	for _, tt := range []struct {
		a, b string
		d    int
	}{{"", "", 0}, {"abc", "", 3}, {"", "ab", 2}, {"ab", "ba", 1}, {"kitten", "sitting", 3}, {"µΩ", "uΩ", 1}} {
		if d := editDistance([]rune(tt.a), []rune(tt.b)); d != tt.d {
			t.Errorf("editDistance(%q, %q) = %d, want %d", tt.a, tt.b, d, tt.d)
		}
	}
}

// TestUnknownAsNotes checks the read option: unknown columns become
// warnings naming them, the parts load, and every entry point takes it.
func TestUnknownAsNotes(t *testing.T) {
	const file = "testdata/parts/misspelt_column.csv"
	notes := ReadOptions{UnknownAsNotes: true}
	want := []string{
		`misspelt_column.csv:1:16: rth_ja_: unknown column, kept as a note; did you mean rth_ja? (warning)`,
		`misspelt_column.csv:1:17: qg_vsg: unknown column, kept as a note; did you mean qg_vgs? (warning)`,
		`misspelt_column.csv:1:18: colour: unknown column, kept as a note (warning)`,
	}
	b, err := os.ReadFile(file)
	if err != nil {
		t.Fatal(err)
	}
	for _, d := range decoders {
		lib, probs := check(strings.NewReader(string(b)), "misspelt_column.csv", d.kind, notes)
		var got []string
		for _, p := range probs {
			got = append(got, p.Error())
			if p.Fatal || !errors.Is(p, ErrUnknownColumn) {
				t.Errorf("%s: %v: fatal %v", d.name, p, p.Fatal)
			}
		}
		if !slices.Equal(got, want) {
			t.Errorf("%s: problems:\n%s\nwant:\n%s", d.name, strings.Join(got, "\n"), strings.Join(want, "\n"))
		}
		if len(lib.Parts) != 2 || len(lib.Warnings) != 3 || !slices.Equal(lib.Unknown, []string{"rth_ja_", "qg_vsg", "colour"}) ||
			lib.Columns[15] != "rth_ja_" {
			t.Errorf("%s: %d parts, warnings %v, unknown %q, columns %q", d.name, len(lib.Parts), lib.Warnings, lib.Unknown, lib.Columns)
		}
	}

	// Every entry point: Load and Read accept, Scan streams both parts.
	lib, err := notes.Load(file)
	if err != nil || len(lib.Parts) != 2 || len(lib.Warnings) != 3 {
		t.Errorf("Load: %v, %+v", err, lib)
	}
	if _, err := notes.Read(strings.NewReader(string(b)), "m.csv"); err != nil {
		t.Errorf("Read: %v", err)
	}
	if lib, probs := notes.Check(strings.NewReader(string(b)), "m.csv"); probs.Fatal() || len(lib.Parts) != 2 {
		t.Errorf("Check: %v", probs)
	}
	var names []string
	hdr, probs := notes.Scan(strings.NewReader(string(b)), "m.csv", func(p *Part) error {
		names = append(names, p.Name)
		return nil
	})
	if probs.Fatal() || len(probs) != 3 || !slices.Equal(names, []string{"ember-a", "ember-b"}) || len(hdr.Unknown) != 3 {
		t.Errorf("Scan: names %q, problems %v, header %+v", names, probs, hdr)
	}
	if _, err := notes.Load("testdata/parts/no_such_file.csv"); !errors.Is(err, os.ErrNotExist) {
		t.Errorf("missing file: %v", err)
	}

	// By default the same file is refused, naming each column.
	_, err = Read(strings.NewReader(string(b)), "m.csv")
	var list ProblemList
	if !errors.As(err, &list) || len(list) != 3 || !errors.Is(err, ErrUnknownColumn) || list[0].Line != 1 || list[0].Column != 16 {
		t.Errorf("default: %v", err)
	}
	_, probs = (ReadOptions{}).Scan(strings.NewReader(string(b)), "m.csv", func(*Part) error { return nil })
	if !probs.Fatal() || len(probs) != 3 {
		t.Errorf("default Scan: %v", probs)
	}
}
