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

// evalDevice evaluates device d in place role of the stage at pt, with
// stresses st, into out: the gate loops and the drive screens, the
// temperature-independent charges of the hard turn-on, the conduction law,
// the thermal fixed point over the whole temperature-dependent loss, the
// losses at the solved junction temperature, and the screens that need it.
// k is what the device across the cell contributes (nil: nothing); dt,
// for the synchronous switch, its diode's share of the dead times.
func evalDevice(out *DeviceResult, pt *stage.Point, d *fit.Device, role Role, st *stage.SwitchStress, k *partnerCharge, dt *deadTiming, oss *ossMemo, tr *Trace) {
	*out = DeviceResult{}
	out.Dev, out.Role, out.Method, out.Flags, out.Stress, out.RdsDyn = d, role, d.Method, d.Flags, *st, 1
	var m devModel
	m.setup(out, pt, d, role, st, k)
	if dt != nil {
		m.tDiode1, m.tDiode2 = dt.t1, dt.t2
		out.TDiode1, out.TDiode2 = dt.t1, dt.t2
	}
	m.oss = oss.at(d, st.V)
	m.prepare()
	hardTurnOnCharges(out, &m, k, tr)
	r0, rdyn := conductionLaw(out, &m)
	rthv, fl := rth(d, m.s)
	out.Rth, out.Flags = rthv, out.Flags|fl
	esoft := softTurnOn(out, pt, d, st, k, tr) // light-load turn-on (softon.go)
	fixed := out.Losses.Coss + out.Losses.Recovery + q.Power(float64(esoft)*m.f)
	var a tempState
	tj := solveJunction(out, &m, &a, fixed, rdyn)
	m.finish(&a)
	recordAt(out, &m, &a, tj, rdyn, esoft)
	if tr != nil {
		traceDevice(tr, role.String(), out, &m, &a, fixed, r0, tj)
	}
	hotScreens(out, &m, &a, tj)
}

// setup fixes the device's gate loops, its drive screens and flags, the
// driver resistances the peak-current limits raise, and the parasitic
// inductances of its hard edges.
func (m *devModel) setup(out *DeviceResult, pt *stage.Point, d *fit.Device, role Role, st *stage.SwitchStress, k *partnerCharge) {
	s := &pt.Stage
	drv := s.DriverOf(role == RoleSync)
	m.d, m.s, m.st, m.f, m.drv = d, s, st, float64(s.Fsw), drv
	m.hard, m.dead = st.HardOn || st.HardOff, role == RoleSync && s.DeadTime.OK

	// Gate loop: driver, external and internal gate resistance.
	m.rOn = drv.RSource + drv.RgExt + d.RgInt
	m.rOff = drv.RSink + drv.RgExt + d.RgInt
	vplPk := d.PlateauAt(st.IPeak)

	// Screens that need no temperature.
	driveScreens(out, d, drv, vplPk)
	if drv.VOn < d.VgsLow {
		out.Flags |= fit.FlagRdsExtrapolated
	}
	if d.Part.Technology == devices.SiC && drv.VOn < fit.SiCDriveMin {
		out.Flags |= fit.FlagSiCLowDrive
	}
	m.driveOK = out.Screens&(ScreenBelowThreshold|ScreenBelowPlateau) == 0

	// Gate drive: the curve at the working drain voltage (0 V for a
	// soft-switched edge: no Miller plateau).
	if m.hard {
		m.vdsGate = st.V
	}
	m.driverLimits(out, vplPk)
	m.parasitics(out, k)
}

// driverLimits sets the effective driver resistances: the source and sink
// resistances, raised where the driver's peak-current limit binds at the
// plateau vplPk.
func (m *devModel) driverLimits(out *DeviceResult, vplPk q.Voltage) {
	d, drv := m.d, m.drv
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
}

// parasitics sets the inductances of the hard edges: the common-source
// inductance of package and layout (the tr/tf method's measured times
// already contain the package's; the layout's is not counted there) and
// the power loop of layout and packages.
func (m *devModel) parasitics(out *DeviceResult, k *partnerCharge) {
	d := m.d
	if !m.hard || !m.driveOK {
		return
	}
	if lcs := d.Lcs + m.s.CommonSourceInductance; d.Method == fit.MethodGateCharge && lcs > 0 {
		m.lcs = lcs
		out.Lcs = lcs
		out.Flags |= fit.FlagLcs
		if !d.Part.Lcs.OK {
			out.Flags |= fit.FlagLcsEstimated
		}
	}
	m.lloop = m.s.LoopInductance + d.Lloop
	if !d.Part.Lloop.OK {
		out.Flags |= fit.FlagLloopEstimated
	}
	if k != nil {
		m.lloop += k.lloop
		out.Flags |= k.flags & fit.FlagLloopEstimated
	}
	if m.lloop > 0 {
		out.Lloop = m.lloop
		out.Flags |= fit.FlagLoopL
	}
}

