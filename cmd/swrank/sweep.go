package main

import (
	"errors"
	"fmt"
	"io"
	"path/filepath"
	"slices"
	"strconv"
	"strings"

	q "swrank/devices/quantity"
	"swrank/rank"
	"swrank/rank/decide"
	"swrank/rank/fit"
)

const sweepSynopsis = `sweep --var fsw|iout|vin|vdrive --from X --to Y [--steps N] [--scale log|linear] [--top N | PART ...] [--components] [--plot FILE.svg|png] [stage flags as for rank]`

// sweepFlags are the flags of sweep.
type sweepFlags struct {
	variable   string
	from, to   string
	steps      int
	scale      string
	components bool
	plot       string
}

func runSweep(args []string, stdout, stderr io.Writer) error {
	var in inputs
	var dec decisionFlags
	var sf sweepFlags
	fs := newFlagSet("sweep", sweepSynopsis, stderr)
	in.register(fs)
	fs.StringVar(&in.format, "format", "table", "output `FORMAT`: table, csv, json or markdown")
	fs.IntVar(&in.top, "top", decide.DefaultSweepTop, "sweep the best `N` parts over the range (fewest screened points, then least mean loss; 0: all) unless parts are named")
	dec.register(fs)
	fs.StringVar(&sf.variable, "var", "fsw", "the `VARIABLE` swept: fsw (Hz), iout (A), vin (V; custom stage: the blocking voltage) or vdrive (V)")
	fs.StringVar(&sf.from, "from", "", "start of the range, in the variable's unit with SI prefixes (`X`, e.g. 100k)")
	fs.StringVar(&sf.to, "to", "", "end of the range (`Y`, e.g. 2M)")
	fs.IntVar(&sf.steps, "steps", decide.DefaultSweepSteps, fmt.Sprintf("grid points, both ends included (`N`, 2 to %d)", decide.MaxSweepSteps))
	fs.StringVar(&sf.scale, "scale", "", "grid steps, `KIND`: log (equal ratios; the default for fsw) or linear (the default otherwise)")
	fs.BoolVar(&sf.components, "components", false, "show each loss component per part and point (one row per part and point)")
	fs.StringVar(&sf.plot, "plot", "", "also draw loss against the swept variable to `FILE.svg` or FILE.png (replaced atomically)")
	if err := parse(fs, args); err != nil {
		return err
	}
	if err := dec.apply(fs, &in); err != nil {
		return err
	}
	if dec.multi() {
		return errors.New("sweep works at one operating point: drop --weighting or the design's [[point]] tables")
	}
	if err := checkFormat(in.format); err != nil {
		return err
	}
	v, err := decide.ParseSweepVar(sf.variable)
	if err != nil {
		return fmt.Errorf("--var: %w", err)
	}
	spec := decide.SweepSpec{Var: v, Steps: sf.steps, Log: v.DefaultLog()}
	switch strings.ToLower(sf.scale) {
	case "":
	case "log":
		spec.Log = true
	case "linear", "lin":
		spec.Log = false
	default:
		return fmt.Errorf("--scale %q: want log or linear", sf.scale)
	}
	if sf.from == "" || sf.to == "" {
		fs.Usage()
		return fmt.Errorf("%w: sweep needs --from and --to", errUsage)
	}
	if spec.Lo, err = parseIn(v, sf.from); err != nil {
		return fmt.Errorf("--from: %w", err)
	}
	if spec.Hi, err = parseIn(v, sf.to); err != nil {
		return fmt.Errorf("--to: %w", err)
	}
	if _, err := spec.Grid(); err != nil {
		return err
	}
	if sf.plot != "" {
		if err := checkPlotPath(sf.plot, in.parts, dec.design); err != nil {
			return err
		}
	}
	counts, auto, err := dec.parallelCounts()
	if err != nil {
		return err
	}
	if auto {
		return errors.New("sweep takes --parallel N, not auto (the best count would change along the sweep)")
	}
	lib, devs, err := loadLibrary(&in, stderr)
	if err != nil {
		return err
	}
	var partner *fit.Device
	if in.partner != "" {
		if partner, err = findDevice(devs, in.partner); err != nil {
			return fmt.Errorf("--partner: %w", err)
		}
	}
	// The parts swept: the named ones, or all (the best are picked after).
	var ptrs []*fit.Device
	if fs.NArg() > 0 {
		for _, name := range fs.Args() {
			d, err := findDevice(devs, name)
			if err != nil {
				return err
			}
			if !slices.Contains(ptrs, d) {
				ptrs = append(ptrs, d)
			}
		}
	} else {
		for i := range devs {
			ptrs = append(ptrs, &devs[i])
		}
	}
	if n := counts[len(counts)-1]; n > 1 {
		for i, d := range ptrs {
			dn, err := decide.Parallel(d, n)
			if err != nil {
				return err
			}
			ptrs[i] = &dn
		}
	}
	sw, err := decide.Sweep(in.stage, dec.lightLoad(), spec, ptrs, partner, rank.Options{})
	if err != nil {
		return err
	}
	set := sw.Top(in.top)
	if fs.NArg() > 0 {
		set = set[:0]
		for i := range ptrs {
			set = append(set, i)
		}
	}
	cs, err := sw.Crossovers(set)
	if err != nil {
		return err
	}
	rep := sweepReport{sw: sw, set: set, cross: cs, components: sf.components, source: lib.Source, parts: len(devs)}
	if sf.plot != "" {
		if err := writePlot(sf.plot, sw, set, cs); err != nil {
			return err
		}
	}
	switch strings.ToLower(in.format) {
	case "json":
		return rep.json(stdout)
	case "csv":
		return rep.csv(stdout)
	case "markdown":
		return rep.table(stdout, true)
	}
	return rep.table(stdout, false)
}

