package spice

import (
	"math"
	"testing"
)

// The gate-charge read-out on a piecewise-linear curve with known
// breakpoints (invented fixture): 0 → 2 V over 2 nC (threshold at 1.5 V,
// 1.5 nC), 2 → 3 V over 1 nC, a flat plateau at 3 V for 4 nC, then 1 V/nC
// to 10 V. Expected: Qg(th) 1.5 nC, Qgs 3 nC, Qgd 4 nC, Vpl 3 V, Qg 14 nC.
func TestExtractGateCharge(t *testing.T) {
	knots := [][2]float64{{0, 0}, {2e-9, 2}, {3e-9, 3}, {7e-9, 3}, {14e-9, 10}, {15e-9, 11}}
	var qs, vg []float64
	for k := 1; k < len(knots); k++ {
		a, b := knots[k-1], knots[k]
		for i := 0; i < 500; i++ {
			f := float64(i) / 500
			qs = append(qs, a[0]+f*(b[0]-a[0]))
			vg = append(vg, a[1]+f*(b[1]-a[1]))
		}
	}
	qs, vg = append(qs, 15e-9), append(vg, 11)
	ds := &Datasheet{Vth: 1.5, QgVgs: 10}
	if err := extractGateCharge(qs, vg, ds); err != nil {
		t.Fatal(err)
	}
	want := []struct {
		name      string
		got, want float64
	}{{"Qg(th)", ds.QgTh, 1.5e-9}, {"Qgs", ds.Qgs, 3e-9}, {"Qgd", ds.Qgd, 4e-9}, {"Vpl", ds.Vpl, 3}, {"Qg", ds.Qg, 14e-9}}
	for _, w := range want {
		if math.Abs(w.got-w.want) > 0.01*w.want {
			t.Errorf("%s = %g, want %g", w.name, w.got, w.want)
		}
	}
	if err := extractGateCharge([]float64{0, 1e-9, 2e-9}, []float64{0, 5, 10}, &Datasheet{Vth: 1.5, QgVgs: 10}); err == nil {
		t.Error("a curve without a plateau was accepted")
	}
}
