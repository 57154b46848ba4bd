package rank

import (
	"math"

	q "swrank/devices/quantity"
)

// This file holds the loss models as pure functions of typed inputs. Each
// doc comment names the published source; docs/models.md explains the
// equations, their assumptions and where they fail.

// powPos is x^y for x > 0 as exp(y·ln x): the hot path's powers, without
// math.Pow's handling of special cases it never meets (relative error a few
// ulp times |y·ln x|).
func powPos(x, y float64) float64 { return math.Exp(y * math.Log(x)) }

// riseXsTol is the relative error allowed in the turn-off integral's
// crossing (RiseIntegral.energy).
const riseXsTol = 1e-12

// powNear evaluates x^p for a fixed p and x > 0 that moves little between
// calls (the thermal loop's iterates): near the last exactly computed point
// x0 it sums the binomial series y0·(1 + u)^p, u = x/x0 − 1, to the
// u^powNearOrder term (Horner: a multiply-add a term, cheaper than the
// logarithm and exponential of powPos; only to the u⁴ term where the u⁵
// term is below tol), and it computes powPos again (and
// takes the new point as x0) when |u| exceeds the radius at which the first
// neglected term, |C(p, order + 1)|·|u|^(order+1), reaches tol, or 0.2.
// Binomial theorem: the ratio of successive terms, (|p| + k)·|u|/(k + 1),
// falls with k towards |u| ≤ 0.2 (for |p| > 1, as here), so the remainder is
// of the order of the first neglected term. s must be set (newPowSeries);
// the first call computes exactly.
type powNear struct {
	s         *powSeries
	x0inv, y0 float64 // 1/x0 and x0^p (x0inv = 0: no point yet)
}

// powSeries is powNear's fixed part, prepared once for p.
type powSeries struct {
	c         [powNearOrder]float64 // C(p, 1) … C(p, order)
	p, radius float64               // radius: the largest |u| served by the series
	short     float64               // the largest |u| served by its first four terms
}

const powNearOrder = 14