// parseIn reads a value of the swept variable's quantity.
func parseIn(v decide.SweepVar, s string) (float64, error) {
	switch v {
	case decide.SweepFsw:
		x, err := q.Parse[q.Frequency](s)
		return float64(x), err
	case decide.SweepIout:
		x, err := q.Parse[q.Current](s)
		return float64(x), err
	}
	x, err := q.Parse[q.Voltage](s)
	return float64(x), err
}

// fmtX prints a value of the swept variable with its unit.
func fmtX(v decide.SweepVar, x float64) string {
	switch v {
	case decide.SweepFsw:
		return q.Format(q.Frequency(x), 4)
	case decide.SweepIout:
		return q.Format(q.Current(x), 4)
	}
	return q.Format(q.Voltage(x), 4)
}

// checkPlotPath refuses to draw over the parts library or the design file.
func checkPlotPath(plot string, others ...string) error {
	ext := strings.ToLower(filepath.Ext(plot))
	if ext != ".svg" && ext != ".png" {
		return fmt.Errorf("--plot %q: the file must end in .svg or .png", plot)
	}
	pa, err := filepath.Abs(plot)
	if err != nil {
		return fmt.Errorf("--plot: %w", err)
	}
	for _, o := range others {
		if o == "" {
			continue
		}
		if oa, err := filepath.Abs(o); err == nil && oa == pa {
			return fmt.Errorf("--plot %q is one of your input files: choose another name", plot)
		}
	}
	return nil
}

type sweepReport struct {
	sw         *decide.SweepResult
	set        []int
	cross      []decide.Crossover
	components bool
	source     string
	parts      int
}

func (r *sweepReport) name(k int) string { return r.sw.Devs[k].Part.Name }

func (r *sweepReport) varHeader() string {
	v := r.sw.Spec.Var
	return v.String() + " (" + v.Unit() + ")"
}

// best returns the best part's name at grid point i ("none" when every
// part is set aside).
func (r *sweepReport) best(b []int, i int) string {
	if b[i] < 0 {
		return "none"
	}
	return r.name(b[i])
}

