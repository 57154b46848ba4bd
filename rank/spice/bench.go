package spice

import (
	"fmt"
	"math"
	"strings"
)

// BenchKind is the circuit a Bench builds.
type BenchKind uint8

// Bench kinds.
const (
	// CellBench is the single hard-switched cell: the control switch from
	// the drain node to ground, a load current from the bus into the drain
	// (ramping from Ion at turn-on to Ioff at turn-off and back) and an
	// ideal clamp diode from the drain to the bus.
	CellBench BenchKind = iota
	// BuckBench is a buck: the control switch from the input to the switch
	// node, the synchronous switch (or the rectifier diode) from the switch
	// node to ground, the inductor into the output.
	BuckBench
	// BoostBench is a boost: the inductor from the input to the switch
	// node, the control switch from it to ground, the synchronous switch
	// (or the rectifier diode) from it to the output capacitor.
	BoostBench
	// ClassEBench is a class E stage (the deck of SimulateClassE).
	ClassEBench
)

var benchNames = [...]string{CellBench: "hard-switched cell", BuckBench: "buck", BoostBench: "boost", ClassEBench: "class E"}

func (k BenchKind) String() string {
	if int(k) < len(benchNames) {
		return benchNames[k]
	}
	return fmt.Sprintf("bench(%d)", k)
}

// Drive is the gate driver of each switch, SI units.
type Drive struct {
	VOn     float64 // on level, V; > 0
	VOff    float64 // off level, V; ≤ 0 (0: unipolar drive)
	RSource float64 // pull-up resistance, Ω; > 0
	RSink   float64 // pull-down resistance, Ω; > 0
	RgExt   float64 // external gate resistor, Ω; ≥ 0
}

// Rectifier is the diode of a diode-rectified buck or boost.
type Rectifier struct {
	Vf  float64 // forward drop at the inductor current, V; > 0
	Qrr float64 // recovered charge, C; ≥ 0 (0: none)
	Cj  float64 // junction capacitance, F; ≥ 0 (0: none)
}

// Bench is one stage to simulate with its devices: what rank/verify builds
// from a resolved operating point. SI units throughout.
type Bench struct {
	Kind BenchKind
	Ctrl *Device // the control (hard-switched) switch; required
	// Sync is the synchronous switch of a buck or boost; nil: the
	// rectifier diode Diode takes its place.
	Sync  *Device
	Diode Rectifier

	Fsw  float64 // switching frequency, Hz; > 0
	Duty float64 // control switch's on-time fraction of the period; (0, 1)
	// DeadTime is the time between one switch's gate pulse ending and the
	// other's starting, s; ≥ 0 (synchronous stages): [0] after the
	// control switch's, before the synchronous switch's; [1] after the
	// synchronous switch's, before the control switch's.
	DeadTime [2]float64
	// Drive is the gate driver of each place: [0] the control switch,
	// [1] the synchronous switch (a zero Drive there: the same as [0]).
	Drive [2]Drive

	// Hard marks the edges whose energy is counted as switching: [place]
	// [0 turn-on, 1 turn-off]; place 0 is the control switch, 1 the
	// synchronous one. A soft edge's energy stays with the interval it
	// belongs to (conduction or off).
	Hard [2][2]bool

	// Cell.
	Vblock, Ion, Ioff float64 // blocked voltage (V), load current at turn-on and at turn-off (A)
	// Buck and boost.
	Vin, Vout  float64 // V
	IL         float64 // average inductor current, A
	Inductance float64 // H
	// Class E: the tank and the driver's timing; Ctrl is the switch.
	ClassE *ClassEParts

	// StepDivisor sets the maximum time step to period/StepDivisor.
	// Default 1000 (as the cross-check's cell).
	StepDivisor float64
}

// Name describes the bench for messages.
func (b *Bench) Name() string {
	s := fmt.Sprintf("%s of %s", b.Kind, b.Ctrl.Name)
	if b.Sync != nil && b.Sync.Path != b.Ctrl.Path {
		s += " and " + b.Sync.Name
	}
	return s
}

