package evaluate

import (
	q "swrank/devices/quantity"
	"swrank/rank/fit"
	"swrank/rank/loss"
	"swrank/rank/stage"
)

// deadTiming is the diode's share of the two dead times of a synchronous
// cell, worked out from both switches' gate circuits: the programmed dead
// time less what the edges use. Edge 1: the control switch turns off (its
// gate falls to the plateau, the drain voltage rises, the current falls
// into the synchronous switch's diode), then, a dead time later, the
// synchronous switch's gate reaches its threshold. Edge 2: the synchronous
// switch's gate falls below its threshold (its current moves to its
// diode), then, a dead time later, the control switch's gate reaches its
// threshold and its current rises.
type deadTiming struct {
	// t1, t2 are the diode's full-current conduction times at the two
	// edges, s (≥ 0).
	t1, t2 q.Time
	// margin1, margin2 are the dead times left when the other switch's
	// channel starts to conduct, s: below 0 both channels conduct at once
	// (cross-conduction).
	margin1, margin2 q.Time
	// used1, used2 are what the edges take of each dead time, s.
	used1, used2 q.Time
	// didtOn is the rate at which the control switch's turn-on takes the
	// current from the synchronous switch's diode, A/s (0: not known).
	didtOn q.Slew
}

// diodeTimes works out the dead times' diode conduction of control switch
// ct and synchronous switch sy at point pt, with both devices' gate
// parameters at 25 °C (the timing's temperature dependence is left out:
// it moves the threshold crossings by a fraction of a nanosecond).
//
// When the part gives its delay times td_on and td_off (with their test
// conditions), the gate's charge per volt over each delay is the one they
// imply (fit.Device.DelayCOn, DelayCOff) instead of the gate-charge
// curve's: see onDelay, softOffDelay and turnOffTimes.
//
// Source: the switching procedure of a gate-driven MOSFET, its delays as
// the RC response of the gate (loss.GateDelay) and its transition
// intervals by the gate-charge method (Balogh 2001); the delay times'
// definitions of IEC 60747-8:2010; the diode carries the
// load current from the end of one switch's current fall to the start of
// the other's channel conduction, its current ramping over the current
// transition (half the interval counted; Graovac, Pürschel, Kiep 2006).
func diodeTimes(pt *stage.Point, ct, sy *fit.Device) deadTiming {
	s := &pt.Stage
	cd, sd := s.DriverOf(false), s.DriverOf(true)
	var t deadTiming
	// Edge 1: the control switch turns off at its peak current; the
	// synchronous switch's channel starts at its threshold and has taken
	// half the diode's current at the gate level that carries it
	// (fit.Device.PlateauAt, the channel's square law: the diode's drop
	// holds it in saturation).
	off := turnOffTimes(ct, cd, pt.Ctrl.V, pt.Ctrl.IOff)
	syOn := onDelay(sy, sd, sy.Vth)
	syHalfOn := onDelay(sy, sd, sy.PlateauAt(pt.Ctrl.IOff/2))
	t.used1 = off.delay + off.tvr + off.tif/2 - syHalfOn
	t.margin1 = s.DeadTimeSyncOn.V + syOn - (off.delay + off.tvr + off.tif)
	// Edge 2: the synchronous switch's channel hands half its current to
	// the diode as its gate falls through the level that carries half,
	// and stops at its threshold; the control switch's channel starts at
	// its own.
	syOff := softOffDelay(sy, sd, pt.Sync.IOff, sy.Vth)
	syHalfOff := softOffDelay(sy, sd, pt.Sync.IOff, sy.PlateauAt(pt.Sync.IOff/2))
	ctOn := onDelay(ct, cd, ct.Vth)
	tir := currentRise(ct, cd, pt.Ctrl.IOn)
	if tir > 0 && pt.Ctrl.IOn > 0 {
		t.didtOn = q.Slew(float64(pt.Ctrl.IOn) / float64(tir))
	}
	t.used2 = syHalfOff - ctOn - tir/2
	t.margin2 = s.DeadTimeCtrlOn.V + ctOn - syOff
	if estimatedEdges(ct) || estimatedEdges(sy) {
		// Edges timed from estimated gate values: the diode is not
		// credited with any time the edges might take (unknown is not
		// zero); the margins still screen cross-conduction.
		t.used1, t.used2 = min(t.used1, 0), min(t.used2, 0)
	}
	t.t1 = max(s.DeadTimeSyncOn.V-t.used1, 0)
	t.t2 = max(s.DeadTimeCtrlOn.V-t.used2, 0)
	return t
}

