package main

import (
	"errors"
	"fmt"
	"io"
	"math"
	"slices"
	"strconv"
	"strings"

	q "swrank/devices/quantity"
	"swrank/rank"
	"swrank/rank/decide"
	"swrank/rank/evaluate"
	"swrank/rank/fit"
	"swrank/rank/stage"
)

const compareSynopsis = `compare --fitted PART [CANDIDATE ...] [--parts FILE.csv | --demo | --design FILE.toml] [stage, driver, thermal and output flags as for rank]`

// runCompare judges candidates against the part already fitted.
func runCompare(args []string, stdout, stderr io.Writer) error {
	var in inputs
	var dec decisionFlags
	var fitted string
	fs := newFlagSet("compare", compareSynopsis, stderr)
	in.register(fs)
	in.registerOutput(fs)
	dec.register(fs)
	fs.StringVar(&fitted, "fitted", "", "the `PART` already fitted, which every candidate is judged against (required)")
	if err := parse(fs, args); err != nil {
		return err
	}
	if err := dec.apply(fs, &in); err != nil {
		return err
	}
	if fitted == "" {
		fs.Usage()
		return fmt.Errorf("%w: compare needs --fitted PART", errUsage)
	}
	if dec.multi() {
		return errors.New("compare works at one operating point: drop --weighting or the design's [[point]] tables (rank ranks over a profile)")
	}
	if p := strings.TrimSpace(dec.parallel); p != "" && p != "1" {
		return errors.New("compare judges single devices: drop --parallel (rank --parallel shows paralleled parts)")
	}
	plan, devs, lib, err := preparePlan(&in, &dec, stderr)
	if err != nil {
		return err
	}
	fd, err := findDevice(devs, fitted)
	if err != nil {
		return fmt.Errorf("--fitted: %w", err)
	}
	var cands []*fit.Device
	if fs.NArg() == 0 {
		for i := range devs {
			if &devs[i] != fd {
				cands = append(cands, &devs[i])
			}
		}
	} else {
		for _, name := range fs.Args() {
			d, err := findDevice(devs, name)
			if err != nil {
				return err
			}
			if !slices.Contains(cands, d) {
				cands = append(cands, d)
			}
		}
	}
	fr := evaluate.Evaluate(plan.Point, fd, plan.Partner, nil)
	res := make([]evaluate.Result, len(cands))
	for i, d := range cands {
		res[i] = evaluate.Evaluate(plan.Point, d, plan.Partner, nil)
	}
	slices.SortStableFunc(res, rank.Compare)
	cr := compareReport{pt: plan.Point, source: lib.source, parts: len(devs), fitted: fr, top: in.top}
	pout := plan.Point.Stage.Pout
	for i := range res {
		if in.top > 0 && i == in.top {
			break
		}
		cr.cmps = append(cr.cmps, decide.CompareParts(&cr.fitted, &res[i], pout))
	}
	switch strings.ToLower(in.format) {
	case "json":
		return cr.json(stdout)
	case "csv":
		return cr.csv(stdout)
	case "markdown":
		return cr.table(stdout, true)
	}
	return cr.table(stdout, false)
}

type compareReport struct {
	pt     *stage.Point
	source string
	parts  int
	fitted evaluate.Result
	cmps   []decide.Comparison
	top    int
}

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

