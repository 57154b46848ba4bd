package thermal

import (
	"fmt"
	"math"
	"testing"

	q "swrank/devices/quantity"
	"swrank/rank/internal/testkit"
	"swrank/rank/loss"
)

// firstCrossing is the reference for the thermal solve, by brute force:
// warming from Ta, the junction stops at the first temperature where
// g(T) = T − Ta − Rth·P(T) turns positive (the heat path removes the
// loss); found by scanning g on a 0.05 K grid up to Tj,max + 500 K and
// bisecting the first sign change to 1e-10 K (bisection, Burden & Faires,
// Numerical Analysis, ch. 2). ok is false when g never turns positive
// (runaway). The grid is 50 times finer than any feature of the models
// below.
func firstCrossing(m *Model, ta, rth, tjMax float64) (float64, bool) {
	g := func(t float64) float64 { return t - ta - rth*m.At(q.Temperature(t)) }
	lim := tjMax + 500
	lo := ta
	for hi := ta + 0.05; hi <= lim+1e-9; hi += 0.05 {
		if g(hi) > 0 {
			for range 200 {
				if hi-lo < 1e-10 {
					break
				}
				if mid := (lo + hi) / 2; g(mid) > 0 {
					hi = mid
				} else {
					lo = mid
				}
			}
			return (lo + hi) / 2, true
		}
		lo = hi
	}
	return 0, false
}

// The solver with the whole temperature-dependent loss agrees with the
// brute-force first crossing on every model of a table that spans steady
// states below and above Tj,max and runaway: power laws (convex and not),
// curve laws, and switching losses that rise, fall or bend with
// temperature.
func TestSolveJunctionAgainstFirstCrossing(t *testing.T) {
	curve := loss.TempLaw{T0: 25, NPts: 4, Pts: [8][2]float64{{-55, 0.7}, {25, 1}, {125, 1.75}, {175, 2.3}}}
	concave := loss.TempLaw{T0: 25, NPts: 3, Pts: [8][2]float64{{25, 1}, {100, 1.6}, {175, 1.8}}}
	laws := []struct {
		name string
		law  loss.TempLaw
	}{
		{"α 2.3", loss.TempLaw{T0: 25, Alpha: 2.3}},
		{"α 8", loss.TempLaw{T0: 25, Alpha: 8}},
		{"α 0.6", loss.TempLaw{T0: 25, Alpha: 0.6}},
		{"α −0.4", loss.TempLaw{T0: 25, Alpha: -0.4}},
		{"curve", curve},
		{"concave curve", concave},
	}
	others := []struct {
		name string
		f    func(float64) float64
	}{
		{"flat", func(float64) float64 { return 0.3 }},
		{"rising", func(t float64) float64 { return 0.2 + 0.004*(t-25) }},
		{"falling", func(t float64) float64 { return math.Max(0.6-0.002*(t-25), 0.05) }},
		{"bending", func(t float64) float64 { return 0.25 + 0.1*math.Sqrt(1+0.02*math.Abs(t-25)) + 2e-5*(t-25)*(t-25) }},
	}
	var n [5]int
	for _, law := range laws {
		for _, o := range others {
			for _, rth := range []float64{5, 20, 40, 80, 150, 400} {
				for _, cond := range []float64{0.1, 0.64, 2} {
					name := fmt.Sprintf("%s/%s/Rth %g/cond %g", law.name, o.name, rth, cond)
					f := o.f
					m := Model{Fixed: 0.1, Cond: q.Power(cond), Law: &law.law,
						Other: func(t q.Temperature) q.Power { return q.Power(f(float64(t))) }}
					want, found := firstCrossing(&m, 40, rth, 175)
					s := solve(&m, 40, q.ThermalResistance(rth), 175)
					n[s.Status]++
					if s.Found != found {
						t.Errorf("%s: found %v (%v, Tj %g), want %v (%g)", name, s.Found, s.Status, s.Tj, found, want)
						continue
					}
					if !found {
						if s.Status != Runaway {
							t.Errorf("%s: status %v, want runaway", name, s.Status)
						}
						continue
					}
					// The residual tolerance is 1e-4 K; the root moves by
					// the residual over (1 − gain).
					if tol := 2e-4 / math.Max(1-s.Gain, 0.05); math.Abs(float64(s.Tj)-want) > tol {
						t.Errorf("%s: Tj %.6f, want %.6f (±%.1g)", name, s.Tj, want, tol)
					}
					if above := want > 175; above != (s.Status == AboveMax) {
						t.Errorf("%s: status %v at Tj %.3f", name, s.Status, want)
					}
				}
			}
		}
	}
	// The table must exercise every outcome it claims to.
	if n[Solved] == 0 || n[AboveMax] == 0 || n[Runaway] == 0 {
		t.Errorf("outcomes solved %d, above %d, runaway %d: the table misses one", n[Solved], n[AboveMax], n[Runaway])
	}
	t.Logf("solved %d, bracketed %d, above tj_max %d, runaway %d", n[Solved], n[Bracketed], n[AboveMax], n[Runaway])
}