func (r *sweepReport) describe(w io.Writer) {
	sw := r.sw
	scale := "linear"
	if sw.Spec.Log {
		scale = "log"
	}
	fmt.Fprintf(w, "sweep of the %s from %s to %s, %d points, %s steps; the rest of the stage:\n", sw.Spec.Var.Title(),
		fmtX(sw.Spec.Var, sw.Spec.Lo), fmtX(sw.Spec.Var, sw.Spec.Hi), len(sw.X), scale)
	describePoint(w, &sw.Pts[0], r.source, r.parts)
	modes := []string{}
	for _, p := range sw.Pts {
		if m := p.Mode.String(); !slices.Contains(modes, m) {
			modes = append(modes, m)
		}
	}
	fmt.Fprintf(w, "conduction modes over the sweep: %s\n", strings.Join(modes, ", "))
	for _, n := range sw.Notes {
		fmt.Fprintf(w, "note: %s\n", n)
	}
	fmt.Fprintln(w, "total stage loss of each part; a value in parentheses: the part is set aside there by a screen")
}

func (r *sweepReport) cell(k, i int) string {
	t, ok := r.sw.Total(k, i)
	s := q.Format(q.Power(t), 3)
	if !ok {
		s = "(" + s + ")"
	}
	return s
}

func (r *sweepReport) table(w io.Writer, markdown bool) error {
	if !markdown {
		r.describe(w)
		fmt.Fprintln(w)
	}
	b := r.sw.Best(r.set)
	var header []string
	var rows [][]string
	if r.components {
		header = []string{r.varHeader(), "part", "conduction", "switching", "output cap", "diode", "gate+driver", "total", "Tj", "set aside"}
		for i, x := range r.sw.X {
			for _, k := range r.set {
				res := r.sw.Evaluate(k, i)
				l := res.Losses
				tj := "none"
				if t, ok := res.Tj(); ok {
					tj = q.Format(t, 3)
				}
				rows = append(rows, []string{fmtX(r.sw.Spec.Var, x), r.name(k), fmtP(l.Conduction), fmtP(l.TurnOn + l.TurnOff),
					fmtP(l.Coss), fmtP(l.DeadTime + l.Recovery), fmtP(l.GateRint + l.Driver()), fmtP(l.Total()), tj,
					strings.Join(decide.ScreenNames(res.Screens), ", ")})
			}
		}
	} else {
		header = []string{r.varHeader()}
		for _, k := range r.set {
			header = append(header, r.name(k))
		}
		header = append(header, "best")
		for i, x := range r.sw.X {
			row := []string{fmtX(r.sw.Spec.Var, x)}
			for _, k := range r.set {
				row = append(row, r.cell(k, i))
			}
			rows = append(rows, append(row, r.best(b, i)))
		}
	}
	if err := writeTable(w, header, rows, markdown); err != nil {
		return err
	}
	fmt.Fprintln(w)
	if len(r.cross) == 0 {
		fmt.Fprintln(w, "no crossover: the best part is the same over the whole range (among the parts shown)")
		return nil
	}
	fmt.Fprintln(w, "crossovers, where the best part changes (bracketed on the grid, refined to 1e-6 relative):")
	for _, c := range r.cross {
		fmt.Fprintf(w, "- at %s: %s → %s (%s, %s)\n", fmtX(r.sw.Spec.Var, c.X), r.name(c.From), r.name(c.To), c.Kind,
			q.Format(q.Power(c.Loss), 4))
	}
	return nil
}

