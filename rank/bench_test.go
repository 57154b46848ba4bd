package rank

import (
	"bytes"
	"testing"

	"swrank/devices"
	"swrank/devices/synth"
)

// benchDevices prepares a generated library of n parts.
func benchDevices(b testing.TB, n int) []Device {
	var buf bytes.Buffer
	if err := synth.Generate(&buf, n, 1); err != nil {
		b.Fatal(err)
	}
	lib, err := devices.Read(&buf, "bench")
	if err != nil {
		b.Fatal(err)
	}
	devs := make([]Device, len(lib.Parts))
	for i := range lib.Parts {
		if devs[i], err = Prepare(&lib.Parts[i]); err != nil {
			b.Fatal(err)
		}
	}
	return devs
}

// benchPoint is the benchmarks' operating point: a 48 V → 12 V synchronous
// buck at 10 A, 250 kHz, 10 V drive (docs/performance.md).
func benchPoint(b testing.TB) Point {
	st := Stage{Topology: Buck, Vin: 48, Vout: 12, Iout: 10, Fsw: 250e3, Driver: Driver{VOn: 10}}
	pt, err := st.Resolve()
	if err != nil {
		b.Fatal(err)
	}
	return pt
}

// BenchmarkEvaluateOne is one part at a synchronous-buck operating point,
// both switches and their thermal solves (target: ≥ 1,000,000 per second
// on one core, zero allocations; docs/performance.md).
func BenchmarkEvaluateOne(b *testing.B) {
	devs := benchDevices(b, 1000)
	pt := benchPoint(b)
	var r Result
	b.ReportAllocs()
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		EvaluateInto(&r, &pt, &devs[i%len(devs)], nil, nil)
		if r.N == 0 {
			b.Fatal("no result")
		}
	}
	b.ReportMetric(float64(b.N)/b.Elapsed().Seconds(), "evals/s")
}

// BenchmarkRank10k ranks a generated library of 10,000 parts at one point
// on all cores.
func BenchmarkRank10k(b *testing.B) {
	devs := benchDevices(b, 10000)
	pt := benchPoint(b)
	b.ReportAllocs()
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		if rs := Rank(&pt, devs, nil, Options{}); len(rs) != len(devs) {
			b.Fatal("lost results")
		}
	}
	b.ReportMetric(float64(b.N*len(devs))/b.Elapsed().Seconds(), "parts/s")
}
