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
	Rds     q.Resistance        // on-resistance at the drive and the solved Tj (dynamic factor included)
	Method  Method
	Flags   Flags
	Screens Screens
	Stress  SwitchStress

	VplOn, VplOff q.Voltage   // plateau at the turn-on and turn-off currents, at Tj
	Trans         Transitions // hard-edge intervals at Tj (common-source inductance included)
	Eon, Eoff     q.Energy    // overlap energies per cycle (loop and common-source inductance included)
	Ecoss, Erec   q.Energy    // output-capacitance and recovery energies per cycle
	Edead         q.Energy    // dead-time conduction energy per cycle
	Egate         q.Energy    // gate-drive energy per cycle
	Qg            q.Charge    // gate charge moved per cycle (on minus off level)
	IdLimit       q.Current   // continuous rating derated to the case temperature

	// Second-order results (docs/second-order.md).

	// Vth is the threshold at the solved junction temperature, V.
	Vth q.Voltage
	// Vsd1, Vsd2 are the reverse-conduction drops in the dead times before
	// and after this switch's conduction, at Tj, V (sync only).
	Vsd1, Vsd2 q.Voltage
	// Qrr is the partner's recovered charge counted at this switch's hard
	// turn-on, at the partner's junction temperature, C.
	Qrr q.Charge
	// Lcs is the common-source inductance used in the gate loop, H (0: none,
	// or not used by the tr/tf method).
	Lcs q.Inductance
	// ElcsOn, ElcsOff are the energies per cycle the common-source
	// inductance adds at turn-on and turn-off, J (≥ 0).
	ElcsOn, ElcsOff q.Energy
	// Lloop is the power-loop inductance of the cell (layout plus the
	// packages' l_loop), H, when it was used.
	Lloop q.Inductance
	// Eloop is the net energy per cycle the loop inductance adds to this
	// switch: ½·L·I_off² at turn-off less the turn-on saving, J (may be < 0).
	Eloop q.Energy
	// Vpeak is the highest drain voltage: the blocked voltage plus the
	// loop overshoot, V. It is what the voltage screen compares.
	Vpeak q.Voltage
	// RdsDyn is the dynamic on-resistance factor applied, ≥ 1 (1: none).
	RdsDyn float64
	// FalseOn is the off-state gate margin (false turn-on screen).
	FalseOn FalseTurnOn
}

