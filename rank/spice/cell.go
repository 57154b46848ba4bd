package spice

import (
	"context"
	"fmt"
	"math"
	"strings"
)

// CellEnergies are the energies of one switching period of the simulated
// cell, J, and the stresses the simulation actually applied.
//
// Convention: the edge energies are channel energies, ∫v_ch·i_ch dt with the
// model's internal drain-source voltage and its channel current, because
// that is where the heat is generated and where swrank's models put it (the
// output-capacitance energy is dumped into the channel at turn-on; at
// turn-off the load current charges the capacitances without loss). The
// terminal energies ∫v_ds·i_d dt of the same windows are kept for the
// report; they move E_oss from turn-on to turn-off. Conduction is what is
// left of the switch's per-period total: the components add up exactly to
// the per-period energy drawn through the transistor's terminals.
type CellEnergies struct {
	VBlock    float64 // drain voltage in the off state (bus plus clamp drop), V
	VOnState  float64 // internal drain-source voltage in the on state before turn-off, V
	Current   float64 // load current, A
	Period    float64 // s
	StepLimit float64 // maximum time step used, s

	OnOverlap float64 // turn-on channel energy carried by the load current, ∫v·min(i_ch, I)
	OnCoss    float64 // turn-on channel energy above the load current (capacitance discharge), ∫v·(i_ch − I)⁺
	Off       float64 // turn-off channel energy
	Cond      float64 // the rest of the switch's per-period energy (on-state, rd, rs, edge tails)
	Rint      float64 // internal gate resistance
	Rext      float64 // external gate resistor
	Drv       float64 // driver output resistance (source and sink)
	Supply    float64 // drawn from the drive supply
	Switch    float64 // per-period energy into the transistor's terminals (drain and gate)

	OnTerm, OffTerm float64 // terminal energies of the two edge windows
	TOn, TOff       float64 // lengths of the edge windows, s

	// Par are the parasitic inductances the cell was simulated with.
	Par Parasitics
	// VPeak is the highest drain voltage of the die (drain terminal against
	// the die's source, before the common-source inductance) from the start
	// of the turn-off window to the end of the period, V; TPeak is when, s,
	// measured from the start of the period.
	VPeak, TPeak float64
}

// Parasitics are the inductances added to the cell (all zero: the plain
// cell). docs/spice-crosscheck.md draws where they sit.
type Parasitics struct {
	// Lcs is the common-source inductance, H, ≥ 0: between the die's
	// source (the VDMOS source terminal, behind its internal rs) and the
	// node shared by the driver return and the power return, so that it
	// is in the gate loop and in the power loop. swrank is given it as
	// the package's l_cs and, because the power loop runs through it as
	// well, as the package's l_loop.
	Lcs float64
	// Lloop is a power-loop inductance in series with the bus supply,
	// that is, in the commutation loop of the switch and the clamp diode
	// but outside the gate loop, H, ≥ 0. swrank is given it as the
	// layout's Stage.LoopInductance.
	Lloop float64
	// Rloop is a series resistance in the loop beside Lloop (the supply
	// capacitors' ESR and the copper), Ω, ≥ 0 (0: none).
	Rloop float64
	// Rdamp is a resistor across Lloop, Ω, ≥ 0 (0: none). It damps the
	// ringing of Lloop with the output capacitance after turn-off without
	// a DC drop; chosen well above √(Lloop/C_oss), it lowers the first
	// peak by a few per cent at most (docs/spice-crosscheck.md).
	Rdamp float64
}

// Zero reports whether no parasitic is set.
func (x Parasitics) Zero() bool { return x.Lcs == 0 && x.Lloop == 0 && x.Rloop == 0 && x.Rdamp == 0 }

// String names the parasitics for messages, e.g. "Lcs 0.5 nH".
func (x Parasitics) String() string {
	var parts []string
	if x.Lcs > 0 {
		parts = append(parts, fmt.Sprintf("Lcs %g nH", x.Lcs*1e9))
	}
	if x.Lloop > 0 {
		parts = append(parts, fmt.Sprintf("Lloop %g nH", x.Lloop*1e9))
	}
	if x.Rloop > 0 {
		parts = append(parts, fmt.Sprintf("Rloop %g mΩ", x.Rloop*1e3))
	}
	if x.Rdamp > 0 {
		parts = append(parts, fmt.Sprintf("Rdamp %g Ω across Lloop", x.Rdamp))
	}
	if len(parts) == 0 {
		return "none"
	}
	return strings.Join(parts, ", ")
}

// Total is everything the cell dissipates in the switch and the drive
// circuit per period: the switch's terminal energy plus the driver and the
// external gate resistor.
func (e *CellEnergies) Total() float64 { return e.Switch + e.Drv + e.Rext }

// Gate is the gate-drive energy dissipated in the three gate resistances.
func (e *CellEnergies) Gate() float64 { return e.Rint + e.Rext + e.Drv }

