package main

import (
	"bufio"
	"bytes"
	"errors"
	"fmt"
	"io"
	"os"
	"strings"

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

// loadLibrary reads the parts library named by the flags and prepares
// every part for evaluation. Warnings go to stderr.
func loadLibrary(in *inputs, stderr io.Writer) (*devices.Library, []fit.Device, error) {
	var lib *devices.Library
	var err error
	switch {
	case in.demo && in.parts != "":
		return nil, nil, errors.New("give --parts or --demo, not both")
	case in.demo:
		lib, err = devices.Demo()
	case in.parts != "":
		lib, err = in.read.Load(in.parts)
	default:
		return nil, nil, errors.New("no parts library: give --parts FILE.csv or --demo")
	}
	if err != nil {
		return nil, nil, err
	}
	noteDialect(stderr, lib.Source, lib.Dialect)
	for _, w := range lib.Warnings {
		fmt.Fprintf(stderr, "swrank: %v\n", w)
	}
	devs := make([]fit.Device, len(lib.Parts))
	for i := range lib.Parts {
		d, err := fit.Prepare(&lib.Parts[i])
		if err != nil {
			return nil, nil, fmt.Errorf("%s: %w", lib.Source, err)
		}
		devs[i] = d
	}
	return lib, devs, nil
}

// findDevice returns the device named name (case-insensitive).
func findDevice(devs []fit.Device, name string) (*fit.Device, error) {
	for i := range devs {
		if strings.EqualFold(devs[i].Part.Name, name) {
			return &devs[i], nil
		}
	}
	return nil, fmt.Errorf("no part named %q in the library", name)
}

// prepare parses the shared inputs and resolves the operating point.
func prepare(in *inputs, stderr io.Writer) (*stage.Point, []fit.Device, *fit.Device, *devices.Library, error) {
	if err := report.CheckFormat(in.format); err != nil {
		return nil, nil, nil, nil, err
	}
	pt, err := in.stage.Resolve()
	if err != nil {
		return nil, nil, nil, nil, fmt.Errorf("operating point: %w", err)
	}
	lib, devs, err := loadLibrary(in, stderr)
	if err != nil {
		return nil, nil, nil, nil, err
	}
	var partner *fit.Device
	if in.partner != "" {
		if !pt.HasSync || pt.Stage.Topology == stage.ClassD {
			return nil, nil, nil, nil, errors.New("--partner needs a synchronous buck or boost stage (class D ranks the part in both places)")
		}
		if partner, err = findDevice(devs, in.partner); err != nil {
			return nil, nil, nil, nil, fmt.Errorf("--partner: %w", err)
		}
	}
	return &pt, devs, partner, lib, nil
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
		pt, devs, partner, lib, err := prepare(&in, stderr)
		if err != nil {
			return err
		}
		res := rank.Rank(pt, devs, partner, rank.Options{})
		rep := report.Ranking{Point: pt, Source: lib.Source, Parts: len(lib.Parts), Results: res, All: in.all, Top: in.top}
		return writeRanking(stdout, in.format, &rep, partner)
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
	cs, err := decide.Leaders(rep.Point, partner, rep.Shown())
	if err != nil {
		return err
	}
	return rep.WriteWithLeaders(w, format, cs)
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
	hdr, probs := in.read.Scan(r, name, func(p *devices.Part) error {
		d, err := fit.Prepare(p)
		if err != nil {
			return err
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
	return report.Ranking{Point: pt, Source: hdr.Source, Parts: best.Passed + best.Screened, Results: best.Results(),
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
	pt, devs, partner, _, err := prepare(&in, stderr)
	if err != nil {
		return err
	}
	dev, err := findDevice(devs, fs.Arg(0))
	if err != nil {
		return err
	}
	var tr evaluate.Trace
	r := evaluate.Evaluate(pt, dev, partner, &tr)
	return report.WriteExplain(stdout, in.format, pt, &r, &tr)
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

// noteDialect says on stderr, in one line, which dialect a library was
// read in when it is not plain comma-separated CSV.
func noteDialect(stderr io.Writer, source string, d devices.Dialect) {
	if !d.Plain() {
		fmt.Fprintf(stderr, "swrank: %s: read as %s\n", devices.Printable(source), d)
	}
}
