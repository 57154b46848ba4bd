package report

import (
	"fmt"
	"math"
	"strconv"
	"strings"

	"swrank/rank"
	"swrank/rank/decide"
	"swrank/rank/evaluate"
	"swrank/rank/stage"
)

// Decisions is the decision path of rank: parts at one point or over a
// load profile, each alone and at its paralleled count, with the
// worst case of the leaders and the price-loss front.
type Decisions struct {
	Plan       *decide.Plan       // the point or profile evaluated
	Candidates []decide.Candidate // in rank order (decide.EvaluateAll, decide.AddWorst)
	SetAside   []rank.SetAside    // parts that could not be evaluated, with the reason (always listed)
	Source     string             // the library's name
	Parts      int                // parts in the library
	All        bool               // list the parts set aside as rows too
	Top        int                // list only the best Top passing parts (0: all)
	Parallel   bool               // counts other than 1 were tried
	Auto       bool               // each part's count was chosen (the least loss)
	Counts     []int              // the counts tried, in the order of Candidate.Tried
}

// unit prints a key value: watts at one point, % of the output power over
// a profile.
func (r *Decisions) unit(v float64) string {
	if r.Plan.Profile != nil {
		return strconv.FormatFloat(100*v, 'f', 3, 64) + " % of Pout"
	}
	return watts(v)
}

// pointKey is the field name of a profile point's efficiency.
func pointKey(name string) string {
	var b strings.Builder
	for _, c := range strings.ToLower(name) {
		switch {
		case c >= 'a' && c <= 'z', c >= '0' && c <= '9':
			b.WriteRune(c)
		case c == '%':
		default:
			b.WriteRune('_')
		}
	}
	return "eff_pct_at_" + strings.Trim(b.String(), "_")
}

// Report builds the decisions' report.
func (r *Decisions) Report() *Report {
	rep := &Report{Command: "rank", Library: r.Source, Parts: r.Parts}
	pr := r.Plan.Profile
	if pr != nil {
		rep.About = r.aboutProfile()
	} else {
		pointRecords(rep, r.Plan.Point)
		rep.About = aboutPoint(r.Plan.Point, r.Source, r.Parts)
	}
	if r.Parallel {
		if r.Auto {
			rep.About = append(rep.About, "paralleling: each part with the count that loses least (N), beside one device; each device's own thermal resistance carries 1/N of the loss")
		} else {
			rep.About = append(rep.About, "paralleling: each part N times on one driver, beside one device; each device's own thermal resistance carries 1/N of the loss")
		}
	}
	t := Table{Name: "results", Ranked: true}
	n := 0
	var setAside []string
	front := map[int]bool{}
	for _, i := range decide.PriceFront(r.Candidates) {
		front[i] = true
	}
	for i := range r.Candidates {
		c := &r.Candidates[i]
		out := c.Screened()
		if out {
			setAside = append(setAside, r.reasons(c)...)
			if !r.All {
				continue
			}
		}
		if !out && r.Top > 0 && n == r.Top {
			continue
		}
		row := r.row(c, front[i])
		if !out {
			n++
			row.Set("rank", Num(float64(n)))
		} else {
			row.Set("rank", Unknown())
		}
		t.Rows = append(t.Rows, row)
	}
	for _, a := range r.SetAside {
		t.Rows = append(t.Rows, notEvaluatedRow(a))
	}
	moveFirst(t.Rows, "rank")
	t.Compact, t.Wide = r.columns()
	rep.Tables = []Table{t}
	rep.Notes = notesOf(t.Rows)
	rep.Failed = n == 0
	if len(setAside) > 0 || len(r.SetAside) > 0 {
		k := 0
		for i := range r.Candidates {
			if r.Candidates[i].Screened() {
				k++
			}
		}
		rep.Sections = append(rep.Sections, setAsideSection(r.SetAside, k, setAside))
	}
	rep.Sections = append(rep.Sections, leaderSections(r.Candidates, r.unit)...)
	if t, ok := spreadTable(r.Candidates); ok {
		rep.Tables = append(rep.Tables, t)
	}
	if pr != nil {
		pt := Table{Name: "profile", MachineOnly: true}
		for _, p := range pr.Points {
			var row Row
			row.Set("point", Text(p.Name))
			row.Set("weight", Num(p.Weight))
			row.Set("load_pct", Num(100*float64(p.Load)))
			row.Set("mode", Text(p.Point.Mode.String()))
			row.Set("pout_w", Num(float64(p.Point.Stage.Pout)))
			row.Set("fsw_hz", Num(float64(p.Point.Stage.Fsw)))
			pt.Rows = append(pt.Rows, row)
		}
		rep.Tables = append(rep.Tables, pt)
	}
	return rep
}

