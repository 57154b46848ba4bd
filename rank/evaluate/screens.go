package evaluate

import (
	"math"
	q "swrank/devices/quantity"
	"swrank/rank/fit"
	"swrank/rank/stage"
)

// driveScreens applies the screens of the peak current and the gate drive:
// the pulsed rating, the gate ratings, and the drive against the threshold
// and the plateau vplPk at the peak current.
func driveScreens(out *DeviceResult, d *fit.Device, drv *stage.Driver, vplPk q.Voltage) {
	p := d.Part
	if p.IdPulse.OK && out.Stress.IPeak > p.IdPulse.V {
		out.Screens |= ScreenPeakCurrent
	}
	if drv.VOn > p.VgsMax {
		out.Screens |= ScreenGateMax
	}
	if drv.VOff < d.VgsMin {
		out.Screens |= ScreenGateMin
	}
	if drv.VOff < 0 && !p.VgsMin.OK {
		out.Flags |= fit.FlagVgsMinDefault
	}
	if drv.VOn <= d.Vth {
		out.Screens |= ScreenBelowThreshold
	} else if drv.VOn <= vplPk {
		out.Screens |= ScreenBelowPlateau
	}
}

// Screens are the reasons a part is set aside at an operating point.
type Screens uint32

// The screens.
const (
	ScreenVoltage         Screens = 1 << iota // peak drain voltage above derate × vds_max
	ScreenPeakCurrent                         // peak drain current above id_pulse
	ScreenRmsCurrent                          // rms current above the derated continuous rating
	ScreenGateMax                             // on drive above vgs_max
	ScreenGateMin                             // off drive below vgs_min
	ScreenBelowThreshold                      // on drive at or below the threshold
	ScreenBelowPlateau                        // on drive at or below the plateau at the working current
	ScreenTjMax                               // junction temperature above tj_max
	ScreenRunaway                             // no steady junction temperature
	ScreenNoOutputCap                         // no usable output-capacitance data for the position
	ScreenFalseTurnOn                         // the off switch's gate reaches its hot threshold (dv/dt bounce or off level)
	ScreenShuntTooSmall                       // class E: the part's output capacitance alone exceeds the shunt the design needs
	ScreenTooSlow                             // class E: the current fall takes too large a part of the period
	ScreenImplausible                         // the result is not physical: a loss above the power the stage processes, or a negative or non-finite share
	ScreenEstimated                           // strict ranking: the result rests on estimated values
	ScreenCrossConduction                     // a dead time too short for the gates: both channels conduct at once
)

// stageScreens applies the screens of the whole result: a result that is
// not physical (a loss above the power the stage processes, or a share
// that is negative or not finite) is set aside rather than ranked, and
// strict ranking sets aside a result that rests on estimates.
func stageScreens(r *Result, pt *stage.Point) {
	l := r.Losses
	for _, v := range [...]q.Power{l.Conduction, l.TurnOn, l.TurnOff, l.Coss, l.DeadTime, l.Recovery,
		l.GateRint, l.GateDriver, l.GateRext, l.DriverQuiescent} {
		if !(v >= 0) || math.IsInf(float64(v), 0) {
			r.Screens |= ScreenImplausible
		}
	}
	if pt.Stage.Pout > 0 && l.Total() > pt.Stage.Pout {
		r.Screens |= ScreenImplausible
	}
	if pt.Stage.Strict && r.Flags.Estimates() > 0 {
		r.Screens |= ScreenEstimated
	}
}