// inputCharge is a device's gate charge per volt below its threshold
// (Cgs, from the charge to the threshold), F.
func inputCharge(d *fit.Device) q.Capacitance {
	if d.Method == fit.MethodGateCharge && d.Vth > 0 && d.Qth > 0 {
		return q.Capacitance(float64(d.Qth) / float64(d.Vth))
	}
	return q.Capacitance(float64(d.Part.Qg) / float64(d.Part.QgVgs)) // the linear gate
}

// onDelay is the time a device's gate takes from the off level to the
// level v (≥ its threshold) through the turn-on loop, charging the
// capacitance below the threshold: the one td_on implies when the part
// gives it (fit.Device.DelayCOn; IEC 60747-8 td(on), the RC gate of
// Balogh, "Design and Application Guide for High Speed MOSFET Gate Drive
// Circuits", 2001), else Qth/Vth.
func onDelay(d *fit.Device, drv *stage.Driver, v q.Voltage) q.Time {
	r := drv.RSource + drv.RgExt + d.RgInt
	c := inputCharge(d)
	if d.DelayCOn > 0 {
		c = d.DelayCOn
	}
	return loss.GateDelayRamp(r, c, rampOn(drv), v)
}

// softOffDelay is the time a soft-switched device's gate, carrying current
// i, takes from the on level to the level v (≥ its threshold) through the
// turn-off loop, its drain near 0 V (no plateau): the capacitance td_off
// implies when the part gives it (fit.Device.DelayCOff; IEC 60747-8
// td(off), the RC gate of Balogh 2001), else the charge between the on
// level and v over their difference.
func softOffDelay(d *fit.Device, drv *stage.Driver, i q.Current, v q.Voltage) q.Time {
	r := drv.RSink + drv.RgExt + d.RgInt
	c := inputCharge(d)
	if d.DelayCOff > 0 {
		c = d.DelayCOff
	} else if d.Method == fit.MethodGateCharge && drv.VOn > v {
		cv := d.Curve(0, i, 0)
		c = q.Capacitance(float64(cv.Charge(drv.VOn)-cv.Charge(v)) / float64(drv.VOn-v))
	}
	return loss.GateDelayRamp(r, c, rampOff(drv), v)
}

// offTimes are a hard turn-off's delay to the plateau, voltage rise and
// current fall, s.
type offTimes struct{ delay, tvr, tif q.Time }

// turnOffTimes works out a device's hard turn-off of current i at voltage
// v: the gate's fall from the on level to the plateau (charge per volt
// above the plateau, the curve's slope), then the gate-charge intervals;
// for the tr/tf method the delay is the linear gate's and the rescaled fall
// time stands for the whole transition. When the part gives td_off, the
// fall to the plateau takes the capacitance it implies
// (fit.Device.DelayCOff; IEC 60747-8 td(off), the RC gate of Balogh
// 2001).
func turnOffTimes(d *fit.Device, drv *stage.Driver, v q.Voltage, i q.Current) offTimes {
	r := drv.RSink + drv.RgExt + d.RgInt
	delay := loss.GateDelayRamp(r, offDelayC(d), rampOff(drv), d.PlateauAt(i))
	if d.Method != fit.MethodGateCharge {
		return offTimes{delay: delay, tif: fallTime(d, drv, i)}
	}
	tr := gateChargeEdges(d, drv, v, i)
	return offTimes{delay: delay, tvr: tr.Tvr, tif: tr.Tif}
}

