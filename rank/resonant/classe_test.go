package resonant

import (
	"errors"
	"math"
	"testing"

	q "swrank/devices/quantity"
)

// within reports whether got is within a relative tolerance rel of want.
func within(got, want, rel float64) bool {
	if want == 0 {
		return math.Abs(got) <= rel
	}
	return math.Abs(got-want) <= rel*math.Abs(want)
}

func check(t *testing.T, name string, got, want, rel float64, source string) {
	t.Helper()
	if !within(got, want, rel) || math.IsNaN(got) {
		t.Errorf("%s = %.7g, want %.7g within %.3g %% (%s)", name, got, want, 100*rel, source)
	}
}

// TestIdealClassEConstants checks every closed-form coefficient against the
// published decimals.
func TestIdealClassEConstants(t *testing.T) {
	c := IdealClassE()
	for _, tc := range []struct {
		name   string
		got    q.Ratio
		want   float64
		source string
	}{
		{"KP = P_o·R/V_DD²", c.KP, 0.576801, "Raab, IEEE TCAS 1977; Sokal & Sokal, IEEE JSSC 1975"},
		{"KC = ωRC₁", c.KC, 0.183601, "Raab 1977; Kazimierczuk, RF Power Amplifiers, 2008, ch. 4"},
		{"KX = X/R", c.KX, 1.152494, "Raab 1977; Kazimierczuk 2008, ch. 4"},
		{"V_SM/V_DD", c.VPeak, 3.562010, "Raab 1977; Kazimierczuk 2008, ch. 4"},
		{"I_SM/I_DC", c.IPeak, 2.862096, "Kazimierczuk 2008, ch. 4"},
		{"I_off/I_DC", c.IOff, 2, "Kazimierczuk 2008, ch. 4"},
		{"I_rms/I_DC", c.IRms, 1.538457, "Kazimierczuk 2008, ch. 4"},
		{"node current at turn-off = I_off", q.Ratio(c.NodeTaylor[0]), 2, "Kazimierczuk 2008, ch. 4"},
		// Slope of the switch current at turn-off, −(π/2)·ω·I_DC, from the
		// published waveform i_S = I_DC(1 + (π/2)sin ωt − cos ωt) at ωt = π.
		{"node current slope", q.Ratio(c.NodeTaylor[1]), -math.Pi / 2, "Kazimierczuk 2008, ch. 4 (derivative of the published waveform)"},
	} {
		// The decimals have six places: allow half a unit in the last one.
		if math.Abs(float64(tc.got)-tc.want) > 5e-7 {
			t.Errorf("%s = %.7f, want %.6f (%s)", tc.name, float64(tc.got), tc.want, tc.source)
		}
	}
}

// TestClassEIdealByHand: 12 V, 10 W at 6.78 MHz, a hand calculation from
// the ideal class E constants of Raab 1977 and Kazimierczuk 2008 ch. 4.
func TestClassEIdealByHand(t *testing.T) {
	d, err := DesignClassE(ClassESpec{VDD: 12, F: 6.78e6, Po: 10})
	if err != nil {
		t.Fatal(err)
	}
	pc, err := ClassEConduction(d, 0.1)
	if err != nil {
		t.Fatal(err)
	}
	fmax, err := ClassEMaxFrequency(d.Coefficients, 12, 10, 300e-12)
	if err != nil {
		t.Fatal(err)
	}
	const src = "hand calculation from the constants of Raab 1977 and Kazimierczuk 2008 ch. 4"
	for _, tc := range []struct {
		name      string
		got, want float64
		rel       float64
	}{
		{"R", float64(d.R), 8.3059, 1e-4},
		{"C1", float64(d.C1), 518.9e-12, 2e-4},
		{"IDC", float64(d.IDC), 0.8333, 1e-4},
		{"VPeak", float64(d.VPeak), 42.74, 2e-4},
		{"IPeak", float64(d.IPeak), 2.385, 3e-4},
		{"IRms", float64(d.IRms), 1.2820, 1e-4},
		{"P_cond at 0.1 Ω", float64(pc), 0.1644, 4e-4},
		{"f_max for 300 pF", float64(fmax), 11.727e6, 1e-4},
		{"X = 1.1525·R", float64(d.X), 1.152494 * 8.3059, 1e-4},
	} {
		check(t, tc.name, tc.got, tc.want, tc.rel, src)
	}
	// Conduction fraction P_r/P_o = (π²+28)/(2(π²+4))·r/R = 1.365201·r/R
	// (hand calculation from the waveforms of Kazimierczuk 2008 ch. 4).
	check(t, "P_cond/P_o·R/r", float64(pc)/10*float64(d.R)/0.1, 1.365201, 1e-6, "Kazimierczuk 2008, ch. 4")
}

