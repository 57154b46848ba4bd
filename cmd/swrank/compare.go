package main

import (
	"errors"
	"fmt"
	"io"
	"slices"

	"swrank/rank"
	"swrank/rank/decide"
	"swrank/rank/design"
	"swrank/rank/evaluate"
	"swrank/rank/fit"
	"swrank/rank/report"
)

const compareSynopsis = `compare --fitted PART [CANDIDATE ...] [--parts FILE.csv ... | --demo | --design FILE.toml] [stage, driver, thermal and output flags as for rank]`

// runCompare judges candidates against the part already fitted.
func runCompare(args []string, stdin io.Reader, stdout, stderr io.Writer) error {
	var in inputs
	var dec design.Decisions
	var fitted string
	fs := newFlagSet("compare", compareSynopsis, stdout)
	in.register(fs)
	in.registerOutput(fs)
	registerDecisions(fs, &dec)
	fs.StringVar(&fitted, "fitted", "", "the `PART` already fitted, which every candidate is judged against (required)")
	if err := parse(fs, args); err != nil {
		return err
	}
	if err := applyDesign(fs, &in, &dec); err != nil {
		return err
	}
	if fitted == "" {
		return usagef("compare needs --fitted PART")
	}
	if dec.Multi() {
		return errors.New("compare works at one operating point: drop --weighting or the design's [[point]] tables (rank ranks over a profile)")
	}
	if dec.Paralleled() {
		return errors.New("compare judges single devices: drop --parallel (rank --parallel shows paralleled parts)")
	}
	plan, devs, lib, err := preparePlan(&in, &dec, stdin, stderr)
	if err != nil {
		return err
	}
	warnSetAside(stderr, lib.source, lib.aside)
	fd, err := findDevice(devs, lib.aside, fitted)
	if err != nil {
		return fmt.Errorf("--fitted: %w", err)
	}
	var cands []*fit.Device
	if fs.NArg() == 0 {
		for i := range devs {
			if &devs[i] != fd {
				cands = append(cands, &devs[i])
			}
		}
	} else {
		for _, name := range fs.Args() {
			d, err := findDevice(devs, lib.aside, name)
			if err != nil {
				return err
			}
			if !slices.Contains(cands, d) {
				cands = append(cands, d)
			}
		}
	}
	fr := evaluate.Evaluate(plan.Point, fd, plan.Partner, nil)
	res := make([]evaluate.Result, len(cands))
	for i, d := range cands {
		res[i] = evaluate.Evaluate(plan.Point, d, plan.Partner, nil)
	}
	slices.SortStableFunc(res, rank.Compare)
	cr := report.Comparison{Point: plan.Point, Source: lib.source, Parts: len(devs) + len(lib.aside), Fitted: fr}
	pout := plan.Point.Stage.Pout
	for i := range res {
		if in.top > 0 && i == in.top {
			break
		}
		cr.Candidates = append(cr.Candidates, decide.CompareParts(&cr.Fitted, &res[i], pout))
	}
	if err := writeReport(stdout, cr.Report(), &in); err != nil {
		return err
	}
	if cr.Fitted.Screened() && !slices.ContainsFunc(res, func(r evaluate.Result) bool { return !r.Screened() }) {
		return errNoPass
	}
	return nil
}
