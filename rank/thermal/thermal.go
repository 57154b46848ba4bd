package thermal

import (
	"math"
	q "swrank/devices/quantity"
	"swrank/rank/loss"
)

// Status says how a junction temperature was found.
type Status uint8

// Thermal outcomes.
const (
	Solved    Status = iota // steady state found by fixed-point iteration
	Bracketed               // found by bisection after the iteration failed
	Fixed                   // pinned by the user (Stage.TjFixed)
	AboveMax                // the steady state lies above Tj,max
	Runaway                 // no steady state: loss grows faster than the heat path removes it
)

func (s Status) String() string {
	switch s {
	case Bracketed:
		return "bracketed"
	case Fixed:
		return "fixed"
	case AboveMax:
		return "above tj_max"
	case Runaway:
		return "runaway"
	}
	return "solved"
}

// Model is the loss of a device as a function of its junction
// temperature, P(T) = Fixed + Cond·f(T) + Other(T), where f(T) is the
// on-resistance temperature factor relative to the reference temperature
// and Other is the rest of the temperature-dependent loss (switching edges,
// dead-time conduction, gate), so that the thermal loop iterates the whole
// device loss and not only conduction.
type Model struct {
	Fixed q.Power // loss independent of temperature, W; ≥ 0
	// Cond is the conduction loss at the reference temperature Tref, W; ≥ 0.
	Cond q.Power
	// Law gives R(T)/R(Tref); required (a pointer: the device's own law is
	// used in place, not copied).
	Law *loss.TempLaw
	// Other, when non-nil, returns the remaining temperature-dependent loss
	// at T, W; it must be ≥ 0 and finite for every T it is given. It must
	// not retain its argument (Evaluate passes a closure over stack values,
	// which keeps evaluation free of allocations).
	Other func(q.Temperature) q.Power
}

// At returns P(T).
func (m *Model) At(t q.Temperature) float64 {
	p := float64(m.Fixed) + float64(m.Cond)*m.Law.Factor(t)
	if m.Other != nil {
		p += float64(m.Other(t))
	}
	return p
}

// Solution is the outcome of SolveJunction.
type Solution struct {
	Tj         q.Temperature    // junction temperature, °C (meaningful for Solved, Bracket, Fixed, AboveMax when Found)
	Status     Status           // how Tj was found
	Iterations int              // fixed-point or bisection steps taken
	Gain       float64          // loop gain Rth·dP/dT at the solution; ≥ 1 means runaway
	Found      bool             // a steady temperature exists (possibly above Tj,max)
	History    [8]q.Temperature // the first iterates, for explain
}

const (
	thermalTol     = 1e-4 // K: residual of Tj = Ta + Rth·P(Tj) (Tj is reported to 0.01 K)
	thermalMaxIter = 100
)

// SolveJunction solves Tj = Ta + Rth·P(Tj) to a residual
// |Ta + Rth·P(Tj) − Tj| below 0.1 mK: by the secant method from one
// fixed-point step off Ta; by the plain fixed-point iteration from Ta when
// the secant iteration misbehaves; by bisection on [Ta, tjMax] (and above
// it, to report how far above the rating the steady state lies) when the
// iteration fails. The returned Tj is the last temperature at which P was
// evaluated whenever the loop gain came from the iteration itself. The loop
// gain g = Rth·dP/dT tells stability: the fixed-point iteration converges
// when g < 1; with g ≥ 1 at every temperature up to the search limit there
// is no steady state (runaway). A root with g ≥ 1 found by the secant
// iteration is an unstable one, not a steady state: the plain iteration
// decides.
//
// Source: the steady-state junction temperature of a device with a single
// thermal resistance (IEC 60747-8 thermal characteristics); the stability
// condition of the electro-thermal loop is standard fixed-point theory
// (a contraction when |g| < 1); the secant method and Aitken's Δ² as in
// Burden & Faires, Numerical Analysis, ch. 2.
//
// The solution is written into s, which the caller owns (an evaluation
// keeps it in its result without copying).
func SolveJunction(s *Solution, m *Model, ta q.Temperature, rth q.ThermalResistance, tjMax q.Temperature) {
	if m.Other != nil && solveSurrogate(s, m, ta, rth, tjMax) {
		return
	}
	*s = solveGeneral(m, ta, rth, tjMax)
}

