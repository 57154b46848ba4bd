package main

import (
	"bytes"
	"cmp"
	"encoding/csv"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"runtime"
	"slices"
	"strconv"
	"strings"

	"github.com/olekukonko/tablewriter"
	"github.com/olekukonko/tablewriter/renderer"
	"github.com/olekukonko/tablewriter/tw"

	q "swrank/devices/quantity"
	"swrank/rank"
	"swrank/rank/decide"
	"swrank/rank/evaluate"
	"swrank/rank/fit"
	"swrank/rank/stage"
)

// The decision path of rank: several weighted points, paralleled devices
// and valley switching, with the typical-against-worst-case spread of the
// leaders and the price-loss front. The plain ranking gets the last two as
// decorations of its own output (decorate).

// worstLeaders is how many leading parts get a worst-case evaluation.
const worstLeaders = 10

// eval is one part (at one count) at the stage: one point or a profile.
type eval struct {
	res  evaluate.Result       // single point
	w    decide.WeightedResult // profile
	prof bool
}

func (e *eval) screened() bool {
	if e.prof {
		return e.w.Screened()
	}
	return e.res.Screened()
}

// key orders evaluations, smaller first: the total loss, W, at one point;
// the weighted loss fraction 1 − Σ wᵢ·ηᵢ over a profile.
func (e *eval) key() float64 {
	if e.prof {
		return 1 - e.w.Weighted
	}
	return float64(e.res.Losses.Total())
}

func (e *eval) tj() (q.Temperature, bool) {
	if e.prof {
		return e.w.Tj()
	}
	return e.res.Tj()
}

func (e *eval) flags() fit.Flags {
	if e.prof {
		return e.w.Flags
	}
	return e.res.Flags
}

// candidate is one library part in the decision path.
type candidate struct {
	base   *fit.Device
	n      int // the count shown
	dev    *fit.Device
	single eval // one device
	chosen eval // n devices
	tried  []float64
	worst  *eval // worst-case values of the chosen count (leaders only)
	noMax  bool  // the part gives no maximum values
}

func (c *candidate) name() string { return c.dev.Part.Name }

// stagePlan is what the decision commands evaluate.
type stagePlan struct {
	pt      *stage.Point    // the (rated) point
	prof    *decide.Profile // nil: one point
	partner *fit.Device
}

func (p *stagePlan) evaluate(d *fit.Device) eval {
	if p.prof != nil {
		return eval{w: decide.EvaluateProfile(p.prof, d, p.partner), prof: true}
	}
	return eval{res: evaluate.Evaluate(p.pt, d, p.partner, nil)}
}

// better reports whether a beats b for the choice of a count: passing
// first, then the key, ties to the smaller count (b, tried first).
func better(a, b *eval) bool {
	if a.screened() != b.screened() {
		return !a.screened()
	}
	return a.key() < b.key()
}

// evaluateAll evaluates every device at every count and keeps the chosen
// one; the order of the result is the rank order.
func evaluateAll(plan *stagePlan, devs []fit.Device, counts []int, auto bool) ([]candidate, error) {
	out := make([]candidate, len(devs))
	errs := make([]error, len(devs))
	work := func(i int) {
		c := candidate{base: &devs[i], n: 1, dev: &devs[i]}
		for _, n := range counts {
			d := &devs[i]
			if n > 1 {
				dn, err := decide.Parallel(d, n)
				if err != nil {
					errs[i] = err
					return
				}
				d = &dn
			}
			e := plan.evaluate(d)
			c.tried = append(c.tried, e.key())
			switch {
			case n == 1:
				c.single, c.chosen = e, e
			case !auto || better(&e, &c.chosen):
				c.n, c.dev, c.chosen = n, d, e
			}
		}
		out[i] = c
	}
	rank.ForChunks(len(devs), runtime.GOMAXPROCS(0), 1, func(lo, hi int) {
		for i := lo; i < hi; i++ {
			work(i)
		}
	})
	if err := errors.Join(errs...); err != nil {
		return nil, err
	}
	slices.SortStableFunc(out, func(a, b candidate) int {
		if sa, sb := a.chosen.screened(), b.chosen.screened(); sa != sb {
			if sa {
				return 1
			}
			return -1
		}
		if c := cmp.Compare(a.chosen.key(), b.chosen.key()); c != 0 {
			return c
		}
		return cmp.Compare(a.name(), b.name())
	})
	return out, nil
}

