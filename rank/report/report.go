package report

import (
	"fmt"
	"io"
	"math"
	"strconv"
	"strings"

	q "swrank/devices/quantity"
	"swrank/rank"
	"swrank/rank/decide"
	"swrank/rank/evaluate"
	"swrank/rank/fit"
	"swrank/rank/stage"
)

// DefaultFormat is the output format when none is given: the text table.
const DefaultFormat = "table"

// CheckFormat reports an error unless f names an output format: table,
// csv, json or markdown (in any case).
func CheckFormat(f string) error {
	switch strings.ToLower(f) {
	case "table", "csv", "json", "markdown":
		return nil
	}
	return fmt.Errorf("--format %q: want table, csv, json or markdown", f)
}

// Ranking is a plain ranking at one operating point: what rank prints
// without a load profile, paralleling or valley switching.
type Ranking struct {
	Point    *stage.Point      // the resolved operating point
	Source   string            // the library's name
	Parts    int               // parts in the library
	Results  []evaluate.Result // in rank order (all of them, or the leaders kept)
	SetAside []rank.SetAside   // parts not evaluated, with the reason (always listed)
	Screened int               // screened parts in the library (0: count the results)
	All      bool              // list the screened parts too
	Top      int               // list only the best Top parts (0: all)
}

// Shown returns the results the table lists.
func (r *Ranking) Shown() []evaluate.Result {
	var out []evaluate.Result
	for _, x := range r.Results {
		if x.Screened() && !r.All {
			continue
		}
		out = append(out, x)
		if r.Top > 0 && len(out) == r.Top {
			break
		}
	}
	return out
}

// Write writes the ranking in format: table (the default for any other
// name), csv, json or markdown.
func (r *Ranking) Write(w io.Writer, format string) error {
	switch strings.ToLower(format) {
	case "json":
		return r.json(w)
	case "csv":
		return r.csv(w)
	case "markdown":
		return guardText(w, r.markdown)
	}
	return guardText(w, func(w io.Writer) error { return r.table(w, false) })
}

// WriteWithLeaders writes the ranking with the worst case of its leading
// parts and the price-loss front of the parts shown (cs from
// decide.Leaders, for the results of Shown): after the table (text and
// Markdown), as extra columns (CSV) or extra members (JSON). With cs nil
// it is Write.
func (r *Ranking) WriteWithLeaders(w io.Writer, format string, cs []decide.Candidate) error {
	if cs == nil {
		return r.Write(w, format)
	}
	unit := func(v float64) string { return q.Format(q.Power(v), 3) }
	note, spread := spreadNote(cs, unit)
	front := decide.PriceFront(cs)
	switch strings.ToLower(format) {
	case "json":
		return r.jsonWithLeaders(w, cs, note, spread, front)
	case "csv":
		return r.csvWithLeaders(w, cs, front)
	}
	return guardText(w, func(w io.Writer) error { return r.textWithLeaders(w, format, cs, note, front, unit) })
}

// Decisions is the decision path of rank: parts at one point or over a
// load profile, each alone and at its paralleled count, with the
// worst case of the leaders and the price-loss front.
type Decisions struct {
	Plan       *decide.Plan       // the point or profile evaluated
	Candidates []decide.Candidate // in rank order (decide.EvaluateAll, decide.AddWorst)
	SetAside   []rank.SetAside    // parts not evaluated, with the reason (always listed)
	Source     string             // the library's name
	Parts      int                // parts in the library
	All        bool               // list the screened parts too
	Top        int                // list only the best Top parts (0: all)
	Parallel   bool               // counts other than 1 were tried
	Auto       bool               // each part's count was chosen (the least loss)
}

// Shown returns the candidates the table lists.
func (r *Decisions) Shown() []*decide.Candidate {
	var out []*decide.Candidate
	for i := range r.Candidates {
		c := &r.Candidates[i]
		if c.Screened() && !r.All {
			continue
		}
		out = append(out, c)
		if r.Top > 0 && len(out) == r.Top {
			break
		}
	}
	return out
}

// Write writes the decisions in format: table (the default for any other
// name), csv, json or markdown.
func (r *Decisions) Write(w io.Writer, format string) error {
	switch strings.ToLower(format) {
	case "json":
		return r.json(w)
	case "csv":
		return r.csv(w)
	case "markdown":
		return guardText(w, r.markdown)
	}
	return guardText(w, func(w io.Writer) error { return r.table(w, false) })
}

// unit prints a key value: watts at one point, % of the output power over
// a profile.
func (r *Decisions) unit(v float64) string {
	if r.Plan.Profile != nil {
		return strconv.FormatFloat(100*v, 'f', 3, 64) + " %"
	}
	return q.Format(q.Power(v), 3)
}

func (r *Decisions) keyUnit() string {
	if r.Plan.Profile != nil {
		return "fraction of pout (1 − weighted efficiency)"
	}
	return "W"
}

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

// Comparison is compare's verdict: candidates judged against the part
// already fitted, at one operating point.
type Comparison struct {
	Point      *stage.Point        // the resolved operating point
	Source     string              // the library's name
	Parts      int                 // parts in the library
	Fitted     evaluate.Result     // the part already fitted
	Candidates []decide.Comparison // each candidate against Fitted, in rank order
}

