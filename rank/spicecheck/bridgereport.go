package spicecheck

import (
	"fmt"
	"strings"

	"swrank/rank/evaluate"
)

// BridgePointSummary is one point of a half-bridge set.
type BridgePointSummary struct {
	Point    string
	Parts    int     // rows compared (swrank passes them)
	Tau      float64 // Kendall τ of the predicted and simulated orders by stage total
	BestPred string  // the best part by swrank
	BestSim  string  // the best part by the simulation
}

// BridgeSummary is what a half-bridge set shows.
type BridgeSummary struct {
	Set    string
	Stats  map[string]Stats // by BridgeComponents(), over the compared rows
	Points []BridgePointSummary
	// DiodeTime is the error of the diode's conduction time over both
	// edges of the compared rows, in ns (predicted − simulated): its
	// median |error| and worst.
	DiodeTime Stats
	// Wrong lists the screens the waveform contradicts: a part set aside
	// for cross-conduction or false turn-on that switches cleanly, and a
	// part passed that shoots through (screenVerdict).
	Wrong []string
	// Thin lists the parts passed whose die's gate reaches its threshold
	// in the waveform without a shoot-through that costs 1 % of the
	// stage: the false turn-on margin predicted too thin a lift.
	Thin []string
	// SetAside counts the parts set aside, by reason.
	SetAside map[string]int
}

// Compared returns the rows swrank passes.
func (s *BridgeSuite) Compared() []Row {
	var out []Row
	for _, r := range s.Rows {
		if !r.Screened {
			out = append(out, r.Row)
		}
	}
	return out
}

// Summarise computes the set's figures.
func (s *BridgeSuite) Summarise(cfg *BridgeConfig) BridgeSummary {
	sum := BridgeSummary{Set: s.Set, Stats: map[string]Stats{}, SetAside: map[string]int{}}
	rows := s.Compared()
	for _, c := range BridgeComponents() {
		sum.Stats[c] = ErrStats(rows, c)
	}
	var dt []Row
	for _, r := range s.Rows {
		if r.Screened {
			sum.SetAside[r.ScreenNote]++
		} else {
			for e := range 2 {
				dt = append(dt, Row{Device: r.Device, Point: r.Point,
					Pred: map[string]float64{"t": r.PredDiode[e] * 1e9}, Sim: map[string]float64{"t": r.SimDiode[e] * 1e9}})
			}
		}
		wrong, thin := r.screenVerdict()
		sum.Wrong = append(sum.Wrong, wrong...)
		sum.Thin = append(sum.Thin, thin...)
	}
	sum.DiodeTime = absStats(dt, "t")
	for _, p := range cfg.Points {
		var pr []Row
		for _, r := range rows {
			if r.Point == p.Name {
				pr = append(pr, r)
			}
		}
		ps := BridgePointSummary{Point: p.Name, Parts: len(pr)}
		if len(pr) > 0 {
			c, d := Pairs(pr)
			ps.Tau = KendallTau(c, d, len(pr))
			ps.BestPred, ps.BestSim = Order(pr, true)[0], Order(pr, false)[0]
		}
		sum.Points = append(sum.Points, ps)
	}
	return sum
}

// absStats are the median and worst of predicted − simulated (not
// relative) for one component.
func absStats(rows []Row, comp string) Stats {
	return statsOf(rows, func(r *Row) float64 { return r.Pred[comp] - r.Sim[comp] })
}

