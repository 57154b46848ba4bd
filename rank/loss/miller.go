package loss

import (
	"fmt"
	"math"

	q "swrank/devices/quantity"
	"swrank/rank/numeric"
)

// millerMax is the most segments a MillerLaw holds: the oxide segment
// and up to millerMax − 1 depletion segments.
const millerMax = 14

// millerStep is the ratio of (φ + u) across one depletion segment: √2,
// so that Cgd changes by at most 2^(m/2) within a segment (19 % at
// m = ½) and the segment's constant, which keeps the charge exactly,
// raises the moment ∫x·C dx of that segment by under 0.5 %.
const millerStep = math.Sqrt2

// Defaults of the depletion law (FitMillerLaw).
const (
	// OnePointExponent is the exponent m of C ∝ (φ + u)^−m that the
	// fit takes when a part gives Crss at one voltage only: ½, the abrupt
	// junction (Sze & Ng, "Physics of Semiconductor Devices", 3rd ed.,
	// 2007, ch. 2), the steep end of the ⅓ to ½ that power MOSFETs'
	// Crss curves show above a few volts (common practice), so the
	// unfavourable end: more Miller charge in the middle of the edge,
	// where V·I is largest. On the ngspice development devices it
	// reproduces the simulated die's ∫v·Cgd dv along a 12 V edge within
	// 2 % (docs/models.md, §4).
	OnePointExponent = 0.5
	// BuiltIn is the built-in potential φ, V: 0.7 V, the usual silicon
	// junction value (Sze & Ng 2007, ch. 2).
	BuiltIn q.Voltage = 0.7
	// depletionMaxExponent bounds an exponent read from two points: a
	// datasheet curve's steepest fall just above the knee stays below it.
	depletionMaxExponent = 3.0
)

// CapPoint is a small-signal capacitance at a drain voltage with the gate
// at the source (the datasheet's capacitance test).
type CapPoint struct {
	V q.Voltage     // drain-source voltage, V; > 0
	C q.Capacitance // capacitance, F; > 0
}

// MillerData is what FitMillerLaw takes.
type MillerData struct {
	Qgd  q.Charge   // Miller charge of the gate-charge test, C; > 0
	VQg  q.Voltage  // drain voltage of the gate-charge test, V; > 0
	Knee q.Voltage  // plateau voltage, V; > 0 (taken as VQg when above it)
	Crss []CapPoint // Crss points, voltages strictly increasing; at least one
	// M is the exponent of the depletion law below the first point and
	// above the last when one point is given, [0, 3]; 0 keeps Crss
	// constant above the knee. With two or more points the exponents come
	// from the points.
	M    float64
	Phi  q.Voltage // built-in potential φ, V; > 0 (BuiltIn)
	VMax q.Voltage // highest drain voltage the law must resolve, V (the rating); the last segment extends beyond it
}

// MillerLaw is the gate-drain capacitance along a hard edge's drain swing v
// while the gate sits on its Miller plateau, piecewise constant in v:
//
//   - below the knee Vk (the plateau voltage: the drain is below the gate
//     and the gate-drain overlap is accumulated) the oxide value Cox;
//   - above it the depletion law of the drain-gate voltage u = v − Vk,
//     C(u) = Cᵢ·((φ + Uᵢ)/(φ + u))^m, through the datasheet's Crss points
//     (Uᵢ, Cᵢ): Crss is measured with the gate at the source, so at a
//     drain-gate voltage equal to its drain voltage. Between two points m
//     is read from them; below the first and above the last it is the
//     nearest pair's, or MillerData.M with one point.
//
// The depletion law is held as a constant per segment of √2 in (φ + u),
// each keeping the law's charge exactly. Cox is chosen so that the charge
// from 0 to the gate-charge test's voltage equals the datasheet Qgd.
//
// Source: the depletion capacitance of a junction, C ∝ (φ + V)^−m (Sze &
// Ng 2007, ch. 2); the shape of Cgd(v) of a power MOSFET, the oxide value
// below Vds ≈ Vgs − Vth and the depletion capacitance in series above it
// (Baliga, "Fundamentals of Power Semiconductor Devices", 2008, ch. 6);
// the use of Cgd(v) along the transition instead of one lumped Qgd follows
// Ren, Xu, Zhou, Lee, "Analytical loss model of power MOSFET", IEEE Trans.
// Power Electronics, 2006 (from memory). The construction from datasheet
// numbers is swrank's own, checked against ngspice
// (docs/spice-crosscheck.md).
type MillerLaw struct {
	n  int                // segments in use
	lo [millerMax]float64 // lower bound of each segment, V (lo[0] = 0, lo[1] = Vk)
	c  [millerMax]float64 // capacitance of each segment, F
	m  float64            // exponent used below the first Crss point
}

