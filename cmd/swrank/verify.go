package main

import (
	"context"
	"errors"
	"flag"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"runtime"
	"time"

	"golang.org/x/term"

	"swrank/devices"
	"swrank/rank"
	"swrank/rank/design"
	"swrank/rank/report"
	"swrank/rank/spice"
	"swrank/rank/verify"
)

const verifySynopsis = `verify [same flags as rank] [--top N] [--ngspice PATH] [--timeout D] [--jobs N] [--no-cache] [--keep]`

// DefaultTimeout bounds one ngspice run of verify and characterise.
const defaultTimeout = 120 * time.Second

// simFlags are the flags of the commands that run ngspice.
type simFlags struct {
	ngspice string
	timeout time.Duration
	jobs    int
	noCache bool
	keep    bool
}

func (s *simFlags) register(fs *flag.FlagSet) {
	fs.StringVar(&s.ngspice, "ngspice", "", "ngspice executable `PATH` (default: ngspice found in PATH)")
	fs.DurationVar(&s.timeout, "timeout", defaultTimeout, "bound on each ngspice run, a `DURATION` such as 90s or 5m")
	fs.IntVar(&s.jobs, "jobs", runtime.NumCPU(), "ngspice runs at once, `N`")
	fs.BoolVar(&s.noCache, "no-cache", false, "simulate again instead of reading results cached under the user's cache directory (swrank/)")
	fs.BoolVar(&s.keep, "keep", false, "keep every scratch deck and print where (a failed run's deck is always kept)")
}

// runner returns the ngspice runner the flags ask for.
func (s *simFlags) runner() (*spice.Runner, error) {
	r, err := spice.NewRunner(s.ngspice, s.timeout)
	if err != nil {
		return nil, err
	}
	r.Keep, r.KeepFailed = s.keep, true
	return r, nil
}

// cache returns the result cache, or nil with --no-cache or --keep (a
// kept deck is one that was run).
func (s *simFlags) cache(stderr io.Writer) *spice.Cache {
	if s.noCache || s.keep {
		return nil
	}
	dir, err := spice.DefaultCacheDir()
	if err != nil {
		fmt.Fprintf(stderr, "swrank: no result cache: %v\n", err)
		return nil
	}
	return &spice.Cache{Dir: dir}
}

// simProgress returns a callback for verify.Options.Progress that draws
// a progress bar on stderr (progress) when stderr is a terminal, else nil.
// The callback is called with the parts done so far, one call at a time.
func simProgress(stderr io.Writer, what string) func(done, total int) {
	if f, ok := stderr.(*os.File); !ok || !term.IsTerminal(int(f.Fd())) {
		return nil
	}
	var bar *progress
	last := 0
	return func(done, total int) {
		if bar == nil {
			bar = newProgress(stderr, total, what)
		}
		bar.add(done - last)
		last = done
		if done >= total {
			bar.finish()
		}
	}
}

func runVerify(args []string, stdin io.Reader, stdout, stderr io.Writer) error {
	var in inputs
	var dec design.Decisions
	var sf simFlags
	var demoModels string
	fs := newFlagSet("verify", verifySynopsis, stderr)
	in.register(fs)
	in.registerOutput(fs)
	registerDecisions(fs, &dec)
	sf.register(fs)
	fs.StringVar(&demoModels, "demo-models", "", "`DIR` holding the demo library's model files (--demo; default: the copies built into swrank)")
	top := fs.Lookup("top")
	top.Usage, top.DefValue = "verify the best `N` parts that have a model", fmt.Sprint(verify.DefaultTop)
	in.top = verify.DefaultTop
	if err := parse(fs, args); err != nil {
		return err
	}
	if fs.NArg() > 0 {
		return fmt.Errorf("unexpected arguments %q (flags come as --name value)", fs.Args())
	}
	if err := applyDesign(fs, &in, &dec); err != nil {
		return err
	}
	if dec.OwnPath() {
		return errors.New("verify simulates one operating point with one device in each place: no --weighting, --parallel or several design points")
	}
	if in.top <= 0 {
		return usagef("--top must be at least 1")
	}
	r, err := sf.runner()
	if err != nil {
		return err
	}
	plan, devs, lib, err := preparePlan(&in, &dec, stdin, stderr)
	if err != nil {
		return err
	}
	warnSetAside(stderr, lib.source, lib.aside)
	pt, partner := plan.Point, plan.Partner
	base := demoModels
	if in.demo && base == "" {
		dir, err := os.MkdirTemp("", "swrank-demo-models-")
		if err != nil {
			return fmt.Errorf("demo models: %w", err)
		}
		defer os.RemoveAll(dir)
		if err := os.CopyFS(dir, devices.DemoModels()); err != nil {
			return fmt.Errorf("demo models: %w", err)
		}
		base = dir
	}
	if !in.demo {
		if len(in.parts) != 1 || in.parts[0] == "-" {
			return usagef("verify reads its models beside one library file: give --parts FILE.csv once")
		}
		base = filepath.Dir(in.parts[0])
	}
	res := rank.Rank(pt, devs, partner, rank.Options{})
	rep, err := verify.Run(context.Background(), pt, res, verify.Options{Top: in.top, Jobs: sf.jobs, Runner: r, Base: base,
		Sim: spice.SimOptions{Cache: sf.cache(stderr)}, Progress: simProgress(stderr, "verify")})
	if err != nil {
		return err
	}
	v := report.Verification{Result: rep, Source: lib.source, Parts: len(devs) + len(lib.aside)}
	if err := writeReport(stdout, v.Report(), &in); err != nil {
		return err
	}
	failed := 0
	for _, p := range rep.Parts {
		if p.Err != nil {
			failed++
		}
	}
	if failed > 0 {
		return &exitError{code: 1, err: fmt.Errorf("%d of %d parts could not be simulated (see above)", failed, len(rep.Parts))}
	}
	return nil
}