// period returns T and the control switch's gate-rise delay within each
// period (long enough for the synchronous switch's dead time before it).
func (b *Bench) period() (T, delay float64) {
	T = 1 / b.Fsw
	if b.Kind == ClassEBench {
		return T, 0 // the tank starts at the turn-on instant
	}
	return T, max(0.05*T, 3*b.DeadTime[1])
}

// gateWindows returns, for each place, the gate-on interval of the
// period starting at t0 as [rise, fall]; the synchronous switch's interval
// wraps past the period's end (fall > t0 + T).
func (b *Bench) gateWindows(t0 float64) [2][2]float64 {
	T, delay := b.period()
	var w [2][2]float64
	w[0] = [2]float64{t0 + delay, t0 + delay + b.Duty*T}
	w[1] = [2]float64{w[0][1] + b.DeadTime[0], t0 + T + delay - b.DeadTime[1]}
	return w
}

// places is the number of transistors in the deck.
func (b *Bench) places() int {
	if b.Sync != nil && (b.Kind == BuckBench || b.Kind == BoostBench) {
		return 2
	}
	return 1
}

// outputR is the resistance from a converter's output node to its
// output source, Ω. Buck: the inductor current settles with a time
// constant of two periods (L/R = 2T). Boost: critical damping of the
// inductor with the output capacitor seen through the switch,
// R = √(L/C)/(2(1 − D)).
func (b *Bench) outputR() float64 {
	if b.Kind == BoostBench {
		return math.Sqrt(b.Inductance/b.outputC()) / (2 * (1 - b.Duty))
	}
	return b.Inductance * b.Fsw / 2
}

// outputC is the boost's output capacitor, F: 2 % ripple at the output
// current.
func (b *Bench) outputC() float64 {
	return b.IL * (1 - b.Duty) * b.Duty / b.Fsw / (0.02 * b.Vout)
}

// deck writes the netlist for n periods, saving the last two. vsrc is the
// converters' output source voltage (see outputR).
func (b *Bench) deck(n int, vsrc float64, opts string) (string, error) {
	T, delay := b.period()
	div := b.StepDivisor
	if div <= 0 {
		div = 1000
	}
	var w strings.Builder
	fmt.Fprintf(&w, "* swrank verify: %s, %s Hz\n.include model.lib\n", b.Name(), num(b.Fsw))
	w.WriteString(opts)
	uic := ""
	switch b.Kind {
	case CellBench:
		// The clamp's drop (n·Vt·ln(I/Is) + I·rs of clampCard) is taken
		// off the bus so that the switch blocks Vblock.
		imax := max(b.Ion, b.Ioff, 1e-3)
		drop := 0.3*0.025852*math.Log(imax/1e-9) + imax*1e-3
		w.WriteString(clampCard)
		fmt.Fprintf(&w, "vbus bus 0 dc %s\ndcl d0 bus dclamp\n", num(b.Vblock-drop))
		ton := b.Duty * T
		v0 := b.Ioff + (b.Ion-b.Ioff)*(T-delay-ton)/((1-b.Duty)*T)
		// The load current ramps from Ion to Ioff while the switch
		// conducts and back while the clamp does, written out for every
		// period (ngspice's current sources take no repeat).
		w.WriteString("il bus d0 pwl(")
		for k := 0; k < n; k++ {
			t := float64(k) * T
			fmt.Fprintf(&w, "%s %s %s %s %s %s ", num(t), num(v0), num(t+delay), num(b.Ion), num(t+delay+ton), num(b.Ioff))
		}
		fmt.Fprintf(&w, "%s %s)\n", num(float64(n)*T), num(v0))
		b.place(&w, 0, b.Ctrl, "d0", "0")
	case BuckBench:
		uic = " uic"
		fmt.Fprintf(&w, "vin in 0 dc %s\nl1 sw o %s ic=%s\nro o vo %s\nvout vo 0 dc %s\n",
			num(b.Vin), num(b.Inductance), num(b.IL), num(b.outputR()), num(vsrc))
		b.place(&w, 0, b.Ctrl, "in", "sw")
		if b.Sync != nil {
			b.place(&w, 1, b.Sync, "sw", "0")
		} else {
			b.rectifier(&w, "0", "sw")
		}
	case BoostBench:
		uic = " uic"
		c := b.outputC()
		fmt.Fprintf(&w, "vin in 0 dc %s\nl1 in sw %s ic=%s\nco out 0 %s ic=%s\nro out vo %s\nvout vo 0 dc %s\n",
			num(b.Vin), num(b.Inductance), num(b.IL), num(c), num(b.Vout), num(b.outputR()), num(vsrc))
		b.place(&w, 0, b.Ctrl, "sw", "0")
		if b.Sync != nil {
			b.place(&w, 1, b.Sync, "out", "sw")
		} else {
			b.rectifier(&w, "sw", "out")
		}
	case ClassEBench:
		uic = " uic"
		if err := b.classE(&w); err != nil {
			return "", err
		}
		b.place(&w, 0, b.Ctrl, "d0", "0")
	default:
		return "", fmt.Errorf("unknown bench %v", b.Kind)
	}
	vecs := b.vectors()
	fmt.Fprintf(&w, ".control\n%ssave %s\n", deckPrologue, strings.Join(vecs, " "))
	fmt.Fprintf(&w, "tran %s %s %s %s%s\n", num(T/1e4), num(float64(n)*T), num(float64(n-2)*T), num(T/div), uic)
	fmt.Fprintf(&w, "wrdata bench.dat %s\nquit 0\n.endc\n.end\n", strings.Join(vecs, " "))
	return w.String(), nil
}

