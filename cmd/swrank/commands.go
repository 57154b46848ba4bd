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

const rankSynopsis = `rank [--parts FILE.csv ... | --demo | --design FILE.toml] [--topology buck|boost|custom] [stage flags] --vdrive V [driver, thermal and output flags]`

// checkSources checks the library flags: --demo or one or more --parts,
// standard input ("-") at most once.
func (in *inputs) checkSources() error {
	switch {
	case in.demo && len(in.parts) > 0:
		return usagef("give --parts or --demo, not both")
	case !in.demo && len(in.parts) == 0:
		return usagef("no parts library: give --parts FILE.csv or --demo")
	}
	for i, p := range in.parts {
		if slices.Contains(in.parts[:i], p) {
			if p == "-" {
				return usagef("--parts - given twice: standard input can be read once")
			}
			return usagef("--parts %s given twice", p)
		}
	}
	return nil
}

// openParts opens one --parts source: the file at path, or standard input
// for "-" (named "stdin" in messages). The caller closes it.
func openParts(path string, stdin io.Reader) (io.ReadCloser, string, error) {
	if path == "-" {
		return io.NopCloser(stdin), "stdin", nil
	}
	f, err := os.Open(path)
	if err != nil {
		return nil, "", fmt.Errorf("parts library: %w", err)
	}
	return f, path, nil
}

// readLibrary reads the parts library the flags name: the demo, or every
// --parts source merged (a part name held by two of them is an error
// naming both).
// The dialect of each source other than plain CSV is named on stderr.
func readLibrary(in *inputs, stdin io.Reader, stderr io.Writer) (*devices.Library, error) {
	if err := in.checkSources(); err != nil {
		return nil, err
	}
	if in.demo {
		return devices.Demo()
	}
	libs := make([]*devices.Library, 0, len(in.parts))
	for _, path := range in.parts {
		r, name, err := openParts(path, stdin)
		if err != nil {
			return nil, err
		}
		lib, err := in.read.Read(r, name)
		r.Close()
		if err != nil {
			return nil, err
		}
		noteDialect(stderr, lib.Source, lib.Dialect)
		libs = append(libs, lib)
	}
	return devices.Merge(libs...)
}

func runRank(args []string, stdin io.Reader, stdout, stderr io.Writer) error {
	var in inputs
	var dec design.Decisions // design file, profiles, paralleling
	fs := newFlagSet("rank", rankSynopsis, stdout)
	in.register(fs)
	in.registerOutput(fs)
	registerDecisions(fs, &dec)
	if err := parse(fs, args); err != nil {
		return err
	}
	if fs.NArg() > 0 {
		return usagef("rank takes no arguments, got %q (flags come as --name value)", fs.Args())
	}
	if err := applyDesign(fs, &in, &dec); err != nil {
		return err
	}
	if dec.OwnPath() {
		return runRankDecisions(&in, &dec, stdin, stdout, stderr)
	}
	if in.partner != "" {
		plan, devs, lib, err := preparePlan(&in, &dec, stdin, stderr)
		if err != nil {
			return err
		}
		res := rank.Rank(plan.Point, devs, plan.Partner, rank.Options{})
		rep := report.Ranking{Point: plan.Point, Source: lib.source, Parts: len(devs) + len(lib.aside), Results: res, SetAside: lib.aside,
			All: in.all, Top: in.top}
		if err := writeRanking(stdout, &in, &rep, plan.Partner); err != nil {
			return err
		}
		if len(res) == 0 || res[0].Screened() { // passing parts rank first
			return errNoPass
		}
		return nil
	}
	rep, err := rankStream(&in, stdin, stderr)
	if err != nil {
		return err
	}
	if err := writeRanking(stdout, &in, &rep, nil); err != nil {
		return err
	}
	if rep.Parts-len(rep.SetAside) == rep.Screened { // none passed
		return errNoPass
	}
	return nil
}

// writeRanking writes a plain ranking with the worst case of its leaders
// and the price-loss front, when the library gives maximum values or
// prices.
func writeRanking(w io.Writer, in *inputs, rep *report.Ranking, partner *fit.Device) error {
	pass := rep.Passing()
	if in.top > 0 && len(pass) > in.top {
		pass = pass[:in.top]
	}
	rep.Leaders = decide.Leaders(rep.Point, partner, pass)
	return writeReport(w, rep.Report(), in)
}

// rankStream ranks a library without holding it: each part is read,
// prepared, evaluated and offered to a rank.Best that keeps the leaders.
// Several --parts sources are read in turn into the same ranking.
func rankStream(in *inputs, stdin io.Reader, stderr io.Writer) (report.Ranking, error) {
	if err := checkFormat(in.format); err != nil {
		return report.Ranking{}, err
	}
	if err := in.checkSources(); err != nil {
		return report.Ranking{}, err
	}
	pt, err := in.stage.Resolve()
	if err != nil {
		return report.Ranking{}, fmt.Errorf("operating point: %w", err)
	}
	best := rank.Best{N: in.top}
	var aside []rank.SetAside
	if in.demo {
		src, err := rankReader(in, &pt, bytes.NewReader(devices.DemoCSV()), "demo", &best, &aside, nil, stderr)
		return rankingOf(in, &pt, &best, aside, src), err
	}
	var names *devices.PartNames
	if len(in.parts) > 1 {
		names = new(devices.PartNames)
	}
	var sources []string
	for _, path := range in.parts {
		r, name, err := openParts(path, stdin)
		if err != nil {
			return report.Ranking{}, err
		}
		src, err := rankReader(in, &pt, bufio.NewReaderSize(r, 1<<16), name, &best, &aside, names, stderr)
		r.Close()
		if err != nil {
			return report.Ranking{}, err
		}
		sources = append(sources, src)
	}
	return rankingOf(in, &pt, &best, aside, strings.Join(sources, ", ")), nil
}

