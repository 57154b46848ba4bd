package rank

import (
	"math"

	q "swrank/devices/quantity"
)

// ThermalStatus says how a junction temperature was found.
type ThermalStatus uint8

// Thermal outcomes.
const (
	ThermalSolved   ThermalStatus = iota // steady state found by fixed-point iteration
	ThermalBracket                       // found by bisection after the iteration failed
	ThermalFixed                         // pinned by the user (Stage.TjFixed)
	ThermalAboveMax                      // the steady state lies above Tj,max
	ThermalRunaway                       // no steady state: loss grows faster than the heat path removes it
)

func (s ThermalStatus) String() string {
	switch s {
	case ThermalBracket:
		return "bracketed"
	case ThermalFixed:
		return "fixed"
	case ThermalAboveMax:
		return "above tj_max"
	case ThermalRunaway:
		return "runaway"
	}
	return "solved"
}

// ThermalModel is the loss of a device as a function of its junction
// temperature, P(T) = Fixed + Cond·f(T) + Other(T), where f(T) is the
// on-resistance temperature factor relative to the reference temperature
// and Other is the rest of the temperature-dependent loss (switching edges,
// dead-time conduction, gate), so that the thermal loop iterates the whole
// device loss and not only conduction.
type ThermalModel struct {
	Fixed q.Power // loss independent of temperature, W; ≥ 0
	// Cond is the conduction loss at the reference temperature Tref, W; ≥ 0.
	Cond q.Power
	// Law gives R(T)/R(Tref).
	Law TempLaw
	// Other, when non-nil, returns the remaining temperature-dependent loss
	// at T, W; it must be ≥ 0 and finite for every T it is given. It must
	// not retain its argument (Evaluate passes a closure over stack values,
	// which keeps evaluation free of allocations).
	Other func(q.Temperature) q.Power
}

// At returns P(T).
func (m *ThermalModel) At(t q.Temperature) float64 {
	p := float64(m.Fixed) + float64(m.Cond)*m.Law.Factor(t)
	if m.Other != nil {
		p += float64(m.Other(t))
	}
	return p
}

