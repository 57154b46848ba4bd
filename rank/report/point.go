package report

import (
	"swrank/rank/stage"
)

// The operating point's fields, for JSON (docs/output.md lists them with
// the results' fields).
var pointFields = []Field{
	{"topology", "topology", "", KindText, "", "buck, boost, custom, class-e or class-d"},
	{"rectifier", "rectifier", "", KindText, "", "buck and boost: sync or diode"},
	{"pout_w", "Pout", "W", KindNumber, "", "output power"},
	{"vout_v", "vout", "V", KindNumber, "", "output voltage"},
	{"inductor_current_a", "IL", "A", KindNumber, "", "average inductor current"},
	{"ripple_a", "ripple", "A", KindNumber, "", "inductor ripple, peak to peak"},
	{"inductance_h", "L", "H", KindNumber, "", "inductor (0: set by the ripple)"},
	{"dead_time_s", "dead time", "s", KindNumber, "", "dead time at each edge (stages with one)"},
	{"dead_time_default", "dead time default", "", KindBool, "", "the dead time is the default, not given"},
	{"dead_time_sync_on_s", "dead time sync on", "s", KindNumber, "", "synchronous stage: the dead time after the control switch turns off, before the sync switch turns on"},
	{"dead_time_ctrl_on_s", "dead time ctrl on", "s", KindNumber, "", "synchronous stage: the dead time after the sync switch turns off, before the control switch turns on"},
	{"diode_vf_v", "diode Vf", "V", KindNumber, "", "rectifier diode forward drop"},
	{"diode_qrr_c", "diode Qrr", "C", KindNumber, "", "rectifier diode recovered charge"},
	{"diode_cj_f", "diode Cj", "F", KindNumber, "", "rectifier diode junction capacitance"},
	{"diode_loss_w", "diode loss", "W", KindNumber, "", "the rectifier diode's own loss (not in total_w)"},
	{"vdrive_off_v", "vdrive off", "V", KindNumber, "", "gate drive off level"},
	{"rsrc_ohm", "Rsrc", "Ω", KindNumber, "", "driver source resistance"},
	{"rsnk_ohm", "Rsnk", "Ω", KindNumber, "", "driver sink resistance"},
	{"ipk_src_a", "Ipk src", "A", KindNumber, "", "driver peak source current limit (0: none)"},
	{"ipk_snk_a", "Ipk snk", "A", KindNumber, "", "driver peak sink current limit (0: none)"},
	{"rg_ext_ohm", "Rg ext", "Ω", KindNumber, "", "external gate resistor"},
	{"iq_a", "Iq", "A", KindNumber, "", "driver quiescent current"},
	{"drive_edge_s", "drive edge", "s", KindNumber, "", "the driver's own 0-100 % output edge without its load (0: a step)"},
	{"sync_vdrive_v", "sync vdrive", "V", KindNumber, "", "the sync switch's own driver (when given): gate drive on level"},
	{"sync_vdrive_off_v", "sync vdrive off", "V", KindNumber, "", "the sync switch's own driver: gate drive off level"},
	{"sync_rsrc_ohm", "sync Rsrc", "Ω", KindNumber, "", "the sync switch's own driver: source resistance"},
	{"sync_rsnk_ohm", "sync Rsnk", "Ω", KindNumber, "", "the sync switch's own driver: sink resistance"},
	{"sync_rg_ext_ohm", "sync Rg ext", "Ω", KindNumber, "", "the sync switch's own driver: external gate resistor"},
	{"sync_drive_edge_s", "sync drive edge", "s", KindNumber, "", "the sync switch's own driver: its output edge"},
	{"ta_c", "Ta", "°C", KindNumber, "", "ambient temperature used"},
	{"ta_default", "Ta default", "", KindBool, "", "the ambient is the default, not given"},
	{"rth_ca_k_per_w", "Rth ca", "K/W", KindNumber, "", "case-to-ambient thermal resistance added to rth_jc"},
	{"tj_fixed_c", "Tj pinned", "°C", KindNumber, "", "every junction pinned at this temperature"},
	{"l_loop_h", "L loop", "H", KindNumber, "", "layout power-loop inductance added to the parts' own (when given)"},
	{"l_cs_h", "L cs", "H", KindNumber, "", "layout common-source inductance added to the parts' own (when given)"},
	{"derate", "derate", "", KindNumber, "", "derating limit: the fraction of vds_max the peak drain voltage may reach"},
	{"rload_ohm", "Rload", "Ω", KindNumber, "", "class E and D: load resistance"},
	{"ql", "QL", "", KindNumber, "", "class E and D: loaded Q (0: ideal)"},
	{"f0_hz", "f0", "Hz", KindNumber, "", "class D: tank resonant frequency"},
	{"phase_rad", "phase", "rad", KindNumber, "", "class D: load phase at fsw"},
	{"notes_list", "notes", "", KindList, "", "what swrank assumed or noticed about the point"},
	// Each place's stresses, under "control" and "sync".
	{"duty", "duty", "", KindNumber, "", "fraction of the period the switch conducts (blank: not stated, as for the custom stage)"},
	{"v_block_v", "V block", "V", KindNumber, "", "voltage blocked at the hard edges"},
	{"i_on_a", "I on", "A", KindNumber, "", "current at turn-on"},
	{"i_off_a", "I off", "A", KindNumber, "", "current at turn-off"},
	{"i_rms_a", "I rms", "A", KindNumber, "", "rms current"},
	{"i_peak_a", "I peak", "A", KindNumber, "", "peak current"},
	{"hard_turn_on", "hard on", "", KindBool, "", "the turn-on is hard-switched"},
	{"hard_turn_off", "hard off", "", KindBool, "", "the turn-off is hard-switched"},
}