// benchOptions are the simulator settings of the benches, tried in order
// when a run stalls its time step: the cross-check's settings with the
// charge tolerance at 1e-14 C (at 1e-16 C the body diode's take-over at
// the synchronous switch's turn-off stalls the time step), then
// tolerances ten times looser, then the charge tolerance at 1e-12 C (a
// body diode with stored charge and no series resistance ends its
// recovery abruptly, which stalls the time step at 1e-14 C).
var benchOptions = []string{
	".options temp=25 tnom=25 method=gear reltol=1e-5 vntol=1e-7 abstol=1e-10 chgtol=1e-14 trtol=1\n",
	".options temp=25 tnom=25 method=gear reltol=1e-4 vntol=1e-6 abstol=1e-9 chgtol=1e-14 trtol=1\n",
	".options temp=25 tnom=25 method=gear reltol=1e-4 vntol=1e-6 abstol=1e-9 chgtol=1e-12 trtol=1\n",
}

// place writes switch i (0 control, 1 synchronous) between drain and
// source with its driver: a pulse source referred to the switch's driver
// return (its Kelvin pin, or its source), a behavioural resistance of
// RSource while the pulse is high and RSink while low, the external
// resistor, and zero-volt sources measuring the drain and gate currents.
func (b *Bench) place(w *strings.Builder, i int, d *Device, drain, source string) {
	T, _ := b.period()
	win := b.gateWindows(0)[i]
	x := fmt.Sprint(i)
	dv := b.drive(i)
	on := win[1] - win[0] - edge
	rise := win[0]
	if rise >= T {
		rise -= T
	}
	fmt.Fprintf(w, "vmd%s %s dd%s 0\n", x, drain, x)
	if source != "s"+x {
		fmt.Fprintf(w, "vms%s s%s %s 0\n", x, x, source)
	}
	line, kelvin := d.instance(x, "dd"+x, "g"+x, "s"+x, "k"+x)
	w.WriteString(line)
	if !kelvin {
		fmt.Fprintf(w, "vk%s k%s s%s 0\n", x, x, x)
	}
	fmt.Fprintf(w, "vdrv%s p%s k%s pulse(%s %s %s %s %s %s %s)\n", x, x, x, num(dv.VOff), num(dv.VOn),
		num(rise), num(edge), num(edge), num(on), num(T))
	fmt.Fprintf(w, "bdrv%s p%s gx%s i = (v(p%s)-v(gx%s))/(v(p%s,k%s) > %s ? %s : %s)\n", x, x, x, x, x, x, x,
		num((dv.VOn+dv.VOff)/2), num(dv.RSource), num(dv.RSink))
	if dv.RgExt > 0 {
		fmt.Fprintf(w, "rgx%s gx%s gm%s %s\n", x, x, x, num(dv.RgExt))
	} else {
		fmt.Fprintf(w, "vgx%s gx%s gm%s 0\n", x, x, x)
	}
	fmt.Fprintf(w, "vmg%s gm%s g%s 0\n", x, x, x)
}

