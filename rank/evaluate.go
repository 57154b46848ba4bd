package rank

import (
	"math"

	"swrank/devices"
	q "swrank/devices/quantity"
)

// Role is the place a device fills in a stage.
type Role uint8

// Roles.
const (
	RoleControl Role = iota // the hard-switching (control) switch
	RoleSync                // the synchronous rectifier switch
)

func (r Role) String() string {
	if r == RoleSync {
		return "sync"
	}
	return "control"
}

// DeviceResult is one switch's share of an evaluation.
type DeviceResult struct {
	Dev     *Device
	Role    Role
	Losses  Losses
	Thermal ThermalSolution
	Rth     q.ThermalResistance // junction to ambient used, K/W (0: none)
	Rds     q.Resistance        // on-resistance at the drive and the solved Tj
	Method  Method
	Flags   Flags
	Screens Screens
	Stress  SwitchStress

	VplOn, VplOff q.Voltage   // plateau at the turn-on and turn-off currents
	Trans         Transitions // hard-edge intervals
	Eon, Eoff     q.Energy    // overlap energies per cycle
	Ecoss, Erec   q.Energy    // output-capacitance and recovery energies per cycle
	Edead         q.Energy    // dead-time conduction energy per cycle
	Egate         q.Energy    // gate-drive energy per cycle
	Qg            q.Charge    // gate charge moved per cycle (on minus off level)
	IdLimit       q.Current   // continuous rating derated to the case temperature
}

// Result is the evaluation of one part at one operating point.
type Result struct {
	Dev      *Device  // the part being ranked
	Partner  *Device  // the device in the other place when it is not Dev (nil otherwise)
	Position Position // where Dev sits
	N        int      // number of devices evaluated (1 or 2)
	Devices  [2]DeviceResult
	Losses   Losses // sum over the devices and their drivers
	Flags    Flags
	Screens  Screens
	Derate   q.Ratio // the stage's voltage derating, for the screen's message
}

// Screened reports whether the part is set aside.
func (r *Result) Screened() bool { return r.Screens != 0 }

// Tj returns the hottest junction temperature of the evaluation and whether
// one exists.
func (r *Result) Tj() (q.Temperature, bool) {
	var t q.Temperature
	ok := true
	for i := 0; i < r.N; i++ {
		d := &r.Devices[i]
		if !d.Thermal.Found {
			ok = false
			continue
		}
		if i == 0 || d.Thermal.Tj > t {
			t = d.Thermal.Tj
		}
	}
	return t, ok
}

// Evaluate computes the losses of part dev at operating point pt. In a
// synchronous cell, partner (when non-nil) fills the place dev does not;
// otherwise dev fills both. Evaluate allocates nothing when tr is nil.
func Evaluate(pt *Point, dev, partner *Device, tr *Trace) Result {
	r := Result{Dev: dev, Position: pt.Stage.Position, Derate: pt.Stage.Derate}
	if !pt.HasSync {
		r.N = 1
		var k partnerCharge
		if pt.HasDiode {
			k = diodePartner(&pt.Stage.Diode, pt.Ctrl.V)
		}
		evalDevice(&r.Devices[0], pt, dev, RoleControl, &pt.Ctrl, &k, tr)
	} else {
		ctrl, sync := dev, dev
		if partner != nil && partner != dev {
			switch pt.Stage.Position {
			case Control:
				sync, r.Partner = partner, partner
			case Sync:
				ctrl, r.Partner = partner, partner
			}
		}
		r.N = 2
		evalDevice(&r.Devices[1], pt, sync, RoleSync, &pt.Sync, nil, tr)
		k := devicePartner(sync, pt.Ctrl.V, pt.Ctrl.IOn, &r.Devices[1])
		evalDevice(&r.Devices[0], pt, ctrl, RoleControl, &pt.Ctrl, &k, tr)
		r.Devices[0].Flags |= k.flags
	}
	for i := 0; i < r.N; i++ {
		d := &r.Devices[i]
		r.Losses = r.Losses.Add(d.Losses)
		r.Flags |= d.Flags
		r.Screens |= d.Screens
	}
	if tr != nil {
		tr.add("", "total", "stage total = Σ switch + Σ driver",
			T("switch", r.Losses.Switch()), T("driver", r.Losses.Driver()), T("total", r.Losses.Total()))
	}
	return r
}

