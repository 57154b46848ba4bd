package devices

import (
	"bytes"
	"os"
	"path/filepath"
	"testing"
)

// FuzzRead feeds arbitrary bytes to both decoders: no panic, the same
// problems from both, every problem located in the file, and no invalid
// part accepted.
func FuzzRead(f *testing.F) {
	files, _ := filepath.Glob("testdata/parts/*.csv")
	for _, name := range files {
		b, err := os.ReadFile(name)
		if err != nil {
			f.Fatal(err)
		}
		f.Add(b)
	}
	f.Fuzz(func(t *testing.T, b []byte) {
		a, pa := check(bytes.NewReader(b), "f.csv", decodeFast)
		g, pg := check(bytes.NewReader(b), "f.csv", decodeGocsv)
		if pa.Error() != pg.Error() {
			t.Fatalf("decoders disagree:\n%v\n--\n%v", pa, pg)
		}
		if len(a.Parts) != len(g.Parts) {
			t.Fatalf("parts %d vs %d", len(a.Parts), len(g.Parts))
		}
		for _, p := range pa {
			if p.File != "f.csv" || p.Err == nil {
				t.Fatalf("problem without file or cause: %+v", p)
			}
		}
		for i := range a.Parts {
			if probs := Validate(&a.Parts[i]); len(probs) > 0 {
				t.Fatalf("accepted an invalid part: %v", probs)
			}
		}
	})
}