// aboutProfile describes a load profile: its title and source, the rule
// of the ranking, each point with its weight (scaled to sum to 1).
func (r *Decisions) aboutProfile() []string {
	pr := r.Plan.Profile
	out := []string{"load profile: " + pr.Title, "source: " + pr.Source,
		"ranked by the weighted efficiency Σ wᵢ·ηᵢ (the weights apply to efficiencies, not to watts, and are scaled to sum to 1); efficiencies count the switches and drivers only"}
	for _, p := range pr.Points {
		s := &p.Point.Stage
		line := fmt.Sprintf("  %-8s weight %.4g: %s", p.Name, p.Weight, s.Topology)
		if s.Topology == stage.Custom {
			line += fmt.Sprintf(" %s, %s rms, %s", s.Vblock, s.Irms, s.Pout)
		} else {
			line += fmt.Sprintf(" %s → %s at %s (%s)", s.Vin, s.Vout, s.Iout, s.Pout)
		}
		out = append(out, line+fmt.Sprintf(", %s, %s conduction", s.Fsw, p.Point.Mode))
		for _, n := range p.Point.Notes {
			out = append(out, "    note: "+n)
		}
	}
	if len(pr.Points) > 0 {
		out = append(out, aboutDrive(&pr.Points[0].Point)...)
	}
	return append(out, fmt.Sprintf("library %s: %s", r.Source, Plural(r.Parts, "part", "parts")))
}

// reasons are why a candidate is set aside: the count asked for that
// could not be evaluated, then the screens (at each point of a profile).
func (r *Decisions) reasons(c *decide.Candidate) []string {
	var out []string
	if c.NotEvaluated != "" {
		out = append(out, c.Base.Part.Name+": not evaluated: "+c.NotEvaluated)
	}
	if !c.Chosen.Prof {
		return append(out, c.Chosen.Res.Reasons()...)
	}
	for i := range c.Chosen.W.Results {
		for _, s := range c.Chosen.W.Results[i].Reasons() {
			out = append(out, "at "+r.Plan.Profile.Points[i].Name+": "+s)
		}
	}
	return out
}

