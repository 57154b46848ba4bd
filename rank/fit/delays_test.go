package fit

import (
	"math"
	"testing"

	"swrank/devices"
	q "swrank/devices/quantity"
	"swrank/rank/internal/testkit"
)

// Delay capacitances of the hand-case part (threshold 1.8 V, plateau
// 2.5 V at 10 A, rg_int 1 Ω) from td_on = 2 ns and td_off = 5 ns measured
// at tsw_vgs = 4.5 V, tsw_id = 10 A, tsw_rg = 2 Ω, tsw_rgen = 1 Ω, worked
// by hand from the IEC 60747-8 delay-time definitions and the RC gate
// (Balogh, "Design and Application Guide for High Speed MOSFET Gate Drive
// Circuits", 2001), with the square-law plateau V_pl(i) = 1.8 V +
// 0.7 V·√(i/10 A) (Sze & Ng 2007, ch. 6):
//
//	R_test = 2 + 1 + 1 = 4 Ω
//	V10 = 1.8 + 0.7·√0.1 = 2.0214 V; V90 = 1.8 + 0.7·√0.9 = 2.4641 V
//	td_on  = R·C_on·ln(0.9·4.5/(4.5 − 2.0214)) = R·C_on·ln(4.05/2.4786)
//	       = 4·C_on·0.49101  → C_on  = 2 ns/1.96403 Ω = 1.0183 nF
//	td_off = R·C_off·ln(0.9·4.5/2.4641) = 4·C_off·0.49690
//	                         → C_off = 5 ns/1.98760 Ω = 2.5156 nF
//
// Without rg_int the silicon estimate 3 Ω (flag rg?) makes R_test 6 Ω:
// C_on = 2 ns/(6·0.49101) = 0.67888 nF, C_off = 5 ns/(6·0.49690) =
// 1.6771 nF. At tsw_vgs = 2.2 V the turn-off delay cannot be an RC gate's
// (V90 = 2.464 V lies above 0.9·2.2 = 1.98 V: the gate is past it when the
// delay starts), while C_on = 2 ns/(4·ln(1.98/0.17864)) = 2 ns/(4·2.40548)
// = 0.20786 nF.
//
// With the test's supply tsw_vdd = 12 V each delay also holds the Miller
// charge of the first tenth of the drain's swing. Without crss the part's
// whole Qgd = 2 nC is taken below its 12 V test voltage (MillerChargeAt):
// turn-on, from 12 to 10.8 V, moves none of it; turn-off, from 0 to
// 1.2 V, all of it at V90/R = 0.616 A: 4 Ω·2 nC/2.4641 V = 3.24665 ns, so
// C_off = (5 − 3.24665) ns/1.98760 Ω = 0.88215 nF.
func TestFitDelays(t *testing.T) {
	const (
		lnOn  = 0.491006631 // ln(4.05/(4.5 − 2.0213594))
		lnOff = 0.496899055 // ln(4.05/2.4640783)
	)
	base := func() devices.Part {
		p := testkit.HandCasePart()
		p.TdOn, p.TdOff = q.Some[q.Time](2e-9), q.Some[q.Time](5e-9)
		p.TswVgs, p.TswId = q.Some[q.Voltage](4.5), q.Some[q.Current](10)
		p.TswRg, p.TswRgen = q.Some[q.Resistance](2), q.Some[q.Resistance](1)
		return p
	}
	cases := []struct {
		name      string
		edit      func(p *devices.Part)
		con, coff float64 // F; 0: not derived
		flag      bool    // td-cond? set
	}{
		{"both delays", func(*devices.Part) {}, 2e-9 / (4 * lnOn), 5e-9 / (4 * lnOff), false},
		{"hand values", func(*devices.Part) {}, 1.0183162e-9, 2.5156015e-9, false},
		{"td_on only", func(p *devices.Part) { p.TdOff = q.Opt[q.Time]{} }, 2e-9 / (4 * lnOn), 0, false},
		{"td_off only", func(p *devices.Part) { p.TdOn = q.Opt[q.Time]{} }, 0, 5e-9 / (4 * lnOff), false},
		{"no delays", func(p *devices.Part) { p.TdOn, p.TdOff = q.Opt[q.Time]{}, q.Opt[q.Time]{} }, 0, 0, false},
		{"the test's supply: the Miller tenth", func(p *devices.Part) { p.TswVdd = q.Some[q.Voltage](12) },
			2e-9 / (4 * lnOn), 0.8821459e-9, false},
		// As for tr/tf: one test resistance blank is 0 Ω (3 + 0 + 1 Ω).
		{"tsw_rgen blank", func(p *devices.Part) {
			p.TswRg, p.TswRgen = q.Some[q.Resistance](3), q.Opt[q.Resistance]{}
		}, 2e-9 / (4 * lnOn), 5e-9 / (4 * lnOff), false},
		{"rg_int estimated", func(p *devices.Part) { p.RgInt = q.Opt[q.Resistance]{} }, 0.67887746e-9, 1.6770677e-9, false},
		{"both test resistances blank", func(p *devices.Part) {
			p.TswRg, p.TswRgen = q.Opt[q.Resistance]{}, q.Opt[q.Resistance]{}
		}, 0, 0, true},
		{"tsw_vgs blank", func(p *devices.Part) { p.TswVgs = q.Opt[q.Voltage]{} }, 0, 0, true},
		{"tsw_id blank", func(p *devices.Part) { p.TswId = q.Opt[q.Current]{} }, 0, 0, true},
		{"turn-off past the plateau", func(p *devices.Part) { p.TswVgs = q.Some[q.Voltage](2.2) }, 0.20785904e-9, 0, true},
		{"no test loop resistance", func(p *devices.Part) {
			p.TswRg, p.TswRgen, p.RgInt = q.Some[q.Resistance](0), q.Opt[q.Resistance]{}, q.Some[q.Resistance](0)
		}, 0, 0, true},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			p := base()
			c.edit(&p)
			if probs := devices.Validate(&p); len(probs) > 0 {
				t.Fatal(probs)
			}
			d, err := Prepare(&p)
			if err != nil {
				t.Fatal(err)
			}
			// Within takes a 0 want as an absolute bound: zeros are
			// checked exactly.
			for _, g := range []struct {
				what      string
				got, want float64
			}{{"C_on", float64(d.DelayCOn), c.con}, {"C_off", float64(d.DelayCOff), c.coff}} {
				if g.want == 0 && g.got != 0 {
					t.Errorf("%s = %g, want 0", g.what, g.got)
				}
				testkit.Within(t, g.what, g.got, g.want, 1e-7)
			}
			if got := d.Flags&FlagTdNoConditions != 0; got != c.flag {
				t.Errorf("td-cond? %v, want %v (%s)", got, c.flag, d.Flags.Codes())
			}
			if d.Flags.Estimates() != (d.Flags &^ FlagTdNoConditions).Estimates() {
				t.Errorf("td-cond? counted as an estimate")
			}
		})
	}
}