// hardTurnOnCharges books the output-capacitance and recovery energies of
// a hard turn-on: independent of this switch's temperature (the partner's
// recovered charge is taken at the partner's junction temperature).
func hardTurnOnCharges(out *DeviceResult, m *devModel, k *partnerCharge, tr *Trace) {
	d, st := m.d, m.st
	if !st.HardOn {
		return
	}
	var kq q.Charge
	var ke q.Energy
	if k != nil {
		kq, ke, out.Qrr = k.qoss, k.eoss, k.qrr
	}
	es := m.oss.E()
	out.Ecoss = loss.HardTurnOnCossEnergy(es, st.V, kq, ke)
	out.Erec = loss.RecoveryEnergy(out.Qrr, st.V)
	out.Losses.Coss = q.Power(float64(out.Ecoss) * m.f)
	out.Losses.Recovery = q.Power(float64(out.Erec) * m.f)
	if st.V < d.OssV/2 || st.V > 2*d.OssV {
		out.Flags |= fit.FlagOssFar
	}
	if tr == nil {
		return
	}
	name := out.Role.String()
	tr.add(name, "output capacitance", "E = E_oss,S(V) + V·Q_oss,K(V) − E_oss,K(V) (K: the device across the cell)",
		T("V", st.V), T("E_oss,S", es), T("Q_oss,K", kq), T("E_oss,K", ke), T("E/cycle", out.Ecoss), T("P", out.Losses.Coss))
	terms := []Term{T("Qrr", out.Qrr), T("V", st.V), T("P", out.Losses.Recovery)}
	formula := "E = Qrr·V (the partner's recovered charge flows through this switch at full voltage)"
	if k != nil && k.qrr > 0 && k.tj != 0 {
		formula = "E = Qrr(Tj,partner)·V (the partner's recovered charge, at its junction temperature, flows through this switch at full voltage)"
		terms = append(terms, T("Tj partner", k.tj))
	}
	if k != nil && k.rec.Time > 0 {
		formula += "; Qrr moved from the datasheet's test to this commutation by the charge-control model: the diode conducts I_F for its dead-time share from no charge, the current falls at di/dt, the reverse current sweeps out what is left at the zero crossing"
		terms = append(terms, T("I_F", k.iF), T("di/dt", k.didt), T("diode conducts before", k.tOn), T("τ (fitted)", k.dev.QrrTau),
			T("stored at the zero crossing (test Tj)", k.rec.Stored), T("recovered (test Tj)", k.rec.Recovered), T("recovery time", k.rec.Time))
	}
	tr.add(name, "recovery", formula, terms...)
}

// conductionLaw returns the on-resistance at the drive and the law's
// reference temperature, r0, and with the dynamic factor for the blocked
// voltage applied, rdyn.
func conductionLaw(out *DeviceResult, m *devModel) (r0, rdyn q.Resistance) {
	d, drv, st := m.d, m.drv, m.st
	vgs := drv.VOn
	if !m.driveOK {
		vgs = max(drv.VOn, d.Vth+0.1)
	}
	r0, fl := d.RdsAt(vgs, conductionCurrent(st))
	out.Flags |= fl
	if d.DynK > 1 {
		out.RdsDyn = loss.DynamicRdsFactor(d.DynK, d.DynV, st.V)
		out.Flags |= fit.FlagRdsDyn
		if !d.Part.RdsDyn.OK {
			out.Flags |= fit.FlagRdsDynEstimated
		}
		if d.DynV == 0 || st.V > d.DynV {
			out.Flags |= fit.FlagRdsDynFar
		}
	}
	return r0, r0 * q.Resistance(out.RdsDyn)
}

// conductionCurrent is the rms drain current over the conduction interval,
// I_rms/√D (at most the peak), the current at which the on-resistance's
// channel part is taken (fit.Device.RdsAt).
func conductionCurrent(st *stage.SwitchStress) q.Current {
	if st.Duty <= 0 {
		return st.IRms
	}
	return min(q.Current(float64(st.IRms)/math.Sqrt(float64(st.Duty))), max(st.IPeak, st.IRms))
}

// solveJunction solves the device's thermal loop over its whole loss
// (fixed, conduction through rdyn and the temperature law, and the rest
// from at) into out.Thermal, leaves a at the returned temperature, and
// returns the temperature to evaluate the losses at.
func solveJunction(out *DeviceResult, m *devModel, a *tempState, fixed q.Power, rdyn q.Resistance) q.Temperature {
	// The solver's last evaluation is usually at the temperature it
	// returns: keep it and compute again only when it is not.
	lastT := q.Temperature(math.NaN())
	other := func(t q.Temperature) q.Power {
		m.at(t, a)
		lastT = t
		return a.p
	}
	d := m.d
	tm := thermal.Model{Fixed: fixed, Cond: loss.Conduction(m.st.IRms, rdyn), Law: &d.Temp, Other: other}
	tj := junction(&out.Thermal, &tm, m.s, out.Rth, d.TjMax)
	if lastT != tj {
		m.at(tj, a)
	}
	return tj
}

// recordAt writes the device's losses and figures at the solved junction
// temperature tj into out: gate drive, edges, dead time (with the
// light-load reverse conduction esoft) and conduction through rdyn.
func recordAt(out *DeviceResult, m *devModel, a *tempState, tj q.Temperature, rdyn q.Resistance, esoft q.Energy) {
	d, st, drv, f := m.d, m.st, m.drv, m.f
	p := d.Part
	out.Vth, out.VplOn, out.VplOff = a.vth, a.vplOn, a.vplOff
	out.Qg, out.Egate = a.qg, a.egate
	bookGate(out, a.split, drv, f)
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
}

// hotScreens applies the screens that need the junction temperature tj:
// the thermal outcome against tj_max, the peak drain voltage, the static
// off-state margin against the hot threshold (offSwitchChecks adds the
// dv/dt bounce), and the rms current against the rating derated to the
// case temperature.
func hotScreens(out *DeviceResult, m *devModel, a *tempState, tj q.Temperature) {
	d, s := m.d, m.s
	p := d.Part
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
	out.FalseOn.Vth = a.vth
	out.FalseOn.Margin = a.vth - m.drv.VOff
	if out.FalseOn.Margin <= 0 {
		out.Screens |= ScreenFalseTurnOn
	}
	tc := caseTemperature(d, tj, out.Losses.Switch())
	out.IdLimit = loss.CurrentRatingAt(p.IdMax, d.TjMax, tc)
	if m.st.IRms > out.IdLimit {
		out.Screens |= ScreenRmsCurrent
	}
}
