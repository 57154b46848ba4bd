package spice

import (
	"context"
	"fmt"
	"math"
	"strings"
)

// ClassEParts are the component values of a class E stage built around a
// transistor, in SI units: what the simulation is given.
type ClassEParts struct {
	Vdd, F    float64 // supply (V) and frequency (Hz)
	R         float64 // load, Ω
	L, C2     float64 // series inductance (H) and capacitance (F) of the tank
	CExt      float64 // linear capacitor across the switch, F (the device's Coss makes up the rest of the shunt)
	LFeed     float64 // DC-feed choke from the supply, H
	IDC       float64 // the design's supply current, A: the choke's initial current
	Po        float64 // the design's output power, W (lossless switch)
	VOn       float64 // gate drive high level, V
	RSource   float64 // driver pull-up, Ω
	RSink     float64 // driver pull-down, Ω
	RgExt     float64 // external gate resistor, Ω
	Edge      float64 // the driver's own 0–100 % edge, s; 0: the benches' 50 ps
	Duty      float64 // the drive's high share of the period, from the start of its rise to the start of its fall; 0: 0.5
	Cycles    int     // RF periods simulated; the last is measured
	StepLimit float64 // maximum time step, s
}

// SeriesCapacitor is the tank capacitor that leaves the excess reactance x
// (Ω) with series inductance l (H) at frequency f (Hz): 1/(ω·(ωL − X)) (the
// series branch of Raab 1977; rank/resonant's ClassE.C2).
func SeriesCapacitor(f, l, x float64) float64 {
	w := 2 * math.Pi * f
	return 1 / (w * (w*l - x))
}

// ClassEMeasured is what the simulation of a class E stage shows over its
// last RF period (SI units).
type ClassEMeasured struct {
	VPeak float64 // peak drain voltage, V
	VMean float64 // mean drain voltage, V (V_DD in steady state: the choke carries no DC voltage)
	VOn   float64 // drain voltage at the gate's turn-on edge, V (≈ 0 at zero-voltage switching)
	// VChannelOn is the drain voltage when the channel starts to conduct
	// after the gate's edge (its current past 2 % of its peak), V, and
	// OnShare the share of the period the channel conducts (the same
	// threshold).
	VChannelOn, OnShare float64
	VMin                float64 // lowest drain voltage, V (below 0: the body diode conducts)
	Po                  float64 // output power, mean of i²·R in the load, W
	PSupply             float64 // power drawn from the supply, W
	PSwitch             float64 // power into the transistor's terminals (drain and gate), W
	PDrv                float64 // power in the driver's output resistance and the external gate resistor, W
	PoPrev              float64 // output power over the period before, W (a steady-state check)
	IDC                 float64 // mean supply current, A
}

// classEDeck is the netlist: the supply through the feed choke into the
// drain, the linear shunt capacitor, the series L-C₂ tank into the load,
// and the pulse driver (50 % duty, 50 ps edges) behind its source and sink
// resistances and the external resistor. The tank and the choke start on
// the Q_L → ∞ steady state at the turn-on instant (as rank/resonant's
// ngspice test of the shunt does): load current I_m·sin(θ+φ) at θ = π from
// turn-off, tan φ = −2/π, I_m = I_DC·√(π²+4)/2, the series capacitor's
// voltage the integral of that sinusoid, the choke at I_DC (Raab 1977).
func classEDeck(m *Model, x *ClassEParts) string {
	T := 1 / x.F
	i0, vc0 := classEStart(x)
	n := float64(x.Cycles)
	var b strings.Builder
	fmt.Fprintf(&b, "* class E stage: %s at %s V, %s Hz\n", m.Name, num(x.Vdd), num(x.F))
	b.WriteString(m.card("dut"))
	b.WriteString(optionsLine)
	fmt.Fprintf(&b, "vdd vdd 0 dc %s\nlf vdd d %s ic=%s\n", num(x.Vdd), num(x.LFeed), num(x.IDC))
	b.WriteString("vmd d dd 0\nm1 dd g s s dut\nvms s 0 0\n")
	fmt.Fprintf(&b, "cx d 0 %s\nl1 d a %s ic=%s\nc2 a b %s ic=%s\nvl b c 0\nrl c 0 %s\n",
		num(x.CExt), num(x.L), num(i0), num(x.C2), num(vc0), num(x.R))
	e := edge
	if x.Edge > 0 {
		e = x.Edge
	}
	duty := 0.5
	if x.Duty > 0 {
		duty = x.Duty
	}
	fmt.Fprintf(&b, "vdrv p 0 pulse(0 %s 0 %s %s %s %s)\n", num(x.VOn), num(e), num(e), num(duty*T-e), num(T))
	fmt.Fprintf(&b, "bdrv p gx i = (v(p)-v(gx))/(v(p) > %s ? %s : %s)\n", num(x.VOn/2), num(x.RSource), num(x.RSink))
	fmt.Fprintf(&b, "rgx gx g2 %s\nvmg g2 g 0\n", num(x.RgExt))
	fmt.Fprintf(&b, ".control\n%ssave v(d) v(g) v(gx) v(p) i(vmd) i(vmg) i(vl) i(vdd) @m1[id]\n", deckPrologue)
	// The run ends a hundredth of a period after the last measured one, off
	// the drive's breakpoints (a drive edge at the stop time can stall the
	// step control).
	fmt.Fprintf(&b, "tran %s %s %s %s uic\n", num(T/1e3), num((n+0.01)*T), num((n-2)*T), num(x.StepLimit))
	b.WriteString("wrdata ce.dat v(d) v(g) v(gx) v(p) i(vmd) i(vmg) i(vl) i(vdd) @m1[id]\nquit 0\n.endc\n.end\n")
	return b.String()
}