// The surrogate's step is the falling root of a·d² + b·d + c, which the
// textbook formula d = (−b − √(b² − 4ac))/(2a) also gives (the root where
// the slope 2ad + b is −√(b² − 4ac) < 0).
func TestSurrogateStepQuadratic(t *testing.T) {
	for _, c := range []struct{ r, cond, df, d2f, k, h0 float64 }{
		{40, 0.64, 0.007, 4e-5, 0.002, 30},
		{40, 0.64, 0.007, 4e-5, 0.002, -3},
		{10, 2, 0.01, -2e-5, -0.001, 12},
		{10, 2, 0.01, 0, 0, 12},
	} {
		sv := surrogate{m: &Model{Cond: q.Power(c.cond)}, ta: 25, r: c.r, lim: 1e9}
		x, st := sv.step(100, c.h0, c.df, c.d2f, c.k)
		if st != rootFound {
			t.Fatalf("%+v: status %v", c, st)
		}
		a := 0.5 * c.r * c.cond * c.d2f
		b := c.r*(c.cond*c.df+c.k) - 1
		want := -c.h0 / b
		if a != 0 {
			want = (-b - math.Sqrt(b*b-4*a*c.h0)) / (2 * a)
		}
		testkit.Near(t, "step", x-100, want, 1e-9)
	}
	// A surrogate that stays above zero has no crossing.
	sv := surrogate{m: &Model{Cond: 1}, ta: 25, r: 100, lim: 1e9}
	if _, st := sv.step(100, 5, 0.02, 1e-4, 0); st != rootNone {
		t.Errorf("rising surrogate: status %v, want none", st)
	}
}

// When conduction and the fixed loss alone run away, the rest of the loss
// (never negative) cannot stop it: the solver says runaway without
// evaluating it. P = 0.5 W + 0.3 W·(T/298.15 K)⁸ on 150 K/W from 25 °C:
// Ta + Rth·P(T) − T is at least 120 K from Ta up (by hand, x = T/298.15 K:
// its slope 150·0.3·8·x⁷/298.15 K − 1 = 1.207·x⁷ − 1 is zero at x ≈ 0.973,
// 17 °C, below Ta, so from Ta it only rises from 25 + 150·0.8 − 25 = 120 K).
func TestSolveJunctionConductionRunaway(t *testing.T) {
	calls := 0
	m := Model{Fixed: 0.5, Cond: 0.3, Law: &loss.TempLaw{T0: 25, Alpha: 8},
		Other: func(q.Temperature) q.Power { calls++; return 0.1 }}
	s := solve(&m, 25, 150, 175)
	if s.Status != Runaway || s.Found {
		t.Fatalf("got %+v, want runaway", s)
	}
	if calls != 0 {
		t.Errorf("the rest of the loss was evaluated %d times, want 0", calls)
	}
}
