package report

import (
	"fmt"

	q "swrank/devices/quantity"
	"swrank/rank"
	"swrank/rank/decide"
	"swrank/rank/evaluate"
	"swrank/rank/fit"
	"swrank/rank/stage"
)

// Ranking is a plain ranking at one operating point: what rank prints
// without a load profile, paralleling or valley switching.
type Ranking struct {
	Point    *stage.Point      // the resolved operating point
	Source   string            // the library's name
	Parts    int               // parts in the library
	Results  []evaluate.Result // in rank order (all of them, or the leaders kept)
	SetAside []rank.SetAside   // parts that could not be evaluated, with the reason (always listed)
	Screened int               // parts set aside in the library (0: count the results)
	All      bool              // list the parts set aside as rows too
	Top      int               // list only the best Top passing parts (0: all)
	// Leaders are the worst case and price of the passing results
	// (decide.Leaders; nil: none).
	Leaders []decide.Candidate
}

// Passing returns the results that pass, in rank order.
func (r *Ranking) Passing() []evaluate.Result {
	var out []evaluate.Result
	for _, x := range r.Results {
		if !x.Screened() {
			out = append(out, x)
		}
	}
	return out
}

// The loss fields of a row, and the groups they sum to.
var (
	lossKeys   = []string{"conduction_w", "turn_on_w", "turn_off_w", "coss_w", "recovery_w", "dead_time_w", "gate_internal_w", "gate_driver_w", "gate_resistor_w", "driver_supply_w"}
	groupKeys  = []string{"closed_w", "edges_w", "gate_w"}
	compactTop = []string{"rank", "part", "total_w", "switch_w", "driver_w", "tj_c", "eff_pct", "estimated", "status", "notes"}
	wideLoss   = []string{"conduction_w", "edges_w", "turn_on_w", "turn_off_w", "coss_w", "recovery_w", "dead_time_w",
		"gate_w", "gate_internal_w", "gate_driver_w", "gate_resistor_w", "driver_supply_w"}
)

// lossRecord adds the losses of l to rec: the totals, the groups and every
// share.
func lossRecord(rec *Record, l evaluate.Losses) {
	rec.Set("total_w", Num(float64(l.Total())))
	rec.Set("switch_w", Num(float64(l.Switch())))
	rec.Set("driver_w", Num(float64(l.Driver())))
	rec.Set("closed_w", Num(float64(l.Conduction)))
	rec.Set("edges_w", Num(float64(l.TurnOn+l.TurnOff+l.Coss+l.Recovery+l.DeadTime)))
	rec.Set("gate_w", Num(float64(l.GateRint+l.GateDriver+l.GateRext+l.DriverQuiescent)))
	for i, v := range []q.Power{l.Conduction, l.TurnOn, l.TurnOff, l.Coss, l.Recovery, l.DeadTime, l.GateRint, l.GateDriver, l.GateRext, l.DriverQuiescent} {
		rec.Set(lossKeys[i], Num(float64(v)))
	}
}

// flagCodes lists the codes of f worth a note (the informational flag of
// a counted recovery charge left out), and the method when it is not the
// gate-charge one.
func flagCodes(f fit.Flags, m fit.Method) []string {
	var out []string
	if m != fit.MethodGateCharge {
		out = append(out, "tr/tf")
	}
	f &^= fit.FlagQrrInModel
	for bit := fit.Flags(1); bit != 0 && f != 0; bit <<= 1 {
		if f&bit != 0 {
			out = append(out, bit.Codes())
			f &^= bit
		}
	}
	return out
}

// noteText returns the sentence of a flag code.
func noteText(code string) string {
	if code == "tr/tf" {
		return "edges computed from the datasheet's tr and tf (the library lacks qgs, qgd or v_plateau), not from gate charge"
	}
	for bit := fit.Flags(1); bit != 0; bit <<= 1 {
		if bit.Codes() == code {
			return bit.Sentences()[0]
		}
	}
	return code
}

// notesOf explains every flag code of the rows, in order of first
// appearance.
func notesOf(rows []Row) []Note {
	var out []Note
	seen := map[string]bool{}
	for _, r := range rows {
		for _, c := range r.Flags {
			if !seen[c] {
				seen[c] = true
				out = append(out, Note{Code: c, Text: noteText(c)})
			}
		}
	}
	return out
}

// method names how the hard edges of x were computed ("gate-charge", or
// two methods joined by "/").
func method(x *evaluate.Result) string {
	m := x.Devices[0].Method.String()
	if x.N > 1 && x.Devices[1].Dev != x.Devices[0].Dev && x.Devices[1].Method != x.Devices[0].Method {
		m += "/" + x.Devices[1].Method.String()
	}
	return m
}

// status is a row's mark: out (set aside), est (passes on estimated
// values) or ok.
func status(setAside bool, estimated int) string {
	switch {
	case setAside:
		return "out"
	case estimated > 0:
		return "est"
	}
	return "ok"
}

