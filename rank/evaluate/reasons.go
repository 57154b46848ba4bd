package evaluate

import (
	"fmt"
	q "swrank/devices/quantity"
	"swrank/rank/fit"
)

// Reasons explains why the part is screened, one sentence a reason: each
// device's screens, then the whole result's.
func (r *Result) Reasons() []string {
	var out []string
	for i := 0; i < r.N; i++ {
		if d := &r.Devices[i]; d.Screens != 0 {
			out = r.deviceReasons(out, d)
		}
	}
	return r.stageReasons(out)
}

// deviceReasons appends to out the reasons of device d's screens.
func (r *Result) deviceReasons(out []string, d *DeviceResult) []string {
	p := d.Dev.Part
	s := d.Screens
	who := p.Name
	if r.N > 1 {
		who = fmt.Sprintf("%s (%s)", p.Name, d.Role)
	}
	add := func(format string, a ...any) { out = append(out, who+": "+fmt.Sprintf(format, a...)) }
	if s&ScreenVoltage != 0 {
		r.voltageReason(d, add)
	}
	if s&ScreenPeakCurrent != 0 {
		add("peak current %s exceeds id_pulse %s", d.Stress.IPeak, p.IdPulse.V)
	}
	if s&ScreenRmsCurrent != 0 {
		if d.Flags&fit.FlagNoRth != 0 {
			add("rms current %s exceeds the continuous rating derated to the case temperature, %s: with no thermal path (rth_ja, rth_jc or a known package) the junction is taken at tj_max, which leaves no rating", d.Stress.IRms, d.IdLimit)
		} else {
			add("rms current %s exceeds the continuous rating derated to the case temperature, %s", d.Stress.IRms, d.IdLimit)
		}
	}
	if s&ScreenGateMax != 0 {
		add("gate drive exceeds vgs_max %s", p.VgsMax)
	}
	if s&ScreenGateMin != 0 {
		add("off-level gate drive below vgs_min %s", d.Dev.VgsMin)
	}
	if s&ScreenBelowThreshold != 0 {
		add("gate drive does not exceed the threshold %s", d.Dev.Vth)
	}
	if s&ScreenBelowPlateau != 0 {
		add("gate drive does not exceed the plateau %s at the peak current %s", d.Dev.PlateauAt(d.Stress.IPeak), d.Stress.IPeak)
	}
	if s&ScreenTjMax != 0 {
		if d.Thermal.Found {
			add("junction temperature %s exceeds tj_max %s", d.Thermal.Tj, d.Dev.TjMax)
		} else {
			add("no steady junction temperature below %s", d.Dev.TjMax)
		}
	}
	if s&ScreenFalseTurnOn != 0 {
		f := &d.FalseOn
		if f.Bounce == 0 {
			add("false turn-on: the off level does not hold the gate below its hot threshold %s", f.Vth)
		} else {
			add("false turn-on: dv/dt lifts the off gate by %s, beyond its hot threshold %s (margin %s)",
				f.Bounce, f.Vth, f.Margin)
		}
	}
	if s&ScreenShuntTooSmall != 0 {
		add("its output capacitance (%s over the swing) exceeds the %s shunt capacitance the class E design needs; it holds class E only up to %s",
			r.RF.CDevice, r.RF.CRequired, r.RF.FMax)
	}
	if s&ScreenTooSlow != 0 {
		add("its current fall time %s is too long a part of the period for class E", r.RF.Tf)
	}
	if s&ScreenCrossConduction != 0 {
		for k, m := range [2]q.Time{d.Margin1, d.Margin2} {
			if m < 0 {
				edge := [2]string{"the control switch's turn-off", "the synchronous switch's turn-off"}[k]
				add("cross-conduction after %s: the other switch's channel starts %s before this edge is over (both conduct); the dead time needs %s more", edge, -m, -m)
			}
		}
	}
	if s&ScreenNoOutputCap != 0 {
		add("its output-capacitance law cannot be evaluated over this swing")
	}
	if s&ScreenRunaway != 0 {
		add("thermal runaway: the loss rises faster with temperature than the heat path removes it (no steady temperature up to %s)", d.Dev.TjMax+500)
	}
	return out
}

// stageReasons appends to out the reasons of the whole result's screens.
func (r *Result) stageReasons(out []string) []string {
	if r.Screens&ScreenImplausible != 0 {
		if r.Pout > 0 && r.Losses.Total() > r.Pout {
			out = append(out, fmt.Sprintf("%s: not a physical result: its loss %s exceeds the %s the stage processes (check the library's values and units)", r.Dev.Part.Name, r.Losses.Total(), r.Pout))
		} else {
			out = append(out, fmt.Sprintf("%s: not a physical result: a loss share is negative or not a number (check the library's values and units)", r.Dev.Part.Name))
		}
	}
	if r.Screens&ScreenEstimated != 0 {
		out = append(out, fmt.Sprintf("%s: strict ranking: its result rests on %d estimated values (%s)", r.Dev.Part.Name, r.Flags.Estimates(), (r.Flags&fit.EstimateFlags).Codes()))
	}
	return out
}

// estimatedL is the advice added to an overshoot when the package
// inductances behind it are estimated ("" otherwise).
func estimatedL(d *DeviceResult) string {
	if d.Flags&(fit.FlagLloopEstimated|fit.FlagLcsEstimated) != 0 {
		return "; the package inductance is estimated: give l_loop and l_cs to judge it"
	}
	return ""
}

// voltageReason says how device d's drain voltage exceeds its derating
// limit: in the resonant stage, with the loop overshoot (and whether the
// part would avalanche), or as blocked.
func (r *Result) voltageReason(d *DeviceResult, add func(string, ...any)) {
	p := d.Dev.Part
	v := max(d.Vpeak, d.Stress.V)
	limit := fmt.Sprintf("the derating limit %s (%.0f %% of vds_max %s, --derate)", q.Voltage(r.Derate)*p.VdsMax, 100*float64(r.Derate), p.VdsMax)
	switch {
	case r.RF.VPeak > 0:
		add("peak switch voltage %s (with this part's own output capacitance in the resonant stage) exceeds %s", r.RF.VPeak, limit)
	case v > d.Stress.V && v > p.VdsMax:
		// The overshoot the loop inductance would make is not
		// reachable: the part breaks down first.
		add("the turn-off overshoot on %s blocked would drive the drain past vds_max %s: the part would avalanche%s",
			d.Stress.V, p.VdsMax, estimatedL(d))
	case v > d.Stress.V:
		add("peak drain voltage %s (%s blocked plus the loop-inductance overshoot) exceeds %s%s", v, d.Stress.V, limit, estimatedL(d))
	default:
		add("drain voltage %s exceeds %s", v, limit)
	}
}
