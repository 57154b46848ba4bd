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

// MillerLaw is the gate-drain capacitance along the voltage transition as
// two constants with a knee: Clo below the knee voltage Vk (the drift region
// not yet depleted, Cgd large) and Chi above it (Crss as the datasheet
// states it at its test voltage). Clo is chosen so that the charge from 0 to
// the gate-charge test voltage equals the datasheet Qgd.
//
// Source: the shape of Cgd(v) of a power MOSFET, large below Vds ≈ Vgs − Vth
// and small above (Baliga 2008, ch. 6); the use of Cgd(v) along the
// transition instead of one lumped Qgd follows Ren, Xu, Zhou, Lee,
// "Analytical loss model of power MOSFET", IEEE Trans. Power Electronics,
// 2006 (from memory). The two-constant construction from datasheet numbers
// is swrank's own, checked against ngspice (docs/spice-crosscheck.md).
type MillerLaw struct {
	Vk       q.Voltage     // knee voltage, V; > 0
	Clo, Chi q.Capacitance // below and above the knee, F; Clo ≥ Chi > 0
}

// FitMillerLaw builds the law from Qgd at vqg, Crss and the plateau vpl
// (the knee is at the plateau, or at vqg if lower).
func FitMillerLaw(qgd q.Charge, vqg q.Voltage, crss q.Capacitance, vpl q.Voltage) MillerLaw {
	vk := min(vpl, vqg)
	if vk <= 0 {
		vk = vqg
	}
	clo := (float64(qgd) - float64(crss)*math.Max(0, float64(vqg-vk))) / float64(vk)
	return MillerLaw{Vk: vk, Clo: q.Capacitance(math.Max(clo, float64(crss))), Chi: crss}
}

// Charge is ∫₀^v Cgd dx, the Miller charge of a transition of v.
func (m MillerLaw) Charge(v q.Voltage) q.Charge {
	if v <= m.Vk {
		return q.Charge(float64(m.Clo) * float64(max(v, 0)))
	}
	return q.Charge(float64(m.Clo)*float64(m.Vk) + float64(m.Chi)*float64(v-m.Vk))
}

// moment is ∫₀^v x·Cgd(x) dx, J/V·V = C·V.
func (m MillerLaw) moment(v q.Voltage) float64 {
	if v <= m.Vk {
		return float64(m.Clo) * float64(v) * float64(v) / 2
	}
	return float64(m.Clo)*float64(m.Vk)*float64(m.Vk)/2 + float64(m.Chi)*(float64(v)*float64(v)-float64(m.Vk)*float64(m.Vk))/2
}

// MillerFallEnergy is the V·I overlap energy of a hard turn-on's voltage
// fall when the gate current ig moves the drain through Cgd(v): the time to
// move by dv is Cgd(v)·dv/ig, so E = (i/ig)·∫₀^V v·Cgd(v) dv.
//
// Source: Ren et al., IEEE TPEL 2006 (from memory); derived from the
// gate-charge method (Balogh 2001) with a voltage-dependent Cgd.
func MillerFallEnergy(m MillerLaw, v q.Voltage, i, ig q.Current) q.Energy {
	if ig <= 0 || i <= 0 {
		return 0
	}
	return q.Energy(float64(i) / float64(ig) * m.moment(v))
}

// millerRiseEnergy is the turn-off voltage-rise energy when the load current
// i also charges the output capacitance: while the gate current ig sets the
// rate dv/dt = ig/Cgd(v), the capacitances take Coss(v)·dv/dt of the load
// current and the channel carries the rest, i − ig·Coss(v)/Cgd(v) (not less
// than 0). The channel loss is ∫ v·i_ch dt = ∫₀^V v·max(0, (i/ig)·Cgd(v) −
// Coss(v)) dv, in closed form for the power-law Coss. iTop is the channel
// current left when the voltage reaches V, which the current-fall interval
// then turns off. At light load the channel is off before the drain moves
// and the turn-off is nearly lossless.
//
// Source: Ren et al., IEEE TPEL 2006 (from memory: Coss charging shortens
// the channel's current overlap); the closed form is derived here for
// C_oss = K·v^(−N) and a two-constant Cgd, and checked against ngspice
// (docs/spice-crosscheck.md).
func millerRiseEnergy(m MillerLaw, oss OssLaw, v q.Voltage, i, ig q.Current) (q.Energy, q.Current) {
	r := newRiseIntegral(m, oss, v)
	return r.Energy(i, ig)
}

