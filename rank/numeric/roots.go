package numeric

import (
	"fmt"
	"math"
)

// RootError is the error of FindRoot when the interval does not bracket a
// root or the function is not finite.
type RootError struct {
	A, B   float64 // the interval searched
	FA, FB float64 // the function at its ends
	Msg    string  // what went wrong
}

func (e *RootError) Error() string {
	return fmt.Sprintf("root in [%g, %g]: %s (f = %g, %g)", e.A, e.B, e.Msg, e.FA, e.FB)
}

// Root is the outcome of FindRoot.
type Root struct {
	X     float64 // the root, within the tolerance asked for
	Evals int     // function evaluations, the two ends included
}

// rootMaxIter bounds the iterations of FindRoot. Brent's method never needs
// more steps than bisection would need times a small factor; 200 is far
// beyond what a tolerance of 1e-15 relative takes on [1e-300, 1e300].
const rootMaxIter = 200

// FindRoot finds x in [a, b] with f(x) = 0 by Brent's method: inverse
// quadratic interpolation or the secant step when it stays well inside the
// bracket and shrinks it fast enough, bisection otherwise, so that the
// bracket always holds a sign change and the method converges at least as
// surely as bisection. f(a) and f(b) must be finite and of opposite sign
// (or zero). The root is returned when the bracket is narrower than
// rtol·|x| + atol (rtol ≥ 0, atol ≥ 0, not both zero). For a function with
// a jump (a step in the loss when a stage changes mode) it returns the
// location of the jump.
//
// Source: R. P. Brent, Algorithms for Minimization without Derivatives,
// Prentice-Hall, 1973, ch. 4 (procedure zero); the same algorithm as
// zbrent in Press, Teukolsky, Vetterling, Flannery, Numerical Recipes,
// 3rd ed., 2007, §9.3.
func FindRoot(f func(float64) float64, a, b, rtol, atol float64) (Root, error) {
	if !(rtol >= 0) || !(atol >= 0) || rtol == 0 && atol == 0 {
		return Root{}, fmt.Errorf("root in [%g, %g]: tolerances must be ≥ 0 and not both zero (rtol %g, atol %g)", a, b, rtol, atol)
	}
	fa, fb := f(a), f(b)
	r := Root{Evals: 2}
	bad := func(msg string) (Root, error) { return Root{}, &RootError{A: a, B: b, FA: fa, FB: fb, Msg: msg} }
	switch {
	case math.IsNaN(a) || math.IsNaN(b) || math.IsInf(a, 0) || math.IsInf(b, 0):
		return bad("interval ends must be finite")
	case math.IsNaN(fa) || math.IsNaN(fb) || math.IsInf(fa, 0) || math.IsInf(fb, 0):
		return bad("function not finite at an end")
	case fa == 0:
		r.X = a
		return r, nil
	case fb == 0:
		r.X = b
		return r, nil
	case fa > 0 == (fb > 0):
		return bad("no sign change")
	}
	a0, b0 := a, b
	c, fc := b, fb
	var d, e float64
	for range rootMaxIter {
		if fb > 0 == (fc > 0) {
			// Keep the root between b and c.
			c, fc = a, fa
			d = b - a
			e = d
		}
		if math.Abs(fc) < math.Abs(fb) {
			// b is the best estimate so far.
			a, b, c = b, c, b
			fa, fb, fc = fb, fc, fb
		}
		tol := 2*epsilon*math.Abs(b) + 0.5*(rtol*math.Abs(b)+atol)
		m := 0.5 * (c - b)
		if math.Abs(m) <= tol || fb == 0 {
			r.X = b
			return r, nil
		}
		if math.Abs(e) >= tol && math.Abs(fa) > math.Abs(fb) {
			var p, q float64
			s := fb / fa
			if a == c {
				// Secant step.
				p = 2 * m * s
				q = 1 - s
			} else {
				// Inverse quadratic interpolation.
				qq := fa / fc
				rr := fb / fc
				p = s * (2*m*qq*(qq-rr) - (b-a)*(rr-1))
				q = (qq - 1) * (rr - 1) * (s - 1)
			}
			if p > 0 {
				q = -q
			}
			p = math.Abs(p)
			if 2*p < math.Min(3*m*q-math.Abs(tol*q), math.Abs(e*q)) {
				e = d
				d = p / q
			} else {
				d, e = m, m
			}
		} else {
			d, e = m, m
		}
		a, fa = b, fb
		if math.Abs(d) > tol {
			b += d
		} else {
			b += math.Copysign(tol, m)
		}
		fb = f(b)
		r.Evals++
		if math.IsNaN(fb) || math.IsInf(fb, 0) {
			return Root{}, &RootError{A: a0, B: b0, FA: fb, FB: fb, Msg: fmt.Sprintf("function not finite at %g", b)}
		}
	}
	return Root{}, &RootError{A: a0, B: b0, FA: fa, FB: fb, Msg: fmt.Sprintf("no convergence in %d steps", rootMaxIter)}
}

// epsilon is the spacing of float64 numbers near 1 (2^-52).
const epsilon = 0x1p-52
