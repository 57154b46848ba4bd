package rank_test

import (
	"testing"

	"swrank/devices"
	q "swrank/devices/quantity"
	"swrank/rank/fit"
)

// Unknown is not zero for the columns qg2, rds_on_id and vgs_th_id (the
// project's rule, TestBlankingNeverRanksHigher): each demo part is given
// each column at a value consistent with the rest of its row — qg2 at
// 4.5 V (or half of qg_vgs) on its own gate curve, rds_on_id at
// id_max/2 and vgs_th_id at 250 µA (the usual datasheet tests, common
// practice) — and the copy without it must not rank above that copy, at
// every point of the property.
func TestBlankingGatePointsNeverRanksHigher(t *testing.T) {
	demo, err := devices.Demo()
	if err != nil {
		t.Fatal(err)
	}
	checked := 0
	for _, pt := range blankingPoints(t) {
		for _, col := range []string{"qg2", "rds_on_id", "vgs_th_id"} {
			filled := make([]devices.Part, len(demo.Parts))
			for i := range demo.Parts {
				filled[i] = demo.Parts[i]
				fill(t, &filled[i], col)
			}
			base := rankParts(t, filled, &pt.p)
			for i := range filled {
				was := position(base, filled[i].Name)
				if was < 0 || base[was].Screened() {
					continue
				}
				p := filled[i]
				blank(&p, col)
				if col == "qg2" {
					blank(&p, "qg2_vgs")
				}
				r, ok := evaluatePart(&p, &pt.p)
				if !ok || r.Screened() {
					continue
				}
				checked++
				if now := placeAmong(base, &r); now < was {
					t.Errorf("blank %s moves %s up at %s: place %d → %d", col, p.Name, pt.name, was+1, now+1)
				}
			}
		}
	}
	if checked < 100 {
		t.Fatalf("only %d cases checked", checked)
	}
}

// fill gives part p column col at a value consistent with the rest of its
// row (see TestBlankingGatePointsNeverRanksHigher); a column the part
// gives is kept.
func fill(t *testing.T, p *devices.Part, col string) {
	t.Helper()
	switch col {
	case "rds_on_id":
		if !p.RdsOnId.OK {
			p.RdsOnId = q.Some(p.IdMax / 2)
		}
	case "vgs_th_id":
		if !p.VgsThId.OK {
			p.VgsThId = q.Some[q.Current](250e-6)
		}
	case "qg2":
		if p.Qg2.OK {
			return
		}
		d, err := fit.Prepare(p)
		if err != nil || d.Method != fit.MethodGateCharge {
			return
		}
		v := min(q.Voltage(4.5), p.QgVgs/2)
		if v <= d.Vth {
			return
		}
		c := d.Curve(d.QgVds, d.QgId, 0)
		p.Qg2, p.Qg2Vgs = q.Some(c.Charge(v)), q.Some(v)
	}
}
