package stage

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
	// MaxDriveEdge bounds Driver.Edge: a slower edge is a fault of the
	// driver (or a unit slip), not a gate drive.
	MaxDriveEdge q.Time = 1e-6
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

	// A turn-on that is not hard (HardOn false) may still cost output
	// charge. VSoftOn > 0: the switch turns on with VSoftOn across it
	// (discontinuous conduction: the resting or the valley voltage of the
	// ringing), V; 0 ≤ VSoftOn ≤ V. ISoftOn > 0: a reversed inductor current
	// of ISoftOn swings the switch node during the dead time before the
	// turn-on (forced-continuous conduction), A; the swing may fall short
	// and leave a residual voltage, and once complete the switch's reverse
	// conduction carries ISoftOn for the rest of the dead time.
	// Both 0: a soft turn-on without loss.
	VSoftOn q.Voltage // voltage left at a soft turn-on, V
	ISoftOn q.Current // reversed current swinging the node, A
}

// Mode is the conduction mode a buck or boost stage runs in at a point.
type Mode uint8

// Modes.
const (
	ModeCCM      Mode = iota // continuous conduction: the inductor current stays positive
	ModeDCM                  // discontinuous: a diode rectifier stops conducting, the inductor current rests at zero
	ModeFCCM                 // forced continuous: a synchronous stage whose inductor current reverses at the valley
	ModeGiven                // custom stage: the switch stresses are given
	ModeResonant             // class E or class D: the resonant design sets the stresses
)

var modeNames = [...]string{ModeCCM: "continuous", ModeDCM: "discontinuous", ModeFCCM: "forced-continuous", ModeGiven: "given", ModeResonant: "resonant"}

func (m Mode) String() string {
	if int(m) < len(modeNames) {
		return modeNames[m]
	}
	return fmt.Sprintf("mode(%d)", m)
}

// LightLoad says how a stage runs where its inductor current would
// reverse. The zero value is the default.
type LightLoad struct {
	// Valley makes the control switch of a diode-rectified stage in
	// discontinuous conduction turn on at the first valley of the ringing
	// of the switch node, instead of at its resting voltage. Default false.
	Valley bool
}

// Point is a resolved operating point: the stage with defaults filled and
// the stresses of each place.
type Point struct {
	Stage Stage // as understood, every default filled

	IL     q.Current    // average inductor current, A (custom: 0)
	Ripple q.Current    // peak-to-peak inductor ripple, A
	Ctrl   SwitchStress // the control (hard-switching) switch's stresses
	Sync   SwitchStress // the synchronous switch's, valid when HasSync
	// HasSync is true when the second place holds a transistor.
	HasSync bool
	// HasDiode is true when the second place holds the external diode.
	HasDiode bool
	// DiodeLoss is the external rectifier's conduction loss Vf·I·(1−D), W;
	// the same for every part, reported with the operating point.
	DiodeLoss q.Power
	// Mode is the conduction mode the stage runs in at this point.
	Mode Mode
	// LightLoad is how the stage was taken to run at light load.
	LightLoad LightLoad
	// RF is the resonant design of a class E or class D point.
	RF RFPoint
	// Notes are what Resolve assumed or noticed, for the user.
	Notes []string
	// Defaulted says which values Resolve filled with their defaults
	// because the stage left them unset, so that a report can say so.
	Defaulted Defaulted
}

// Defaulted lists the stage values taken at their defaults.
type Defaulted struct {
	Ambient  bool // Ambient is DefaultAmbient because none was given
	DeadTime bool // no dead time was given: DefaultDeadTime where the stage has one
}

// Resolve checks the stage, fills its defaults and computes the switch
// stresses. It is called once per operating point, not per part. It is
// ResolveLight with the default light-load behaviour.
func (s Stage) Resolve() (Point, error) { return s.ResolveLight(LightLoad{}) }

