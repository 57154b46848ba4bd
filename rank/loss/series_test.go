package loss

import (
	"math"
	q "swrank/devices/quantity"
	"testing"
)

// PowNear agrees with x^p (math.Pow) to its tolerance, both where it sums
// the binomial series and where it computes anew, along a path like the
// thermal loop's iterates; and the turn-off integral that uses it for its
// crossing agrees with the exact one to 1e-11 relative (RiseIntegral.energy).
func TestPowNear(t *testing.T) {
	path := []float64{4, 3.6, 3.61, 3.6101, 3.61012, 5, 5.000001, 4.9999, 4.7, 4.75}
	for _, p := range []float64{-1.25, -2.5, -3, -10} {
		for _, tol := range []float64{1e-12, 1e-6} {
			ps := NewPowSeries(p, tol)
			pw := NewPowNear(&ps)
			for _, x := range path {
				got, want := pw.at(x), math.Pow(x, p)
				if math.Abs(got/want-1) > 2*tol+1e-14 {
					t.Errorf("p %g, tol %g, x %g: %.17g, want %.17g", p, tol, x, got, want)
				}
			}
		}
	}
	m, err := FitMillerLaw(MillerData{Qgd: 4e-9, VQg: 40, Knee: 6, Crss: []CapPoint{{40, 20e-12}}, M: 0.5, Phi: 0.7, VMax: 60})
	if err != nil {
		t.Fatal(err)
	}
	for _, n := range []float64{0.4, 0.62, 0.8} {
		oss := OssLaw{K: 1.2e-9, N: n}
		base := RiseBase(&m, oss, 0.7)
		r := base.At(&m, 48)
		ps := NewPowSeries(-1/n, RiseTol)
		pw := NewPowNear(&ps)
		for _, x := range path {
			ig := q.Current(x / 4)
			e, _ := r.EnergyNear(8, ig, &pw)
			want, _ := r.Energy(8, ig)
			if d := math.Abs(float64(e)/float64(want) - 1); d > 1e-11 {
				t.Errorf("energy, N %g, ig %g: relative error %.3g", n, ig, d)
			}
		}
	}
}