// KneeLaw is the two-constant law: clo below vk, chi above (the depletion
// law with m = 0).
func KneeLaw(vk q.Voltage, clo, chi q.Capacitance) MillerLaw {
	var l MillerLaw
	l.n = 2
	l.lo[1] = float64(vk)
	l.c[0], l.c[1] = float64(clo), float64(chi)
	return l
}

// FitMillerLaw builds the law from the datasheet's Qgd, Crss point(s) and
// plateau. When Qgd is too small for the depletion law below the first
// point (Cox would fall below the law's value at the knee), that
// exponent is lowered until Cox meets it; when even a constant is too
// much, Cox is that constant and the law holds more charge than Qgd (the
// previous knee law's rule).
func FitMillerLaw(d MillerData) (MillerLaw, error) {
	if len(d.Crss) == 0 || len(d.Crss) > MaxCapPoints || !(d.Qgd > 0) || !(d.VQg > 0) {
		return MillerLaw{}, fmt.Errorf("miller law: needs qgd > 0 at a drain voltage > 0 and 1 to %d crss points", MaxCapPoints)
	}
	for i, p := range d.Crss {
		if !(p.V > 0) || !(p.C > 0) || (i > 0 && p.V <= d.Crss[i-1].V) {
			return MillerLaw{}, fmt.Errorf("miller law: crss points need voltages > 0, increasing, and capacitances > 0")
		}
	}
	if !(d.M >= 0 && d.M <= depletionMaxExponent) || (d.M > 0 && !(d.Phi > 0)) {
		return MillerLaw{}, fmt.Errorf("miller law: exponent %g outside [0, %g] or φ %g V not > 0", d.M, depletionMaxExponent, float64(d.Phi))
	}
	vk := min(d.Knee, d.VQg)
	if !(vk > 0) {
		vk = d.VQg
	}
	dep := newDepletion(d)
	uq := float64(d.VQg - vk)
	cox := func() float64 { return (float64(d.Qgd) - dep.charge(0, uq)) / float64(vk) }
	c := cox()
	if c < dep.at(0) {
		// Lower the exponent below the first point: Cox − C(0) rises as
		// it falls (less charge above the knee, a smaller C(0)).
		hi := dep.mBelow
		gap := func(m float64) float64 {
			dep.mBelow = m
			return cox() - dep.at(0)
		}
		if gap(0) > 0 { // gap(hi) < 0: a sign change FindRoot cannot miss
			r, err := numeric.FindRoot(gap, 0, hi, 0, 1e-9)
			dep.mBelow = r.X
			if err != nil {
				dep.mBelow = 0
			}
		}
		c = cox()
	}
	uTop := max(float64(d.VMax-vk), uq, float64(d.Crss[len(d.Crss)-1].V))
	l := dep.segments(uTop, uq, float64(vk))
	l.c[0] = max(c, l.c[1])
	l.m = dep.mBelow
	return l, nil
}

// depletion is the continuous law of MillerLaw above the knee, in the
// drain-gate voltage u: piecewise C·x^−m in x = φ + u, one exponent per
// interval between points.
type depletion struct {
	phi    float64
	np     int                   // points
	x, c   [MaxCapPoints]float64 // points' x = φ + U and C
	mid    [MaxCapPoints]float64 // exponent between point i and i+1
	mBelow float64               // exponent below the first point
	mAbove float64               // exponent above the last point
}

// MaxCapPoints is the most Crss points FitMillerLaw takes.
const MaxCapPoints = 12

func newDepletion(d MillerData) depletion {
	phi := float64(d.Phi)
	if phi <= 0 {
		phi = float64(BuiltIn) // unused: every exponent is 0
	}
	dep := depletion{phi: phi, mBelow: d.M, mAbove: d.M, np: len(d.Crss)}
	for i, p := range d.Crss {
		dep.x[i], dep.c[i] = phi+float64(p.V), float64(p.C)
	}
	for i := 1; i < dep.np; i++ {
		m := math.Log(dep.c[i-1]/dep.c[i]) / math.Log(dep.x[i]/dep.x[i-1])
		dep.mid[i-1] = min(max(m, 0), depletionMaxExponent)
	}
	if dep.np > 1 {
		dep.mBelow, dep.mAbove = dep.mid[0], dep.mid[dep.np-2]
	}
	return dep
}

// piece returns the reference point and exponent of the interval holding
// x: C(x) = cr·(xr/x)^m.
func (p *depletion) piece(x float64) (xr, cr, m float64) {
	n := p.np
	switch {
	case x <= p.x[0]:
		return p.x[0], p.c[0], p.mBelow
	case x >= p.x[n-1]:
		return p.x[n-1], p.c[n-1], p.mAbove
	}
	i := 1
	for x > p.x[i] {
		i++
	}
	return p.x[i-1], p.c[i-1], p.mid[i-1]
}

