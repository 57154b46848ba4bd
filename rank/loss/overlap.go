package loss

import (
	"math"
	q "swrank/devices/quantity"
)

// RiseTol is the relative error allowed in the turn-off integral's
// crossing (RiseIntegral.energy).
const RiseTol = 1e-12

// Transitions are the four intervals of a hard-switched, clamped-inductive
// commutation: current rise and voltage fall at turn-on, voltage rise and
// current fall at turn-off.
type Transitions struct {
	Tir, Tvf, Tvr, Tif q.Time // current rise, voltage fall, voltage rise, current fall, s (+Inf: no gate current)
}

// GateLoop is the gate drive seen by one transistor.
type GateLoop struct {
	VOn, VOff     q.Voltage    // drive levels, V
	ROn, ROff     q.Resistance // whole loop at turn-on / turn-off (driver + external + internal), Ω
	IPkOn, IPkOff q.Current    // driver current limits, A; 0 = none
}

// GateChargeTransitions computes the transition intervals by the gate-charge
// method: the current changes while the gate moves Qgs2 between threshold
// and plateau, the voltage while it moves Qgd on the plateau, each at the
// gate current the loop delivers. With meanGate the current-interval gate
// current is taken at the mean gate voltage (Vth+Vpl)/2 instead of at the
// plateau (a refinement of the same method).
//
// Source: Erickson & Maksimović 2001, ch. 4; Balogh 2001; Graovac, Pürschel,
// Kiep, "MOSFET Power Losses Calculation Using the Data-Sheet Parameters",
// 2006.
func GateChargeTransitions(qgs2, qgd q.Charge, vth, vpl q.Voltage, g GateLoop, meanGate bool) Transitions {
	vi := vpl
	if meanGate {
		vi = (vth + vpl) / 2
	}
	t := func(qq q.Charge, i q.Current) q.Time {
		if i <= 0 {
			return q.Time(math.Inf(1))
		}
		return q.Time(float64(qq) / float64(i))
	}
	return Transitions{
		Tir: t(qgs2, GateCurrent(g.VOn, vi, g.ROn, g.IPkOn)),
		Tvf: t(qgd, GateCurrent(g.VOn, vpl, g.ROn, g.IPkOn)),
		Tvr: t(qgd, GateCurrent(g.VOff, vpl, g.ROff, g.IPkOff)),
		Tif: t(qgs2, GateCurrent(g.VOff, vi, g.ROff, g.IPkOff)),
	}
}

// OverlapEnergy is the V·I overlap energy of one clamped-inductive edge in
// which the current and the voltage each change linearly in turn, during
// t1 and t2: ½·V·I·(t1 + t2).
//
// Source: Erickson & Maksimović 2001, ch. 4 (clamped inductive switching).
func OverlapEnergy(v q.Voltage, i q.Current, t1, t2 q.Time) q.Energy {
	return q.Energy(0.5 * float64(v) * float64(i) * float64(t1+t2))
}

// ScaleSwitchingTime turns a datasheet 10-90 % rise or fall time into the
// full transition time for the user's gate loop: divide by 0.8 for the full
// transition, then scale with the loop resistance and inversely with the
// gate-drive headroom of that edge (drive − plateau at turn-on, plateau −
// off level at turn-off). The gate current, and so the time, goes as
// headroom/resistance.
//
// Source: derived from the gate-charge method (Balogh 2001) applied to the
// datasheet test circuit; 10-90 % times per IEC 60747-8:2010.
func ScaleSwitchingTime(tSpec q.Time, rSpec, rNew q.Resistance, headSpec, headNew q.Voltage) q.Time {
	t := float64(tSpec) / 0.8
	if rSpec > 0 && rNew > 0 {
		t *= float64(rNew / rSpec)
	}
	if headSpec > 0 && headNew > 0 {
		t *= float64(headSpec / headNew)
	}
	return q.Time(t)
}