func (r *sweepReport) csv(w io.Writer) error {
	cw := newSafeCSV(w)
	b := r.sw.Best(r.set)
	unit := r.sw.Spec.Var.String() + "_" + strings.ToLower(r.sw.Spec.Var.Unit())
	if r.components {
		if err := cw.Write([]string{unit, "part", "conduction_w", "turn_on_w", "turn_off_w", "coss_w", "deadtime_w", "recovery_w",
			"gate_rint_w", "driver_w", "total_w", "tj_degc", "screened", "mode", "best"}); err != nil {
			return err
		}
		for i, x := range r.sw.X {
			for _, k := range r.set {
				res := r.sw.Evaluate(k, i)
				l := res.Losses
				tj := ""
				if t, ok := res.Tj(); ok {
					tj = num(float64(t))
				}
				row := []string{num(x), r.name(k), num(float64(l.Conduction)), num(float64(l.TurnOn)), num(float64(l.TurnOff)),
					num(float64(l.Coss)), num(float64(l.DeadTime)), num(float64(l.Recovery)), num(float64(l.GateRint)),
					num(float64(l.Driver())), num(float64(l.Total())), tj, strconv.FormatBool(res.Screened()),
					r.sw.Pts[i].Mode.String(), strconv.FormatBool(b[i] == k)}
				if err := cw.Write(row); err != nil {
					return err
				}
			}
		}
	} else {
		header := []string{unit}
		for _, k := range r.set {
			header = append(header, r.name(k)+"_w")
		}
		header = append(header, "best", "mode")
		if err := cw.Write(header); err != nil {
			return err
		}
		for i, x := range r.sw.X {
			row := []string{num(x)}
			for _, k := range r.set {
				t, ok := r.sw.Total(k, i)
				if !ok {
					row = append(row, "")
					continue
				}
				row = append(row, num(t))
			}
			row = append(row, r.best(b, i), r.sw.Pts[i].Mode.String())
			if err := cw.Write(row); err != nil {
				return err
			}
		}
	}
	cw.Flush()
	return cw.Error()
}

type jsonSweepLoss struct {
	Part     string      `json:"part"`
	TotalW   float64     `json:"total_w"`
	Screened bool        `json:"screened"`
	Losses   *jsonLosses `json:"losses,omitempty"`
}

type jsonSweepPoint struct {
	X      float64         `json:"x"`
	Mode   string          `json:"mode"`
	Best   string          `json:"best"`
	Losses []jsonSweepLoss `json:"parts"`
}

type jsonCrossover struct {
	X     float64 `json:"x"`
	From  string  `json:"from"`
	To    string  `json:"to"`
	Kind  string  `json:"kind"`
	LossW float64 `json:"loss_w"`
}

type jsonSweep struct {
	Variable   string           `json:"variable"`
	Unit       string           `json:"unit"`
	Scale      string           `json:"scale"`
	Base       jsonPointMode    `json:"first_point"`
	Notes      []string         `json:"notes"`
	Library    string           `json:"library"`
	Parts      []string         `json:"parts"`
	Points     []jsonSweepPoint `json:"points"`
	Crossovers []jsonCrossover  `json:"crossovers"`
}

func (r *sweepReport) json(w io.Writer) error {
	sw := r.sw
	out := jsonSweep{Variable: sw.Spec.Var.String(), Unit: sw.Spec.Var.Unit(), Scale: "linear", Base: withMode(pointJSON(&sw.Pts[0]), sw.Pts[0].Mode),
		Notes: sw.Notes, Library: r.source, Parts: []string{}, Points: []jsonSweepPoint{}, Crossovers: []jsonCrossover{}}
	if sw.Spec.Log {
		out.Scale = "log"
	}
	if out.Notes == nil {
		out.Notes = []string{}
	}
	for _, k := range r.set {
		out.Parts = append(out.Parts, r.name(k))
	}
	b := sw.Best(r.set)
	for i, x := range sw.X {
		jp := jsonSweepPoint{X: x, Mode: sw.Pts[i].Mode.String(), Best: r.best(b, i)}
		for _, k := range r.set {
			t, ok := sw.Total(k, i)
			jl := jsonSweepLoss{Part: r.name(k), TotalW: t, Screened: !ok}
			if r.components {
				l := lossesJSON(sw.Evaluate(k, i).Losses)
				jl.Losses = &l
			}
			jp.Losses = append(jp.Losses, jl)
		}
		out.Points = append(out.Points, jp)
	}
	for _, c := range r.cross {
		out.Crossovers = append(out.Crossovers, jsonCrossover{X: c.X, From: r.name(c.From), To: r.name(c.To), Kind: c.Kind.String(), LossW: c.Loss})
	}
	return writeJSON(w, out)
}