// PointFields returns the operating point's field names (a new slice at
// each call).
func PointFields() []Field { return append([]Field(nil), pointFields...) }

// pointRecords fills rep.Point and rep.Stress from pt.
func pointRecords(rep *Report, pt *stage.Point) {
	rep.Point, rep.Stress = pointRecord(pt)
}

func pointRecord(pt *stage.Point) (Record, map[string]Record) {
	s := &pt.Stage
	d := &s.Driver
	var r Record
	r.Set("topology", Text(s.Topology.String()))
	r.Set("mode", Text(pt.Mode.String()))
	r.Set("position", Text(s.Position.String()))
	switch s.Topology {
	case stage.ClassE, stage.ClassD:
		r.Set("vin_v", Num(float64(s.Vin)))
		r.Set("rload_ohm", Num(float64(s.RLoad)))
		r.Set("ql", Num(float64(s.QL)))
		if s.Topology == stage.ClassD {
			r.Set("f0_hz", Num(float64(s.F0)))
			r.Set("phase_rad", Num(float64(pt.RF.D.Phase)))
		} else {
			r.Set("shunt_needed_f", Num(float64(pt.RF.E.C1)))
		}
	case stage.Custom:
		r.Set("vin_v", Num(float64(s.Vblock)))
	default:
		r.Set("rectifier", Text(s.Rectifier.String()))
		r.Set("vin_v", Num(float64(s.Vin)))
		r.Set("vout_v", Num(float64(s.Vout)))
		r.Set("iout_a", Num(float64(s.Iout)))
		r.Set("inductor_current_a", Num(float64(pt.IL)))
		r.Set("ripple_a", Num(float64(pt.Ripple)))
		r.Set("inductance_h", Num(float64(s.Inductance)))
	}
	pout := Unknown()
	if s.Pout > 0 {
		pout = Num(float64(s.Pout))
	}
	r.Set("pout_w", pout)
	r.Set("fsw_hz", Num(float64(s.Fsw)))
	if pt.HasSync || s.Topology == stage.ClassD {
		r.Set("dead_time_s", Num(float64(s.DeadTime.V)))
		r.Set("dead_time_default", Bool(pt.Defaulted.DeadTime))
		if pt.HasSync && s.Topology != stage.ClassD {
			r.Set("dead_time_sync_on_s", Num(float64(s.DeadTimeSyncOn.V)))
			r.Set("dead_time_ctrl_on_s", Num(float64(s.DeadTimeCtrlOn.V)))
		}
	}
	if pt.HasDiode {
		r.Set("diode_vf_v", Num(float64(s.Diode.Vf)))
		r.Set("diode_qrr_c", Num(float64(s.Diode.Qrr)))
		r.Set("diode_cj_f", Num(float64(s.Diode.Cj)))
		r.Set("diode_loss_w", Num(float64(pt.DiodeLoss)))
	}
	r.Set("vdrive_v", Num(float64(d.VOn)))
	r.Set("vdrive_off_v", Num(float64(d.VOff)))
	r.Set("rsrc_ohm", Num(float64(d.RSource)))
	r.Set("rsnk_ohm", Num(float64(d.RSink)))
	r.Set("ipk_src_a", Num(float64(d.IPeakSource)))
	r.Set("ipk_snk_a", Num(float64(d.IPeakSink)))
	r.Set("rg_ext_ohm", Num(float64(d.RgExt)))
	r.Set("iq_a", Num(float64(d.IQ)))
	r.Set("drive_edge_s", Num(float64(d.Edge)))
	if sd := &s.SyncDriver; sd.VOn > 0 && pt.HasSync {
		r.Set("sync_vdrive_v", Num(float64(sd.VOn)))
		r.Set("sync_vdrive_off_v", Num(float64(sd.VOff)))
		r.Set("sync_rsrc_ohm", Num(float64(sd.RSource)))
		r.Set("sync_rsnk_ohm", Num(float64(sd.RSink)))
		r.Set("sync_rg_ext_ohm", Num(float64(sd.RgExt)))
		r.Set("sync_drive_edge_s", Num(float64(sd.Edge)))
	}
	r.Set("ta_c", Num(float64(s.Ambient)))
	r.Set("ta_default", Bool(pt.Defaulted.Ambient))
	if s.RthCA.OK {
		r.Set("rth_ca_k_per_w", Num(float64(s.RthCA.V)))
	}
	if s.TjFixed.OK {
		r.Set("tj_fixed_c", Num(float64(s.TjFixed.V)))
	}
	if s.LoopInductance > 0 {
		r.Set("l_loop_h", Num(float64(s.LoopInductance)))
	}
	if s.CommonSourceInductance > 0 {
		r.Set("l_cs_h", Num(float64(s.CommonSourceInductance)))
	}
	r.Set("derate", Num(float64(s.Derate)))
	r.Set("notes_list", List(pt.Notes))
	stress := map[string]Record{"control": stressRecord(&pt.Ctrl, s.Topology == stage.Custom)}
	if pt.HasSync {
		stress["sync"] = stressRecord(&pt.Sync, false)
	}
	return r, stress
}

// stressRecord is what one place asks of its switch; the duty is unknown
// when the stage does not state it (custom).
func stressRecord(s *stage.SwitchStress, noDuty bool) Record {
	var r Record
	duty := Num(float64(s.Duty))
	if noDuty {
		duty = Unknown()
	}
	r.Set("duty", duty)
	r.Set("v_block_v", Num(float64(s.V)))
	r.Set("i_on_a", Num(float64(s.IOn)))
	r.Set("i_off_a", Num(float64(s.IOff)))
	r.Set("i_rms_a", Num(float64(s.IRms)))
	r.Set("i_peak_a", Num(float64(s.IPeak)))
	r.Set("hard_turn_on", Bool(s.HardOn))
	r.Set("hard_turn_off", Bool(s.HardOff))
	return r
}