// TestClassEOneGigahertz: 4 V, 0.5 W at 1 GHz, a hand calculation from
// the ideal class E constants (Raab 1977), checked at 2 % as a rounded
// textbook-style figure (3.562 rounded to 3.6), from memory.
func TestClassEOneGigahertz(t *testing.T) {
	d, err := DesignClassE(ClassESpec{VDD: 4, F: 1e9, Po: 0.5})
	if err != nil {
		t.Fatal(err)
	}
	const src = "hand calculation from Raab 1977 (rounded figures, from memory)"
	for _, tc := range []struct {
		name      string
		got, want float64
	}{
		{"IDC", float64(d.IDC), 0.125},
		{"IPeak", float64(d.IPeak), 0.358},
		{"R", float64(d.R), 18.4},
		{"C1", float64(d.C1), 1.58e-12},
		{"VPeak", float64(d.VPeak), 14.4},
	} {
		check(t, tc.name, tc.got, tc.want, 0.02, src)
	}
}

// TestClassEScaleByR gives R instead of P_o: P_o = 0.576801·V²/R (Raab 1977).
func TestClassEScaleByR(t *testing.T) {
	d, err := DesignClassE(ClassESpec{VDD: 24, F: 13.56e6, R: 5})
	if err != nil {
		t.Fatal(err)
	}
	check(t, "Po", float64(d.Po), 0.576801*24*24/5, 1e-6, "Raab 1977")
	check(t, "C1", float64(d.C1), 0.183601/(2*math.Pi*13.56e6*5), 3e-6, "Raab 1977")
	// f_max from the closed form with C_out = C₁ gives back F
	// (P_o/(2π²·C₁·V²) = f; Kazimierczuk 2008, ch. 4).
	fmax, err := ClassEMaxFrequency(d.Coefficients, d.VDD, d.Po, d.C1)
	if err != nil {
		t.Fatal(err)
	}
	check(t, "f_max(C_out = C1)", float64(fmax), 13.56e6, 1e-9, "Kazimierczuk 2008, ch. 4")
}

func TestClassESpecErrors(t *testing.T) {
	for _, tc := range []struct {
		name string
		s    ClassESpec
	}{
		{"no power or load", ClassESpec{VDD: 12, F: 1e6}},
		{"both power and load", ClassESpec{VDD: 12, F: 1e6, Po: 1, R: 1}},
		{"zero supply", ClassESpec{F: 1e6, Po: 1}},
		{"negative frequency", ClassESpec{VDD: 12, F: -1, Po: 1}},
		{"NaN power", ClassESpec{VDD: 12, F: 1e6, Po: q.Power(math.NaN())}},
		{"Q below the limit", ClassESpec{VDD: 12, F: 1e6, Po: 1, QL: 1.5}},
		{"finite choke without Q", ClassESpec{VDD: 12, F: 1e6, Po: 1, FeedRatio: 10}},
		{"negative feed", ClassESpec{VDD: 12, F: 1e6, Po: 1, QL: 10, FeedRatio: -1}},
	} {
		_, err := DesignClassE(tc.s)
		if !errors.Is(err, ErrSpec) {
			t.Errorf("%s: got error %v, want one wrapping ErrSpec", tc.name, err)
		}
	}
}

// OffSlope of the ideal design against Raab's closed-form off-state
// voltage, θ from turn-off: dv/dθ = π·V_DD·(1 − (π/2)·sin θ + cos θ)
// (Raab, "Idealized operation of the class E tuned power amplifier",
// IEEE Trans. CAS-24(12), 1977): 2π·V_DD at turn-off, 0 at θ = π (the
// zero-slope condition).
func TestClassEOffSlope(t *testing.T) {
	d, err := IdealClassE().Scale(12, 6.78e6, 20, 0)
	if err != nil {
		t.Fatal(err)
	}
	for _, th := range []float64{0, 0.5, 1, 2, 2.5, math.Pi} {
		want := math.Pi * 12 * (1 - math.Pi/2*math.Sin(th) + math.Cos(th))
		if got := d.OffSlope(th); math.Abs(got-want) > 1e-6*2*math.Pi*12 {
			t.Errorf("θ %g: dv/dθ %.9g V/rad, want %.9g", th, got, want)
		}
	}
}
