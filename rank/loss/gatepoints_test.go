package loss

import (
	"math"
	"testing"

	q "swrank/devices/quantity"
)

// The triode law of a square-law channel, I = K·(2·V_ov·V_ds − V_ds²)
// (Sze & Ng, Physics of Semiconductor Devices, 3rd ed., 2007, ch. 6,
// eq. for the linear region), worked forward: for each case the channel
// drop at the test and working currents is solved from the law by hand
// (the quadratic's smaller root), and ChannelAtCurrent must give
// V_ds(i)/i from V_ds(iTest)/iTest.
func TestChannelAtCurrentTriodeLaw(t *testing.T) {
	for _, c := range []struct {
		name          string
		k, vov        float64 // A/V², V
		iTest, i      float64 // A
		wantRise      float64 // R(i)/R(iTest), by hand
		wantSaturated bool
	}{
		// Full drive: K = 500 A/V², 7 V: R₀ = 1/(2·500·7) = 142.9 µΩ; at
		// 60 A the drop is 7 − √(49 − 0.12) = 8.58 mV, 143.0 µΩ; at 10 A
		// 1.4287 mV, 142.87 µΩ: a fall of 0.05 %.
		{"full drive, 60 A test, 10 A", 500, 7, 60, 10, 0.99948, false},
		// Logic-level drive: 1 V overdrive, K = 500: R₀ = 1 mΩ; at 10 A
		// V = 1 − √(1 − 0.02) = 10.05 mV, 1.00504 mΩ; at 100 A
		// 1 − √0.8 = 105.57 mV, 1.05573 mΩ: ×1.05042.
		{"low drive, 10 A test, 100 A", 500, 1, 10, 100, 1.05042, false},
		{"saturated: above K·V_ov² = 500 A", 500, 1, 10, 600, 0, true},
	} {
		vds := func(i float64) float64 { return c.vov - math.Sqrt(c.vov*c.vov-i/c.k) }
		rTest := vds(c.iTest) / c.iTest
		r, ok := ChannelAtCurrent(q.Resistance(rTest), q.Voltage(c.vov), q.Current(c.iTest), q.Current(c.i))
		if ok == c.wantSaturated {
			t.Errorf("%s: ok = %v", c.name, ok)
		}
		if c.wantSaturated {
			// At the edge of saturation: V_ds = V_ov at K·V_ov², 2·R₀.
			want := 2 / (2 * c.k * c.vov)
			if math.Abs(float64(r)-want) > 1e-9*want {
				t.Errorf("%s: R = %g, want 2·R₀ = %g", c.name, float64(r), want)
			}
			continue
		}
		want := vds(c.i) / c.i
		if math.Abs(float64(r)-want) > 1e-9*want {
			t.Errorf("%s: R = %g, want %g from the law", c.name, float64(r), want)
		}
		if got := float64(r) / rTest; math.Abs(got-c.wantRise) > 1e-4 {
			t.Errorf("%s: R(i)/R(test) = %.5f, want %.5f by hand", c.name, got, c.wantRise)
		}
	}
}

// A knee above the plateau (a second total, qg2): the curve of Balogh,
// "Fundamentals of MOSFET and IGBT Gate Driver Circuits", 2001, with one
// more breakpoint. By hand: Qth 1 nC to 2 V, Qgs2 1 nC to the 3 V
// plateau, Qgd 2 nC; knee 1.5 V above it with 3 nC more (7 nC at 4.5 V),
// then 1 nC/V to 12.5 nC at 10 V. Stored energy from 0 to 10 V,
// ∫v·dQ: 1·1 + 1·2.5 + 2·3 + 3·3.75 + 5.5·7.25 = 60.625 nC·V.
func TestGateCurveKnee(t *testing.T) {
	c := GateCurve{Qth: 1e-9, Qgs2: 1e-9, Qgd: 2e-9, Vth: 2, Vpl: 3, Slope: 1e-9, KneeV: 1.5, KneeQ: 3e-9}
	for _, p := range []struct{ v, want float64 }{{3.75, 5.5e-9}, {4.5, 7e-9}, {10, 12.5e-9}, {12, 14.5e-9}, {2.5, 1.5e-9}} {
		if got := float64(c.Charge(q.Voltage(p.v))); math.Abs(got-p.want) > 1e-18 {
			t.Errorf("Q(%g V) = %g, want %g", p.v, got, p.want)
		}
	}
	if got := float64(c.StoredEnergy(0, 10)); math.Abs(got-60.625e-9) > 1e-15 {
		t.Errorf("stored energy = %g, want 60.625 nJ", got)
	}
	// Without the knee the curve is as before: Qg(10 V) = 4 + 7·1 nC.
	c.KneeV, c.KneeQ = 0, 0
	if got := float64(c.Charge(10)); math.Abs(got-11e-9) > 1e-18 {
		t.Errorf("Q(10 V) without knee = %g, want 11 nC", got)
	}
}
