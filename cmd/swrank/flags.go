package main

import (
	"errors"
	"flag"
	"fmt"
	"io"
	"math"
	"strconv"
	"strings"

	"swrank/devices"
	q "swrank/devices/quantity"
	"swrank/rank/decide"
	"swrank/rank/design"
	"swrank/rank/resonant"
	"swrank/rank/stage"
)

// qty is a flag.Value for a required-or-defaulted quantity.
type qty[Q q.Quantity] struct{ p *Q }

func (f qty[Q]) String() string {
	if f.p == nil || *f.p == 0 {
		return ""
	}
	return q.Format(*f.p, 4)
}

func (f qty[Q]) Set(s string) error {
	v, err := q.Parse[Q](s)
	if err != nil {
		return err
	}
	*f.p = v
	return nil
}

// opt is a flag.Value for an optional quantity.
type opt[Q q.Quantity] struct{ p *q.Opt[Q] }

func (f opt[Q]) String() string {
	if f.p == nil || !f.p.OK {
		return ""
	}
	return q.Format(f.p.V, 4)
}

func (f opt[Q]) Set(s string) error {
	v, err := q.Parse[Q](s)
	if err != nil {
		return err
	}
	*f.p = q.Some(v)
	return nil
}

// list is a flag.Value that collects every value given, in order.
type list struct{ p *[]string }

func (f list) String() string {
	if f.p == nil {
		return ""
	}
	return strings.Join(*f.p, ", ")
}

func (f list) Set(s string) error {
	if strings.TrimSpace(s) == "" {
		return errors.New("want a file name (or - for standard input)")
	}
	*f.p = append(*f.p, s)
	return nil
}

// enum is a flag.Value that parses with fn.
type enum[T any] struct {
	p     *T
	parse func(string) (T, error)
	show  func(T) string
}

func (f enum[T]) String() string {
	if f.p == nil {
		return ""
	}
	return f.show(*f.p)
}
func (f enum[T]) Set(s string) error {
	v, err := f.parse(s)
	if err != nil {
		return err
	}
	*f.p = v
	return nil
}

func str[T fmt.Stringer](t T) string { return t.String() }

// short prints a default value for a flag's help as the flag takes it:
// plain from 0.01 to 1000 ("0.8", "25"), with an SI prefix outside ("20n").
func short[T ~float64](v T) string {
	x := float64(v)
	if a := math.Abs(x); a == 0 || a >= 0.01 && a < 1000 {
		return strconv.FormatFloat(x, 'g', -1, 64)
	}
	const prefixes = "afpnµm kMGTPE"
	e := min(max(int(math.Floor(math.Log10(math.Abs(x))/3)), -6), 6)
	p := string([]rune(prefixes)[e+6])
	return strconv.FormatFloat(x/math.Pow(1000, float64(e)), 'g', 12, 64) + strings.TrimSpace(p)
}

// inputs are the flags shared by rank and explain.
type inputs struct {
	// parts holds the --parts sources in the order given ("-": standard
	// input); their parts are ranked together.
	parts []string
	// read holds the library-reading options (--notes-columns).
	read    devices.ReadOptions
	demo    bool
	partner string
	stage   stage.Stage
	format  string
	all     bool
	top     int
	view    view
}

// register registers the library and operating-point flags on fs.
func (in *inputs) register(fs *flag.FlagSet) {
	fs.Var(list{&in.parts}, "parts", "parts library `FILE.csv` (one row per part; give it again to rank several libraries together; - reads standard input)")
	fs.BoolVar(&in.demo, "demo", false, "use the built-in demo library instead of --parts")
	fs.BoolVar(&in.read.UnknownAsNotes, "notes-columns", false, "accept columns swrank does not know as your own notes (default: an error naming the closest known column)")
	fs.StringVar(&in.partner, "partner", "", "`PART` filling the other place (default: the ranked part itself)")
	registerStage(fs, &in.stage)
}