// ResolveLight is Resolve with a choice of light-load behaviour. Where the
// inductor ripple would take the current below zero, a diode-rectified
// stage runs in discontinuous conduction (ModeDCM) and a synchronous stage
// in forced-continuous conduction with a negative valley current
// (ModeFCCM); Point.Mode says which mode ran.
//
// Source of the stress equations: Erickson & Maksimović, Fundamentals of
// Power Electronics, 2nd ed., 2001, ch. 2 (steady-state buck and boost in
// continuous conduction: D = Vout/Vin and D = 1 − Vin/Vout, ripple
// ΔI = V_L·D/(L·f)), ch. 5 (discontinuous conduction: see dcm), and the
// rms of a trapezoidal current I_rms² = D·(I² + ΔI²/12), which holds for
// a current that crosses zero as well.
func (s Stage) ResolveLight(ll LightLoad) (Point, error) {
	var pt Point
	pt.Defaulted = Defaulted{Ambient: s.Ambient == 0, DeadTime: !s.DeadTime.OK}
	if err := s.fill(&pt); err != nil {
		return Point{}, err
	}
	pt.Stage, pt.LightLoad = s, ll
	switch s.Topology {
	case Custom:
		pt.Mode = ModeGiven
		pt.Ctrl = SwitchStress{
			V: s.Vblock, IOn: s.Ion, IOff: s.Ioff, IRms: s.Irms,
			IPeak: max(s.Ion, s.Ioff, s.Irms), HardOn: true, HardOff: true,
		}
		return pt, nil
	case ClassE, ClassD:
		if err := s.resolveRF(&pt); err != nil {
			return Point{}, err
		}
		pt.Stage, pt.Mode = s, ModeResonant
		return pt, nil
	case Buck, Boost:
		s.resolveConverter(&pt)
		return pt, nil
	}
	return Point{}, fmt.Errorf("unknown topology %s", s.Topology)
}

// resolveConverter computes the stresses of a buck or boost cell in
// continuous conduction, or hands over to dcm (diode rectifier) and
// forcedContinuous (synchronous) where the ripple takes the inductor
// current below zero.
func (s *Stage) resolveConverter(pt *Point) {
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
	if ival < 0 && s.Rectifier == DiodeRect {
		s.dcm(pt)
		return
	}
	ms := float64(il*il) + float64(ripple*ripple)/12
	pt.Ctrl = SwitchStress{
		V: v, IOn: ival, IOff: ipk, IRms: q.Current(math.Sqrt(d * ms)), IPeak: ipk,
		Duty: q.Ratio(d), HardOn: true, HardOff: true,
	}
	if s.Rectifier == DiodeRect {
		pt.HasDiode = true
		pt.DiodeLoss = q.Power(float64(s.Diode.Vf) * float64(il) * (1 - d))
		return
	}
	pt.HasSync = true
	pt.Sync = SwitchStress{
		V: v, IOn: ival, IOff: ival, IRms: q.Current(math.Sqrt((1 - d) * ms)), IPeak: ipk,
		Duty: q.Ratio(1 - d), IDead1: ipk, IDead2: ival,
	}
	if ival < 0 {
		forcedContinuous(pt, ipk, ival)
	}
}

// forcedContinuous turns the continuous-conduction stresses of a
// synchronous cell into forced-continuous ones, for a valley current ival
// below zero and a peak ipk. The current reverses before the
// synchronous switch turns off. That switch now turns off hard with
// |valley| in its channel; the reversed current swings the node towards
// the other rail in the dead time, so the control switch's body diode
// (not the synchronous one's) conducts, and the control switch turns on
// softly: without overlap, recovery or (once the swing is complete)
// output-capacitance loss.
func forcedContinuous(pt *Point, ipk, ival q.Current) {
	neg := -ival
	pt.Mode = ModeFCCM
	pt.Ctrl.IOn, pt.Ctrl.HardOn, pt.Ctrl.ISoftOn = 0, false, neg
	pt.Ctrl.IPeak = max(ipk, neg)
	pt.Sync.IOff, pt.Sync.HardOff, pt.Sync.IDead2 = neg, true, 0
	pt.Sync.IPeak = max(ipk, neg)
	pt.Notes = append(pt.Notes, fmt.Sprintf(
		"forced-continuous conduction: the inductor current reverses to %s at the valley; the synchronous switch turns off hard at %s and the control switch turns on softly once the reversed current has swung the switch node",
		ival, neg))
}

