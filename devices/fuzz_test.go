package devices

import (
	"bytes"
	"encoding/csv"
	"errors"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"slices"
	"testing"
)

// FuzzRead feeds arbitrary bytes to every decoder: no panic, the same
// problems from all, every problem located in the file, and no invalid
// part accepted. Accepting unknown columns as notes changes no part and
// no problem but the unknown columns' severity.
func FuzzRead(f *testing.F) {
	files, _ := filepath.Glob("testdata/parts/*.csv")
	exports, _ := filepath.Glob("../testdata/dialects/*")
	files = append(files, exports...)
	for _, name := range files {
		b, err := os.ReadFile(name)
		if err != nil {
			f.Fatal(err)
		}
		f.Add(b)
	}
	f.Fuzz(func(t *testing.T, b []byte) {
		a, pa := check(bytes.NewReader(b), "f.csv", decodeFast, ReadOptions{})
		for _, d := range []decoderKind{decodeParallel, decodeGocsv} {
			g, pg := check(bytes.NewReader(b), "f.csv", d, ReadOptions{})
			if pa.Error() != pg.Error() {
				t.Fatalf("decoder %d disagrees:\n%v\n--\n%v", d, pa, pg)
			}
			if len(a.Parts) != len(g.Parts) {
				t.Fatalf("decoder %d: parts %d vs %d", d, len(a.Parts), len(g.Parts))
			}
		}
		for _, p := range pa {
			if p.File != "f.csv" || p.Err == nil {
				t.Fatalf("problem without file or cause: %+v", p)
			}
		}
		n, pn := check(bytes.NewReader(b), "f.csv", decodeFast, ReadOptions{UnknownAsNotes: true})
		if len(n.Parts) != len(a.Parts) || len(pn) != len(pa) {
			t.Fatalf("as notes: %d parts, %d problems; by default %d, %d", len(n.Parts), len(pn), len(a.Parts), len(pa))
		}
		for i, p := range pn {
			if q := pa[i]; p.Line != q.Line || p.Column != q.Column || p.Fatal != q.Fatal && !errors.Is(p, ErrUnknownColumn) {
				t.Fatalf("as notes: %v; by default %v", p, q)
			}
		}
		for i := range a.Parts {
			if probs := Validate(&a.Parts[i]); len(probs) > 0 {
				t.Fatalf("accepted an invalid part: %v", probs)
			}
		}
	})
}

// FuzzRows checks the row reader against encoding/csv, configured as the
// loader configures it: the same records, lines and errors.
func FuzzRows(f *testing.F) {
	files, _ := filepath.Glob("testdata/parts/*.csv")
	for _, name := range files {
		b, err := os.ReadFile(name)
		if err != nil {
			f.Fatal(err)
		}
		f.Add(b)
	}
	for _, s := range []string{"a;\"b;c\";d\r\n", "a\t\"b\"\"\tc\"\n", "a,\"b\"\"c\",d\r\n", "\"a\nb\",c\n", "\"abc", "a\"b,c\n", "\"a\"b\n", "x\r", "#c\n\n\na\n", "\"\"\n"} {
		f.Add([]byte(s))
	}
	f.Fuzz(func(t *testing.T, b []byte) {
		rowsAgree(t, b)
	})
}

// rowsAgree compares the two readers with each separator.
func rowsAgree(t *testing.T, b []byte) {
	t.Helper()
	for _, sep := range []byte{',', ';', '\t'} {
		rowsAgreeSep(t, b, sep)
	}
}

func rowsAgreeSep(t *testing.T, b []byte, sep byte) {
	t.Helper()
	want := newCSVSource(bytes.NewReader(b), sep)
	got := newRowReader(bytes.NewReader(b), sep)
	for i := 0; i < 1e6; i++ {
		wr, wl, werr := want.next()
		gr, gl, gerr := got.next()
		if fmt.Sprint(werr) != fmt.Sprint(gerr) || !slices.Equal(wr, gr) || (wr != nil && wl != gl) {
			t.Fatalf("separator %q, record %d: encoding/csv %q line %d %v; rowReader %q line %d %v", sep, i, wr, wl, werr, gr, gl, gerr)
		}
		if werr == io.EOF || (werr != nil && !errors.As(werr, new(*csv.ParseError))) {
			return
		}
	}
}
