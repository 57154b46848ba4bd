package loss

import (
	"fmt"
	q "swrank/devices/quantity"
	"swrank/rank/internal/testkit"
	"testing"
)

// A prepared curve law (normalised pieces) gives the same factor and slope
// as the curve worked out on each call, inside and beyond its points
// (straight-line interpolation and extrapolation, as the law defines).
func TestTempLawPrepared(t *testing.T) {
	raw := TempLaw{T0: 25, NPts: 4, Pts: [8][2]float64{{-55, 0.7}, {25, 1.02}, {125, 1.75}, {175, 2.3}}}
	prep := raw
	prep.Prepare()
	for _, tj := range []q.Temperature{-80, -55, 0, 25, 60, 125, 150, 175, 400} {
		f0, d0, _ := raw.FactorD(tj)
		f1, d1, _ := prep.FactorD(tj)
		testkit.Near(t, fmt.Sprintf("factor at %v", tj), f1, f0, 1e-14)
		testkit.Near(t, fmt.Sprintf("slope at %v", tj), d1, d0, 1e-14)
		testkit.Near(t, fmt.Sprintf("Factor at %v", tj), prep.Factor(tj), raw.Factor(tj), 1e-14)
	}
	testkit.Near(t, "factor at T0", prep.Factor(25), 1, 1e-15)
}