// CellOptions tune the cell simulation.
type CellOptions struct {
	// StepDivisor sets the maximum time step to period/StepDivisor.
	// Default 1000 (about T/1000 with tight error control; common
	// practice, checked by re-running with a 20× finer step).
	StepDivisor float64
	// Periods simulated; the last is measured. Default 3.
	Periods int
	// Par adds parasitic inductances to the cell; zero: none.
	Par Parasitics
}

// cellDeck returns the netlist of the clamped-inductive cell: the device,
// a current source as the load from the bus into the drain, a clamp diode
// from the drain back to the bus, and a pulse driver with separate source
// and sink resistance behind an external gate resistor. Zero-volt sources
// measure the drain and gate terminal currents.
func cellDeck(m *Model, p *Point, o CellOptions) (string, float64, float64) {
	T := 1 / p.Fsw
	delay := 0.05 * T
	ton := p.Duty*T - edge
	tmax := T / o.StepDivisor
	var b strings.Builder
	fmt.Fprintf(&b, "* clamped-inductive cell: %s at %s\n", m.Name, p.Name)
	b.WriteString(m.card("dut"))
	b.WriteString(clampCard)
	b.WriteString(optionsAt(p.Tj))
	switch x := o.Par; {
	case x.Lloop > 0 && x.Rloop > 0:
		fmt.Fprintf(&b, "vbus vb 0 dc %s\nlloop vb vl %s\nrloop vl bus %s\n", num(p.Vbus), num(x.Lloop), num(x.Rloop))
		if x.Rdamp > 0 {
			fmt.Fprintf(&b, "rdamp vb vl %s\n", num(x.Rdamp))
		}
	case x.Lloop > 0:
		fmt.Fprintf(&b, "vbus vb 0 dc %s\nlloop vb bus %s\n", num(p.Vbus), num(x.Lloop))
		if x.Rdamp > 0 {
			fmt.Fprintf(&b, "rdamp vb bus %s\n", num(x.Rdamp))
		}
	case x.Rloop > 0:
		fmt.Fprintf(&b, "vbus vb 0 dc %s\nrloop vb bus %s\n", num(p.Vbus), num(x.Rloop))
	default:
		fmt.Fprintf(&b, "vbus bus 0 dc %s\n", num(p.Vbus))
	}
	// The clamp is an ideal diode at 25 °C whatever the device's
	// temperature: its n = 0.3 card would otherwise scale its saturation
	// current with the temperature past what the solver takes.
	fmt.Fprintf(&b, "il bus d dc %s\ndcl d bus dclamp temp=25\n", num(p.Current))
	if o.Par.Lcs > 0 {
		fmt.Fprintf(&b, "vmd d dd 0\nm1 dd g s s dut\nlcs s 0 %s\n", num(o.Par.Lcs))
	} else {
		b.WriteString("vmd d dd 0\nm1 dd g s s dut\nvms s 0 0\n")
	}
	fmt.Fprintf(&b, "vdrv p 0 pulse(0 %s %s %s %s %s %s)\n", num(p.VOn), num(delay), num(edge), num(edge), num(ton), num(T))
	fmt.Fprintf(&b, "bdrv p gx i = (v(p)-v(gx))/(v(p) > %s ? %s : %s)\n", num(p.VOn/2), num(p.RSource), num(p.RSink))
	fmt.Fprintf(&b, "rgx gx g2 %s\nvmg g2 g 0\n", num(p.RgExt))
	n := float64(o.Periods)
	fmt.Fprintf(&b, ".control\n%ssave v(d) v(g) v(s) v(gx) v(p) i(vmd) i(vmg) @m1[id] @m1[vds]\n", deckPrologue)
	fmt.Fprintf(&b, "tran %s %s %s %s\n", num(T/1e4), num(n*T), num((n-1)*T), num(tmax))
	b.WriteString("wrdata cell.dat v(d) v(g) v(s) v(gx) v(p) i(vmd) i(vmg) @m1[id] @m1[vds]\nquit 0\n.endc\n.end\n")
	return b.String(), delay, tmax
}

// SimulateCell simulates the cell with device m at point p and integrates
// the energies of the last period.
func SimulateCell(ctx context.Context, r *Runner, m *Model, p *Point, o CellOptions) (*CellEnergies, error) {
	if o.StepDivisor <= 0 {
		o.StepDivisor = 1000
	}
	if o.Periods < 2 {
		o.Periods = 3
	}
	deck, delay, tmax := cellDeck(m, p, o)
	name := fmt.Sprintf("cell %s at %s", m.Name, p.Name)
	t, err := r.Run(ctx, name, deck, "cell.dat")
	if err != nil {
		return nil, err
	}
	e, err := integrateCell(t["cell.dat"], m, p, o, delay)
	if err != nil {
		return nil, fmt.Errorf("%s: %w", name, err)
	}
	e.StepLimit = tmax
	return e, nil
}

