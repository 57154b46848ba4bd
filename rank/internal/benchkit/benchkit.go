// Package benchkit holds the generated library and the operating point
// that the benchmarks of several packages share (docs/performance.md).
// Only benchmarks import it.
package benchkit

import (
	"bytes"
	"swrank/devices"
	"swrank/devices/synth"
	"swrank/rank/fit"
	"swrank/rank/stage"
	"testing"
)

// Devices prepares a generated library of n parts.
func Devices(b testing.TB, n int) []fit.Device {
	var buf bytes.Buffer
	if err := synth.Generate(&buf, n, 1); err != nil {
		b.Fatal(err)
	}
	lib, err := devices.Read(&buf, "bench")
	if err != nil {
		b.Fatal(err)
	}
	devs := make([]fit.Device, len(lib.Parts))
	for i := range lib.Parts {
		if devs[i], err = fit.Prepare(&lib.Parts[i]); err != nil {
			b.Fatal(err)
		}
	}
	return devs
}

// Point is the benchmarks' operating point: a 48 V → 12 V synchronous
// buck at 10 A, 250 kHz, 10 V drive (docs/performance.md).
func Point(b testing.TB) stage.Point {
	st := stage.Stage{Topology: stage.Buck, Vin: 48, Vout: 12, Iout: 10, Fsw: 250e3, Driver: stage.Driver{VOn: 10}}
	pt, err := st.Resolve()
	if err != nil {
		b.Fatal(err)
	}
	return pt
}