// at is C at u.
func (p *depletion) at(u float64) float64 {
	x := p.phi + u
	xr, cr, m := p.piece(x)
	return cr * math.Pow(xr/x, m)
}

// charge is ∫ C du from ua to ub (ua ≤ ub), interval by interval.
func (p *depletion) charge(ua, ub float64) float64 {
	xa, xb := p.phi+ua, p.phi+ub
	s := 0.0
	for xa < xb {
		// End of this interval: the next point, or xb.
		end := xb
		for _, xi := range p.x[:p.np] {
			if xi > xa*(1+1e-12) {
				end = min(end, xi)
				break
			}
		}
		s += p.prim(xa, end)
		xa = end
	}
	return s
}

// prim is ∫ C dx from xa to xb within one interval between points:
// cr·xr^m·[x^(1−m)]/(1 − m), or its logarithmic form at m = 1.
func (p *depletion) prim(xa, xb float64) float64 {
	xr, cr, m := p.piece((xa + xb) / 2)
	if math.Abs(m-1) < 1e-9 {
		return cr * xr * math.Log(xb/xa)
	}
	k := cr * powPos(xr, m)
	return k * (powPos(xb, 1-m) - powPos(xa, 1-m)) / (1 - m)
}

// segments lays the law out as constants over [0, uTop] (φ + u by
// millerStep; the points' voltages and pin, the gate-charge test's, as
// boundaries, so that the charge is exact there), shifted by the knee vk;
// segment 0 (the oxide) is left for the caller.
func (p *depletion) segments(uTop, pin, vk float64) MillerLaw {
	var l MillerLaw
	flat := p.mBelow == 0 && p.mAbove == 0
	for _, m := range p.mid[:max(p.np-1, 0)] {
		flat = flat && m == 0
	}
	var buf [millerMax]float64
	bounds := buf[:1] // in u, increasing, from 0
	r := 0.0          // the grid's ratio of φ + u
	if !flat {
		span := (p.phi + uTop) / p.phi
		cells := int(math.Ceil(math.Log(span) / math.Log(millerStep)))
		cells = min(max(cells, 1), millerMax-2-p.np)
		r = math.Pow(span, 1/float64(cells))
		x := p.phi
		next := 0
		add := func(u float64) {
			if u > bounds[len(bounds)-1]*(1+1e-9)+1e-12 && u < uTop {
				bounds = append(bounds, u)
			}
		}
		pinned := false
		addPin := func(below float64) {
			if !pinned && pin < below {
				add(pin)
				pinned = true
			}
		}
		for k := 1; k < cells; k++ {
			x *= r
			for ; next < p.np && p.x[next] < x; next++ {
				addPin(p.x[next] - p.phi)
				add(p.x[next] - p.phi)
			}
			addPin(x - p.phi)
			add(x - p.phi)
		}
		for ; next < p.np; next++ {
			addPin(p.x[next] - p.phi)
			add(p.x[next] - p.phi)
		}
		addPin(math.Inf(1))
	}
	l.n = 1 + len(bounds)
	// Each cell lies within one interval between points (the points are
	// bounds): its charge is k·(xb^(1−m) − xa^(1−m))/(1 − m), and a cell
	// shares its lower power with the cell below when the interval is the
	// same, so a cell costs one power, and none between two grid points
	// (xb = r·xa: xb^(1−m) = r^(1−m)·xa^(1−m)).
	prevXr, prevM, prevPow, k, rm := math.NaN(), math.NaN(), 0.0, 0.0, 0.0
	for j, u := range bounds {
		hi := uTop
		if j+1 < len(bounds) {
			hi = bounds[j+1]
		}
		l.lo[j+1] = vk + u
		if !(hi > u) {
			l.c[j+1] = p.at(u)
			continue
		}
		xa, xb := p.phi+u, p.phi+hi
		xr, cr, m := p.piece((xa + xb) / 2)
		if math.Abs(m-1) < 1e-9 {
			l.c[j+1] = cr * xr * math.Log(xb/xa) / (hi - u)
			prevXr = math.NaN()
			continue
		}
		pa := prevPow
		if xr != prevXr || m != prevM { // another interval: its own law
			pa, k, rm = powPos(xa, 1-m), cr*powPos(xr, m), 0
		}
		var pb float64
		if r > 0 && math.Abs(xb-xa*r) <= 1e-12*xb {
			if rm == 0 {
				rm = powPos(r, 1-m)
			}
			pb = pa * rm
		} else {
			pb = powPos(xb, 1-m)
		}
		l.c[j+1] = k * (pb - pa) / (1 - m) / (hi - u)
		prevXr, prevM, prevPow = xr, m, pb
	}
	return l
}

