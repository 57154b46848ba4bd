package rank_test

import (
	"swrank/rank"
	"swrank/rank/internal/benchkit"
	"testing"
)

// BenchmarkRank10k ranks a generated library of 10,000 parts at one point
// on all cores.
func BenchmarkRank10k(b *testing.B) {
	devs := benchkit.Devices(b, 10000)
	pt := benchkit.Point(b)
	b.ReportAllocs()
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		if rs := rank.Rank(&pt, devs, nil, rank.Options{}); len(rs) != len(devs) {
			b.Fatal("lost results")
		}
	}
	b.ReportMetric(float64(b.N*len(devs))/b.Elapsed().Seconds(), "parts/s")
}