// row is one candidate's row.
func (r *Decisions) row(c *decide.Candidate, onFront bool) Row {
	var row Row
	if pr := r.Plan.Profile; pr != nil {
		w := &c.Chosen.W
		row = Row{SetAside: c.Screened()}
		row.Set("part", Text(c.Name()))
		if w.Partner != nil {
			row.Set("partner", Text(w.Partner.Part.Name))
		}
		est := c.Chosen.Flags().Estimates()
		row.Set("status", Text(status(row.SetAside, est)))
		row.Set("estimated", Num(float64(est)))
		var pts []Record
		for k, p := range pr.Points {
			row.Set(pointKey(p.Name), Num(100*w.Eff[k]))
			res := &w.Results[k]
			var pr Record
			pr.Set("point", Text(p.Name))
			pr.Set("weight", Num(p.Weight))
			pr.Set("load_pct", Num(100*float64(p.Load)))
			pr.Set("mode", Text(p.Point.Mode.String()))
			pr.Set("pout_w", Num(float64(p.Point.Stage.Pout)))
			pr.Set("total_w", Num(float64(res.Losses.Total())))
			pr.Set("eff_pct", Num(100*w.Eff[k]))
			pr.Set("set_aside", Bool(res.Screened()))
			pts = append(pts, pr)
		}
		row.Sub = map[string][]Record{"points": pts}
		row.Set("eff_weighted_pct", Num(100*w.Weighted))
		row.Set("loss_weighted_pct", Num(100*w.LossFraction))
		if r.Parallel {
			row.Set("single_eff_weighted_pct", Num(100*c.Single.W.Weighted))
		}
		if c.Worst != nil {
			row.Set("worst_eff_weighted_pct", Num(100*c.Worst.W.Weighted))
		} else {
			row.Set("worst_eff_weighted_pct", Unknown())
		}
		if t, ok := c.Chosen.Tj(); ok {
			row.Set("tj_c", Num(float64(t)))
		} else {
			row.Set("tj_c", Unknown())
		}
		row.Flags = flagCodes(c.Chosen.Flags(), c.Dev.Method)
		row.Set("flags", List(row.Flags))
		row.Set("set_aside", Bool(row.SetAside))
		row.Set("reasons", List(r.reasons(c)))
	} else {
		row = resultRow(&c.Chosen.Res, r.Plan.Point.Stage.Pout)
		row.Set("part", Text(c.Name()))
		if r.Parallel {
			row.Set("single_total_w", Num(float64(c.Single.Res.Losses.Total())))
		}
		if c.Worst != nil {
			row.Set("worst_total_w", Num(float64(c.Worst.Res.Losses.Total())))
		} else {
			row.Set("worst_total_w", Unknown())
		}
		if c.Screened() && !row.SetAside { // a count that could not be evaluated
			row.SetAside = true
			row.Set("status", Text(status(true, 0)))
			row.Set("set_aside", Bool(true))
			row.Set("reasons", List(r.reasons(c)))
		}
	}
	if c.WorstReason != "" {
		row.Set("worst_not_evaluated", Text(c.WorstReason))
	}
	if c.NotEvaluated != "" {
		row.Set("not_evaluated", Text(c.NotEvaluated))
	}
	if len(c.Unprepared) > 0 {
		row.Set("unprepared_counts", List(c.Unprepared))
	}
	row.Set("n", Num(float64(c.N)))
	if r.Parallel {
		key := "total_w"
		if r.Plan.Profile != nil {
			key = "loss_weighted_pct"
		}
		var tried []Record
		for i, v := range c.Tried {
			var t Record
			n := i + 1
			switch {
			case i < len(c.TriedN):
				n = c.TriedN[i]
			case i < len(r.Counts):
				n = r.Counts[i]
			}
			t.Set("n", Num(float64(n)))
			if key == "total_w" {
				t.Set(key, Num(v))
			} else {
				t.Set(key, Num(100*v))
			}
			tried = append(tried, t)
		}
		if row.Sub == nil {
			row.Sub = map[string][]Record{}
		}
		row.Sub["tried"] = tried
	}
	price := Unknown()
	if p := c.Dev.Part.Price; p.OK {
		price = Num(p.V)
	}
	row.Set("price", price)
	row.Set("price_front", Bool(onFront))
	return row
}

// columns are the decision table's compact and wide columns.
func (r *Decisions) columns() (compact, wide []string) {
	if pr := r.Plan.Profile; pr != nil {
		compact = []string{"rank", "part"}
		if r.Parallel {
			compact = append(compact, "n")
		}
		for _, p := range pr.Points {
			compact = append(compact, pointKey(p.Name))
		}
		compact = append(compact, "eff_weighted_pct", "tj_c", "status", "notes")
		wide = insertBefore(compact, "tj_c", "loss_weighted_pct", "worst_eff_weighted_pct")
		if r.Parallel {
			wide = insertBefore(wide, "tj_c", "single_eff_weighted_pct")
		}
		wide = insertBefore(wide, "status", "price", "price_front", "estimated")
		return compact, wide
	}
	compact, wide = columnsFor(r.Plan.Point, r.Plan.Partner != nil)
	if r.Parallel {
		compact = insertBefore(compact, "total_w", "n")
		compact = insertBefore(compact, "switch_w", "single_total_w")
		wide = insertBefore(wide, "total_w", "n")
		wide = insertBefore(wide, "conduction_w", "single_total_w")
	}
	wide = insertBefore(wide, "estimated", "worst_total_w", "price", "price_front")
	return compact, wide
}

// Comparison is compare's verdict: candidates judged against the part
// already fitted, at one operating point.
type Comparison struct {
	Point      *stage.Point        // the resolved operating point
	Source     string              // the library's name
	Parts      int                 // parts in the library
	Fitted     evaluate.Result     // the part already fitted
	Candidates []decide.Comparison // each candidate against Fitted, in rank order
}

