package spice

import (
	"fmt"
	"math"
)

// Interval labels of the measurement.
const (
	lblOff = iota
	lblCond
	lblEdge
)

// measure integrates the bench's last period (the table holds the last
// two): each switch's drain energy by interval (gate on, gate off, hard
// edges), its gate and drive-supply energies, the rectifier's loss and the
// mean inductor current, and compares the period's total energy with the
// period before.
func (b *Bench) measure(tab *Table, n int) (*BenchResult, error) {
	T, _ := b.period()
	t0 := float64(n-1) * T
	tm := tab.Cols[0]
	if len(tm) < 100 || tm[0] > float64(n-2)*T+T/100 || tm[len(tm)-1] < t0+T*(1-1e-9) {
		return nil, fmt.Errorf("simulation output does not cover the last two periods (%d points from %.6g s to %.6g s)",
			len(tm), tm[0], tm[len(tm)-1])
	}
	res := &BenchResult{Bench: b.Name(), Periods: n, StepLimit: T / max(b.StepDivisor, 1000)}
	if b.StepDivisor > 0 {
		res.StepLimit = T / b.StepDivisor
	}
	// Energies of [a, c] by the trapezoidal rule, ends interpolated.
	integ := func(a, c float64, f func(k int) float64) float64 { return integrate(tm, a, c, f) }
	var ePrev, eLast float64
	win := b.gateWindows(t0)
	for i := 0; i < b.places(); i++ {
		x := fmt.Sprint(i)
		c, err := tab.Columns("v(dd"+x+")", "v(s"+x+")", "v(g"+x+")", "v(k"+x+")", "v(p"+x+")", "i(vmd"+x+")", "i(vmg"+x+")")
		if err != nil {
			return nil, err
		}
		vd, vs, vg, vk, vp, id, ig := c[0], c[1], c[2], c[3], c[4], c[5], c[6]
		pd := func(k int) float64 { return (vd[k] - vs[k]) * id[k] }
		pg := func(k int) float64 { return (vg[k] - vk[k]) * ig[k] }
		pdrv := func(k int) float64 { return (vp[k] - vk[k]) * ig[k] }
		sum := func(k int) float64 { return pd(k) + pdrv(k) }
		ePrev += integ(t0-T, t0, sum)
		eLast += integ(t0, t0+T, sum)
		lbl, err := b.labels(tm, t0, win[i], b.Hard[i], vd, vs, id)
		if err != nil {
			return nil, fmt.Errorf("switch %d (%s): %w", i+1, map[int]string{0: "control", 1: "synchronous"}[i], err)
		}
		var e [3]float64
		for k := 1; k < len(tm); k++ {
			if tm[k] <= t0 || tm[k-1] >= t0+T {
				continue
			}
			lo, hi := max(tm[k-1], t0), min(tm[k], t0+T)
			e[lbl[k]] += (hi - lo) * 0.5 * (pd(k) + pd(k-1))
		}
		f := b.Fsw
		res.Places = append(res.Places, Shares{Conduction: e[lblCond] * f, Switching: e[lblEdge] * f, Off: e[lblOff] * f,
			Gate: integ(t0, t0+T, pg) * f, Drive: integ(t0, t0+T, pdrv) * f})
	}
	switch b.Kind {
	case BuckBench, BoostBench:
		il, err := tab.Col("i(l1)")
		if err != nil {
			return nil, err
		}
		res.ILMean = integ(t0, t0+T, func(k int) float64 { return il[k] }) / T
		if b.Sync == nil {
			cath := "v(sw)"
			if b.Kind == BoostBench {
				cath = "v(out)"
			}
			c, err := tab.Columns("v(ra)", "i(vmr)", cath)
			if err != nil {
				return nil, err
			}
			pr := func(k int) float64 { return (c[0][k] - c[2][k]) * c[1][k] }
			ePrev += integ(t0-T, t0, pr)
			er := integ(t0, t0+T, pr)
			eLast += er
			res.Rectifier = er * b.Fsw
		}
	}
	if b.places() == 2 {
		bw, err := b.bridgeWave(tab, t0)
		if err != nil {
			return nil, err
		}
		res.Bridge = bw
	}
	res.PSS = math.Abs(eLast-ePrev) / max(math.Abs(eLast), 1e-30)
	for _, s := range res.Places {
		for _, v := range []float64{s.Conduction, s.Switching, s.Off, s.Gate, s.Drive} {
			if math.IsNaN(v) || math.IsInf(v, 0) {
				return nil, fmt.Errorf("the simulation gave a non-finite energy")
			}
		}
	}
	return res, nil
}

// labels assigns each sample interval (k−1, k] of a switch to conduction
// (gate on), off (gate off) or a hard edge. A hard turn-on's window runs
// from the gate's rising edge until the drain voltage has fallen to within
// 2 % of the swing above its on-state value; a hard turn-off's from the
// moment the voltage leaves that band (or the current leaves 98 % of its
// value before the edge) until the drain current is below 2 % of it (the
// windows of the cross-check's cell, docs/spice-crosscheck.md).
func (b *Bench) labels(tm []float64, t0 float64, w [2]float64, hard [2]bool, vd, vs, id []float64) ([]uint8, error) {
	T, _ := b.period()
	lbl := make([]uint8, len(tm))
	on := func(t float64) bool {
		for _, s := range []float64{-T, 0, T} {
			if t > w[0]+s && t <= w[1]+s {
				return true
			}
		}
		return false
	}
	for k := 1; k < len(tm); k++ {
		if on(0.5 * (tm[k] + tm[k-1])) {
			lbl[k] = lblCond
		}
	}
	at := func(t float64) int { return sampleBefore(tm, t) }
	vds := func(k int) float64 { return vd[k] - vs[k] }
	// The edges of this period: the rise at w[0] and the fall at w[1]
	// (wrapped into the period when it lies past its end).
	rise, fall := w[0], w[1]
	if fall > t0+T {
		fall -= T
	}
	kr, kf := at(rise), at(fall)
	vOff, vOn := vds(kr), vds(kf)
	iPre := math.Abs(id[kf])
	band := 0.02 * math.Abs(vOff-vOn)
	if hard[0] {
		end := -1
		for k := kr + 1; k < len(tm) && tm[k] < rise+b.Duty*T+T; k++ {
			if math.Abs(vds(k)-vOn) <= band {
				end = k
				break
			}
			lbl[k] = lblEdge
		}
		if end < 0 {
			return nil, fmt.Errorf("did not turn on fully (drain at %.3g V, on-state %.3g V)", vds(len(tm)-1), vOn)
		}
		lbl[end] = lblEdge
	}
	if hard[1] {
		start := -1
		for k := kf; k < len(tm); k++ {
			if math.Abs(vds(k)-vOn) > band || math.Abs(id[k]) < 0.98*iPre {
				start = max(k, 1)
				break
			}
		}
		end := -1
		if start > 0 {
			for k := start; k < len(tm); k++ {
				lbl[k] = lblEdge
				if iPre > 1e-6 && math.Abs(id[k]) <= 0.02*iPre || iPre <= 1e-6 && math.Abs(vds(k)-vOff) <= band {
					end = k
					break
				}
			}
		}
		if end < 0 {
			return nil, fmt.Errorf("did not turn off within the period")
		}
	}
	return lbl, nil
}
