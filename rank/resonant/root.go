package resonant

import (
	"errors"
	"fmt"
	"math"
)

// errNoBracket is returned by findRoot when f(a) and f(b) have the same sign.
var errNoBracket = errors.New("root not bracketed")

// findRoot returns x in [a, b] with f(x) = 0, given fa = f(a) and
// fb = f(b) of opposite signs (or one of them zero), by the Illinois
// variant of regula falsi with a bisection safeguard, to an interval of
// width ≤ xtol (absolute). Standard numerical method (Dowell & Jarratt,
// BIT 11, 1971).
func findRoot(f func(float64) float64, a, b, fa, fb, xtol float64) (float64, error) {
	if fa == 0 {
		return a, nil
	}
	if fb == 0 {
		return b, nil
	}
	if math.IsNaN(fa) || math.IsNaN(fb) {
		return 0, fmt.Errorf("function is not a number at the bracket [%g, %g]", a, b)
	}
	if (fa > 0) == (fb > 0) {
		return 0, fmt.Errorf("%w: f(%g) = %g, f(%g) = %g", errNoBracket, a, fa, b, fb)
	}
	side := 0
	for it := 0; it < 200; it++ {
		x := (a*fb - b*fa) / (fb - fa)
		// Safeguard: bisect when the secant point is outside or too near
		// an end, or every few steps.
		if !(x > math.Min(a, b) && x < math.Max(a, b)) || it%8 == 7 {
			x = (a + b) / 2
		}
		fx := f(x)
		if math.IsNaN(fx) {
			return 0, fmt.Errorf("function is not a number at %g", x)
		}
		if fx == 0 {
			return x, nil
		}
		if (fx > 0) == (fb > 0) {
			b, fb = x, fx
			if side == -1 {
				fa /= 2
			}
			side = -1
		} else {
			a, fa = x, fx
			if side == 1 {
				fb /= 2
			}
			side = 1
		}
		if math.Abs(b-a) <= xtol {
			return (a + b) / 2, nil
		}
	}
	return (a + b) / 2, fmt.Errorf("root finder did not converge in [%g, %g]", a, b)
}
