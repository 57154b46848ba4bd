package spicecheck

import (
	"context"
	"path/filepath"
	"testing"
	"time"

	"swrank/devices"
	q "swrank/devices/quantity"
	"swrank/rank/spice"
)

// TestCrossCheckHeldOut runs the held-out devices (HeldOut, drawn from
// cell.toml's seed over wider ranges and never used to choose a constant)
// through the hard-switched cell at the cell's points, each rated at most
// 4× its bus (reference tool: ngspice 39, the Debian package, VDMOS
// model). Its figures are the headline of docs/spice-crosscheck.md.
func TestCrossCheckHeldOut(t *testing.T) {
	r := needNgspice(t)
	if testing.Short() {
		t.Skip("skipping the held-out cross-check in -short mode")
	}
	cell, held := heldOutSet(t)
	cfg := &Config{Devices: held, Points: cell.Points}
	for i := range cfg.Points {
		p := &cfg.Points[i]
		if p.MaxRating == 0 || p.MaxRating > 4*p.Vbus {
			p.MaxRating = 4 * p.Vbus
		}
	}
	out := filepath.Join(outDir(t), "held-out-cell")
	ctx, cancel := context.WithTimeout(context.Background(), 10*time.Minute)
	defer cancel()
	s, err := RunSuite(ctx, r, cfg, SuiteOptions{Workers: 2, OutDir: out})
	if err != nil {
		t.Fatal(err)
	}
	sum := s.Summarise()
	rep := filepath.Join(out, "report.txt")
	if err := s.WriteReport(rep, &sum); err != nil {
		t.Fatal(err)
	}
	t.Logf("report: %s; %v\n%s", rep, s.Elapsed.Round(time.Millisecond), sum.SummaryText())

	// The targets of the unseen-parts work on a held-out set: total
	// within 5 % median and 15 % worst, the edges (switching) within 10 %
	// and 25 %, the gate within 3 % and 20 %, the same best part at every
	// point, and Kendall τ ≥ 0.9 at every point (the target is 0.95: two
	// points stay at 0.91 and 0.93, docs/spice-crosscheck.md).
	for _, c := range []struct {
		comp          string
		median, worst float64
	}{{CompTotal, 0.05, 0.15}, {CompSwitching, 0.10, 0.25}, {CompGate, 0.03, 0.20}} {
		st := sum.Comp[c.comp]
		if st.N == 0 || st.Median > c.median || st.Worst > c.worst {
			t.Errorf("%s: median |error| %s (limit %.0f%%), worst %s at %s (limit %.0f%%) over %d rows",
				c.comp, pct(st.Median), 100*c.median, pct(st.WorstSigned), st.WorstAt, 100*c.worst, st.N)
		}
	}
	checkPoints(t, &sum)

	// The same simulations predicted from the datasheet's table alone (no
	// second capacitance point, no curves: the Cgd and Coss shapes
	// estimated). Held
	// to looser limits: the estimate's spread is the price of the
	// missing curve (docs/spice-crosscheck.md).
	one := onePoint(t, s, out)
	for _, c := range []struct {
		comp          string
		median, worst float64
	}{{CompTotal, 0.05, 0.20}, {CompSwitching, 0.10, 0.30}} {
		st := one.Comp[c.comp]
		if st.N == 0 || st.Median > c.median || st.Worst > c.worst {
			t.Errorf("one capacitance point: %s: median |error| %s (limit %.0f%%), worst %s at %s (limit %.0f%%) over %d rows",
				c.comp, pct(st.Median), 100*c.median, pct(st.WorstSigned), st.WorstAt, 100*c.worst, st.N)
		}
	}
	checkPoints(t, &one)
}

// checkPoints holds every point of a held-out summary to ≥ 3 parts
// compared, the same best part (BestTie) and Kendall τ ≥ 0.9.
func checkPoints(t *testing.T, sum *Summary) {
	t.Helper()
	for _, p := range sum.Points {
		switch {
		case p.N < 3:
			t.Errorf("%s: %d parts compared, want ≥ 3", p.Point, p.N)
		case !p.BestAgrees:
			t.Errorf("%s: swrank ranks %s first, the simulation %s", p.Point, p.PredOrder[0], p.SimOrder[0])
		case p.Tau < 0.9:
			t.Errorf("%s: Kendall τ %.3f < 0.9", p.Point, p.Tau)
		}
	}
}

// onePoint compares suite s again with the second capacitance point and
// the curves (coss2, crss2, cap2_vds, coss_curve, crss_curve) left blank, writes its report beside the
// suite's as report-one-point.txt and returns its summary.
func onePoint(t *testing.T, s *Suite, out string) Summary {
	t.Helper()
	one, err := s.Without(func(p *devices.Part) {
		p.Coss2, p.Crss2, p.Cap2Vds = q.Opt[q.Capacitance]{}, q.Opt[q.Capacitance]{}, q.Opt[q.Voltage]{}
		p.CossCurve, p.CrssCurve = "", ""
	})
	if err != nil {
		t.Fatal(err)
	}
	sum := one.Summarise()
	rep := filepath.Join(out, "report-one-point.txt")
	if err := one.WriteReport(rep, &sum); err != nil {
		t.Fatal(err)
	}
	t.Logf("one capacitance point: %s\n%s", rep, sum.SummaryText())
	return sum
}

// heldOutSet returns the cell's configuration and its held-out devices
// (cell.toml's [held_out]).
func heldOutSet(t *testing.T) (*Config, []spice.Model) {
	t.Helper()
	cell, err := LoadConfig(configPath)
	if err != nil {
		t.Fatal(err)
	}
	held, err := cell.HeldOut.Devices()
	if err != nil {
		t.Fatal(err)
	}
	return cell, held
}
