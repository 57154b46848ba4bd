package evaluate

import (
	"math"
	"swrank/devices"
	q "swrank/devices/quantity"
	"swrank/rank/fit"
	"swrank/rank/loss"
	"swrank/rank/resonant"
	"swrank/rank/stage"
	"swrank/rank/thermal"
)

// RFResult is what a resonant stage adds to a part's result.
type RFResult struct {
	VPeak     q.Voltage     // peak switch voltage with the part's own output capacitance, V
	IPeak     q.Current     // peak switch current, A
	CRequired q.Capacitance // class E: shunt capacitance the design needs, F
	CDevice   q.Capacitance // class E: the part's charge-equivalent share of it, Q_oss(VPeak)/VPeak, F
	CExternal q.Capacitance // class E: linear capacitor still to add, F
	FMax      q.Frequency   // class E: highest frequency the part can hold class E at this power and supply, Hz
	// XExcess is the excess series reactance that keeps nominal class E
	// with this part's capacitance in the shunt, Ω (the series capacitor
	// follows from it and the tank's inductance).
	XExcess q.Resistance
	Tf      q.Time // current fall time at turn-off, s
	// OnShare is the share of the period the class E switch's channel
	// conducts, from its turn-on to the end of its current fall, with the
	// gate's delays (about 0.5: the design's duty).
	OnShare q.Ratio
	// DriveZVS is the class E drive's high share of the period that gives
	// the channel the design's off interval of π despite the gate's
	// delays, 0.5 − f·(t_d,off − t_d,on): the drive that restores
	// zero-voltage turn-on (0 when no drive in (0, 1) does). TotalZVS is
	// the part's loss (switch and driver) with that drive, W.
	DriveZVS q.Ratio
	TotalZVS q.Power
	// Class D (and class E): the turn-on edge.
	ZVS       bool      // class D: full zero-voltage turn-on
	VResidual q.Voltage // voltage left across the switch at its turn-on, V
	Diode     bool      // the partner's body diode is recovered at turn-on (below resonance)
	// Efficiencies as fractions: the power stage alone, and with the gate
	// drivers counted (P_o over the supply power of stage and drivers).
	EffStage, EffWithDriver q.Ratio
	Hysteresis              bool // an output-capacitance hysteresis loss was counted
}

// fallTime is the channel's current-fall time at turn-off of current i:
// the gate-charge method's current interval, or the datasheet tf rescaled
// to this gate loop (gateChargeEdges, loss.ScaleSwitchingTime).
func fallTime(d *fit.Device, drv *stage.Driver, i q.Current) q.Time {
	if d.Method == fit.MethodGateCharge {
		return gateChargeEdges(d, drv, 0, i).Tif
	}
	vpl := d.PlateauAt(i)
	r := drv.RSink + drv.RgExt + d.RgInt
	if drv.IPeakSink > 0 {
		r = max(r, q.Resistance(float64(vpl-drv.VOff)/float64(drv.IPeakSink)))
	}
	if !d.TswOK {
		return loss.ScaleSwitchingTime(d.Part.Tf.V, 0, r, 0, vpl-drv.VOff)
	}
	return loss.ScaleSwitchingTime(d.Part.Tf.V, d.TswR, r, d.TswHead[1], vpl-drv.VOff)
}

// gateDelays times a resonant stage's switch from its gate circuit, with
// the helpers that time a synchronous cell's dead times (deadtime.go): its
// channel turns on when the gate reaches its threshold, on after the
// drive's rising edge (the drain near zero: no plateau), and its current
// starts to fall when the gate has fallen to the plateau at the current i
// it carries, off after the drive's falling edge. Class E's channel is
// then off for π − ω·(off − on) of each period; class D's node swings for
// the dead time + on − off.
//
// Source: the RC gate delays (Balogh 2001) in the timing of a switch
// whose on interval sets the waveform (Sokal & Sokal 1975; Kazimierczuk
// & Czarkowski 2011, ch. 2).
func gateDelays(d *fit.Device, drv *stage.Driver, i q.Current) (on, off q.Time) {
	return onDelay(d, drv, d.Vth), turnOffTimes(d, drv, 0, i).delay
}

