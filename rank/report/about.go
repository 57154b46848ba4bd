package report

import (
	"fmt"
	"strconv"

	q "swrank/devices/quantity"
	"swrank/rank/stage"
)

// aboutPoint describes the operating point as understood, one line per
// topic: the stage, its switch stresses, the driver, the thermal path
// (saying which values are defaults and how to set them), the voltage
// derating limit, the point's notes and the library.
func aboutPoint(pt *stage.Point, source string, parts int) []string {
	var out []string
	add := func(format string, a ...any) { out = append(out, fmt.Sprintf(format, a...)) }
	s := &pt.Stage
	switch s.Topology {
	case stage.ClassE:
		e := &pt.RF.E
		ql := "ideal (Q → ∞)"
		if s.QL > 0 {
			ql = strconv.FormatFloat(float64(s.QL), 'g', 4, 64)
		}
		add("class E amplifier: %s supply, %s into %s at %s, loaded Q %s", s.Vin, e.Po, e.R, s.Fsw, ql)
		add("switch: %s dc, %s rms, %s peak, %s at turn-off; peak voltage %s with a linear shunt of %s", e.IDC, e.IRms, e.IPeak, e.IOff, e.VPeak, e.C1)
	case stage.ClassD:
		dd := &pt.RF.D
		add("class D half-bridge: %s supply, %s into %s at %s, load phase %.3f rad", s.Vin, dd.Po, dd.R, s.Fsw, float64(dd.Phase))
		add("tank current %s peak, %s at the edges; %s", dd.Im, dd.ISwitch, deadTime(pt))
	case stage.Custom:
		add("custom switch: %s blocked, %s at turn-on, %s at turn-off, %s rms, %s (duty not stated)", s.Vblock, s.Ion, s.Ioff, s.Irms, s.Fsw)
	default:
		second := "a synchronous switch"
		if pt.HasDiode {
			second = fmt.Sprintf("a diode (%s, Qrr %s, Cj %s)", s.Diode.Vf, s.Diode.Qrr, s.Diode.Cj)
		}
		add("%s %s → %s at %s (%s), %s, with %s", s.Topology, s.Vin, s.Vout, s.Iout, s.Pout, s.Fsw, second)
		add("ranking %s", placeWord(pt))
		add("%s conduction; inductor %s average, %s ripple", pt.Mode, pt.IL, pt.Ripple)
		add("control switch: duty %.3f, %s at turn-on, %s at turn-off, %s rms", float64(pt.Ctrl.Duty), pt.Ctrl.IOn, pt.Ctrl.IOff, pt.Ctrl.IRms)
		if pt.HasSync {
			add("sync switch: %s rms; %s", pt.Sync.IRms, edgeDeadTimes(pt))
		}
	}
	out = append(out, aboutDrive(pt)...)
	if pt.HasDiode {
		add("the diode itself dissipates %s (not in the totals: the same for every part)", pt.DiodeLoss)
	}
	for _, n := range pt.Notes {
		out = append(out, "note: "+n)
	}
	if source != "" {
		add("library %s: %s", source, Plural(parts, "part", "parts"))
	}
	return out
}

// aboutDrive describes the gate drive, the thermal path and the voltage
// derating limit, saying which values are defaults and how to set them.
func aboutDrive(pt *stage.Point) []string {
	var out []string
	s := &pt.Stage
	d := &s.Driver
	drv := fmt.Sprintf("gate drive %s / %s, source %s, sink %s, external resistor %s", d.VOn, d.VOff, d.RSource, d.RSink, d.RgExt)
	if d.IPeakSource > 0 || d.IPeakSink > 0 {
		drv += fmt.Sprintf(", peak %s / %s", d.IPeakSource, d.IPeakSink)
	}
	if d.IQ > 0 {
		drv += fmt.Sprintf(", quiescent %s", d.IQ)
	}
	if d.Edge > 0 {
		drv += fmt.Sprintf(", output edge %s", d.Edge)
	} else {
		drv += ", edge a step (--drive-edge)"
	}
	out = append(out, drv)
	if sd := &s.SyncDriver; sd.VOn > 0 && pt.HasSync {
		out = append(out, fmt.Sprintf("sync switch's own drive %s / %s, source %s, sink %s, external resistor %s",
			sd.VOn, sd.VOff, sd.RSource, sd.RSink, sd.RgExt))
	}
	th := "ambient " + q.Format(s.Ambient, 3)
	if pt.Defaulted.Ambient {
		th += " (the default; --ta sets it)"
	}
	if s.RthCA.OK {
		th += ", case to ambient " + q.Format(s.RthCA.V, 3)
	}
	if s.TjFixed.OK {
		th += ", junctions pinned at " + q.Format(s.TjFixed.V, 3)
	}
	out = append(out, th)
	if s.LoopInductance > 0 || s.CommonSourceInductance > 0 {
		out = append(out, fmt.Sprintf("layout inductance added to the parts' own: power loop %s, common source %s",
			s.LoopInductance, s.CommonSourceInductance))
	}
	return append(out, fmt.Sprintf("voltage derating limit: the peak drain voltage may reach %.0f %% of vds_max (--derate %s)",
		100*float64(s.Derate), strconv.FormatFloat(float64(s.Derate), 'g', 3, 64)))
}

// deadTime says the dead time used, and that it is the default when it is.
func deadTime(pt *stage.Point) string { return deadTimeOf(pt, pt.Stage.DeadTime.V) }

// deadTimeOf says the dead time v, and that it is the default when no
// dead time was given and v is the default's value.
func deadTimeOf(pt *stage.Point, v q.Time) string {
	s := "dead time " + q.Format(v, 3)
	if pt.Defaulted.DeadTime && v == pt.Stage.DeadTime.V {
		s += " (the default, which can dominate a fast part's loss; --dead-time sets it)"
	}
	return s
}

// edgeDeadTimes says the dead time of each edge of a synchronous stage:
// one value when both are the same, else the one before each switch
// turns on.
func edgeDeadTimes(pt *stage.Point) string {
	s := &pt.Stage
	if s.DeadTimeSyncOn.V == s.DeadTimeCtrlOn.V {
		return deadTimeOf(pt, s.DeadTimeSyncOn.V)
	}
	return fmt.Sprintf("dead time %s before the sync switch turns on, %s before the control switch does",
		q.Format(s.DeadTimeSyncOn.V, 3), q.Format(s.DeadTimeCtrlOn.V, 3))
}

// placeWord names the place ranked.
func placeWord(pt *stage.Point) string {
	if !pt.HasSync {
		return "the control switch"
	}
	switch pt.Stage.Position {
	case stage.Control:
		return "the control switch, by the whole stage's loss"
	case stage.Sync:
		return "the sync switch, by the whole stage's loss"
	}
	return "the part in both places (control and sync), by the whole stage's loss"
}
