package numeric

import "math"

// LambertW0 returns the principal branch of the Lambert W function, the
// w ≥ −1 with w·e^w = x, for x ≥ −1/e; NaN below. It starts from the
// branch-point series near −1/e, log(1 + x) for moderate x and
// log x − log log x for large x, then takes Halley steps until they
// change w by less than 1e-15 relative.
//
// Source: Corless, Gonnet, Hare, Jeffrey & Knuth, "On the Lambert W
// function", Advances in Computational Mathematics 5, 1996: the series
// about the branch point (eq. 4.22) and Halley's iteration (eq. 5.9).
func LambertW0(x float64) float64 {
	const em1 = 1 / math.E
	switch {
	case math.IsNaN(x) || x < -em1:
		return math.NaN()
	case x == -em1:
		return -1
	case math.IsInf(x, 1):
		return x
	case x == 0:
		return 0
	}
	var w float64
	switch {
	case x < -0.25:
		p := math.Sqrt(2 * (math.E*x + 1))
		w = -1 + p - p*p/3 + 11.0/72*p*p*p
	case x < 3:
		w = math.Log1p(x)
	default:
		l := math.Log(x)
		w = l - math.Log(l)
	}
	for range 50 {
		ew := math.Exp(w)
		f := w*ew - x
		if f == 0 {
			break
		}
		w1 := w - f/(ew*(w+1)-(w+2)*f/(2*w+2))
		if math.Abs(w1-w) <= 1e-15*(1+math.Abs(w1)) {
			return w1
		}
		w = w1
	}
	return w
}
