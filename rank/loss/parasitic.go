package loss

import (
	"math"
	q "swrank/devices/quantity"
)

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

// SquareLawRiseEnergy is CurrentRiseEnergy for a channel that follows the
// square law, i ∝ x² with x the gate's fraction of the way from threshold
// to plateau, in the gate-charge method's current interval of length
// tR + tL: tR = r·Qgs2/head is the gate loop's own share and tL =
// lcs·i/head the common-source inductance's (CurrentTransitionTime). The
// gate moves by dx in (tR + 2·tL·x)·dx (the source inductance takes
// lcs·di/dt = lcs·gm·dv_gs/dt, gm ∝ x, out of the headroom), so the current
// stays small at first and ∫i dt = i·(tR/3 + tL/2): two thirds of the linear
// ramp's ½·i·t without common-source inductance, the linear ramp's when
// it dominates. With loop inductance l the switch sees v − l·di/dt, which
// grows along the interval: the energy is v·i·(tR·x*³/3 + tL·x*⁴/2) −
// ½·l·i²·x*⁴, with x* = 1 unless the switch voltage reaches zero first, at
// x* = v·tR/(2·(l·i − v·tL)).
//
// Source: the square-law channel, i ∝ (v_gs − V_th)² in saturation
// (Shichman & Hodges, "Modeling and simulation of insulated-gate
// field-effect transistor switching circuits", IEEE J. Solid-State
// Circuits, 1968), with the gate loop of the gate-charge method (Balogh
// 2001) and the source-inductance feedback of Ren et al., IEEE TPEL 2006
// (from memory), integrated here; checked against ngspice VDMOS cells
// (docs/spice-crosscheck.md).
func SquareLawRiseEnergy(v q.Voltage, i q.Current, tR, tL q.Time, l q.Inductance) q.Energy {
	if tR+tL <= 0 || i <= 0 || v <= 0 {
		return 0
	}
	vv, ii, tr, tl := float64(v), float64(i), float64(tR), float64(tL)
	x := 1.0
	if d := 2 * (float64(l)*ii - vv*tl); d > 0 {
		x = min(1, vv*tr/d)
	}
	x3 := x * x * x
	return q.Energy(vv*ii*(tr*x3/3+tl*x3*x/2) - 0.5*float64(l)*ii*ii*x3*x)
}

// SquareLawFallEnergy is CurrentFallEnergy for the square-law channel of
// SquareLawRiseEnergy: the current falls from i along the same path in
// reverse, ∫i dt = i·(tR/3 + tL/2), and the switch absorbs the loop's
// ½·l·i² as well: v·i·(tR/3 + tL/2) + ½·l·i².
//
// Source: as SquareLawRiseEnergy.
func SquareLawFallEnergy(v q.Voltage, i q.Current, tR, tL q.Time, l q.Inductance) q.Energy {
	if i <= 0 {
		return 0
	}
	return q.Energy(float64(v)*float64(i)*(float64(max(tR, 0))/3+float64(max(tL, 0))/2) + 0.5*float64(l)*float64(i)*float64(i))
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
// Coss-aware turn-off (millerRiseEnergy) and was checked against ngspice
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
// project's own, checked against ngspice (docs/spice-crosscheck.md).
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