// addWorst evaluates the worst-case values of the first passing leaders.
func addWorst(plan *stagePlan, cs []candidate) error {
	k := 0
	for i := range cs {
		if k == worstLeaders || cs[i].chosen.screened() {
			break
		}
		k++
		w, ok, err := decide.WorstCase(cs[i].dev)
		if err != nil {
			return fmt.Errorf("%s: %w", cs[i].name(), err)
		}
		if !ok {
			cs[i].noMax = true
			continue
		}
		e := plan.evaluate(&w)
		cs[i].worst = &e
	}
	return nil
}

// spreadNote says whether the winner's lead outweighs its own spread
// between typical and worst-case values ("" when it cannot be told).
func spreadNote(cs []candidate, unit func(float64) string) (string, *decide.Spread) {
	if len(cs) < 2 || cs[0].chosen.screened() || cs[1].chosen.screened() || cs[0].worst == nil {
		return "", nil
	}
	runnerWorst := cs[1].chosen.key()
	if cs[1].worst != nil {
		runnerWorst = cs[1].worst.key()
	}
	s := decide.SpreadOf(q.Power(cs[0].chosen.key()), q.Power(cs[0].worst.key()), q.Power(cs[1].chosen.key()), q.Power(runnerWorst))
	a, b := cs[0].name(), cs[1].name()
	if s.Clear {
		return fmt.Sprintf("%s leads %s by %s, more than its own spread from typical to worst-case values (%s): a clear choice",
			a, b, unit(float64(s.Lead)), unit(float64(s.Width))), &s
	}
	return fmt.Sprintf("%s leads %s by %s, less than its own spread from typical to worst-case values (%s): a coin toss between them",
		a, b, unit(float64(s.Lead)), unit(float64(s.Width))), &s
}

// frontOf returns the price-loss front of the passing candidates that
// carry a price (N × price when paralleled), in increasing price.
func frontOf(cs []candidate) []int {
	var idx []int
	var items []decide.PriceLoss
	for i := range cs {
		p := cs[i].dev.Part.Price
		if !p.OK || cs[i].chosen.screened() {
			continue
		}
		idx = append(idx, i)
		items = append(items, decide.PriceLoss{Price: p.V, Loss: cs[i].chosen.key()})
	}
	if len(items) < 2 {
		return nil
	}
	f := decide.ParetoFront(items)
	out := make([]int, len(f))
	for i, j := range f {
		out[i] = idx[j]
	}
	return out
}

func fmtPrice(v float64) string { return strconv.FormatFloat(v, 'f', 2, 64) }

// runRankDecisions is rank with several points, paralleling or valley
// switching.
func runRankDecisions(in *inputs, dec *decisionFlags, stdout, stderr io.Writer) error {
	plan, devs, lib, err := preparePlan(in, dec, stderr)
	if err != nil {
		return err
	}
	counts, auto, err := dec.parallelCounts()
	if err != nil {
		return err
	}
	cs, err := evaluateAll(plan, devs, counts, auto)
	if err != nil {
		return err
	}
	if err := addWorst(plan, cs); err != nil {
		return err
	}
	dr := decisionReport{plan: plan, cands: cs, source: lib.source, parts: len(devs), all: in.all, top: in.top,
		parallel: len(counts) > 1, auto: auto}
	switch strings.ToLower(in.format) {
	case "json":
		return dr.json(stdout)
	case "csv":
		return dr.csv(stdout)
	case "markdown":
		return dr.table(stdout, true)
	}
	return dr.table(stdout, false)
}

// library is what preparePlan loaded.
type libInfo struct{ source string }