// screenVerdict compares the row's cross-conduction and false turn-on
// screens with the waveform. The waveform shoots through when the
// synchronous channel's forward conduction costs more than 1 % of the
// stage's loss; its off gate is lifted when the die's gate reaches the
// threshold. A part set aside for cross-conduction must shoot through, one
// set aside for false turn-on must be lifted or shoot through, and a part
// passed must not shoot through (wrong); a part passed whose gate is
// lifted without shooting through is listed as thin.
func (r *BridgeRow) screenVerdict() (wrong, thin []string) {
	at := r.Device + " @ " + r.Point
	cc := r.Screens&evaluate.ScreenCrossConduction != 0
	fto := r.Screens&evaluate.ScreenFalseTurnOn != 0
	shoot := r.SimShoot > 0.01*r.Sim[CompTotal]
	lifted := r.SimGate >= r.Vth
	wave := fmt.Sprintf("shoot-through %s (%s of the stage), off gate peak %.2f V against Vth %.2f V",
		watts(r.SimShoot), pct(r.SimShoot/r.Sim[CompTotal]), r.SimGate, r.Vth)
	switch {
	case cc && !fto && !shoot, fto && !cc && !shoot && !lifted, cc && fto && !shoot && !lifted:
		return []string{fmt.Sprintf("%s: set aside for %s (margins %.1f, %.1f ns; off gate %.2f V predicted), the waveform switches cleanly: %s",
			at, screenNames(r.Screens&(evaluate.ScreenCrossConduction|evaluate.ScreenFalseTurnOn)),
			r.PredMargin[0]*1e9, r.PredMargin[1]*1e9, r.PredGate, wave)}, nil
	case !cc && !fto && shoot:
		return []string{fmt.Sprintf("%s: passed (off gate %.2f V predicted), the waveform shoots through: %s", at, r.PredGate, wave)}, nil
	case !cc && !fto && lifted:
		return nil, []string{fmt.Sprintf("%s: off gate %.2f V predicted; %s", at, r.PredGate, wave)}
	}
	return nil, nil
}

// Text is the set's summary as the report prints it.
func (sum *BridgeSummary) Text() string {
	var b strings.Builder
	fmt.Fprintf(&b, "half-bridge, %s set:\n", sum.Set)
	for _, c := range BridgeComponents() {
		st := sum.Stats[c]
		fmt.Fprintf(&b, "  %-16s median |err| %6s  worst %7s  (%s)  n=%d\n", c, pct(st.Median), pct(st.WorstSigned), st.WorstAt, st.N)
	}
	fmt.Fprintf(&b, "  diode time       median |err| %.1f ns  worst %+.1f ns (%s)\n", sum.DiodeTime.Median, sum.DiodeTime.WorstSigned, sum.DiodeTime.WorstAt)
	for _, p := range sum.Points {
		fmt.Fprintf(&b, "  %-18s parts %2d  τ %+.3f  best %s (sim %s)\n", p.Point, p.Parts, p.Tau, p.BestPred, p.BestSim)
	}
	for k, n := range sum.SetAside {
		fmt.Fprintf(&b, "  set aside: %d × %s\n", n, k)
	}
	for _, w := range sum.Wrong {
		fmt.Fprintf(&b, "  screen contradicted: %s\n", w)
	}
	for _, w := range sum.Thin {
		fmt.Fprintf(&b, "  passed, its gate lifted past the threshold without shooting through: %s\n", w)
	}
	return b.String()
}

// Table lists every row of the set.
func (s *BridgeSuite) Table() string {
	var b strings.Builder
	fmt.Fprintf(&b, "%-16s %-18s %9s %9s %7s | diode ns pred/sim (edge 1; edge 2) | rec mW pred/sim | sw mW pred/sim | off gate V pred/sim/Vth | shoot mW | screens\n",
		"device", "point", "pred W", "sim W", "err")
	for _, r := range s.Rows {
		fmt.Fprintf(&b, "%-16s %-18s %9.4f %9.4f %7s | %5.1f/%5.1f; %5.1f/%5.1f | %6.1f/%6.1f | %6.1f/%6.1f | %5.2f/%5.2f/%5.2f | %6.1f | %s\n",
			r.Device, r.Point, r.Pred[CompTotal], r.Sim[CompTotal], pct(r.Err(CompTotal)),
			r.PredDiode[0]*1e9, r.SimDiode[0]*1e9, r.PredDiode[1]*1e9, r.SimDiode[1]*1e9,
			r.Pred[BridgeRecovery]*1e3, r.Sim[BridgeRecovery]*1e3, r.Pred[BridgeSwitching]*1e3, r.Sim[BridgeSwitching]*1e3,
			r.PredGate, r.SimGate, r.Vth, r.SimShoot*1e3, r.ScreenNote)
	}
	return b.String()
}
