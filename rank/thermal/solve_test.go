package thermal

import (
	q "swrank/devices/quantity"
	"swrank/rank/internal/testkit"
	"swrank/rank/loss"
	"testing"
)

// Junction temperature, hand calculation of Tj = Ta + Rth·P(Tj) with the
// power law in kelvin of Baliga, Fundamentals of Power Semiconductor
// Devices, 2008, and the linear law (common practice): Ta 50 °C, Rth 40 K/W,
// 8 A through 10 mΩ at 25 °C, 0.5 W of other loss: α 2.3 → Tj 117.72 °C,
// P 1.693 W, loop gain 0.281; linear 0.7 %/K → Tj 111.01 °C, gain 0.179.
func TestSolveJunction(t *testing.T) {
	pow := Model{Fixed: 0.5, Cond: 64 * 0.010, Law: &loss.TempLaw{T0: 25, Alpha: 2.3}}
	s := solve(&pow, 50, 40, 175)
	if s.Status != Solved {
		t.Fatalf("status %v", s.Status)
	}
	testkit.Near(t, "Tj power law", float64(s.Tj), 117.72, 1e-4)
	testkit.Near(t, "gain power law", s.Gain, 0.281, 5e-3)
	lin := Model{Fixed: 0.5, Cond: 64 * 0.010, Law: &loss.TempLaw{T0: 25, NPts: 2, Pts: [8][2]float64{{25, 1}, {125, 1.7}}}}
	s = solve(&lin, 50, 40, 175)
	testkit.Near(t, "Tj linear", float64(s.Tj), 111.01, 1e-4)
	testkit.Near(t, "gain linear", s.Gain, 0.179, 5e-3)

	// Runaway: with the same part on 150 K/W the loss grows faster than the
	// heat path removes it; no steady state exists (derived: g ≥ 1
	// everywhere above the last crossing).
	s = solve(&pow, 50, 150, 175)
	if s.Found || s.Status != Runaway {
		t.Errorf("150 K/W: got %+v, want runaway", s)
	}
	// A steady state above Tj,max is reported as such, with its value.
	s = solve(&Model{Fixed: 2, Law: &loss.TempLaw{T0: 25, Alpha: 2}}, 25, 70, 150)
	if s.Status != AboveMax || !s.Found {
		t.Errorf("2 W on 70 K/W: got %v, want above tj_max", s.Status)
	}
	testkit.Near(t, "Tj above max", float64(s.Tj), 165, 1e-6)
}

// solve is SolveJunction returning its solution.
func solve(m *Model, ta q.Temperature, rth q.ThermalResistance, tjMax q.Temperature) Solution {
	var s Solution
	SolveJunction(&s, m, ta, rth, tjMax)
	return s
}