// millerRiseEnergy is the turn-off voltage-rise energy when the load current
// i also charges the drain's capacitances: while the gate current ig sets
// the rate dv/dt = ig/Cgd(v) (Cgd on the plateau), the gate-drain
// capacitance takes ig itself and the drain-source capacitance
// Cds(v)·dv/dt of the load current, and the channel carries the rest,
// i − ig − ig·Cds(v)/Cgd(v) (not less than 0). The channel loss is
// ∫ v·i_ch dt = ∫₀^V v·max(0, (i/ig − 1)·Cgd(v) − Cds(v)) dv, in closed form
// for a power-law Cds. Cds is the datasheet's Coss less its Crss, taken as
// the share cdsShare of Coss at every voltage (1 − Crss/Coss at the
// capacitance test's voltage): the datasheet Coss holds the small-signal
// Cgd at Vdg = Vds, below the plateau's Cgd at Vdg = Vds − Vpl, which the
// gate current already moves. iTop is the channel current left when the
// voltage reaches V, which the current-fall interval then turns off. At
// light load the channel is off before the drain moves and the turn-off is
// nearly lossless.
//
// Source: Ren et al., IEEE TPEL 2006 (from memory: Coss charging shortens
// the channel's current overlap); Kirchhoff's current law at the drain
// node, the closed form for C_ds = K·v^(−N) and a piecewise-constant Cgd
// (MillerLaw) derived here and checked against ngspice
// (docs/spice-crosscheck.md).
func millerRiseEnergy(m MillerLaw, oss OssLaw, cdsShare float64, v q.Voltage, i, ig q.Current) (q.Energy, q.Current) {
	r := newRiseIntegral(&m, oss, cdsShare, v)
	return r.Energy(i, ig)
}

// RiseIntegral is millerRiseEnergy with the parts that do not depend on the
// currents worked out once (the thermal loop changes only the gate
// current). Its device part is the device's RiseTable and Miller law.
type RiseIntegral struct {
	t         *RiseTable
	m         *MillerLaw
	v, pv     float64 // switched voltage, V, and v^(2−N)
	top       int     // the Miller law's segment holding v
	zeroTop   float64 // zero bound of the top segment, which ends at v
	fullTop   float64 // full bound of the top segment
	cossTop   float64 // Coss(v), F
	cgdTop    float64 // Cgd at v, F
	cdsPerCgd float64 // Cds(v)/cgdTop
	positive  bool    // v > 0
	// xc holds the segments' crossings for a = 1, (K/c)^(1/N), worked
	// out for the segments the evaluation's crossing reaches (bit k of
	// xcHave set), not for all of them when the part is prepared.
	xc     [millerMax]float64
	xcHave uint32
}

// RiseTable is a RiseIntegral's device part (RiseBase): the drain-source
// capacitance law and, per segment of the device's Miller law, the powers
// and bounds that make an evaluation cheap. It holds no Miller law of its
// own: At takes the one it was made from.
type RiseTable struct {
	k, n     float64 // drain-source capacitance law, Cds = K·v^−N
	cossK    float64 // the output-capacitance law's K (Coss = cossK·v^−N)
	kInv, kN float64 // 1/K and K/(2 − N), for the segments without dividing
	epsN     float64 // riseEps^N
	// Per segment: its lower bound's power lo^(2−N); and the bounds on
	// a = i/ig − 1 that decide
	// a whole segment (ending at the next bound) without a power
	// evaluation: at or below zero[k] the integrand is nowhere positive;
	// at or above full[k] it is positive on the whole segment (for the
	// first segment, from riseEps·hi on: the part below adds under
	// riseEps² relative).
	plo, zero, full [millerMax]float64
}

// newRiseIntegral prepares millerRiseEnergy for law m, output capacitance
// oss, its drain-source share and switched voltage v.
func newRiseIntegral(m *MillerLaw, oss OssLaw, cdsShare float64, v q.Voltage) RiseIntegral {
	b := RiseBase(m, oss, cdsShare)
	return b.At(m, v)
}

// CdsShare is the drain-source share of the output capacitance at the
// capacitance test's voltage, 1 − Crss/Coss, within [0, 1].
func CdsShare(crss, coss q.Capacitance) float64 {
	if !(coss > 0) {
		return 1
	}
	return min(max(1-float64(crss/coss), 0), 1)
}