// dcm fills the stresses of a diode-rectified buck or boost in
// discontinuous conduction. The control switch conducts a triangle from 0
// to Ipk during D·T; the diode then carries it down to zero during D2·T;
// the inductor current rests at zero for the rest of the period. With the
// output voltage held, the controller sets
//
//	buck:  D = √(2·L·f·Iout·Vout / (Vin·(Vin − Vout))), Ipk = (Vin − Vout)·D/(L·f), D2 = D·(Vin − Vout)/Vout
//	boost: D = √(2·L·f·Iout·(Vout − Vin)) / Vin,        Ipk = Vin·D/(L·f),          D2 = D·Vin/(Vout − Vin)
//
// and the control switch's rms current is Ipk·√(D/3). It turns on at zero
// current (no overlap, no recovery: the diode has stopped), but with the
// node's resting voltage across it (buck Vin − Vout, boost Vin), or with
// LightLoad.Valley at the first valley of the undamped ringing about that
// rest (buck Vin − 2·Vout, boost 2·Vin − Vout, not below zero).
//
// Source: Erickson & Maksimović 2001, ch. 5 (discontinuous conduction mode:
// buck M = 2/(1 + √(1 + 4K/D²)), boost M = (1 + √(1 + 4D²/K))/2, K =
// 2L/(R·T), solved here for D); the ringing amplitude (the node leaves the
// rest from the other rail's voltage and rings about the rest without
// loss) is derived, damping ignored.
func (s *Stage) dcm(pt *Point) {
	L, f := float64(s.Inductance), float64(s.Fsw)
	vin, vout, iout := float64(s.Vin), float64(s.Vout), float64(s.Iout)
	var d, ipk, d2, v, vRest, vValley float64
	if s.Topology == Buck {
		d = math.Sqrt(2 * L * f * iout * vout / (vin * (vin - vout)))
		ipk = (vin - vout) * d / (L * f)
		d2 = d * (vin - vout) / vout
		v, vRest, vValley = vin, vin-vout, vin-2*vout
		pt.DiodeLoss = q.Power(float64(s.Diode.Vf) * ipk * d2 / 2)
	} else {
		d = math.Sqrt(2*L*f*iout*(vout-vin)) / vin
		ipk = vin * d / (L * f)
		d2 = d * vin / (vout - vin)
		v, vRest, vValley = vout, vin, 2*vin-vout
		pt.DiodeLoss = q.Power(float64(s.Diode.Vf) * iout)
	}
	von := vRest
	if pt.LightLoad.Valley {
		von = max(vValley, 0)
	}
	pt.Mode, pt.HasDiode = ModeDCM, true
	pt.IL, pt.Ripple = q.Current(ipk*(d+d2)/2), q.Current(ipk)
	pt.Ctrl = SwitchStress{
		V: q.Voltage(v), IOn: 0, IOff: q.Current(ipk), IRms: q.Current(ipk * math.Sqrt(d/3)), IPeak: q.Current(ipk),
		Duty: q.Ratio(d), HardOn: false, HardOff: true, VSoftOn: q.Voltage(von),
	}
	how := "at the resting voltage of the switch node (valley switching not asked)"
	if pt.LightLoad.Valley {
		how = "at the first valley of the ringing"
	}
	pt.Notes = append(pt.Notes, fmt.Sprintf(
		"discontinuous conduction: duty %.4f, peak current %s, the diode conducts for %.4f of the period and the inductor current rests at zero for %.4f; the control switch turns on at zero current %s, %s across it",
		d, q.Current(ipk), d2, 1-d-d2, how, q.Voltage(von)))
}

// fill checks ranges and sets the defaults of zero fields.
func (s *Stage) fill(pt *Point) error {
	var errs []error
	bad := func(format string, a ...any) { errs = append(errs, fmt.Errorf(format, a...)) }
	s.fillCommon(bad)
	switch s.Topology {
	case Custom:
		s.fillCustom(bad)
	case Buck, Boost:
		s.fillConverter(pt, bad)
	}
	return errors.Join(errs...)
}

