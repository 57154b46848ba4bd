package fit

import (
	"testing"

	q "swrank/devices/quantity"
	"swrank/rank/internal/testkit"
)

// The extrapolated threshold of the square-law channel, by hand (Sze & Ng,
// Physics of Semiconductor Devices, 3rd ed., 2007, ch. 6: I = K·(V_gs −
// V_t)² in saturation, g_fs = 2·√(K·I)). The hand-case part (V_th 1.8 V,
// plateau 2.5 V at 10 A):
//   - with gfs 20 S at 10 A (K = 400/40 = 10 A/V²) and vgs_th_id 1 mA:
//     V_t = 1.8 − 2·√(1e-3·10)/20 = 1.79 V, and the plateau from gfs
//     (v_plateau blank) 1.79 + 2·√(10·10)/20 = 2.79 V;
//   - without gfs, from the plateau: r = √(10/1e-3) = 100,
//     V_t = 1.8 − 0.7/99 = 1.792929 V; the plateau at 2.5 A then
//     1.792929 + 0.707071·½ = 2.146465 V (1.8 + 0.7·½ = 2.15 V blank).
func TestExtrapolatedThreshold(t *testing.T) {
	p := testkit.HandCasePart()
	p.VgsThId = q.Some[q.Current](1e-3)
	d, err := Prepare(&p)
	if err != nil {
		t.Fatal(err)
	}
	testkit.Near(t, "V_t from the plateau", float64(d.VthSq), 1.8-0.7/99, 1e-9)
	testkit.Near(t, "plateau at 2.5 A", float64(d.PlateauAt(2.5)), 1.8-0.7/99+(0.7+0.7/99)/2, 1e-9)
	p.VgsThId = q.Opt[q.Current]{}
	d, _ = Prepare(&p)
	testkit.Near(t, "plateau at 2.5 A, vgs_th_id blank", float64(d.PlateauAt(2.5)), 2.15, 1e-9)

	p = testkit.HandCasePart()
	p.VPlateau = q.Opt[q.Voltage]{}
	p.Gfs, p.GfsId, p.VgsThId = q.Some(q.Conductance(20)), q.Some(q.Current(10)), q.Some[q.Current](1e-3)
	d, err = Prepare(&p)
	if err != nil {
		t.Fatal(err)
	}
	testkit.Near(t, "V_t from gfs", float64(d.VthSq), 1.79, 1e-9)
	testkit.Near(t, "plateau from gfs", float64(d.VplSpec), 2.79, 1e-9)
	if d.Flags&FlagPlateauEstimated != 0 {
		t.Error("plateau from gfs flagged as estimated")
	}
}

// A second total gate charge (IEC 60747-8 gate charge; the piecewise
// curve of Balogh 2001). The hand-case part: Qg 8 nC at 5 V, Qgs 2 nC,
// Qgd 2 nC, plateau 2.5 V (slope without qg2: 4 nC/2.5 V = 1.6 nF).
//   - qg2 = 10 nC at 8 V: slope (10 − 8)/3 = 0.667 nF; the curve passes
//     through 8 nC at 5 V and 10 nC at 8 V; a 6.5 V drive holds 9 nC;
//   - qg2 = 6 nC at 3.5 V: slope (8 − 6)/1.5 = 1.333 nF, knee 1 V above
//     the plateau with 2 nC: Q(3 V) = 4 + 1 = 5 nC, Q(4 V) = 6.667 nC;
//   - qg2 = 1 nC at 1.25 V with qgs blank: a point of the lower curve,
//     Qgs = 1·2.5/1.25 = 2 nC (a constant Cgs), no longer estimated.
func TestSecondTotal(t *testing.T) {
	for _, c := range []struct {
		name      string
		q2, v2    float64
		blankQgs  bool
		pts       [][2]float64 // (V, Q) on the curve at the test's conditions
		wantSlope float64
	}{
		{"above qg_vgs", 10e-9, 8, false, [][2]float64{{5, 8e-9}, {8, 10e-9}, {6.5, 9e-9}}, 2e-9 / 3},
		{"between the plateau and qg_vgs", 6e-9, 3.5, false, [][2]float64{{3, 5e-9}, {3.5, 6e-9}, {4, 8e-9 - 2e-9/1.5}, {5, 8e-9}}, 2e-9 / 1.5},
		{"below the plateau, qgs blank", 1e-9, 1.25, true, [][2]float64{{5, 8e-9}}, 1.6e-9},
	} {
		p := testkit.HandCasePart()
		p.Qg2, p.Qg2Vgs = q.Some(q.Charge(c.q2)), q.Some(q.Voltage(c.v2))
		if c.blankQgs {
			p.Qgs, p.QgTh = q.Opt[q.Charge]{}, q.Opt[q.Charge]{}
		}
		d, err := Prepare(&p)
		if err != nil {
			t.Fatalf("%s: %v", c.name, err)
		}
		testkit.Near(t, c.name+": slope", float64(d.Slope), c.wantSlope, 1e-9)
		cv := d.Curve(p.QgVds.V, p.QgId.V, 0)
		for _, pt := range c.pts {
			testkit.Near(t, c.name+": Q at V", float64(cv.Charge(q.Voltage(pt[0]))), pt[1], 1e-9)
		}
		if c.blankQgs {
			testkit.Near(t, c.name+": qgs", float64(d.Qth+d.Qgs2), 2e-9, 1e-9)
			if d.Flags&FlagGateChargeEstimated != 0 {
				t.Errorf("%s: qgs still flagged as estimated", c.name)
			}
		}
	}
}
