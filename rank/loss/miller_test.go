package loss

import (
	"math"
	"testing"

	q "swrank/devices/quantity"
	"swrank/rank/internal/testkit"
)

// The knee law keeps the datasheet's Qgd at its test voltage and Crss above
// the knee (by construction; Baliga 2008 for the shape of Cgd(v)).
func TestFitMillerLaw(t *testing.T) {
	m := FitMillerLaw(8e-9, 15, 120e-12, 2.8)
	testkit.Near(t, "Q(15 V)", float64(m.Charge(15)), 8e-9, 1e-12)
	testkit.Near(t, "Chi", float64(m.Chi), 120e-12, 1e-12)
	// Hand: Clo = (8 nC − 120 pF·12.2 V)/2.8 V = 2.334 nF.
	testkit.Near(t, "Clo", float64(m.Clo), (8e-9-120e-12*12.2)/2.8, 1e-12)
	testkit.Near(t, "Q(10 V)", float64(m.Charge(10)), 8e-9-120e-12*5, 1e-12)
}

// With a constant Cgd the voltage moves at a steady rate, and the integral
// forms reduce to the straight-ramp energies of the gate-charge method
// (Erickson & Maksimović, ch. 4): ½·V·I·t with t = Qgd/Ig. Without output
// capacitance the turn-off keeps the whole current to the end.
func TestMillerEnergiesReduceToRamp(t *testing.T) {
	c := q.Capacitance(50e-12)
	m := MillerLaw{Vk: 5, Clo: c, Chi: c}
	v, i, ig := q.Voltage(40), q.Current(10), q.Current(0.8)
	tv := float64(c) * 40 / 0.8
	testkit.Near(t, "fall", float64(MillerFallEnergy(m, v, i, ig)), 0.5*40*10*tv, 1e-12)
	e, top := millerRiseEnergy(m, OssLaw{K: 0, N: 0.5}, v, i, ig)
	testkit.Near(t, "rise", float64(e), 0.5*40*10*tv, 1e-12)
	testkit.Near(t, "iTop", float64(top), 10, 1e-12)
}

// millerRiseEnergy's closed form against a direct numerical integration
// of ∫ v·max(0, (i/ig)·Cgd(v) − Coss(v)) dv (midpoint rule, 10⁶ steps), for
// a √-law Coss (Erickson & Maksimović ch. 4) and the knee law; and at light
// load the channel is off before the drain moves (Ren et al. 2006, from
// memory): no loss, no current left.
func TestMillerRiseEnergyIntegral(t *testing.T) {
	m := FitMillerLaw(6e-9, 24, 40e-12, 3)
	oss := OssFromCapacitance(400e-12, 24, 0.5)
	for _, c := range []struct{ i, ig float64 }{{10, 1.2}, {4, 1.2}, {20, 0.5}} {
		v := 48.0
		n := 1000000
		var sum float64
		for k := 0; k < n; k++ {
			x := (float64(k) + 0.5) * v / float64(n)
			cg := float64(m.Chi)
			if x < float64(m.Vk) {
				cg = float64(m.Clo)
			}
			sum += x * math.Max(0, c.i/c.ig*cg-float64(oss.C(q.Voltage(x)))) * v / float64(n)
		}
		e, _ := millerRiseEnergy(m, oss, q.Voltage(v), q.Current(c.i), q.Current(c.ig))
		testkit.Near(t, "closed form vs numeric", float64(e), sum, 1e-4)
	}
	e, top := millerRiseEnergy(m, oss, 48, 0.05, 1.2)
	if e != 0 || top != 0 {
		t.Errorf("light load: E %v, iTop %v, want 0, 0", e, top)
	}
}
