package fit

import (
	"bytes"
	"os"
	"strings"
	"testing"

	"swrank/devices"
	q "swrank/devices/quantity"
	"swrank/devices/synth"
	"swrank/rank/internal/testkit"
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

// The plateau from the transconductance when v_plateau is blank, by hand
// with the square-law channel (Sze & Ng, Physics of Semiconductor Devices,
// 3rd ed., 2007, ch. 6: g_fs = 2·I/(V_gs − V_th) in saturation): the
// hand-case part (V_th 1.8 V, gate-charge test at 10 A) with g_fs = 20 S
// at 10 A has V_gs − V_th = 2·10/20 = 1 V there, so its plateau is 2.8 V,
// not an estimate; at 40 A for the gfs test, 1.8 + 2·√(10·40)/20 = 3.8 V.
// Without gfs the plateau is estimated and flagged.
func TestPlateauFromGfs(t *testing.T) {
	for _, c := range []struct {
		name      string
		gfs, id   float64 // S, A; 0: blank
		want      float64 // V
		estimated bool
	}{
		{"gfs at the test current", 20, 10, 2.8, false},
		{"gfs at another current", 20, 40, 3.8, false},
		{"no gfs", 0, 0, 0, true},
	} {
		p := testkit.HandCasePart()
		p.VPlateau = q.Opt[q.Voltage]{}
		if c.gfs > 0 {
			p.Gfs, p.GfsId = q.Some(q.Conductance(c.gfs)), q.Some(q.Current(c.id))
		}
		d, err := Prepare(&p)
		if err != nil {
			t.Fatalf("%s: %v", c.name, err)
		}
		if got := d.Flags&FlagPlateauEstimated != 0; got != c.estimated {
			t.Errorf("%s: plateau estimated %v, want %v", c.name, got, c.estimated)
		}
		if !c.estimated {
			testkit.Near(t, c.name, float64(d.VplSpec), c.want, 1e-12)
		}
	}
}

// A part without qrr but with trr and irrm of the recovery test takes
// Q_rr = ½·I_rrm·t_rr (the triangular recovery current, Mohan, Undeland,
// Robbins 2003 ch. 20, from memory): 20 ns and 3 A give 30 nC, flagged
// qrr-tri and not estimated; a part that gives qrr keeps it; one with
// neither has it estimated from its output charge.
func TestQrrFromTrr(t *testing.T) {
	for _, c := range []struct {
		name               string
		qrr, trr, irrm     float64 // C, s, A; 0: blank
		want               float64 // C at 25 °C
		fromTrr, estimated bool
	}{
		{"trr and irrm", 0, 20e-9, 3, 30e-9, true, false},
		{"qrr given as well", 20e-9, 20e-9, 3, 20e-9, false, false},
		{"trr alone", 0, 20e-9, 0, 0, false, true},
	} {
		p := testkit.HandCasePart()
		p.Qrr = q.Opt[q.Charge]{}
		if c.qrr > 0 {
			p.Qrr = q.Some(q.Charge(c.qrr))
		}
		if c.trr > 0 {
			p.Trr = q.Some(q.Time(c.trr))
		}
		if c.irrm > 0 {
			p.Irrm = q.Some(q.Current(c.irrm))
		}
		d, err := Prepare(&p)
		if err != nil {
			t.Fatalf("%s: %v", c.name, err)
		}
		if got := d.Flags&FlagQrrFromTrr != 0; got != c.fromTrr {
			t.Errorf("%s: qrr-tri %v, want %v", c.name, got, c.fromTrr)
		}
		if got := d.QrrEst > 0; got != c.estimated {
			t.Errorf("%s: estimated %v, want %v", c.name, got, c.estimated)
		}
		if !c.estimated {
			testkit.Near(t, c.name, float64(d.Qrr.At(25)), c.want, 1e-12)
		}
	}
}
