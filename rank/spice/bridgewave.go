package spice

import (
	"fmt"
	"math"
)

// BridgeWave is what a synchronous stage's waveform shows at its two dead
// times: when the synchronous switch's body diode conducts, how far its
// gate is lifted while the control switch moves the node, and whether
// both channels conduct at once. Edge 0 is the control switch's
// turn-off (the dead time DeadTime[0] follows it), edge 1 its turn-on.
type BridgeWave struct {
	// DiodeTime is the time the synchronous switch's body diode conducts
	// at each edge, s: its drain-source voltage below half-way between
	// its channel's on-state drop and the dip's deepest point (the diode
	// counted at its full current, half of each ramp included).
	DiodeTime [2]float64
	// DiodeDrop is the deepest reverse drain-source voltage at each edge,
	// V (≤ 0); near the channel's drop when the diode never conducts.
	DiodeDrop [2]float64
	// OffGatePeak is the synchronous switch's highest gate-source
	// voltage while the control switch's gate pulse is on, V: the lift
	// of the off gate by the control switch's turn-on, on top of what is
	// left of its own turn-off. For a VDMOS card it is the die's own
	// gate, behind the internal gate resistance (what the threshold
	// applies to); for a subcircuit, the gate terminal's.
	OffGatePeak float64
	// ShootCharge is the charge the synchronous switch's channel conducts
	// forward (drain to source) over the period, C, and ShootEnergy its
	// drain-source voltage times that current, J: a buck's low-side
	// channel conducts forward only when both channels are on. Measured
	// for a VDMOS card, whose channel current the simulator gives; zero
	// for a subcircuit.
	ShootCharge, ShootEnergy float64
}

// syncChannel is the saved vector of the synchronous card's channel
// current, drain to source (ngspice 39 manual, VDMOS instance
// parameters).
const syncChannel = "@m1[id]"

// syncGate is the saved vector of the synchronous card's inner
// gate-source voltage, behind its gate resistance.
const syncGate = "@m1[vgs]"

// bridgeWave measures the last period of a synchronous bench (see
// BridgeWave). The period is split at the middle of each switch's gate
// pulse, so that each half holds one edge.
func (b *Bench) bridgeWave(tab *Table, t0 float64) (*BridgeWave, error) {
	T, _ := b.period()
	c, err := tab.Columns("v(dd1)", "v(s1)", "v(g1)", "v(k1)")
	if err != nil {
		return nil, err
	}
	tm := tab.Cols[0]
	vds := func(k int) float64 { return c[0][k] - c[1][k] }
	gate := func(k int) float64 { return c[2][k] - c[3][k] }
	w := b.gateWindows(t0)
	midCtrl := (w[0][0] + w[0][1]) / 2
	midSync := (w[1][0] + w[1][1]) / 2
	// The two halves: edge 0 from the middle of the control pulse to the
	// middle of the synchronous one, edge 1 from the middle of the
	// synchronous pulse before (it wraps past the period's end; the table
	// holds the period before) to the control pulse's middle.
	halves := [2][2]float64{{midCtrl, midSync}, {midSync - T, midCtrl}}
	at := func(t float64) int { return sampleBefore(tm, t) }
	vChan := vds(at(midSync))
	wave := &BridgeWave{}
	for e, h := range halves {
		lo, hi := at(h[0]), at(h[1])
		if hi <= lo {
			return nil, fmt.Errorf("bridge edge %d: no samples between %.6g s and %.6g s", e, h[0], h[1])
		}
		vmin := math.Inf(1)
		for k := lo; k <= hi; k++ {
			vmin = min(vmin, vds(k))
		}
		wave.DiodeDrop[e] = vmin
		// A dip of less than 0.2 V below the channel's drop is the
		// channel itself (its current ramps), not the diode.
		level := (vChan + vmin) / 2
		diode := vmin < vChan-0.2
		for k := lo + 1; k <= hi; k++ {
			dt := tm[k] - tm[k-1]
			mid := func(f func(int) float64) float64 { return (f(k) + f(k-1)) / 2 }
			if diode && mid(vds) < level {
				wave.DiodeTime[e] += dt
			}
		}
	}
	if ich, err := tab.Col(syncChannel); err == nil {
		fwd := func(k int) float64 { return max(ich[k], 0) }
		wave.ShootCharge = integrate(tm, t0, t0+T, fwd)
		wave.ShootEnergy = integrate(tm, t0, t0+T, func(k int) float64 { return fwd(k) * vds(k) })
	}
	if g, err := tab.Col(syncGate); err == nil {
		gate = func(k int) float64 { return g[k] }
	}
	wave.OffGatePeak = math.Inf(-1)
	for k := at(w[0][0]); k <= at(w[0][1]); k++ {
		wave.OffGatePeak = max(wave.OffGatePeak, gate(k))
	}
	return wave, nil
}