// drive returns place i's driver.
func (b *Bench) drive(i int) Drive {
	if i == 1 && b.Drive[1].VOn > 0 {
		return b.Drive[1]
	}
	return b.Drive[0]
}

// rectifier writes the diode of a diode-rectified stage: a junction whose
// drop at the inductor current is Vf (emission coefficient 1), with the
// junction capacitance Cj (nearly constant: grading 0.01) and a transit
// time Qrr/IL (the charge-control model: Q = τ·I; ngspice manual, diode
// model), and a zero-volt source measuring its current.
func (b *Bench) rectifier(w *strings.Builder, anode, cathode string) {
	il := max(b.IL, 1e-3)
	is := il * math.Exp(-b.Diode.Vf/0.025852)
	fmt.Fprintf(w, ".model drect D(is=%s n=1 rs=0 cjo=%s vj=10 m=0.01 tt=%s)\n", num(is), num(b.Diode.Cj), num(b.Diode.Qrr/il))
	fmt.Fprintf(w, "vmr %s ra 0\ndr ra %s drect\n", anode, cathode)
}

// vectors are the saved columns: per place the drain, source, gate,
// driver-return, pulse and driver-output voltages and the drain and gate
// currents; the inductor current and the rectifier's voltage and current.
func (b *Bench) vectors() []string {
	var v []string
	for i := 0; i < b.places(); i++ {
		x := fmt.Sprint(i)
		v = append(v, "v(dd"+x+")", "v(s"+x+")", "v(g"+x+")", "v(k"+x+")", "v(p"+x+")", "v(gx"+x+")", "i(vmd"+x+")", "i(vmg"+x+")")
	}
	switch {
	case b.Kind == BuckBench || b.Kind == BoostBench:
		v = append(v, "i(l1)")
		if b.places() == 2 && !b.Sync.Subckt {
			v = append(v, syncChannel, syncGate) // a card's own channel current and inner gate (BridgeWave)
		}
		if b.Sync == nil {
			v = append(v, "v(ra)", "i(vmr)")
			if b.Kind == BuckBench {
				v = append(v, "v(sw)")
			} else {
				v = append(v, "v(out)")
			}
		}
	case b.Kind == ClassEBench:
		v = append(v, "i(vl)", "i(vdd)")
	}
	return v
}

// classE writes the class E tank around the drain node d0 (the deck of
// SimulateClassE, with the bench's driver): the supply through the feed
// choke, the linear shunt capacitor, the series L-C₂ into the load, the
// tank and the choke started on the ideal steady state at turn-on.
func (b *Bench) classE(w *strings.Builder) error {
	x := b.ClassE
	if x == nil {
		return fmt.Errorf("class E bench without its tank")
	}
	i0, vc0 := classEStart(x)
	fmt.Fprintf(w, "vdd vdd 0 dc %s\nlf vdd d0 %s ic=%s\n", num(x.Vdd), num(x.LFeed), num(x.IDC))
	fmt.Fprintf(w, "cx d0 0 %s\nl1 d0 a %s ic=%s\nc2 a b %s ic=%s\nvl b c 0\nrl c 0 %s\n",
		num(max(x.CExt, 1e-15)), num(x.L), num(i0), num(x.C2), num(vc0), num(x.R))
	return nil
}
