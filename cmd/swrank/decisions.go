package main

import (
	"errors"
	"fmt"
	"io"

	"swrank/rank"
	"swrank/rank/decide"
	"swrank/rank/design"
	"swrank/rank/fit"
	"swrank/rank/report"
	"swrank/rank/stage"
)

// runRankDecisions is rank with several points, paralleling or valley
// switching.
func runRankDecisions(in *inputs, dec *design.Decisions, stdin io.Reader, stdout, stderr io.Writer) error {
	plan, devs, lib, err := preparePlan(in, dec, stdin, stderr)
	if err != nil {
		return err
	}
	counts, auto, err := dec.ParallelCounts()
	if err != nil {
		return err
	}
	cs := decide.EvaluateAll(plan, devs, counts, auto)
	decide.AddWorst(plan, cs)
	dr := report.Decisions{Plan: plan, Candidates: cs, SetAside: lib.aside, Source: lib.source, Parts: len(devs) + len(lib.aside),
		All: in.all, Top: in.top, Parallel: len(counts) > 1, Auto: auto, Counts: counts}
	if err := writeReport(stdout, dr.Report(), in); err != nil {
		return err
	}
	for i := range cs {
		if !cs[i].Screened() {
			return nil
		}
	}
	return errNoPass
}

// libInfo is what preparePlan loaded.
type libInfo struct {
	source string
	aside  []rank.SetAside // the parts that could not be prepared
}

// preparePlan resolves the stage (one point or a profile) and loads the
// library.
func preparePlan(in *inputs, dec *design.Decisions, stdin io.Reader, stderr io.Writer) (*decide.Plan, []fit.Device, libInfo, error) {
	if err := checkFormat(in.format); err != nil {
		return nil, nil, libInfo{}, err
	}
	pt, err := in.stage.ResolveLight(dec.LightLoad())
	if err != nil {
		return nil, nil, libInfo{}, fmt.Errorf("operating point: %w", err)
	}
	plan := &decide.Plan{Point: &pt}
	if plan.Profile, err = dec.Profile(in.stage); err != nil {
		return nil, nil, libInfo{}, err
	}
	lib, devs, aside, err := loadLibrary(in, stdin, stderr)
	if err != nil {
		return nil, nil, libInfo{}, err
	}
	if in.partner != "" {
		if !pt.HasSync || pt.Stage.Topology == stage.ClassD {
			return nil, nil, libInfo{}, errors.New("--partner needs a synchronous buck or boost stage (class D ranks the part in both places)")
		}
		if plan.Partner, err = findDevice(devs, aside, in.partner); err != nil {
			return nil, nil, libInfo{}, fmt.Errorf("--partner: %w", err)
		}
	}
	return plan, devs, libInfo{source: lib.Source, aside: aside}, nil
}