// softGate fills the gate-drive losses of a switch whose edges are
// soft-switched (no Miller plateau: the drain sits near 0 V while the gate
// moves), as for the synchronous switch of a converter.
func softGate(out *DeviceResult, d *fit.Device, drv *stage.Driver, i q.Current, f float64) {
	c := softCurve(d, i)
	out.Qg = c.Charge(drv.VOn) - c.Charge(drv.VOff)
	out.Egate = loss.GateEnergy(c, drv.VOff, drv.VOn)
	stored := c.StoredEnergy(drv.VOff, drv.VOn)
	if d.Method != fit.MethodGateCharge {
		out.Qg = d.Part.Qg * q.Charge((drv.VOn-drv.VOff)/d.Part.QgVgs)
		out.Egate = q.Energy(float64(out.Qg) * float64(drv.VOn-drv.VOff))
		stored = out.Egate / 2
	}
	gOn, gOff := rampShares(drv, drv.RSource+drv.RgExt+d.RgInt, drv.RSink+drv.RgExt+d.RgInt, out.Qg)
	split := loss.SplitGateEnergyRamp(out.Egate, stored, drv.RSource, drv.RSink, drv.RgExt, d.RgInt, gOn, gOff)
	bookGate(out, split, drv, f)
}

// rfScreens applies the screens of a resonant stage.
func rfScreens(out *DeviceResult, d *fit.Device, s *stage.Stage, vpeak q.Voltage) {
	p := d.Part
	drv := &s.Driver
	out.Vpeak = vpeak
	if vpeak > q.Voltage(s.Derate)*p.VdsMax {
		out.Screens |= ScreenVoltage
	}
	driveScreens(out, d, drv, d.PlateauAt(out.Stress.IPeak))
}

// rfThermal solves the junction temperature with the loss `fixed` that does
// not depend on it, sets the conduction loss, and applies the thermal and
// current-rating screens.
func rfThermal(out *DeviceResult, d *fit.Device, s *stage.Stage, fixed q.Power) {
	p := d.Part
	r0 := d.Gate.At(max(s.Driver.VOn, d.Vth+0.1))
	rthv, fl := rth(d, s)
	out.Rth, out.Flags = rthv, out.Flags|fl
	m := thermal.Model{Fixed: fixed, Cond: loss.Conduction(out.Stress.IRms, r0), Law: &d.Temp}
	tj := junction(&out.Thermal, &m, s, rthv, d.TjMax)
	out.Rds = r0 * q.Resistance(d.Temp.Factor(tj))
	out.Losses.Conduction = loss.Conduction(out.Stress.IRms, out.Rds)
	switch {
	case out.Thermal.Status == thermal.Runaway:
		out.Screens |= ScreenRunaway
	case out.Thermal.Status == thermal.AboveMax || out.Thermal.Tj > d.TjMax:
		out.Screens |= ScreenTjMax
	default:
		tc := caseTemperature(d, tj, out.Losses.Switch())
		out.IdLimit = loss.CurrentRatingAt(p.IdMax, d.TjMax, tc)
		if out.Stress.IRms > out.IdLimit {
			out.Screens |= ScreenRmsCurrent
		}
	}
}

// evaluateRF evaluates a part in a class E or class D stage.
func evaluateRF(r *Result, pt *stage.Point, dev *fit.Device, tr *Trace) {
	if pt.Stage.Topology == stage.ClassE {
		r.N = 1
		evalClassE(r, pt, dev, tr)
		return
	}
	r.N = 2
	evalClassD(r, pt, dev, tr)
}

