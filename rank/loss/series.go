package loss

import "math"

// This file holds the numeric speed helpers of the hot path: powers by
// exp·log and by a binomial series near the last point. The models call
// them; they hold no physics.

// powPos is x^y for x > 0 as exp(y·ln x): the hot path's powers, without
// math.Pow's handling of special cases it never meets (relative error a few
// ulp times |y·ln x|).
func powPos(x, y float64) float64 { return math.Exp(y * math.Log(x)) }

// PowNear evaluates x^p for a fixed p and x > 0 that moves little between
// calls (the thermal loop's iterates): near the last exactly computed point
// x0 it sums the binomial series y0·(1 + u)^p, u = x/x0 − 1, to the
// u^powNearOrder term (Horner: a multiply-add a term, cheaper than the
// logarithm and exponential of powPos; only to the u⁴ term where the u⁵
// term is below tol), and it computes powPos again (and
// takes the new point as x0) when |u| exceeds the radius at which the first
// neglected term, |C(p, order + 1)|·|u|^(order+1), reaches tol, or 0.2.
// Binomial theorem: the ratio of successive terms, (|p| + k)·|u|/(k + 1),
// falls with k towards |u| ≤ 0.2 (for |p| > 1, as here), so the remainder is
// of the order of the first neglected term. s must be set (NewPowSeries);
// the first call computes exactly.
type PowNear struct {
	s         *PowSeries
	x0inv, y0 float64 // 1/x0 and x0^p (x0inv = 0: no point yet)
}

// PowSeries is PowNear's fixed part, prepared once for p.
type PowSeries struct {
	c         [powNearOrder]float64 // C(p, 1) … C(p, order)
	p, radius float64               // radius: the largest |u| served by the series
	short     float64               // the largest |u| served by its first four terms
}

// powNearOrder is the highest order of PowNear's binomial series.
const powNearOrder = 14

// NewPowSeries prepares the binomial coefficients of x^p and the radius
// within which PowNear's series stays within relative error tol.
func NewPowSeries(p, tol float64) PowSeries {
	m := PowSeries{p: p}
	ck := 1.0
	for k := range m.c {
		ck *= (p - float64(k)) / float64(k+1)
		m.c[k] = ck
	}
	if cn := math.Abs(ck * (p - powNearOrder) / (powNearOrder + 1)); cn > 0 {
		m.radius = min(math.Pow(tol/cn, 1.0/(powNearOrder+1)), 0.2)
	}
	if c5 := math.Abs(m.c[4]); c5 > 0 {
		m.short = min(math.Pow(tol/c5, 1.0/5), m.radius)
	}
	return m
}

func (m *PowNear) at(x float64) float64 {
	ps := m.s
	if m.x0inv != 0 {
		if u := x*m.x0inv - 1; math.Abs(u) <= ps.short {
			c := &ps.c
			return m.y0 * (1 + u*(c[0]+u*(c[1]+u*(c[2]+u*c[3]))))
		} else if math.Abs(u) <= ps.radius {
			s := 0.0
			for k := powNearOrder - 1; k >= 0; k-- {
				s = u * (ps.c[k] + s)
			}
			return m.y0 * (1 + s)
		}
	}
	y := powPos(x, ps.p)
	if ps.radius > 0 {
		m.x0inv, m.y0 = 1/x, y
	}
	return y
}

// NewPowNear starts a PowNear on the prepared series s (no point yet: its
// first call computes exactly).
func NewPowNear(s *PowSeries) PowNear { return PowNear{s: s} }