// solveGeneral is SolveJunction's general method: secant, fixed point and
// bisection.
func solveGeneral(m *Model, ta q.Temperature, rth q.ThermalResistance, tjMax q.Temperature) Solution {
	p := func(t q.Temperature) float64 { return m.At(t) }
	g := func(t q.Temperature) float64 { return float64(t) - float64(ta) - float64(rth)*p(t) }
	gain := func(t q.Temperature) float64 {
		h := 1e-3
		return float64(rth) * (p(t+q.Temperature(h)) - p(t-q.Temperature(h))) / (2 * h)
	}
	G := func(t q.Temperature) q.Temperature { return ta + q.Temperature(float64(rth)*p(t)) }
	var s Solution
	record := func(t q.Temperature) {
		if s.Iterations < len(s.History) {
			s.History[s.Iterations] = t
		}
		s.Iterations++
	}
	done := func(t q.Temperature, gn float64) Solution {
		s.Tj, s.Gain, s.Found = t, gn, true
		if t > tjMax {
			s.Status = AboveMax
		}
		return s
	}
	bad := func(t q.Temperature) bool {
		return math.IsNaN(float64(t)) || math.IsInf(float64(t), 0) || t > tjMax+500 || t < ta-1
	}

	// Secant iteration on r(T) = G(T) − T, G(T) = Ta + Rth·P(T), started
	// with one fixed-point step from Ta (its first step is Aitken's Δ²
	// extrapolation of the fixed-point iteration). The loop gain at the
	// root, G′ = 1 + r′, comes from the last secant when its points lie
	// within 1 K of each other, else by central difference.
	t0 := ta
	record(t0)
	r0 := float64(G(t0) - t0)
	if math.Abs(r0) < thermalTol {
		if gn := gain(t0); gn < 1 {
			return done(t0, gn)
		}
	}
	t1 := t0 + q.Temperature(r0)
	for range thermalMaxIter / 2 {
		if bad(t1) {
			break
		}
		record(t1)
		g1 := G(t1)
		if bad(g1) {
			break
		}
		r1 := float64(g1 - t1)
		slope := (r1 - r0) / float64(t1-t0)
		if math.Abs(r1) < thermalTol {
			gn := 1 + slope
			if math.Abs(float64(t1-t0)) > 1 || math.IsNaN(gn) || math.IsInf(gn, 0) {
				gn = gain(t1)
			}
			if gn < 1 {
				return done(t1, gn)
			}
			break // an unstable root: let the plain iteration decide
		}
		next := g1 // fixed-point step when the secant is unusable
		if slope != 0 && !math.IsNaN(slope) && !math.IsInf(slope, 0) {
			if x := t1 - q.Temperature(r1/slope); !bad(x) {
				next = x
			}
		}
		t0, r0, t1 = t1, r1, next
	}

	// Plain fixed-point iteration from Ta.
	t := ta
	for i := 0; i < thermalMaxIter; i++ {
		record(t)
		next := G(t)
		if math.Abs(float64(next-t)) < thermalTol {
			return done(t, gain(t))
		}
		if next > tjMax+500 || math.IsNaN(float64(next)) {
			break
		}
		t = next
	}
	// Bisection: g(Ta) ≤ 0 always (P ≥ 0). Find an upper end with g > 0.
	lo, hi := ta, tjMax
	if g(hi) <= 0 {
		s.Status = AboveMax
		hi = tjMax + 500
		if g(hi) <= 0 {
			s.Status = Runaway
			s.Tj, s.Found = 0, false
			return s
		}
		lo = tjMax
	} else {
		s.Status = Bracketed
	}
	for i := 0; i < 200 && hi-lo > thermalTol; i++ {
		mid := (lo + hi) / 2
		if g(mid) > 0 {
			hi = mid
		} else {
			lo = mid
		}
		s.Iterations++
	}
	s.Tj, s.Gain, s.Found = (lo+hi)/2, gain((lo+hi)/2), true
	return s
}

