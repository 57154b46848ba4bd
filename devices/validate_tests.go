package devices

// Checks of the columns that state a second gate-charge point and the
// test currents of the threshold and the on-resistance.

// checkQg2 checks the second total gate charge qg2 at qg2_vgs against the
// first (qg at qg_vgs) and, when the plateau is given, against the
// charges to and across it: the gate-charge curve rises with the gate
// voltage, so the lower voltage carries the smaller charge, a point above
// the plateau holds more than qgs + qgd and a point below it less than
// qgs (IEC 60747-8 gate-charge definitions).
func (v *validator) checkQg2() {
	p := v.p
	v.needs("qg2", p.Qg2.OK, "qg2_vgs", p.Qg2Vgs.OK)
	if p.Qg2Vgs.OK && !p.Qg2.OK && v.ok("qg2_vgs", "qg2") {
		v.add("qg2", ErrMissingValue, "needed by qg2_vgs (the charge at that gate voltage)")
	}
	if !p.Qg2.OK || !p.Qg2Vgs.OK || !v.ok("qg2", "qg2_vgs", "qg", "qg_vgs", "vgs_max") {
		return
	}
	q2, v2 := p.Qg2.V, p.Qg2Vgs.V
	switch {
	case v2 == p.QgVgs:
		v.add("qg2_vgs", ErrInconsistent, "%s: the same gate voltage as qg_vgs; the second total must be at another voltage", fmtq(v2))
		return
	case v2 > p.VgsMax:
		v.add("qg2_vgs", ErrInconsistent, "%s: must not exceed vgs_max (%s)", fmtq(v2), fmtq(p.VgsMax))
		return
	case v2 < p.QgVgs && q2 >= p.Qg:
		v.add("qg2", ErrInconsistent, "%s at %s against qg %s at %s: a lower gate voltage must hold a smaller charge",
			fmtq(q2), fmtq(v2), fmtq(p.Qg), fmtq(p.QgVgs))
		return
	case v2 > p.QgVgs && q2 <= p.Qg:
		v.add("qg2", ErrInconsistent, "%s at %s against qg %s at %s: a higher gate voltage must hold a larger charge",
			fmtq(q2), fmtq(v2), fmtq(p.Qg), fmtq(p.QgVgs))
		return
	}
	if !p.VPlateau.OK || !v.ok("v_plateau", "qgs", "qgd") {
		return
	}
	vpl := p.VPlateau.V
	switch {
	case v2 > vpl && p.Qgs.OK && p.Qgd.OK && q2 <= p.Qgs.V+p.Qgd.V:
		v.add("qg2", ErrInconsistent, "%s at %s, above v_plateau (%s): must exceed qgs + qgd (%s)",
			fmtq(q2), fmtq(v2), fmtq(vpl), fmtq(p.Qgs.V+p.Qgd.V))
	case v2 < vpl && p.Qgs.OK && q2 >= p.Qgs.V:
		v.add("qg2", ErrInconsistent, "%s at %s, below v_plateau (%s): must be below qgs (%s)",
			fmtq(q2), fmtq(v2), fmtq(vpl), fmtq(p.Qgs.V))
	}
}

// checkTestCurrents checks the test currents of the threshold and the
// on-resistance against the part's rating: the threshold is measured at a
// small current, the on-resistance at or below the continuous rating
// (common practice).
func (v *validator) checkTestCurrents() {
	p := v.p
	if p.VgsThId.OK && v.ok("vgs_th_id", "id_max") && p.VgsThId.V >= p.IdMax {
		v.add("vgs_th_id", ErrInconsistent, "%s: must be below id_max (%s); the threshold is measured at a small current", fmtq(p.VgsThId.V), fmtq(p.IdMax))
	}
	if p.RdsOnId.OK && v.ok("rds_on_id", "id_max") && p.RdsOnId.V > p.IdMax {
		v.add("rds_on_id", ErrInconsistent, "%s: above id_max (%s); the on-resistance is measured at or below the continuous rating", fmtq(p.RdsOnId.V), fmtq(p.IdMax))
	}
}