// RiseIntegral is millerRiseEnergy with the parts that do not depend on the
// currents worked out once (the thermal loop changes only the gate
// current).
type RiseIntegral struct {
	m       MillerLaw
	k, n    float64    // output-capacitance law
	v, vk   float64    // switched voltage and min(knee, v), V
	pvk, pv float64    // vk^(2−N) and v^(2−N)
	xc      [2]float64 // (K/Clo)^(1/N), (K/Chi)^(1/N): the crossing for a = 1
	epsN    float64    // riseEps^N
	// Bounds on a = i/ig that decide a segment without a power evaluation:
	// at or below zero[k] the segment's integrand is nowhere positive; at or
	// above full[k] it is positive on the whole segment (for the first
	// segment, from riseEps·vk on: the part below adds under riseEps²
	// relative).
	zero, full [2]float64
	cossTop    float64 // Coss(v), F
	cgdTop     float64 // Cgd at v, F
	cossPerCgd float64 // cossTop/cgdTop
	kInv, kN   float64 // 1/K and K/(2 − N), for the segments without dividing
	positive   bool    // v > 0
}

// newRiseIntegral prepares millerRiseEnergy for law m, output capacitance
// oss and switched voltage v.
func newRiseIntegral(m MillerLaw, oss OssLaw, v q.Voltage) RiseIntegral {
	b := RiseBase(m, oss)
	return b.At(v)
}

// RiseBase is the part of a RiseIntegral that belongs to the device alone
// (worked out once per part); At completes it for a voltage.
func RiseBase(m MillerLaw, oss OssLaw) RiseIntegral {
	r := RiseIntegral{m: m, k: oss.K, n: oss.N, vk: float64(m.Vk)}
	if r.k > 0 {
		r.kInv = 1 / r.k
	}
	r.kN = r.k / (2 - r.n)
	if m.Vk > 0 {
		r.pvk = math.Pow(r.vk, 2-r.n)
	}
	if r.n > 0 {
		r.xc = [2]float64{math.Pow(r.k/float64(m.Clo), 1/r.n), math.Pow(r.k/float64(m.Chi), 1/r.n)}
		r.epsN = math.Pow(riseEps, r.n)
	}
	return r
}

// riseEps bounds the part of the first segment that Energy may neglect
// without computing where its integrand turns positive: below riseEps·vk,
// which holds under riseEps² of the segment.
const riseEps = 1e-4

// At completes a RiseBase for switched voltage v (one power evaluation).
func (b *RiseIntegral) At(v q.Voltage) RiseIntegral {
	pv := 0.0
	if v > 0 {
		pv = powPos(float64(v), 2-b.n)
	}
	return b.AtPower(v, pv)
}

// AtPower is At with v^(2−N) given (OssPoint's, for the same law).
func (b *RiseIntegral) AtPower(v q.Voltage, pv float64) RiseIntegral {
	r := *b
	r.v, r.positive = float64(v), v > 0
	if !r.positive {
		return r
	}
	r.pv = pv
	r.cossTop = r.k * r.pv / (r.v * r.v) // K·v^−N
	r.cgdTop = float64(r.m.Chi)
	if v <= r.m.Vk {
		r.vk, r.pvk = r.v, r.pv
		r.cgdTop = float64(r.m.Clo)
	}
	r.cossPerCgd = r.cossTop / r.cgdTop
	if r.n > 0 && r.vk > 0 {
		// x ≥ xs = (K/(a·c))^(1/N) ⇔ a ≥ K/(c·x^N); x^N = x²/x^(2−N).
		vkN, vN := r.vk*r.vk/r.pvk, r.v*r.v/r.pv
		clo, chi := float64(r.m.Clo), float64(r.m.Chi)
		r.zero = [2]float64{r.k / (clo * vkN), r.k / (chi * vN)}
		r.full = [2]float64{r.k / (clo * r.epsN * vkN), r.k / (chi * vkN)}
	}
	return r
}

