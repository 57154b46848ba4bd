package spice

import (
	"os"
	"path/filepath"
	"testing"
)

func TestReadTable(t *testing.T) {
	dir := t.TempDir()
	cases := []struct {
		name, text string
		ok         bool
	}{
		{"good", " time v(d) @m1[id]\n 0 1.5 2e-3\n 1e-9 1.25 -3.5e+00\n", true},
		{"short row", "time v(d)\n0 1\n1\n", false},
		{"bad number", "time v(d)\n0 x\n", false},
		{"header only", "time v(d)\n", false},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			p := filepath.Join(dir, c.name+".dat")
			if err := os.WriteFile(p, []byte(c.text), 0o644); err != nil {
				t.Fatal(err)
			}
			tab, err := readTable(p)
			if (err == nil) != c.ok {
				t.Fatalf("err = %v, want ok=%v", err, c.ok)
			}
			if !c.ok {
				return
			}
			id, err := tab.Col("@m1[id]")
			if err != nil || tab.Len() != 2 || id[1] != -3.5 {
				t.Errorf("table %+v, column %v (%v)", tab, id, err)
			}
		})
	}
}