func evalClassE(r *Result, pt *stage.Point, d *fit.Device, tr *Trace) {
	s := &pt.Stage
	e := &pt.RF.E
	f := float64(s.Fsw)
	out := &r.Devices[0]
	*out = DeviceResult{Dev: d, Role: RoleControl, Method: d.Method, Flags: d.Flags, Stress: pt.Ctrl}
	rf := &r.RF
	sh, err := resonant.ClassEShunt(*e, d.Oss.Q)
	if err != nil {
		out.Screens |= ScreenNoOutputCap
		sh.VPeak = e.VPeak
	}
	rf.VPeak, rf.IPeak, rf.CRequired = sh.VPeak, e.IPeak, e.C1
	rf.CDevice, rf.CExternal, rf.FMax, rf.XExcess = sh.CDevice, sh.CExternal, sh.FMax, sh.X
	if sh.DeviceTooLarge {
		out.Screens |= ScreenShuntTooSmall
	}
	rf.Tf = fallTime(d, &s.Driver, e.IOff)
	dOn, dOff := gateDelays(d, &s.Driver, e.IOff)
	offAngle := math.Pi - 2*math.Pi*f*float64(dOff-dOn)
	rf.OnShare = q.Ratio(1 - offAngle/(2*math.Pi) + float64(rf.Tf)*f)
	to, err := resonant.ClassETurnOffTimed(*e, rf.Tf, offAngle)
	if err != nil {
		// Beyond the model's range (ω·t_f above MaxTurnOffAngle, or the
		// gate's delays leave the channel no off interval): too slow to
		// hold class E; count the small-t_f estimate and screen.
		out.Screens |= ScreenTooSlow
		p, _ := resonant.ClassETurnOffSmall(*e, rf.Tf)
		to.TurnOff = p
	}
	// A gate slow against the swing holds the channel on its plateau
	// while the drain rises: the larger of that turn-off and the
	// current fall's.
	var mean loss.MillerLaw
	law := offLaw(d, &mean) // Cgd of the drain's swing, for the turn-off and the off gate loop
	pSlow := slowGateOff(d, law, &s.Driver, sh.CDevice+sh.CExternal, sh.VPeak, e.IOff, f)
	to.TurnOff = max(to.TurnOff, pSlow)
	out.Losses.TurnOff = to.TurnOff
	// A turn-on before the switch voltage is back at zero dumps what the
	// shunt holds through the channel: the part's own output energy and
	// the external capacitor's (the steady state's linear shunt sets the
	// voltage).
	rf.VResidual = to.VTurnOn
	out.Losses.TurnOn = shuntDump(sh.CExternal, d, to.VTurnOn, f)
	out.Eoff = q.Energy(float64(to.TurnOff) / f)
	// The drive that gives the channel the design's off interval back:
	// what an engineer tunes by hand, and the edge losses with it.
	var dZVS q.Power
	if duty := 0.5 - f*float64(dOff-dOn); duty > 0 && duty < 1 {
		if tz, err := resonant.ClassETurnOffTimed(*e, rf.Tf, math.Pi); err == nil {
			rf.DriveZVS = q.Ratio(duty)
			dZVS = max(tz.TurnOff, pSlow) + shuntDump(sh.CExternal, d, tz.VTurnOn, f) - out.Losses.TurnOff - out.Losses.TurnOn
		}
	}
	if h, err := resonant.HysteresisLoss(hysteresis(out, d, sh.VPeak), sh.VPeak, s.Fsw); err == nil && h > 0 {
		out.Losses.Coss = h
		rf.Hysteresis = true
	}
	softGate(out, d, &s.Driver, e.IOff, f)
	eSwing := swingGate(out, d, law, &s.Driver, e, sh.VPeak)
	rfScreens(out, d, s, sh.VPeak)
	rfThermal(out, d, s, out.Losses.Switch())
	l := out.Losses
	rf.EffStage, rf.EffWithDriver, _ = resonant.Efficiency(s.Pout, l.Switch(), l.Driver())
	if rf.DriveZVS > 0 {
		rf.TotalZVS = l.Total() + dZVS
	}
	if tr != nil {
		tr.add("control", "class E design", "ideal class E at 50 % duty (Sokal & Sokal 1975; Raab 1977), finite-Q solver when --ql is given",
			T("VDD", s.Vin), T("R load", e.R), T("P out", e.Po), T("I dc", e.IDC), T("I rms", e.IRms),
			T("I peak", e.IPeak), T("I at turn-off", e.IOff), T("V peak (linear shunt)", e.VPeak), T("C1 required", e.C1))
		tr.add("control", "shunt", "device share of C1: Q_oss(V_peak)/V_peak with the part's own law; external capacitor = what is left",
			T("V peak", sh.VPeak), T("C device", sh.CDevice), T("C external", sh.CExternal), T("excess reactance", sh.X), T("f max", sh.FMax))
		tr.add("control", "switch timing", "the channel turns on at the gate's delay to its threshold after the drive's rise and its current starts to fall at the delay to the plateau after the drive's fall: off for π − ω·(t_d,off − t_d,on) of each period",
			T("turn-on delay to Vth", dOn), T("turn-off delay to the plateau", dOff), N("channel on (share of the period)", float64(rf.OnShare)))
		tr.add("control", "drive for zero-voltage turn-on", "the drive's high share that gives the channel the design's off interval π back: D = 0.5 − f·(t_d,off − t_d,on); the edges' loss recomputed at that interval (switch voltage at zero at turn-on but for the current fall's shift)",
			N("drive duty for ZVS", float64(rf.DriveZVS)), T("total at that drive", rf.TotalZVS), T("total at 50 % drive", l.Total()))
		tr.add("control", "turn-off and turn-on", "linear current fall in t_f inside the periodic steady state at the channel's real off interval (≈ (ω·t_f)²/12·P_o at 50 %); a turn-on before the voltage is back at zero dumps the shunt: E = ½·C_ext·v² + E_oss(v)",
			T("t_f", rf.Tf), T("P turn-off on the plateau (slow gate)", pSlow), T("P turn-off", out.Losses.TurnOff), T("V at turn-on", rf.VResidual), T("P turn-on", out.Losses.TurnOn))
		note := "no eoss_loss column: output-capacitance hysteresis not counted"
		if rf.Hysteresis {
			note = "eoss_loss scaled as (V/V_stated)^1.5"
		}
		tr.add("control", "hysteresis", note, T("P", out.Losses.Coss))
		tr.add("control", "gate", "P_G = [Qg(Von) − Qg(Voff)]·(Von − Voff)·f at zero drain voltage (soft edges), plus the drain swing's displacement current Cgd·dv/dt through the off gate loop: E = R·ω·∫(Cgd·dv/dθ)² dθ",
			T("Qg moved", out.Qg), T("E gate/cycle", out.Egate), T("E swing/cycle", eSwing), T("driver", out.Losses.GateDriver),
			T("of which its ramping edge", out.GateEdge), T("Rg ext", out.Losses.GateRext), T("Rg int", out.Losses.GateRint))
		tr.add("control", "conduction", "P = I_rms²·Rds(on)(Vgs, Tj)", T("I rms", out.Stress.IRms), T("Rds", out.Rds),
			T("P", out.Losses.Conduction), T("Tj", out.Thermal.Tj))
		tr.add("control", "efficiency", "η_stage = Po/(Po + P_switch); η with driver = Po/(Po + P_switch + P_driver)",
			N("eff stage", float64(rf.EffStage)), N("eff with driver", float64(rf.EffWithDriver)))
	}
}