// Energy returns the channel's voltage-rise energy and the current left
// when the voltage reaches v (millerRiseEnergy). With a = i/ig the
// integrand of a segment of Cgd = c is positive above xs = (K/(a·c))^(1/N)
// = xc·a^(−1/N): one power evaluation serves both segments.
func (r *RiseIntegral) Energy(i, ig q.Current) (q.Energy, q.Current) {
	return r.EnergyNear(i, ig, nil)
}

// energy is Energy with the power a^(−1/N) taken from pw when it is given
// (the thermal loop's repeated calls; PowNear to RiseTol). The crossing
// xs = xc·a^(−1/N) enters the energy at first order (through
// xs^(2−N) = xs²·a·c/K, exact only at the exact crossing), so the energy
// keeps about the same relative error, 10⁻¹².
func (r *RiseIntegral) EnergyNear(i, ig q.Current, pw *PowNear) (q.Energy, q.Current) {
	if ig <= 0 || i <= 0 || !r.positive {
		return 0, max(i, 0)
	}
	a := float64(i) / float64(ig)
	// xs per segment: 0 (positive throughout), +Inf (nowhere), or
	// xc·a^(−1/N) when a lies between the segment's bounds.
	var xs [2]float64
	s := math.NaN()
	for k := range xs {
		switch {
		case r.n == 0:
		case a <= r.zero[k]:
			xs[k] = math.Inf(1)
		case a >= r.full[k]:
		default:
			if s != s { // one power evaluation serves both segments
				if r.n == 0.5 {
					s = 1 / (a * a) // the √ law: a^−2
				} else if pw != nil && pw.s != nil {
					s = pw.at(a)
				} else {
					s = powPos(a, -1/r.n)
				}
			}
			xs[k] = r.xc[k] * s
		}
	}
	e := r.seg(a*float64(r.m.Clo), xs[0], 0, r.vk, 0, r.pvk) +
		r.seg(a*float64(r.m.Chi), xs[1], r.vk, r.v, r.pvk, r.pv)
	iTop := float64(i) - float64(ig)*r.cossPerCgd
	return q.Energy(e), q.Current(math.Max(iTop, 0))
}

// seg integrates x·(ac − K·x^−N) over [lo, hi] where it is positive, that
// is above xs; plo and phi are lo^(2−N) and hi^(2−N).
func (r *RiseIntegral) seg(ac, xs, lo, hi, plo, phi float64) float64 {
	if hi <= lo || ac <= 0 {
		return 0
	}
	if r.n == 0 {
		if ac <= r.k {
			return 0
		}
		return (ac - r.k) * (hi*hi - lo*lo) / 2
	}
	if xs > lo {
		if xs >= hi {
			return 0
		}
		// xs^(2−N) = xs²/xs^N = xs²·ac/K.
		lo, plo = xs, xs*xs*ac*r.kInv
	}
	return ac*(hi*hi-lo*lo)/2 - r.kN*(phi-plo)
}

// RiseSeries prepares the power series of the turn-off integral's
// a^(−1/N) for the output-capacitance law oss (N > 0), at the integral's
// tolerance RiseTol.
func RiseSeries(oss OssLaw) PowSeries { return NewPowSeries(-1/oss.N, RiseTol) }

// AtPoint is At(p.V) with the output-capacitance power already computed
// for p (the evaluation computes one OssPoint per device and voltage).
func (b *RiseIntegral) AtPoint(p OssPoint) RiseIntegral { return b.AtPower(p.V, p.pv) }

// CossTop is the small-signal output capacitance at the integral's
// voltage, F.
func (r *RiseIntegral) CossTop() q.Capacitance { return q.Capacitance(r.cossTop) }