// resultRow is the row of one evaluation: who, the losses, the junction,
// the efficiency, the flags and reasons, the resonant values and each
// device as a nested record.
func resultRow(x *evaluate.Result, pout q.Power) Row {
	row := Row{SetAside: x.Screened()}
	rec := &row.Record
	rec.Set("part", Text(x.Dev.Part.Name))
	if x.Partner != nil {
		rec.Set("partner", Text(x.Partner.Part.Name))
	}
	rec.Set("position", Text(x.Position.String()))
	est := x.Flags.Estimates()
	rec.Set("status", Text(status(x.Screened(), est)))
	rec.Set("estimated", Num(float64(est)))
	lossRecord(rec, x.Losses)
	if t, ok := x.Tj(); ok {
		rec.Set("tj_c", Num(float64(t)))
	} else {
		rec.Set("tj_c", Unknown())
	}
	rec.Set("tj_estimated", Bool(x.Flags&(fit.FlagRthJCEstimated|fit.FlagRthJAEstimated|fit.FlagNoRth) != 0))
	rec.Set("tj_limit_c", Num(float64(x.Dev.TjMax)))
	eff, lossPct := Unknown(), Unknown()
	if pout > 0 {
		eff = Num(100 * float64(pout) / float64(pout+x.Losses.Total()))
		lossPct = Num(100 * float64(x.Losses.Total()) / float64(pout))
	}
	if rf := &x.RF; rf.VPeak > 0 {
		eff = Num(100 * float64(rf.EffStage))
	}
	rec.Set("eff_pct", eff)
	rec.Set("loss_pct", lossPct)
	rfRecord(rec, &x.RF)
	rec.Set("method", Text(method(x)))
	row.Flags = flagCodes(x.Flags, x.Devices[0].Method)
	if x.N > 1 && x.Devices[1].Method != x.Devices[0].Method {
		row.Flags = flagCodes(x.Flags, x.Devices[1].Method)
	}
	rec.Set("flags", List(row.Flags))
	rec.Set("set_aside", Bool(x.Screened()))
	rec.Set("reasons", List(x.Reasons()))
	var devs []Record
	for k := 0; k < x.N; k++ {
		d := &x.Devices[k]
		var dr Record
		dr.Set("part", Text(d.Dev.Part.Name))
		dr.Set("position", Text(d.Role.String()))
		lossRecord(&dr, d.Losses)
		if d.Thermal.Found {
			dr.Set("tj_c", Num(float64(d.Thermal.Tj)))
		} else {
			dr.Set("tj_c", Unknown())
		}
		dr.Set("thermal", Text(d.Thermal.Status.String()))
		dr.Set("rds_on_ohm", Num(float64(d.Rds)))
		dr.Set("rth_k_per_w", Num(float64(d.Rth)))
		dr.Set("method", Text(d.Method.String()))
		dr.Set("flags", List(flagCodes(d.Flags, d.Method)))
		devs = append(devs, dr)
	}
	row.Sub = map[string][]Record{"devices": devs}
	return row
}

// rfRecord adds the class E or class D values of a resonant stage.
func rfRecord(rec *Record, rf *evaluate.RFResult) {
	if rf.VPeak <= 0 {
		return
	}
	rec.Set("peak_v", Num(float64(rf.VPeak)))
	rec.Set("peak_a", Num(float64(rf.IPeak)))
	rec.Set("fall_time_s", Num(float64(rf.Tf)))
	if rf.CRequired > 0 {
		rec.Set("shunt_needed_f", Num(float64(rf.CRequired)))
		rec.Set("shunt_in_part_f", Num(float64(rf.CDevice)))
		rec.Set("shunt_to_add_f", Num(float64(rf.CExternal)))
		rec.Set("f_limit_hz", Num(float64(rf.FMax)))
		rec.Set("excess_reactance_ohm", Num(float64(rf.XExcess)))
		rec.Set("residual_v", Num(float64(rf.VResidual)))
		rec.Set("on_share_pct", Num(100*float64(rf.OnShare)))
		if rf.DriveZVS > 0 {
			rec.Set("zvs_drive_pct", Num(100*float64(rf.DriveZVS)))
			rec.Set("zvs_total_w", Num(float64(rf.TotalZVS)))
		}
	} else {
		rec.Set("soft_on", Bool(rf.ZVS))
		rec.Set("residual_v", Num(float64(rf.VResidual)))
	}
	rec.Set("eff_with_driver_pct", Num(100*float64(rf.EffWithDriver)))
}

