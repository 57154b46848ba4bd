package devices

import (
	"bytes"
	"encoding/csv"
	"math"
	"slices"
	"strings"
	"testing"

	q "swrank/devices/quantity"
)

// TestDemoValid runs the library check on the demo library: no fatal
// problem, at least 22 parts, every technology, every column used somewhere
// and some optional columns left blank somewhere (so that the models'
// fallbacks get exercised).
func TestDemoValid(t *testing.T) {
	lib, probs := (ReadOptions{}).Check(bytes.NewReader(demoCSV), "demo")
	if probs.Fatal() || len(probs) != 0 {
		t.Fatalf("demo library problems:\n%v", probs)
	}
	if l, err := Demo(); err != nil || l.Source != "demo" || len(l.Parts) != len(lib.Parts) {
		t.Fatalf("Demo: %v", err)
	}
	if len(lib.Parts) < 22 {
		t.Errorf("%d parts, want at least 22", len(lib.Parts))
	}
	techs := map[Technology]int{}
	for _, p := range lib.Parts {
		techs[p.Technology]++
	}
	if techs[Silicon] < 10 || techs[GaN] < 3 || techs[SiC] < 1 {
		t.Errorf("technologies %v", techs)
	}
	// Column use, from the raw cells.
	cr := csv.NewReader(bytes.NewReader(demoCSV))
	cr.Comment = '#'
	rows, err := cr.ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	header := rows[0]
	if len(header) != len(Columns()) {
		t.Errorf("demo has %d columns, Part %d", len(header), len(Columns()))
	}
	for j, name := range header {
		filled, blank := 0, 0
		for _, r := range rows[1:] {
			if strings.TrimSpace(r[j]) == "" {
				blank++
			} else {
				filled++
			}
		}
		if filled == 0 {
			t.Errorf("column %s is never filled", name)
		}
		if !slices.Contains(RequiredColumns(), name) && blank == 0 {
			t.Errorf("optional column %s is never blank: its fallback goes untested", name)
		}
	}
}

// TestDemoPlausible checks the demo parts against rules of thumb.
func TestDemoPlausible(t *testing.T) {
	lib, err := Demo()
	if err != nil {
		t.Fatal(err)
	}
	for _, p := range lib.Parts {
		fom := float64(p.RdsOn) * 1e3 * float64(p.Qg) * 1e9 // mΩ·nC at each part's own rated drive
		// Figure-of-merit bands per class: common practice, from memory.
		switch {
		case p.Technology == Silicon && p.VdsMax >= 25 && p.VdsMax <= 30 && p.IdMax >= 20:
			if fom < 20 || fom > 60 {
				t.Errorf("%s: 30 V Si trench Rds·Qg %.0f mΩ·nC outside 20-60", p.Name, fom)
			}
		case p.Technology == Silicon && p.VdsMax == 100:
			if fom < 100 || fom > 200 {
				t.Errorf("%s: 100 V Si Rds·Qg %.0f mΩ·nC outside 100-200", p.Name, fom)
			}
		case p.Technology == GaN && p.VdsMax == 100:
			if fom < 10 || fom > 30 {
				t.Errorf("%s: 100 V GaN Rds·Qg %.0f mΩ·nC outside 10-30", p.Name, fom)
			}
		}
		// GaN HEMTs have no body diode, hence no reverse recovery (common practice).
		if p.Technology == GaN && (p.Qrr.V != 0 || p.QrrHot.V != 0) {
			t.Errorf("%s: GaN with Qrr", p.Name)
		}
		// Gate charge: the part above the plateau must be positive.
		if p.Qgs.OK && p.Qgd.OK && p.Qg-p.Qgs.V-p.Qgd.V <= 0 {
			t.Errorf("%s: no gate charge above the plateau", p.Name)
		}
		// Junction-to-case below junction-to-ambient (common practice).
		if p.RthJA.OK && p.RthJC.OK && p.RthJC.V >= p.RthJA.V {
			t.Errorf("%s: rth_jc ≥ rth_ja", p.Name)
		}
	}
}

