package decide

import (
	"slices"
	"strings"
	"testing"

	"swrank/devices"
	q "swrank/devices/quantity"
	"swrank/rank/evaluate"
	"swrank/rank/fit"
	"swrank/rank/internal/testkit"
	"swrank/rank/stage"
)

func TestWorstCasePart(t *testing.T) {
	p := testkit.LightPart()
	if _, ok := WorstCasePart(&p); ok {
		t.Error("a part without maximum values has a worst case")
	}
	p.RdsOnMax = q.Some[q.Resistance](6e-3)
	p.RdsOn2, p.RdsOn2Vgs = q.Some[q.Resistance](7e-3), q.Some[q.Voltage](4.5)
	p.QgMax = q.Some[q.Charge](10e-9)
	p.VgsThMax = q.Some[q.Voltage](2.3)
	w, ok := WorstCasePart(&p)
	if !ok {
		t.Fatal("no worst case")
	}
	testkit.Within(t, "rds_on", float64(w.RdsOn), 6e-3, 1e-12)
	testkit.Within(t, "rds_on2 scaled", float64(w.RdsOn2.V), 7e-3*1.2, 1e-12)
	testkit.Within(t, "qg", float64(w.Qg), 10e-9, 1e-12)
	testkit.Within(t, "qgd scaled", float64(w.Qgd.V), 2.5e-9, 1e-12)
	testkit.Within(t, "vgs_th", float64(w.VgsTh), 2.3, 1e-12)
	testkit.Within(t, "plateau moved", float64(w.VPlateau.V), 3.0, 1e-12)
	if w.Name != p.Name || p.RdsOn != 5e-3 {
		t.Error("the copy changed the name or the original")
	}
}

// Worst-case values through Evaluate at a synchronous buck's control
// switch, 12 V, 10 A, 500 kHz, D 0.1 (hand calculation; the part pinned at
// 25 °C with no ripple): conduction
// I_rms²·R scales with R (0.0500 W at 5 mΩ → 0.0600 W at 6 mΩ) and the
// gate drive P_G = Qg·V·f with Qg (8 nC: 20.00 mW → 10 nC: 25.00 mW;
// Erickson & Maksimović 2001, ch. 4; Balogh 2001).
func TestWorstCaseEvaluate(t *testing.T) {
	p := testkit.LightPart()
	p.RdsOnMax = q.Some[q.Resistance](6e-3)
	p.QgMax = q.Some[q.Charge](10e-9)
	d, err := fit.Prepare(&p)
	if err != nil {
		t.Fatal(err)
	}
	w, ok, err := WorstCase(&d)
	if err != nil || !ok {
		t.Fatalf("WorstCase: %v, %v", ok, err)
	}
	st := stage.Stage{Topology: stage.Buck, Vin: 12, Vout: 1.2, Iout: 10, Fsw: 500e3, Ripple: q.Some[q.Ratio](0),
		DeadTime: q.Some[q.Time](20e-9), Driver: stage.Driver{VOn: 5, RSource: 2, RSink: 1}, TjFixed: q.Some[q.Temperature](25)}
	pt, err := st.Resolve()
	if err != nil {
		t.Fatal(err)
	}
	typ := evaluate.Evaluate(&pt, &d, nil, nil).Devices[0].Losses
	worst := evaluate.Evaluate(&pt, &w, nil, nil).Devices[0].Losses
	testkit.Within(t, "typical conduction", float64(typ.Conduction), 0.05, 1e-9)
	testkit.Within(t, "worst conduction", float64(worst.Conduction), 0.06, 1e-9)
	gate := func(l evaluate.Losses) float64 { return float64(l.GateDriver + l.GateRext + l.GateRint) }
	testkit.Within(t, "typical gate", gate(typ), 20e-3, 1e-9)
	testkit.Within(t, "worst gate", gate(worst), 25e-3, 1e-9)
}

