package devices

import (
	"strings"
	"testing"
)

// The checks of qg2 at qg2_vgs and of the test currents, each located at
// its file, line, column and field as a user sees it (the gate-charge
// curve rises with the gate voltage: IEC 60747-8 definitions; a charge
// above the plateau holds Qgs + Qgd; the threshold at a small current and
// the on-resistance at or below the rating: common practice). Each line
// was checked by hand against the fixture (column 16 is qg2, 17 qg2_vgs,
// 18 rds_on_id, 19 vgs_th_id).
func TestGatePointsChecked(t *testing.T) {
	want := []string{
		`gate_points.csv:4:17: qg2_vgs: 10.00 V: the same gate voltage as qg_vgs; the second total must be at another voltage`,
		`gate_points.csv:5:16: qg2: 12.00 nC at 4.500 V against qg 12.00 nC at 10.00 V: a lower gate voltage must hold a smaller charge`,
		`gate_points.csv:6:16: qg2: 5.000 nC at 4.500 V, above v_plateau (3.000 V): must exceed qgs + qgd (6.000 nC)`,
		`gate_points.csv:7:16: qg2: 4.000 nC at 2.500 V, below v_plateau (3.000 V): must be below qgs (3.500 nC)`,
		`gate_points.csv:8:17: qg2_vgs: needed by qg2 (its test condition)`,
		`gate_points.csv:9:18: rds_on_id: 50.00 A: above id_max (40.00 A); the on-resistance is measured at or below the continuous rating`,
		`gate_points.csv:10:19: vgs_th_id: 800.0 mA: must be below id_max (500.0 mA); the threshold is measured at a small current`,
	}
	for _, d := range decoders {
		lib, probs := checkFile(t, "gate_points.csv", d.kind)
		var got []string
		for _, p := range probs {
			got = append(got, p.Error())
		}
		if strings.Join(got, "\n") != strings.Join(want, "\n") {
			t.Errorf("%s: problems\n%s\nwant\n%s", d.name, strings.Join(got, "\n"), strings.Join(want, "\n"))
		}
		if len(lib.Parts) != 1 || lib.Parts[0].Name != "gp-good" || !lib.Parts[0].Qg2.OK || lib.Parts[0].RdsOnId.V != 20 || lib.Parts[0].VgsThId.V != 250e-6 {
			t.Errorf("%s: parts %+v", d.name, lib.Parts)
		}
	}
}