// solveSurrogate solves the thermal loop with few evaluations of the costly
// temperature-dependent loss m.Other. Between exact evaluations Other is
// replaced by the straight line through the last two and the conduction
// law by its second-order Taylor expansion at the last one, so that the
// surrogate's root is a quadratic's, found without evaluating either. Each
// round evaluates Other and the law once, at the surrogate's root, and
// stops when the exact residual is below the tolerance: usually three
// evaluations of Other where plain secant needs five or more. When the
// surrogate has no crossing, runawayCheck decides with at most two more
// evaluations (at Tj,max + 500 K and at Tj,max); a loop that conduction
// and the fixed loss alone run away from Ta on is decided with none. It
// reports ok = false (and the caller falls back to the general method) for
// an unstable root, for a crossing the surrogate cannot place and for a
// conduction law whose curvature it cannot bound.
//
// Source: a secant (regula-falsi-like) model of the slowly varying part
// and a Taylor model of the conduction law, Burden & Faires, Numerical
// Analysis, ch. 2; both models' errors vanish as the rounds close in, and
// only the exact residual ends the iteration.
func solveSurrogate(s *Solution, m *Model, ta q.Temperature, rth q.ThermalResistance, tjMax q.Temperature) bool {
	*s = Solution{}
	sv := surrogate{m: m, ta: float64(ta), r: float64(rth), lim: float64(tjMax) + 500, sol: s}
	C := float64(m.Cond)
	// residual is the exact Ta + Rth·P(T) − T with the law's derivatives.
	residual := func(t, o float64) (h, df, d2f float64) {
		f, df, d2f := m.Law.FactorD(q.Temperature(t))
		return sv.ta + sv.r*(float64(m.Fixed)+C*f+o) - t, df, d2f
	}
	// Other ≥ 0: when conduction and the fixed loss alone keep the residual
	// positive from Ta to Tj,max + 500 K, nothing brings it down to zero,
	// and the loop runs away without an evaluation of Other.
	if hl, _, _ := residual(sv.lim, 0); hl > 0 {
		if h, _, _ := residual(sv.ta, 0); h > 0 && sv.clear(sv.ta, 0, sv.lim, 0) {
			s.Status = Runaway
			return true
		}
	}
	t0 := sv.ta
	o0 := sv.exact(t0)
	h0, df, d2f := residual(t0, o0)
	k := 0.0 // slope of Other: unknown before the second evaluation
	for round := 0; round < 9; round++ {
		t1, st := sv.step(t0, h0, df, d2f, k)
		switch st {
		case rootNone:
			return sv.runawayCheck(tjMax)
		case rootFailed:
			return false
		}
		o1 := sv.exact(t1)
		var h1 float64
		h1, df, d2f = residual(t1, o1)
		if t1 != t0 {
			k = (o1 - o0) / (t1 - t0)
		}
		if math.Abs(h1) < thermalTol {
			gain := sv.r * (C*df + k)
			if !(gain < 1) {
				return false // an unstable root: the general method decides
			}
			s.Tj, s.Gain, s.Found = q.Temperature(t1), gain, true
			if s.Tj > tjMax {
				s.Status = AboveMax
			}
			return true
		}
		t0, o0, h0 = t1, o1, h1
	}
	return false
}

// surrogate is the state of solveSurrogate: the model, the exact samples
// of Other taken so far (for the runaway check) and the solution being
// built.
type surrogate struct {
	m          *Model
	ta, r, lim float64
	sol        *Solution
	samples    [12][2]float64 // (T, Other(T)) in the order taken
	nSamples   int
}

// exact evaluates Other at t and keeps the sample.
func (sv *surrogate) exact(t float64) float64 {
	s := sv.sol
	if s.Iterations < len(s.History) {
		s.History[s.Iterations] = q.Temperature(t)
	}
	s.Iterations++
	o := float64(sv.m.Other(q.Temperature(t)))
	if sv.nSamples < len(sv.samples) {
		sv.samples[sv.nSamples] = [2]float64{t, o}
		sv.nSamples++
	}
	return o
}

type rootStatus uint8

const (
	rootFound  rootStatus = iota
	rootNone              // the surrogate does not cross below the search limit
	rootFailed            // the step leaves the search range
)

// step is the surrogate's falling crossing nearest t0, where the exact
// residual h0 and the law's slope df and curvature d2f are known and Other
// has slope k: the root of h0 + b·d + a·d² (a = ½·Rth·Cond·d2f,
// b = Rth·(Cond·df + k) − 1) at which it falls through zero, taken in the
// cancellation-free form d = 2·h0/(−b + √(b² − 4·a·h0)).
func (sv *surrogate) step(t0, h0, df, d2f, k float64) (float64, rootStatus) {
	c := float64(sv.m.Cond)
	a := 0.5 * sv.r * c * d2f
	b := sv.r*(c*df+k) - 1
	disc := b*b - 4*a*h0
	den := -b + math.Abs(b) // a = 0 (a curve law's straight piece): √disc = |b|
	if a != 0 {
		den = -b + math.Sqrt(max(disc, 0))
	}
	if disc < 0 || !(den > 0) {
		if h0 > 0 {
			return t0, rootNone // above zero and not falling through it ahead
		}
		return t0, rootFailed
	}
	x := t0 + 2*h0/den
	switch {
	case math.IsNaN(x) || x < sv.ta-1:
		return x, rootFailed
	case x > sv.lim:
		return x, rootNone
	}
	return x, rootFound
}