// preparePlan resolves the stage (one point or a profile) and loads the
// library.
func preparePlan(in *inputs, dec *decisionFlags, stderr io.Writer) (*stagePlan, []fit.Device, libInfo, error) {
	if err := checkFormat(in.format); err != nil {
		return nil, nil, libInfo{}, err
	}
	pt, err := in.stage.ResolveLight(dec.lightLoad())
	if err != nil {
		return nil, nil, libInfo{}, fmt.Errorf("operating point: %w", err)
	}
	plan := &stagePlan{pt: &pt}
	if plan.prof, err = dec.profile(in.stage); err != nil {
		return nil, nil, libInfo{}, err
	}
	lib, devs, err := loadLibrary(in, stderr)
	if err != nil {
		return nil, nil, libInfo{}, err
	}
	if in.partner != "" {
		if !pt.HasSync {
			return nil, nil, libInfo{}, errors.New("--partner needs a synchronous buck or boost stage")
		}
		if plan.partner, err = findDevice(devs, in.partner); err != nil {
			return nil, nil, libInfo{}, fmt.Errorf("--partner: %w", err)
		}
	}
	return plan, devs, libInfo{source: lib.Source}, nil
}

// decisionReport is what the decision path of rank prints.
type decisionReport struct {
	plan     *stagePlan
	cands    []candidate
	source   string
	parts    int
	all      bool
	top      int
	parallel bool // counts other than 1 were tried
	auto     bool
}

func (r *decisionReport) shown() []*candidate {
	var out []*candidate
	for i := range r.cands {
		c := &r.cands[i]
		if c.chosen.screened() && !r.all {
			continue
		}
		out = append(out, c)
		if r.top > 0 && len(out) == r.top {
			break
		}
	}
	return out
}

// unit prints a key value: watts at one point, % of the output power over
// a profile.
func (r *decisionReport) unit(v float64) string {
	if r.plan.prof != nil {
		return strconv.FormatFloat(100*v, 'f', 3, 64) + " %"
	}
	return q.Format(q.Power(v), 3)
}

func pct(v float64) string { return strconv.FormatFloat(100*v, 'f', 2, 64) }

func (r *decisionReport) header() []string {
	h := []string{"#", "part"}
	if r.parallel {
		h = append(h, "N")
	}
	if pr := r.plan.prof; pr != nil {
		for _, p := range pr.Points {
			h = append(h, "η "+p.Name)
		}
		h = append(h, "weighted η %", "weighted loss %")
		if r.parallel {
			h = append(h, "single: weighted η %")
		}
	} else {
		h = append(h, "conduction", "switching", "output cap", "diode", "gate+driver", "total")
		if r.parallel {
			h = append(h, "single device")
		}
		h = append(h, "% of Pout")
	}
	h = append(h, "worst case", "Tj max", "price", "flags")
	return h
}

func (r *decisionReport) row(i int, c *candidate) []string {
	no := strconv.Itoa(i + 1)
	if c.chosen.screened() {
		no = "x"
	}
	name := c.name()
	if c.single.res.Partner != nil {
		name += " + " + c.single.res.Partner.Part.Name
	}
	row := []string{no, name}
	if r.parallel {
		row = append(row, strconv.Itoa(c.n))
	}
	if r.plan.prof != nil {
		for _, e := range c.chosen.w.Eff {
			row = append(row, pct(e))
		}
		row = append(row, strconv.FormatFloat(100*c.chosen.w.Weighted, 'f', 3, 64), strconv.FormatFloat(100*c.chosen.w.LossFraction, 'f', 3, 64))
		if r.parallel {
			row = append(row, strconv.FormatFloat(100*c.single.w.Weighted, 'f', 3, 64))
		}
	} else {
		l := c.chosen.res.Losses
		row = append(row, fmtP(l.Conduction), fmtP(l.TurnOn+l.TurnOff), fmtP(l.Coss), fmtP(l.DeadTime+l.Recovery),
			fmtP(l.GateRint+l.Driver()), fmtP(l.Total()))
		if r.parallel {
			row = append(row, fmtP(c.single.res.Losses.Total()))
		}
		p := "–"
		if po := r.plan.pt.Stage.Pout; po > 0 {
			p = strconv.FormatFloat(100*float64(l.Total())/float64(po), 'f', 2, 64)
		}
		row = append(row, p)
	}
	worst := "–"
	switch {
	case c.worst != nil && r.plan.prof != nil:
		worst = strconv.FormatFloat(100*c.worst.w.Weighted, 'f', 3, 64) + " %"
	case c.worst != nil:
		worst = fmtP(c.worst.res.Losses.Total())
	case c.noMax:
		worst = "no max"
	}
	tj := "none"
	if t, ok := c.chosen.tj(); ok {
		tj = q.Format(t, 3)
	}
	price := "–"
	if p := c.dev.Part.Price; p.OK {
		price = fmtPrice(p.V)
	}
	return append(row, worst, tj, price, strings.TrimSpace(flagCodes(c.chosen.flags())))
}

