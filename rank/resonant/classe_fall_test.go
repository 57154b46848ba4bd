package resonant

import (
	"errors"
	"math"
	"testing"

	q "swrank/devices/quantity"
)

// TestTurnOffSteady: the steady state with a linear current fall. In the
// limit it is the small-fall form f·I_off²·t_f²/(24·C₁) of Kazimierczuk,
// RF Power Amplifiers, 2008, ch. 4 ((ω·t_f)²/12·P_o for the ideal design);
// up to ω·t_f = 0.2 it stays within 0.5 % of it (the rise of the turn-off
// current cancels the falling circuit current; ngspice agrees,
// TestNgspiceClassETurnOff), and the turn-off current rises above the
// design's.
func TestTurnOffSteady(t *testing.T) {
	for _, ql := range []q.Ratio{0, 20, 5} {
		d, err := DesignClassE(ClassESpec{VDD: 12, F: 6.78e6, Po: 10, QL: ql})
		if err != nil {
			t.Fatal(err)
		}
		for _, tc := range []struct{ e, rel float64 }{{1e-3, 1e-4}, {0.05, 5e-3}, {0.1, 5e-3}, {0.2, 5e-3}, {0.5, 0.02}} {
			tf := q.Time(tc.e / (2 * math.Pi * 6.78e6))
			r, err := ClassETurnOff(d, tf)
			if err != nil {
				t.Fatalf("QL %g, ε %g: %v", ql, tc.e, err)
			}
			small, err := ClassETurnOffSmall(d, tf)
			if err != nil {
				t.Fatal(err)
			}
			check(t, "P_tf·(P_o,design/P_o) vs small-fall form at QL "+ql.String(), float64(r.TurnOff/r.Po*d.Po), float64(small), tc.rel, "Kazimierczuk 2008 ch. 4 small-t_f formula")
			if tc.e >= 0.05 && (!(r.IOff > d.IOff) || !(r.Po < d.Po)) {
				t.Errorf("QL %g, ε %g: I_off %s (design %s), P_o %s (design %s): want the current up and the power down", ql, tc.e, r.IOff, d.IOff, r.Po, d.Po)
			}
			// The hard turn-on remainder stays a minor term.
			if r.TurnOn > r.TurnOff/10 {
				t.Errorf("QL %g, ε %g: turn-on remainder %s against turn-off %s", ql, tc.e, r.TurnOn, r.TurnOff)
			}
		}
	}
	d, err := DesignClassE(ClassESpec{VDD: 12, F: 6.78e6, Po: 10})
	if err != nil {
		t.Fatal(err)
	}
	z, err := ClassETurnOff(d, 0)
	if err != nil || z.TurnOff != 0 || z.TurnOn != 0 {
		t.Errorf("zero fall time: %+v, %v; want no loss", z, err)
	}
	for _, tf := range []q.Time{-1e-9, q.Time(math.NaN()), 1e-7} {
		if _, err := ClassETurnOff(d, tf); !errors.Is(err, ErrSpec) {
			t.Errorf("tf %g: got %v, want ErrSpec", float64(tf), err)
		}
	}
	if _, err := ClassETurnOff(ClassE{}, 1e-9); !errors.Is(err, ErrSpec) {
		t.Errorf("empty design: got %v, want ErrSpec", err)
	}
}

// BenchmarkClassETurnOff: the turn-off steady state runs per part
// (its fall time) and operating point.
func BenchmarkClassETurnOff(b *testing.B) {
	d := classE12V10W(b)
	for i := 0; i < b.N; i++ {
		if _, err := ClassETurnOff(d, 2e-9); err != nil {
			b.Fatal(err)
		}
	}
}