// Report builds the comparison's report: the fitted part's row first
// (mark fit), then each candidate with its changes from the fitted part,
// and the verdicts.
func (r *Comparison) Report() *Report {
	rep := &Report{Command: "compare", Library: r.Source, Parts: r.Parts}
	pointRecords(rep, r.Point)
	rep.About = aboutPoint(r.Point, r.Source, r.Parts)
	pout := r.Point.Stage.Pout
	fitted := resultRow(&r.Fitted, pout)
	fitted.Set("status", Text("fit"))
	t := Table{Name: "candidates", Rows: []Row{fitted}}
	deltaKeys := append([]string{"total_w"}, groupKeys...)
	deltaKeys = append(deltaKeys, lossKeys...)
	failed := true
	for _, c := range r.Candidates {
		row := resultRow(c.Cand, pout)
		failed = failed && c.Cand.Screened()
		// A result set aside is not a valid operating point: nothing is
		// diffed against it (the verdict says why).
		valid := !c.Cand.Screened() && !r.Fitted.Screened()
		for _, k := range deltaKeys {
			d := Unknown()
			if valid {
				a, _ := row.Number(k)
				b, _ := fitted.Number(k)
				d = Num(a - b)
			}
			row.Set(strings.TrimSuffix(k, "_w")+"_delta_w", d)
		}
		rel := Unknown()
		if ft := float64(r.Fitted.Losses.Total()); valid && ft != 0 {
			rel = Num(100 * (float64(c.Cand.Losses.Total()) - ft) / math.Abs(ft))
		}
		row.Set("total_delta_pct", rel)
		dtj, deff := Unknown(), Unknown()
		if c.Tj != nil && valid {
			dtj = Num(c.Tj.Abs)
		}
		if c.Eff != nil && valid {
			deff = Num(100 * c.Eff.Abs)
		}
		row.Set("tj_delta_k", dtj)
		row.Set("eff_delta_pts", deff)
		row.Set("decided_by", Text(c.Decides))
		row.Set("new_screens", List(decide.ScreenNames(c.NewScreens)))
		row.Set("package_differs", Bool(c.PackageDiffers))
		row.Set("verdict", Text(c.Verdict))
		t.Rows = append(t.Rows, row)
	}
	t.Compact = []string{"part", "status", "total_w", "total_delta_w", "closed_delta_w", "edges_delta_w", "gate_delta_w", "tj_c", "tj_delta_k", "eff_pct", "eff_delta_pts"}
	t.Wide = []string{"part", "status", "total_w", "total_delta_w", "total_delta_pct", "conduction_delta_w", "edges_delta_w", "turn_on_delta_w",
		"turn_off_delta_w", "coss_delta_w", "recovery_delta_w", "dead_time_delta_w", "gate_delta_w", "gate_internal_delta_w",
		"gate_driver_delta_w", "gate_resistor_delta_w", "driver_supply_delta_w", "tj_c", "tj_delta_k", "eff_pct", "eff_delta_pts", "decided_by", "notes"}
	rep.Tables = []Table{t}
	rep.Notes = notesOf(t.Rows)
	rep.Failed = failed
	f := "fitted " + r.Fitted.Dev.Part.Name + ": total " + watts(float64(r.Fitted.Losses.Total()))
	if tj, ok := r.Fitted.Tj(); ok {
		f += fmt.Sprintf(", Tj %.1f °C", float64(tj))
	}
	if pout > 0 {
		f += fmt.Sprintf(", efficiency %.2f %%", 100*float64(pout)/float64(pout+r.Fitted.Losses.Total()))
	}
	if r.Fitted.Screened() {
		f += " (set aside: " + strings.Join(decide.ScreenNames(r.Fitted.Screens), ", ") + ")"
	}
	rep.About = append(rep.About, f)
	sec := Section{Key: "verdicts", Title: "verdicts, each candidate against the fitted part:"}
	for _, c := range r.Candidates {
		sec.Lines = append(sec.Lines, c.Cand.Dev.Part.Name+": "+c.Verdict)
	}
	rep.Sections = append(rep.Sections, sec)
	return rep
}