// seg is the segment holding v (the last for v beyond it).
func (l *MillerLaw) seg(v float64) int { return segment(&l.lo, l.n, v) }

// segment is the index of the segment of lower bounds lo[:n] that holds v.
func segment(lo *[millerMax]float64, n int, v float64) int {
	k := max(n-1, 0)
	for k > 0 && v < lo[k] {
		k--
	}
	return k
}

// Knee is the voltage below which Cgd is the oxide value, V.
func (l *MillerLaw) Knee() q.Voltage { return q.Voltage(l.lo[1]) }

// Oxide is Cgd below the knee, F.
func (l *MillerLaw) Oxide() q.Capacitance { return q.Capacitance(l.c[0]) }

// Exponent is the depletion exponent used between the knee and the
// first Crss point (lowered from MillerData.M when Qgd leaves no room).
func (l *MillerLaw) Exponent() float64 { return l.m }

// C is Cgd at drain voltage v (the segment's constant), F.
func (l *MillerLaw) C(v q.Voltage) q.Capacitance { return q.Capacitance(l.c[l.seg(float64(v))]) }

// Charge is ∫₀^v Cgd dx, the Miller charge of a transition of v.
func (l *MillerLaw) Charge(v q.Voltage) q.Charge {
	x, s := max(float64(v), 0), 0.0
	for k := 0; k < l.n && l.lo[k] < x; k++ {
		hi := x
		if k+1 < l.n {
			hi = min(hi, l.lo[k+1])
		}
		s += l.c[k] * (hi - l.lo[k])
	}
	return q.Charge(s)
}

// moment is ∫₀^v x·Cgd(x) dx, C·V.
func (l *MillerLaw) moment(v q.Voltage) float64 {
	x, s := max(float64(v), 0), 0.0
	for k := 0; k < l.n && l.lo[k] < x; k++ {
		hi := x
		if k+1 < l.n {
			hi = min(hi, l.lo[k+1])
		}
		s += l.c[k] * (hi*hi - l.lo[k]*l.lo[k]) / 2
	}
	return s
}

// MillerFallEnergy is the V·I overlap energy of a hard turn-on's voltage
// fall when the gate current ig moves the drain through Cgd(v): the time to
// move by dv is Cgd(v)·dv/ig, so E = (i/ig)·∫₀^V v·Cgd(v) dv.
//
// Source: Ren et al., IEEE TPEL 2006 (from memory); derived from the
// gate-charge method (Balogh 2001) with a voltage-dependent Cgd.
func MillerFallEnergy(m *MillerLaw, v q.Voltage, i, ig q.Current) q.Energy {
	if ig <= 0 || i <= 0 {
		return 0
	}
	return q.Energy(float64(i) / float64(ig) * m.moment(v))
}

// MillerShuntRiseEnergy is the channel's energy at a turn-off whose drain
// is not clamped but swings into a shunt capacitance cShunt (a class E
// switch): while the gate sits on its plateau and the driver pulls ig out
// of it, the drain rises at dv/dt = ig/Cgd(v), the shunt takes
// cShunt·dv/dt of the current i and the channel the rest, until the
// shunt takes it all (Cgd(v*)·(i/ig − 1) = cShunt) or the drain reaches
// vPeak. So
//
//	E = ∫₀^v* v·[(i/ig − 1)·Cgd(v) − cShunt] dv,
//
// 0 when the shunt takes the whole current from the start (a gate fast
// against the swing: the channel's current then falls with its gate, the
// capacitive turn-off). The Miller law is piecewise constant: the integral
// is exact per segment.
//
// Source: the gate-charge method's voltage interval, with the displacement
// currents of Cgd and of the drain's capacitance in the node balance
// (Balogh 2001; the Cgd(v) of Ren et al., IEEE TPEL 2006, from memory),
// applied to the unclamped class E drain (Raab 1977).
func MillerShuntRiseEnergy(m *MillerLaw, cShunt q.Capacitance, vPeak q.Voltage, i, ig q.Current) q.Energy {
	if ig <= 0 || i <= ig || vPeak <= 0 {
		return 0
	}
	a := float64(i)/float64(ig) - 1
	top := float64(vPeak)
	e := 0.0
	for k := 0; k < m.n && m.lo[k] < top; k++ {
		d := a*m.c[k] - float64(cShunt)
		if d <= 0 {
			continue
		}
		lo, hi := m.lo[k], top
		if k+1 < m.n {
			hi = min(hi, m.lo[k+1])
		}
		e += d * (hi*hi - lo*lo) / 2
	}
	return q.Energy(e)
}
