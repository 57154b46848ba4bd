package resonant

import (
	"fmt"
	"math"

	"gonum.org/v1/gonum/integrate/quad"

	q "swrank/devices/quantity"
)

// QossFunc is a transistor's output-charge law: the charge Q_oss(V) =
// ∫₀^V C_oss(v) dv stored at drain-source voltage V ≥ 0. It must be finite,
// ≥ 0, zero at 0 and non-decreasing. The caller builds it from the part's
// data (a Q_oss column, a C_oss curve, or one of the laws below).
type QossFunc func(q.Voltage) q.Charge

// LinearQoss is the law of a constant capacitance c: Q = c·V.
func LinearQoss(c q.Capacitance) QossFunc {
	return func(v q.Voltage) q.Charge { return q.Charge(float64(c) * float64(v)) }
}

// SqrtQoss is the law C(V) = C₀·√(V₀/V) through one datasheet point
// (c0 at v0): Q_oss(V) = 2·C₀·√(V₀·V) = 2·C(V)·V. Source: Erickson &
// Maksimović, Fundamentals of Power Electronics, 2nd ed., 2001, ch. 4.
func SqrtQoss(c0 q.Capacitance, v0 q.Voltage) QossFunc {
	return func(v q.Voltage) q.Charge {
		if v <= 0 {
			return 0
		}
		return q.Charge(2 * float64(c0) * math.Sqrt(float64(v0)*float64(v)))
	}
}

// JunctionQoss is the law of a graded junction, C(V) = C_j0/(1 + V/V_j)^m
// (m < 1): Q_oss(V) = C_j0·V_j/(1−m)·((1 + V/V_j)^{1−m} − 1). Source: the
// depletion-capacitance law of the SPICE junction model (e.g. Sze & Ng,
// Physics of Semiconductor Devices, 3rd ed., 2007, ch. 2).
func JunctionQoss(cj0 q.Capacitance, vj q.Voltage, m q.Ratio) QossFunc {
	return func(v q.Voltage) q.Charge {
		if v <= 0 {
			return 0
		}
		k := 1 - float64(m)
		return q.Charge(float64(cj0) * float64(vj) / k * (math.Pow(1+float64(v/vj), k) - 1))
	}
}

// glNodes is the number of Gauss–Legendre nodes of the fixed quadratures.
const glNodes = 48

// OssEnergy is the energy stored in the output capacitance at v,
// E_oss(V) = ∫₀^V v·C(v) dv = V·Q_oss(V) − ∫₀^V Q_oss(v) dv (integration
// by parts), from the charge law alone. Definitions of IEC 60747-8; the
// integral is taken by Gauss–Legendre quadrature in s with v = V·s², which
// keeps a √-law integrand smooth.
func OssEnergy(qoss QossFunc, v q.Voltage) (q.Energy, error) {
	if qoss == nil {
		return 0, fmt.Errorf("output energy: %w: no Q_oss law given", ErrSpec)
	}
	if err := nonNegative("voltage", float64(v)); err != nil {
		return 0, err
	}
	if v == 0 {
		return 0, nil
	}
	qv, err := evalQoss(qoss, v)
	if err != nil {
		return 0, err
	}
	var bad error
	integral := quad.Fixed(func(s float64) float64 {
		x, err := evalQoss(qoss, q.Voltage(float64(v)*s*s))
		if err != nil && bad == nil {
			bad = err
		}
		return float64(x) * 2 * float64(v) * s
	}, 0, 1, glNodes, quad.Legendre{}, 0)
	if bad != nil {
		return 0, bad
	}
	e := float64(v)*float64(qv) - integral
	if e < 0 {
		// Only rounding can make a non-decreasing law give a negative value.
		e = 0
	}
	return q.Energy(e), nil
}

// evalQoss calls qoss and checks the value.
func evalQoss(qoss QossFunc, v q.Voltage) (q.Charge, error) {
	c := qoss(v)
	if math.IsNaN(float64(c)) || math.IsInf(float64(c), 0) || c < 0 {
		return 0, fmt.Errorf("output charge law: %w: Q_oss(%s) = %g is not a finite charge ≥ 0", ErrSpec, v, float64(c))
	}
	return c, nil
}