func integrateCell(tab *Table, m *Model, p *Point, o CellOptions, delay float64) (*CellEnergies, error) {
	cols, err := tab.Columns("v(d)", "v(g)", "v(s)", "v(gx)", "v(p)", "i(vmd)", "i(vmg)", "@m1[id]", "@m1[vds]")
	if err != nil {
		return nil, err
	}
	tm := tab.Cols[0]
	vd, vg, vs, vgx, vp, id, ig, ich, vch := cols[0], cols[1], cols[2], cols[3], cols[4], cols[5], cols[6], cols[7], cols[8]
	T := 1 / p.Fsw
	t0 := float64(o.Periods-1) * T
	// ngspice saves from the first step at or after the start time; the
	// off-state power in the gap is nil.
	if len(tm) < 100 || tm[0] > t0+T/o.StepDivisor || tm[len(tm)-1] < t0+T*(1-1e-9) {
		return nil, fmt.Errorf("simulation output does not cover the last period (%d points from %.6g s to %.6g s, want %.6g s to %.6g s)",
			len(tm), tm[0], tm[len(tm)-1], t0, t0+T)
	}
	I := p.Current
	e := &CellEnergies{Current: I, Period: T, Par: o.Par}
	tRise := t0 + delay
	tFall := tRise + p.Duty*T

	idx := func(t float64) int { // first sample at or after t
		lo, hi := 0, len(tm)-1
		for lo < hi {
			mid := (lo + hi) / 2
			if tm[mid] < t {
				lo = mid + 1
			} else {
				hi = mid
			}
		}
		return lo
	}
	e.VBlock = vd[idx(tRise)-1] - vs[idx(tRise)-1]
	e.VOnState = vch[idx(tFall)-1]
	vlo := e.VOnState + 0.02*(e.VBlock-e.VOnState)

	// Turn-on window: from the gate edge until the internal drain voltage
	// has fallen to within 2 % of the swing above its on-state value.
	kOn0 := idx(tRise)
	kOn1 := -1
	for k := kOn0; k < len(tm) && tm[k] < tFall; k++ {
		if vch[k] <= vlo {
			kOn1 = k
			break
		}
	}
	if kOn1 < 0 {
		return nil, fmt.Errorf("the switch did not turn on fully before the gate turned off (Vds %.3g V at the end)", vch[idx(tFall)-1])
	}
	// Turn-off window: from the moment the voltage leaves the on-state band
	// or the channel current leaves the load current, until the channel
	// current has fallen below 2 % of the load current.
	kOff0 := -1
	for k := idx(tFall); k < len(tm); k++ {
		if vch[k] > vlo || ich[k] < 0.98*I {
			kOff0 = max(k-1, 0)
			break
		}
	}
	kOff1 := -1
	if kOff0 >= 0 {
		for k := kOff0; k < len(tm); k++ {
			if ich[k] <= 0.02*I {
				kOff1 = k
				break
			}
		}
	}
	if kOff1 < 0 {
		return nil, fmt.Errorf("the switch did not turn off within the period")
	}
	if tm[len(tm)-1]-tm[kOff1] < 0.02*T {
		return nil, fmt.Errorf("the turn-off ends too close to the end of the period")
	}
	e.TOn, e.TOff = tm[kOn1]-tm[kOn0], tm[kOff1]-tm[kOff0]

	trap := func(k int, f func(int) float64) float64 { return 0.5 * (f(k) + f(k-1)) * (tm[k] - tm[k-1]) }
	pch := func(k int) float64 { return ich[k] * vch[k] }
	pOver := func(k int) float64 { return vch[k] * math.Min(ich[k], I) }
	// Terminal powers against the die's source (v(s) is 0 V without a
	// common-source inductance): the inductance's own energy is reactive
	// and not the switch's.
	pTerm := func(k int) float64 { return (vd[k]-vs[k])*id[k] + (vg[k]-vs[k])*ig[k] }
	pDrain := func(k int) float64 { return (vd[k] - vs[k]) * id[k] }
	var chOn float64
	for k := kOn0 + 1; k <= kOn1; k++ {
		chOn += trap(k, pch)
		e.OnOverlap += trap(k, pOver)
		e.OnTerm += trap(k, pDrain)
	}
	e.OnCoss = chOn - e.OnOverlap
	for k := kOff0 + 1; k <= kOff1; k++ {
		e.Off += trap(k, pch)
		e.OffTerm += trap(k, pDrain)
	}
	for k := 1; k < len(tm); k++ {
		e.Switch += trap(k, pTerm)
		i2 := func(k int) float64 { return ig[k] * ig[k] }
		e.Rint += trap(k, i2) * m.Rg
		e.Rext += trap(k, i2) * p.RgExt
		e.Drv += trap(k, func(k int) float64 { return (vp[k] - vgx[k]) * ig[k] })
		e.Supply += trap(k, func(k int) float64 { return vp[k] * ig[k] })
	}
	e.Cond = e.Switch - e.Rint - chOn - e.Off
	e.VPeak = math.Inf(-1)
	for k := kOff0; k < len(tm); k++ {
		if v := vd[k] - vs[k]; v > e.VPeak {
			e.VPeak, e.TPeak = v, tm[k]-t0
		}
	}
	return e, nil
}
