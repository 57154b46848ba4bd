package loss

import (
	"math"
	q "swrank/devices/quantity"
)

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

// MillerChargeAt moves the gate-drain charge to another drain voltage when
// only the datasheet's Qgd at V_spec is known (no Cgd curve): the whole of
// Qgd at and below V_spec, and Qgd,spec·√(V/V_spec) above it, the charge a
// √-law Cgd(v) adds beyond the test voltage.
//
// Below V_spec the whole charge is kept because most of a real Cgd's
// charge lies below a few volts (its oxide-limited part; Baliga 2008,
// ch. 6): scaling it down with the voltage would make a part without a
// Crss look faster than it is. Above V_spec Cgd falls roughly as 1/√v
// above the depletion onset (Baliga 2008, ch. 6).
func MillerChargeAt(qgdSpec q.Charge, vSpec, v q.Voltage) q.Charge {
	if vSpec <= 0 || v <= 0 {
		return 0
	}
	if v <= vSpec {
		return qgdSpec
	}
	return qgdSpec * q.Charge(math.Sqrt(float64(v/vSpec)))
}

// MillerChargeSqrt is the other end of what a Qgd alone allows: the √ law
// at every voltage, Qgd,spec·√(V/V_spec), the charge a √-law Cgd(v) takes
// from 0 to V (Baliga 2008, ch. 6): the least charge below V_spec, so the
// fastest edges.
func MillerChargeSqrt(qgdSpec q.Charge, vSpec, v q.Voltage) q.Charge {
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
	// A knee above the plateau (a second total, qg2): the charge rises by
	// KneeQ over the KneeV volts above the plateau's end, then by Slope
	// per volt. KneeV = 0: Slope all the way.
	KneeV q.Voltage
	KneeQ q.Charge
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
	top, x := c.Qth+c.Qgs2+c.Qgd, v-c.Vpl
	if c.KneeV > 0 {
		if x <= c.KneeV {
			return top + c.KneeQ*q.Charge(x/c.KneeV)
		}
		top, x = top+c.KneeQ, x-c.KneeV
	}
	return top + q.Charge(float64(c.Slope)*float64(x))
}

// StoredEnergy returns ∫(v − vOff)·dQ from vOff to vOn along the curve: the
// energy held in the gate (relative to the off rail) at the end of turn-on,
// which the turn-off edge dissipates. For a linear gate it is ½·Q·ΔV.
//
// Source: Balogh 2001 (energy bookkeeping of the gate drive); the integral
// is taken exactly over the piecewise-linear curve.
func (c GateCurve) StoredEnergy(vOff, vOn q.Voltage) q.Energy {
	return c.StoredEnergyQ(vOff, vOn, c.Charge(vOff), c.Charge(vOn))
}

