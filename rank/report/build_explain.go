package report

import (
	"fmt"
	"math"

	"swrank/devices"
	q "swrank/devices/quantity"
	"swrank/rank/evaluate"
	"swrank/rank/fit"
	"swrank/rank/stage"
)

// Explain builds explain's report: one part's whole calculation at pt,
// from its result r and the trace tr of the same evaluation. The result's
// row is a table for CSV and JSON only; the text formats print the steps,
// each device's losses in their three groups, the assumptions and the
// screens.
func Explain(pt *stage.Point, r *evaluate.Result, tr *evaluate.Trace) *Report {
	rep := &Report{Command: "explain"}
	pointRecords(rep, pt)
	rep.About = aboutPoint(pt, "", 0)
	name := r.Dev.Part.Name
	if r.Partner != nil {
		name += " with " + r.Partner.Part.Name + " in the other place"
	}
	rep.About = append(rep.About, "", name+": "+placeWord(pt))
	for k := 0; k < r.N; k++ {
		d := &r.Devices[k]
		rep.About = append(rep.About, fmt.Sprintf("  %s switch %s: edges by %s", d.Role, d.Dev.Part.Name, methodWhy(d)))
	}
	for _, s := range tr.Steps {
		st := Step{Device: s.Device, Topic: s.Topic, Formula: s.Formula}
		for _, t := range s.Terms {
			term := Term{Name: t.Name, Value: Num(t.Value), Unit: t.Kind.Symbol}
			if term.Value.Known {
				term.Text = q.FormatFloat(t.Value, 4, t.Kind)
			} else {
				term.Text = "none"
			}
			st.Terms = append(st.Terms, term)
		}
		rep.Steps = append(rep.Steps, st)
	}
	row := resultRow(r, pt.Stage.Pout)
	row.Set("rank", Unknown())
	moveFirst([]Row{row}, "rank")
	t := Table{Name: "result", Rows: []Row{row}, MachineOnly: true}
	t.Compact, t.Wide = columnsFor(pt, r.Partner != nil)
	rep.Tables = []Table{t}
	rep.Notes = notesOf(t.Rows)
	rep.Failed = r.Screened()
	var totals []string
	for k := 0; k < r.N; k++ {
		d := &r.Devices[k]
		l := d.Losses
		tj := "none: " + d.Thermal.Status.String() + ", no steady temperature"
		if d.Thermal.Found {
			tj = q.Format(d.Thermal.Tj, 4) + " (" + d.Thermal.Status.String() + ")"
		}
		totals = append(totals,
			fmt.Sprintf("%s %s: switch %s, driver %s, total %s, Tj %s", d.Role, d.Dev.Part.Name, q.Format(l.Switch(), 4), q.Format(l.Driver(), 4), q.Format(l.Total(), 4), tj),
			fmt.Sprintf("  %s %s; %s %s (turn-on %s, turn-off %s, Coss %s, recovery %s, dead time %s); %s %s (in the part %s, driver %s, resistor %s, supply %s)",
				GroupOn, share(l.Conduction, l), GroupEdges, share(l.TurnOn+l.TurnOff+l.Coss+l.Recovery+l.DeadTime, l),
				share(l.TurnOn, l), share(l.TurnOff, l), share(l.Coss, l), share(l.Recovery, l), share(l.DeadTime, l),
				GroupGate, share(l.GateRint+l.GateDriver+l.GateRext+l.DriverQuiescent, l),
				share(l.GateRint, l), share(l.GateDriver, l), share(l.GateRext, l), share(l.DriverQuiescent, l)))
	}
	st := "stage total: " + q.Format(r.Losses.Total(), 4)
	if pt.Stage.Pout > 0 {
		st += fmt.Sprintf(" (%.2f %% of %s)", 100*float64(r.Losses.Total())/float64(pt.Stage.Pout), pt.Stage.Pout)
	}
	rep.Sections = append(rep.Sections, Section{Key: "totals", Lines: append(totals, st)})
	if fl := r.Flags.Sentences(); len(fl) > 0 {
		rep.Sections = append(rep.Sections, Section{Key: "assumptions", Title: "assumptions:", Lines: fl})
	}
	if rs := r.Reasons(); len(rs) > 0 {
		rep.Sections = append(rep.Sections, Section{Key: "set_aside", Title: "set aside:", Lines: rs})
	}
	return rep
}

// share prints one loss share of l for a sentence: 0 below TinyShare of
// the total.
func share(p q.Power, l evaluate.Losses) string {
	if math.Abs(float64(p)) < TinyShare*math.Abs(float64(l.Total())) {
		return "0"
	}
	return q.Format(p, 3)
}

// methodWhy says how a device's edges were computed and why.
func methodWhy(d *evaluate.DeviceResult) string {
	if !(d.Stress.HardOn || d.Stress.HardOff) {
		return "none needed (soft-switched: no overlap loss)"
	}
	if d.Method == fit.MethodGateCharge {
		return "gate charge (qgs, qgd and v_plateau are given)"
	}
	return "the datasheet's tr/tf (the library lacks qgs, qgd or v_plateau)"
}

// Check builds check's report: the problems that checking the library at
// path found (lib nil when it could not be read), one a line, and a
// summary line with the number of parts and problems.
func Check(path string, lib *devices.Library, probs devices.ProblemList) *Report {
	rep := &Report{Command: "check", Library: path}
	var lines []string
	fatal := 0
	for _, p := range probs {
		lines = append(lines, p.Error())
		if p.Fatal {
			fatal++
		}
	}
	n := 0
	if lib != nil {
		n = len(lib.Parts)
	}
	rep.Parts = n
	lines = append(lines, fmt.Sprintf("%s: %s, %s (%d fatal)", path, Plural(n, "part", "parts"), Plural(len(probs), "problem", "problems"), fatal))
	rep.Sections = []Section{{Key: "problems", Lines: lines}}
	rep.Failed = fatal > 0
	return rep
}
