package report

import (
	"fmt"
	"io"
	"math"
	"slices"
	"strconv"
	"strings"

	"github.com/olekukonko/tablewriter"
	"github.com/olekukonko/tablewriter/tw"

	q "swrank/devices/quantity"
	"swrank/rank/decide"
	"swrank/rank/evaluate"
	"swrank/rank/fit"
	"swrank/rank/stage"
)

// The table format: the tables of every command, drawn with tablewriter
// (markdown.go draws the same tables in Markdown).

var tableHeader = []string{"#", "part", "conduction", "turn-on", "turn-off", "output cap", "diode", "gate (in FET)", "switch", "driver", "total", "Tj", "% of Pout", "est.", "method / flags"}

func tableRow(i int, x *evaluate.Result, pout q.Power) []string {
	l := x.Losses
	name := x.Dev.Part.Name
	if x.Partner != nil {
		name += " + " + x.Partner.Part.Name
	}
	tj := "–"
	if t, ok := x.Tj(); ok {
		tj = q.Format(t, 3)
		if x.Flags&(fit.FlagRthJCEstimated|fit.FlagRthJAEstimated|fit.FlagNoRth) != 0 {
			tj = "~" + tj // an estimated thermal path: not a measured-looking number
		}
	} else {
		tj = "none"
	}
	pct := "–"
	if pout > 0 {
		pct = strconv.FormatFloat(100*float64(l.Total())/float64(pout), 'f', 2, 64)
	}
	rankNo := strconv.Itoa(i + 1)
	if x.Screened() {
		rankNo = "x"
	}
	row := []string{rankNo, name, fmtP(l.Conduction), fmtP(l.TurnOn), fmtP(l.TurnOff), fmtP(l.Coss),
		fmtP(l.DeadTime + l.Recovery), fmtP(l.GateRint), fmtP(l.Switch()), fmtP(l.Driver()), fmtP(l.Total()),
		tj, pct}
	if rf := &x.RF; rf.VPeak > 0 {
		pc := func(v q.Ratio) string { return strconv.FormatFloat(100*float64(v), 'f', 2, 64) }
		if rf.CRequired > 0 {
			row = append(row, q.Format(rf.VPeak, 3), q.Format(rf.CExternal, 3), q.Format(rf.FMax, 3))
		} else {
			zvs := "full"
			if !rf.ZVS {
				zvs = "from " + q.Format(rf.VResidual, 3)
			}
			row = append(row, q.Format(rf.VPeak, 3), zvs)
		}
		row = append(row, pc(rf.EffStage), pc(rf.EffWithDriver))
	}
	return append(row, strconv.Itoa(x.Flags.Estimates()), methods(x)+flagCodes(x.Flags))
}

// header returns the table's column names for the stage.
func header(pt *stage.Point) []string {
	h := append([]string(nil), tableHeader[:len(tableHeader)-2]...)
	switch pt.Stage.Topology {
	case stage.ClassE:
		h = append(h, "peak V", "C ext", "f max", "η stage %", "η +driver %")
	case stage.ClassD:
		h = append(h, "V", "ZVS", "η stage %", "η +driver %")
	}
	return append(h, tableHeader[len(tableHeader)-2:]...)
}

func (r *Ranking) table(w io.Writer, markdown bool) error {
	if !markdown {
		describePoint(w, r.Point, r.Source, r.Parts)
		fmt.Fprintln(w)
	}
	h := header(r.Point)
	align := make([]tw.Align, len(h))
	for i := range align {
		align[i] = tw.AlignRight
	}
	align[1], align[len(h)-1] = tw.AlignLeft, tw.AlignLeft
	opts := []tablewriter.Option{
		tablewriter.WithHeaderAutoFormat(tw.Off),
		tablewriter.WithHeader(h),
		tablewriter.WithRowAlignmentConfig(tw.CellAlignment{PerColumn: align}),
	}
	opts = withMarkdown(opts, markdown)
	t := tablewriter.NewTable(w, opts...)
	shown := r.Shown()
	for i := range shown {
		if err := t.Append(cells(tableRow(i, &shown[i], r.Point.Stage.Pout), markdown)); err != nil {
			return err
		}
	}
	if err := t.Render(); err != nil {
		return err
	}
	var screened []evaluate.Result
	for _, x := range r.Results {
		if x.Screened() {
			screened = append(screened, x)
		}
	}
	if len(screened) > 0 || len(r.SetAside) > 0 {
		n := max(r.Screened, len(screened))
		fmt.Fprintf(w, "\nset aside (%d):\n", n+len(r.SetAside))
		for _, a := range r.SetAside {
			fmt.Fprintf(w, "- %s\n", a)
		}
		for _, x := range screened {
			for _, reason := range x.Reasons() {
				fmt.Fprintf(w, "- %s\n", reason)
			}
		}
		if n > len(screened) {
			fmt.Fprintf(w, "… and %d more (the lowest-loss %d shown)\n", n-len(screened), len(screened))
		}
	}
	if f := flagsUsed(shown); len(f) > 0 && !markdown {
		fmt.Fprintln(w, "\nflags:")
		for _, line := range f {
			fmt.Fprintf(w, "  %s\n", line)
		}
	}
	return nil
}