// Write writes the comparison in format: table (the default for any other
// name), csv, json or markdown.
func (r *Comparison) Write(w io.Writer, format string) error {
	switch strings.ToLower(format) {
	case "json":
		return r.json(w)
	case "csv":
		return r.csv(w)
	case "markdown":
		return guardText(w, r.markdown)
	}
	return guardText(w, func(w io.Writer) error { return r.table(w, false) })
}

// columns returns the components worth a column: those non-zero for the
// fitted part or any candidate (the total always).
func (r *Comparison) columns() []int {
	var out []int
	comps := decide.Components()
	for j := range comps {
		keep := j == len(comps)-1
		for _, c := range r.Candidates {
			if c.Deltas[j].Fitted != 0 || c.Deltas[j].Cand != 0 {
				keep = true
			}
		}
		if keep {
			out = append(out, j)
		}
	}
	return out
}

// Sweep is a sweep of one stage variable: the losses of a set of parts
// over the grid and the crossovers where the best part changes.
type Sweep struct {
	Result     *decide.SweepResult // the swept parts at every grid point
	Set        []int               // the parts shown, indices into Result.Devs
	Crossovers []decide.Crossover  // Result.Crossovers of Set
	Components bool                // show each loss component per part and point
	Source     string              // the library's name
	Parts      int                 // parts in the library
}

// Write writes the sweep in format: table (the default for any other
// name), csv, json or markdown.
func (r *Sweep) Write(w io.Writer, format string) error {
	switch strings.ToLower(format) {
	case "json":
		return r.json(w)
	case "csv":
		return r.csv(w)
	case "markdown":
		return guardText(w, r.markdown)
	}
	return guardText(w, func(w io.Writer) error { return r.table(w, false) })
}

func (r *Sweep) name(k int) string { return r.Result.Devs[k].Part.Name }

func (r *Sweep) varHeader() string {
	v := r.Result.Spec.Var
	return v.String() + " (" + v.Unit() + ")"
}

// best returns the best part's name at grid point i ("none" when every
// part is set aside).
func (r *Sweep) best(b []int, i int) string {
	if b[i] < 0 {
		return "none"
	}
	return r.name(b[i])
}

// WriteExplain writes one part's whole calculation at pt: its result r
// and the trace tr of the same evaluation, as text (format table) or JSON
// (format json).
func WriteExplain(w io.Writer, format string, pt *stage.Point, r *evaluate.Result, tr *evaluate.Trace) error {
	if format == "json" {
		return explainJSON(w, pt, r, tr)
	}
	return guardText(w, func(w io.Writer) error { return explainText(w, pt, r, tr) })
}

// fmtP prints a power with an SI prefix, "–" for exactly zero.
func fmtP(p q.Power) string {
	if p == 0 {
		return "–"
	}
	return q.Format(p, 3)
}

func methods(x *evaluate.Result) string {
	m := x.Devices[0].Method.String()
	if x.N > 1 && x.Devices[1].Dev != x.Devices[0].Dev && x.Devices[1].Method != x.Devices[0].Method {
		m += "/" + x.Devices[1].Method.String()
	}
	return m
}

func flagCodes(f fit.Flags) string {
	f &^= fit.FlagQrrInModel
	if c := f.Codes(); c != "" {
		return " " + c
	}
	return ""
}

func placeWord(pt *stage.Point) string {
	if !pt.HasSync {
		return "control switch"
	}
	switch pt.Stage.Position {
	case stage.Control:
		return "control switch (whole-stage loss)"
	case stage.Sync:
		return "sync switch (whole-stage loss)"
	}
	return "pair: the part in both places"
}

// spreadNote says whether the winner's lead outweighs its own spread
// between typical and worst-case values ("" when it cannot be told).
func spreadNote(cs []decide.Candidate, unit func(float64) string) (string, *decide.Spread) {
	s := decide.LeaderSpread(cs)
	if s == nil {
		return "", nil
	}
	a, b := cs[0].Name(), cs[1].Name()
	if s.Clear {
		return fmt.Sprintf("%s leads %s by %s, more than its own spread from typical to worst-case values (%s): a clear choice",
			a, b, unit(float64(s.Lead)), unit(float64(s.Width))), s
	}
	return fmt.Sprintf("%s leads %s by %s, less than its own spread from typical to worst-case values (%s): a coin toss between them",
		a, b, unit(float64(s.Lead)), unit(float64(s.Width))), s
}

func fmtPrice(v float64) string { return strconv.FormatFloat(v, 'f', 2, 64) }

func pct(v float64) string { return strconv.FormatFloat(100*v, 'f', 2, 64) }

// fmtDelta prints a change with its sign and the relative change.
func fmtDelta(d decide.Delta, format func(float64) string) string {
	if d.Abs == 0 {
		return "0"
	}
	s := signOf(d.Abs) + format(math.Abs(d.Abs))
	switch {
	case d.Relative:
		s += fmt.Sprintf(" (%s%.1f %%)", signOf(d.Rel), 100*math.Abs(d.Rel))
	default:
		s += " (new)"
	}
	return s
}

func signOf(v float64) string {
	if v < 0 {
		return "−"
	}
	return "+"
}

func watts(v float64) string { return q.Format(q.Power(v), 3) }

// fmtX prints a value of the swept variable with its unit.
func fmtX(v decide.SweepVar, x float64) string {
	switch v {
	case decide.SweepFsw:
		return q.Format(q.Frequency(x), 4)
	case decide.SweepIout:
		return q.Format(q.Current(x), 4)
	}
	return q.Format(q.Voltage(x), 4)
}