// FalseTurnOn is the off-state gate check of one switch: how close the gate
// comes to its hot threshold while the other switch of the cell moves the
// node. Every evaluated device has Vth and Margin (the static margin of the
// off level when nothing moves its drain); the dv/dt fields are filled for
// the synchronous switch, whose drain the control switch hard-switches.
type FalseTurnOn struct {
	// DvDtOn is the mean slope of this switch's drain voltage during the
	// other switch's hard turn-on, V/s (positive; 0: no exposure).
	DvDtOn float64
	// DvDtOff is the mean slope at the other switch's hard turn-off, V/s
	// (the drain falls: it pulls the gate negative; 0: no exposure).
	DvDtOff float64
	// Cgd is the charge-equivalent gate-drain capacitance over the swing,
	// Cgs the gate-source capacitance, F.
	Cgd, Cgs q.Capacitance
	// R is the off-state gate loop: driver sink + external + internal, Ω.
	R q.Resistance
	// Bounce is the positive gate excursion above the off level, V.
	Bounce q.Voltage
	// Vth is the threshold at the solved junction temperature, V.
	Vth q.Voltage
	// Margin is Vth − (Voff + Bounce), V: ≤ 0 sets ScreenFalseTurnOn.
	Margin q.Voltage
	// Spike is the negative gate excursion below the off level at the
	// other edge, V (≥ 0).
	Spike q.Voltage
	// SpikeMargin is (Voff − Spike) − vgs_min, V: < 0 sets FlagGateSpike.
	SpikeMargin q.Voltage
	// Checked is true when the dv/dt bounce was computed.
	Checked bool
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
	Derate   q.Ratio  // the stage's voltage derating, for the screen's message
	RF       RFResult // class E and class D values (zero for other stages)
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
//
// Each device's junction temperature is solved with its whole loss
// (conduction, edges, dead time, gate) depending on temperature. The two
// devices of a synchronous cell couple one way in this model: the
// synchronous switch's recovered charge, which rises with its temperature,
// is dissipated in the control switch, while nothing of the control switch
// depends on the synchronous switch's temperature. So the synchronous switch
// is solved first, then the control switch with the recovered charge at the
// synchronous switch's junction temperature, then the synchronous switch's
// off-state checks, which need the control switch's edges at its own
// temperature (docs/second-order.md).
func Evaluate(pt *Point, dev, partner *Device, tr *Trace) Result {
	var r Result
	EvaluateInto(&r, pt, dev, partner, tr)
	return r
}

// EvaluateInto is Evaluate writing into r, which it overwrites whole: the
// hot loops use it to keep the result where it is wanted instead of
// copying it out.
func EvaluateInto(r *Result, pt *Point, dev, partner *Device, tr *Trace) {
	var oss ossMemo
	// Each device evaluated below is reset by evalDevice; the rest here.
	r.Dev, r.Partner, r.Position, r.Derate = dev, nil, pt.Stage.Position, pt.Stage.Derate
	r.N, r.Losses, r.Flags, r.Screens, r.RF = 0, Losses{}, 0, 0, RFResult{}
	if pt.Stage.Topology.resonant() {
		r.Devices = [2]DeviceResult{}
		evaluateRF(r, pt, dev, tr)
	} else if !pt.HasSync {
		r.N = 1
		r.Devices[1] = DeviceResult{}
		var k partnerCharge
		if pt.HasDiode {
			k = diodePartner(&pt.Stage.Diode, pt.Ctrl.V)
		}
		evalDevice(&r.Devices[0], pt, dev, RoleControl, &pt.Ctrl, &k, &oss, tr)
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
		evalDevice(&r.Devices[1], pt, sync, RoleSync, &pt.Sync, nil, &oss, tr)
		k := devicePartner(sync, oss.at(sync, pt.Ctrl.V), &r.Devices[1])
		evalDevice(&r.Devices[0], pt, ctrl, RoleControl, &pt.Ctrl, &k, &oss, tr)
		r.Devices[0].Flags |= k.flags
		offSwitchChecks(&r.Devices[1], &r.Devices[0], pt, &oss, tr)
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
}

// driveScreens applies the screens of the peak current and the gate drive:
// the pulsed rating, the gate ratings, and the drive against the threshold
// and the plateau vplPk at the peak current.
func driveScreens(out *DeviceResult, d *Device, drv *Driver, vplPk q.Voltage) {
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
		out.Flags |= FlagVgsMinDefault
	}
	if drv.VOn <= d.Vth {
		out.Screens |= ScreenBelowThreshold
	} else if drv.VOn <= vplPk {
		out.Screens |= ScreenBelowPlateau
	}
}

// partnerCharge is what the complementary device contributes at the control
// switch's hard turn-on.
type partnerCharge struct {
	qoss  q.Charge      // its output charge at the cell voltage
	eoss  q.Energy      // its stored energy at the cell voltage
	qrr   q.Charge      // its recovered charge (at its junction temperature)
	tj    q.Temperature // its junction temperature (transistor partner)
	lloop q.Inductance  // its package share of the power loop
	flags Flags
	dev   *Device // the partner transistor (nil: diode or ideal)
}

func diodePartner(d *Diode, v q.Voltage) partnerCharge {
	return partnerCharge{
		qoss: q.Charge(float64(d.Cj) * float64(v)),
		eoss: q.Energy(0.5 * float64(d.Cj) * float64(v) * float64(v)),
		qrr:  d.Qrr,
	}
}

// devicePartner is the synchronous switch k seen from the control switch,
// with its output-capacitance law at the cell voltage, ok, and its
// recovered charge at its solved junction temperature kr.Thermal.
func devicePartner(k *Device, ok OssPoint, kr *DeviceResult) partnerCharge {
	p := partnerCharge{qoss: ok.Q(), eoss: ok.E(), lloop: k.Lloop, tj: kr.Thermal.Tj, dev: k}
	if !kr.Thermal.Found {
		p.tj = k.TjMax
	}
	if k.Part.Technology == devices.GaN || kr.Stress.IDead2 <= 0 && kr.Stress.IDead1 <= 0 {
		return p
	}
	if !k.Part.Qrr.OK {
		p.flags |= FlagQrrMissing
		return p
	}
	p.qrr = k.Qrr.At(p.tj)
	p.flags |= FlagQrrInModel
	if !k.QrrHot && p.tj != k.Qrr.T0 {
		p.flags |= FlagQrrTempDefault
	}
	if k.Part.QrrHasCoss {
		p.qrr = max(0, p.qrr-p.qoss)
		p.flags |= FlagQrrLessCoss
	}
	return p
}

// ossMemo keeps an evaluation's output-capacitance laws at the voltages
// last asked for: one power evaluation per device and voltage serves the
// turn-on energy, the partner's charge, the turn-off integral and the
// overshoot checks.
type ossMemo [2]struct {
	d *Device
	p OssPoint
}

func (m *ossMemo) at(d *Device, v q.Voltage) OssPoint {
	for i := range m {
		if m[i].d == d && m[i].p.V == v {
			return m[i].p
		}
	}
	m[1] = m[0]
	m[0].d, m[0].p = d, d.Oss.At(v)
	return m[0].p
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

// devModel is what one device's evaluation fixes before the thermal solve;
// at computes everything that depends on the junction temperature. The
// temperature moves the threshold and the plateau by the same amount, so
// the plateau overdrives, the Qgs2 segments and the Miller charges are
// fixed here once (the thermal loop calls at at every iterate).
type devModel struct {
	d             *Device
	s             *Stage
	st            *SwitchStress
	f             float64
	hard, driveOK bool
	dead          bool         // dead-time conduction (synchronous switch)
	rOn, rOff     q.Resistance // gate loops: driver + external + internal
	rdOn, rdOff   q.Resistance // effective driver resistances (peak-current limits included)
	vdsGate       q.Voltage    // drain voltage of the gate-charge curve
	lcs           q.Inductance // common-source inductance in the gate loop
	lloop         q.Inductance // power-loop inductance at the hard edges

	// Fixed by prepare.
	odOn, odOff, odPk       q.Voltage     // plateau overdrive Vpl − Vth at the turn-on, turn-off and peak currents
	qgs2On, qgs2Off, qgs2Pk q.Charge      // threshold-to-plateau charge at those currents
	qgdV, qgdGate           q.Charge      // Miller charge at the switched voltage and at the gate curve's voltage
	rise                    RiseIntegral  // the turn-off voltage rise (Device.HasMiller)
	risePow                 powNear       // its a^(−1/N) across the thermal loop's calls
	cossSmall               q.Capacitance // small-signal output capacitance at the switched voltage
	qthPerV                 float64       // charge to the threshold per volt of threshold, C/V
	oss                     OssPoint      // output capacitance at the switched voltage
	linGate                 gateFigures   // the linear gate's (tr/tf method: temperature-independent)
	split                   [2]GateSplit  // SplitGateEnergy's shares of 1 J at turn-on and at turn-off
	rRev, rRev25            float64       // GaN reverse-conduction resistance at rds_on_tj and at 25 °C, Ω
}

// prepare fixes the temperature-independent parts of at.
func (m *devModel) prepare() {
	d, st, drv := m.d, m.st, &m.s.Driver
	od := func(i q.Current) (q.Voltage, q.Charge) {
		v := max(PlateauAt(d.Vth, d.VplSpec, d.QgId, i)-d.Vth, 1e-3)
		return v, d.Qgs2 * q.Charge(v/(d.VplSpec-d.Vth))
	}
	m.odOn, m.qgs2On = od(st.IOn)
	m.odOff, m.qgs2Off = od(st.IOff)
	m.odPk, m.qgs2Pk = od(st.IPeak)
	if d.HasMiller {
		m.qgdV, m.qgdGate = d.Miller.Charge(st.V), d.Miller.Charge(m.vdsGate)
		if m.hard {
			m.rise = d.rise.atPower(st.V, m.oss.pv)
			m.risePow = powNear{s: &d.risePow}
			m.cossSmall = q.Capacitance(m.rise.cossTop)
		}
	} else {
		m.qgdV = MillerChargeAt(d.Qgd, d.QgVds, st.V)
		m.qgdGate = MillerChargeAt(d.Qgd, d.QgVds, m.vdsGate)
	}
	if m.cossSmall == 0 && st.V > 0 && m.lloop > 0 {
		m.cossSmall = m.oss.C()
	}
	if d.Vth > 0 {
		m.qthPerV = float64(d.Qth) / float64(d.Vth)
	}
	m.split[0] = SplitGateEnergy(1, 0, m.rdOn, m.rdOff, drv.RgExt, d.RgInt)
	m.split[1] = SplitGateEnergy(1, 1, m.rdOn, m.rdOff, drv.RgExt, d.RgInt)
	if d.Method != MethodGateCharge {
		g := &m.linGate
		g.qg = d.Part.Qg * q.Charge((drv.VOn-drv.VOff)/d.Part.QgVgs)
		g.egate = q.Energy(float64(g.qg) * float64(drv.VOn-drv.VOff))
		g.stored = g.egate / 2
		g.split = SplitGateEnergy(g.egate, g.stored, m.rdOn, m.rdOff, drv.RgExt, d.RgInt)
	}
	if m.dead && d.Part.Technology == devices.GaN {
		m.rRev = float64(d.Gate.At(d.Part.RdsOnVgs))
		m.rRev25 = m.rRev * d.Temp.Factor(25)
	}
}

// gateFigures are the gate drive's charge and energies per cycle.
type gateFigures struct {
	qg            q.Charge
	egate, stored q.Energy
	split         GateSplit
}

// tempState is a device's temperature-dependent results at one Tj.
type tempState struct {
	vth, vplOn, vplOff q.Voltage
	qg                 q.Charge
	egate, stored      q.Energy
	split              GateSplit
	trans              Transitions // with the common-source inductance
	tir0, tif0         q.Time      // current intervals without it
	tRise, tFall       q.Time      // the intervals in which the loop current changes
	eon, eoff          q.Energy
	elcsOn, elcsOff    q.Energy  // added by the common-source inductance
	eloop              q.Energy  // net added by the loop inductance
	iTop               q.Current // channel current left when the turn-off voltage rise ends
	vpeak              q.Voltage
	vsd1, vsd2         q.Voltage
	edead              q.Energy
	p                  q.Power // edges + dead time + gate (Rg,int) loss in the switch
}

// at fills a with the device's temperature-dependent results at tj.
func (m *devModel) at(tj q.Temperature, a *tempState) {
	d, st, drv := m.d, m.st, &m.s.Driver
	p := d.Part
	vth := d.ThresholdAt(tj)
	a.vth, a.vplOn, a.vplOff = vth, vth+m.odOn, vth+m.odOff

	// Gate drive over the curve at temperature (Qth follows the threshold:
	// a constant Cgs).
	if d.Method == MethodGateCharge {
		c := GateCurve{Qth: q.Charge(m.qthPerV * float64(vth)), Qgs2: m.qgs2Pk, Qgd: m.qgdGate, Vth: vth, Vpl: vth + m.odPk, Slope: d.Slope}
		if m.qthPerV == 0 {
			c.Qth = d.Qth
		}
		var qOn, qOff q.Charge
		if drv.VOn > c.Vpl { // GateCurve.Charge above the plateau
			qOn = c.Qth + c.Qgs2 + c.Qgd + q.Charge(float64(c.Slope)*float64(drv.VOn-c.Vpl))
		} else {
			qOn = c.Charge(drv.VOn)
		}
		if drv.VOff <= 0 && m.qthPerV != 0 { // first segment, whatever Tj
			qOff = q.Charge(m.qthPerV * float64(drv.VOff))
		} else {
			qOff = c.Charge(drv.VOff)
		}
		a.qg = qOn - qOff
		a.egate = q.Energy(float64(a.qg) * float64(drv.VOn-drv.VOff)) // GateEnergy
		a.stored = c.storedEnergy(drv.VOff, drv.VOn, qOff, qOn)
		// SplitGateEnergy(egate, stored, ...) through its ratios: the
		// turn-on edge dissipates egate − stored, the turn-off edge stored.
		on, off := float64(a.egate-a.stored), float64(a.stored)
		k0, k1 := &m.split[0], &m.split[1]
		a.split = GateSplit{
			Driver: q.Energy(on*float64(k0.Driver) + off*float64(k1.Driver)),
			Rext:   q.Energy(on*float64(k0.Rext) + off*float64(k1.Rext)),
			Rint:   q.Energy(on*float64(k0.Rint) + off*float64(k1.Rint)),
		}
	} else {
		a.qg, a.egate, a.stored, a.split = m.linGate.qg, m.linGate.egate, m.linGate.stored, m.linGate.split
	}

	// Hard edges.
	if m.hard && m.driveOK {
		v := st.V
		// Gate currents at the plateaus (the voltage edges).
		igOn := GateCurrent(drv.VOn, a.vplOn, m.rOn, drv.IPeakSource)
		igOff := GateCurrent(drv.VOff, a.vplOff, m.rOff, drv.IPeakSink)
		if d.Method == MethodGateCharge {
			// Gate-charge intervals (GateChargeTransitions with the mean
			// gate voltage; the current intervals through
			// CurrentTransitionTime, which adds the common-source term).
			hOn := max(drv.VOn-(vth+a.vplOn)/2, 1e-3)
			hOff := max((vth+a.vplOff)/2-drv.VOff, 1e-3)
			a.trans.Tir = CurrentTransitionTime(m.qgs2On, hOn, m.rOn, drv.IPeakSource, m.lcs, st.IOn)
			a.trans.Tif = CurrentTransitionTime(m.qgs2Off, hOff, m.rOff, drv.IPeakSink, m.lcs, st.IOff)
			a.trans.Tvf = chargeTime(m.qgdV, igOn)
			a.trans.Tvr = chargeTime(m.qgdV, igOff)
			a.tRise, a.tFall = a.trans.Tir, a.trans.Tif
		} else {
			ron, roff := m.rOn, m.rOff
			if drv.IPeakSource > 0 {
				ron = max(ron, q.Resistance(float64(drv.VOn-a.vplOn)/float64(drv.IPeakSource)))
			}
			if drv.IPeakSink > 0 {
				roff = max(roff, q.Resistance(float64(a.vplOff-drv.VOff)/float64(drv.IPeakSink)))
			}
			rs, h := d.TswR, d.TswHead
			if !d.TswOK {
				rs, h = 0, [2]q.Voltage{}
			}
			ton := ScaleSwitchingTime(p.Tr.V, rs, ron, h[0], drv.VOn-a.vplOn)
			toff := ScaleSwitchingTime(p.Tf.V, rs, roff, h[1], a.vplOff-drv.VOff)
			a.trans = Transitions{Tvf: ton, Tvr: toff}
			// The loop current changes over the whole stated time: a
			// lower bound on di/dt (docs/second-order.md).
			a.tRise, a.tFall = ton, toff
		}
		if st.HardOn {
			eMiller := OverlapEnergy(v, st.IOn, 0, a.trans.Tvf)
			if d.HasMiller {
				eMiller = MillerFallEnergy(d.Miller, v, st.IOn, igOn)
			}
			if d.Method == MethodGateCharge {
				a.eon = CurrentRiseEnergy(v, st.IOn, a.trans.Tir, m.lloop) + eMiller
			} else {
				a.eon = eMiller
			}
		}
		if st.HardOff {
			a.eoff = CurrentFallEnergy(v, st.IOff, a.tFall, m.lloop)
			if d.HasMiller {
				// The load current charges Coss while the voltage rises:
				// the channel keeps only the rest (MillerRiseEnergy).
				evr, iTop := m.rise.energy(st.IOff, igOff, &m.risePow)
				a.iTop = iTop
				// The loop's stored ½·L·I² is counted in the switch
				// (docs/second-order.md; the ngspice cells agree within
				// the suite's tolerance, docs/spice-crosscheck.md).
				a.eoff = evr + CurrentFallEnergy(v, iTop, a.tFall, 0) +
					q.Energy(0.5*float64(m.lloop)*float64(st.IOff)*float64(st.IOff))
			} else if d.Method == MethodGateCharge {
				a.iTop = st.IOff
				a.eoff += OverlapEnergy(v, st.IOff, a.trans.Tvr, 0)
			} else {
				a.iTop = st.IOff
			}
		}
	}

	// Dead-time reverse conduction.
	if m.dead {
		a.vsd1, a.vsd2 = m.reverseDrops(tj)
		a.edead = DeadTimeEnergy(a.vsd1, st.IDead1, m.s.DeadTime.V, a.vsd2, st.IDead2, m.s.DeadTime.V)
	}
	a.p = q.Power(float64(a.eon+a.eoff+a.edead+a.split.Rint) * m.f)
}

// finish adds to a, computed by at, what the thermal loop does not need:
// the shares of the common-source and loop inductances and the drain peak.
func (m *devModel) finish(a *tempState) {
	d, st, drv := m.d, m.st, &m.s.Driver
	a.vpeak = st.V
	a.tir0, a.tif0 = a.trans.Tir, a.trans.Tif
	a.elcsOn, a.elcsOff, a.eloop = 0, 0, 0
	if !m.hard || !m.driveOK {
		return
	}
	v := st.V
	if m.lcs > 0 { // gate-charge method only
		hOn := max(drv.VOn-(a.vth+a.vplOn)/2, 1e-3)
		hOff := max((a.vth+a.vplOff)/2-drv.VOff, 1e-3)
		a.tir0 = CurrentTransitionTime(m.qgs2On, hOn, m.rOn, drv.IPeakSource, 0, st.IOn)
		a.tif0 = CurrentTransitionTime(m.qgs2Off, hOff, m.rOff, drv.IPeakSink, 0, st.IOff)
	}
	if st.HardOn && d.Method == MethodGateCharge {
		eir := CurrentRiseEnergy(v, st.IOn, a.trans.Tir, m.lloop)
		if m.lcs > 0 {
			a.elcsOn = eir - CurrentRiseEnergy(v, st.IOn, a.tir0, m.lloop)
		}
		if m.lloop > 0 {
			a.eloop = eir - CurrentRiseEnergy(v, st.IOn, a.trans.Tir, 0)
		}
	}
	if !st.HardOff {
		return
	}
	if m.lcs > 0 {
		a.elcsOff = OverlapEnergy(v, a.iTop, a.trans.Tif-a.tif0, 0)
	}
	if m.lloop > 0 {
		a.eloop += q.Energy(0.5 * float64(m.lloop) * float64(st.IOff) * float64(st.IOff))
		gm := 0.0
		if a.vplOff > a.vth {
			gm = 2 * float64(st.IOff) / float64(a.vplOff-a.vth) // square-law channel at the plateau
		}
		a.vpeak = LoopOvershootLcs(v, m.lloop, m.lcs, gm, m.rOff, d.Cgs+d.Crss, st.IOff, a.iTop, a.tFall, m.cossSmall)
	}
}

// chargeTime is the time gate current i takes to move charge qq (+Inf when
// no current flows).
func chargeTime(qq q.Charge, i q.Current) q.Time {
	if i <= 0 {
		return q.Time(math.Inf(1))
	}
	return q.Time(float64(qq) / float64(i))
}

// reverseDrops are the reverse-conduction drops in the two dead times at
// tj (Device.reverseDrop, with the GaN resistances fixed by prepare).
func (m *devModel) reverseDrops(tj q.Temperature) (q.Voltage, q.Voltage) {
	d, st := m.d, m.st
	voff := m.s.Driver.VOff
	if m.rRev == 0 {
		return d.reverseDrop(st.IDead1, voff, tj), d.reverseDrop(st.IDead2, voff, tj)
	}
	r := m.rRev * d.Temp.Factor(tj)
	return d.ganReverseDrop(st.IDead1, voff, tj, r, m.rRev25), d.ganReverseDrop(st.IDead2, voff, tj, r, m.rRev25)
}

func evalDevice(out *DeviceResult, pt *Point, d *Device, role Role, st *SwitchStress, k *partnerCharge, oss *ossMemo, tr *Trace) {
	p := d.Part
	s := &pt.Stage
	drv := &s.Driver
	f := float64(s.Fsw)
	*out = DeviceResult{}
	out.Dev, out.Role, out.Method, out.Flags, out.Stress, out.RdsDyn = d, role, d.Method, d.Flags, *st, 1
	name := role.String()
	var m devModel
	m.d, m.s, m.st, m.f = d, s, st, f
	m.hard, m.dead = st.HardOn || st.HardOff, role == RoleSync && s.DeadTime.OK

	// Gate loop: driver, external and internal gate resistance.
	m.rOn = drv.RSource + drv.RgExt + d.RgInt
	m.rOff = drv.RSink + drv.RgExt + d.RgInt
	vplPk := PlateauAt(d.Vth, d.VplSpec, d.QgId, st.IPeak)

	// Screens that need no temperature.
	driveScreens(out, d, drv, vplPk)
	if drv.VOn < d.VgsLow {
		out.Flags |= FlagRdsExtrapolated
	}
	if p.Technology == devices.SiC && drv.VOn < sicDriveMin {
		out.Flags |= FlagSiCLowDrive
	}
	m.driveOK = out.Screens&(ScreenBelowThreshold|ScreenBelowPlateau) == 0

	// Gate drive: the curve at the working drain voltage (0 V for a
	// soft-switched edge: no Miller plateau); driver resistances raised
	// where the peak-current limit binds.
	if m.hard {
		m.vdsGate = st.V
	}
	m.rdOn, m.rdOff = drv.RSource, drv.RSink
	if drv.IPeakSource > 0 && drv.VOn-vplPk > 0 {
		if r := q.Resistance(float64(drv.VOn-vplPk)/float64(drv.IPeakSource)) - drv.RgExt - d.RgInt; r > m.rdOn {
			m.rdOn = r
			out.Flags |= FlagDriverLimited
		}
	}
	if drv.IPeakSink > 0 && vplPk-drv.VOff > 0 {
		if r := q.Resistance(float64(vplPk-drv.VOff)/float64(drv.IPeakSink)) - drv.RgExt - d.RgInt; r > m.rdOff {
			m.rdOff = r
			out.Flags |= FlagDriverLimited
		}
	}

	// Parasitic inductances of the hard edges. The tr/tf method's measured
	// times already contain the package's common-source inductance.
	if m.hard && m.driveOK {
		if d.Method == MethodGateCharge && d.Lcs > 0 {
			m.lcs = d.Lcs
			out.Lcs = d.Lcs
			out.Flags |= FlagLcs
		}
		m.lloop = s.LoopInductance + d.Lloop
		if k != nil {
			m.lloop += k.lloop
		}
		if m.lloop > 0 {
			out.Lloop = m.lloop
			out.Flags |= FlagLoopL
		}
	}

	m.oss = oss.at(d, st.V)
	m.prepare()

	// Output capacitance and recovery at the hard turn-on: independent of
	// this switch's temperature (the partner's recovered charge is taken at
	// the partner's junction temperature).
	if st.HardOn {
		var kq q.Charge
		var ke q.Energy
		if k != nil {
			kq, ke, out.Qrr = k.qoss, k.eoss, k.qrr
		}
		es := m.oss.E()
		out.Ecoss = HardTurnOnCossEnergy(es, st.V, kq, ke)
		out.Erec = RecoveryEnergy(out.Qrr, st.V)
		out.Losses.Coss = q.Power(float64(out.Ecoss) * f)
		out.Losses.Recovery = q.Power(float64(out.Erec) * f)
		if st.V < d.OssV/2 || st.V > 2*d.OssV {
			out.Flags |= FlagOssFar
		}
		if tr != nil {
			tr.add(name, "output capacitance", "E = E_oss,S(V) + V·Q_oss,K(V) − E_oss,K(V) (K: the device across the cell)",
				T("V", st.V), T("E_oss,S", es), T("Q_oss,K", kq), T("E_oss,K", ke), T("E/cycle", out.Ecoss), T("P", out.Losses.Coss))
			terms := []Term{T("Qrr", out.Qrr), T("V", st.V), T("P", out.Losses.Recovery)}
			formula := "E = Qrr·V (the partner's recovered charge flows through this switch at full voltage)"
			if k != nil && k.qrr > 0 && k.tj != 0 {
				formula = "E = Qrr(Tj,partner)·V (the partner's recovered charge, at its junction temperature, flows through this switch at full voltage)"
				terms = append(terms, T("Tj partner", k.tj))
			}
			tr.add(name, "recovery", formula, terms...)
		}
	}

	// Conduction (dynamic factor for the blocked voltage) and the thermal
	// loop over the whole temperature-dependent loss.
	r0 := d.Gate.At(drv.VOn)
	if !m.driveOK {
		r0 = d.Gate.At(max(drv.VOn, d.Vth+0.1))
	}
	if d.DynK > 1 {
		out.RdsDyn = DynamicRdsFactor(d.DynK, d.DynV, st.V)
		out.Flags |= FlagRdsDyn
		if d.DynV == 0 || st.V > d.DynV {
			out.Flags |= FlagRdsDynFar
		}
	}
	rdyn := r0 * q.Resistance(out.RdsDyn)
	rthv, fl := rth(p, s)
	out.Rth, out.Flags = rthv, out.Flags|fl
	esoft := softTurnOn(out, pt, d, st, k, tr) // light-load turn-on (point.go)
	fixed := out.Losses.Coss + out.Losses.Recovery + q.Power(float64(esoft)*f)
	// The solver's last evaluation is usually at the temperature it
	// returns: keep it and compute again only when it is not.
	var a tempState
	lastT := q.Temperature(math.NaN())
	other := func(t q.Temperature) q.Power {
		m.at(t, &a)
		lastT = t
		return a.p
	}
	tm := ThermalModel{Fixed: fixed, Cond: Conduction(st.IRms, rdyn), Law: &d.Temp, Other: other}
	tj := junction(&out.Thermal, &tm, s, rthv, d.TjMax)

	// Everything at the solved temperature.
	if lastT != tj {
		m.at(tj, &a)
	}
	m.finish(&a)
	out.Vth, out.VplOn, out.VplOff = a.vth, a.vplOn, a.vplOff
	out.Qg, out.Egate = a.qg, a.egate
	out.Losses.GateDriver = q.Power(float64(a.split.Driver) * f)
	out.Losses.GateRext = q.Power(float64(a.split.Rext) * f)
	out.Losses.GateRint = q.Power(float64(a.split.Rint) * f)
	out.Losses.DriverQuiescent = q.Power(float64(drv.VOn-drv.VOff) * float64(drv.IQ))
	out.Trans, out.Eon, out.Eoff = a.trans, a.eon, a.eoff
	out.ElcsOn, out.ElcsOff, out.Eloop, out.Vpeak = a.elcsOn, a.elcsOff, a.eloop, a.vpeak
	out.Losses.TurnOn = q.Power(float64(a.eon) * f)
	out.Losses.TurnOff = q.Power(float64(a.eoff) * f)
	out.Vsd1, out.Vsd2, out.Edead = a.vsd1, a.vsd2, a.edead
	out.Losses.DeadTime = q.Power(float64(a.edead) * f)
	out.Edead += esoft
	out.Losses.DeadTime += q.Power(float64(esoft) * f)
	if m.dead && !p.Vsd.OK {
		out.Flags |= FlagVsdDefault
	}
	out.Rds = rdyn * q.Resistance(d.Temp.Factor(tj))
	out.Losses.Conduction = Conduction(st.IRms, out.Rds)
	if tj != 25 && (m.hard && m.driveOK || m.dead || d.Method == MethodGateCharge) &&
		!(d.VthOwn && (d.VsdOwn || !m.dead || p.Technology == devices.GaN)) {
		out.Flags |= FlagVthTempDefault
	}
	if tr != nil {
		traceDevice(tr, name, out, &m, &a, fixed, r0, tj)
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
	if out.Vpeak > q.Voltage(s.Derate)*p.VdsMax {
		out.Screens |= ScreenVoltage
	}
	// Off-state margin with nothing moving the drain: the off level
	// against the hot threshold. offSwitchChecks adds the dv/dt bounce.
	out.FalseOn.Vth = a.vth
	out.FalseOn.Margin = a.vth - drv.VOff
	if out.FalseOn.Margin <= 0 {
		out.Screens |= ScreenFalseTurnOn
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

// traceDevice records the temperature-dependent steps of one device.
func traceDevice(tr *Trace, name string, out *DeviceResult, m *devModel, a *tempState, fixed q.Power, r0 q.Resistance, tj q.Temperature) {
	d, st, s := m.d, m.st, m.s
	drv := &s.Driver
	hist := make([]Term, 0, 16)
	for i := 0; i < out.Thermal.Iterations && i < len(out.Thermal.History); i++ {
		hist = append(hist, T("iterate", out.Thermal.History[i]))
	}
	hist = append(hist, T("Ta", s.Ambient), T("Rth", out.Rth), T("P fixed", fixed),
		T("P edges+dead+gate at Tj", a.p), T("P conduction at Tj", out.Losses.Conduction),
		N("loop gain", out.Thermal.Gain), N("steps", float64(out.Thermal.Iterations)), T("Tj", out.Thermal.Tj))
	tr.add(name, "thermal", "Tj = Ta + Rth·P(Tj), P(Tj) the whole device loss (conduction, edges, dead time, gate), fixed point from Ta ("+out.Thermal.Status.String()+")", hist...)
	terms := []Term{T("Tj", tj), N("Vth tempco (V/K)", d.VthTC), T("Vth 25 °C", d.Vth), T("Vth at Tj", a.vth),
		T("Vpl spec 25 °C", d.VplSpec), T("Vpl on at Tj", a.vplOn), T("Vpl off at Tj", a.vplOff)}
	if m.dead {
		terms = append(terms, N("Vsd tempco (V/K)", d.VsdTC))
	}
	tr.add(name, "temperature", "Vth(Tj) = Vth(25 °C) + k·(Tj − 25 °C); the plateau moves with it (lower plateau: faster turn-on, slower turn-off)", terms...)
	tr.add(name, "gate", "P_G = [Qg(Von) − Qg(Voff)]·(Von − Voff)·f over the curve at Tj, split per edge by the loop resistances",
		T("Qg moved", a.qg), T("Von", drv.VOn), T("Voff", drv.VOff), T("E stored in gate", a.stored),
		T("R src (effective)", m.rdOn), T("R snk (effective)", m.rdOff), T("Rg ext", drv.RgExt), T("Rg int", d.RgInt),
		T("E gate/cycle", a.egate), T("driver", out.Losses.GateDriver), T("Rg ext", out.Losses.GateRext),
		T("Rg int", out.Losses.GateRint), T("quiescent", out.Losses.DriverQuiescent))
	if m.hard && m.driveOK {
		if d.Method == MethodGateCharge {
			tr.add(name, "transitions", "gate-charge method at Tj: t = Q / I_gate, I_gate = (V_drive − V_gate)/R_loop (at the mean gate voltage (Vth+Vpl)/2 while the current moves)",
				T("Qgd at V", MillerChargeAt(d.Qgd, d.QgVds, st.V)), T("Vth", a.vth),
				T("Vpl on", a.vplOn), T("Vpl off", a.vplOff), T("R loop on", m.rOn), T("R loop off", m.rOff),
				T("t_ir", a.trans.Tir), T("t_vf", a.trans.Tvf), T("t_vr", a.trans.Tvr), T("t_if", a.trans.Tif))
		} else {
			tr.add(name, "transitions", "datasheet times at Tj: t = t_10-90/0.8 · (R_loop/R_test) · (headroom_test/headroom)",
				T("tr", d.Part.Tr.V), T("tf", d.Part.Tf.V), T("R test", d.TswR),
				T("headroom on", drv.VOn-a.vplOn), T("headroom off", a.vplOff-drv.VOff),
				T("t on", a.trans.Tvf), T("t off", a.trans.Tvr))
		}
		if m.lcs > 0 {
			tr.add(name, "common-source inductance", "t = (R·Qgs2 + Lcs·I)/(V_drive − V_gate,mean): Lcs·di/dt is taken out of the gate loop while the current moves",
				T("Lcs", m.lcs), T("t_ir without", a.tir0), T("t_ir with", a.trans.Tir), T("t_if without", a.tif0), T("t_if with", a.trans.Tif),
				T("ΔE on", a.elcsOn), T("ΔE off", a.elcsOff))
		}
		if m.lloop > 0 {
			tr.add(name, "loop inductance", "turn-on: the switch sees V − L·di/dt while the current rises; turn-off: V + L·di/dt while it falls (+½·L·I²); peak = V + L·I_off/t_fall",
				T("L loop (layout + packages)", m.lloop), T("layout", s.LoopInductance), T("own package", d.Lloop),
				T("I off", st.IOff), T("t fall", a.tFall), T("V peak", a.vpeak),
				T("½·L·I_off²", q.Energy(0.5*float64(m.lloop)*float64(st.IOff)*float64(st.IOff))),
				T("net ΔE per cycle", a.eloop))
		}
		tr.add(name, "overlap", "E = ½·V·I·t per interval (loop and common-source inductance included); P = E·f",
			T("V", st.V), T("I on", st.IOn), T("I off", st.IOff), T("E on", a.eon), T("E off", a.eoff),
			T("P on", out.Losses.TurnOn), T("P off", out.Losses.TurnOff))
	}
	if m.dead {
		tr.add(name, "dead time", "E = Vsd(Tj)·(I1·t_dt + I2·t_dt)",
			T("Vsd 1", a.vsd1), T("I1", st.IDead1), T("Vsd 2", a.vsd2), T("I2", st.IDead2), T("t_dt", s.DeadTime.V),
			T("P", out.Losses.DeadTime))
	}
	if out.RdsDyn > 1 {
		tr.add(name, "dynamic on-resistance", "k(V) = 1 + (k_test − 1)·V/V_test (k_test as stated when V_test is unknown)",
			N("k test", float64(d.DynK)), T("V test", d.DynV), T("V blocked", st.V), N("k(V)", out.RdsDyn))
	}
	tr.add(name, "conduction", "P = I_rms²·Rds(on)(Vgs, Tj), Rds = [R0 + k/(Vgs − Vth)]·F(Tj)·k_dyn",
		T("I rms", st.IRms), T("R at Vgs, T0", r0), T("T0", d.Temp.T0), N("F(Tj)", d.Temp.Factor(tj)), N("k dyn", out.RdsDyn),
		T("Rds", out.Rds), T("P", out.Losses.Conduction))
	tr.add(name, "off-state margin", "margin = Vth(Tj) − Voff (static; the dv/dt bounce of the synchronous switch follows)",
		T("Vth at Tj", a.vth), T("Voff", drv.VOff), T("margin", a.vth-drv.VOff))
}

// offSwitchChecks screens the synchronous switch sy, which is off while the
// control switch ct hard-switches the node: the dv/dt gate bounce at ct's
// turn-on against sy's hot threshold, the negative bounce at ct's turn-off
// against vgs_min, and the loop overshoot of the turn-on commutation.
func offSwitchChecks(sy, ct *DeviceResult, pt *Point, oss *ossMemo, tr *Trace) {
	d := sy.Dev
	s := &pt.Stage
	drv := &s.Driver
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
			ramp := LoopOvershoot(v, l, ct.Stress.IOn, ct.Stress.IOn, tRise, 0)
			coss := oss.at(d, v).C()
			ring := LoopOvershoot(v, l, ct.Stress.IOn, 0, tRise, coss)
			sy.Vpeak = min(ramp, ring)
			sy.Flags |= FlagLoopL
			if sy.Vpeak > q.Voltage(s.Derate)*d.Part.VdsMax {
				sy.Screens |= ScreenVoltage
			}
			if tr != nil {
				tr.add(sy.Role.String(), "loop overshoot", "V peak = V + min(L·I_on/t_ir of the control switch's turn-on, I_on·√(L/C_oss(V))): the recovered current interrupted at the same rate, at most ringing whole into the output capacitance",
					T("L loop", l), T("I on (control)", ct.Stress.IOn), T("t_ir (control)", tRise), T("C_oss(V)", coss), T("V peak", sy.Vpeak))
			}
		}
	}
	if fo.DvDtOn == 0 && fo.DvDtOff == 0 {
		return
	}
	if fo.Cgd <= 0 || fo.Cgs <= 0 {
		sy.Flags |= FlagFalseOnUnchecked
		return
	}
	fo.Checked = true
	if fo.DvDtOn > 0 {
		fo.Bounce = GateBounce(fo.Cgd, fo.Cgs, v, ct.Trans.Tvf, fo.R)
	}
	if fo.DvDtOff > 0 {
		fo.Spike = GateBounce(fo.Cgd, fo.Cgs, v, ct.Trans.Tvr, fo.R)
	}
	gap := fo.Vth - drv.VOff
	fo.Margin = gap - fo.Bounce
	fo.SpikeMargin = drv.VOff - fo.Spike - d.VgsMin
	switch {
	case fo.Margin <= 0:
		sy.Screens |= ScreenFalseTurnOn
	case fo.Bounce > gap/2:
		sy.Flags |= FlagFalseOnThin
	}
	if fo.SpikeMargin < 0 {
		sy.Flags |= FlagGateSpike
	}
	if tr != nil {
		tr.add(sy.Role.String(), "false turn-on", "ΔV = Cgd·dv/dt·R·(1 − exp(−t/(R·(Cgs + Cgd)))), dv/dt = V/t_vf (control turn-on) or V/t_vr (its turn-off); margin = Vth(Tj) − (Voff + ΔV)",
			T("V", v), N("dv/dt on (V/ns)", fo.DvDtOn*1e-9), N("dv/dt off (V/ns)", fo.DvDtOff*1e-9),
			T("Cgd (charge-equivalent)", fo.Cgd), T("Cgs", fo.Cgs), T("R off loop", fo.R),
			T("bounce", fo.Bounce), T("Vth at Tj", fo.Vth), T("Voff", drv.VOff), T("margin", fo.Margin),
			T("negative spike", fo.Spike), T("vgs_min", d.VgsMin), T("spike margin", fo.SpikeMargin))
	}
}

// reverseDrop is the drop of the reverse-conducting device at current i and
// junction temperature tj: the datasheet vsd (taken at 25 °C) moved by the
// diode coefficient for silicon and SiC body diodes; for GaN, which has no
// body diode, Vth(Tj) + |Voff| + I·R(Tj) (Lidow et al., GaN Transistors for
// Efficient Power Conversion, third-quadrant conduction; team notes,
// common practice), through the datasheet point when vsd and vsd_if are
// given (taken at Voff = 0 and 25 °C).
func (d *Device) reverseDrop(i q.Current, vOff q.Voltage, tj q.Temperature) q.Voltage {
	p := d.Part
	if p.Technology == devices.GaN {
		r0 := float64(d.Gate.At(p.RdsOnVgs)) // at rds_on_tj
		return d.ganReverseDrop(i, vOff, tj, r0*d.Temp.Factor(tj), r0*d.Temp.Factor(25))
	}
	v := vsdSi
	switch {
	case p.Vsd.OK:
		v = p.Vsd.V
	case p.Technology == devices.SiC:
		v = vsdSiC
	}
	return DiodeDropAt(v, d.VsdTC, tj)
}

// ganReverseDrop is reverseDrop for GaN with the channel resistance r at tj
// and r25 at 25 °C given, Ω.
func (d *Device) ganReverseDrop(i q.Current, vOff q.Voltage, tj q.Temperature, r, r25 float64) q.Voltage {
	p := d.Part
	voff := q.Voltage(math.Abs(float64(vOff)))
	vth := d.ThresholdAt(tj)
	v := vth + voff + q.Voltage(float64(i)*r)
	if p.Vsd.OK && p.VsdIf.OK {
		// Shift the datasheet point (at Voff = 0, 25 °C) to this current,
		// off level and temperature.
		v = p.Vsd.V + (vth - d.Vth) + voff + q.Voltage(float64(i)*r-float64(p.VsdIf.V)*r25)
	}
	return max(v, 0)
}
