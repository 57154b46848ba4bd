package report

import (
	"fmt"
	"math"
	"slices"
	"strings"

	q "swrank/devices/quantity"
	"swrank/rank/verify"
)

// Verification is what swrank verify found: the shortlist's predicted and
// simulated loss shares side by side.
type Verification struct {
	Result *verify.Report // the simulations and their comparison
	Source string         // the library's name
	Parts  int            // parts in the library
}

// verifyColumns are the columns of the shares table in the text formats.
var verifyColumns = []string{"rank", "part", "share", "predicted_w", "simulated_w", "difference_pct", "margin_pct", "flag"}

// Report builds verify's report: one row per share of each verified part
// (predicted, simulated, their difference, the margin and whether the
// share is outside it), a machine-only table of each part's simulation,
// and sections saying how each part was simulated, which shares are
// flagged and their largest cause, whether the simulated order agrees and
// where the margins come from.
func (v *Verification) Report() *Report {
	r := v.Result
	rep := &Report{Command: "verify", Library: v.Source, Parts: v.Parts}
	pointRecords(rep, r.Point)
	rep.About = append(aboutPoint(r.Point, v.Source, v.Parts),
		fmt.Sprintf("simulated in ngspice at %d °C; predicted under the same conditions (Tj %d °C, no package or layout inductance)",
			verify.SimTemperature, verify.SimTemperature))
	rep.Meta.Set("sim_temperature_c", Num(verify.SimTemperature))
	rep.Meta.Set("predicted_order", List(r.PredictedOrder))
	rep.Meta.Set("simulated_order", List(r.SimulatedOrder))
	rep.Meta.Set("order_agrees", Bool(r.OrderAgrees))
	shares := Table{Name: "shares", Compact: verifyColumns}
	sims := Table{Name: "simulations", MachineOnly: true}
	var lines, failed []string
	for i := range r.Parts {
		p := &r.Parts[i]
		simulated := p.Err == nil && p.Sim != nil
		for _, s := range p.Shares {
			var row Row
			row.Set("rank", Num(float64(p.Rank)))
			row.Set("part", Text(p.Name))
			row.Set("share", Text(s.Name))
			row.Set("predicted_w", Num(s.Predicted))
			row.Set("simulated_w", Unknown())
			row.Set("difference_pct", Unknown())
			row.Set("margin_pct", Num(100*verify.Margin(s.Name)))
			row.Set("flagged", Unknown())
			row.Set("flag", Text("not simulated"))
			if simulated {
				row.Set("simulated_w", Num(s.Simulated))
				if d, ok := s.Diff(); ok {
					row.Set("difference_pct", Num(100*d))
				}
				flagged := slices.Contains(p.Flagged, s.Name)
				row.Set("flagged", Bool(flagged))
				switch d, ok := s.Diff(); {
				case flagged:
					row.Set("flag", Text("outside margin"))
				case ok && math.Abs(d) > verify.Margin(s.Name):
					// Outside its margin but too small a share to judge.
					row.Set("flag", Text("small share"))
				default:
					row.Set("flag", Text("within margin"))
				}
			}
			row.Set("error", errText(p.Err))
			shares.Rows = append(shares.Rows, row)
		}
		sims.Rows = append(sims.Rows, simRow(p))
		if p.Err != nil {
			failed = append(failed, fmt.Sprintf("%s: simulation failed: %v", p.Name, p.Err))
		}
		lines = append(lines, simLines(p)...)
	}
	for _, s := range r.Skipped {
		lines = append(lines, "skipped "+s)
	}
	rep.Tables = []Table{shares, sims}
	if len(lines) > 0 {
		rep.Sections = append(rep.Sections, Section{Key: "simulation_lines", Title: "simulations:", Lines: lines})
	}
	if len(failed) > 0 {
		rep.Sections = append(rep.Sections, Section{Key: "failures", Title: "not simulated:", Lines: failed, Verbatim: true})
	}
	if len(r.SimulatedOrder) > 1 {
		order := fmt.Sprintf("order of the shortlist: the simulation agrees (%s)", strings.Join(r.SimulatedOrder, ", "))
		if !r.OrderAgrees {
			order = fmt.Sprintf("order of the shortlist: the simulation differs: predicted %s; simulated %s",
				strings.Join(r.PredictedOrder, ", "), strings.Join(r.SimulatedOrder, ", "))
		}
		rep.Sections = append(rep.Sections, Section{Key: "order", Lines: []string{order}})
	}
	rep.Sections = append(rep.Sections, Section{Key: "margins", Lines: []string{fmt.Sprintf(
		"margins: from the cross-check against ngspice (docs/spice-crosscheck.md); shares under %.0f %% of the simulated total are not flagged",
		100*verify.Floor)}})
	return rep
}

// simRow is one part's simulation as numbers: how long it ran to steady
// state, from the cache or not, the rectifier's loss, the flagged shares'
// largest cause, or the error.
func simRow(p *verify.Part) Row {
	var row Row
	row.Set("rank", Num(float64(p.Rank)))
	row.Set("part", Text(p.Name))
	row.Set("periods", Unknown())
	row.Set("steady_state_pct", Unknown())
	row.Set("runs", Unknown())
	row.Set("cached", Unknown())
	row.Set("rectifier_w", Unknown())
	if p.Err == nil && p.Sim != nil {
		row.Set("periods", Num(float64(p.Sim.Periods)))
		row.Set("steady_state_pct", Num(100*p.Sim.PSS))
		row.Set("runs", Num(float64(p.Sim.Runs)))
		row.Set("cached", Bool(p.Sim.Cached))
		row.Set("rectifier_w", Num(p.Sim.Rectifier))
	}
	row.Set("cause", Text(p.Cause))
	row.Set("error", errText(p.Err))
	return row
}

// simLines say how one part was simulated and which of its shares are
// outside their margins (none for a part not simulated).
func simLines(p *verify.Part) []string {
	if p.Err != nil || p.Sim == nil {
		return nil
	}
	how := fmt.Sprintf("steady state after %d periods (last two periods within %.2g %%), %s", p.Sim.Periods, 100*p.Sim.PSS,
		Plural(p.Sim.Runs, "run", "runs"))
	if p.Sim.Relaxed {
		how += ", ten times looser tolerances (the time step stalled with the tight ones)"
	}
	if p.Sim.Cached {
		how += ", from the cache"
	}
	if p.Sim.ILMean != 0 {
		how += fmt.Sprintf(", inductor %s mean", q.Format(q.Current(p.Sim.ILMean), 4))
	}
	if p.Sim.Rectifier != 0 {
		how += ", rectifier diode " + SI(p.Sim.Rectifier, "W")
	}
	if p.Sim.Kept != "" {
		how += "; deck kept in " + p.Sim.Kept
	}
	out := []string{p.Name + ": " + how}
	if len(p.Flagged) > 0 {
		out = append(out, fmt.Sprintf("%s: outside the margin: %s; the largest difference is in %s", p.Name, strings.Join(p.Flagged, ", "), p.Cause))
	}
	return out
}

// errText is an error's message as a text cell (unknown for none).
func errText(err error) Cell {
	if err == nil {
		return Unknown()
	}
	return Text(err.Error())
}
