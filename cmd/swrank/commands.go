package main

import (
	"bufio"
	"bytes"
	"cmp"
	"errors"
	"fmt"
	"io"
	"os"
	"slices"

	"swrank/devices"
	"swrank/rank"
	"swrank/rank/decide"
	"swrank/rank/design"
	"swrank/rank/evaluate"
	"swrank/rank/fit"
	"swrank/rank/report"
	"swrank/rank/stage"
)

const rankSynopsis = `rank [--parts FILE.csv | --demo] [--topology buck|boost|custom] [stage flags] --vdrive V [driver, thermal and output flags]`

// prepared is the shared inputs resolved: the operating point and the
// library read and prepared.
type prepared struct {
	pt      *stage.Point
	devs    []fit.Device
	partner *fit.Device // --partner, or nil
	lib     *devices.Library
	aside   []rank.SetAside // the parts that could not be prepared
}

// prepare parses the shared inputs and resolves the operating point.
func prepare(in *inputs, stderr io.Writer) (*prepared, error) {
	if err := report.CheckFormat(in.format); err != nil {
		return nil, err
	}
	pt, err := in.stage.Resolve()
	if err != nil {
		return nil, fmt.Errorf("operating point: %w", err)
	}
	lib, devs, aside, err := loadLibrary(in, stderr)
	if err != nil {
		return nil, err
	}
	var partner *fit.Device
	if in.partner != "" {
		if !pt.HasSync || pt.Stage.Topology == stage.ClassD {
			return nil, errors.New("--partner needs a synchronous buck or boost stage (class D ranks the part in both places)")
		}
		if partner, err = findDevice(devs, aside, in.partner); err != nil {
			return nil, fmt.Errorf("--partner: %w", err)
		}
	}
	return &prepared{pt: &pt, devs: devs, partner: partner, lib: lib, aside: aside}, nil
}

func runRank(args []string, stdout, stderr io.Writer) error {
	var in inputs
	var dec design.Decisions // design file, profiles, paralleling
	fs := newFlagSet("rank", rankSynopsis, stderr)
	in.register(fs)
	in.registerOutput(fs)
	registerDecisions(fs, &dec)
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
		return runRankDecisions(&in, &dec, stdout, stderr)
	}
	if in.partner != "" {
		p, err := prepare(&in, stderr)
		if err != nil {
			return err
		}
		res := rank.Rank(p.pt, p.devs, p.partner, rank.Options{})
		rep := report.Ranking{Point: p.pt, Source: p.lib.Source, Parts: len(p.lib.Parts), Results: res, SetAside: p.aside, All: in.all, Top: in.top}
		return writeRanking(stdout, in.format, &rep, p.partner)
	}
	rep, err := rankStream(&in, stderr)
	if err != nil {
		return err
	}
	return writeRanking(stdout, in.format, &rep, nil)
}

// writeRanking writes a plain ranking with the worst case of its leaders
// and the price-loss front, when the library gives maximum values or
// prices.
func writeRanking(w io.Writer, format string, rep *report.Ranking, partner *fit.Device) error {
	return rep.WriteWithLeaders(w, format, decide.Leaders(rep.Point, partner, rep.Shown()))
}

// rankStream ranks a library without holding it: each part is read,
// prepared, evaluated and offered to a rank.Best that keeps the leaders.
func rankStream(in *inputs, stderr io.Writer) (report.Ranking, error) {
	if err := report.CheckFormat(in.format); err != nil {
		return report.Ranking{}, err
	}
	pt, err := in.stage.Resolve()
	if err != nil {
		return report.Ranking{}, fmt.Errorf("operating point: %w", err)
	}
	switch {
	case in.demo && in.parts != "":
		return report.Ranking{}, errors.New("give --parts or --demo, not both")
	case in.demo:
		return rankReader(in, &pt, bytes.NewReader(devices.DemoCSV()), "demo", stderr)
	case in.parts != "":
		f, err := os.Open(in.parts)
		if err != nil {
			return report.Ranking{}, err
		}
		defer f.Close()
		return rankReader(in, &pt, bufio.NewReaderSize(f, 1<<16), in.parts, stderr)
	}
	return report.Ranking{}, errors.New("no parts library: give --parts FILE.csv or --demo")
}

