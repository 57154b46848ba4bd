package spice

import (
	"context"
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
	d, err := LoadDevice(filepath.Join("..", "..", "testdata", "models", name+".lib"), "", "")
	if err != nil {
		t.Fatal(err)
	}
	return d
}

func TestBenchSmoke(t *testing.T) {
	r := ngspiceRunner(t)
	d := demoDevice(t, "slate-30-lo")
	b := &Bench{Kind: BuckBench, Ctrl: d, Sync: d, Fsw: 500e3, Duty: 0.1, DeadTime: 20e-9,
		Drive: Drive{VOn: 5, RSource: 2, RSink: 1}, Hard: [2][2]bool{{true, true}, {false, false}},
		Vin: 12, Vout: 1.2, IL: 10, Inductance: (12 - 1.2) * 0.1 / (3 * 500e3)}
	t0 := time.Now()
	res, err := Simulate(context.Background(), r, b, SimOptions{})
	if err != nil {
		t.Fatal(err)
	}
	t.Logf("%v: %+v", time.Since(t0), res)
}