func (r *decisionReport) describe(w io.Writer) {
	if pr := r.plan.prof; pr != nil {
		fmt.Fprintf(w, "load profile: %s\n", pr.Title)
		fmt.Fprintf(w, "source: %s\n", pr.Source)
		fmt.Fprintln(w, "parts are ranked by the weighted efficiency Σ wᵢ·ηᵢ (the weights apply to efficiencies, not to watts); efficiencies in %, of the switches and drivers only")
		for _, p := range pr.Points {
			s := &p.Point.Stage
			fmt.Fprintf(w, "  %-10s weight %.4g: %s", p.Name, p.Weight, s.Topology)
			if s.Topology == stage.Custom {
				fmt.Fprintf(w, " %s, %s rms, %s", s.Vblock, s.Irms, s.Pout)
			} else {
				fmt.Fprintf(w, " %s → %s at %s (%s)", s.Vin, s.Vout, s.Iout, s.Pout)
			}
			fmt.Fprintf(w, ", %s, %s conduction\n", s.Fsw, p.Point.Mode)
			for _, n := range p.Point.Notes {
				fmt.Fprintf(w, "             note: %s\n", n)
			}
		}
		fmt.Fprintf(w, "library %s: %d parts\n", r.source, r.parts)
	} else {
		describePoint(w, r.plan.pt, r.source, r.parts)
		if r.plan.pt.Mode != stage.ModeGiven {
			fmt.Fprintf(w, "conduction mode: %s\n", r.plan.pt.Mode)
		}
	}
	if r.parallel {
		if r.auto {
			fmt.Fprintln(w, "paralleling: each part with the count that loses least (N), beside one device; each device's own thermal resistance carries 1/N of the loss")
		} else {
			fmt.Fprintln(w, "paralleling: each part N times on one driver, beside one device; each device's own thermal resistance carries 1/N of the loss")
		}
	}
}

