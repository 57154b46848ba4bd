package decide

import (
	"cmp"
	"fmt"
	"runtime"
	"slices"

	q "swrank/devices/quantity"
	"swrank/rank"
	"swrank/rank/evaluate"
	"swrank/rank/fit"
	"swrank/rank/stage"
)

// The decision path of rank: several weighted points, paralleled devices
// and valley switching, with the typical-against-worst-case spread of the
// leaders and the price-loss front. The plain ranking gets the last two
// for its leading parts (Leaders).

// WorstLeaders is how many leading parts get a worst-case evaluation: the
// head of the ranking, where the choice is made; a worst case for every
// part of a large library would cost a second ranking (common practice:
// the first screenful of a table).
const WorstLeaders = 10

// Eval is one part (at one count) at a plan's stage: at one point or over
// a profile.
type Eval struct {
	Res  evaluate.Result // the evaluation at one point (Prof false)
	W    WeightedResult  // the evaluation over a profile (Prof true)
	Prof bool            // W holds the evaluation, not Res
}

// Screened reports whether a screen sets the part aside (at any point of a
// profile).
func (e *Eval) Screened() bool {
	if e.Prof {
		return e.W.Screened()
	}
	return e.Res.Screened()
}

// Key orders evaluations, smaller first: the total loss, W, at one point;
// the weighted loss fraction 1 − Σ wᵢ·ηᵢ (a fraction of the output power)
// over a profile.
func (e *Eval) Key() float64 {
	if e.Prof {
		return 1 - e.W.Weighted
	}
	return float64(e.Res.Losses.Total())
}

// Tj returns the (hottest) junction temperature, °C, and whether every
// device has one.
func (e *Eval) Tj() (q.Temperature, bool) {
	if e.Prof {
		return e.W.Tj()
	}
	return e.Res.Tj()
}

// Flags returns the fallbacks the evaluation used (over every point of a
// profile).
func (e *Eval) Flags() fit.Flags {
	if e.Prof {
		return e.W.Flags
	}
	return e.Res.Flags
}

// Candidate is one library part in the decision path: evaluated alone and
// at the count chosen for it.
type Candidate struct {
	Base   *fit.Device // the library part
	N      int         // the count chosen (1: one device)
	Dev    *fit.Device // N devices of Base as one part (Base when N is 1)
	Single Eval        // one device
	Chosen Eval        // N devices
	// Tried holds the key (Eval.Key) of each count tried, in the order of
	// the counts; a count in Unprepared is left out.
	Tried []float64
	// TriedN are the counts of Tried, in the same order.
	TriedN []int
	// Unprepared names each count whose paralleled copy could not be
	// prepared, with the reason ("3 in parallel: …"). With auto such a
	// count is skipped; otherwise the candidate is set aside (NotEvaluated).
	Unprepared []string
	// NotEvaluated is why the count asked for could not be evaluated (""
	// when it was): the candidate is set aside, its reason this text.
	NotEvaluated string
	// Worst is the chosen count evaluated with the part's maximum
	// datasheet values (AddWorst; leaders only, nil otherwise).
	Worst *Eval
	// NoMax is true for a leader whose part gives no maximum values.
	NoMax bool
	// WorstReason is why a leader's worst case could not be evaluated (""
	// when it was, or with NoMax): its worst-case copy could not be
	// prepared. The leader keeps its place on its typical values.
	WorstReason string
}

// Name returns the part's name (with its count when paralleled).
func (c *Candidate) Name() string { return c.Dev.Part.Name }

// Screened reports whether the candidate is set aside: a screen of its
// chosen evaluation, or a count that could not be evaluated.
func (c *Candidate) Screened() bool { return c.NotEvaluated != "" || c.Chosen.Screened() }

// Plan is what the decision path evaluates: one point or a profile, and
// the device in the other place of a synchronous stage.
type Plan struct {
	Point   *stage.Point // the (rated) operating point
	Profile *Profile     // the weighted points; nil: Point alone
	Partner *fit.Device  // the other place's device; nil: the part itself
}

// Evaluate evaluates device d at the plan's point or over its profile.
func (p *Plan) Evaluate(d *fit.Device) Eval {
	if p.Profile != nil {
		return Eval{W: EvaluateProfile(p.Profile, d, p.Partner), Prof: true}
	}
	return Eval{Res: evaluate.Evaluate(p.Point, d, p.Partner, nil)}
}

// better reports whether a beats b for the choice of a count: passing
// first, then the key, ties to the smaller count (b, tried first).
func better(a, b *Eval) bool {
	if a.Screened() != b.Screened() {
		return !a.Screened()
	}
	return a.Key() < b.Key()
}