// flagsUsed explains each flag code that appears in the shown rows.
func flagsUsed(rs []evaluate.Result) []string {
	var all fit.Flags
	for _, x := range rs {
		all |= x.Flags
	}
	all &^= fit.FlagQrrInModel
	var out []string
	for bit := fit.Flags(1); bit != 0 && all != 0; bit <<= 1 {
		if all&bit == 0 {
			continue
		}
		all &^= bit
		out = append(out, fmt.Sprintf("%-10s %s", bit.Codes(), bit.Sentences()[0]))
	}
	return out
}

// textWithLeaders writes the ranking as a table (text or Markdown) with
// the worst case of the leaders and the price-loss front after it.
func (r *Ranking) textWithLeaders(w io.Writer, format string, cs []decide.Candidate, note string, front []int, unit func(float64) string) error {
	if err := r.Write(w, format); err != nil {
		return err
	}
	var worstLines []string
	for _, c := range cs {
		switch {
		case c.Worst != nil:
			worstLines = append(worstLines, fmt.Sprintf("- %s: typical %s, worst case %s", c.Name(), unit(c.Chosen.Key()), unit(c.Worst.Key())))
		case c.WorstReason != "":
			worstLines = append(worstLines, fmt.Sprintf("- %s: typical %s, worst case not evaluated: %s", c.Name(), unit(c.Chosen.Key()), c.WorstReason))
		case c.NoMax:
			// Unknown is not zero: a leader without maximum values is
			// listed with its worst case unknown, never left out.
			worstLines = append(worstLines, fmt.Sprintf("- %s: typical %s, worst case unknown (no rds_on_max, qg_max or vgs_th_max)", c.Name(), unit(c.Chosen.Key())))
		}
	}
	if len(worstLines) > 0 {
		fmt.Fprintln(w, "\nworst case (rds_on_max, qg_max, vgs_th_max in place of the typical values), leading parts:")
		for _, l := range worstLines {
			fmt.Fprintln(w, l)
		}
		if note != "" {
			fmt.Fprintln(w, note)
		}
	}
	if len(front) > 0 {
		fmt.Fprintln(w, "\nprice against loss, the parts shown that no other beats on both:")
		for _, i := range front {
			fmt.Fprintf(w, "- %s: price %s, loss %s\n", cs[i].Name(), fmtPrice(cs[i].Dev.Part.Price.V), unit(cs[i].Chosen.Key()))
		}
	}
	return nil
}

func (r *Decisions) header() []string {
	h := []string{"#", "part"}
	if r.Parallel {
		h = append(h, "N")
	}
	if pr := r.Plan.Profile; pr != nil {
		for _, p := range pr.Points {
			h = append(h, "η "+p.Name)
		}
		h = append(h, "weighted η %", "weighted loss %")
		if r.Parallel {
			h = append(h, "single: weighted η %")
		}
	} else {
		h = append(h, "conduction", "switching", "output cap", "diode", "gate+driver", "total")
		if r.Parallel {
			h = append(h, "single device")
		}
		h = append(h, "% of Pout")
	}
	h = append(h, "worst case", "Tj max", "price", "flags")
	return h
}

