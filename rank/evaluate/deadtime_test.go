package evaluate

import (
	"math"
	"testing"

	"swrank/devices"
	q "swrank/devices/quantity"
	"swrank/rank/fit"
	"swrank/rank/internal/testkit"
)

// The diode's share of each 20 ns dead time of TestDeadTimeDiodeShare's
// buck (the hand-case part with crss in both places, 10 A, turn-on loop
// 3 Ω, turn-off loop 2 Ω, 5 V drive from 0 V) when the part gives its
// delay times td_on = 2 ns and td_off = 5 ns, measured at tsw_vgs = 4.5 V,
// tsw_id = 10 A through tsw_rg + tsw_rgen + rg_int = 4 Ω. A hand
// calculation from the IEC 60747-8 delay-time definitions and the RC gate
// (Balogh, "Design and Application Guide for High Speed MOSFET Gate Drive
// Circuits", 2001), the square-law plateau V_pl(i) = 1.8 V + 0.7 V·√(i/10 A)
// (Sze & Ng 2007, ch. 6):
//
//	C_on  = td_on/(R_test·ln(0.9·4.5/(4.5 − V_pl(1 A))))
//	      = 2 ns/(4 Ω·ln(4.05/2.4786)) = 1.0183 nF  (in place of Qth/Vth)
//	C_off = td_off/(R_test·ln(0.9·4.5/V_pl(9 A)))
//	      = 5 ns/(4 Ω·ln(4.05/2.4641)) = 2.5156 nF  (in place of the curve's)
//	edge 1: control gate 5 → 2.5 V: 2 Ω·2.5156 nF·ln 2 = 3.487 ns; voltage
//	        rise 1.6 ns and current fall 0.930 ns (half counted), as
//	        before; sync gate 0 → V½ = 2.295 V: 3 Ω·1.0183 nF·ln(5/2.705)
//	        = 1.877 ns. Diode: 20 − (3.487 + 1.6 + 0.465 − 1.877) = 16.32 ns.
//	        Margin: 20 + 3 Ω·1.0183 nF·ln(5/3.2) − (3.487 + 1.6 + 0.930)
//	        = 20 + 1.363 − 6.017 = 15.35 ns.
//	edge 2: sync gate 5 → V½ at 0 V drain: 2 Ω·2.5156 nF·ln(5/2.295)
//	        = 3.918 ns; control gate to 1.8 V 1.363 ns, current rise
//	        1.053 ns, half counted. Diode: 20 − (3.918 − 1.363 − 0.526)
//	        = 17.97 ns. Margin: 20 + 1.363 − 2 Ω·2.5156 nF·ln(5/1.8)
//	        = 20 + 1.363 − 5.140 = 16.22 ns.
//
// With td_on alone, only the turn-on delays change: edge 1 takes the
// control gate's 2.218 ns of TestDeadTimeDiodeShare, edge 2 the sync
// gate's 2.472 ns (to V½) and 3.193 ns (to 1.8 V).
func TestDeadTimeDelayTimes(t *testing.T) {
	const (
		cOn  = 2e-9 / (4 * 0.491006631) // F
		cOff = 5e-9 / (4 * 0.496899055) // F
	)
	var (
		onTh    = 3 * cOn * math.Log(5/3.2)       // control or sync gate 0 → 1.8 V
		onHalf  = 3 * cOn * math.Log(5/(5-vHalf)) // sync gate 0 → V½
		offPl   = 2 * cOff * math.Log(2)          // control gate 5 → 2.5 V
		offHalf = 2 * cOff * math.Log(5/vHalf)    // sync gate 5 → V½
		offTh   = 2 * cOff * math.Log(5/1.8)      // sync gate 5 → 1.8 V
		tvr     = 2e-9 / 1.25                     // voltage rise
		tif     = 1e-9 / 1.075                    // current fall
		tir     = 1e-9 / 0.95                     // current rise
		oldPl   = 2 * 1.6e-9 * math.Log(2)        // 2.218 ns
		oldHalf = 2 * (6e-9 - (1e-9 + (vHalf-1.8)/0.7*1e-9)) / (5 - vHalf) * math.Log(5/vHalf)
		oldTh   = 2 * (5e-9 / 3.2) * math.Log(5/1.8) // 3.193 ns
	)
	part := func(on, off bool) devices.Part {
		p := testkit.HandCasePart()
		p.Crss = q.Some[q.Capacitance](50e-12)
		p.TswVgs, p.TswId = q.Some[q.Voltage](4.5), q.Some[q.Current](10)
		p.TswRg, p.TswRgen = q.Some[q.Resistance](2), q.Some[q.Resistance](1)
		if on {
			p.TdOn = q.Some[q.Time](2e-9)
		}
		if off {
			p.TdOff = q.Some[q.Time](5e-9)
		}
		return p
	}
	cases := []struct {
		name           string
		on, off        bool
		t1, t2, m1, m2 float64    // s
		hand           [4]float64 // t1, t2, m1, m2 rounded by hand, s (0: not checked)
	}{
		{"td_on and td_off", true, true,
			20e-9 - (offPl + tvr + tif/2 - onHalf), 20e-9 - (offHalf - onTh - tir/2),
			20e-9 + onTh - (offPl + tvr + tif), 20e-9 + onTh - offTh,
			[4]float64{16.32e-9, 17.97e-9, 15.35e-9, 16.22e-9}},
		{"td_on only", true, false,
			20e-9 - (oldPl + tvr + tif/2 - onHalf), 20e-9 - (oldHalf - onTh - tir/2),
			20e-9 + onTh - (oldPl + tvr + tif), 20e-9 + onTh - oldTh, [4]float64{}},
		{"td_off only", false, true,
			20e-9 - (offPl + tvr + tif/2 - 3*cgsA*math.Log(5/(5-vHalf))), 20e-9 - (offHalf - dOn - tir/2),
			20e-9 + dOn - (offPl + tvr + tif), 20e-9 + dOn - offTh, [4]float64{}},
		// Blank delays with the test conditions given: the old timing.
		{"blank", false, false, deadA, deadB,
			20e-9 + dOn - (oldPl + tvr + tif), 20e-9 + dOn - oldTh, [4]float64{}},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			r := evalPart(t, part(c.on, c.off), handCaseStage(25), nil)
			sy := &r.Devices[1]
			testkit.Near(t, "diode edge 1", float64(sy.TDiode1), c.t1, 1e-6)
			testkit.Near(t, "diode edge 2", float64(sy.TDiode2), c.t2, 1e-6)
			testkit.Near(t, "margin edge 1", float64(sy.Margin1), c.m1, 1e-6)
			testkit.Near(t, "margin edge 2", float64(sy.Margin2), c.m2, 1e-6)
			got := [4]float64{float64(sy.TDiode1), float64(sy.TDiode2), float64(sy.Margin1), float64(sy.Margin2)}
			for i, what := range [4]string{"diode edge 1", "diode edge 2", "margin edge 1", "margin edge 2"} {
				if c.hand[i] != 0 {
					testkit.Near(t, what+" (rounded by hand)", got[i], c.hand[i], 1e-3)
				}
			}
			if r.Screens&ScreenCrossConduction != 0 || r.Flags&fit.FlagTdNoConditions != 0 {
				t.Errorf("screens %v, flags %s", r.Screens, r.Flags.Codes())
			}
		})
	}
}