// partnerCharge is what the complementary device contributes at the control
// switch's hard turn-on.
type partnerCharge struct {
	qoss  q.Charge // its output charge at the cell voltage
	eoss  q.Energy // its stored energy at the cell voltage
	qrr   q.Charge // its recovered charge
	flags Flags
}

func diodePartner(d *Diode, v q.Voltage) partnerCharge {
	return partnerCharge{
		qoss: q.Charge(float64(d.Cj) * float64(v)),
		eoss: q.Energy(0.5 * float64(d.Cj) * float64(v) * float64(v)),
		qrr:  d.Qrr,
	}
}

func devicePartner(k *Device, v q.Voltage, i q.Current, kr *DeviceResult) partnerCharge {
	p := partnerCharge{qoss: k.Oss.Q(v), eoss: k.Oss.E(v)}
	if k.Part.Technology == devices.GaN || kr.Stress.IDead2 <= 0 && kr.Stress.IDead1 <= 0 {
		return p
	}
	if !k.Part.Qrr.OK {
		if k.Part.Technology == devices.Silicon {
			p.flags |= FlagQrrMissing
		}
		return p
	}
	p.qrr = k.Part.Qrr.V
	p.flags |= FlagQrrInModel
	if k.Part.QrrHasCoss {
		p.qrr = max(0, p.qrr-p.qoss)
		p.flags |= FlagQrrLessCoss
	}
	return p
}

// rth returns the junction-to-ambient thermal resistance for a device.
func rth(p *devices.Part, s *Stage) (q.ThermalResistance, Flags) {
	switch {
	case s.RthCA.OK && p.RthJC.OK:
		return p.RthJC.V + s.RthCA.V, 0
	case p.RthJA.OK:
		return p.RthJA.V, 0
	case p.RthJC.OK:
		return p.RthJC.V, FlagRthJCOnly
	}
	return 0, FlagNoRth
}