func (r *Decisions) row(i int, c *decide.Candidate) []string {
	no := strconv.Itoa(i + 1)
	if c.Screened() {
		no = "x"
	}
	name := c.Name()
	if c.Single.Res.Partner != nil {
		name += " + " + c.Single.Res.Partner.Part.Name
	}
	row := []string{no, name}
	if r.Parallel {
		row = append(row, strconv.Itoa(c.N))
	}
	if r.Plan.Profile != nil {
		for _, e := range c.Chosen.W.Eff {
			row = append(row, pct(e))
		}
		row = append(row, strconv.FormatFloat(100*c.Chosen.W.Weighted, 'f', 3, 64), strconv.FormatFloat(100*c.Chosen.W.LossFraction, 'f', 3, 64))
		if r.Parallel {
			row = append(row, strconv.FormatFloat(100*c.Single.W.Weighted, 'f', 3, 64))
		}
	} else {
		l := c.Chosen.Res.Losses
		row = append(row, fmtP(l.Conduction), fmtP(l.TurnOn+l.TurnOff), fmtP(l.Coss), fmtP(l.DeadTime+l.Recovery),
			fmtP(l.GateRint+l.Driver()), fmtP(l.Total()))
		if r.Parallel {
			row = append(row, fmtP(c.Single.Res.Losses.Total()))
		}
		p := "–"
		if po := r.Plan.Point.Stage.Pout; po > 0 {
			p = strconv.FormatFloat(100*float64(l.Total())/float64(po), 'f', 2, 64)
		}
		row = append(row, p)
	}
	worst := "–"
	switch {
	case c.Worst != nil && r.Plan.Profile != nil:
		worst = strconv.FormatFloat(100*c.Worst.W.Weighted, 'f', 3, 64) + " %"
	case c.Worst != nil:
		worst = fmtP(c.Worst.Res.Losses.Total())
	case c.WorstReason != "":
		worst = "not evaluated"
	case c.NoMax:
		worst = "no max"
	}
	tj := "none"
	if t, ok := c.Chosen.Tj(); ok {
		tj = q.Format(t, 3)
	}
	price := "–"
	if p := c.Dev.Part.Price; p.OK {
		price = fmtPrice(p.V)
	}
	return append(row, worst, tj, price, strings.TrimSpace(flagCodes(c.Chosen.Flags())))
}

func (r *Decisions) table(w io.Writer, markdown bool) error {
	if !markdown {
		r.describe(w)
		fmt.Fprintln(w)
	}
	if err := writeTable(w, r.header(), r.rows(), markdown); err != nil {
		return err
	}
	r.sections(w)
	return nil
}

func (r *Decisions) rows() [][]string {
	var rows [][]string
	for i, c := range r.Shown() {
		rows = append(rows, r.row(i, c))
	}
	return rows
}

// sections prints the set-aside parts, the spread of the leaders and the
// price-loss front.
func (r *Decisions) sections(w io.Writer) {
	var screened []*decide.Candidate
	for i := range r.Candidates {
		if r.Candidates[i].Screened() {
			screened = append(screened, &r.Candidates[i])
		}
	}
	if len(screened) > 0 || len(r.SetAside) > 0 {
		fmt.Fprintf(w, "\nset aside (%d):\n", len(screened)+len(r.SetAside))
		for _, a := range r.SetAside {
			fmt.Fprintf(w, "- %s\n", a)
		}
		for _, c := range screened {
			for _, s := range r.reasons(c) {
				fmt.Fprintf(w, "- %s\n", s)
			}
		}
	}
	var worstWhy []string
	for i := range r.Candidates {
		if c := &r.Candidates[i]; c.WorstReason != "" {
			worstWhy = append(worstWhy, "- "+c.Name()+": "+c.WorstReason)
		}
	}
	if len(worstWhy) > 0 {
		fmt.Fprintln(w, "\nworst case not evaluated:")
		fmt.Fprintln(w, strings.Join(worstWhy, "\n"))
	}
	if note, _ := spreadNote(r.Candidates, r.unit); note != "" {
		fmt.Fprintf(w, "\ntypical against worst case (rds_on_max, qg_max, vgs_th_max): %s\n", note)
	}
	if f := decide.PriceFront(r.Candidates); len(f) > 0 {
		fmt.Fprintln(w, "\nprice against loss, the parts no other part beats on both (N × price when paralleled):")
		for _, i := range f {
			c := &r.Candidates[i]
			fmt.Fprintf(w, "- %s: price %s, loss %s\n", c.Name(), fmtPrice(c.Dev.Part.Price.V), r.unit(c.Chosen.Key()))
		}
	}
}