// runawayCheck decides a loop whose surrogate found no crossing: Other is
// evaluated at Tj,max + 500 K and then at Tj,max (last, so that the caller
// finds the losses at Tj,max already computed), and the loop is a runaway
// when the exact residual is positive at every sample and the surrogate
// through all the samples (straight lines between them, the conduction law
// exact) stays above zero from Ta to Tj,max + 500 K. That is the general
// method's test (the residual at both temperatures) and a check of the
// whole range between the samples besides. Because Other ≥ 0, the
// residual is at least that of conduction and the fixed loss alone: when
// that stays positive from Tj,max to Tj,max + 500 K, no crossing lies
// there whatever Other does, and the evaluation at Tj,max + 500 K is
// skipped. Anything else goes back to the general method.
func (sv *surrogate) runawayCheck(tjMax q.Temperature) bool {
	s := sv.sol
	m := sv.m
	residual := func(t, o float64) float64 {
		return sv.ta + sv.r*(float64(m.Fixed)+float64(m.Cond)*m.Law.Factor(q.Temperature(t))+o) - t
	}
	tm := float64(tjMax)
	hot := residual(tm, 0) > 0 && residual(sv.lim, 0) > 0 && sv.clear(tm, 0, sv.lim, 0)
	if !hot {
		sv.exact(sv.lim)
	}
	sv.exact(tm)
	pts := sv.samples[:sv.nSamples]
	// Insertion sort by temperature (a dozen samples at most).
	for i := 1; i < len(pts); i++ {
		for j := i; j > 0 && pts[j][0] < pts[j-1][0]; j-- {
			pts[j], pts[j-1] = pts[j-1], pts[j]
		}
	}
	if pts[0][0] != sv.ta {
		return false
	}
	for _, p := range pts {
		if p[0] <= sv.lim && !(residual(p[0], p[1]) > 0) {
			return false // a crossing before this sample
		}
	}
	for i := 1; i < len(pts) && pts[i-1][0] < sv.lim; i++ {
		a, b := pts[i-1], pts[i]
		if b[0] == a[0] {
			continue
		}
		if !sv.clear(a[0], a[1], min(b[0], sv.lim), (b[1]-a[1])/(b[0]-a[0])) {
			return false
		}
	}
	s.Status, s.Tj, s.Found = Runaway, 0, false
	return true
}

// clear reports whether the surrogate through (a, oa) with slope k stays
// above zero on [a, b], given that it is above zero at both ends. With a
// curve law the surrogate is piecewise linear and is checked at the
// curve's points inside the segment; with a power law of exponent α ≥ 1
// or α ≤ 0 it is convex, and Newton's method from a, which never steps
// past the first crossing of a convex function, either reaches b or a
// rising slope with the residual still positive (no crossing). Other
// exponents are not decided (false).
func (sv *surrogate) clear(a, oa, b, k float64) bool {
	law := sv.m.Law
	// h is the surrogate's residual and its slope at t.
	h := func(t float64) (float64, float64) {
		f, df, _ := law.FactorD(q.Temperature(t))
		h := sv.ta + sv.r*(float64(sv.m.Fixed)+float64(sv.m.Cond)*f+oa+k*(t-a)) - t
		return h, sv.r*(float64(sv.m.Cond)*df+k) - 1
	}
	if law.NPts >= 2 {
		for _, p := range law.Pts[:law.NPts] {
			if p[0] > a && p[0] < b {
				if v, _ := h(p[0]); !(v > 0) {
					return false
				}
			}
		}
		return true
	}
	if law.Alpha > 0 && law.Alpha < 1 {
		return false
	}
	x := a
	for it := 0; it < 30; it++ {
		v, dv := h(x)
		if !(v > 0) {
			return false
		}
		if dv >= 0 {
			return true
		}
		x -= v / dv
		if x >= b {
			return true
		}
	}
	return false
}