// currentRise is a device's current-rise interval at turn-on of current i
// by the gate-charge method (0 for the tr/tf method, whose rescaled rise
// time holds the whole edge).
func currentRise(d *fit.Device, drv *stage.Driver, i q.Current) q.Time {
	if d.Method != fit.MethodGateCharge {
		return 0
	}
	return gateChargeEdges(d, drv, 0, i).Tir
}

// gateChargeEdges is the gate-charge method's four edge intervals of a
// device switching current i at drain voltage v in this gate loop (driver,
// external and internal gate resistance; the driver's peak currents), with
// the mean gate voltage over the current intervals.
func gateChargeEdges(d *fit.Device, drv *stage.Driver, v q.Voltage, i q.Current) loss.Transitions {
	c := d.Curve(v, i, 0)
	loop := loss.GateLoop{
		VOn: drv.VOn, VOff: drv.VOff,
		ROn: drv.RSource + drv.RgExt + d.RgInt, ROff: drv.RSink + drv.RgExt + d.RgInt,
		IPkOn: drv.IPeakSource, IPkOff: drv.IPeakSink,
	}
	vpl := d.PlateauAt(i)
	tr := loss.GateChargeTransitions(c.Qgs2, c.Qgd, d.Vth, vpl, loop, true)
	if drv.Edge > 0 {
		// A driver still ramping when the gate reaches its threshold (or
		// the plateau at turn-off) stretches the intervals.
		vm := (d.Vth + vpl) / 2
		dIr, dVf := rampStretch(rampOn(drv), loop.ROn, loop.IPkOn, onDelay(d, drv, d.Vth), c.Qgs2, vm, c.Qgd, vpl)
		dVr, dIf := rampStretch(rampOff(drv), loop.ROff, loop.IPkOff, loss.GateDelayRamp(loop.ROff, offDelayC(d), rampOff(drv), vpl), c.Qgd, vpl, c.Qgs2, vm)
		tr.Tir, tr.Tvf, tr.Tvr, tr.Tif = tr.Tir+dIr, tr.Tvf+dVf, tr.Tvr+dVr, tr.Tif+dIf
	}
	return tr
}

// crossConduction records the dead times' margins in the synchronous
// switch's result sy and sets it aside when a margin is negative: the
// other switch's channel starts before this one's has stopped (or the
// control switch's current has left it), a shoot-through through both.
func crossConduction(sy *DeviceResult, dt *deadTiming, tr *Trace) {
	sy.Margin1, sy.Margin2 = dt.margin1, dt.margin2
	if dt.margin1 < 0 || dt.margin2 < 0 {
		sy.Screens |= ScreenCrossConduction
	}
	if tr != nil {
		tr.add(sy.Role.String(), "dead-time timing", "diode time = dead time − (edge delays and transitions); margin = dead time + turn-on delay of the other switch − (this switch's turn-off to the threshold, or the control switch's turn-off transitions)",
			T("used by edge 1", dt.used1), T("diode edge 1", dt.t1), T("margin edge 1", dt.margin1),
			T("used by edge 2", dt.used2), T("diode edge 2", dt.t2), T("margin edge 2", dt.margin2))
	}
}

// estimatedEdges reports whether a device's edge timing at 25 °C rests on
// estimated gate values: the internal gate resistance, the gate-charge
// curve, the plateau or the Miller charge's spread. (Estimates that move
// only the hot threshold, the output charge or the package inductance
// bracket the part, fit.Device.Alt, but leave this timing known.)
func estimatedEdges(d *fit.Device) bool {
	return !d.Part.RgInt.OK || d.Flags&(fit.FlagGateChargeEstimated|fit.FlagPlateauEstimated) != 0 ||
		d.Method == fit.MethodGateCharge && !d.HasMiller
}
