package spice

import (
	"context"
	"math"
	"os"
	"path/filepath"
	"testing"
	"time"
)

// ngspiceRunner returns a runner, skipping the test without ngspice unless
// SWRANK_REQUIRE_NGSPICE=1 asks for a failure.
func ngspiceRunner(t *testing.T) *Runner {
	t.Helper()
	if testing.Short() {
		t.Skip("-short: no ngspice runs")
	}
	r, err := FindNgspice(60 * time.Second)
	if err != nil {
		if os.Getenv("SWRANK_REQUIRE_NGSPICE") == "1" {
			t.Fatalf("ngspice is required (SWRANK_REQUIRE_NGSPICE=1) but not found: %v", err)
		}
		t.Skipf("ngspice not found (apt-get install ngspice on Debian): %v", err)
	}
	return r
}

func demoDevice(t *testing.T, name string) *Device {
	t.Helper()
	d, err := LoadDevice(filepath.Join("..", "..", "devices", "demomodels", name+".lib"), "", "")
	if err != nil {
		t.Fatal(err)
	}
	return d
}

// The synchronous buck bench reaches the steady state Simulate promises:
// the last two periods within 0.5 %, the mean inductor current within 1 %
// of the point's, both switches measured, the control switch's edges
// hard and the synchronous switch's body diode conducting in the dead
// times (an invented demo card at an invented point).
func TestBenchBuck(t *testing.T) {
	r := ngspiceRunner(t)
	d := demoDevice(t, "slate-30-lo")
	b := &Bench{Kind: BuckBench, Ctrl: d, Sync: d, Fsw: 500e3, Duty: 0.1, DeadTime: [2]float64{20e-9, 20e-9},
		Drive: [2]Drive{{VOn: 5, RSource: 2, RSink: 1}}, Hard: [2][2]bool{{true, true}, {false, false}},
		Vin: 12, Vout: 1.2, IL: 10, Inductance: (12 - 1.2) * 0.1 / (3 * 500e3)}
	t0 := time.Now()
	res, err := Simulate(context.Background(), r, b, SimOptions{})
	if err != nil {
		t.Fatal(err)
	}
	t.Logf("%v: %+v", time.Since(t0), res)
	if res.PSS > 0.005 || math.Abs(res.ILMean-10) > 0.11 || len(res.Places) != 2 {
		t.Fatalf("steady state %g, inductor %g A, %d places", res.PSS, res.ILMean, len(res.Places))
	}
	if c, s := res.Places[0], res.Places[1]; !(c.Switching > 0 && s.Off > 0 && s.Switching == 0 && c.Drive > c.Gate) {
		t.Errorf("shares: control %+v, synchronous %+v", c, s)
	}
	// Both gates are driven hard by a 2 Ω / 1 Ω driver: each edge takes a
	// few ns of the 20 ns dead time, the diode conducts for the rest with
	// a drop of a few hundred mV (common practice), and the off die's gate
	// stays below the card's threshold (vto 2.05 V), its channel passing
	// under 1 nC forward.
	w := res.Bridge
	if w == nil {
		t.Fatal("no bridge waveform")
	}
	for e := range 2 {
		if !(w.DiodeTime[e] > 2e-9 && w.DiodeTime[e] < 20e-9) || !(w.DiodeDrop[e] < -0.3 && w.DiodeDrop[e] > -1.5) {
			t.Errorf("edge %d: diode %.3g s at %.3g V", e, w.DiodeTime[e], w.DiodeDrop[e])
		}
	}
	if !(w.OffGatePeak > -0.5 && w.OffGatePeak < 2.05 && w.ShootCharge < 1e-9) {
		t.Errorf("off gate peak %.3g V; shoot-through %.3g C, %.3g J", w.OffGatePeak, w.ShootCharge, w.ShootEnergy)
	}
}