// buckHighSideLoss is a first-order loss of a buck converter's control
// switch, used only to check that the demo pairs were built with different
// winners. Sources:
//   - conduction I²·Rds·D: Erickson & Maksimović, Fundamentals of Power
//     Electronics, 2nd ed., ch. 4;
//   - switching by the gate-charge method, ½·V·I·(t_on + t_off) with
//     t = (Qgs2 + Qgd)/Ig, Ig = (Vdrv − Vpl)/R at turn-on and Vpl/R at
//     turn-off, Qgs2 = Qgs − Qg(th): Graovac, Pürschel, Kiep, "MOSFET Power
//     Losses Calculation Using the Data-Sheet Parameters", 2006;
//   - output capacitance V·Qoss per hard turn-on against an identical
//     partner (energy bookkeeping; Q_oss as defined in IEC 60747-8);
//   - gate drive Qg(Vdrv)·Vdrv·f: Balogh, "Fundamentals of MOSFET and IGBT
//     Gate Driver Circuits", 2001, with Qg at Vdrv interpolated linearly
//     above the plateau.
func buckHighSideLoss(p *Part, vin q.Voltage, d float64, i q.Current, f q.Frequency, vdrv q.Voltage, rdrv q.Resistance) float64 {
	r := float64(p.RdsOn)
	if p.RdsOn2.OK && p.RdsOn2Vgs.V <= vdrv+0.01 && p.RdsOnVgs > vdrv+0.01 {
		r = float64(p.RdsOn2.V) // on-resistance at the lower drive
	}
	cond := float64(i*i) * r * d
	rg := float64(rdrv + p.RgInt.V)
	vpl := float64(p.VPlateau.V)
	qsw := float64(p.Qgs.V-p.QgTh.Or(p.Qgs.V/2)) + float64(p.Qgd.V)
	ton := qsw / ((float64(vdrv) - vpl) / rg)
	toff := qsw / (vpl / rg)
	sw := 0.5 * float64(vin) * float64(i) * (ton + toff) * float64(f)
	oss := float64(vin) * float64(p.Qoss.V) * float64(f)
	qg := float64(p.Qg)
	if vdrv < p.QgVgs {
		above := float64(p.Qg - p.Qgs.V - p.Qgd.V)
		qg -= above * float64(p.QgVgs-vdrv) / float64(p.QgVgs-p.VPlateau.V)
	}
	gate := qg * float64(vdrv) * float64(f)
	return cond + sw + oss + gate
}

// TestDemoPairs checks that the demo pairs have different winners at
// different operating points (see docs/demo-library.md).
func TestDemoPairs(t *testing.T) {
	lib, err := Demo()
	if err != nil {
		t.Fatal(err)
	}
	byName := map[string]*Part{}
	for i := range lib.Parts {
		byName[lib.Parts[i].Name] = &lib.Parts[i]
	}
	tests := []struct {
		winner, loser string
		vin           q.Voltage
		duty          float64
		i             q.Current
		f             q.Frequency
		vdrv          q.Voltage
	}{
		// Pair A, 12 V to 5 V buck, 5 V drive.
		{"slate-30-lo", "slate-30-fast", 12, 5.0 / 12, 10, 100e3, 5},
		{"slate-30-fast", "slate-30-lo", 12, 5.0 / 12, 2, 2e6, 5},
		// Pair B, 48 V to 24 V buck, 10 V drive.
		{"granite-100-lo", "granite-100-fast", 48, 0.5, 25, 100e3, 10},
		{"granite-100-fast", "granite-100-lo", 48, 0.5, 2, 2e6, 10},
	}
	for _, tt := range tests {
		w, l := byName[tt.winner], byName[tt.loser]
		if w == nil || l == nil {
			t.Fatalf("missing %s or %s", tt.winner, tt.loser)
		}
		pw := buckHighSideLoss(w, tt.vin, tt.duty, tt.i, tt.f, tt.vdrv, 1)
		pl := buckHighSideLoss(l, tt.vin, tt.duty, tt.i, tt.f, tt.vdrv, 1)
		t.Logf("%s %.3f W, %s %.3f W at %g A, %g Hz", tt.winner, pw, tt.loser, pl, float64(tt.i), float64(tt.f))
		if !(pw < pl) || math.IsNaN(pw) {
			t.Errorf("%g A, %g Hz: %s %.3f W should beat %s %.3f W", float64(tt.i), float64(tt.f), tt.winner, pw, tt.loser, pl)
		}
	}
	// GaN at 100 V beats the fast silicon part at 2 MHz, 2 A (5 V drive).
	g := buckHighSideLoss(byName["quartz-90"], 48, 0.5, 2, 2e6, 5, 1)
	s := buckHighSideLoss(byName["granite-100-fast"], 48, 0.5, 2, 2e6, 10, 1)
	if !(g < s) {
		t.Errorf("quartz-90 %.3f W should beat granite-100-fast %.3f W at 2 MHz", g, s)
	}
}
