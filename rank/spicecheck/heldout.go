package spicecheck

import (
	"fmt"
	"math"
	"math/rand/v2"

	"swrank/rank/spice"
)

// HeldOut describes a generated device set that no model constant is
// chosen on: its devices are drawn from a seed and from physics ranges
// wider than the development devices' (testdata/spicecheck/cell.toml).
type HeldOut struct {
	Seed  uint64 `toml:"seed"`  // the generator's seed; any value
	Count int    `toml:"count"` // devices drawn; ≥ 1
	// Ratings are the voltage classes drawn from, V; each > 0. Default
	// 30, 40, 60, 80, 100 and 150 V.
	Ratings []float64 `toml:"ratings"`
}

// Devices draws the set. Each device is a die of one voltage class and a
// random size, built around the development set's 30 V mid-size die
// (sim-mid-30) and scaled by common-practice trends of silicon trench
// MOSFETs: at a given size, resistance rises as (V/30 V)^1.5 and the
// output capacitance falls as (V/30 V)^−0.5; every capacitance,
// transconductance and current rating scales with the die's size. Each
// physics parameter is then drawn over a range wider than the
// development set's:
//
//   - die size 0.08-4 × the reference (small-signal to power parts);
//   - threshold 1.2-2.0 V (logic level, second Rds(on) point at 4.5 V) or
//     2.4-3.6 V (standard, at 6 V), half each;
//   - Cgd's shape: oxide-to-minimum ratio 6-40, transition 0.25-1.5 /V;
//   - body-diode grading 0.3-0.6, junction potential 0.5-1.0 V, transit
//     time 4-60 ns;
//   - gate resistance 0.3-4 Ω; Cgs and the channel's transconductance
//     each ±40 % about the size's value;
//   - the threshold's temperature coefficient 1.5-6 mV/K (a second
//     stream of the seed, so that the other draws stay as they were).
func (h HeldOut) Devices() ([]spice.Model, error) {
	if h.Count < 1 {
		return nil, fmt.Errorf("held-out set: count must be ≥ 1 (got %d)", h.Count)
	}
	ratings := h.Ratings
	if len(ratings) == 0 {
		ratings = []float64{30, 40, 60, 80, 100, 150}
	}
	for _, v := range ratings {
		if !(v > 0) {
			return nil, fmt.Errorf("held-out set: rating %g V must be > 0", v)
		}
	}
	rng := rand.New(rand.NewPCG(h.Seed, 0x5eed))
	tc := rand.New(rand.NewPCG(h.Seed, 0x7c))
	uni := func(lo, hi float64) float64 { return lo + (hi-lo)*rng.Float64() }
	logUni := func(lo, hi float64) float64 { return math.Exp(uni(math.Log(lo), math.Log(hi))) }
	out := make([]spice.Model, h.Count)
	for i := range out {
		v := ratings[i%len(ratings)]
		s := logUni(0.08, 4)
		rv := math.Pow(v/30, 1.5)
		m := spice.Model{
			Name:   fmt.Sprintf("held-%02d-%g", i+1, v),
			Notes:  fmt.Sprintf("held-out, seed %d, die %.2f×", h.Seed, s),
			VdsMax: v,
			Kp:     60 * s * uni(0.6, 1.4),
			Rg:     logUni(0.3, 4),
			Cgs:    1.3e-9 * s * uni(0.6, 1.4),
			Cgdmax: 0.7e-9 * s * uni(0.6, 1.4),
			A:      logUni(0.25, 1.5),
			Cjo:    1.0e-9 * s * uni(0.6, 1.4) / math.Sqrt(v/30),
			Vj:     uni(0.5, 1.0),
			M:      uni(0.3, 0.6),
			Tt:     logUni(4e-9, 60e-9),
			Tcvth:  1.5e-3 + 4.5e-3*tc.Float64(),
		}
		m.Cgdmin = m.Cgdmax / logUni(6, 40)
		rd := 2.0e-3 * rv / s
		split := uni(0.1, 0.3)
		m.Rd, m.Rs = rd*(1-split), rd*split
		if rng.IntN(2) == 0 {
			m.Vto, m.Vgs2 = uni(1.2, 2.0), 4.5
		} else {
			m.Vto, m.Vgs2 = uni(2.4, 3.6), 6
		}
		// Ratings as a datasheet rounds them: the continuous current of
		// the reference die, 50 A, by size and falling with the class.
		m.IdMax = max(1, math.Round(50*s/math.Pow(v/30, 0.75)))
		m.ITest = max(0.5, math.Round(m.IdMax)/2)
		m.SetDefaults()
		if err := m.Check(); err != nil {
			return nil, fmt.Errorf("held-out device %s: %w", m.Name, err)
		}
		out[i] = m
	}
	return out, nil
}