// RiseBase is the part of a RiseIntegral that belongs to the device alone
// (worked out once per part, for its Miller law m); At completes it for a
// voltage. cdsShare is CdsShare at the capacitance test.
func RiseBase(m *MillerLaw, oss OssLaw, cdsShare float64) RiseTable {
	t := RiseTable{k: oss.K * cdsShare, n: oss.N, cossK: oss.K}
	if t.k > 0 {
		t.kInv = 1 / t.k
	}
	t.kN = t.k / (2 - t.n)
	if t.n > 0 {
		t.epsN = powPos(riseEps, t.n)
	}
	for s := 0; s < m.n; s++ {
		if lo := m.lo[s]; lo > 0 {
			t.plo[s] = powPos(lo, 2-t.n)
		}
	}
	for s := 0; s < m.n && t.n > 0; s++ {
		c := m.c[s]
		if !(c > 0) {
			continue
		}
		// x^N = x²/x^(2−N).
		if s+1 < m.n {
			hi := m.lo[s+1]
			hiN := hi * hi / t.plo[s+1]
			t.zero[s] = t.k / (c * hiN)
			if s == 0 {
				t.full[s] = t.k / (c * t.epsN * hiN)
			}
		}
		if lo := m.lo[s]; s > 0 {
			t.full[s] = t.k / (c * lo * lo / t.plo[s])
		}
	}
	return t
}

// riseEps bounds the part of the first segment that Energy may neglect
// without computing where its integrand turns positive: below riseEps·vk,
// which holds under riseEps² of the segment.
const riseEps = 1e-4

// At completes the table, made from Miller law m, for switched voltage v
// (one power evaluation).
func (t *RiseTable) At(m *MillerLaw, v q.Voltage) RiseIntegral {
	pv := 0.0
	if v > 0 {
		pv = powPos(float64(v), 2-t.n)
	}
	return t.AtPower(m, v, pv)
}

// AtPower is At with v^(2−N) given (OssPoint's, for the same law).
func (t *RiseTable) AtPower(m *MillerLaw, v q.Voltage, pv float64) RiseIntegral {
	r := RiseIntegral{t: t, m: m}
	r.v, r.positive = float64(v), v > 0
	if !r.positive {
		return r
	}
	r.pv = pv
	cdsTop := t.k * r.pv / (r.v * r.v) // K·v^−N
	r.cossTop = t.cossK * r.pv / (r.v * r.v)
	r.top = m.seg(r.v)
	r.cgdTop = m.c[r.top]
	r.cdsPerCgd = cdsTop / r.cgdTop
	if t.n > 0 {
		// x ≥ xs = (K/(a·c))^(1/N) ⇔ a ≥ K/(c·x^N); x^N = x²/x^(2−N).
		vN := r.v * r.v / r.pv
		r.zeroTop = t.k / (r.cgdTop * vN)
		r.fullTop = t.full[r.top]
		if r.top == 0 {
			r.fullTop = t.k / (r.cgdTop * t.epsN * vN)
		}
	}
	return r
}

// Energy returns the channel's voltage-rise energy and the current left
// when the voltage reaches v (millerRiseEnergy). With a = i/ig − 1 the
// integrand of a segment of Cgd = c is positive above xs = (K/(a·c))^(1/N)
// = xc·a^(−1/N): one power evaluation serves every segment.
func (r *RiseIntegral) Energy(i, ig q.Current) (q.Energy, q.Current) {
	return r.EnergyNear(i, ig, nil)
}

// EnergyNear is Energy with the power a^(−1/N) taken from pw when it is
// given (the thermal loop's repeated calls; PowNear to RiseTol). The
// crossing xs = xc·a^(−1/N) enters the energy at first order (through
// xs^(2−N) = xs²·a·c/K, exact only at the exact crossing), so the energy
// keeps about the same relative error, 10⁻¹².
func (r *RiseIntegral) EnergyNear(i, ig q.Current, pw *PowNear) (q.Energy, q.Current) {
	e, iTop, _ := r.EnergyCharge(i, ig, pw)
	return e, iTop
}

