package main

import (
	"bytes"
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
	"swrank/rank/design"
	"swrank/rank/fit"
	"swrank/rank/report"
	"swrank/rank/report/svg"
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
	logY       bool
}

func runSweep(args []string, stdin io.Reader, stdout, stderr io.Writer) error {
	var in inputs
	var dec design.Decisions
	var sf sweepFlags
	fs := newFlagSet("sweep", sweepSynopsis, stdout)
	in.register(fs)
	fs.StringVar(&in.format, "format", defaultFormat, "output `FORMAT`: table, csv, json or markdown")
	in.view.register(fs)
	fs.IntVar(&in.top, "top", decide.DefaultSweepTop, "sweep the best `N` parts over the range (fewest screened points, then least mean loss; 0: all) unless parts are named")
	registerDecisions(fs, &dec)
	fs.StringVar(&sf.variable, "var", decide.SweepFsw.String(), "the `VARIABLE` swept: fsw (Hz), iout (A), vin (V; custom stage: the blocking voltage) or vdrive (V)")
	fs.StringVar(&sf.from, "from", "", "start of the range, in the variable's unit with SI prefixes (`X`, e.g. 100k)")
	fs.StringVar(&sf.to, "to", "", "end of the range (`Y`, e.g. 2M)")
	fs.IntVar(&sf.steps, "steps", decide.DefaultSweepSteps, fmt.Sprintf("grid points, both ends included (`N`, 2 to %d)", decide.MaxSweepSteps))
	fs.StringVar(&sf.scale, "scale", "", "grid steps, `KIND`: log (equal ratios; the default for fsw) or linear (the default otherwise)")
	fs.BoolVar(&sf.components, "components", false, "show each loss component per part and point (one row per part and point)")
	fs.StringVar(&sf.plot, "plot", "", "also draw loss against the swept variable to `FILE.svg` or FILE.png (replaced atomically)")
	fs.BoolVar(&sf.logY, "log-y", false, "plot the loss on a log scale")
	if err := parse(fs, args); err != nil {
		return err
	}
	if err := applyDesign(fs, &in, &dec); err != nil {
		return err
	}
	if dec.Multi() {
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
		return usagef("sweep needs --from and --to")
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
		if err := checkPlotPath(sf.plot, append(slices.Clone(in.parts), dec.Design)...); err != nil {
			return err
		}
	}
	counts, auto, err := dec.ParallelCounts()
	if err != nil {
		return err
	}
	if auto {
		return errors.New("sweep takes --parallel N, not auto (the best count would change along the sweep)")
	}
	lib, devs, aside, err := loadLibrary(&in, stdin, stderr)
	if err != nil {
		return err
	}
	warnSetAside(stderr, lib.Source, aside)
	var partner *fit.Device
	if in.partner != "" {
		if partner, err = findDevice(devs, aside, in.partner); err != nil {
			return fmt.Errorf("--partner: %w", err)
		}
	}
	// The parts swept: the named ones, or all (the best are picked after).
	var ptrs []*fit.Device
	if fs.NArg() > 0 {
		for _, name := range fs.Args() {
			d, err := findDevice(devs, aside, name)
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
		kept := ptrs[:0]
		for _, d := range ptrs {
			dn, err := decide.Parallel(d, n)
			if err != nil {
				// This copy costs only itself.
				warnSetAside(stderr, lib.Source, []rank.SetAside{{Part: d.Part.Name, Line: d.Part.Line, Reason: fmt.Sprintf("%d in parallel: %v", n, err)}})
				continue
			}
			kept = append(kept, &dn)
		}
		if ptrs = kept; len(ptrs) == 0 {
			return errors.New("no part to sweep: every paralleled copy was set aside")
		}
	}
	bar := newProgress(stderr, len(ptrs), "sweeping "+strconv.Itoa(len(ptrs))+" parts")
	sw, err := decide.Sweep(in.stage, dec.LightLoad(), spec, ptrs, partner, rank.Options{Progress: bar.add})
	bar.finish()
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
	index := map[string]int{}
	for i := range lib.Parts {
		index[lib.Parts[i].Name] = i
	}
	for _, d := range ptrs {
		if _, ok := index[d.Part.Name]; !ok {
			index[d.Part.Name] = index[strings.TrimSpace(strings.Split(d.Part.Name, " ×")[0])]
		}
	}
	sr := report.Sweep{Result: sw, Set: set, Crossovers: cs, Components: sf.components, Source: lib.Source, Parts: len(lib.Parts), Index: index}
	rep := sr.Report()
	if sf.plot != "" {
		if err := writePlot(sf.plot, rep.Plot, sf.logY); err != nil {
			return err
		}
	}
	if err := writeReport(stdout, rep, &in); err != nil {
		return err
	}
	for k := range sw.Devs {
		for i := range sw.X {
			if _, ok := sw.Total(k, i); ok {
				return nil
			}
		}
	}
	return errNoPass
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

// writePlot draws the sweep to path (.svg or .png), atomically: the image
// goes to a temporary file in the same directory, renamed into place.
func writePlot(path string, pl *report.Plot, logY bool) error {
	format := strings.TrimPrefix(strings.ToLower(filepath.Ext(path)), ".")
	if format != "svg" && format != "png" {
		return fmt.Errorf("--plot %q: the file must end in .svg or .png", path)
	}
	var buf bytes.Buffer
	if err := svg.Write(&buf, pl, format, svg.Options{LogY: logY}); err != nil {
		return err
	}
	return design.WriteAtomic(path, buf.Bytes(), false)
}