// rankingOf is the report of the ranking best holds, with the parts set
// aside before they could be evaluated.
func rankingOf(in *inputs, pt *stage.Point, best *rank.Best, aside []rank.SetAside, source string) report.Ranking {
	return report.Ranking{Point: pt, Source: source, Parts: best.Passed + best.Screened + len(aside), Results: best.Results(),
		SetAside: aside, Screened: best.Screened, All: in.all, Top: in.top}
}

// rankReader ranks the library read from r at pt into best and returns
// its source name; a part that cannot be prepared is added to aside and
// costs only itself. With names, a part name another source held is an
// error.
func rankReader(in *inputs, pt *stage.Point, r io.Reader, name string, best *rank.Best, aside *[]rank.SetAside, names *devices.PartNames, stderr io.Writer) (string, error) {
	st := rank.NewStream(pt, nil, best, rank.Options{})
	hdr, probs := in.read.Scan(r, name, func(p *devices.Part) error {
		if names != nil {
			if err := names.Add(p.Name, name); err != nil {
				return err
			}
		}
		st.Add(p)
		return nil
	})
	*aside = append(*aside, st.Close()...)
	if probs.Fatal() {
		return "", probs.Fatals()
	}
	noteDialect(stderr, hdr.Source, hdr.Dialect)
	for _, w := range probs.Warnings() {
		fmt.Fprintf(stderr, "swrank: %v\n", w)
	}
	return hdr.Source, nil
}

const explainSynopsis = `explain PART [every flag of rank: --parts FILE.csv | --demo | --design FILE.toml, stage, driver, thermal flags] [--format table|json]`

func runExplain(args []string, stdin io.Reader, stdout, stderr io.Writer) error {
	var in inputs
	var dec design.Decisions
	fs := newFlagSet("explain", explainSynopsis, stdout)
	in.register(fs)
	in.registerOutput(fs)
	fs.Lookup("format").Usage = "output `FORMAT`: table (text) or json"
	registerDecisions(fs, &dec)
	if err := parse(fs, args); err != nil {
		return err
	}
	if fs.NArg() != 1 {
		return usagef("explain takes one part name, got %d", fs.NArg())
	}
	if in.format == "csv" || in.format == "markdown" {
		return fmt.Errorf("explain prints table (text) or json, not %s", in.format)
	}
	if err := applyDesign(fs, &in, &dec); err != nil {
		return err
	}
	if dec.Multi() {
		return errors.New("explain works at one operating point: drop --weighting or the design's [[point]] tables (rank ranks over a profile)")
	}
	counts, auto, err := dec.ParallelCounts()
	if err != nil {
		return err
	}
	if auto {
		return errors.New("explain takes --parallel N, not auto (rank --parallel auto finds the count; explain it with --parallel N)")
	}
	plan, devs, lib, err := preparePlan(&in, &dec, stdin, stderr)
	if err != nil {
		return err
	}
	dev, err := findDevice(devs, lib.aside, fs.Arg(0))
	if err != nil {
		return err
	}
	if n := counts[len(counts)-1]; n > 1 {
		dn, err := decide.Parallel(dev, n)
		if err != nil {
			return err
		}
		dev = &dn
	}
	var tr evaluate.Trace
	r := evaluate.Evaluate(plan.Point, dev, plan.Partner, &tr)
	if err := writeReport(stdout, report.Explain(plan.Point, &r, &tr), &in); err != nil {
		return err
	}
	if r.Screened() {
		return errNoPass
	}
	return nil
}

func runCheck(args []string, stdin io.Reader, stdout, stderr io.Writer) error {
	fs := newFlagSet("check", "check [--notes-columns] FILE.csv ... (\"-\": standard input)", stdout)
	var opts devices.ReadOptions
	fs.BoolVar(&opts.UnknownAsNotes, "notes-columns", false, "accept columns swrank does not know as your own notes (default: an error naming the closest known column)")
	if err := parse(fs, args); err != nil {
		return err
	}
	if fs.NArg() == 0 {
		return usagef("check takes one or more files")
	}
	fatal := 0
	for _, path := range fs.Args() {
		r, name, err := openParts(path, stdin)
		if err != nil {
			return err
		}
		lib, probs := opts.Check(r, name)
		r.Close()
		if lib != nil {
			noteDialect(stderr, name, lib.Dialect)
		}
		probs = append(probs, setAsideProblems(name, lib)...)
		slices.SortStableFunc(probs, func(a, b *devices.Problem) int { return cmp.Compare(a.Line, b.Line) })
		if err := writeReport(stdout, report.Check(name, lib, probs), &inputs{format: defaultFormat}); err != nil {
			return err
		}
		fatal += len(probs.Fatals())
	}
	if fatal > 0 {
		return &exitError{code: 1, err: fmt.Errorf("%d fatal problems", fatal)}
	}
	return nil
}
