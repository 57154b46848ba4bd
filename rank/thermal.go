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
	thermalTol     = 1e-6 // K
	thermalMaxIter = 100
)

// SolveJunction solves Tj = Ta + Rth·P(Tj) by fixed-point iteration from Ta,
// falling back to bisection on [Ta, tjMax] (and above it, to report how far
// above the rating the steady state lies). The loop gain g = Rth·dP/dT tells
// stability: the iteration converges when g < 1; with g ≥ 1 at every
// temperature up to the search limit there is no steady state (runaway).
//
// Source: the steady-state junction temperature of a device with a single
// thermal resistance (IEC 60747-8 thermal characteristics); the stability
// condition of the electro-thermal loop is standard fixed-point theory
// (a contraction when |g| < 1).
func SolveJunction(m *ThermalModel, ta q.Temperature, rth q.ThermalResistance, tjMax q.Temperature) ThermalSolution {
	p := m.At
	g := func(t q.Temperature) float64 { return float64(t) - float64(ta) - float64(rth)*p(t) }
	gain := func(t q.Temperature) float64 {
		h := 1e-3
		return float64(rth) * (p(t+q.Temperature(h)) - p(t-q.Temperature(h))) / (2 * h)
	}
	var s ThermalSolution
	t := ta
	for i := 0; i < thermalMaxIter; i++ {
		if i < len(s.History) {
			s.History[i] = t
		}
		next := ta + q.Temperature(float64(rth)*p(t))
		s.Iterations = i + 1
		if math.Abs(float64(next-t)) < thermalTol {
			t = next
			s.Tj, s.Gain, s.Found = t, gain(t), true
			if t > tjMax {
				s.Status = ThermalAboveMax
			}
			return s
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
