package rank

import (
	"errors"
	"fmt"
	"math"

	q "swrank/devices/quantity"
)

// Defaults of Stage fields left at zero.
const (
	DefaultRipple   q.Ratio       = 0.3
	DefaultDeadTime q.Time        = 20e-9
	DefaultRSource  q.Resistance  = 2
	DefaultRSink    q.Resistance  = 1
	DefaultAmbient  q.Temperature = 25
	DefaultDerate   q.Ratio       = 0.8
	DefaultDiodeVf  q.Voltage     = 0.5
)

// SwitchStress is what one place of a stage asks of its switch.
type SwitchStress struct {
	V     q.Voltage // voltage blocked when off (and switched at hard edges), V
	IOn   q.Current // drain current just after turn-on, A
	IOff  q.Current // drain current just before turn-off, A
	IRms  q.Current // rms drain current over a period, A
	IPeak q.Current // highest drain current, A
	Duty  q.Ratio   // fraction of the period the switch conducts
	// HardOn/HardOff: the edge commutates the full voltage with current in
	// the channel (false for the soft-switched synchronous switch).
	HardOn, HardOff bool
	// Dead-time conduction of a synchronous switch: the reverse currents
	// in the dead time before its turn-on (IDead1) and after its turn-off
	// (IDead2), A.
	IDead1, IDead2 q.Current
}

// Point is a resolved operating point: the stage with defaults filled and
// the stresses of each place.
type Point struct {
	Stage Stage // as understood, every default filled

	IL     q.Current // average inductor current, A (custom: 0)
	Ripple q.Current // peak-to-peak inductor ripple, A
	Ctrl   SwitchStress
	Sync   SwitchStress // valid when HasSync
	// HasSync is true when the second place holds a transistor.
	HasSync bool
	// HasDiode is true when the second place holds the external diode.
	HasDiode bool
	// DiodeLoss is the external rectifier's conduction loss Vf·I·(1−D), W;
	// the same for every part, reported with the operating point.
	DiodeLoss q.Power
	// Notes are what Resolve assumed or noticed, for the user.
	Notes []string
}

// Resolve checks the stage, fills its defaults and computes the switch
// stresses. It is called once per operating point, not per part.
//
// Source of the stress equations: Erickson & Maksimović, Fundamentals of
// Power Electronics, 2nd ed., 2001, ch. 2 (steady-state buck and boost in
// continuous conduction: D = Vout/Vin and D = 1 − Vin/Vout, ripple
// ΔI = V_L·D/(L·f)), and the rms of a trapezoidal current
// I_rms² = D·(I² + ΔI²/12).
func (s Stage) Resolve() (Point, error) {
	var pt Point
	if err := s.fill(&pt); err != nil {
		return Point{}, err
	}
	pt.Stage = s
	switch s.Topology {
	case Custom:
		pt.Ctrl = SwitchStress{
			V: s.Vblock, IOn: s.Ion, IOff: s.Ioff, IRms: s.Irms,
			IPeak: max(s.Ion, s.Ioff, s.Irms), HardOn: true, HardOff: true,
		}
		return pt, nil
	case Buck, Boost:
	default:
		return Point{}, fmt.Errorf("topology %s: use its own command path", s.Topology)
	}
	var v q.Voltage // cell voltage
	var d float64   // control-switch duty
	var il q.Current
	var vl q.Voltage // inductor voltage while the control switch conducts
	if s.Topology == Buck {
		v, d, il, vl = s.Vin, float64(s.Vout/s.Vin), s.Iout, s.Vin-s.Vout
	} else {
		v, d = s.Vout, 1-float64(s.Vin/s.Vout)
		il, vl = s.Iout/q.Current(1-d), s.Vin
	}
	var ripple q.Current
	if s.Inductance > 0 {
		ripple = q.Current(float64(vl) * d / (float64(s.Inductance) * float64(s.Fsw)))
	} else {
		ripple = il * q.Current(s.Ripple.V)
	}
	pt.IL, pt.Ripple = il, ripple
	ipk := il + ripple/2
	ival := il - ripple/2
	if ival < 0 {
		pt.Notes = append(pt.Notes, fmt.Sprintf(
			"ripple %s exceeds twice the inductor current %s: the stage would leave continuous conduction; the continuous-conduction stresses are used with the valley current taken as zero",
			ripple, il))
		ival = 0
	}
	ms := float64(il*il) + float64(ripple*ripple)/12
	pt.Ctrl = SwitchStress{
		V: v, IOn: ival, IOff: ipk, IRms: q.Current(math.Sqrt(d * ms)), IPeak: ipk,
		Duty: q.Ratio(d), HardOn: true, HardOff: true,
	}
	if s.Rectifier == DiodeRect {
		pt.HasDiode = true
		pt.DiodeLoss = q.Power(float64(s.Diode.Vf) * float64(il) * (1 - d))
		return pt, nil
	}
	pt.HasSync = true
	pt.Sync = SwitchStress{
		V: v, IOn: ival, IOff: ival, IRms: q.Current(math.Sqrt((1 - d) * ms)), IPeak: ipk,
		Duty: q.Ratio(1 - d), IDead1: ipk, IDead2: ival,
	}
	return pt, nil
}