func (r *decisionReport) table(w io.Writer, markdown bool) error {
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

func (r *decisionReport) rows() [][]string {
	var rows [][]string
	for i, c := range r.shown() {
		rows = append(rows, r.row(i, c))
	}
	return rows
}

// sections prints the set-aside parts, the spread of the leaders and the
// price-loss front.
func (r *decisionReport) sections(w io.Writer) {
	var screened []*candidate
	for i := range r.cands {
		if r.cands[i].chosen.screened() {
			screened = append(screened, &r.cands[i])
		}
	}
	if len(screened) > 0 {
		fmt.Fprintf(w, "\nset aside (%d):\n", len(screened))
		for _, c := range screened {
			for _, s := range r.reasons(c) {
				fmt.Fprintf(w, "- %s\n", s)
			}
		}
	}
	if note, _ := spreadNote(r.cands, r.unit); note != "" {
		fmt.Fprintf(w, "\ntypical against worst case (rds_on_max, qg_max, vgs_th_max): %s\n", note)
	}
	if f := frontOf(r.cands); len(f) > 0 {
		fmt.Fprintln(w, "\nprice against loss, the parts no other part beats on both (N × price when paralleled):")
		for _, i := range f {
			c := &r.cands[i]
			fmt.Fprintf(w, "- %s: price %s, loss %s\n", c.name(), fmtPrice(c.dev.Part.Price.V), r.unit(c.chosen.key()))
		}
	}
}

func (r *decisionReport) reasons(c *candidate) []string {
	if !c.chosen.prof {
		return c.chosen.res.Reasons()
	}
	var out []string
	for i := range c.chosen.w.Results {
		for _, s := range c.chosen.w.Results[i].Reasons() {
			out = append(out, "at "+r.plan.prof.Points[i].Name+": "+s)
		}
	}
	return out
}

func (r *decisionReport) csv(w io.Writer) error {
	return newSafeCSV(w).WriteAll(append([][]string{r.header()}, r.rows()...))
}

type jsonPointEff struct {
	Name     string  `json:"name"`
	Weight   float64 `json:"weight"`
	Load     float64 `json:"load_fraction,omitempty"`
	Mode     string  `json:"mode"`
	PoutW    float64 `json:"pout_w"`
	TotalW   float64 `json:"total_w"`
	Eff      float64 `json:"eff"`
	Screened bool    `json:"screened"`
}

type jsonCandidate struct {
	Rank          int            `json:"rank"`
	Part          string         `json:"part"`
	N             int            `json:"n"`
	TotalW        *float64       `json:"total_w,omitempty"`
	SingleTotalW  *float64       `json:"single_total_w,omitempty"`
	Losses        *jsonLosses    `json:"losses,omitempty"`
	EffWeighted   *float64       `json:"eff_weighted,omitempty"`
	SingleEffW    *float64       `json:"single_eff_weighted,omitempty"`
	LossFraction  *float64       `json:"loss_fraction_weighted,omitempty"`
	Points        []jsonPointEff `json:"points,omitempty"`
	WorstTotalW   *float64       `json:"worst_total_w,omitempty"`
	WorstEffW     *float64       `json:"worst_eff_weighted,omitempty"`
	TjMaxDegC     *float64       `json:"tj_max_degc"`
	Price         *float64       `json:"price,omitempty"`
	Flags         []string       `json:"flags"`
	Screened      bool           `json:"screened"`
	Reasons       []string       `json:"reasons"`
	TriedN        []float64      `json:"tried,omitempty"`
	TriedMeasures string         `json:"tried_measure,omitempty"`
}

type jsonSpread struct {
	Leader string  `json:"leader"`
	Runner string  `json:"runner_up"`
	Lead   float64 `json:"lead"`
	Width  float64 `json:"leader_spread"`
	Unit   string  `json:"unit"`
	Clear  bool    `json:"clear"`
	Note   string  `json:"note"`
}

type jsonFront struct {
	Part  string  `json:"part"`
	Price float64 `json:"price"`
	Loss  float64 `json:"loss"`
	Unit  string  `json:"unit"`
}

type jsonDecisions struct {
	OperatingPoint *jsonPointMode  `json:"operating_point,omitempty"`
	Profile        *jsonProfile    `json:"profile,omitempty"`
	Library        string          `json:"library"`
	LibraryParts   int             `json:"library_parts"`
	Results        []jsonCandidate `json:"results"`
	Spread         *jsonSpread     `json:"worst_case_spread,omitempty"`
	PriceFront     []jsonFront     `json:"price_front,omitempty"`
}

type jsonProfile struct {
	Title  string          `json:"title"`
	Source string          `json:"source"`
	Points []jsonPointMode `json:"points"`
	Names  []string        `json:"names"`
	Weight []float64       `json:"weights"`
}

func (r *decisionReport) keyUnit() string {
	if r.plan.prof != nil {
		return "fraction of pout (1 − weighted efficiency)"
	}
	return "W"
}

func (r *decisionReport) json(w io.Writer) error {
	out := jsonDecisions{Library: r.source, LibraryParts: r.parts, Results: []jsonCandidate{}}
	if pr := r.plan.prof; pr != nil {
		jp := &jsonProfile{Title: pr.Title, Source: pr.Source}
		for _, p := range pr.Points {
			jp.Points = append(jp.Points, withMode(pointJSON(&p.Point), p.Point.Mode))
			jp.Names = append(jp.Names, p.Name)
			jp.Weight = append(jp.Weight, p.Weight)
		}
		out.Profile = jp
	} else {
		p := withMode(pointJSON(r.plan.pt), r.plan.pt.Mode)
		out.OperatingPoint = &p
	}
	for i, c := range r.shown() {
		j := jsonCandidate{Rank: i + 1, Part: c.name(), N: c.n, Flags: flagList(c.chosen.flags()), Screened: c.chosen.screened(),
			Reasons: r.reasons(c)}
		if j.Reasons == nil {
			j.Reasons = []string{}
		}
		if pr := r.plan.prof; pr != nil {
			j.EffWeighted, j.LossFraction = ptr(c.chosen.w.Weighted), ptr(c.chosen.w.LossFraction)
			if r.parallel {
				j.SingleEffW = ptr(c.single.w.Weighted)
			}
			for k, p := range pr.Points {
				res := &c.chosen.w.Results[k]
				j.Points = append(j.Points, jsonPointEff{Name: p.Name, Weight: p.Weight, Load: float64(p.Load), Mode: p.Point.Mode.String(),
					PoutW: float64(p.Point.Stage.Pout), TotalW: float64(res.Losses.Total()), Eff: c.chosen.w.Eff[k], Screened: res.Screened()})
			}
			if c.worst != nil {
				j.WorstEffW = ptr(c.worst.w.Weighted)
			}
		} else {
			l := lossesJSON(c.chosen.res.Losses)
			j.Losses, j.TotalW = &l, ptr(float64(c.chosen.res.Losses.Total()))
			if r.parallel {
				j.SingleTotalW = ptr(float64(c.single.res.Losses.Total()))
			}
			if c.worst != nil {
				j.WorstTotalW = ptr(float64(c.worst.res.Losses.Total()))
			}
		}
		if r.parallel {
			j.TriedN, j.TriedMeasures = c.tried, r.keyUnit()+" for the counts tried"
		}
		if t, ok := c.chosen.tj(); ok {
			j.TjMaxDegC = ptr(float64(t))
		}
		if p := c.dev.Part.Price; p.OK {
			j.Price = ptr(p.V)
		}
		out.Results = append(out.Results, j)
	}
	if note, s := spreadNote(r.cands, r.unit); s != nil {
		out.Spread = &jsonSpread{Leader: r.cands[0].name(), Runner: r.cands[1].name(), Lead: float64(s.Lead), Width: float64(s.Width),
			Unit: r.keyUnit(), Clear: s.Clear, Note: note}
	}
	for _, i := range frontOf(r.cands) {
		c := &r.cands[i]
		out.PriceFront = append(out.PriceFront, jsonFront{Part: c.name(), Price: c.dev.Part.Price.V, Loss: c.chosen.key(), Unit: r.keyUnit()})
	}
	return writeJSON(w, out)
}

// jsonPointMode is an operating point with its conduction mode.
type jsonPointMode struct {
	jsonPoint
	Mode string `json:"mode"`
}

func withMode(p jsonPoint, m stage.Mode) jsonPointMode { return jsonPointMode{p, m.String()} }

// writeTable prints a table with tablewriter, as text or Markdown.
func writeTable(w io.Writer, header []string, rows [][]string, markdown bool) error {
	opts := []tablewriter.Option{
		tablewriter.WithHeaderAutoFormat(tw.Off),
		tablewriter.WithHeader(header),
	}
	if markdown {
		opts = append(opts, tablewriter.WithRenderer(renderer.NewMarkdown()))
	}
	t := tablewriter.NewTable(w, opts...)
	for _, row := range rows {
		if err := t.Append(row); err != nil {
			return err
		}
	}
	return t.Render()
}

// decorate prints the plain ranking with the worst-case spread of the
// leaders and the price-loss front when the library gives maximum values
// or prices: after the table (text and Markdown), as extra columns (CSV)
// or extra members (JSON).
func decorate(w io.Writer, format string, rep report, partner *fit.Device) error {
	shown := rep.shown()
	plan := &stagePlan{pt: rep.pt, partner: partner}
	cs := make([]candidate, len(shown))
	hasExtra := false
	for i := range shown {
		d := shown[i].Dev
		cs[i] = candidate{base: d, n: 1, dev: d, single: eval{res: shown[i]}, chosen: eval{res: shown[i]}}
		p := d.Part
		if p.Price.OK || p.RdsOnMax.OK || p.QgMax.OK || p.VgsThMax.OK {
			hasExtra = true
		}
	}
	if !hasExtra {
		return render(w, format, rep)
	}
	if err := addWorst(plan, cs); err != nil {
		return err
	}
	unit := func(v float64) string { return q.Format(q.Power(v), 3) }
	note, spread := spreadNote(cs, unit)
	front := frontOf(cs)
	switch strings.ToLower(format) {
	case "json":
		var buf bytes.Buffer
		if err := render(&buf, format, rep); err != nil {
			return err
		}
		var doc map[string]json.RawMessage
		if err := json.Unmarshal(buf.Bytes(), &doc); err != nil {
			return fmt.Errorf("decorating the JSON output: %w", err)
		}
		type worstRow struct {
			Part        string   `json:"part"`
			TotalW      float64  `json:"total_w"`
			WorstTotalW *float64 `json:"worst_total_w"`
		}
		var wr []worstRow
		for _, c := range cs {
			if c.worst != nil || c.noMax {
				r := worstRow{Part: c.name(), TotalW: c.chosen.key()}
				if c.worst != nil {
					r.WorstTotalW = ptr(c.worst.key())
				}
				wr = append(wr, r)
			}
		}
		add := func(k string, v any) error {
			b, err := json.Marshal(v)
			if err == nil {
				doc[k] = b
			}
			return err
		}
		if len(wr) > 0 {
			if err := add("worst_case", wr); err != nil {
				return err
			}
		}
		if spread != nil {
			if err := add("worst_case_spread", jsonSpread{Leader: cs[0].name(), Runner: cs[1].name(), Lead: float64(spread.Lead),
				Width: float64(spread.Width), Unit: "W", Clear: spread.Clear, Note: note}); err != nil {
				return err
			}
		}
		if len(front) > 0 {
			var jf []jsonFront
			for _, i := range front {
				jf = append(jf, jsonFront{Part: cs[i].name(), Price: cs[i].dev.Part.Price.V, Loss: cs[i].chosen.key(), Unit: "W"})
			}
			if err := add("price_front", jf); err != nil {
				return err
			}
		}
		return writeJSON(w, doc)
	case "csv":
		var buf bytes.Buffer
		if err := render(&buf, format, rep); err != nil {
			return err
		}
		rows, err := csv.NewReader(&buf).ReadAll()
		if err != nil || len(rows) == 0 {
			return fmt.Errorf("decorating the CSV output: %v", err)
		}
		col := slices.Index(rows[0], "part")
		onFront := map[string]bool{}
		for _, i := range front {
			onFront[cs[i].name()] = true
		}
		byName := map[string]*candidate{}
		for i := range cs {
			byName[cs[i].name()] = &cs[i]
		}
		rows[0] = append(rows[0], "worst_total_w", "price", "price_front")
		for i := 1; i < len(rows); i++ {
			var worst, price, fr string
			if col >= 0 && col < len(rows[i]) {
				if c := byName[rows[i][col]]; c != nil {
					if c.worst != nil {
						worst = num(c.worst.key())
					}
					if p := c.dev.Part.Price; p.OK {
						price = num(p.V)
					}
					fr = strconv.FormatBool(onFront[c.name()])
				}
			}
			rows[i] = append(rows[i], worst, price, fr)
		}
		cw := newSafeCSV(w)
		if err := cw.WriteAll(rows); err != nil {
			return err
		}
		return cw.Error()
	}
	if err := render(w, format, rep); err != nil {
		return err
	}
	var worstLines []string
	for _, c := range cs {
		if c.worst != nil {
			worstLines = append(worstLines, fmt.Sprintf("- %s: typical %s, worst case %s", c.name(), unit(c.chosen.key()), unit(c.worst.key())))
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
			fmt.Fprintf(w, "- %s: price %s, loss %s\n", cs[i].name(), fmtPrice(cs[i].dev.Part.Price.V), unit(cs[i].chosen.key()))
		}
	}
	return nil
}
