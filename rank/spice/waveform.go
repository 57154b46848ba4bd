package spice

import "sort"

// integrate is ∫f dt over [a, b] of a sampled waveform (times tm,
// increasing; f(k) the value at tm[k]) by the trapezoidal rule, the end
// points interpolated linearly.
func integrate(tm []float64, a, b float64, f func(k int) float64) float64 {
	var s float64
	for k := 1; k < len(tm); k++ {
		lo, hi := max(tm[k-1], a), min(tm[k], b)
		if hi <= lo {
			continue
		}
		fk, fj := f(k), f(k-1)
		h := tm[k] - tm[k-1]
		s += 0.5 * (fj + (fk-fj)*(lo-tm[k-1])/h + fj + (fk-fj)*(hi-tm[k-1])/h) * (hi - lo)
	}
	return s
}

// sampleBefore is the index of the last sample before t (times tm,
// increasing): 0 when none is, the last when every one is.
func sampleBefore(tm []float64, t float64) int {
	return max(sort.SearchFloat64s(tm, t)-1, 0)
}
