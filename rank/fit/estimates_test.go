package fit

import (
	"bytes"
	"os"
	"strings"
	"testing"

	"swrank/devices"
	"swrank/devices/synth"
)

// The package families' estimates are documented (docs/library.md, a
// common-practice table), and the generated libraries draw their thermal
// and parasitic values inside the same ranges, so that a blank cell's
// estimate, the top of its family's range, is never below the value it
// stands for.
func TestPackageFamilies(t *testing.T) {
	doc, err := os.ReadFile("../../docs/library.md")
	if err != nil {
		t.Fatal(err)
	}
	for _, f := range packageFamilies {
		if !strings.Contains(string(doc), "| "+f.Name+" |") {
			t.Errorf("family %q is not in docs/library.md", f.Name)
		}
	}
	for _, c := range []struct {
		pkg, family string
		known       bool
	}{
		{"DFN 5x6", "leadless 5×6 mm (DFN, QFN, power SO-8)", true},
		{"dfn-3x3", "leadless 2×2 to 3.3×3.3 mm (DFN, QFN)", true},
		{"TO-247-4", "TO-247 and TO-220 with a Kelvin source (4 pins)", true},
		{"TO-247", "TO-247", true},
		{"D2PAK", "D²PAK (TO-263)", true},
		{"LGA 2.5x1.5", "land-grid and chip-scale (LGA, BGA, CSP)", true},
		{"", "not given or not recognised", false},
		{"mystery can", "not given or not recognised", false},
	} {
		f, ok := FamilyOf(c.pkg)
		if f.Name != c.family || ok != c.known {
			t.Errorf("FamilyOf(%q) = %q, %v; want %q, %v", c.pkg, f.Name, ok, c.family, c.known)
		}
	}
	var buf bytes.Buffer
	if err := synth.Generate(&buf, 300, 3); err != nil {
		t.Fatal(err)
	}
	lib, err := devices.Read(&buf, "generated")
	if err != nil {
		t.Fatal(err)
	}
	in := func(v, lo, hi float64) bool { return v >= lo*(1-1e-3) && v <= hi*(1+1e-3) }
	for _, p := range lib.Parts {
		f, ok := FamilyOf(p.Package)
		if !ok {
			t.Errorf("%s: package %q not recognised", p.Name, p.Package)
			continue
		}
		for _, c := range []struct {
			name      string
			v, lo, hi float64
		}{
			{"rth_jc", float64(p.RthJC.V), float64(f.RthJC[0]), float64(f.RthJC[1])},
			{"rth_ja", float64(p.RthJA.V), float64(f.RthJA[0]), float64(f.RthJA[1])},
			{"l_cs", float64(p.Lcs.V), float64(f.Lcs[0]), float64(f.Lcs[1])},
			{"l_loop", float64(p.Lloop.V), float64(f.Lloop[0]), float64(f.Lloop[1])},
		} {
			if !in(c.v, c.lo, c.hi) {
				t.Errorf("%s (%s): %s %g outside its family's %g-%g", p.Name, p.Package, c.name, c.v, c.lo, c.hi)
			}
		}
	}
}

// Every flag has its code and sentence.
func TestFlagTexts(t *testing.T) {
	for f := Flags(1); f != 0; f <<= 1 {
		if f.Codes() == "" && len(f.Sentences()) == 0 {
			break // past the last flag
		}
		if f.Codes() == "" || len(f.Sentences()) != 1 {
			t.Errorf("flag %#x: code %q, sentences %q", uint64(f), f.Codes(), f.Sentences())
		}
	}
}
