package evaluate

import (
	q "swrank/devices/quantity"
	"swrank/rank/fit"
	"swrank/rank/loss"
)

// at fills a with the device's temperature-dependent results at tj.
func (m *devModel) at(tj q.Temperature, a *tempState) {
	vth := m.d.ThresholdAt(tj)
	a.vth, a.vplOn, a.vplOff = vth, vth+m.odOn, vth+m.odOff
	a.qCollapse = 0
	if m.hard && m.driveOK {
		igOn, igOff := m.transitionsAt(a)
		m.overlapAt(a, igOn, igOff)
	}
	m.gateAt(a) // after the edges: a capacitive turn-off books less
	if m.dead {
		st := m.st
		a.vsd1, a.vsd2 = m.reverseDrops(tj)
		a.edead = loss.DeadTimeEnergy(a.vsd1, st.IDead1, m.tDiode1, a.vsd2, st.IDead2, m.tDiode2)
	}
	a.p = q.Power(float64(a.eon+a.eoff+a.edead+a.split.Rint) * m.f)
}

// gateAt is the gate drive at a.vth: the charge moved between the off and
// on levels over the curve at temperature (Qth follows the threshold: a
// constant Cgs), its energy, and that energy's split between the driver,
// the external and the internal gate resistance (loss.SplitGateEnergy).
// The tr/tf method's linear gate does not depend on temperature.
func (m *devModel) gateAt(a *tempState) {
	d, drv := m.d, m.drv
	vth := a.vth
	if d.Method == fit.MethodGateCharge {
		c := loss.GateCurve{Qth: q.Charge(m.qthPerV * float64(vth)), Qgs2: m.qgs2Pk, Qgd: m.qgdGate, Vth: vth, Vpl: vth + m.odPk, Slope: d.Slope, KneeV: d.KneeV, KneeQ: d.KneeQ}
		if m.qthPerV == 0 {
			c.Qth = d.Qth
		}
		var qOn, qOff q.Charge
		if drv.VOn > c.Vpl && c.KneeV == 0 { // GateCurve.Charge above the plateau
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
		// A ramping driver keeps only the shares gOn and gOff of each
		// edge's energy in the resistances (SplitGateEnergyRamp). At a
		// turn-off whose drain capacitance takes the whole current over
		// part of the swing, that part's Miller charge leaves the gate
		// near the off level, not at the plateau (overlapAt): the gate
		// loop gets less back, and the energy stays with the drain, whose
		// channel dissipates it at a hard turn-on.
		collapse := min(float64(a.qCollapse)*float64(a.vplOff-drv.VOff), float64(a.stored))
		on, off := float64(a.egate-a.stored), float64(a.stored)-collapse
		if m.st.HardOn {
			a.eon += q.Energy(collapse)
		}
		a.eCollapse = q.Energy(collapse)
		gOn, gOff := rampShares(drv, m.rOn, m.rOff, a.qg)
		k0, k1 := &m.split[0], &m.split[1]
		a.split = loss.GateSplit{
			Driver: q.Energy(on*gOn*float64(k0.Driver) + off*gOff*float64(k1.Driver)),
			Rext:   q.Energy(on*gOn*float64(k0.Rext) + off*gOff*float64(k1.Rext)),
			Rint:   q.Energy(on*gOn*float64(k0.Rint) + off*gOff*float64(k1.Rint)),
			Edge:   q.Energy(on*(1-gOn) + off*(1-gOff)),
		}
		return
	}
	a.qg, a.egate, a.stored, a.split = m.linGate.qg, m.linGate.egate, m.linGate.stored, m.linGate.split
}

// transitionsAt fills the hard edges' intervals at a.vth (a.trans, and the
// intervals in which the loop current changes) and returns the gate
// currents at the turn-on and turn-off plateaus, the voltage edges.
func (m *devModel) transitionsAt(a *tempState) (igOn, igOff q.Current) {
	d, st, drv := m.d, m.st, m.drv
	vth := a.vth
	igOn = loss.GateCurrent(drv.VOn, a.vplOn, m.rOn, drv.IPeakSource)
	igOff = loss.GateCurrent(drv.VOff, a.vplOff, m.rOff, drv.IPeakSink)
	if d.Method == fit.MethodGateCharge {
		// Gate-charge intervals (GateChargeTransitions with the mean
		// gate voltage; the current intervals through
		// CurrentTransitionTime, which adds the common-source term).
		hOn := max(drv.VOn-(vth+a.vplOn)/2, 1e-3)
		hOff := max((vth+a.vplOff)/2-drv.VOff, 1e-3)
		a.trans.Tir = loss.CurrentTransitionTime(m.qgs2On, hOn, m.rOn, drv.IPeakSource, m.lcs, st.IOn)
		a.trans.Tif = loss.CurrentTransitionTime(m.qgs2Off, hOff, m.rOff, drv.IPeakSink, m.lcs, st.IOff)
		a.tir0, a.tif0 = a.trans.Tir, a.trans.Tif
		if m.lcs > 0 {
			a.tir0 = loss.CurrentTransitionTime(m.qgs2On, hOn, m.rOn, drv.IPeakSource, 0, st.IOn)
			a.tif0 = loss.CurrentTransitionTime(m.qgs2Off, hOff, m.rOff, drv.IPeakSink, 0, st.IOff)
		}
		a.trans.Tvf = chargeTime(m.qgdV, igOn)
		a.trans.Tvr = chargeTime(m.qgdV, igOff)
		if drv.Edge > 0 {
			igOn, igOff = m.rampEdges(a, igOn, igOff)
		}
		a.tRise, a.tFall = a.trans.Tir, a.trans.Tif
		return igOn, igOff
	}
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
	ton := loss.ScaleSwitchingTime(d.Part.Tr.V, rs, ron, h[0], drv.VOn-a.vplOn)
	toff := loss.ScaleSwitchingTime(d.Part.Tf.V, rs, roff, h[1], a.vplOff-drv.VOff)
	a.trans = loss.Transitions{Tvf: ton, Tvr: toff}
	// The loop current changes over the whole stated time: a
	// lower bound on di/dt (docs/second-order.md).
	a.tRise, a.tFall = ton, toff
	a.tir0, a.tif0 = ton, toff
	return igOn, igOff
}

// overlapAt fills the hard edges' overlap energies at a.vth from the
// intervals of transitionsAt and its plateau gate currents: the current
// rise and the Miller fall at turn-on; at turn-off the voltage rise while
// the load current charges Coss, then the current fall, with the loop's
// stored ½·L·I².
func (m *devModel) overlapAt(a *tempState, igOn, igOff q.Current) {
	d, st := m.d, m.st
	v := st.V
	if st.HardOn {
		eMiller := loss.OverlapEnergy(v, st.IOn, 0, a.trans.Tvf)
		if d.HasMiller {
			eMiller = loss.MillerFallEnergy(&d.Miller, v, st.IOn, igOn)
		}
		if d.Method == fit.MethodGateCharge {
			a.eon = loss.SquareLawRiseEnergy(v, st.IOn, a.tir0, a.trans.Tir-a.tir0, m.lloop) + eMiller
		} else {
			a.eon = eMiller
		}
	}
	if st.HardOff {
		if d.Method == fit.MethodGateCharge {
			a.eoff = loss.SquareLawFallEnergy(v, st.IOff, a.tif0, a.tFall-a.tif0, m.lloop)
		} else {
			a.eoff = loss.CurrentFallEnergy(v, st.IOff, a.tFall, m.lloop)
		}
		if d.HasMiller {
			// The load current charges Coss while the voltage rises:
			// the channel keeps only the rest (the Miller rise energy, loss.RiseIntegral).
			evr, iTop, qPl := m.rise.EnergyCharge(st.IOff, igOff, &m.risePow)
			a.iTop = iTop
			a.qCollapse = max(m.qgdV-qPl, 0)
			// The loop's stored ½·L·I² is counted in the switch
			// (docs/second-order.md; the ngspice cells agree within
			// the suite's tolerance, docs/spice-crosscheck.md).
			a.eoff = evr + loss.SquareLawFallEnergy(v, iTop, a.tif0, a.tFall-a.tif0, 0) +
				q.Energy(0.5*float64(m.lloop)*float64(st.IOff)*float64(st.IOff))
		} else if d.Method == fit.MethodGateCharge {
			a.iTop = st.IOff
			a.eoff += loss.OverlapEnergy(v, st.IOff, a.trans.Tvr, 0)
		} else {
			a.iTop = st.IOff
		}
	}
}

// finish adds to a, computed by at, what the thermal loop does not need:
// the shares of the common-source and loop inductances and the drain peak.
func (m *devModel) finish(a *tempState) {
	d, st := m.d, m.st
	a.vpeak = st.V
	a.elcsOn, a.elcsOff, a.eloop = 0, 0, 0
	if !m.hard || !m.driveOK {
		return
	}
	v := st.V
	if st.HardOn && d.Method == fit.MethodGateCharge {
		tL := a.trans.Tir - a.tir0 // the common-source inductance's share (transitionsAt)
		eir := loss.SquareLawRiseEnergy(v, st.IOn, a.tir0, tL, m.lloop)
		if m.lcs > 0 {
			a.elcsOn = eir - loss.SquareLawRiseEnergy(v, st.IOn, a.tir0, 0, m.lloop)
		}
		if m.lloop > 0 {
			a.eloop = eir - loss.SquareLawRiseEnergy(v, st.IOn, a.tir0, tL, 0)
		}
	}
	if !st.HardOff {
		return
	}
	if m.lcs > 0 {
		a.elcsOff = loss.SquareLawFallEnergy(v, a.iTop, 0, a.trans.Tif-a.tif0, 0)
	}
	if m.lloop > 0 {
		a.eloop += q.Energy(0.5 * float64(m.lloop) * float64(st.IOff) * float64(st.IOff))
		gm := 0.0
		if a.vplOff > a.vth {
			gm = 2 * float64(st.IOff) / float64(a.vplOff-a.vth) // square-law channel at the plateau
		}
		a.vpeak = loss.LoopOvershootLcs(v, m.lloop, m.lcs, gm, m.rOff, d.Cgs+d.Crss, st.IOff, a.iTop, a.tFall, m.cossSmall)
		if !d.HasMiller {
			// Without a Cgd law the share of the current that the output
			// capacitance carries at the end of the voltage rise is
			// unknown: the peak is linear in it, so take the worse end,
			// the whole current ringing in the capacitance.
			a.vpeak = max(a.vpeak, loss.LoopOvershootLcs(v, m.lloop, m.lcs, gm, m.rOff, d.Cgs+d.Crss, st.IOff, 0, a.tFall, m.cossSmall))
		}
	}
}