// columns returns the components worth a column: those non-zero for the
// fitted part or any candidate (the total always).
func (r *compareReport) columns() []int {
	var out []int
	comps := decide.Components()
	for j := range comps {
		keep := j == len(comps)-1
		for _, c := range r.cmps {
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

func (r *compareReport) table(w io.Writer, markdown bool) error {
	if !markdown {
		describePoint(w, r.pt, r.source, r.parts)
		if r.pt.Mode != stage.ModeGiven {
			fmt.Fprintf(w, "conduction mode: %s\n", r.pt.Mode)
		}
	}
	f := &r.fitted
	fmt.Fprintf(w, "\nfitted %s: total %s", f.Dev.Part.Name, watts(float64(f.Losses.Total())))
	if t, ok := f.Tj(); ok {
		fmt.Fprintf(w, ", Tj %s", q.Format(t, 3))
	}
	if po := r.pt.Stage.Pout; po > 0 {
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
	for _, c := range r.cmps {
		row := []string{c.Cand.Dev.Part.Name, watts(float64(c.Cand.Losses.Total()))}
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
	for _, c := range r.cmps {
		fmt.Fprintf(w, "- %s: %s\n", c.Cand.Dev.Part.Name, c.Verdict)
	}
	return nil
}

func csvName(s string) string {
	s = strings.NewReplacer(" ", "_", "(", "", ")", "", "+", "_", "-", "_").Replace(s)
	return strings.Trim(s, "_")
}

func (r *compareReport) csv(w io.Writer) error {
	comps := decide.Components()
	header := []string{"candidate", "fitted"}
	for _, c := range comps {
		n := csvName(c.Name)
		header = append(header, n+"_w", n+"_fitted_w", n+"_delta_w", n+"_delta_rel")
	}
	header = append(header, "tj_degc", "tj_delta_k", "eff", "eff_delta", "new_screens", "package_differs", "screened", "verdict")
	cw := newSafeCSV(w)
	if err := cw.Write(header); err != nil {
		return err
	}
	for _, c := range r.cmps {
		row := []string{c.Cand.Dev.Part.Name, r.fitted.Dev.Part.Name}
		for _, d := range c.Deltas {
			rel := ""
			if d.Relative {
				rel = num(d.Rel)
			}
			row = append(row, num(d.Cand), num(d.Fitted), num(d.Abs), rel)
		}
		tj, dtj, eff, deff := "", "", "", ""
		if t, ok := c.Cand.Tj(); ok {
			tj = num(float64(t))
		}
		if c.Tj != nil {
			dtj = num(c.Tj.Abs)
		}
		if c.Eff != nil {
			eff, deff = num(c.Eff.Cand), num(c.Eff.Abs)
		}
		row = append(row, tj, dtj, eff, deff, strings.Join(decide.ScreenNames(c.NewScreens), "; "),
			strconv.FormatBool(c.PackageDiffers), strconv.FormatBool(c.Cand.Screened()), c.Verdict)
		if err := cw.Write(row); err != nil {
			return err
		}
	}
	cw.Flush()
	return cw.Error()
}

type jsonDelta struct {
	Component string   `json:"component"`
	FittedW   float64  `json:"fitted_w"`
	CandW     float64  `json:"candidate_w"`
	DeltaW    float64  `json:"delta_w"`
	DeltaRel  *float64 `json:"delta_rel"`
}

type jsonComparison struct {
	Candidate      string      `json:"candidate"`
	TotalW         float64     `json:"total_w"`
	Deltas         []jsonDelta `json:"deltas"`
	TjDegC         *float64    `json:"tj_degc"`
	TjDeltaK       *float64    `json:"tj_delta_k"`
	Eff            *float64    `json:"eff,omitempty"`
	EffDelta       *float64    `json:"eff_delta,omitempty"`
	Decides        string      `json:"decided_by,omitempty"`
	NewScreens     []string    `json:"new_screens"`
	PackageDiffers bool        `json:"package_differs"`
	Screened       bool        `json:"screened"`
	Reasons        []string    `json:"reasons"`
	Verdict        string      `json:"verdict"`
}

type jsonCompare struct {
	OperatingPoint jsonPointMode    `json:"operating_point"`
	Library        string           `json:"library"`
	Fitted         jsonResult       `json:"fitted"`
	Candidates     []jsonComparison `json:"candidates"`
}

func (r *compareReport) json(w io.Writer) error {
	out := jsonCompare{OperatingPoint: withMode(pointJSON(r.pt), r.pt.Mode), Library: r.source,
		Fitted: resultJSON(0, &r.fitted, r.pt.Stage.Pout), Candidates: []jsonComparison{}}
	for _, c := range r.cmps {
		j := jsonComparison{Candidate: c.Cand.Dev.Part.Name, TotalW: float64(c.Cand.Losses.Total()), Decides: c.Decides,
			NewScreens: decide.ScreenNames(c.NewScreens), PackageDiffers: c.PackageDiffers, Screened: c.Cand.Screened(),
			Reasons: c.Cand.Reasons(), Verdict: c.Verdict}
		if j.NewScreens == nil {
			j.NewScreens = []string{}
		}
		if j.Reasons == nil {
			j.Reasons = []string{}
		}
		for _, d := range c.Deltas {
			jd := jsonDelta{Component: d.Name, FittedW: d.Fitted, CandW: d.Cand, DeltaW: d.Abs}
			if d.Relative {
				jd.DeltaRel = ptr(d.Rel)
			}
			j.Deltas = append(j.Deltas, jd)
		}
		if t, ok := c.Cand.Tj(); ok {
			j.TjDegC = ptr(float64(t))
		}
		if c.Tj != nil {
			j.TjDeltaK = ptr(c.Tj.Abs)
		}
		if c.Eff != nil {
			j.Eff, j.EffDelta = ptr(c.Eff.Cand), ptr(c.Eff.Abs)
		}
		out.Candidates = append(out.Candidates, j)
	}
	return writeJSON(w, out)
}