// EnergyCharge is EnergyNear that also returns the Miller charge moved
// while the channel still carries current, where a·Cgd(x) > Cds(x): there
// the gate sits on its plateau. Where the drain's capacitance takes the
// whole current the channel is off and the gate, no longer held, falls
// towards the driver's off level while its Miller charge moves (the
// per-edge gate booking of a capacitive turn-off).
func (r *RiseIntegral) EnergyCharge(i, ig q.Current, pw *PowNear) (q.Energy, q.Current, q.Charge) {
	if ig <= 0 || i <= 0 || !r.positive {
		return 0, max(i, 0), 0
	}
	t, m := r.t, r.m
	iTop := math.Max(float64(i)-float64(ig)*(1+r.cdsPerCgd), 0)
	a := float64(i)/float64(ig) - 1
	if a <= 0 {
		return 0, q.Current(iTop), 0
	}
	s := math.NaN() // a^(−1/N), computed once when a segment needs it
	e, qp := 0.0, 0.0
	for k := 0; k <= r.top; k++ {
		zero, full := t.zero[k], t.full[k]
		lo, hi, plo, phi := m.lo[k], 0.0, t.plo[k], 0.0
		if k == r.top {
			zero, full, hi, phi = r.zeroTop, r.fullTop, r.v, r.pv
		} else {
			hi, phi = m.lo[k+1], t.plo[k+1]
		}
		// xs: 0 (positive throughout), +Inf (nowhere), or xc·a^(−1/N)
		// when a lies between the segment's bounds.
		xs := 0.0
		switch {
		case t.n == 0:
		case a <= zero:
			continue
		case a >= full:
		default:
			if s != s {
				if t.n == 0.5 {
					s = 1 / (a * a) // the √ law: a^−2
				} else if pw != nil && pw.s != nil {
					s = pw.at(a)
				} else {
					s = powPos(a, -1/t.n)
				}
			}
			xs = r.crossing(k) * s
		}
		e += r.seg(a*m.c[k], xs, lo, hi, plo, phi)
		if t.n > 0 || a*m.c[k] > t.k {
			qp += m.c[k] * (hi - min(max(xs, lo), hi))
		}
	}
	return q.Energy(e), q.Current(iTop), q.Charge(qp)
}

// crossing is segment k's crossing for a = 1, xc = (K/c)^(1/N) (0 for
// c ≤ 0), worked out once per integral.
func (r *RiseIntegral) crossing(k int) float64 {
	if r.xcHave&(1<<k) == 0 {
		r.xcHave |= 1 << k
		if c := r.m.c[k]; c > 0 && r.t.n > 0 {
			r.xc[k] = powPos(r.t.k/c, 1/r.t.n)
		}
	}
	return r.xc[k]
}

// seg integrates x·(ac − K·x^−N) over [lo, hi] where it is positive, that
// is above xs; plo and phi are lo^(2−N) and hi^(2−N).
func (r *RiseIntegral) seg(ac, xs, lo, hi, plo, phi float64) float64 {
	if hi <= lo || ac <= 0 {
		return 0
	}
	t := r.t
	if t.n == 0 {
		if ac <= t.k {
			return 0
		}
		return (ac - t.k) * (hi*hi - lo*lo) / 2
	}
	if xs > lo {
		if xs >= hi {
			return 0
		}
		// xs^(2−N) = xs²/xs^N = xs²·ac/K.
		lo, plo = xs, xs*xs*ac*t.kInv
	}
	return ac*(hi*hi-lo*lo)/2 - t.kN*(phi-plo)
}

// RiseSeries prepares the power series of the turn-off integral's
// a^(−1/N) for the output-capacitance law oss (N > 0), at the integral's
// tolerance RiseTol.
func RiseSeries(oss OssLaw) PowSeries { return NewPowSeries(-1/oss.N, RiseTol) }

// AtPoint is At(p.V) with the output-capacitance power already computed
// for p (the evaluation computes one OssPoint per device and voltage).
func (t *RiseTable) AtPoint(m *MillerLaw, p OssPoint) RiseIntegral { return t.AtPower(m, p.V, p.pv) }

// CossTop is the small-signal output capacitance at the integral's
// voltage, F.
func (r *RiseIntegral) CossTop() q.Capacitance { return q.Capacitance(r.cossTop) }
