package evaluate

import (
	"math"
	q "swrank/devices/quantity"
	"swrank/rank/fit"
	"swrank/rank/loss"
	"swrank/rank/stage"
)

// offSwitchChecks screens the synchronous switch sy, which is off while the
// control switch ct hard-switches the node: the dv/dt gate bounce at ct's
// turn-on against sy's hot threshold, the negative bounce at ct's turn-off
// against vgs_min, and the loop overshoot of the turn-on commutation.
func offSwitchChecks(sy, ct *DeviceResult, pt *stage.Point, oss *ossMemo, tr *Trace) {
	d := sy.Dev
	s := &pt.Stage
	drv := s.DriverOf(true)
	v := sy.Stress.V
	fo := &sy.FalseOn
	fo.R = drv.RSink + drv.RgExt + d.RgInt
	fo.Cgd, fo.Cgs = d.CgdAt(v), d.Cgs
	finite := func(t q.Time) bool { return t > 0 && !math.IsInf(float64(t), 0) }
	if ct.Stress.HardOn && finite(ct.Trans.Tvf) {
		fo.DvDtOn = float64(v) / float64(ct.Trans.Tvf)
	}
	if ct.Stress.HardOff && finite(ct.Trans.Tvr) {
		fo.DvDtOff = float64(v) / float64(ct.Trans.Tvr)
	}

	// Overshoot when the commutation at ct's turn-on ends: the loop's di/dt
	// of ct's current rise, taken as the rate at which the recovering
	// current of sy is interrupted (common-practice bound), but no more
	// than the whole current ringing into sy's output capacitance,
	// I·√(L/C_oss(V)) (the ring's energy balance; LoopOvershoot).
	if l := s.LoopInductance + d.Lloop + ct.Dev.Lloop; l > 0 && ct.Stress.HardOn {
		tRise := ct.Trans.Tir
		if tRise == 0 {
			tRise = ct.Trans.Tvf
		}
		if finite(tRise) {
			sy.Lloop = l
			ramp := loss.LoopOvershoot(v, l, ct.Stress.IOn, ct.Stress.IOn, tRise, 0)
			coss := oss.at(d, v).C()
			ring := loss.LoopOvershoot(v, l, ct.Stress.IOn, 0, tRise, coss)
			sy.Vpeak = min(ramp, ring)
			sy.Flags |= fit.FlagLoopL
			if sy.Vpeak > q.Voltage(s.Derate)*d.Part.VdsMax {
				sy.Screens |= ScreenVoltage
			}
			if tr != nil {
				tr.add(sy.Role.String(), "overshoot from the power path", "V peak = V + min(L·I_on/t of the control switch's current take-over, I_on·√(L/C_oss(V))): the recovered current interrupted at the same rate, at most ringing whole into the output capacitance",
					T("L power path", l), T("I on (control)", ct.Stress.IOn), T("current takes over (control)", tRise), T("C_oss(V)", coss), peakTerm(sy.Vpeak, d.Part.VdsMax))
			}
		}
	}
	if fo.DvDtOn == 0 && fo.DvDtOff == 0 {
		return
	}
	if fo.Cgd <= 0 || fo.Cgs <= 0 {
		sy.Flags |= fit.FlagFalseOnUnchecked
		return
	}
	fo.Checked = true
	if fo.DvDtOn > 0 {
		fo.Bounce = loss.GateBounce(fo.Cgd, fo.Cgs, v, ct.Trans.Tvf, fo.R)
	}
	if fo.DvDtOff > 0 {
		fo.Spike = loss.GateBounce(fo.Cgd, fo.Cgs, v, ct.Trans.Tvr, fo.R)
	}
	gap := fo.Vth - drv.VOff
	fo.Margin = gap - fo.Bounce
	fo.SpikeMargin = drv.VOff - fo.Spike - d.VgsMin
	switch {
	case fo.Margin <= 0:
		sy.Screens |= ScreenFalseTurnOn
	case fo.Bounce > gap/2:
		sy.Flags |= fit.FlagFalseOnThin
	}
	if fo.SpikeMargin < 0 {
		sy.Flags |= fit.FlagGateSpike
	}
	if tr != nil {
		tr.add(sy.Role.String(), "false turn-on", "ΔV = Cgd·dv/dt·R·(1 − exp(−t/(R·(Cgs + Cgd)))), dv/dt = V/t_vf (control turn-on) or V/t_vr (its turn-off); margin = Vth(Tj) − (Voff + ΔV)",
			T("V", v), N("dv/dt on (V/ns)", fo.DvDtOn*1e-9), N("dv/dt off (V/ns)", fo.DvDtOff*1e-9),
			T("Cgd (charge-equivalent)", fo.Cgd), T("Cgs", fo.Cgs), T("R off loop", fo.R),
			T("bounce", fo.Bounce), T("Vth at Tj", fo.Vth), T("Voff", drv.VOff), T("margin", fo.Margin),
			T("negative spike", fo.Spike), T("vgs_min", d.VgsMin), T("spike margin", fo.SpikeMargin))
	}
}