func TestSpreadOf(t *testing.T) {
	s := SpreadOf(1.0, 1.1, 1.3, 1.4)
	testkit.Within(t, "lead", float64(s.Lead), 0.3, 1e-12)
	testkit.Within(t, "width", float64(s.Width), 0.1, 1e-12)
	if !s.Clear {
		t.Errorf("a 0.3 W lead over a 0.1 W spread is clear: %+v", s)
	}
	if s := SpreadOf(1.0, 1.2, 1.1, 1.3); s.Clear {
		t.Errorf("a 0.1 W lead inside a 0.2 W spread is a coin toss: %+v", s)
	}
}

// The front of a hand-made set: (price, loss) = (1, 5), (2, 3), (2, 4),
// (3, 3), (4, 1), (1.5, 6), and an exact duplicate of (4, 1). (2, 4) loses
// more than (2, 3) at the same price; (3, 3) costs more than (2, 3) for the
// same loss; (1.5, 6) costs more and loses more than (1, 5).
func TestParetoFront(t *testing.T) {
	items := []PriceLoss{{1, 5}, {2, 3}, {2, 4}, {3, 3}, {4, 1}, {1.5, 6}, {4, 1}}
	got := ParetoFront(items)
	want := []int{0, 1, 4, 6}
	if !slices.Equal(got, want) {
		t.Errorf("front %v, want %v", got, want)
	}
	if f := ParetoFront(nil); len(f) != 0 {
		t.Errorf("empty set: %v", f)
	}
}

func TestCompareParts(t *testing.T) {
	fp := devices.Part{Name: "fitted", Package: "PKG-A"}
	cp := devices.Part{Name: "cand", Package: "PKG-B"}
	fd, cd := fit.Device{Part: &fp}, fit.Device{Part: &cp}
	fitted := evaluate.Result{Dev: &fd, Losses: evaluate.Losses{Conduction: 1, TurnOff: 0.5}}
	cand := evaluate.Result{Dev: &cd, Losses: evaluate.Losses{Conduction: 0.8, TurnOff: 0.9}}
	c := CompareParts(&fitted, &cand, 100)
	total := c.Deltas[len(c.Deltas)-1]
	testkit.Within(t, "total change", total.Abs, 0.2, 1e-12)
	testkit.Within(t, "relative change", total.Rel, 0.2/1.5, 1e-12)
	if c.Decides != "turn-off" {
		t.Errorf("decided by %q, want turn-off", c.Decides)
	}
	testkit.Within(t, "efficiency change", c.Eff.Abs, 100/101.7-100/101.5, 1e-12)
	for _, s := range []string{"worse by 200 mW (13.3 %)", "decided by turn-off (+400 mW)", "package PKG-B instead of PKG-A"} {
		if !strings.Contains(c.Verdict, s) {
			t.Errorf("verdict %q lacks %q", c.Verdict, s)
		}
	}
	// The other way round: better by 0.2 W, decided by turn-off (−0.4 W).
	r := CompareParts(&cand, &fitted, 0)
	if !strings.HasPrefix(r.Verdict, "better by 200 mW") || r.Decides != "turn-off" || r.Eff != nil {
		t.Errorf("reverse verdict %q, decides %q", r.Verdict, r.Decides)
	}
	// A candidate set aside is not compared as if its loss were valid:
	// the verdict says so and names the screens it fails.
	cand.Screens = evaluate.ScreenVoltage | evaluate.ScreenTjMax
	c = CompareParts(&fitted, &cand, 100)
	for _, s := range []string{"not compared: set aside", "voltage margin", "junction temperature"} {
		if !strings.Contains(c.Verdict, s) {
			t.Errorf("verdict %q lacks %q", c.Verdict, s)
		}
	}
	if r := CompareParts(&cand, &fitted, 0); !strings.Contains(r.Verdict, "passes the screens the fitted part fails") {
		t.Errorf("reverse verdict %q", r.Verdict)
	}
	same := CompareParts(&fitted, &fitted, 0)
	if !strings.HasPrefix(same.Verdict, "the same") {
		t.Errorf("self comparison %q", same.Verdict)
	}
}
