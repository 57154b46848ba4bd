package verify

import (
	"errors"
	"math"
	"slices"
	"testing"

	"swrank/rank/spice"
	"swrank/rank/stage"
)

// The margins are the cross-check's criteria (docs/spice-crosscheck.md,
// "Figures"): gate 10 %, edges 30 %, totals 20 %.
func TestMargin(t *testing.T) {
	for _, c := range []struct {
		share string
		want  float64
	}{{ShareGate, 0.10}, {ShareSwitching, 0.30}, {ShareDeadTime, 0.20}, {ShareConduction, 0.20}, {ShareSwitch, 0.20}, {ShareTotal, 0.20}} {
		if got := Margin(c.share); got != c.want {
			t.Errorf("%s: %g, want %g", c.share, got, c.want)
		}
	}
}

// compare flags the shares outside their margin, names the share with the
// largest difference in watts, leaves small shares alone, and a failed
// part keeps its error and no simulated values (invented numbers).
func TestCompare(t *testing.T) {
	pt := &stage.Point{HasSync: true}
	sim := &spice.BenchResult{Places: []spice.Shares{{Conduction: 0.30, Switching: 0.20, Off: 0.005, Gate: 0.01, Drive: 0.05}}}
	p := Part{Sim: sim, Shares: []Share{
		{Name: ShareConduction, Predicted: 0.31},  // +3 %
		{Name: ShareSwitching, Predicted: 0.40},   // +100 %: flagged, the cause
		{Name: ShareDeadTime, Predicted: 0.010},   // +100 % but under 2 % of the total
		{Name: ShareGate, Predicted: 0.056},       // +12 %: flagged
		{Name: ShareSwitch, Predicted: 0.70},      // against 0.515: flagged
		{Name: ShareTotal, Predicted: 0.55 + 0.2}, // against 0.555
	}}
	compare(&p, pt)
	want := []string{ShareSwitching, ShareGate, ShareSwitch, ShareTotal}
	if !slices.Equal(p.Flagged, want) || p.Cause != ShareSwitching {
		t.Errorf("flagged %v (cause %s), want %v (cause switching)", p.Flagged, p.Cause, want)
	}
	if s, _ := p.Share(ShareTotal); math.Abs(s.Simulated-0.555) > 1e-12 {
		t.Errorf("total %g", s.Simulated)
	}
	f := Part{Err: errors.New("no convergence"), Shares: []Share{{Name: ShareTotal, Predicted: 1}}}
	compare(&f, pt)
	if f.Shares[0].Simulated != 0 || len(f.Flagged) != 0 {
		t.Errorf("failed part compared: %+v", f)
	}
}