// registerStage registers the stage, driver and thermal flags on fs,
// bound to s.
func registerStage(fs *flag.FlagSet, s *stage.Stage) {
	fs.Var(enum[stage.Topology]{&s.Topology, stage.ParseTopology, str[stage.Topology]}, "topology", "`STAGE`: buck, boost, custom, class-e or class-d")
	fs.Var(enum[stage.Rectifier]{&s.Rectifier, stage.ParseRectifier, str[stage.Rectifier]}, "rectifier", "second place of a buck or boost, `KIND`: sync (a transistor) or diode")
	fs.Var(enum[stage.Position]{&s.Position, stage.ParsePosition, str[stage.Position]}, "position", "`PLACE` ranked in a synchronous stage: control, sync or pair (whole-stage loss in every case)")
	fs.Var(qty[q.Voltage]{&s.Vin}, "vin", "input voltage, `V`")
	fs.Var(qty[q.Voltage]{&s.Vout}, "vout", "output voltage, `V`")
	fs.Var(qty[q.Current]{&s.Iout}, "iout", "load current, `A`")
	fs.Var(qty[q.Power]{&s.Pout}, "pout", "output power for percentages, `W` (default vout × iout)")
	fs.Var(qty[q.Frequency]{&s.Fsw}, "fsw", "switching frequency, `Hz`")
	fs.Var(opt[q.Ratio]{&s.Ripple}, "ripple", "inductor ripple, peak-to-peak `FRACTION` of the inductor current (default "+short(stage.DefaultRipple)+" unless --inductance)")
	fs.Var(qty[q.Inductance]{&s.Inductance}, "inductance", "inductor, `H` (sets the ripple)")
	fs.Var(opt[q.Time]{&s.DeadTime}, "dead-time", "dead time at each edge of a synchronous stage, `S` (default "+short(stage.DefaultDeadTime)+")")
	fs.Var(opt[q.Time]{&s.DeadTimeSyncOn}, "dead-time-sync-on", "dead time after the control switch turns off, before the synchronous switch turns on, `S` (default --dead-time)")
	fs.Var(opt[q.Time]{&s.DeadTimeCtrlOn}, "dead-time-ctrl-on", "dead time after the synchronous switch turns off, before the control switch turns on, `S` (default --dead-time)")
	fs.Var(qty[q.Voltage]{&s.Diode.Vf}, "diode-vf", "rectifier diode forward drop, `V` (default "+short(stage.DefaultDiodeVf)+")")
	fs.Var(qty[q.Charge]{&s.Diode.Qrr}, "diode-qrr", "rectifier diode recovered charge, `C` (default 0)")
	fs.Var(qty[q.Capacitance]{&s.Diode.Cj}, "diode-cj", "rectifier diode junction capacitance, `F` (default 0)")
	fs.Var(qty[q.Voltage]{&s.Vblock}, "vblock", "custom: blocking voltage at the hard edges, `V`")
	fs.Var(qty[q.Current]{&s.Ion}, "ion", "custom: drain current at turn-on, `A`")
	fs.Var(qty[q.Current]{&s.Ioff}, "ioff", "custom: drain current at turn-off, `A`")
	fs.Var(qty[q.Current]{&s.Irms}, "irms", "custom: rms drain current, `A`")
	fs.Var(qty[q.Resistance]{&s.RLoad}, "rload", "class E and D: load resistance, `OHM` (give it or --pout)")
	fs.Var(qty[q.Ratio]{&s.QL}, "ql", "class E and D: loaded `Q` of the series tank (class E default: the ideal Q → ∞; at least "+short(resonant.MinLoadedQ)+")")
	fs.Var(qty[q.Frequency]{&s.F0}, "f0", "class D: resonant frequency of the tank, `Hz` (with --ql)")
	fs.Var(opt[q.Ratio]{&s.Phase}, "phase", "class D: load phase at fsw, `RAD` (> 0 above resonance; instead of --f0 and --ql)")
	fs.Var(qty[q.Inductance]{&s.LoopInductance}, "l-loop", "layout power-loop inductance added to the parts' own l_loop, `H` (default 0)")
	fs.Var(qty[q.Inductance]{&s.CommonSourceInductance}, "l-cs", "layout common-source inductance (source trace shared by the gate and power loops) added to the parts' own l_cs, `H` (default 0)")
	fs.Var(qty[q.Voltage]{&s.Driver.VOn}, "vdrive", "gate drive on level, `V` (required)")
	fs.Var(qty[q.Voltage]{&s.Driver.VOff}, "vdrive-off", "gate drive off level, `V`; negative for bipolar drive (default 0)")
	fs.Var(qty[q.Resistance]{&s.Driver.RSource}, "rsrc", "driver source (pull-up) resistance, `OHM` (default "+short(stage.DefaultRSource)+")")
	fs.Var(qty[q.Resistance]{&s.Driver.RSink}, "rsnk", "driver sink (pull-down) resistance, `OHM` (default "+short(stage.DefaultRSink)+")")
	fs.Var(qty[q.Current]{&s.Driver.IPeakSource}, "ipk-src", "driver peak source current limit, `A` (default none)")
	fs.Var(qty[q.Current]{&s.Driver.IPeakSink}, "ipk-snk", "driver peak sink current limit, `A` (default none)")
	fs.Var(qty[q.Resistance]{&s.Driver.RgExt}, "rg-ext", "external gate resistor, `OHM` (default 0)")
	fs.Var(qty[q.Current]{&s.Driver.IQ}, "iq", "driver quiescent current, `A` (default 0)")
	fs.Var(qty[q.Time]{&s.Driver.Edge}, "drive-edge", "the driver's own 0-100 % output edge without its load, `S` (default 0, a step)")
	fs.Var(qty[q.Voltage]{&s.SyncDriver.VOn}, "sync-vdrive", "the synchronous switch's own gate drive on level, `V` (default: the same driver as the control switch)")
	fs.Var(qty[q.Voltage]{&s.SyncDriver.VOff}, "sync-vdrive-off", "the synchronous switch's off level, `V` (with --sync-vdrive; default 0)")
	fs.Var(qty[q.Resistance]{&s.SyncDriver.RSource}, "sync-rsrc", "the synchronous switch's driver source resistance, `OHM` (with --sync-vdrive; default "+short(stage.DefaultRSource)+")")
	fs.Var(qty[q.Resistance]{&s.SyncDriver.RSink}, "sync-rsnk", "the synchronous switch's driver sink resistance, `OHM` (with --sync-vdrive; default "+short(stage.DefaultRSink)+")")
	fs.Var(qty[q.Time]{&s.SyncDriver.Edge}, "sync-drive-edge", "the synchronous switch's driver edge, `S` (with --sync-vdrive; default --drive-edge)")
	fs.Var(qty[q.Resistance]{&s.SyncDriver.RgExt}, "sync-rg-ext", "the synchronous switch's external gate resistor, `OHM` (with --sync-vdrive; default 0)")
	fs.Var(qty[q.Temperature]{&s.Ambient}, "ta", "ambient temperature, `DEGC` (default "+short(stage.DefaultAmbient)+")")
	fs.Var(opt[q.ThermalResistance]{&s.RthCA}, "rth-ca", "case-to-ambient thermal resistance added to a part's rth_jc, `K/W`")
	fs.Var(opt[q.ThermalResistance]{&s.RthJCBlank}, "rth-jc-blank", "junction-to-case resistance for parts that leave rth_jc blank, `K/W` (default: the top of the package family's range)")
	fs.Var(opt[q.ThermalResistance]{&s.RthJABlank}, "rth-ja-blank", "junction-to-ambient resistance for parts that leave rth_ja blank, `K/W` (default: the top of the package family's range)")
	fs.Var(opt[q.Temperature]{&s.TjFixed}, "tj", "pin every junction at this temperature instead of solving it, `DEGC`")
	fs.Var(qty[q.Ratio]{&s.Derate}, "derate", "fraction of vds_max the drain voltage may reach, `FRACTION` (default "+short(stage.DefaultDerate)+")")
	fs.BoolVar(&s.Strict, "strict", false, "set aside every part whose result rests on an estimated value (a blank library cell)")
}