// fill checks ranges and sets the defaults of zero fields.
func (s *Stage) fill(pt *Point) error {
	var errs []error
	bad := func(format string, a ...any) { errs = append(errs, fmt.Errorf(format, a...)) }
	finite := func(name string, v float64) {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			bad("%s: not a finite number", name)
		}
	}
	for _, f := range []struct {
		n string
		v float64
	}{{"vin", float64(s.Vin)}, {"vout", float64(s.Vout)}, {"iout", float64(s.Iout)}, {"fsw", float64(s.Fsw)},
		{"ripple", float64(s.Ripple.V)}, {"inductance", float64(s.Inductance)}, {"dead-time", float64(s.DeadTime.V)},
		{"vdrive", float64(s.Driver.VOn)}, {"vdrive-off", float64(s.Driver.VOff)}, {"ta", float64(s.Ambient)},
		{"derate", float64(s.Derate)}, {"vblock", float64(s.Vblock)}, {"ion", float64(s.Ion)}, {"ioff", float64(s.Ioff)},
		{"irms", float64(s.Irms)}, {"l-loop", float64(s.LoopInductance)}} {
		finite(f.n, f.v)
	}
	if s.Fsw <= 0 {
		bad("fsw: switching frequency must be > 0 Hz (got %s)", s.Fsw)
	}
	d := &s.Driver
	if d.VOn <= 0 {
		bad("vdrive: on-level gate drive must be > 0 V (got %s)", d.VOn)
	}
	if d.VOff >= d.VOn {
		bad("vdrive-off: off level %s must be below the on level %s", d.VOff, d.VOn)
	}
	if d.RSource == 0 {
		d.RSource = DefaultRSource
	}
	if d.RSink == 0 {
		d.RSink = DefaultRSink
	}
	if d.RSource < 0 || d.RSink < 0 || d.RgExt < 0 {
		bad("rsrc, rsnk, rg-ext: resistances must be ≥ 0 Ω")
	}
	if d.IPeakSource < 0 || d.IPeakSink < 0 || d.IQ < 0 {
		bad("ipk-src, ipk-snk, iq: currents must be ≥ 0 A")
	}
	if s.Ambient == 0 {
		s.Ambient = DefaultAmbient
	}
	if s.Ambient < -60 || s.Ambient > 200 {
		bad("ta: ambient %s outside -60 to 200 °C", s.Ambient)
	}
	if s.LoopInductance < 0 {
		bad("l-loop: loop inductance must be ≥ 0 H (got %s)", s.LoopInductance)
	}
	if s.RthCA.OK && s.RthCA.V < 0 {
		bad("rth-ca: must be ≥ 0 K/W")
	}
	if s.Derate == 0 {
		s.Derate = DefaultDerate
	}
	if s.Derate <= 0 || s.Derate > 1 {
		bad("derate: must be in (0, 1] (got %g)", float64(s.Derate))
	}
	switch s.Topology {
	case Custom:
		if s.Vblock <= 0 {
			bad("vblock: blocking voltage must be > 0 V")
		}
		if s.Ion < 0 || s.Ioff < 0 || s.Irms < 0 {
			bad("ion, ioff, irms: currents must be ≥ 0 A")
		}
		if s.Pout < 0 {
			bad("pout: must be ≥ 0 W")
		}
		s.Position = Control
	case Buck, Boost:
		if s.Vin <= 0 || s.Vout <= 0 {
			bad("vin, vout: voltages must be > 0 V")
		} else if s.Topology == Buck && s.Vout >= s.Vin {
			bad("vout: a buck needs vout (%s) below vin (%s)", s.Vout, s.Vin)
		} else if s.Topology == Boost && s.Vout <= s.Vin {
			bad("vout: a boost needs vout (%s) above vin (%s)", s.Vout, s.Vin)
		}
		if s.Iout <= 0 {
			bad("iout: load current must be > 0 A")
		}
		if s.Inductance < 0 {
			bad("inductance: must be ≥ 0 H")
		}
		if s.Inductance == 0 && !s.Ripple.OK {
			s.Ripple = q.Some(DefaultRipple)
			pt.Notes = append(pt.Notes, fmt.Sprintf("no inductance or ripple given: ripple taken as %.0f %% of the inductor current (common practice)", 100*float64(DefaultRipple)))
		}
		if s.Ripple.V < 0 || s.Ripple.V > 2 {
			bad("ripple: fraction must be in [0, 2] (got %g)", float64(s.Ripple.V))
		}
		if s.Rectifier == DiodeRect {
			s.Position = Control
			if s.Diode.Vf == 0 {
				s.Diode.Vf = DefaultDiodeVf
				pt.Notes = append(pt.Notes, fmt.Sprintf("no diode forward drop given: %s assumed", DefaultDiodeVf))
			}
			if s.Diode.Vf < 0 || s.Diode.Qrr < 0 || s.Diode.Cj < 0 {
				bad("diode-vf, diode-qrr, diode-cj: must be ≥ 0")
			}
		} else {
			if !s.DeadTime.OK {
				s.DeadTime = q.Some(DefaultDeadTime)
			}
			if s.DeadTime.V < 0 {
				bad("dead-time: must be ≥ 0 s")
			}
			if float64(s.DeadTime.V)*2*float64(s.Fsw) >= 0.5 {
				bad("dead-time: %s twice per period leaves too little of a %s period", s.DeadTime.V, s.Fsw)
			}
		}
		if s.Pout == 0 {
			s.Pout = q.Power(float64(s.Vout) * float64(s.Iout))
		}
	}
	return errors.Join(errs...)
}