// A part that leaves td_on and td_off blank is evaluated exactly as
// before; so is one whose delays cannot be used (no tsw_vgs), which is
// flagged td-cond? without counting it as an estimate.
func TestDeadTimeDelayTimesUnused(t *testing.T) {
	base := testkit.HandCasePart()
	base.Crss = q.Some[q.Capacitance](50e-12)
	want := evalPart(t, base, handCaseStage(25), nil)
	blank := base
	blank.TswVgs, blank.TswId, blank.TswRg = q.Some[q.Voltage](4.5), q.Some[q.Current](10), q.Some[q.Resistance](2)
	unused := base
	unused.TdOn, unused.TdOff = q.Some[q.Time](2e-9), q.Some[q.Time](5e-9)
	unused.TswId, unused.TswRg = q.Some[q.Current](10), q.Some[q.Resistance](2)
	for _, c := range []struct {
		name string
		p    devices.Part
		flag bool
	}{{"blank", blank, false}, {"no tsw_vgs", unused, true}} {
		r := evalPart(t, c.p, handCaseStage(25), nil)
		for i := range r.N {
			a, b := &r.Devices[i], &want.Devices[i]
			if a.Losses != b.Losses || a.TDiode1 != b.TDiode1 || a.TDiode2 != b.TDiode2 || a.Margin1 != b.Margin1 || a.Margin2 != b.Margin2 {
				t.Errorf("%s, %s: %+v, want %+v", c.name, a.Role, a.Losses, b.Losses)
			}
		}
		if got := r.Flags&fit.FlagTdNoConditions != 0; got != c.flag || r.Flags.Estimates() != want.Flags.Estimates() {
			t.Errorf("%s: flags %s (want td-cond? %v, %d estimates)", c.name, r.Flags.Codes(), c.flag, want.Flags.Estimates())
		}
	}
}
