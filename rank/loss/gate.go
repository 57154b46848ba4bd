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