// classEStart returns the series branch's current (A) and the series
// capacitor's voltage (V) at the turn-on instant of the Q_L → ∞ steady
// state (Raab 1977): the initial conditions of the class E decks.
func classEStart(x *ClassEParts) (i0, vc0 float64) {
	w := 2 * math.Pi * x.F
	im := x.IDC * math.Sqrt(math.Pi*math.Pi+4) / 2
	phi := -math.Atan(2 / math.Pi)
	return im * math.Sin(math.Pi+phi), -im * math.Cos(math.Pi+phi) / (w * x.C2)
}

// SimulateClassE simulates the class E stage x with device m as the switch
// until its last period and measures that period.
func SimulateClassE(ctx context.Context, r *Runner, m *Model, x *ClassEParts) (*ClassEMeasured, error) {
	name := fmt.Sprintf("class E %s at %g V, %g Hz", m.Name, x.Vdd, x.F)
	t, err := r.Run(ctx, name, classEDeck(m, x), "ce.dat")
	if err != nil {
		return nil, err
	}
	res, err := measureClassE(t["ce.dat"], x)
	if err != nil {
		return nil, fmt.Errorf("%s: %w", name, err)
	}
	return res, nil
}

func measureClassE(tab *Table, x *ClassEParts) (*ClassEMeasured, error) {
	cols, err := tab.Columns("v(d)", "v(g)", "v(gx)", "v(p)", "i(vmd)", "i(vmg)", "i(vl)", "i(vdd)", "@m1[id]")
	if err != nil {
		return nil, err
	}
	tm := tab.Cols[0]
	vd, vg, vgx, vp, id, ig, il, isup, ich := cols[0], cols[1], cols[2], cols[3], cols[4], cols[5], cols[6], cols[7], cols[8]
	T := 1 / x.F
	n := float64(x.Cycles)
	t0, t1 := (n-1)*T, n*T
	if len(tm) < 100 || tm[0] > (n-2)*T+T/100 || tm[len(tm)-1] < t1-T/1e4 {
		return nil, fmt.Errorf("simulation output does not cover the last two periods (%d points from %.6g s to %.6g s)",
			len(tm), tm[0], tm[len(tm)-1])
	}
	// Means over [a, b] by the trapezoidal rule, the end points
	// interpolated.
	mean := func(a, b float64, f func(k int) float64) float64 { return integrate(tm, a, b, f) / (b - a) }
	m := &ClassEMeasured{VPeak: math.Inf(-1), VMin: math.Inf(1)}
	for k := range tm {
		if tm[k] >= t0 {
			m.VPeak, m.VMin = max(m.VPeak, vd[k]), min(m.VMin, vd[k])
		}
	}
	m.VOn = vd[len(vd)-1]
	// The channel's conduction in the last period: its current past 2 %
	// of its peak; the drain voltage where it first gets there.
	var ipk float64
	for k := range tm {
		if tm[k] >= t0 {
			ipk = max(ipk, ich[k])
		}
	}
	m.VChannelOn = math.NaN()
	for k := 1; k < len(tm); k++ {
		if tm[k] <= t0 {
			continue
		}
		if ich[k] > 0.02*ipk {
			m.OnShare += (tm[k] - tm[k-1]) / T
			if math.IsNaN(m.VChannelOn) {
				m.VChannelOn = vd[k]
			}
		}
	}
	m.VMean = mean(t0, t1, func(k int) float64 { return vd[k] })
	po := func(k int) float64 { return il[k] * il[k] * x.R }
	m.Po = mean(t0, t1, po)
	m.PoPrev = mean(t0-T, t0, po)
	// ngspice's source current flows from + through the source: the
	// supply delivers −i(vdd).
	m.IDC = -mean(t0, t1, func(k int) float64 { return isup[k] })
	m.PSupply = x.Vdd * m.IDC
	m.PSwitch = mean(t0, t1, func(k int) float64 { return vd[k]*id[k] + vg[k]*ig[k] })
	m.PDrv = mean(t0, t1, func(k int) float64 { return (vp[k]-vgx[k])*ig[k] + ig[k]*ig[k]*x.RgExt })
	return m, nil
}