func evalDevice(out *DeviceResult, pt *Point, d *Device, role Role, st *SwitchStress, k *partnerCharge, tr *Trace) {
	p := d.Part
	s := &pt.Stage
	drv := &s.Driver
	f := float64(s.Fsw)
	*out = DeviceResult{Dev: d, Role: role, Method: d.Method, Flags: d.Flags, Stress: *st}
	name := role.String()
	hard := st.HardOn || st.HardOff

	// Gate loop: driver, external and internal gate resistance.
	rOn := drv.RSource + drv.RgExt + d.RgInt
	rOff := drv.RSink + drv.RgExt + d.RgInt
	out.VplOn = PlateauAt(d.Vth, d.VplSpec, d.QgId, st.IOn)
	out.VplOff = PlateauAt(d.Vth, d.VplSpec, d.QgId, st.IOff)
	vplPk := PlateauAt(d.Vth, d.VplSpec, d.QgId, st.IPeak)

	// Screens that need no temperature.
	if st.V > q.Voltage(s.Derate)*p.VdsMax {
		out.Screens |= ScreenVoltage
	}
	if p.IdPulse.OK && st.IPeak > p.IdPulse.V {
		out.Screens |= ScreenPeakCurrent
	}
	if drv.VOn > p.VgsMax {
		out.Screens |= ScreenGateMax
	}
	if drv.VOff < d.VgsMin {
		out.Screens |= ScreenGateMin
	}
	if drv.VOn <= d.Vth {
		out.Screens |= ScreenBelowThreshold
	} else if drv.VOn <= vplPk {
		out.Screens |= ScreenBelowPlateau
	}
	if drv.VOn < d.VgsLow {
		out.Flags |= FlagRdsExtrapolated
	}
	driveOK := out.Screens&(ScreenBelowThreshold|ScreenBelowPlateau) == 0

	// Gate drive: charge and energy over the curve at the working drain
	// voltage (0 V for a soft-switched edge: no Miller plateau).
	vdsGate := q.Voltage(0)
	if hard {
		vdsGate = st.V
	}
	var split GateSplit
	var stored q.Energy
	if d.Method == MethodGateCharge {
		c := d.curve(vdsGate, st.IPeak)
		out.Qg = c.Charge(drv.VOn) - c.Charge(drv.VOff)
		out.Egate = GateEnergy(c, drv.VOff, drv.VOn)
		stored = c.StoredEnergy(drv.VOff, drv.VOn)
	} else {
		out.Qg = p.Qg * q.Charge((drv.VOn-drv.VOff)/p.QgVgs)
		out.Egate = q.Energy(float64(out.Qg) * float64(drv.VOn-drv.VOff))
		stored = out.Egate / 2
	}
	rdOn, rdOff := drv.RSource, drv.RSink
	if drv.IPeakSource > 0 && drv.VOn-vplPk > 0 {
		if r := q.Resistance(float64(drv.VOn-vplPk)/float64(drv.IPeakSource)) - drv.RgExt - d.RgInt; r > rdOn {
			rdOn = r
			out.Flags |= FlagDriverLimited
		}
	}
	if drv.IPeakSink > 0 && vplPk-drv.VOff > 0 {
		if r := q.Resistance(float64(vplPk-drv.VOff)/float64(drv.IPeakSink)) - drv.RgExt - d.RgInt; r > rdOff {
			rdOff = r
			out.Flags |= FlagDriverLimited
		}
	}
	split = SplitGateEnergy(out.Egate, stored, rdOn, rdOff, drv.RgExt, d.RgInt)
	out.Losses.GateDriver = q.Power(float64(split.Driver) * f)
	out.Losses.GateRext = q.Power(float64(split.Rext) * f)
	out.Losses.GateRint = q.Power(float64(split.Rint) * f)
	out.Losses.DriverQuiescent = q.Power(float64(drv.VOn-drv.VOff) * float64(drv.IQ))
	if tr != nil {
		tr.add(name, "gate", "P_G = [Qg(Von) − Qg(Voff)]·(Von − Voff)·f, split per edge by the loop resistances",
			T("Qg moved", out.Qg), T("Von", drv.VOn), T("Voff", drv.VOff), T("E stored in gate", stored),
			T("R src (effective)", rdOn), T("R snk (effective)", rdOff), T("Rg ext", drv.RgExt), T("Rg int", d.RgInt),
			T("E gate/cycle", out.Egate), T("driver", out.Losses.GateDriver), T("Rg ext", out.Losses.GateRext),
			T("Rg int", out.Losses.GateRint), T("quiescent", out.Losses.DriverQuiescent))
	}

	// Hard edges.
	if hard && driveOK {
		var ton, toff q.Time
		if d.Method == MethodGateCharge {
			loop := GateLoop{VOn: drv.VOn, VOff: drv.VOff, ROn: rOn, ROff: rOff, IPkOn: drv.IPeakSource, IPkOff: drv.IPeakSink}
			qgd := MillerChargeAt(d.Qgd, d.QgVds, st.V)
			cOn := d.curve(st.V, st.IOn)
			cOff := d.curve(st.V, st.IOff)
			tOn := GateChargeTransitions(cOn.Qgs2, qgd, d.Vth, out.VplOn, loop, true)
			tOff := GateChargeTransitions(cOff.Qgs2, qgd, d.Vth, out.VplOff, loop, true)
			out.Trans = Transitions{Tir: tOn.Tir, Tvf: tOn.Tvf, Tvr: tOff.Tvr, Tif: tOff.Tif}
			ton, toff = out.Trans.Tir+out.Trans.Tvf, out.Trans.Tvr+out.Trans.Tif
			if tr != nil {
				tr.add(name, "transitions", "gate-charge method: t = Q / I_gate, I_gate = (V_drive − V_gate)/R_loop (at the mean gate voltage (Vth+Vpl)/2 while the current moves)",
					T("Qgs2 on", cOn.Qgs2), T("Qgs2 off", cOff.Qgs2), T("Qgd at V", qgd), T("Vth", d.Vth),
					T("Vpl on", out.VplOn), T("Vpl off", out.VplOff), T("R loop on", rOn), T("R loop off", rOff),
					T("t_ir", out.Trans.Tir), T("t_vf", out.Trans.Tvf), T("t_vr", out.Trans.Tvr), T("t_if", out.Trans.Tif))
			}
		} else {
			ron, roff := rOn, rOff
			if drv.IPeakSource > 0 {
				ron = max(ron, q.Resistance(float64(drv.VOn-out.VplOn)/float64(drv.IPeakSource)))
			}
			if drv.IPeakSink > 0 {
				roff = max(roff, q.Resistance(float64(out.VplOff-drv.VOff)/float64(drv.IPeakSink)))
			}
			rs, h := d.TswR, d.TswHead
			if !d.TswOK {
				rs, h = 0, [2]q.Voltage{}
			}
			ton = ScaleSwitchingTime(p.Tr.V, rs, ron, h[0], drv.VOn-out.VplOn)
			toff = ScaleSwitchingTime(p.Tf.V, rs, roff, h[1], out.VplOff-drv.VOff)
			out.Trans = Transitions{Tvf: ton, Tvr: toff}
			if tr != nil {
				tr.add(name, "transitions", "datasheet times: t = t_10-90/0.8 · (R_loop/R_test) · (headroom_test/headroom)",
					T("tr", p.Tr.V), T("tf", p.Tf.V), T("R test", rs), T("R loop on", ron), T("R loop off", roff),
					T("headroom test on", h[0]), T("headroom on", drv.VOn-out.VplOn),
					T("headroom test off", h[1]), T("headroom off", out.VplOff-drv.VOff),
					T("t on", ton), T("t off", toff))
			}
		}
		if st.HardOn {
			out.Eon = OverlapEnergy(st.V, st.IOn, ton, 0)
		}
		if st.HardOff {
			out.Eoff = OverlapEnergy(st.V, st.IOff, toff, 0)
		}
		out.Losses.TurnOn = q.Power(float64(out.Eon) * f)
		out.Losses.TurnOff = q.Power(float64(out.Eoff) * f)
		if tr != nil {
			tr.add(name, "overlap", "E = ½·V·I·t per edge; P = E·f",
				T("V", st.V), T("I on", st.IOn), T("I off", st.IOff), T("E on", out.Eon), T("E off", out.Eoff),
				T("P on", out.Losses.TurnOn), T("P off", out.Losses.TurnOff))
		}
	}

	// Output capacitance and recovery at the hard turn-on.
	if st.HardOn {
		var kq q.Charge
		var ke q.Energy
		var kqrr q.Charge
		if k != nil {
			kq, ke, kqrr = k.qoss, k.eoss, k.qrr
		}
		es := d.Oss.E(st.V)
		out.Ecoss = HardTurnOnCossEnergy(es, st.V, kq, ke)
		out.Erec = RecoveryEnergy(kqrr, st.V)
		out.Losses.Coss = q.Power(float64(out.Ecoss) * f)
		out.Losses.Recovery = q.Power(float64(out.Erec) * f)
		if st.V < d.OssV/2 || st.V > 2*d.OssV {
			out.Flags |= FlagOssFar
		}
		if tr != nil {
			tr.add(name, "output capacitance", "E = E_oss,S(V) + V·Q_oss,K(V) − E_oss,K(V) (K: the device across the cell)",
				T("V", st.V), T("E_oss,S", es), T("Q_oss,K", kq), T("E_oss,K", ke), T("E/cycle", out.Ecoss), T("P", out.Losses.Coss))
			tr.add(name, "recovery", "E = Qrr·V (the partner's recovered charge flows through this switch at full voltage)",
				T("Qrr", kqrr), T("V", st.V), T("P", out.Losses.Recovery))
		}
	}

	// Dead-time reverse conduction of the synchronous switch.
	var vsd1, vsd2 q.Voltage
	if role == RoleSync && s.DeadTime.OK {
		vsd1, vsd2 = d.reverseDrop(st.IDead1, drv.VOff), d.reverseDrop(st.IDead2, drv.VOff)
		if !p.Vsd.OK {
			out.Flags |= FlagVsdDefault
		}
		out.Edead = DeadTimeEnergy(vsd1, st.IDead1, s.DeadTime.V, vsd2, st.IDead2, s.DeadTime.V)
		out.Losses.DeadTime = q.Power(float64(out.Edead) * f)
		if tr != nil {
			tr.add(name, "dead time", "E = Vsd·(I1·t_dt + I2·t_dt)",
				T("Vsd 1", vsd1), T("I1", st.IDead1), T("Vsd 2", vsd2), T("I2", st.IDead2), T("t_dt", s.DeadTime.V),
				T("P", out.Losses.DeadTime))
		}
	}

	// Conduction and the thermal loop.
	r0 := d.Gate.At(drv.VOn)
	if !driveOK {
		r0 = d.Gate.At(max(drv.VOn, d.Vth+0.1))
	}
	rthv, fl := rth(p, s)
	out.Rth, out.Flags = rthv, out.Flags|fl
	fixed := out.Losses.Switch()
	m := ThermalModel{Fixed: fixed, Cond: Conduction(st.IRms, r0), Law: d.Temp}
	switch {
	case s.TjFixed.OK:
		out.Thermal = ThermalSolution{Tj: s.TjFixed.V, Status: ThermalFixed, Found: true}
	case rthv == 0:
		out.Thermal = ThermalSolution{Tj: s.Ambient, Status: ThermalSolved, Found: true}
	default:
		out.Thermal = SolveJunction(&m, s.Ambient, rthv, d.TjMax)
	}
	tj := out.Thermal.Tj
	if !out.Thermal.Found {
		tj = d.TjMax
	}
	out.Rds = r0 * q.Resistance(d.Temp.Factor(tj))
	out.Losses.Conduction = Conduction(st.IRms, out.Rds)
	if tr != nil {
		tr.add(name, "conduction", "P = I_rms²·Rds(on)(Vgs, Tj), Rds = [R0 + k/(Vgs − Vth)]·F(Tj)",
			T("I rms", st.IRms), T("R at Vgs, T0", r0), T("T0", d.Temp.T0), N("F(Tj)", d.Temp.Factor(tj)),
			T("Rds", out.Rds), T("P", out.Losses.Conduction))
		hist := make([]Term, 0, 12)
		for i := 0; i < out.Thermal.Iterations && i < len(out.Thermal.History); i++ {
			hist = append(hist, T("iterate", out.Thermal.History[i]))
		}
		hist = append(hist, T("Ta", s.Ambient), T("Rth", rthv), T("P fixed", fixed), N("loop gain", out.Thermal.Gain),
			N("steps", float64(out.Thermal.Iterations)), T("Tj", out.Thermal.Tj))
		tr.add(name, "thermal", "Tj = Ta + Rth·P(Tj), fixed point from Ta ("+out.Thermal.Status.String()+")", hist...)
	}

	// Screens that need the temperature.
	switch out.Thermal.Status {
	case ThermalRunaway:
		out.Screens |= ScreenRunaway
	case ThermalAboveMax:
		out.Screens |= ScreenTjMax
	default:
		if out.Thermal.Tj > d.TjMax {
			out.Screens |= ScreenTjMax
		}
	}
	tc := tj
	if p.RthJC.OK {
		tc = tj - q.Temperature(float64(p.RthJC.V)*float64(out.Losses.Switch()))
		if out.Flags&FlagRthJCOnly != 0 {
			tc = s.Ambient
		}
	}
	out.IdLimit = CurrentRatingAt(p.IdMax, d.TjMax, tc)
	if st.IRms > out.IdLimit {
		out.Screens |= ScreenRmsCurrent
	}
}

// reverseDrop is the drop of the reverse-conducting device at current i:
// the datasheet vsd for silicon and SiC body diodes; for GaN, which has no
// body diode, Vth + |Voff| + I·R (team notes, common practice).
func (d *Device) reverseDrop(i q.Current, vOff q.Voltage) q.Voltage {
	p := d.Part
	if p.Technology == devices.GaN {
		v := d.Vth + q.Voltage(math.Abs(float64(vOff))) + q.Voltage(float64(i)*float64(d.Gate.At(p.RdsOnVgs)))
		if p.Vsd.OK && p.VsdIf.OK {
			// Shift the datasheet point (at Voff = 0) to this current and off level.
			v = p.Vsd.V + q.Voltage(math.Abs(float64(vOff))) + q.Voltage(float64(i-p.VsdIf.V)*float64(d.Gate.At(p.RdsOnVgs)))
		}
		return max(v, 0)
	}
	if p.Vsd.OK {
		return p.Vsd.V
	}
	if p.Technology == devices.SiC {
		return vsdSiC
	}
	return vsdSi
}