// rankReader ranks the library read from r at pt.
func rankReader(in *inputs, pt *stage.Point, r io.Reader, name string, stderr io.Writer) (report.Ranking, error) {
	best := rank.Best{N: in.top}
	var aside []rank.SetAside
	hdr, probs := in.read.Scan(r, name, func(p *devices.Part) error {
		d, err := fit.Prepare(p)
		if err != nil {
			// This part costs only itself.
			aside = append(aside, rank.SetAside{Part: p.Name, Line: p.Line, Reason: err.Error()})
			return nil
		}
		res := evaluate.Evaluate(pt, &d, nil, nil)
		best.Offer(&res)
		return nil
	})
	if probs.Fatal() {
		return report.Ranking{}, probs.Fatals()
	}
	noteDialect(stderr, hdr.Source, hdr.Dialect)
	for _, w := range probs.Warnings() {
		fmt.Fprintf(stderr, "swrank: %v\n", w)
	}
	return report.Ranking{Point: pt, Source: hdr.Source, Parts: best.Passed + best.Screened + len(aside), Results: best.Results(), SetAside: aside,
		Screened: best.Screened, All: in.all, Top: in.top}, nil
}

func runExplain(args []string, stdout, stderr io.Writer) error {
	var in inputs
	fs := newFlagSet("explain", "explain [same flags as rank] PART", stderr)
	in.register(fs)
	fs.StringVar(&in.format, "format", report.DefaultFormat, "output `FORMAT`: table (text) or json")
	if err := parse(fs, args); err != nil {
		return err
	}
	if fs.NArg() != 1 {
		fs.Usage()
		return fmt.Errorf("%w: explain takes one part name", errUsage)
	}
	if in.format == "csv" || in.format == "markdown" {
		return fmt.Errorf("explain prints table (text) or json, not %s", in.format)
	}
	p, err := prepare(&in, stderr)
	if err != nil {
		return err
	}
	dev, err := findDevice(p.devs, p.aside, fs.Arg(0))
	if err != nil {
		return err
	}
	var tr evaluate.Trace
	r := evaluate.Evaluate(p.pt, dev, p.partner, &tr)
	return report.WriteExplain(stdout, in.format, p.pt, &r, &tr)
}

func runCheck(args []string, stdout, stderr io.Writer) error {
	fs := newFlagSet("check", "check [--notes-columns] FILE.csv ...", stderr)
	var opts devices.ReadOptions
	fs.BoolVar(&opts.UnknownAsNotes, "notes-columns", false, "accept columns swrank does not know as your own notes (default: an error naming the closest known column)")
	if err := parse(fs, args); err != nil {
		return err
	}
	if fs.NArg() == 0 {
		fs.Usage()
		return fmt.Errorf("%w: check takes one or more files", errUsage)
	}
	fatal := 0
	for _, path := range fs.Args() {
		f, err := os.Open(path)
		if err != nil {
			return err
		}
		lib, probs := opts.Check(f, path)
		f.Close()
		noteDialect(stderr, path, lib.Dialect)
		probs = append(probs, setAsideProblems(path, lib)...)
		slices.SortStableFunc(probs, func(a, b *devices.Problem) int { return cmp.Compare(a.Line, b.Line) })
		if err := report.WriteCheck(stdout, path, lib, probs); err != nil {
			return err
		}
		fatal += len(probs.Fatals())
	}
	if fatal > 0 {
		return &exitError{code: 1, err: fmt.Errorf("%d fatal problems", fatal)}
	}
	return nil
}
