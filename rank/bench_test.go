package rank

import (
	"bytes"
	"testing"

	"swrank/devices"
	q "swrank/devices/quantity"
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

// BenchmarkEvaluatePoints is BenchmarkEvaluateOne at other operating
// points, for the record in docs/performance.md: two ordinary synchronous
// bucks at which most of these parts reach a steady temperature, and a
// single hard-switched switch (custom stage).
func BenchmarkEvaluatePoints(b *testing.B) {
	devs := benchDevices(b, 1000)
	for _, c := range []struct {
		name string
		st   Stage
	}{
		{"buck-24V-5V-4A-300k", Stage{Topology: Buck, Vin: 24, Vout: 5, Iout: 4, Fsw: 300e3, Driver: Driver{VOn: 10}, RthCA: q.Some[q.ThermalResistance](10)}},
		{"buck-12V-3.3V-3A-500k", Stage{Topology: Buck, Vin: 12, Vout: 3.3, Iout: 3, Fsw: 500e3, Driver: Driver{VOn: 10}}},
		{"custom-48V-10A-250k", Stage{Topology: Custom, Vblock: 48, Ion: 10, Ioff: 10, Irms: 7, Fsw: 250e3, Driver: Driver{VOn: 10}}},
	} {
		pt, err := c.st.Resolve()
		if err != nil {
			b.Fatal(err)
		}
		b.Run(c.name, func(b *testing.B) {
			var r Result
			b.ReportAllocs()
			for i := 0; i < b.N; i++ {
				EvaluateInto(&r, &pt, &devs[i%len(devs)], nil, nil)
				if r.N == 0 {
					b.Fatal("no result")
				}
			}
			b.ReportMetric(float64(b.N)/b.Elapsed().Seconds(), "evals/s")
		})
	}
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