func (r *Comparison) table(w io.Writer, markdown bool) error {
	if !markdown {
		describePoint(w, r.Point, r.Source, r.Parts)
		if r.Point.Mode != stage.ModeGiven {
			fmt.Fprintf(w, "conduction mode: %s\n", r.Point.Mode)
		}
	}
	f := &r.Fitted
	fmt.Fprintf(w, "\nfitted %s: total %s", f.Dev.Part.Name, watts(float64(f.Losses.Total())))
	if t, ok := f.Tj(); ok {
		fmt.Fprintf(w, ", Tj %s", q.Format(t, 3))
	}
	if po := r.Point.Stage.Pout; po > 0 {
		fmt.Fprintf(w, ", efficiency %.2f %%", 100*float64(po)/float64(po+f.Losses.Total()))
	}
	if f.Screened() {
		fmt.Fprintf(w, " (set aside: %s)", strings.Join(decide.ScreenNames(f.Screens), ", "))
	}
	fmt.Fprintln(w)
	fmt.Fprintln(w)
	cols := r.columns()
	comps := decide.Components()
	header := []string{"candidate", "total"}
	for _, j := range cols {
		header = append(header, "Δ "+comps[j].Name)
	}
	header = append(header, "Tj", "Δ Tj", "efficiency", "Δ efficiency")
	var rows [][]string
	for _, c := range r.Candidates {
		row := []string{c.Cand.Dev.Part.Name, watts(float64(c.Cand.Losses.Total()))}
		if c.Cand.Screened() || f.Screened() {
			// A result set aside is not a valid operating point: no
			// component is diffed against it (the verdict says why).
			row[1] = "set aside"
			for range cols {
				row = append(row, "–")
			}
			rows = append(rows, append(row, "–", "–", "–", "–"))
			continue
		}
		for _, j := range cols {
			row = append(row, fmtDelta(c.Deltas[j], watts))
		}
		tj, dtj := "none", "–"
		if t, ok := c.Cand.Tj(); ok {
			tj = q.Format(t, 3)
		}
		if c.Tj != nil {
			dtj = signOf(c.Tj.Abs) + strconv.FormatFloat(math.Abs(c.Tj.Abs), 'f', 1, 64) + " K"
		}
		eff, deff := "–", "–"
		if c.Eff != nil {
			eff = strconv.FormatFloat(100*c.Eff.Cand, 'f', 2, 64) + " %"
			deff = signOf(c.Eff.Abs) + strconv.FormatFloat(100*math.Abs(c.Eff.Abs), 'f', 2, 64) + " points"
		}
		rows = append(rows, append(row, tj, dtj, eff, deff))
	}
	if err := writeTable(w, header, rows, markdown); err != nil {
		return err
	}
	fmt.Fprintln(w)
	for _, c := range r.Candidates {
		fmt.Fprintf(w, "- %s: %s\n", c.Cand.Dev.Part.Name, c.Verdict)
	}
	return nil
}

func (r *Sweep) cell(k, i int) string {
	t, ok := r.Result.Total(k, i)
	s := q.Format(q.Power(t), 3)
	if !ok {
		s = "(" + s + ")"
	}
	return s
}

func (r *Sweep) table(w io.Writer, markdown bool) error {
	if !markdown {
		r.describe(w)
		fmt.Fprintln(w)
	}
	b := r.Result.Best(r.Set)
	var header []string
	var rows [][]string
	if r.Components {
		header = []string{r.varHeader(), "part", "conduction", "switching", "output cap", "diode", "gate+driver", "total", "Tj", "set aside"}
		for i, x := range r.Result.X {
			for _, k := range r.Set {
				res := r.Result.Evaluate(k, i)
				l := res.Losses
				tj := "none"
				if t, ok := res.Tj(); ok {
					tj = q.Format(t, 3)
				}
				rows = append(rows, []string{fmtX(r.Result.Spec.Var, x), r.name(k), fmtP(l.Conduction), fmtP(l.TurnOn + l.TurnOff),
					fmtP(l.Coss), fmtP(l.DeadTime + l.Recovery), fmtP(l.GateRint + l.Driver()), fmtP(l.Total()), tj,
					strings.Join(decide.ScreenNames(res.Screens), ", ")})
			}
		}
	} else {
		header = []string{r.varHeader()}
		for _, k := range r.Set {
			header = append(header, r.name(k))
		}
		header = append(header, "best")
		for i, x := range r.Result.X {
			row := []string{fmtX(r.Result.Spec.Var, x)}
			for _, k := range r.Set {
				row = append(row, r.cell(k, i))
			}
			rows = append(rows, append(row, r.best(b, i)))
		}
	}
	if err := writeTable(w, header, rows, markdown); err != nil {
		return err
	}
	fmt.Fprintln(w)
	if len(r.Crossovers) == 0 {
		fmt.Fprintln(w, "no crossover: the best part is the same over the whole range (among the parts shown)")
		return nil
	}
	fmt.Fprintln(w, "crossovers, where the best part changes (bracketed on the grid, refined to 1e-6 relative):")
	for _, c := range r.Crossovers {
		fmt.Fprintf(w, "- at %s: %s → %s (%s, %s)\n", fmtX(r.Result.Spec.Var, c.X), r.name(c.From), r.name(c.To), c.Kind,
			q.Format(q.Power(c.Loss), 4))
	}
	return nil
}

// writeTable prints a table with tablewriter, as text or Markdown.
func writeTable(w io.Writer, header []string, rows [][]string, markdown bool) error {
	opts := []tablewriter.Option{
		tablewriter.WithHeaderAutoFormat(tw.Off),
		tablewriter.WithHeader(cells(slices.Clone(header), markdown)),
	}
	opts = withMarkdown(opts, markdown)
	t := tablewriter.NewTable(w, opts...)
	for _, row := range rows {
		if err := t.Append(cells(row, markdown)); err != nil {
			return err
		}
	}
	return t.Render()
}
