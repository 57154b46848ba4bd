package evaluate

import (
	"math"

	q "swrank/devices/quantity"
	"swrank/rank/fit"
	"swrank/rank/loss"
	"swrank/rank/resonant"
	"swrank/rank/stage"
)

// bookGate writes a gate split per cycle at frequency f into out's losses:
// the driver takes its resistance's share and, with a ramping edge, its
// output stage's (recorded apart in out.GateEdge); the quiescent draw is
// added.
func bookGate(out *DeviceResult, s loss.GateSplit, drv *stage.Driver, f float64) {
	out.GateEdge = q.Power(float64(s.Edge) * f)
	out.Losses.GateDriver = q.Power(float64(s.Driver)*f) + out.GateEdge
	out.Losses.GateRext = q.Power(float64(s.Rext) * f)
	out.Losses.GateRint = q.Power(float64(s.Rint) * f)
	out.Losses.DriverQuiescent = q.Power(float64(drv.VOn-drv.VOff) * float64(drv.IQ))
}

// rampShares are the shares of the turn-on and the turn-off edge's
// resistive gate energy that stay in the gate loops rOn and rOff (driver,
// external and internal resistance) behind a driver whose voltage ramps
// (loss.RampShare), with the gate taken as the linear capacitance that
// moves charge qg over the drive's swing: 1, 1 for a step.
func rampShares(drv *stage.Driver, rOn, rOff q.Resistance, qg q.Charge) (gOn, gOff float64) {
	if drv.Edge <= 0 || drv.VOn <= drv.VOff {
		return 1, 1
	}
	c := float64(qg) / float64(drv.VOn-drv.VOff)
	return loss.RampShare(q.Time(float64(rOn)*c), drv.Edge), loss.RampShare(q.Time(float64(rOff)*c), drv.Edge)
}

// rampOn and rampOff are the driver's two edges.
func rampOn(drv *stage.Driver) loss.DriveRamp {
	return loss.DriveRamp{From: drv.VOff, To: drv.VOn, Edge: drv.Edge}
}

func rampOff(drv *stage.Driver) loss.DriveRamp {
	return loss.DriveRamp{From: drv.VOn, To: drv.VOff, Edge: drv.Edge}
}

// rampStretch is the time a ramping driver adds to the two gate-charge
// intervals of one hard edge that begins t0 after the driver's edge
// began (the delay to the threshold at turn-on, to the plateau at
// turn-off): the gate moves qFirst at level vFirst, then qSecond at
// vSecond, through r (iPeak caps the current), each taking longer while
// the driver has not reached its level (loss.RampChargeTime against the
// step's charge over current). Turn-on moves Qgs2 at the mean gate level,
// then Qgd on the plateau; turn-off the reverse. Both are 0 once the edge
// is over before t0.
func rampStretch(ramp loss.DriveRamp, r q.Resistance, iPeak q.Current, t0 q.Time, qFirst q.Charge, vFirst q.Voltage, qSecond q.Charge, vSecond q.Voltage) (dFirst, dSecond q.Time) {
	if ramp.Edge <= t0 {
		return 0, 0
	}
	step := func(qq q.Charge, v q.Voltage) q.Time { return chargeTime(qq, loss.GateCurrent(ramp.To, v, r, iPeak)) }
	t1 := loss.RampChargeTime(qFirst, r, iPeak, ramp, vFirst, t0)
	t2 := loss.RampChargeTime(qSecond, r, iPeak, ramp, vSecond, t0+t1)
	return max(t1-step(qFirst, vFirst), 0), max(t2-step(qSecond, vSecond), 0)
}

// offDelayC is the charge per volt the gate discharges through from the
// on level to the plateau at a hard turn-off (turnOffTimes).
func offDelayC(d *fit.Device) q.Capacitance {
	if d.Method != fit.MethodGateCharge {
		if d.DelayCOff > 0 {
			return d.DelayCOff
		}
		return inputCharge(d)
	}
	switch {
	case d.DelayCOff > 0:
		return d.DelayCOff
	case d.Slope <= 0:
		return inputCharge(d)
	}
	return d.Slope
}

