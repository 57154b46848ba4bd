package decide

import (
	"strings"
	"testing"

	q "swrank/devices/quantity"
	"swrank/rank/fit"
	"swrank/rank/internal/testkit"
	"swrank/rank/stage"
)

// TestSetAsideCostsOnlyItself checks that a part whose paralleled or
// worst-case copy cannot be prepared costs only that copy: the other
// parts are evaluated and ranked, the part keeps its place where it still
// has one, and each copy refused carries its reason.
func TestSetAsideCostsOnlyItself(t *testing.T) {
	good := testkit.CaseDPart()
	good.Name = "GOOD"
	dg, err := fit.Prepare(&good)
	if err != nil {
		t.Fatal(err)
	}
	// BAD is fitted from good values, then its part row changed so that any
	// copy made from the row (paralleled, worst case) cannot be fitted.
	badRow := good
	badRow.Name = "BAD"
	db, err := fit.Prepare(&badRow)
	if err != nil {
		t.Fatal(err)
	}
	broken := badRow
	broken.RdsOnVgs = broken.VgsTh // rds_on_vgs must exceed vgs_th
	broken.VgsThMax = q.Some(broken.VgsTh + 1)
	db.Part = &broken
	st := stage.Stage{Topology: stage.Custom, Vblock: 100, Irms: 20, Fsw: 200e3, Driver: stage.Driver{VOn: 10},
		TjFixed: q.Some[q.Temperature](25)}
	pt, err := st.Resolve()
	if err != nil {
		t.Fatal(err)
	}
	plan := &Plan{Point: &pt}
	for _, c := range []struct {
		name        string
		counts      []int
		auto        bool
		badAside    bool // BAD is set aside
		unprepared  int  // counts of BAD refused
		goodChosenN int
	}{
		{"one device", []int{1}, false, false, 0, 1},
		{"auto", []int{1, 2, 3}, true, false, 2, 2},
		{"three asked for", []int{1, 3}, false, true, 1, 3},
	} {
		devs := []fit.Device{db, dg}
		cs := EvaluateAll(plan, devs, c.counts, c.auto)
		AddWorst(plan, cs)
		if len(cs) != 2 {
			t.Fatalf("%s: %d candidates", c.name, len(cs))
		}
		var bad, gd *Candidate
		for i := range cs {
			if cs[i].Base.Part.Name == "BAD" {
				bad = &cs[i]
			} else {
				gd = &cs[i]
			}
		}
		if gd.Screened() || gd.N != c.goodChosenN || gd.NotEvaluated != "" || len(gd.Unprepared) != 0 || &cs[0] != gd && c.badAside {
			t.Errorf("%s: GOOD %+v", c.name, gd)
		}
		if bad.Screened() != c.badAside || len(bad.Unprepared) != c.unprepared {
			t.Errorf("%s: BAD screened %v, unprepared %q", c.name, bad.Screened(), bad.Unprepared)
		}
		for _, u := range bad.Unprepared {
			if !strings.Contains(u, "in parallel: ") || !strings.Contains(u, "rds_on_vgs must exceed vgs_th") {
				t.Errorf("%s: reason %q", c.name, u)
			}
		}
		if !c.badAside && (bad.Worst != nil || !strings.Contains(bad.WorstReason, "rds_on_vgs must exceed vgs_th")) {
			t.Errorf("%s: BAD worst case %v, reason %q", c.name, bad.Worst, bad.WorstReason)
		}
		if len(bad.Tried)+len(bad.Unprepared) != len(c.counts) {
			t.Errorf("%s: tried %v, unprepared %q", c.name, bad.Tried, bad.Unprepared)
		}
	}
	if cs := Leaders(&pt, nil, nil); cs != nil {
		t.Errorf("leaders of nothing: %v", cs)
	}
}