func evalClassD(r *Result, pt *stage.Point, d *fit.Device, tr *Trace) {
	s := &pt.Stage
	f := float64(s.Fsw)
	rf := &r.RF
	// The node swings while both channels are off: the programmed dead
	// time, less the outgoing gate's fall to the plateau at the edge
	// current, plus the incoming gate's rise to its threshold (the
	// half-bridge's timing helpers). A swing interval below zero is
	// cross-conduction.
	iEdge := q.Current(math.Abs(float64(pt.RF.D.ISwitch)))
	dOn, dOff := gateDelays(d, &s.Driver, iEdge)
	swing := pt.RF.D.DeadTime + dOn - dOff
	cdv := pt.RF.D.WithDeadTime(swing)
	cd := &cdv
	edge, err := resonant.ClassDTurnOn(*cd, d.Oss.Q, d.Oss.Q)
	for k, role := range []Role{RoleControl, RoleSync} {
		out := &r.Devices[k]
		*out = DeviceResult{Dev: d, Role: role, Method: d.Method, Flags: d.Flags, Stress: pt.Ctrl}
		out.Margin1, out.Margin2 = swing, swing
		if swing < 0 {
			out.Screens |= ScreenCrossConduction
		}
		if err != nil {
			out.Screens |= ScreenNoOutputCap
			continue
		}
		out.Ecoss = edge.ETurnOn
		out.Losses.Coss = q.Power(float64(edge.ETurnOn) * f)
		i := q.Current(math.Abs(float64(cd.ISwitch)))
		tf := fallTime(d, &s.Driver, i)
		rf.Tf = tf
		if cd.Phase > 0 {
			cnode, err2 := resonant.NodeCapacitance(d.Oss.Q, d.Oss.Q, s.Vin)
			if err2 == nil {
				eoff, err3 := resonant.ZVSTurnOffEnergy(i, tf, cnode, s.Vin)
				if err3 == nil {
					out.Eoff = eoff
					out.Losses.TurnOff = q.Power(float64(eoff) * f)
				}
			}
		}
		// Body-diode conduction per edge: this switch's own diode after a
		// full transition, or (below resonance) the partner's, by symmetry
		// the same per switch and period.
		vsd := d.ReverseDrop(i, s.Driver.VOff, 25)
		out.Edead = q.Energy(float64(vsd) * float64(i) * float64(edge.TDiode))
		out.Losses.DeadTime = q.Power(float64(out.Edead) * f)
		if edge.PartnerDiode && d.Part.Technology != devices.GaN {
			if d.QrrEst > 0 {
				out.Flags |= fit.FlagQrrEstimated
			}
			out.Erec = loss.RecoveryEnergy(d.Qrr.At(25), s.Vin)
			out.Losses.Recovery = q.Power(float64(out.Erec) * f)
		}
		// Gate charge at zero drain voltage: the Miller charge of a partial
		// swing is not counted (docs/resonant.md).
		softGate(out, d, &s.Driver, i, f)
		rfScreens(out, d, s, s.Vin)
		rfThermal(out, d, s, out.Losses.Switch())
	}
	rf.ZVS, rf.VResidual, rf.Diode = edge.ZVS, edge.VResidual, edge.PartnerDiode
	rf.VPeak, rf.IPeak = s.Vin, cd.Im
	var sw, dr q.Power
	for k := 0; k < 2; k++ {
		sw += r.Devices[k].Losses.Switch()
		dr += r.Devices[k].Losses.Driver()
	}
	rf.EffStage, rf.EffWithDriver, _ = resonant.Efficiency(s.Pout, sw, dr)
	if tr != nil {
		tr.add("", "dead time the node sees", "t_swing = t_dt + t_d,on(incoming, to Vth) − t_d,off(outgoing, to the plateau at the edge current); below 0 both channels conduct",
			T("dead time", pt.RF.D.DeadTime), T("turn-on delay", dOn), T("turn-off delay", dOff), T("node swings for", swing))
		tr.add("", "class D tank", "series-resonant load, fundamental approximation (Kazimierczuk & Czarkowski 2011, ch. 2)",
			T("V in", s.Vin), T("R load", cd.R), T("P out", cd.Po), N("phase (rad)", float64(cd.Phase)), T("I m", cd.Im),
			T("I at the edges", cd.ISwitch), T("Q movable in dead time", cd.QDead))
		tr.add("", "turn-on edge", "partial ZVS: E = E_S(V_r) + V·[Q_K(V) − Q_K(V−V_r)] − [E_K(V) − E_K(V−V_r)]",
			T("Q needed", edge.QNeeded), T("V residual", edge.VResidual), T("E turn-on", edge.ETurnOn), T("t diode", edge.TDiode))
		for k := 0; k < 2; k++ {
			o := &r.Devices[k]
			tr.add(o.Role.String(), "losses", "per switch: conduction (I_m/2)²·R, turn-on edge, capacitive turn-off I²·t_f²/(24·C_node), diode, gate",
				T("t_f", rf.Tf), T("conduction", o.Losses.Conduction), T("turn-on", o.Losses.Coss),
				T("turn-off", o.Losses.TurnOff), T("diode", o.Losses.DeadTime), T("recovery", o.Losses.Recovery),
				T("gate driver", o.Losses.GateDriver), T("Tj", o.Thermal.Tj))
		}
	}
}

// hysteresis is the soft-switching output-capacitance hysteresis of device
// d for a swing to vswing: the part's eoss_loss at its stated swing, or the
// stated fraction of the energy stored at vswing (flagged) when it gives
// none.
func hysteresis(out *DeviceResult, d *fit.Device, vswing q.Voltage) resonant.Hysteresis {
	if p := d.Part; p.EossLoss.OK && p.EossLossVds.OK {
		return resonant.Hysteresis{E: p.EossLoss.V, VStated: p.EossLossVds.V}
	}
	out.Flags |= fit.FlagHysteresisEstimated
	return resonant.Hysteresis{E: q.Energy(d.HysteresisFraction * float64(d.Oss.E(vswing))), VStated: vswing}
}

// shuntDump is the loss at frequency f of a class E turn-on with v across
// the switch: what the shunt holds is dumped through the channel, the
// external capacitor's ½·C·v² and the part's own output energy E_oss(v)
// (0 for v ≤ 0).
func shuntDump(cExt q.Capacitance, d *fit.Device, v q.Voltage, f float64) q.Power {
	if v <= 0 {
		return 0
	}
	return q.Power((0.5*float64(cExt)*float64(v)*float64(v) + float64(d.Oss.E(v))) * f)
}