// rampEdges stretches the gate-charge intervals in a, and lowers the
// plateau gate currents igOn and igOff to the mean ones, where the
// driver is still ramping when the hard edge begins (rampStretch): at
// turn-on after the delay to the threshold, at turn-off after the delay
// to the plateau.
func (m *devModel) rampEdges(a *tempState, igOn, igOff q.Current) (q.Current, q.Current) {
	d, drv := m.d, m.drv
	tOn := onDelay(d, drv, a.vth)
	dIr, dVf := rampStretch(rampOn(drv), m.rOn, drv.IPeakSource, tOn, m.qgs2On, (a.vth+a.vplOn)/2, m.qgdV, a.vplOn)
	tOff := loss.GateDelayRamp(m.rOff, offDelayC(d), rampOff(drv), a.vplOff)
	dVr, dIf := rampStretch(rampOff(drv), m.rOff, drv.IPeakSink, tOff, m.qgdV, a.vplOff, m.qgs2Off, (a.vth+a.vplOff)/2)
	if dVf > 0 {
		igOn = q.Current(float64(igOn) * float64(a.trans.Tvf) / float64(a.trans.Tvf+dVf))
	}
	if dVr > 0 {
		igOff = q.Current(float64(igOff) * float64(a.trans.Tvr) / float64(a.trans.Tvr+dVr))
	}
	a.trans.Tir, a.trans.Tvf, a.trans.Tvr, a.trans.Tif = a.trans.Tir+dIr, a.trans.Tvf+dVf, a.trans.Tvr+dVr, a.trans.Tif+dIf
	a.tir0, a.tif0 = a.tir0+dIr, a.tif0+dIf
	return igOn, igOff
}

// swingGate adds to out the energy per cycle that a class E switch's
// drain swing drives through its off gate loop (loss.SwingGateEnergy)
// and returns it: the design's off-interval slope (resonant.ClassE.OffSlope)
// scaled to the peak vPeak the part's own output capacitance gives, and
// Cgd from the part's Miller law; without one, the gate-drain charge's
// mean Qgd/qg_vds at every voltage, which lies above a falling Cgd at
// the high voltages where the slope is steep (the conservative side).
// The energy is shared by the sink loop's resistances.
func swingGate(out *DeviceResult, d *fit.Device, law *loss.MillerLaw, drv *stage.Driver, e *resonant.ClassE, vPeak q.Voltage) q.Energy {
	if law == nil {
		return 0
	}
	k := 1.0
	if e.VPeak > 0 {
		k = float64(vPeak) / float64(e.VPeak)
	}
	r := drv.RSink + drv.RgExt + d.RgInt
	f := float64(e.F)
	en := loss.SwingGateEnergy(law, drv.VOff, r, 2*math.Pi*f, math.Pi, func(th float64) float64 { return k * e.OffSlope(th) })
	if r > 0 {
		p := float64(en) * f / float64(r)
		out.Losses.GateDriver += q.Power(p * float64(drv.RSink))
		out.Losses.GateRext += q.Power(p * float64(drv.RgExt))
		out.Losses.GateRint += q.Power(p * float64(d.RgInt))
	}
	return en
}

// softCurve is the gate-charge curve of a soft edge carrying current i:
// the drain near 0 V, no plateau, and below the plateau the oxide Cgd
// (fit.Device.SoftCgd) charging beside Cgs. (The soft turn-off delays
// still take the curve without it, fit.Device.Curve.)
func softCurve(d *fit.Device, i q.Current) loss.GateCurve {
	c := d.Curve(0, i, 0)
	cox := float64(d.SoftCgd())
	c.Qth += q.Charge(cox * float64(c.Vth))
	c.Qgs2 += q.Charge(cox * float64(c.Vpl-c.Vth))
	return c
}

// offLaw is the Cgd law of an off switch's drain swing: the part's Miller
// law, or without one the gate-drain charge's mean Qgd/qg_vds at every
// voltage (written into mean), which lies above a falling Cgd at the high
// voltages where a swing is steep (the conservative side). nil without
// either.
func offLaw(d *fit.Device, mean *loss.MillerLaw) *loss.MillerLaw {
	if d.HasMiller {
		return &d.Miller
	}
	if d.QgVds <= 0 || d.Qgd <= 0 {
		return nil
	}
	c := q.Capacitance(float64(d.Qgd) / float64(d.QgVds))
	*mean = loss.KneeLaw(0, c, c)
	return mean
}

// slowGateOff is the class E turn-off's loss per second at frequency f
// when the gate is slow against the drain's swing (loss.MillerShuntRiseEnergy):
// the driver pulls the plateau's current out of the gate while the drain
// rises at ig/Cgd and the shunt c1 takes only part of the current iOff.
func slowGateOff(d *fit.Device, law *loss.MillerLaw, drv *stage.Driver, c1 q.Capacitance, vPeak q.Voltage, iOff q.Current, f float64) q.Power {
	if law == nil {
		return 0
	}
	ig := loss.GateCurrent(drv.VOff, d.PlateauAt(iOff), drv.RSink+drv.RgExt+d.RgInt, drv.IPeakSink)
	return q.Power(float64(loss.MillerShuntRiseEnergy(law, c1, vPeak, iOff, ig)) * f)
}