// columnsFor returns the compact and wide columns of a results table at
// pt: the resonant stages add their own.
func columnsFor(pt *stage.Point, partner bool) (compact, wide []string) {
	compact = append([]string(nil), compactTop...)
	wide = []string{"rank", "part"}
	if partner {
		wide = append(wide, "partner")
	}
	wide = append(wide, "total_w")
	wide = append(wide, wideLoss...)
	wide = append(wide, "switch_w", "driver_w", "tj_c", "eff_pct", "loss_pct")
	var rf []string
	switch pt.Stage.Topology {
	case stage.ClassE:
		rf = []string{"peak_v", "shunt_to_add_f"}
		wide = append(wide, "peak_v", "shunt_needed_f", "shunt_to_add_f", "f_limit_hz", "on_share_pct", "residual_v", "zvs_drive_pct", "zvs_total_w", "eff_with_driver_pct")
	case stage.ClassD:
		rf = []string{"soft_on"}
		wide = append(wide, "soft_on", "residual_v", "eff_with_driver_pct")
	}
	compact = insertBefore(compact, "estimated", rf...)
	wide = append(wide, "estimated", "status", "method", "notes")
	return compact, wide
}

// insertBefore inserts keys before key in list (at the end when key is
// not there).
func insertBefore(list []string, key string, keys ...string) []string {
	for i, k := range list {
		if k == key {
			out := append([]string(nil), list[:i]...)
			out = append(out, keys...)
			return append(out, list[i:]...)
		}
	}
	return append(list, keys...)
}

// Report builds the ranking's report: the results table (passing parts
// in rank order, then those set aside when All), the parts set aside and
// why, the worst case of the leaders and the price-loss front.
func (r *Ranking) Report() *Report {
	rep := &Report{Command: "rank", Library: r.Source, Parts: r.Parts}
	pointRecords(rep, r.Point)
	rep.About = aboutPoint(r.Point, r.Source, r.Parts)
	partner := false
	t := Table{Name: "results", Ranked: true}
	n := 0
	var setAside []evaluate.Result
	for i := range r.Results {
		x := &r.Results[i]
		if x.Screened() {
			setAside = append(setAside, *x)
			if !r.All {
				continue
			}
		}
		if !x.Screened() && r.Top > 0 && n == r.Top {
			continue
		}
		row := resultRow(x, r.Point.Stage.Pout)
		if !x.Screened() {
			n++
			row.Set("rank", Num(float64(n)))
		} else {
			row.Set("rank", Unknown())
		}
		partner = partner || x.Partner != nil
		t.Rows = append(t.Rows, row)
	}
	for _, a := range r.SetAside {
		t.Rows = append(t.Rows, notEvaluatedRow(a))
	}
	moveFirst(t.Rows, "rank")
	addLeaders(t.Rows, r.Leaders)
	t.Compact, t.Wide = columnsFor(r.Point, partner)
	if len(r.Leaders) > 0 {
		t.Wide = insertBefore(t.Wide, "estimated", "worst_total_w", "price", "price_front")
	}
	rep.Tables = []Table{t}
	rep.Notes = notesOf(t.Rows)
	rep.Failed = n == 0
	if partner && len(r.Results) > 0 && r.Results[0].Partner != nil {
		rep.About = append(rep.About, fmt.Sprintf("the other place holds %s in every row", r.Results[0].Partner.Part.Name))
	}
	screened := max(r.Screened, len(setAside))
	if screened > 0 || len(r.SetAside) > 0 {
		var lines []string
		for i := range setAside {
			lines = append(lines, setAside[i].Reasons()...)
		}
		if screened > len(setAside) {
			lines = append(lines, fmt.Sprintf("… and %d more (the lowest-loss %d shown)", screened-len(setAside), len(setAside)))
		}
		rep.Sections = append(rep.Sections, setAsideSection(r.SetAside, screened, lines))
	}
	rep.Sections = append(rep.Sections, leaderSections(r.Leaders, watts)...)
	if t, ok := spreadTable(r.Leaders); ok {
		rep.Tables = append(rep.Tables, t)
	}
	return rep
}

// setAsideSection lists the parts set aside: first those that could not
// be evaluated (aside), then lines, the reasons of the screened parts
// (screened of them).
func setAsideSection(aside []rank.SetAside, screened int, lines []string) Section {
	sec := Section{Key: "set_aside", Title: fmt.Sprintf("set aside (%s):", Plural(len(aside)+screened, "part", "parts"))}
	for _, a := range aside {
		sec.Lines = append(sec.Lines, a.String())
	}
	sec.Lines = append(sec.Lines, lines...)
	return sec
}

// notEvaluatedRow is the row of a part that could not be evaluated: its
// name, line and reason, no numbers.
func notEvaluatedRow(a rank.SetAside) Row {
	row := Row{SetAside: true, NotEvaluated: true}
	row.Set("rank", Unknown())
	row.Set("part", Text(a.Part))
	row.Set("status", Text(status(true, 0)))
	if a.Line > 0 {
		row.Set("line", Num(float64(a.Line)))
	}
	row.Set("not_evaluated", Text(a.Reason))
	row.Set("set_aside", Bool(true))
	row.Set("reasons", List([]string{"not evaluated: " + a.Reason}))
	return row
}

