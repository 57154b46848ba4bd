package fit_test

import (
	"bytes"
	"testing"

	"swrank/devices"
	"swrank/devices/synth"
	"swrank/rank/fit"
)

// BenchmarkPrepare is fit.Prepare of one part of a generated 1 000-part
// library per call, the per-part fitting that ranking a library does
// before it evaluates (docs/performance.md).
func BenchmarkPrepare(b *testing.B) {
	var buf bytes.Buffer
	if err := synth.Generate(&buf, 1000, 1); err != nil {
		b.Fatal(err)
	}
	lib, err := devices.Read(&buf, "bench")
	if err != nil {
		b.Fatal(err)
	}
	var d fit.Device
	b.ReportAllocs()
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		if err := fit.PrepareInto(&d, &lib.Parts[i%len(lib.Parts)]); err != nil {
			b.Fatal(err)
		}
	}
}