// EvaluateAll evaluates every device at every count of counts (ascending,
// starting at 1; each from 1 to MaxParallel) and keeps the chosen one: the
// count with the least key when auto, else the last count. The order of
// the result is the rank order: passing parts first, then the key, then
// the name.
func EvaluateAll(plan *Plan, devs []fit.Device, counts []int, auto bool) []Candidate {
	out := make([]Candidate, len(devs))
	work := func(i int) {
		c := Candidate{Base: &devs[i], N: 1, Dev: &devs[i]}
		for _, n := range counts {
			d := &devs[i]
			if n > 1 {
				dn, err := Parallel(d, n)
				if err != nil {
					// This copy costs only itself: the count is skipped,
					// or, when it was asked for, the part set aside.
					why := fmt.Sprintf("%d in parallel: %v", n, err)
					c.Unprepared = append(c.Unprepared, why)
					if !auto {
						c.NotEvaluated = why
					}
					continue
				}
				d = &dn
			}
			e := plan.Evaluate(d)
			c.Tried = append(c.Tried, e.Key())
			c.TriedN = append(c.TriedN, n)
			switch {
			case n == 1:
				c.Single, c.Chosen = e, e
			case !auto || better(&e, &c.Chosen):
				c.N, c.Dev, c.Chosen = n, d, e
			}
		}
		out[i] = c
	}
	rank.ForChunks(len(devs), runtime.GOMAXPROCS(0), 1, func(lo, hi int) {
		for i := lo; i < hi; i++ {
			work(i)
		}
	})
	slices.SortStableFunc(out, func(a, b Candidate) int {
		if sa, sb := a.Screened(), b.Screened(); sa != sb {
			if sa {
				return 1
			}
			return -1
		}
		if c := cmp.Compare(a.Chosen.Key(), b.Chosen.Key()); c != 0 {
			return c
		}
		return cmp.Compare(a.Name(), b.Name())
	})
	return out
}

// AddWorst evaluates the worst-case values (WorstCase) of the first
// passing leaders of cs, at most WorstLeaders of them, in rank order. A
// worst-case copy that cannot be prepared costs only its own worst case:
// the leader keeps its place, with the reason in WorstReason.
func AddWorst(plan *Plan, cs []Candidate) {
	k := 0
	for i := range cs {
		if k == WorstLeaders || cs[i].Screened() {
			break
		}
		k++
		w, ok, err := WorstCase(cs[i].Dev)
		if err != nil {
			cs[i].WorstReason = err.Error()
			continue
		}
		if !ok {
			cs[i].NoMax = true
			continue
		}
		e := plan.Evaluate(&w)
		cs[i].Worst = &e
	}
}

// LeaderSpread compares the first two candidates of cs (in rank order),
// typical against worst case (SpreadOf; a runner-up without worst-case
// values counts its typical key twice). The Spread's fields hold keys
// (Eval.Key), watts or a fraction. It returns nil when it cannot be told:
// fewer than two passing leaders, or a leader without worst-case values.
func LeaderSpread(cs []Candidate) *Spread {
	if len(cs) < 2 || cs[0].Screened() || cs[1].Screened() || cs[0].Worst == nil {
		return nil
	}
	runnerWorst := cs[1].Chosen.Key()
	if cs[1].Worst != nil {
		runnerWorst = cs[1].Worst.Key()
	}
	s := SpreadOf(q.Power(cs[0].Chosen.Key()), q.Power(cs[0].Worst.Key()), q.Power(cs[1].Chosen.Key()), q.Power(runnerWorst))
	return &s
}

// PriceFront returns the indices in cs of the price-loss front
// (ParetoFront) of the passing candidates that carry a price (N × price
// when paralleled), in increasing price; nil with fewer than two priced
// candidates.
func PriceFront(cs []Candidate) []int {
	var idx []int
	var items []PriceLoss
	for i := range cs {
		p := cs[i].Dev.Part.Price
		if !p.OK || cs[i].Screened() {
			continue
		}
		idx = append(idx, i)
		items = append(items, PriceLoss{Price: p.V, Loss: cs[i].Chosen.Key()})
	}
	if len(items) < 2 {
		return nil
	}
	f := ParetoFront(items)
	out := make([]int, len(f))
	for i, j := range f {
		out[i] = idx[j]
	}
	return out
}

// Leaders turns the results a plain ranking shows (in rank order, at pt
// with partner) into candidates, with the worst case of the passing
// leaders (AddWorst). It returns nil when no shown part gives a price or a
// maximum value (rds_on_max, qg_max, vgs_th_max): there is then nothing to
// add to the ranking.
func Leaders(pt *stage.Point, partner *fit.Device, shown []evaluate.Result) []Candidate {
	plan := &Plan{Point: pt, Partner: partner}
	cs := make([]Candidate, len(shown))
	hasExtra := false
	for i := range shown {
		d := shown[i].Dev
		cs[i] = Candidate{Base: d, N: 1, Dev: d, Single: Eval{Res: shown[i]}, Chosen: Eval{Res: shown[i]}}
		p := d.Part
		if p.Price.OK || p.RdsOnMax.OK || p.QgMax.OK || p.VgsThMax.OK {
			hasExtra = true
		}
	}
	if !hasExtra {
		return nil
	}
	AddWorst(plan, cs)
	return cs
}
