package report

import (
	"io"

	"swrank/rank/decide"
)

// The json format of the decision commands: rank over a profile or with
// paralleling, compare and sweep.

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
	Losses        *JSONLosses    `json:"losses,omitempty"`
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
	// Unprepared names the counts whose paralleled copy could not be
	// prepared (left out of tried), with the reason.
	Unprepared []string `json:"unprepared_counts,omitempty"`
	// WorstReason is why the worst case could not be evaluated.
	WorstReason string `json:"worst_case_not_evaluated,omitempty"`
}

type jsonDecisions struct {
	OperatingPoint *jsonPointMode  `json:"operating_point,omitempty"`
	Profile        *jsonProfile    `json:"profile,omitempty"`
	Library        string          `json:"library"`
	LibraryParts   int             `json:"library_parts"`
	Results        []jsonCandidate `json:"results"`
	SetAside       []JSONSetAside  `json:"set_aside,omitempty"`
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

func (r *Decisions) json(w io.Writer) error {
	out := jsonDecisions{Library: r.Source, LibraryParts: r.Parts, Results: []jsonCandidate{}, SetAside: setAsideJSON(r.SetAside)}
	if pr := r.Plan.Profile; pr != nil {
		jp := &jsonProfile{Title: pr.Title, Source: pr.Source}
		for _, p := range pr.Points {
			jp.Points = append(jp.Points, withMode(pointJSON(&p.Point), p.Point.Mode))
			jp.Names = append(jp.Names, p.Name)
			jp.Weight = append(jp.Weight, p.Weight)
		}
		out.Profile = jp
	} else {
		p := withMode(pointJSON(r.Plan.Point), r.Plan.Point.Mode)
		out.OperatingPoint = &p
	}
	for i, c := range r.Shown() {
		j := jsonCandidate{Rank: i + 1, Part: c.Name(), N: c.N, Flags: flagList(c.Chosen.Flags()), Screened: c.Screened(),
			Reasons: r.reasons(c), Unprepared: c.Unprepared, WorstReason: c.WorstReason}
		if j.Reasons == nil {
			j.Reasons = []string{}
		}
		if pr := r.Plan.Profile; pr != nil {
			j.EffWeighted, j.LossFraction = ptr(c.Chosen.W.Weighted), ptr(c.Chosen.W.LossFraction)
			if r.Parallel {
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
			if r.Parallel {
				j.SingleTotalW = ptr(float64(c.Single.Res.Losses.Total()))
			}
			if c.Worst != nil {
				j.WorstTotalW = ptr(float64(c.Worst.Res.Losses.Total()))
			}
		}
		if r.Parallel {
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
	if note, s := spreadNote(r.Candidates, r.unit); s != nil {
		out.Spread = &jsonSpread{Leader: r.Candidates[0].Name(), Runner: r.Candidates[1].Name(), Lead: float64(s.Lead), Width: float64(s.Width),
			Unit: r.keyUnit(), Clear: s.Clear, Note: note}
	}
	for _, i := range decide.PriceFront(r.Candidates) {
		c := &r.Candidates[i]
		out.PriceFront = append(out.PriceFront, jsonFront{Part: c.Name(), Price: c.Dev.Part.Price.V, Loss: c.Chosen.Key(), Unit: r.keyUnit()})
	}
	return writeJSON(w, out)
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
	Fitted         JSONResult       `json:"fitted"`
	Candidates     []jsonComparison `json:"candidates"`
}

func (r *Comparison) json(w io.Writer) error {
	out := jsonCompare{OperatingPoint: withMode(pointJSON(r.Point), r.Point.Mode), Library: r.Source,
		Fitted: resultJSON(0, &r.Fitted, r.Point.Stage.Pout), Candidates: []jsonComparison{}}
	for _, c := range r.Candidates {
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

type jsonSweepLoss struct {
	Part     string      `json:"part"`
	TotalW   float64     `json:"total_w"`
	Screened bool        `json:"screened"`
	Losses   *JSONLosses `json:"losses,omitempty"`
}

type jsonSweepPoint struct {
	X      float64         `json:"x"`
	Mode   string          `json:"mode"`
	Best   string          `json:"best"`
	Losses []jsonSweepLoss `json:"parts"`
}

type jsonCrossover struct {
	X     float64 `json:"x"`
	From  string  `json:"from"`
	To    string  `json:"to"`
	Kind  string  `json:"kind"`
	LossW float64 `json:"loss_w"`
}

type jsonSweep struct {
	Variable   string           `json:"variable"`
	Unit       string           `json:"unit"`
	Scale      string           `json:"scale"`
	Base       jsonPointMode    `json:"first_point"`
	Notes      []string         `json:"notes"`
	Library    string           `json:"library"`
	Parts      []string         `json:"parts"`
	Points     []jsonSweepPoint `json:"points"`
	Crossovers []jsonCrossover  `json:"crossovers"`
}

func (r *Sweep) json(w io.Writer) error {
	sw := r.Result
	out := jsonSweep{Variable: sw.Spec.Var.String(), Unit: sw.Spec.Var.Unit(), Scale: "linear", Base: withMode(pointJSON(&sw.Pts[0]), sw.Pts[0].Mode),
		Notes: sw.Notes, Library: r.Source, Parts: []string{}, Points: []jsonSweepPoint{}, Crossovers: []jsonCrossover{}}
	if sw.Spec.Log {
		out.Scale = "log"
	}
	if out.Notes == nil {
		out.Notes = []string{}
	}
	for _, k := range r.Set {
		out.Parts = append(out.Parts, r.name(k))
	}
	b := sw.Best(r.Set)
	for i, x := range sw.X {
		jp := jsonSweepPoint{X: x, Mode: sw.Pts[i].Mode.String(), Best: r.best(b, i)}
		for _, k := range r.Set {
			t, ok := sw.Total(k, i)
			jl := jsonSweepLoss{Part: r.name(k), TotalW: t, Screened: !ok}
			if r.Components {
				l := lossesJSON(sw.Evaluate(k, i).Losses)
				jl.Losses = &l
			}
			jp.Losses = append(jp.Losses, jl)
		}
		out.Points = append(out.Points, jp)
	}
	for _, c := range r.Crossovers {
		out.Crossovers = append(out.Crossovers, jsonCrossover{X: c.X, From: r.name(c.From), To: r.name(c.To), Kind: c.Kind.String(), LossW: c.Loss})
	}
	return writeJSON(w, out)
}
