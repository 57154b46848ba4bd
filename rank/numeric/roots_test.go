package numeric

import (
	"errors"
	"math"
	"testing"
)

func TestFindRoot(t *testing.T) {
	tests := []struct {
		name string
		f    func(float64) float64
		a, b float64
		want float64
	}{
		// The cubic Newton used to show his method (Wallis 1685), root
		// 2.0945514815423265 as tabulated in numerical-analysis texts
		// (e.g. Press et al., Numerical Recipes, 3rd ed., §9.4).
		{"newton cubic", func(x float64) float64 { return x*x*x - 2*x - 5 }, 2, 3, 2.0945514815423265},
		// The fixed point of cos, 0.7390851332151607 (the Dottie number;
		// Kaplan, "The Dottie number", Math. Magazine 80 (2007) 73-74).
		{"cos x = x", func(x float64) float64 { return math.Cos(x) - x }, 0, 1, 0.7390851332151607},
		// √2 by x² − 2 (analytic).
		{"sqrt 2", func(x float64) float64 { return x*x - 2 }, 0, 2, math.Sqrt2},
		// A line a + b·f crossing another, as two parts' losses do against
		// frequency: 0.5 + 2e-6·f = 0.8 + 1e-6·f at f = 300 kHz (analytic).
		{"loss lines", func(f float64) float64 { return (0.5 + 2e-6*f) - (0.8 + 1e-6*f) }, 1e3, 1e7, 3e5},
		// A jump (a loss step when a stage changes mode) at 0.3: the root
		// is the jump itself (analytic).
		{"step", func(x float64) float64 {
			if x < 0.3 {
				return -1
			}
			return 1
		}, 0, 1, 0.3},
		// A root at the end of the interval.
		{"root at end", func(x float64) float64 { return x - 1 }, 0, 1, 1},
		// A very flat function near its root: (x − 1)^5 (analytic), where
		// interpolation is poor and the bisection safeguard must act.
		{"flat", func(x float64) float64 { return math.Pow(x-1, 5) }, 0, 3, 1},
		// Roots far from 1 in magnitude: 1e-9·(x − 4e9) (analytic).
		{"large x", func(x float64) float64 { return 1e-9 * (x - 4e9) }, 1, 1e12, 4e9},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			for _, ends := range [][2]float64{{tc.a, tc.b}, {tc.b, tc.a}} {
				r, err := FindRoot(tc.f, ends[0], ends[1], 1e-6, 0)
				if err != nil {
					t.Fatalf("FindRoot(%g, %g): %v", ends[0], ends[1], err)
				}
				if math.Abs(r.X-tc.want) > 1e-6*math.Abs(tc.want) {
					t.Errorf("FindRoot(%g, %g) = %.12g, want %.12g within 1e-6 relative", ends[0], ends[1], r.X, tc.want)
				}
				if r.Evals > 120 {
					t.Errorf("FindRoot(%g, %g) took %d evaluations", ends[0], ends[1], r.Evals)
				}
			}
		})
	}
}

// Brent's method converges superlinearly on a smooth simple root: far fewer
// evaluations than the bisection it falls back on (Brent 1973, ch. 4).
func TestFindRootFasterThanBisection(t *testing.T) {
	f := func(x float64) float64 { return math.Exp(x) - 10 } // root ln 10
	r, err := FindRoot(f, 0, 10, 1e-12, 0)
	if err != nil {
		t.Fatal(err)
	}
	if math.Abs(r.X-math.Ln10) > 1e-11 {
		t.Errorf("root %.15g, want ln 10 = %.15g", r.X, math.Ln10)
	}
	// Bisection from a width of 10 to 1e-12·2.3 needs log2(10/2.3e-12) ≈ 42
	// steps.
	if r.Evals >= 30 {
		t.Errorf("%d evaluations; bisection would need about 44", r.Evals)
	}
}

func TestFindRootErrors(t *testing.T) {
	tests := []struct {
		name       string
		f          func(float64) float64
		a, b       float64
		rtol, atol float64
	}{
		{"no sign change", func(x float64) float64 { return x*x + 1 }, -1, 1, 1e-6, 0},
		{"nan at end", func(x float64) float64 { return math.NaN() }, 0, 1, 1e-6, 0},
		{"inf end", func(x float64) float64 { return x }, math.Inf(-1), 1, 1e-6, 0},
		{"nan inside", func(x float64) float64 {
			if x > 0.1 && x < 0.9 {
				return math.NaN()
			}
			return x - 0.5
		}, 0, 1, 1e-6, 0},
		{"zero tolerance", func(x float64) float64 { return x }, -1, 1, 0, 0},
		{"negative tolerance", func(x float64) float64 { return x }, -1, 1, -1e-6, 0},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			r, err := FindRoot(tc.f, tc.a, tc.b, tc.rtol, tc.atol)
			if err == nil {
				t.Fatalf("FindRoot = %g, want an error", r.X)
			}
			var re *RootError
			if tc.rtol > 0 && !errors.As(err, &re) {
				t.Errorf("error %v is not a *RootError", err)
			}
		})
	}
}