func newPowSeries(p, tol float64) powSeries {
	m := powSeries{p: p}
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

func (m *powNear) at(x float64) float64 {
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

// kelvin converts a Celsius temperature to kelvin.
func kelvin(t q.Temperature) float64 { return float64(t) + 273.15 }

// TempFactor is the ratio R(T)/R(T0) of a power law in absolute temperature,
// R(T) = R(T0)·(T/T0)^α (T in kelvin).
//
// Source: Baliga, Fundamentals of Power Semiconductor Devices, 2008 (mobility
// falls as T^-2.0…2.5 in drift-dominated silicon); the exponent of a given
// part is fitted through its hot datasheet point when one is given.
func TempFactor(t, t0 q.Temperature, alpha float64) float64 {
	return powPos(kelvin(t)/kelvin(t0), alpha)
}

// FitTempExponent returns α of the power law R(T) = R(T0)·(T/T0)^α through
// two datasheet points (r0 at t0, r1 at t1, t1 ≠ t0).
func FitTempExponent(r0 q.Resistance, t0 q.Temperature, r1 q.Resistance, t1 q.Temperature) float64 {
	return math.Log(float64(r1/r0)) / math.Log(kelvin(t1)/kelvin(t0))
}

// GateLaw is the gate-voltage dependence of the on-resistance,
// R(Vgs) = R0 + K/(Vgs − Vth): a fixed part (drift, substrate, package) plus
// a channel part inversely proportional to the gate overdrive.
//
// Source: the channel resistance of a MOSFET in its linear region is
// L/(W·µ·Cox·(Vgs − Vth)) (Sze & Ng, Physics of Semiconductor Devices, 3rd
// ed., 2007, ch. 6; Baliga 2008, ch. 6); R0 and K are fitted through the
// datasheet's two gate-voltage points.
type GateLaw struct {
	R0  q.Resistance // fixed part, Ω; ≥ 0
	K   float64      // channel part, Ω·V; ≥ 0
	Vth q.Voltage    // threshold of the law, V
}

// At returns R(Vgs); the caller ensures Vgs > Vth.
func (g GateLaw) At(vgs q.Voltage) q.Resistance {
	return g.R0 + q.Resistance(g.K/float64(vgs-g.Vth))
}

// FitGateLaw fits R0 + K/(Vgs − Vth) through (v1, r1) and (v2, r2), v1 ≠ v2.
// A fit that would make R0 negative (a curve steeper than the law) is
// replaced by a pure channel law through the higher-voltage point, and ok is
// false.
func FitGateLaw(v1 q.Voltage, r1 q.Resistance, v2 q.Voltage, r2 q.Resistance, vth q.Voltage) (g GateLaw, ok bool) {
	x1 := 1 / float64(v1-vth)
	x2 := 1 / float64(v2-vth)
	k := float64(r1-r2) / (x1 - x2)
	r0 := float64(r1) - k*x1
	if r0 < 0 || k < 0 {
		if v1 > v2 {
			v2, r2 = v1, r1
		}
		return GateLaw{R0: 0, K: float64(r2) * float64(v2-vth), Vth: vth}, false
	}
	return GateLaw{R0: q.Resistance(r0), K: k, Vth: vth}, true
}

// SinglePointGateLaw is the fallback when the datasheet gives one
// gate-voltage point: half of r1 is taken as channel resistance (common
// practice for low-voltage trench parts, from memory: 30-60 % at the rated
// drive).
func SinglePointGateLaw(v1 q.Voltage, r1 q.Resistance, vth q.Voltage) GateLaw {
	return GateLaw{R0: r1 / 2, K: float64(r1) / 2 * float64(v1-vth), Vth: vth}
}

// Conduction is the conduction loss I_rms²·R.
//
// Source: Erickson & Maksimović, Fundamentals of Power Electronics, 2nd ed.,
// 2001, ch. 4 (a MOSFET conducts as a resistance).
func Conduction(irms q.Current, r q.Resistance) q.Power {
	return q.Power(float64(irms) * float64(irms) * float64(r))
}

// PlateauAt moves the Miller plateau to another drain current with the
// square-law channel, Vpl(I) = Vth + (Vpl,spec − Vth)·√(I/I_spec).
//
// Source: saturation current of a long-channel MOSFET I = k·(Vgs − Vth)²
// (Sze & Ng 2007, ch. 6). Short-channel parts are closer to linear; the
// square law is the common-practice choice.
func PlateauAt(vth, vplSpec q.Voltage, iSpec, i q.Current) q.Voltage {
	if iSpec <= 0 || i <= 0 {
		if i <= 0 {
			return vth
		}
		return vplSpec
	}
	return vth + (vplSpec-vth)*q.Voltage(math.Sqrt(float64(i/iSpec)))
}

// MillerChargeAt moves the gate-drain charge to another drain voltage,
// Qgd(V) = Qgd,spec·√(V/V_spec): the charge a √-law Cgd(v) takes from 0 to V.
//
// Source: heuristic (team notes, unverified against a published source);
// Cgd of a MOSFET falls roughly as 1/√v above the depletion onset (Baliga
// 2008, ch. 6).
func MillerChargeAt(qgdSpec q.Charge, vSpec, v q.Voltage) q.Charge {
	if vSpec <= 0 || v <= 0 {
		return 0
	}
	return qgdSpec * q.Charge(math.Sqrt(float64(v/vSpec)))
}

// GateCurve is a piecewise-linear gate-charge curve Vgs(Qg) at one drain
// voltage and one drain current, in the form datasheets draw it: a rise to
// the threshold, a rise to the plateau, the plateau (Miller charge), and a
// final near-linear rise.
//
// Source: Balogh, "Fundamentals of MOSFET and IGBT Gate Driver Circuits",
// 2001; IEC 60747-8:2010 gate-charge definitions (Q_GS(th), Q_GS(pl), Q_GD).
type GateCurve struct {
	Qth   q.Charge      // charge from 0 V to the threshold, C
	Qgs2  q.Charge      // charge from the threshold to the plateau, C
	Qgd   q.Charge      // plateau (Miller) charge at the working drain voltage, C
	Vth   q.Voltage     // threshold, V
	Vpl   q.Voltage     // plateau at the working current, V
	Slope q.Capacitance // dQ/dV above the plateau, F
}

// Charge returns Qg at gate voltage v (negative v continues the first
// segment's slope).
func (c GateCurve) Charge(v q.Voltage) q.Charge {
	c1 := float64(c.Qth) / float64(c.Vth)
	switch {
	case v <= c.Vth:
		return q.Charge(c1 * float64(v))
	case v <= c.Vpl:
		return c.Qth + c.Qgs2*q.Charge((v-c.Vth)/(c.Vpl-c.Vth))
	}
	return c.Qth + c.Qgs2 + c.Qgd + q.Charge(float64(c.Slope)*float64(v-c.Vpl))
}

// StoredEnergy returns ∫(v − vOff)·dQ from vOff to vOn along the curve: the
// energy held in the gate (relative to the off rail) at the end of turn-on,
// which the turn-off edge dissipates. For a linear gate it is ½·Q·ΔV.
//
// Source: Balogh 2001 (energy bookkeeping of the gate drive); the integral
// is taken exactly over the piecewise-linear curve.
func (c GateCurve) StoredEnergy(vOff, vOn q.Voltage) q.Energy {
	return c.storedEnergy(vOff, vOn, c.Charge(vOff), c.Charge(vOn))
}

// storedEnergy is StoredEnergy with the charges at the two ends given.
func (c GateCurve) storedEnergy(vOff, vOn q.Voltage, qOff, qOn q.Charge) q.Energy {
	// Breakpoints of the curve in voltage, in order; the plateau is a jump
	// in charge at Vpl. Each piece adds its charge times its mean voltage
	// above vOff.
	var e float64
	pv, pq := vOff, qOff
	to := func(v q.Voltage, qq q.Charge) {
		e += float64(qq-pq) * (float64(v+pv)/2 - float64(vOff))
		pv, pq = v, qq
	}
	if vOff < 0 && vOn > 0 {
		to(0, 0)
	}
	if vOff < c.Vth && vOn > c.Vth {
		to(c.Vth, c.Qth)
	}
	if vOff < c.Vpl && vOn > c.Vpl {
		to(c.Vpl, c.Qth+c.Qgs2)
		to(c.Vpl, c.Qth+c.Qgs2+c.Qgd)
	}
	to(vOn, qOn)
	return q.Energy(e)
}

// GateEnergy is the energy drawn from the drive supply per cycle,
// [Qg(Von) − Qg(Voff)]·(Von − Voff), for the nonlinear gate.
//
// Source: Balogh 2001; Erickson & Maksimović 2001, ch. 4 (P_G = Qg·V·f).
func GateEnergy(c GateCurve, vOff, vOn q.Voltage) q.Energy {
	return q.Energy(float64(c.Charge(vOn)-c.Charge(vOff)) * float64(vOn-vOff))
}

// GateSplit is the gate-drive energy per cycle divided among the three
// resistances it flows through.
type GateSplit struct {
	Driver, Rext, Rint q.Energy // J per cycle
}

// SplitGateEnergy divides the gate-drive energy per cycle among the driver's
// output resistance, the external and the internal gate resistance. The
// turn-on edge dissipates total − stored, the turn-off edge the stored
// energy; each edge is shared in proportion to the resistances of its loop
// (rOnDrv for turn-on, rOffDrv for turn-off). With stored = total/2 this is
// the half-per-edge rule, exact for a linear gate.
//
// Source: Balogh 2001 (only the Rg,int share heats the transistor).
func SplitGateEnergy(total, stored q.Energy, rOnDrv, rOffDrv, rExt, rInt q.Resistance) GateSplit {
	eOn := float64(total - stored)
	eOff := float64(stored)
	ron := float64(rOnDrv + rExt + rInt)
	roff := float64(rOffDrv + rExt + rInt)
	var s GateSplit
	if ron > 0 {
		s.Driver += q.Energy(eOn * float64(rOnDrv) / ron)
		s.Rext += q.Energy(eOn * float64(rExt) / ron)
		s.Rint += q.Energy(eOn * float64(rInt) / ron)
	} else {
		s.Driver += q.Energy(eOn)
	}
	if roff > 0 {
		s.Driver += q.Energy(eOff * float64(rOffDrv) / roff)
		s.Rext += q.Energy(eOff * float64(rExt) / roff)
		s.Rint += q.Energy(eOff * float64(rInt) / roff)
	} else {
		s.Driver += q.Energy(eOff)
	}
	return s
}

// GateCurrent is the current a driver pushes into the gate from drive
// voltage vDrv while the gate sits at vGate, through loop resistance r, and
// limited to iPeak when iPeak > 0.
func GateCurrent(vDrv, vGate q.Voltage, r q.Resistance, iPeak q.Current) q.Current {
	dv := float64(vDrv - vGate)
	if dv < 0 {
		dv = -dv
	}
	var i float64
	if r > 0 {
		i = dv / float64(r)
	} else {
		i = math.Inf(1)
	}
	if iPeak > 0 && i > float64(iPeak) {
		i = float64(iPeak)
	}
	return q.Current(i)
}

// Transitions are the four intervals of a hard-switched, clamped-inductive
// commutation: current rise and voltage fall at turn-on, voltage rise and
// current fall at turn-off.
type Transitions struct {
	Tir, Tvf, Tvr, Tif q.Time
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

// OssLaw is the output capacitance as a power law of the drain voltage,
// C(v) = K·v^(−N), 0 ≤ N < 1: N = ½ is the abrupt-junction (√) law, N = 0 a
// linear capacitor.
//
// Source: Erickson & Maksimović 2001, ch. 4 (√ law and its Q_oss, E_oss);
// the exponent is fitted to the datasheet's own E_oss/(Q_oss·V) when both are
// given. Q_oss and E_oss as defined in IEC 60747-8:2010.
type OssLaw struct {
	K float64 // F·V^N
	N float64 // exponent, [0, 0.95]
}

// Q returns the output charge ∫₀^v C dv = K·v^(1−N)/(1−N) (0 for v ≤ 0).
func (l OssLaw) Q(v q.Voltage) q.Charge { return l.At(v).Q() }

// E returns the stored energy ∫₀^v v·C dv = K·v^(2−N)/(2−N) (0 for v ≤ 0).
func (l OssLaw) E(v q.Voltage) q.Energy { return l.At(v).E() }

// C returns the small-signal capacitance K·v^−N at v (at 1 mV for v ≤ 0).
func (l OssLaw) C(v q.Voltage) q.Capacitance { return l.At(v).C() }

// OssPoint is an output-capacitance law at one voltage: C, Q and E all
// follow from the one power v^(2−N) (the law's formulas rewritten:
// K·v^−N = K·v^(2−N)/v², K·v^(1−N) = K·v^(2−N)/v).
type OssPoint struct {
	L  OssLaw
	V  q.Voltage
	pv float64 // V^(2−N) (0 for V ≤ 0)
}

// At evaluates the law at v.
func (l OssLaw) At(v q.Voltage) OssPoint {
	p := OssPoint{L: l, V: v}
	if v > 0 {
		p.pv = powPos(float64(v), 2-l.N)
	}
	return p
}

// C is the small-signal capacitance (OssLaw.C).
func (p OssPoint) C() q.Capacitance {
	if p.V <= 0 {
		return p.L.At(1e-3).C()
	}
	return q.Capacitance(p.L.K * p.pv / (float64(p.V) * float64(p.V)))
}

// Q is the output charge (OssLaw.Q).
func (p OssPoint) Q() q.Charge {
	if p.V <= 0 {
		return 0
	}
	return q.Charge(p.L.K * p.pv / float64(p.V) / (1 - p.L.N))
}

// E is the stored energy (OssLaw.E).
func (p OssPoint) E() q.Energy {
	return q.Energy(p.L.K * p.pv / (2 - p.L.N))
}

// OssFromCapacitance is the √ law through one small-signal datasheet point.
func OssFromCapacitance(c q.Capacitance, v q.Voltage) OssLaw {
	return OssLaw{K: float64(c) * math.Sqrt(float64(v)), N: 0.5}
}

// OssFromCharge is the √ law through a datasheet Q_oss at v.
func OssFromCharge(qoss q.Charge, v q.Voltage) OssLaw {
	return OssLaw{K: float64(qoss) * 0.5 / math.Sqrt(float64(v)), N: 0.5}
}

// OssFromChargeEnergy fits the power law to Q_oss and E_oss at v: for
// C = K·v^(−N), E/(Q·V) = (1−N)/(2−N).
func OssFromChargeEnergy(qoss q.Charge, eoss q.Energy, v q.Voltage) OssLaw {
	r := float64(eoss) / (float64(qoss) * float64(v))
	n := (1 - 2*r) / (1 - r)
	if n < 0 {
		n = 0
	}
	if n > 0.95 {
		n = 0.95
	}
	return OssLaw{K: float64(qoss) * (1 - n) / math.Pow(float64(v), 1-n), N: n}
}

// HardTurnOnCossEnergy is the output-capacitance energy dissipated in switch
// S when it turns on hard against voltage v while the complementary device K
// blocks: S's own stored energy plus the energy drawn from the supply to
// charge K, less what K stores, E_oss,S(v) + v·Q_oss,K(v) − E_oss,K(v). For
// identical devices this is v·Q_oss(v), not ½·C·v².
//
// Source: energy bookkeeping of a half-bridge commutation (team derivation,
// consistent with Erickson & Maksimović 2001, ch. 4, on capacitive switching
// loss); Q_oss and E_oss per IEC 60747-8:2010.
func HardTurnOnCossEnergy(eS q.Energy, v q.Voltage, qK q.Charge, eK q.Energy) q.Energy {
	return eS + q.Energy(float64(v)*float64(qK)) - eK
}

// DeadTimeEnergy is the body-diode (reverse) conduction energy per cycle in
// the dead times: Vsd·(I1·t1 + I2·t2).
//
// Source: Erickson & Maksimović 2001, ch. 4; Graovac et al. 2006.
func DeadTimeEnergy(vsd1 q.Voltage, i1 q.Current, t1 q.Time, vsd2 q.Voltage, i2 q.Current, t2 q.Time) q.Energy {
	return q.Energy(float64(vsd1)*float64(i1)*float64(t1) + float64(vsd2)*float64(i2)*float64(t2))
}

// RecoveryEnergy is the reverse-recovery energy per cycle that lands in the
// hard-switching transistor: Qrr·V.
//
// Source: Graovac et al. 2006; Erickson & Maksimović 2001, ch. 4 (the
// recovered charge flows through the turning-on switch at full voltage).
func RecoveryEnergy(qrr q.Charge, v q.Voltage) q.Energy {
	return q.Energy(float64(qrr) * float64(v))
}

// CurrentRatingAt derates a continuous drain-current rating given at 25 °C
// case to case temperature tc: I(tc) = I25·√((Tj,max − tc)/(Tj,max − 25)),
// the shape of the datasheet derating curve, which follows from
// I = √((Tj,max − Tc)/(Rth,jc·R(Tj,max))).
//
// Source: common practice (how datasheet continuous-current ratings are
// computed); IEC 60747-8:2010 rating definitions.
func CurrentRatingAt(i25 q.Current, tjMax, tc q.Temperature) q.Current {
	if tc <= 25 {
		return i25
	}
	if tc >= tjMax {
		return 0
	}
	return i25 * q.Current(math.Sqrt(float64(tjMax-tc)/float64(tjMax-25)))
}

// TempLaw is the on-resistance temperature dependence of a part relative to
// its datasheet reference temperature T0: either a power law in absolute
// temperature or a normalised curve through a few points (linear between
// points and beyond the ends).
type TempLaw struct {
	T0    q.Temperature // reference temperature, °C (the datasheet's rds_on_tj)
	Alpha float64       // power-law exponent, used when NPts == 0
	// Pts are (temperature, R/R(T0)) points of a normalised curve, strictly
	// increasing in temperature; the first NPts are used.
	Pts  [8][2]float64
	NPts int
	c0   float64 // the curve at T0 (set by prepare; 0: work it out)
	// piece[i] is the curve between Pts[i-1] and Pts[i] over its value at
	// T0: the value at Pts[i-1] and the slope, 1/K (set by prepare, with
	// c0; the thermal loop reads it without dividing).
	piece [8][2]float64
}

// prepare fixes c0 and the normalised pieces of a curve law.
func (l *TempLaw) prepare() {
	if l.NPts < 2 {
		return
	}
	l.c0 = l.curve(float64(l.T0))
	for i := 1; i < l.NPts; i++ {
		a, b := l.Pts[i-1], l.Pts[i]
		l.piece[i] = [2]float64{a[1] / l.c0, (b[1] - a[1]) / (b[0] - a[0]) / l.c0}
	}
}

// at is the normalised curve and its slope at t (a prepared curve law).
func (l *TempLaw) at(t float64) (float64, float64) {
	p := l.Pts[:l.NPts]
	i := 1
	for i < len(p)-1 && t > p[i][0] {
		i++
	}
	c := &l.piece[i]
	return c[0] + c[1]*(t-p[i-1][0]), c[1]
}

// Factor returns R(T)/R(T0).
func (l *TempLaw) Factor(t q.Temperature) float64 {
	if l.NPts < 2 {
		return TempFactor(t, l.T0, l.Alpha)
	}
	if l.c0 != 0 {
		f, _ := l.at(float64(t))
		return f
	}
	return l.curve(float64(t)) / l.curve(float64(l.T0))
}

// FactorD returns R(T)/R(T0) and its first and second derivatives with
// temperature, 1/K and 1/K² (the second is 0 on a curve's straight pieces).
func (l *TempLaw) FactorD(t q.Temperature) (f, df, d2f float64) {
	if l.NPts < 2 {
		f := TempFactor(t, l.T0, l.Alpha)
		tk := kelvin(t)
		return f, l.Alpha * f / tk, l.Alpha * (l.Alpha - 1) * f / (tk * tk)
	}
	if l.c0 != 0 {
		f, df := l.at(float64(t))
		return f, df, 0
	}
	c0 := l.curve(float64(l.T0))
	p := l.Pts[:l.NPts]
	x := float64(t)
	i := 1
	for i < len(p)-1 && x > p[i][0] {
		i++
	}
	a, b := p[i-1], p[i]
	slope := (b[1] - a[1]) / (b[0] - a[0])
	return (a[1] + slope*(x-a[0])) / c0, slope / c0, 0
}

func (l *TempLaw) curve(t float64) float64 {
	p := l.Pts[:l.NPts]
	i := 1
	for i < len(p)-1 && t > p[i][0] {
		i++
	}
	a, b := p[i-1], p[i]
	return a[1] + (b[1]-a[1])*(t-a[0])/(b[0]-a[0])
}

// Second-order effects (docs/second-order.md): parasitic inductance, the
// dv/dt-induced gate bounce of the off switch, and temperature laws beyond
// the on-resistance.

// CurrentTransitionTime is the length of the current-rise interval of a
// hard turn-on, or of the current-fall interval of a hard turn-off, with
// common-source inductance lcs in the gate loop. While the drain current
// moves by i at di/dt = i/t, the source inductance takes lcs·di/dt out of the
// gate loop, so the gate current is (head − lcs·i/t)/r, where head is the
// drive headroom at the mean gate voltage of the interval (Vdrv − (Vth+Vpl)/2
// at turn-on, (Vth+Vpl)/2 − Voff at turn-off). Setting t = qgs2/i_gate and
// solving for t gives the closed form
//
//	t = (r·qgs2 + lcs·i)/head,
//
// at least qgs2/iPeak when the driver's current limit iPeak > 0 binds. With
// lcs = 0 it is the current interval of GateChargeTransitions (mean gate
// voltage). The same form follows from the exact first-order gate loop with
// a linear transconductance, whose time constant grows from r·Cgs to
// r·Cgs + lcs·gfs. A headroom ≤ 0 gives +Inf (the edge never completes).
//
// Source: gate-loop voltage law of the gate-charge method (Balogh 2001;
// Graovac, Pürschel, Kiep 2006) with the source-inductance feedback of Ren,
// Xu, Zhou, Lee, "Analytical loss model of power MOSFET", IEEE TPEL 2006
// (from memory); the closed form is derived in docs/second-order.md.
func CurrentTransitionTime(qgs2 q.Charge, head q.Voltage, r q.Resistance, iPeak q.Current, lcs q.Inductance, i q.Current) q.Time {
	if head <= 0 {
		return q.Time(math.Inf(1))
	}
	t := (float64(r)*float64(qgs2) + float64(lcs)*float64(max(i, 0))) / float64(head)
	if iPeak > 0 {
		t = max(t, float64(qgs2)/float64(iPeak))
	}
	return q.Time(t)
}

// CurrentRiseEnergy is the V·I overlap energy of the current-rise interval
// of a hard turn-on with power-loop inductance l: while the current rises
// linearly to i in t, the loop inductance takes l·i/t of the supply voltage,
// so the switch sees v − l·i/t and ∫v·i dt = ½·i·t·max(0, v − l·i/t). The
// energy not dissipated, up to ½·l·i², is what the loop inductance stores.
// With l = 0 it is ½·v·i·t (OverlapEnergy).
//
// Source: Erickson & Maksimović 2001, ch. 4 (clamped inductive switching);
// the loop-inductance term as in Ren et al., IEEE TPEL 2006 (from memory),
// integrated here over the linear ramp.
func CurrentRiseEnergy(v q.Voltage, i q.Current, t q.Time, l q.Inductance) q.Energy {
	if t <= 0 || i <= 0 {
		return 0
	}
	vs := float64(v) - float64(l)*float64(i)/float64(t)
	return q.Energy(0.5 * float64(i) * float64(t) * max(vs, 0))
}

// CurrentFallEnergy is the V·I overlap energy of the current-fall interval
// of a hard turn-off with power-loop inductance l: while the current falls
// linearly from i in t, the loop inductance adds l·i/t to the supply, so the
// switch sees v + l·i/t and ∫v·i dt = ½·v·i·t + ½·l·i²: the switch absorbs
// all the energy the loop stored. Valid while v + l·i/t stays below the
// breakdown voltage (the voltage screen checks LoopOvershoot).
//
// Source: as CurrentRiseEnergy.
func CurrentFallEnergy(v q.Voltage, i q.Current, t q.Time, l q.Inductance) q.Energy {
	if i <= 0 {
		return 0
	}
	return q.Energy(0.5*float64(v)*float64(i)*float64(max(t, 0)) + 0.5*float64(l)*float64(i)*float64(i))
}

// LoopOvershoot is the peak voltage across a switch turning off current i
// through loop inductance l. The channel's share iTop falls linearly in t
// and adds l·iTop/t; the rest, i − iTop, which the output capacitance was
// carrying when the drain reached the rail, is cut off at once by the
// clamp and rings with the small-signal output capacitance c, adding
// (i − iTop)·√(l/c) (the ring's ½·l·I² = ½·c·ΔV²). With iTop = i (no Coss
// share known) this is the plain v + l·i/t.
//
// Source: Faraday's law on the commutation loop and the energy balance of
// the L-C ring (Erickson & Maksimović 2001, ch. 4; Ren et al., IEEE TPEL
// 2006, from memory); the split between the two terms follows the
// Coss-aware turn-off (MillerRiseEnergy) and was checked against ngspice
// (docs/spice-crosscheck.md).
func LoopOvershoot(v q.Voltage, l q.Inductance, i, iTop q.Current, t q.Time, c q.Capacitance) q.Voltage {
	return LoopOvershootLcs(v, l, 0, 0, 0, 0, i, iTop, t, c)
}

// LoopOvershootLcs is LoopOvershoot when lcs of the loop inductance l is
// common to the gate loop. Its voltage during the ring drives the gate, and
// the channel, with transconductance gm, takes part of the ring's current:
// seen from the ring, the source inductance is in parallel with
// lfb = R_off·C_iss/gm, so the ring inductance is (l − lcs) + lcs∥lfb (the
// channel's own fall still sees all of l). rOff is the off-state gate loop,
// ciss the input capacitance; gm ≤ 0 or ciss ≤ 0 leaves the whole of l in
// the ring.
//
// Source: as LoopOvershoot; the gate-loop feedback of a common-source
// inductance as in Ren et al. 2006 (from memory); the parallel form is the
// team's, checked against ngspice (docs/spice-crosscheck.md).
func LoopOvershootLcs(v q.Voltage, l, lcs q.Inductance, gm float64, rOff q.Resistance, ciss q.Capacitance, i, iTop q.Current, t q.Time, c q.Capacitance) q.Voltage {
	if l <= 0 || i <= 0 {
		return v
	}
	lr := float64(l)
	if lcs > 0 && gm > 0 && ciss > 0 && rOff > 0 {
		lfb := float64(rOff) * float64(ciss) / gm
		lc := math.Min(float64(lcs), lr)
		lr = lr - lc + 1/(1/lc+1/lfb)
	}
	iTop = min(max(iTop, 0), i)
	var dv float64
	if iTop > 0 {
		if t <= 0 {
			return q.Voltage(math.Inf(1))
		}
		dv = float64(l) * float64(iTop) / float64(t)
	}
	if i > iTop && c > 0 {
		dv += float64(i-iTop) * math.Sqrt(float64(lr)/float64(c))
	}
	return v + q.Voltage(dv)
}

// GateBounce is the gate-voltage excursion of an off switch whose drain
// moves by v in time t (a linear ramp, dv/dt = v/t) while its gate is held
// through the off-state loop resistance r: the Miller current cgd·dv/dt
// charges Cgs + Cgd through r, giving
//
//	ΔV = cgd·(v/t)·r·(1 − exp(−t/(r·(cgs + cgd)))).
//
// For a stiff loop (t ≫ r·Ciss) this is the Miller-current drop cgd·dv/dt·r;
// for an open loop (r → ∞) the capacitive divider v·cgd/(cgs + cgd). Use a
// charge-equivalent cgd over the swing (Qgd(v)/v) for a nonlinear part.
//
// Source: Balogh 2001 (dv/dt-induced turn-on: the Miller current through
// the gate resistance, and the Crss/Ciss divider); Lidow et al., GaN
// Transistors for Efficient Power Conversion (dv/dt immunity, the same
// Miller ratio; from memory). The combined form is the exact response of the
// linear gate RC to the ramp, derived in docs/second-order.md.
func GateBounce(cgd, cgs q.Capacitance, v q.Voltage, t q.Time, r q.Resistance) q.Voltage {
	ciss := float64(cgd + cgs)
	if cgd <= 0 || v <= 0 || ciss <= 0 {
		return 0
	}
	if t <= 0 {
		return q.Voltage(float64(v) * float64(cgd) / ciss)
	}
	if r <= 0 {
		return 0
	}
	tau := float64(r) * ciss
	return q.Voltage(float64(cgd) * float64(v) / float64(t) * float64(r) * -math.Expm1(-float64(t)/tau))
}

// ThresholdAt moves a 25 °C threshold (or any gate voltage that tracks it,
// such as the plateau) to junction temperature t with a linear coefficient
// tc in V/K: vth + tc·(t − 25 °C), never below a tenth of vth.
//
// Source: common practice (datasheet normalised-threshold curves: silicon
// about −5 mV/K, silicon carbide similar, GaN HEMTs much flatter; from
// memory).
func ThresholdAt(vth q.Voltage, tc float64, t q.Temperature) q.Voltage {
	return max(vth+q.Voltage(tc*float64(t-25)), vth/10)
}

// DiodeDropAt moves a 25 °C diode forward drop to junction temperature t
// with a linear coefficient tc in V/K, never below zero.
//
// Source: common practice (about −2 mV/K for a silicon p-n junction at
// constant current; Sze & Ng 2007, ch. 2, give the origin in the
// temperature dependence of the intrinsic density).
func DiodeDropAt(vsd q.Voltage, tc float64, t q.Temperature) q.Voltage {
	return max(vsd+q.Voltage(tc*float64(t-25)), 0)
}

// QrrLaw is the recovered charge of a body diode against junction
// temperature, linear through the datasheet point: Q(T) = Q0 + Slope·(T − T0),
// never below zero.
type QrrLaw struct {
	Q0    q.Charge      // recovered charge at T0, C; ≥ 0
	T0    q.Temperature // temperature of Q0, °C
	Slope float64       // C/K
}

// At returns Q(T).
func (l QrrLaw) At(t q.Temperature) q.Charge {
	return max(l.Q0+q.Charge(l.Slope*float64(t-l.T0)), 0)
}

// QrrRisePerK is the default relative rise of the recovered charge with
// temperature: twice the 25 °C value at 125 °C, i.e. +1 % of Q(25 °C) per
// kelvin (common practice for silicon body diodes, from memory).
const QrrRisePerK = 0.01

// FitQrrLaw returns the law through (q0 at t0) and, when hot is true,
// (q1 at t1, t1 ≠ t0); otherwise the default rise QrrRisePerK relative to the
// 25 °C value implied by q0 at t0.
//
// Source: two datasheet points when given; else common practice (about 2×
// from 25 to 125 °C).
func FitQrrLaw(q0 q.Charge, t0 q.Temperature, q1 q.Charge, t1 q.Temperature, hot bool) QrrLaw {
	if hot && t1 != t0 {
		return QrrLaw{Q0: q0, T0: t0, Slope: float64(q1-q0) / float64(t1-t0)}
	}
	q25 := float64(q0) / (1 + QrrRisePerK*float64(t0-25))
	return QrrLaw{Q0: q0, T0: t0, Slope: q25 * QrrRisePerK}
}

// DynamicRdsFactor is the dynamic on-resistance multiplier at off-state
// voltage v for a part measured at k·R(on) after blocking vTest: linear in
// the blocked voltage from 1 at 0 V to k at vTest, continued linearly above
// vTest. vTest ≤ 0 means the test voltage is unknown: k is used as given.
//
// Source: common practice for GaN HEMTs (trapping grows with the blocked
// voltage; datasheets that state a dynamic factor give it at one voltage;
// from memory, cf. Lidow et al.). The linear law is our assumption; it is
// conservative above vTest only if the trapping keeps growing.
func DynamicRdsFactor(k q.Ratio, vTest, v q.Voltage) float64 {
	if k <= 1 {
		return 1
	}
	if vTest <= 0 {
		return float64(k)
	}
	return 1 + (float64(k)-1)*max(float64(v), 0)/float64(vTest)
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
// is the team's, checked against ngspice (docs/spice-crosscheck.md).
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

// MillerRiseEnergy is the turn-off voltage-rise energy when the load current
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
func MillerRiseEnergy(m MillerLaw, oss OssLaw, v q.Voltage, i, ig q.Current) (q.Energy, q.Current) {
	r := NewRiseIntegral(m, oss, v)
	return r.Energy(i, ig)
}

// RiseIntegral is MillerRiseEnergy with the parts that do not depend on the
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

// NewRiseIntegral prepares MillerRiseEnergy for law m, output capacitance
// oss and switched voltage v.
func NewRiseIntegral(m MillerLaw, oss OssLaw, v q.Voltage) RiseIntegral {
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
	return b.atPower(v, pv)
}

// atPower is At with v^(2−N) given (OssPoint's, for the same law).
func (b *RiseIntegral) atPower(v q.Voltage, pv float64) RiseIntegral {
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
// when the voltage reaches v (MillerRiseEnergy). With a = i/ig the
// integrand of a segment of Cgd = c is positive above xs = (K/(a·c))^(1/N)
// = xc·a^(−1/N): one power evaluation serves both segments.
func (r *RiseIntegral) Energy(i, ig q.Current) (q.Energy, q.Current) {
	return r.energy(i, ig, nil)
}

// energy is Energy with the power a^(−1/N) taken from pw when it is given
// (the thermal loop's repeated calls; powNear to riseXsTol). The crossing
// xs = xc·a^(−1/N) enters the energy at first order (through
// xs^(2−N) = xs²·a·c/K, exact only at the exact crossing), so the energy
// keeps about the same relative error, 10⁻¹².
func (r *RiseIntegral) energy(i, ig q.Current, pw *powNear) (q.Energy, q.Current) {
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
