package main

import (
	"bytes"
	"encoding/csv"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"slices"
	"strconv"
	"strings"

	"github.com/olekukonko/tablewriter"
	"github.com/olekukonko/tablewriter/renderer"
	"github.com/olekukonko/tablewriter/tw"

	q "swrank/devices/quantity"
	"swrank/rank/decide"
	"swrank/rank/fit"
	"swrank/rank/stage"
)

// The decision path of rank: several weighted points, paralleled devices
// and valley switching, with the typical-against-worst-case spread of the
// leaders and the price-loss front. The plain ranking gets the last two as
// decorations of its own output (decorate).

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
	cs, err := decide.EvaluateAll(plan, devs, counts, auto)
	if err != nil {
		return err
	}
	if err := decide.AddWorst(plan, cs); err != nil {
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
func preparePlan(in *inputs, dec *decisionFlags, stderr io.Writer) (*decide.Plan, []fit.Device, libInfo, error) {
	if err := checkFormat(in.format); err != nil {
		return nil, nil, libInfo{}, err
	}
	pt, err := in.stage.ResolveLight(dec.lightLoad())
	if err != nil {
		return nil, nil, libInfo{}, fmt.Errorf("operating point: %w", err)
	}
	plan := &decide.Plan{Point: &pt}
	if plan.Profile, err = dec.profile(in.stage); err != nil {
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
		if plan.Partner, err = findDevice(devs, in.partner); err != nil {
			return nil, nil, libInfo{}, fmt.Errorf("--partner: %w", err)
		}
	}
	return plan, devs, libInfo{source: lib.Source}, nil
}

// decisionReport is what the decision path of rank prints.
type decisionReport struct {
	plan     *decide.Plan
	cands    []decide.Candidate
	source   string
	parts    int
	all      bool
	top      int
	parallel bool // counts other than 1 were tried
	auto     bool
}

func (r *decisionReport) shown() []*decide.Candidate {
	var out []*decide.Candidate
	for i := range r.cands {
		c := &r.cands[i]
		if c.Chosen.Screened() && !r.all {
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
	if r.plan.Profile != nil {
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
	if pr := r.plan.Profile; pr != nil {
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

func (r *decisionReport) row(i int, c *decide.Candidate) []string {
	no := strconv.Itoa(i + 1)
	if c.Chosen.Screened() {
		no = "x"
	}
	name := c.Name()
	if c.Single.Res.Partner != nil {
		name += " + " + c.Single.Res.Partner.Part.Name
	}
	row := []string{no, name}
	if r.parallel {
		row = append(row, strconv.Itoa(c.N))
	}
	if r.plan.Profile != nil {
		for _, e := range c.Chosen.W.Eff {
			row = append(row, pct(e))
		}
		row = append(row, strconv.FormatFloat(100*c.Chosen.W.Weighted, 'f', 3, 64), strconv.FormatFloat(100*c.Chosen.W.LossFraction, 'f', 3, 64))
		if r.parallel {
			row = append(row, strconv.FormatFloat(100*c.Single.W.Weighted, 'f', 3, 64))
		}
	} else {
		l := c.Chosen.Res.Losses
		row = append(row, fmtP(l.Conduction), fmtP(l.TurnOn+l.TurnOff), fmtP(l.Coss), fmtP(l.DeadTime+l.Recovery),
			fmtP(l.GateRint+l.Driver()), fmtP(l.Total()))
		if r.parallel {
			row = append(row, fmtP(c.Single.Res.Losses.Total()))
		}
		p := "–"
		if po := r.plan.Point.Stage.Pout; po > 0 {
			p = strconv.FormatFloat(100*float64(l.Total())/float64(po), 'f', 2, 64)
		}
		row = append(row, p)
	}
	worst := "–"
	switch {
	case c.Worst != nil && r.plan.Profile != nil:
		worst = strconv.FormatFloat(100*c.Worst.W.Weighted, 'f', 3, 64) + " %"
	case c.Worst != nil:
		worst = fmtP(c.Worst.Res.Losses.Total())
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

func (r *decisionReport) describe(w io.Writer) {
	if pr := r.plan.Profile; pr != nil {
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
		describePoint(w, r.plan.Point, r.source, r.parts)
		if r.plan.Point.Mode != stage.ModeGiven {
			fmt.Fprintf(w, "conduction mode: %s\n", r.plan.Point.Mode)
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
	var screened []*decide.Candidate
	for i := range r.cands {
		if r.cands[i].Chosen.Screened() {
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
	if f := decide.PriceFront(r.cands); len(f) > 0 {
		fmt.Fprintln(w, "\nprice against loss, the parts no other part beats on both (N × price when paralleled):")
		for _, i := range f {
			c := &r.cands[i]
			fmt.Fprintf(w, "- %s: price %s, loss %s\n", c.Name(), fmtPrice(c.Dev.Part.Price.V), r.unit(c.Chosen.Key()))
		}
	}
}

func (r *decisionReport) reasons(c *decide.Candidate) []string {
	if !c.Chosen.Prof {
		return c.Chosen.Res.Reasons()
	}
	var out []string
	for i := range c.Chosen.W.Results {
		for _, s := range c.Chosen.W.Results[i].Reasons() {
			out = append(out, "at "+r.plan.Profile.Points[i].Name+": "+s)
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
	if r.plan.Profile != nil {
		return "fraction of pout (1 − weighted efficiency)"
	}
	return "W"
}

func (r *decisionReport) json(w io.Writer) error {
	out := jsonDecisions{Library: r.source, LibraryParts: r.parts, Results: []jsonCandidate{}}
	if pr := r.plan.Profile; pr != nil {
		jp := &jsonProfile{Title: pr.Title, Source: pr.Source}
		for _, p := range pr.Points {
			jp.Points = append(jp.Points, withMode(pointJSON(&p.Point), p.Point.Mode))
			jp.Names = append(jp.Names, p.Name)
			jp.Weight = append(jp.Weight, p.Weight)
		}
		out.Profile = jp
	} else {
		p := withMode(pointJSON(r.plan.Point), r.plan.Point.Mode)
		out.OperatingPoint = &p
	}
	for i, c := range r.shown() {
		j := jsonCandidate{Rank: i + 1, Part: c.Name(), N: c.N, Flags: flagList(c.Chosen.Flags()), Screened: c.Chosen.Screened(),
			Reasons: r.reasons(c)}
		if j.Reasons == nil {
			j.Reasons = []string{}
		}
		if pr := r.plan.Profile; pr != nil {
			j.EffWeighted, j.LossFraction = ptr(c.Chosen.W.Weighted), ptr(c.Chosen.W.LossFraction)
			if r.parallel {
				j.SingleEffW = ptr(c.Single.W.Weighted)
			}
			for k, p := range pr.Points {
				res := &c.Chosen.W.Results[k]
				j.Points = append(j.Points, jsonPointEff{Name: p.Name, Weight: p.Weight, Load: float64(p.Load), Mode: p.Point.Mode.String(),
					PoutW: float64(p.Point.Stage.Pout), TotalW: float64(res.Losses.Total()), Eff: c.Chosen.W.Eff[k], Screened: res.Screened()})
			}
			if c.Worst != nil {
				j.WorstEffW = ptr(c.Worst.W.Weighted)
			}
		} else {
			l := lossesJSON(c.Chosen.Res.Losses)
			j.Losses, j.TotalW = &l, ptr(float64(c.Chosen.Res.Losses.Total()))
			if r.parallel {
				j.SingleTotalW = ptr(float64(c.Single.Res.Losses.Total()))
			}
			if c.Worst != nil {
				j.WorstTotalW = ptr(float64(c.Worst.Res.Losses.Total()))
			}
		}
		if r.parallel {
			j.TriedN, j.TriedMeasures = c.Tried, r.keyUnit()+" for the counts tried"
		}
		if t, ok := c.Chosen.Tj(); ok {
			j.TjMaxDegC = ptr(float64(t))
		}
		if p := c.Dev.Part.Price; p.OK {
			j.Price = ptr(p.V)
		}
		out.Results = append(out.Results, j)
	}
	if note, s := spreadNote(r.cands, r.unit); s != nil {
		out.Spread = &jsonSpread{Leader: r.cands[0].Name(), Runner: r.cands[1].Name(), Lead: float64(s.Lead), Width: float64(s.Width),
			Unit: r.keyUnit(), Clear: s.Clear, Note: note}
	}
	for _, i := range decide.PriceFront(r.cands) {
		c := &r.cands[i]
		out.PriceFront = append(out.PriceFront, jsonFront{Part: c.Name(), Price: c.Dev.Part.Price.V, Loss: c.Chosen.Key(), Unit: r.keyUnit()})
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
	cs, err := decide.Leaders(rep.pt, partner, rep.shown())
	if err != nil {
		return err
	}
	if cs == nil {
		return render(w, format, rep)
	}
	unit := func(v float64) string { return q.Format(q.Power(v), 3) }
	note, spread := spreadNote(cs, unit)
	front := decide.PriceFront(cs)
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
			if c.Worst != nil || c.NoMax {
				r := worstRow{Part: c.Name(), TotalW: c.Chosen.Key()}
				if c.Worst != nil {
					r.WorstTotalW = ptr(c.Worst.Key())
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
			if err := add("worst_case_spread", jsonSpread{Leader: cs[0].Name(), Runner: cs[1].Name(), Lead: float64(spread.Lead),
				Width: float64(spread.Width), Unit: "W", Clear: spread.Clear, Note: note}); err != nil {
				return err
			}
		}
		if len(front) > 0 {
			var jf []jsonFront
			for _, i := range front {
				jf = append(jf, jsonFront{Part: cs[i].Name(), Price: cs[i].Dev.Part.Price.V, Loss: cs[i].Chosen.Key(), Unit: "W"})
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
			onFront[cs[i].Name()] = true
		}
		byName := map[string]*decide.Candidate{}
		for i := range cs {
			byName[cs[i].Name()] = &cs[i]
		}
		rows[0] = append(rows[0], "worst_total_w", "price", "price_front")
		for i := 1; i < len(rows); i++ {
			var worst, price, fr string
			if col >= 0 && col < len(rows[i]) {
				if c := byName[rows[i][col]]; c != nil {
					if c.Worst != nil {
						worst = num(c.Worst.Key())
					}
					if p := c.Dev.Part.Price; p.OK {
						price = num(p.V)
					}
					fr = strconv.FormatBool(onFront[c.Name()])
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
		if c.Worst != nil {
			worstLines = append(worstLines, fmt.Sprintf("- %s: typical %s, worst case %s", c.Name(), unit(c.Chosen.Key()), unit(c.Worst.Key())))
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