// StoredEnergyQ is StoredEnergy with the charges at the two ends given.
func (c GateCurve) StoredEnergyQ(vOff, vOn q.Voltage, qOff, qOn q.Charge) q.Energy {
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
	if k := c.Vpl + c.KneeV; c.KneeV > 0 && vOff < k && vOn > k {
		to(k, c.Qth+c.Qgs2+c.Qgd+c.KneeQ)
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
// resistances it flows through and, when the driver's own voltage ramps,
// the driver's output stage while it ramps.
type GateSplit struct {
	Driver, Rext, Rint q.Energy // J per cycle
	// Edge is the share the driver's output stage takes while its voltage
	// ramps (DriveRamp), J per cycle: drawn from the driver's supply like
	// the rest, dissipated in the driver, not in the three resistances.
	Edge q.Energy
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
	return SplitGateEnergyRamp(total, stored, rOnDrv, rOffDrv, rExt, rInt, 1, 1)
}

// SplitGateEnergyRamp is SplitGateEnergy for a driver whose voltage ramps:
// of each edge's energy only the share gOn (turn-on) or gOff (turn-off)
// reaches the loop's resistances (RampShare); the rest is dissipated in
// the driver's output stage while it ramps (GateSplit.Edge). The energy
// drawn from the driver's supply is the same, [Qg(Von) − Qg(Voff)]·ΔV,
// whatever the edge: only its place moves.
//
// Source: energy conservation over the gate loop (Balogh 2001) with the
// ramp-driven RC of RampShare.
func SplitGateEnergyRamp(total, stored q.Energy, rOnDrv, rOffDrv, rExt, rInt q.Resistance, gOn, gOff float64) GateSplit {
	eOn := float64(total-stored) * gOn
	eOff := float64(stored) * gOff
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
	s.Edge = q.Energy(float64(total-stored)*(1-gOn) + float64(stored)*(1-gOff))
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

// GateDelay is the time a gate driven through resistance r from vDrive
// takes to move from vFrom to vTo when its charge per volt is c (a
// constant capacitance between the two levels): the RC charge or
// discharge t = r·c·ln((vDrive − vFrom)/(vDrive − vTo)). It is +Inf when
// the drive never reaches vTo, 0 when vTo is already passed.
//
// Source: the turn-on and turn-off delay of a MOSFET gate, the RC
// response of the input capacitance through the gate loop (Balogh,
// "Fundamentals of MOSFET and IGBT Gate Driver Circuits", 2001, the delay
// intervals of the switching procedure).
func GateDelay(r q.Resistance, c q.Capacitance, vDrive, vFrom, vTo q.Voltage) q.Time {
	num, den := float64(vDrive-vFrom), float64(vDrive-vTo)
	switch {
	case num == 0 || den/num >= 1:
		return 0 // vTo lies between vFrom and the drive's start: already passed
	case den/num <= 0:
		return q.Time(math.Inf(1)) // the drive never reaches vTo
	}
	return q.Time(float64(r) * float64(c) * math.Log(num/den))
}

// DriveRamp is a driver's open-circuit output at one edge: it moves
// linearly from From to To in Edge, then holds To. Edge 0 is a step.
type DriveRamp struct {
	From, To q.Voltage // the off and the on level of this edge (To < From at turn-off), V
	Edge     q.Time    // the driver's own 0–100 % edge, without its load, s; ≥ 0
}

// RampShare is the share of a step-driven edge's resistive energy that a
// gate of time constant tau (the loop's R times the gate's charge per
// volt) dissipates in its loop when the driver's voltage ramps over edge
// instead: the ramp-driven RC dissipates
//
//	E_R = C·ΔV²·(τ/t_e)·[1 − (τ/t_e)·(1 − e^(−t_e/τ))]
//
// against ½·C·ΔV² for a step, so g = 2x·[1 − x·(1 − e^(−1/x))] with
// x = τ/t_e: 1 for a step, 1 − 1/(3x) + 1/(12x²) for a short edge, and 2τ/t_e for an
// edge much slower than the gate.
//
// Source: the series RC circuit driven by a linear ramp, solved in closed
// form (common practice); its slow-edge limit E = (RC/T)·C·V² is the
// adiabatic-charging result of Athas, Svensson, Koller, Tzartzanis & Chou,
// "Low-power digital systems based on adiabatic-switching principles",
// IEEE Trans. VLSI Systems 2(4), 1994 (from memory). The gate is taken as
// linear over the edge (docs/models.md, "Driver edge").
func RampShare(tau, edge q.Time) float64 {
	if edge <= 0 {
		return 1
	}
	if tau <= 0 {
		return 0
	}
	y := float64(edge) / float64(tau) // 1/x
	if y < 1e-3 {
		return 1 - y/3 + y*y/12 // series: the closed form cancels here
	}
	x := 1 / y
	return 2 * x * (1 - x*(-math.Expm1(-y)))
}

// GateDelayRamp is GateDelay with the driver's voltage ramping (d): the
// time from the start of the driver's edge until a gate of constant
// charge per volt c, driven through r from d.From, reaches vTo. While the
// driver ramps the gate follows
//
//	u(t) = [t − τ·(1 − e^(−t/τ))]/t_e,   u = (v − From)/(To − From), τ = r·c,
//
// and after the edge it relaxes as the step response from u(t_e). It is
// +Inf when the gate never reaches vTo and 0 when vTo is already passed.
//
// Source: the series RC circuit driven by a linear ramp, solved in closed
// form (common practice); with d.Edge = 0 it is GateDelay.
func GateDelayRamp(r q.Resistance, c q.Capacitance, d DriveRamp, vTo q.Voltage) q.Time {
	if d.Edge <= 0 {
		return GateDelay(r, c, d.To, d.From, vTo)
	}
	span := float64(d.To - d.From)
	if span == 0 {
		return GateDelay(r, c, d.To, d.From, vTo)
	}
	u := float64(vTo-d.From) / span
	switch {
	case u <= 0:
		return 0
	case u >= 1:
		return q.Time(math.Inf(1))
	}
	s := float64(d.Edge)
	tau := float64(r) * float64(c)
	if tau <= 0 {
		return q.Time(u * s) // the gate follows the driver
	}
	us := 1 - tau/s*(-math.Expm1(-s/tau)) // u at the end of the edge
	if u > us {
		return q.Time(s + tau*math.Log((1-us)/(1-u)))
	}
	// f(t) = t − τ·(1 − e^(−t/τ)) − u·s is increasing and convex on
	// (0, s] with f(s) ≥ 0: Newton from t = s falls to the root from above.
	t := s
	for k := 0; k < 60; k++ {
		em := -math.Expm1(-t / tau) // 1 − e^(−t/τ)
		f := t - tau*em - u*s
		df := 1 - (1 - em)
		if df <= 0 || f <= 1e-15*s {
			break
		}
		t -= f / df
	}
	return q.Time(t)
}

// RampChargeTime is the time a gate held at level vl (the Miller plateau,
// or the mean gate level over the threshold-to-plateau segment) takes to
// receive charge qq through r from a driver ramping as d, starting t0
// after the driver's edge began; the driver's peak current iPeak (> 0)
// caps the current. It is +Inf when the driver never pushes current into
// that level.
//
// Source: the gate-charge method's constant-head interval (Balogh 2001)
// with the driver's ramp integrated in closed form (common practice);
// with d.Edge = 0, or t0 past the edge, it is qq/I with I the step's gate
// current (GateCurrent).
func RampChargeTime(qq q.Charge, r q.Resistance, iPeak q.Current, d DriveRamp, vl q.Voltage, t0 q.Time) q.Time {
	if qq <= 0 {
		return 0
	}
	sg := 1.0
	if d.To < d.From {
		sg = -1
	}
	hEnd := sg * float64(d.To-vl)
	if hEnd <= 0 {
		return q.Time(math.Inf(1))
	}
	iEnd := float64(GateCurrent(d.To, vl, r, iPeak))
	need := float64(qq)
	t, s := float64(t0), float64(d.Edge)
	if t < s && r > 0 {
		slope := sg * float64(d.To-d.From) / s // dh/dt while the driver ramps, V/s
		h0 := sg * float64(d.From-vl)          // head at the edge's start, V
		if tz := -h0 / slope; tz > t {
			t = min(tz, s) // no current before the head turns positive
		}
		tc := s
		if iPeak > 0 {
			if tcap := (float64(iPeak)*float64(r) - h0) / slope; tcap < tc {
				tc = max(tcap, t)
			}
		}
		if tc > t { // the current rises with the head
			ia, k := (h0+slope*t)/float64(r), slope/float64(r)
			qseg := ia*(tc-t) + 0.5*k*(tc-t)*(tc-t)
			if qseg >= need {
				x := 2 * need / (ia + math.Sqrt(ia*ia+2*k*need))
				return q.Time(t + x - float64(t0))
			}
			need -= qseg
			t = tc
		}
		if t < s { // capped at the peak current until the edge ends
			qseg := float64(iPeak) * (s - t)
			if qseg >= need {
				return q.Time(t + need/float64(iPeak) - float64(t0))
			}
			need -= qseg
			t = s
		}
	}
	if math.IsInf(iEnd, 1) {
		return q.Time(max(t, float64(t0)) - float64(t0))
	}
	return q.Time(max(t, float64(t0)) + need/iEnd - float64(t0))
}

// SwingGateEnergy is the energy the gate loop's resistance r dissipates
// in one off interval while the drain of an off switch swings: the
// gate, held at vGate by its driver, passes the drain's displacement
// current Cgd·dv/dt through the loop, so
//
//	E = r·∫ (Cgd(u)·dv/dt)² dt = r·ω·∫ (Cgd(u(θ))·dv/dθ)² dθ,   u = v − vGate,
//
// over θ = ω·t from 0 to theta1, with the drain's slope dv/dθ from slope
// (the voltage follows by integration from 0 V). Cgd(u) is the Miller
// law at drain-gate voltage u (m.C at u plus its knee).
//
// Source: the gate-drain displacement current of an off MOSFET under a
// drain dv/dt (Baliga 2008, ch. 6; the same current that a hard edge's
// Miller bounce drives), dissipated in the loop by Joule's law; the
// integral by the midpoint rule over 512 intervals.
func SwingGateEnergy(m *MillerLaw, vGate q.Voltage, r q.Resistance, omega, theta1 float64, slope func(theta float64) float64) q.Energy {
	const n = 512
	if r <= 0 || omega <= 0 || theta1 <= 0 {
		return 0
	}
	h := theta1 / n
	knee := float64(m.Knee())
	v, sum := 0.0, 0.0
	s0 := slope(0)
	for k := 0; k < n; k++ {
		// Midpoint rule; the drain voltage advances by the slope at the
		// interval's ends (trapezoid), so Cgd is read at the midpoint.
		// Each interval's end slope is the next one's start.
		s1 := slope(float64(k+1) * h)
		sm := slope((float64(k) + 0.5) * h)
		vm := v + 0.25*(s0+sm)*h
		c := float64(m.C(q.Voltage(max(vm-float64(vGate), 0) + knee)))
		sum += c * c * sm * sm
		v += 0.5 * (s0 + s1) * h
		s0 = s1
	}
	return q.Energy(float64(r) * omega * sum * h)
}