// delayCapacitance inverts the RC delay, td = r·C·ln(num/den), and is 0
// where no positive, finite C gives td: 1 ns through 2 Ω over ln(e) is
// 0.5 nF (by hand).
func TestDelayCapacitance(t *testing.T) {
	for _, c := range []struct {
		name     string
		td       q.Time
		r        q.Resistance
		num, den q.Voltage
		want     float64
	}{
		{"ln e", 1e-9, 2, q.Voltage(math.E), 1, 0.5e-9},
		{"ln 2", 1e-9, 1, 2, 1, 1e-9 / math.Ln2},
		{"past", 1e-9, 2, 1, 1, 0},
		{"never reached", 1e-9, 2, 1, -0.5, 0},
		{"no resistance", 1e-9, 0, 2, 1, 0},
		{"no time", 0, 2, 2, 1, 0},
		{"NaN time", q.Time(math.NaN()), 2, 2, 1, 0},
		{"no drive", 1e-9, 2, 0, 0, 0},
		{"infinite", 1e-9, 2, q.Voltage(math.Inf(1)), 1, 0},
	} {
		got := float64(delayCapacitance(c.td, c.r, c.num, c.den))
		if c.want == 0 && got != 0 {
			t.Errorf("%s: %g, want 0", c.name, got)
		}
		testkit.Within(t, c.name, got, c.want, 1e-12)
	}
}
