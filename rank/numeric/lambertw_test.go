package numeric

import (
	"math"
	"testing"
)

// The principal branch of Lambert W against its defining equation
// w·e^w = x over its domain, its branch point W(−1/e) = −1, W(e) = 1 and
// the omega constant W(1) = 0.5671432904097838… (Corless, Gonnet, Hare,
// Jeffrey & Knuth, "On the Lambert W function", 1996, §1).
func TestLambertW0(t *testing.T) {
	for _, c := range []struct{ x, want float64 }{
		{-1 / math.E, -1},
		{0, 0},
		{1, 0.5671432904097838},
		{math.E, 1},
	} {
		if got := LambertW0(c.x); math.Abs(got-c.want) > 1e-14 {
			t.Errorf("W(%g) = %.17g, want %.17g", c.x, got, c.want)
		}
	}
	for _, x := range []float64{-0.3678, -0.36, -0.3, -0.2, -1e-3, 1e-9, 0.3, 2.5, 3, 10, 1e3, 1e9, 1e300} {
		w := LambertW0(x)
		if got := w * math.Exp(w); math.Abs(got-x) > 1e-13*math.Max(1, math.Abs(x)) || w < -1 {
			t.Errorf("W(%g) = %.17g: w·e^w = %.17g", x, w, got)
		}
	}
	if !math.IsNaN(LambertW0(-0.5)) || !math.IsNaN(LambertW0(math.NaN())) {
		t.Error("W below −1/e or of NaN is not NaN")
	}
}