// ThermalSolution is the outcome of SolveJunction.
type ThermalSolution struct {
	Tj         q.Temperature // junction temperature, °C (meaningful for Solved, Bracket, Fixed, AboveMax when Found)
	Status     ThermalStatus
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
func SolveJunction(m *ThermalModel, ta q.Temperature, rth q.ThermalResistance, tjMax q.Temperature) ThermalSolution {
	if m.Other != nil {
		if s, ok := solveSurrogate(m, ta, rth, tjMax); ok {
			return s
		}
	}
	p := func(t q.Temperature) float64 { return m.At(t) }
	g := func(t q.Temperature) float64 { return float64(t) - float64(ta) - float64(rth)*p(t) }
	gain := func(t q.Temperature) float64 {
		h := 1e-3
		return float64(rth) * (p(t+q.Temperature(h)) - p(t-q.Temperature(h))) / (2 * h)
	}
	G := func(t q.Temperature) q.Temperature { return ta + q.Temperature(float64(rth)*p(t)) }
	var s ThermalSolution
	record := func(t q.Temperature) {
		if s.Iterations < len(s.History) {
			s.History[s.Iterations] = t
		}
		s.Iterations++
	}
	done := func(t q.Temperature, gn float64) ThermalSolution {
		s.Tj, s.Gain, s.Found = t, gn, true
		if t > tjMax {
			s.Status = ThermalAboveMax
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
		s.Status = ThermalAboveMax
		hi = tjMax + 500
		if g(hi) <= 0 {
			s.Status = ThermalRunaway
			s.Tj, s.Found = 0, false
			return s
		}
		lo = tjMax
	} else {
		s.Status = ThermalBracket
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
// temperature-dependent loss m.Other: between exact evaluations Other is
// replaced by the straight line through the last two, the conduction loss
// stays exact, and the surrogate's root is found by secant steps that cost
// nothing. Each round evaluates Other once, at the surrogate's root, and
// stops when the exact residual is below the tolerance: usually three
// evaluations where plain secant needs five or more. It reports ok = false
// (and the caller falls back to the general method) for anything but a
// stable steady state below Tj,max + 500 K.
//
// Source: a secant (regula-falsi-like) model of the slowly varying part,
// Burden & Faires, Numerical Analysis, ch. 2; the exact conduction law keeps
// the surrogate's curvature.
func solveSurrogate(m *ThermalModel, ta q.Temperature, rth q.ThermalResistance, tjMax q.Temperature) (ThermalSolution, bool) {
	var s ThermalSolution
	R := float64(rth)
	cond := func(t float64) float64 { return float64(m.Cond) * m.Law.Factor(q.Temperature(t)) }
	exact := func(t float64) float64 {
		if s.Iterations < len(s.History) {
			s.History[s.Iterations] = q.Temperature(t)
		}
		s.Iterations++
		return float64(m.Other(q.Temperature(t)))
	}
	fixed := float64(m.Fixed)
	t0 := float64(ta)
	o0 := exact(t0)
	t1 := float64(ta) + R*(fixed+cond(t0)+o0)
	if math.IsNaN(t1) || t1 > float64(tjMax)+500 {
		return s, false
	}
	o1 := exact(t1)
	for round := 0; round < 8; round++ {
		k := 0.0
		if t1 != t0 {
			k = (o1 - o0) / (t1 - t0)
		}
		// Surrogate root of h(T) = Ta + R·(fixed + cond(T) + o1 + k·(T − t1)) − T
		// by Newton's method with the conduction law's own derivative.
		x1 := t1
		for it := 0; it < 30; it++ {
			f, df := m.Law.FactorD(q.Temperature(x1))
			h := float64(ta) + R*(fixed+float64(m.Cond)*f+o1+k*(x1-t1)) - x1
			dh := R*(float64(m.Cond)*df+k) - 1
			if dh >= 0 {
				return s, false // no crossing from above: let the general method decide
			}
			step := h / dh
			x1 -= step
			if math.IsNaN(x1) || x1 > float64(tjMax)+500 || x1 < float64(ta)-1 {
				return s, false
			}
			if math.Abs(step) < 1e-7 {
				break
			}
		}
		t2 := x1
		o2 := exact(t2)
		r := float64(ta) + R*(fixed+cond(t2)+o2) - t2
		if math.Abs(r) < thermalTol {
			const dh = 1e-3
			kn := k
			if t2 != t1 {
				kn = (o2 - o1) / (t2 - t1)
			}
			gain := R * ((cond(t2+dh)-cond(t2-dh))/(2*dh) + kn)
			if !(gain < 1) {
				return s, false // an unstable root: the general method decides
			}
			s.Tj, s.Gain, s.Found = q.Temperature(t2), gain, true
			if s.Tj > tjMax {
				s.Status = ThermalAboveMax
			}
			return s, true
		}
		t0, o0, t1, o1 = t1, o1, t2, o2
	}
	return s, false
}

// junction solves the thermal loop of one device at stage s: pinned by
// the user, at ambient without a thermal path, else by SolveJunction. It
// returns the solution and the temperature to evaluate the losses at
// (Tj,max when no steady state exists).
func junction(m *ThermalModel, s *Stage, rth q.ThermalResistance, tjMax q.Temperature) (ThermalSolution, q.Temperature) {
	var sol ThermalSolution
	switch {
	case s.TjFixed.OK:
		sol = ThermalSolution{Tj: s.TjFixed.V, Status: ThermalFixed, Found: true}
	case rth == 0:
		sol = ThermalSolution{Tj: s.Ambient, Status: ThermalSolved, Found: true}
	default:
		sol = SolveJunction(m, s.Ambient, rth, tjMax)
	}
	if !sol.Found {
		return sol, tjMax
	}
	return sol, sol.Tj
}