// outputFlags registers the output flags on fs.
func (in *inputs) registerOutput(fs *flag.FlagSet) {
	fs.StringVar(&in.format, "format", defaultFormat, "output `FORMAT`: table, csv, json or markdown")
	fs.BoolVar(&in.all, "all", false, "list every part: the whole ranking in the table (default: the best 20 and a count of the rest) and the parts set aside as rows")
	fs.IntVar(&in.top, "top", 0, "rank only the best `N` parts (0: all)")
	in.view.register(fs)
}

// registerDecisions registers the flags of the decision features (design
// file, load profile, paralleling, light load) on fs, bound to d.
func registerDecisions(fs *flag.FlagSet, d *design.Decisions) {
	fs.StringVar(&d.Design, "design", "", "design `FILE.toml` holding the stage, its points and the parts library (flags override it; see \"swrank new\")")
	fs.StringVar(&d.Weighting, "weighting", "", "rank by weighted efficiency over a load `PROFILE` of the rated point: euro, cec, quarters, 10-20-50-100, or LOAD:WEIGHT pairs such as \"10%:0.2,50%:0.5,100%:0.3\"")
	fs.StringVar(&d.Parallel, "parallel", "", "paralleled devices in each place the part fills: `N`, or auto (the N from 1 to --parallel-max with the least loss); reported beside the single device")
	fs.IntVar(&d.ParallelMax, "parallel-max", decide.DefaultParallelMax, "largest `N` tried by --parallel auto")
	fs.BoolVar(&d.Valley, "valley", false, "a diode-rectified stage in discontinuous conduction turns on at the first valley of the ringing (default: at the resting voltage)")
}

// applyDesign fills the flags of fs that the command line left alone from
// the design file, when one is given (rank/design).
func applyDesign(fs *flag.FlagSet, in *inputs, d *design.Decisions) error {
	return d.Apply(design.Command{Flags: fs, Stage: &in.stage, Parts: &in.parts, Demo: &in.demo,
		AllFlags: allFlags, StageFlags: stageFlags})
}

// allFlags is a flag set of every rank flag, bound to values of its own.
func allFlags() *flag.FlagSet {
	var in inputs
	var d design.Decisions
	fs := flag.NewFlagSet("", flag.ContinueOnError)
	fs.SetOutput(io.Discard)
	in.register(fs)
	in.registerOutput(fs)
	registerDecisions(fs, &d)
	return fs
}

// stageFlags is a flag set of the stage, driver and thermal flags, bound
// to s.
func stageFlags(s *stage.Stage) *flag.FlagSet {
	fs := flag.NewFlagSet("", flag.ContinueOnError)
	fs.SetOutput(io.Discard)
	registerStage(fs, s)
	return fs
}