// complaint collects one input problem of a stage (a format and its
// arguments, as fmt.Errorf takes them).
type complaint func(format string, a ...any)

// fillCommon checks the inputs every stage has (finite numbers, frequency,
// gate driver, ambient, loop inductance, thermal path, derating) and fills
// their defaults.
func (s *Stage) fillCommon(bad complaint) {
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
		{"irms", float64(s.Irms)}, {"l-loop", float64(s.LoopInductance)}, {"l-cs", float64(s.CommonSourceInductance)}} {
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
	if sd := &s.SyncDriver; sd.VOn > 0 {
		if sd.RSource == 0 {
			sd.RSource = DefaultRSource
		}
		if sd.RSink == 0 {
			sd.RSink = DefaultRSink
		}
		if sd.Edge == 0 {
			sd.Edge = d.Edge
		}
		if sd.Edge < 0 || sd.Edge > MaxDriveEdge {
			bad("sync-drive-edge: the driver's edge must be 0 to %s (got %s)", MaxDriveEdge, sd.Edge)
		}
		if sd.VOff >= sd.VOn || sd.RSource < 0 || sd.RSink < 0 || sd.RgExt < 0 || sd.IPeakSource < 0 || sd.IPeakSink < 0 || sd.IQ < 0 {
			bad("sync-vdrive, sync-vdrive-off, sync-rsrc, sync-rsnk: the off level must be below the on level, resistances and currents ≥ 0")
		}
	}
	if d.RSource < 0 || d.RSink < 0 || d.RgExt < 0 {
		bad("rsrc, rsnk, rg-ext: resistances must be ≥ 0 Ω")
	}
	if d.Edge < 0 || d.Edge > MaxDriveEdge {
		bad("drive-edge: the driver's edge must be 0 to %s (got %s)", MaxDriveEdge, d.Edge)
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
	if s.CommonSourceInductance < 0 {
		bad("l-cs: common-source inductance must be ≥ 0 H (got %s)", s.CommonSourceInductance)
	}
	if s.RthCA.OK && s.RthCA.V < 0 {
		bad("rth-ca: must be ≥ 0 K/W")
	}
	if s.RthJCBlank.OK && !(s.RthJCBlank.V > 0) || s.RthJABlank.OK && !(s.RthJABlank.V > 0) {
		bad("rth-jc-blank, rth-ja-blank: must be > 0 K/W")
	}
	if s.Derate == 0 {
		s.Derate = DefaultDerate
	}
	if s.Derate <= 0 || s.Derate > 1 {
		bad("derate: must be in (0, 1] (got %g)", float64(s.Derate))
	}
}

// fillCustom checks the switch stresses of a custom stage.
func (s *Stage) fillCustom(bad complaint) {
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
}

// fillConverter checks a buck or boost stage and fills its defaults: the
// ripple, the rectifier diode's drop or the dead time, and the output
// power; what it assumed goes to pt.Notes.
func (s *Stage) fillConverter(pt *Point, bad complaint) {
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
		if !s.DeadTimeSyncOn.OK {
			s.DeadTimeSyncOn = s.DeadTime
		}
		if !s.DeadTimeCtrlOn.OK {
			s.DeadTimeCtrlOn = s.DeadTime
		}
		if s.DeadTime.V < 0 || s.DeadTimeSyncOn.V < 0 || s.DeadTimeCtrlOn.V < 0 {
			bad("dead-time: must be ≥ 0 s")
		}
		if float64(s.DeadTimeSyncOn.V+s.DeadTimeCtrlOn.V)*float64(s.Fsw) >= 0.5 {
			bad("dead-time: %s and %s per period leave too little of a %s period", s.DeadTimeSyncOn.V, s.DeadTimeCtrlOn.V, s.Fsw)
		}
	}
	if s.Pout == 0 {
		s.Pout = q.Power(float64(s.Vout) * float64(s.Iout))
	}
}
