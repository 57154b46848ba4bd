package evaluate

import (
	"math"
	"swrank/devices"
	q "swrank/devices/quantity"
	"swrank/rank/fit"
	"swrank/rank/loss"
	"swrank/rank/stage"
	"swrank/rank/thermal"
)

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
func Evaluate(pt *stage.Point, dev, partner *fit.Device, tr *Trace) Result {
	var r Result
	EvaluateInto(&r, pt, dev, partner, tr)
	return r
}

// EvaluateInto is Evaluate writing into r, which it overwrites whole: the
// hot loops use it to keep the result where it is wanted instead of
// copying it out.
func EvaluateInto(r *Result, pt *stage.Point, dev, partner *fit.Device, tr *Trace) {
	var oss ossMemo
	// Each device evaluated below is reset by evalDevice; the rest here.
	r.Dev, r.Partner, r.Position, r.Derate = dev, nil, pt.Stage.Position, pt.Stage.Derate
	r.N, r.Losses, r.Flags, r.Screens, r.RF = 0, Losses{}, 0, 0, RFResult{}
	if pt.Stage.Topology.Resonant() {
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
			case stage.Control:
				sync, r.Partner = partner, partner
			case stage.Sync:
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

// partnerCharge is what the complementary device contributes at the control
// switch's hard turn-on.
type partnerCharge struct {
	qoss  q.Charge      // its output charge at the cell voltage
	eoss  q.Energy      // its stored energy at the cell voltage
	qrr   q.Charge      // its recovered charge (at its junction temperature)
	tj    q.Temperature // its junction temperature (transistor partner)
	lloop q.Inductance  // its package share of the power loop
	flags fit.Flags
	dev   *fit.Device // the partner transistor (nil: diode or ideal)
}

func diodePartner(d *stage.Diode, v q.Voltage) partnerCharge {
	return partnerCharge{
		qoss: q.Charge(float64(d.Cj) * float64(v)),
		eoss: q.Energy(0.5 * float64(d.Cj) * float64(v) * float64(v)),
		qrr:  d.Qrr,
	}
}

// devicePartner is the synchronous switch k seen from the control switch,
// with its output-capacitance law at the cell voltage, ok, and its
// recovered charge at its solved junction temperature kr.Thermal.
func devicePartner(k *fit.Device, ok loss.OssPoint, kr *DeviceResult) partnerCharge {
	p := partnerCharge{qoss: ok.Q(), eoss: ok.E(), lloop: k.Lloop, tj: kr.Thermal.Tj, dev: k}
	if !kr.Thermal.Found {
		p.tj = k.TjMax
	}
	if k.Part.Technology == devices.GaN || kr.Stress.IDead2 <= 0 && kr.Stress.IDead1 <= 0 {
		return p
	}
	if !k.Part.Qrr.OK {
		p.flags |= fit.FlagQrrMissing
		return p
	}
	p.qrr = k.Qrr.At(p.tj)
	p.flags |= fit.FlagQrrInModel
	if !k.QrrHot && p.tj != k.Qrr.T0 {
		p.flags |= fit.FlagQrrTempDefault
	}
	if k.Part.QrrHasCoss {
		p.qrr = max(0, p.qrr-p.qoss)
		p.flags |= fit.FlagQrrLessCoss
	}
	return p
}

// ossMemo keeps an evaluation's output-capacitance laws at the voltages
// last asked for: one power evaluation per device and voltage serves the
// turn-on energy, the partner's charge, the turn-off integral and the
// overshoot checks.
type ossMemo [2]struct {
	d *fit.Device
	p loss.OssPoint
}

func (m *ossMemo) at(d *fit.Device, v q.Voltage) loss.OssPoint {
	for i := range m {
		if m[i].d == d && m[i].p.V == v {
			return m[i].p
		}
	}
	m[1] = m[0]
	m[0].d, m[0].p = d, d.Oss.At(v)
	return m[0].p
}

// devModel is what one device's evaluation fixes before the thermal solve;
// at computes everything that depends on the junction temperature. The
// temperature moves the threshold and the plateau by the same amount, so
// the plateau overdrives, the Qgs2 segments and the Miller charges are
// fixed here once (the thermal loop calls at at every iterate).
type devModel struct {
	d             *fit.Device
	s             *stage.Stage
	st            *stage.SwitchStress
	f             float64
	hard, driveOK bool
	dead          bool         // dead-time conduction (synchronous switch)
	rOn, rOff     q.Resistance // gate loops: driver + external + internal
	rdOn, rdOff   q.Resistance // effective driver resistances (peak-current limits included)
	vdsGate       q.Voltage    // drain voltage of the gate-charge curve
	lcs           q.Inductance // common-source inductance in the gate loop
	lloop         q.Inductance // power-loop inductance at the hard edges

	// Fixed by prepare.
	odOn, odOff, odPk       q.Voltage         // plateau overdrive Vpl − Vth at the turn-on, turn-off and peak currents
	qgs2On, qgs2Off, qgs2Pk q.Charge          // threshold-to-plateau charge at those currents
	qgdV, qgdGate           q.Charge          // Miller charge at the switched voltage and at the gate curve's voltage
	rise                    loss.RiseIntegral // the turn-off voltage rise (Device.HasMiller)
	risePow                 loss.PowNear      // its a^(−1/N) across the thermal loop's calls
	cossSmall               q.Capacitance     // small-signal output capacitance at the switched voltage
	qthPerV                 float64           // charge to the threshold per volt of threshold, C/V
	oss                     loss.OssPoint     // output capacitance at the switched voltage
	linGate                 gateFigures       // the linear gate's (tr/tf method: temperature-independent)
	split                   [2]loss.GateSplit // SplitGateEnergy's shares of 1 J at turn-on and at turn-off
	rRev, rRev25            float64           // GaN reverse-conduction resistance at rds_on_tj and at 25 °C, Ω
}

// prepare fixes the temperature-independent parts of at.
func (m *devModel) prepare() {
	d, st, drv := m.d, m.st, &m.s.Driver
	od := func(i q.Current) (q.Voltage, q.Charge) {
		v := max(loss.PlateauAt(d.Vth, d.VplSpec, d.QgId, i)-d.Vth, 1e-3)
		return v, d.Qgs2 * q.Charge(v/(d.VplSpec-d.Vth))
	}
	m.odOn, m.qgs2On = od(st.IOn)
	m.odOff, m.qgs2Off = od(st.IOff)
	m.odPk, m.qgs2Pk = od(st.IPeak)
	if d.HasMiller {
		m.qgdV, m.qgdGate = d.Miller.Charge(st.V), d.Miller.Charge(m.vdsGate)
		if m.hard {
			m.rise = d.Rise.AtPoint(m.oss)
			m.risePow = loss.NewPowNear(&d.RisePow)
			m.cossSmall = q.Capacitance(m.rise.CossTop())
		}
	} else {
		m.qgdV = loss.MillerChargeAt(d.Qgd, d.QgVds, st.V)
		m.qgdGate = loss.MillerChargeAt(d.Qgd, d.QgVds, m.vdsGate)
	}
	if m.cossSmall == 0 && st.V > 0 && m.lloop > 0 {
		m.cossSmall = m.oss.C()
	}
	if d.Vth > 0 {
		m.qthPerV = float64(d.Qth) / float64(d.Vth)
	}
	m.split[0] = loss.SplitGateEnergy(1, 0, m.rdOn, m.rdOff, drv.RgExt, d.RgInt)
	m.split[1] = loss.SplitGateEnergy(1, 1, m.rdOn, m.rdOff, drv.RgExt, d.RgInt)
	if d.Method != fit.MethodGateCharge {
		g := &m.linGate
		g.qg = d.Part.Qg * q.Charge((drv.VOn-drv.VOff)/d.Part.QgVgs)
		g.egate = q.Energy(float64(g.qg) * float64(drv.VOn-drv.VOff))
		g.stored = g.egate / 2
		g.split = loss.SplitGateEnergy(g.egate, g.stored, m.rdOn, m.rdOff, drv.RgExt, d.RgInt)
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
	split         loss.GateSplit
}

// tempState is a device's temperature-dependent results at one Tj.
type tempState struct {
	vth, vplOn, vplOff q.Voltage
	qg                 q.Charge
	egate, stored      q.Energy
	split              loss.GateSplit
	trans              loss.Transitions // with the common-source inductance
	tir0, tif0         q.Time           // current intervals without it
	tRise, tFall       q.Time           // the intervals in which the loop current changes
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
	if d.Method == fit.MethodGateCharge {
		c := loss.GateCurve{Qth: q.Charge(m.qthPerV * float64(vth)), Qgs2: m.qgs2Pk, Qgd: m.qgdGate, Vth: vth, Vpl: vth + m.odPk, Slope: d.Slope}
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
		a.stored = c.StoredEnergyQ(drv.VOff, drv.VOn, qOff, qOn)
		// SplitGateEnergy(egate, stored, ...) through its ratios: the
		// turn-on edge dissipates egate − stored, the turn-off edge stored.
		on, off := float64(a.egate-a.stored), float64(a.stored)
		k0, k1 := &m.split[0], &m.split[1]
		a.split = loss.GateSplit{
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
		igOn := loss.GateCurrent(drv.VOn, a.vplOn, m.rOn, drv.IPeakSource)
		igOff := loss.GateCurrent(drv.VOff, a.vplOff, m.rOff, drv.IPeakSink)
		if d.Method == fit.MethodGateCharge {
			// Gate-charge intervals (GateChargeTransitions with the mean
			// gate voltage; the current intervals through
			// CurrentTransitionTime, which adds the common-source term).
			hOn := max(drv.VOn-(vth+a.vplOn)/2, 1e-3)
			hOff := max((vth+a.vplOff)/2-drv.VOff, 1e-3)
			a.trans.Tir = loss.CurrentTransitionTime(m.qgs2On, hOn, m.rOn, drv.IPeakSource, m.lcs, st.IOn)
			a.trans.Tif = loss.CurrentTransitionTime(m.qgs2Off, hOff, m.rOff, drv.IPeakSink, m.lcs, st.IOff)
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
			ton := loss.ScaleSwitchingTime(p.Tr.V, rs, ron, h[0], drv.VOn-a.vplOn)
			toff := loss.ScaleSwitchingTime(p.Tf.V, rs, roff, h[1], a.vplOff-drv.VOff)
			a.trans = loss.Transitions{Tvf: ton, Tvr: toff}
			// The loop current changes over the whole stated time: a
			// lower bound on di/dt (docs/second-order.md).
			a.tRise, a.tFall = ton, toff
		}
		if st.HardOn {
			eMiller := loss.OverlapEnergy(v, st.IOn, 0, a.trans.Tvf)
			if d.HasMiller {
				eMiller = loss.MillerFallEnergy(d.Miller, v, st.IOn, igOn)
			}
			if d.Method == fit.MethodGateCharge {
				a.eon = loss.CurrentRiseEnergy(v, st.IOn, a.trans.Tir, m.lloop) + eMiller
			} else {
				a.eon = eMiller
			}
		}
		if st.HardOff {
			a.eoff = loss.CurrentFallEnergy(v, st.IOff, a.tFall, m.lloop)
			if d.HasMiller {
				// The load current charges Coss while the voltage rises:
				// the channel keeps only the rest (MillerRiseEnergy).
				evr, iTop := m.rise.EnergyNear(st.IOff, igOff, &m.risePow)
				a.iTop = iTop
				// The loop's stored ½·L·I² is counted in the switch
				// (docs/second-order.md; the ngspice cells agree within
				// the suite's tolerance, docs/spice-crosscheck.md).
				a.eoff = evr + loss.CurrentFallEnergy(v, iTop, a.tFall, 0) +
					q.Energy(0.5*float64(m.lloop)*float64(st.IOff)*float64(st.IOff))
			} else if d.Method == fit.MethodGateCharge {
				a.iTop = st.IOff
				a.eoff += loss.OverlapEnergy(v, st.IOff, a.trans.Tvr, 0)
			} else {
				a.iTop = st.IOff
			}
		}
	}

	// Dead-time reverse conduction.
	if m.dead {
		a.vsd1, a.vsd2 = m.reverseDrops(tj)
		a.edead = loss.DeadTimeEnergy(a.vsd1, st.IDead1, m.s.DeadTime.V, a.vsd2, st.IDead2, m.s.DeadTime.V)
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
		a.tir0 = loss.CurrentTransitionTime(m.qgs2On, hOn, m.rOn, drv.IPeakSource, 0, st.IOn)
		a.tif0 = loss.CurrentTransitionTime(m.qgs2Off, hOff, m.rOff, drv.IPeakSink, 0, st.IOff)
	}
	if st.HardOn && d.Method == fit.MethodGateCharge {
		eir := loss.CurrentRiseEnergy(v, st.IOn, a.trans.Tir, m.lloop)
		if m.lcs > 0 {
			a.elcsOn = eir - loss.CurrentRiseEnergy(v, st.IOn, a.tir0, m.lloop)
		}
		if m.lloop > 0 {
			a.eloop = eir - loss.CurrentRiseEnergy(v, st.IOn, a.trans.Tir, 0)
		}
	}
	if !st.HardOff {
		return
	}
	if m.lcs > 0 {
		a.elcsOff = loss.OverlapEnergy(v, a.iTop, a.trans.Tif-a.tif0, 0)
	}
	if m.lloop > 0 {
		a.eloop += q.Energy(0.5 * float64(m.lloop) * float64(st.IOff) * float64(st.IOff))
		gm := 0.0
		if a.vplOff > a.vth {
			gm = 2 * float64(st.IOff) / float64(a.vplOff-a.vth) // square-law channel at the plateau
		}
		a.vpeak = loss.LoopOvershootLcs(v, m.lloop, m.lcs, gm, m.rOff, d.Cgs+d.Crss, st.IOff, a.iTop, a.tFall, m.cossSmall)
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
		return d.ReverseDrop(st.IDead1, voff, tj), d.ReverseDrop(st.IDead2, voff, tj)
	}
	r := m.rRev * d.Temp.Factor(tj)
	return d.ReverseDropGaN(st.IDead1, voff, tj, r, m.rRev25), d.ReverseDropGaN(st.IDead2, voff, tj, r, m.rRev25)
}

func evalDevice(out *DeviceResult, pt *stage.Point, d *fit.Device, role Role, st *stage.SwitchStress, k *partnerCharge, oss *ossMemo, tr *Trace) {
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
	vplPk := loss.PlateauAt(d.Vth, d.VplSpec, d.QgId, st.IPeak)

	// Screens that need no temperature.
	driveScreens(out, d, drv, vplPk)
	if drv.VOn < d.VgsLow {
		out.Flags |= fit.FlagRdsExtrapolated
	}
	if p.Technology == devices.SiC && drv.VOn < fit.SiCDriveMin {
		out.Flags |= fit.FlagSiCLowDrive
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
			out.Flags |= fit.FlagDriverLimited
		}
	}
	if drv.IPeakSink > 0 && vplPk-drv.VOff > 0 {
		if r := q.Resistance(float64(vplPk-drv.VOff)/float64(drv.IPeakSink)) - drv.RgExt - d.RgInt; r > m.rdOff {
			m.rdOff = r
			out.Flags |= fit.FlagDriverLimited
		}
	}

	// Parasitic inductances of the hard edges. The tr/tf method's measured
	// times already contain the package's common-source inductance.
	if m.hard && m.driveOK {
		if d.Method == fit.MethodGateCharge && d.Lcs > 0 {
			m.lcs = d.Lcs
			out.Lcs = d.Lcs
			out.Flags |= fit.FlagLcs
		}
		m.lloop = s.LoopInductance + d.Lloop
		if k != nil {
			m.lloop += k.lloop
		}
		if m.lloop > 0 {
			out.Lloop = m.lloop
			out.Flags |= fit.FlagLoopL
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
		out.Ecoss = loss.HardTurnOnCossEnergy(es, st.V, kq, ke)
		out.Erec = loss.RecoveryEnergy(out.Qrr, st.V)
		out.Losses.Coss = q.Power(float64(out.Ecoss) * f)
		out.Losses.Recovery = q.Power(float64(out.Erec) * f)
		if st.V < d.OssV/2 || st.V > 2*d.OssV {
			out.Flags |= fit.FlagOssFar
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
		out.RdsDyn = loss.DynamicRdsFactor(d.DynK, d.DynV, st.V)
		out.Flags |= fit.FlagRdsDyn
		if d.DynV == 0 || st.V > d.DynV {
			out.Flags |= fit.FlagRdsDynFar
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
	tm := thermal.Model{Fixed: fixed, Cond: loss.Conduction(st.IRms, rdyn), Law: &d.Temp, Other: other}
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
		out.Flags |= fit.FlagVsdDefault
	}
	out.Rds = rdyn * q.Resistance(d.Temp.Factor(tj))
	out.Losses.Conduction = loss.Conduction(st.IRms, out.Rds)
	if tj != 25 && (m.hard && m.driveOK || m.dead || d.Method == fit.MethodGateCharge) &&
		!(d.VthOwn && (d.VsdOwn || !m.dead || p.Technology == devices.GaN)) {
		out.Flags |= fit.FlagVthTempDefault
	}
	if tr != nil {
		traceDevice(tr, name, out, &m, &a, fixed, r0, tj)
	}

	// Screens that need the temperature.
	switch out.Thermal.Status {
	case thermal.Runaway:
		out.Screens |= ScreenRunaway
	case thermal.AboveMax:
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
		if out.Flags&fit.FlagRthJCOnly != 0 {
			tc = s.Ambient
		}
	}
	out.IdLimit = loss.CurrentRatingAt(p.IdMax, d.TjMax, tc)
	if st.IRms > out.IdLimit {
		out.Screens |= ScreenRmsCurrent
	}
}