// spreadTable is the leader's lead against its own spread, for CSV and
// JSON (the text formats say it in the worst-case section).
func spreadTable(cs []decide.Candidate) (Table, bool) {
	s := decide.LeaderSpread(cs)
	if s == nil {
		return Table{}, false
	}
	var row Row
	row.Set("part", Text(cs[0].Name()))
	row.Set("runner_up", Text(cs[1].Name()))
	row.Set("lead", Num(float64(s.Lead)))
	row.Set("spread", Num(float64(s.Width)))
	row.Set("clear", Bool(s.Clear))
	return Table{Name: "leader_spread", Rows: []Row{row}, MachineOnly: true}, true
}

// moveFirst moves key to the front of each row's record.
func moveFirst(rows []Row, key string) {
	for i := range rows {
		rec := rows[i].Record
		for j, v := range rec {
			if v.Key == key {
				copy(rec[1:j+1], rec[:j])
				rec[0] = v
				break
			}
		}
	}
}

// watts prints a power for a sentence.
func watts(v float64) string { return SI(v, "W") }

// addLeaders adds the worst case, the price and the price-loss front to
// the rows of the leaders (matched by name).
func addLeaders(rows []Row, cs []decide.Candidate) {
	if len(cs) == 0 {
		return
	}
	front := map[string]bool{}
	for _, i := range decide.PriceFront(cs) {
		front[cs[i].Name()] = true
	}
	for i := range rows {
		name, _ := rows[i].Get("part")
		for j := range cs {
			c := &cs[j]
			if c.Name() != name.Text {
				continue
			}
			worst := Unknown()
			if c.Worst != nil {
				worst = Num(c.Worst.Key())
			}
			rows[i].Set("worst_total_w", worst)
			if c.WorstReason != "" {
				rows[i].Set("worst_not_evaluated", Text(c.WorstReason))
			}
			price := Unknown()
			if p := c.Dev.Part.Price; p.OK {
				price = Num(p.V)
			}
			rows[i].Set("price", price)
			rows[i].Set("price_front", Bool(front[c.Name()]))
		}
	}
}

// leaderSections are the worst case of the leading parts, whether the
// winner's lead outweighs its own spread, and the price-loss front; unit
// prints a key value.
func leaderSections(cs []decide.Candidate, unit func(float64) string) []Section {
	var out []Section
	var worst []string
	for _, c := range cs {
		switch {
		case c.Worst != nil:
			worst = append(worst, fmt.Sprintf("%s: typical %s, worst case %s", c.Name(), unit(c.Chosen.Key()), unit(c.Worst.Key())))
		case c.WorstReason != "":
			worst = append(worst, fmt.Sprintf("%s: typical %s, worst case not evaluated: %s", c.Name(), unit(c.Chosen.Key()), c.WorstReason))
		case c.NoMax:
			// Unknown is not zero: a leader without maximum values is
			// listed with its worst case unknown, never left out.
			worst = append(worst, fmt.Sprintf("%s: typical %s, worst case unknown (no rds_on_max, qg_max or vgs_th_max)", c.Name(), unit(c.Chosen.Key())))
		}
	}
	if len(worst) > 0 {
		if note := spreadNote(cs, unit); note != "" {
			worst = append(worst, note)
		}
		out = append(out, Section{Key: "worst_case", Lines: worst,
			Title: "worst case (rds_on_max, qg_max, vgs_th_max in place of the typical values), leading parts:"})
	}
	if f := decide.PriceFront(cs); len(f) > 0 {
		sec := Section{Key: "price_front", Title: "price against loss: the parts no other part beats on both (N × price when paralleled):"}
		for _, i := range f {
			sec.Lines = append(sec.Lines, fmt.Sprintf("%s: price %.2f, loss %s", cs[i].Name(), cs[i].Dev.Part.Price.V, unit(cs[i].Chosen.Key())))
		}
		out = append(out, sec)
	}
	return out
}

// spreadNote says whether the winner's lead outweighs its own spread
// between typical and worst-case values ("" when it cannot be told).
func spreadNote(cs []decide.Candidate, unit func(float64) string) string {
	s := decide.LeaderSpread(cs)
	if s == nil {
		return ""
	}
	a, b := cs[0].Name(), cs[1].Name()
	verdict := "less than its own spread from typical to worst-case values (%s): a coin toss between them"
	if s.Clear {
		verdict = "more than its own spread from typical to worst-case values (%s): a clear choice"
	}
	return fmt.Sprintf("%s leads %s by %s, "+verdict, a, b, unit(float64(s.Lead)), unit(float64(s.Width)))
}
