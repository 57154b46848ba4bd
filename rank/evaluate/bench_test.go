package evaluate_test

import (
	q "swrank/devices/quantity"
	"swrank/rank/evaluate"
	"swrank/rank/internal/benchkit"
	"swrank/rank/stage"
	"testing"
)

// BenchmarkEvaluateOne is one part at a synchronous-buck operating point,
// both switches and their thermal solves (target: ≥ 1,000,000 per second
// on one core, zero allocations; docs/performance.md).
func BenchmarkEvaluateOne(b *testing.B) {
	devs := benchkit.Devices(b, 1000)
	pt := benchkit.Point(b)
	var r evaluate.Result
	b.ReportAllocs()
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		evaluate.EvaluateInto(&r, &pt, &devs[i%len(devs)], nil, nil)
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
	devs := benchkit.Devices(b, 1000)
	for _, c := range []struct {
		name string
		st   stage.Stage
	}{
		{"buck-24V-5V-4A-300k", stage.Stage{Topology: stage.Buck, Vin: 24, Vout: 5, Iout: 4, Fsw: 300e3, Driver: stage.Driver{VOn: 10}, RthCA: q.Some[q.ThermalResistance](10)}},
		{"buck-12V-3.3V-3A-500k", stage.Stage{Topology: stage.Buck, Vin: 12, Vout: 3.3, Iout: 3, Fsw: 500e3, Driver: stage.Driver{VOn: 10}}},
		{"custom-48V-10A-250k", stage.Stage{Topology: stage.Custom, Vblock: 48, Ion: 10, Ioff: 10, Irms: 7, Fsw: 250e3, Driver: stage.Driver{VOn: 10}}},
	} {
		pt, err := c.st.Resolve()
		if err != nil {
			b.Fatal(err)
		}
		b.Run(c.name, func(b *testing.B) {
			var r evaluate.Result
			b.ReportAllocs()
			for i := 0; i < b.N; i++ {
				evaluate.EvaluateInto(&r, &pt, &devs[i%len(devs)], nil, nil)
				if r.N == 0 {
					b.Fatal("no result")
				}
			}
			b.ReportMetric(float64(b.N)/b.Elapsed().Seconds(), "evals/s")
		})
	}
}
