package decide

import (
	"cmp"
	"errors"
	"fmt"
	"math"
	"slices"
	"strconv"
	"strings"
	q "swrank/devices/quantity"
	"swrank/rank"
	"swrank/rank/evaluate"
	"swrank/rank/fit"
	"swrank/rank/stage"
)

// Weighting is a load profile: loads as fractions of a rated operating
// point, each with a weight applied to the efficiency at that load.
// Published weightings apply to efficiencies, not to watts: a part is
// judged by Σ wᵢ·ηᵢ, which (unlike summed watts) does not let the full-load
// loss drown the light-load points.
type Weighting struct {
	Name   string        // short name for the command line and the design file
	Title  string        // one line for the output
	Source string        // where the weights come from, and how sure we are
	Points []WeightPoint // in increasing load
}

// WeightPoint is one load of a Weighting.
type WeightPoint struct {
	// Load is the fraction of the rated load current (and output power),
	// (0, 2]; 0.5 is half load.
	Load q.Ratio
	// Weight is the weight of the efficiency at this load, > 0; the
	// weights of a Weighting sum to 1.
	Weight float64
}

// Weightings returns the shipped load profiles, a new slice at each call:
//
//	euro        0.03·η5 + 0.06·η10 + 0.13·η20 + 0.10·η30 + 0.48·η50 + 0.20·η100
//	cec         0.04·η10 + 0.05·η20 + 0.12·η30 + 0.21·η50 + 0.53·η75 + 0.05·η100
//	quarters    the mean of η25, η50, η75, η100
//	10-20-50-100 the mean of η10, η20, η50, η100 (our own choice)
//
// docs/decisions.md names the sources.
func Weightings() []Weighting {
	return []Weighting{
		{
			Name: "euro", Title: "European weighted efficiency (5, 10, 20, 30, 50, 100 % of rated power)",
			Source: "the European weighted efficiency of photovoltaic inverters, as used by EN 50530 (overall efficiency of grid-connected PV inverters)",
			Points: []WeightPoint{{0.05, 0.03}, {0.10, 0.06}, {0.20, 0.13}, {0.30, 0.10}, {0.50, 0.48}, {1, 0.20}},
		},
		{
			Name: "cec", Title: "California weighted efficiency (10, 20, 30, 50, 75, 100 % of rated power)",
			Source: "the California Energy Commission's weighting of the inverter test protocol for grid-connected PV inverters (Sandia/CEC performance test protocol, 2004; title from memory)",
			Points: []WeightPoint{{0.10, 0.04}, {0.20, 0.05}, {0.30, 0.12}, {0.50, 0.21}, {0.75, 0.53}, {1, 0.05}},
		},
		{
			Name: "quarters", Title: "mean efficiency at 25, 50, 75 and 100 % of rated output",
			Source: "the average-efficiency rule for external power supplies: the plain mean of the efficiencies at 25, 50, 75 and 100 % of rated output (from memory: the US and EU external power supply rules; check the rule that binds you)",
			Points: []WeightPoint{{0.25, 0.25}, {0.50, 0.25}, {0.75, 0.25}, {1, 0.25}},
		},
		{
			Name: "10-20-50-100", Title: "mean efficiency at 10, 20, 50 and 100 % of rated output (swrank's own choice)",
			Source: "our own choice, not a published weighting: certification levels that test at 10, 20, 50 and 100 % load set pass thresholds at each load and give no weights",
			Points: []WeightPoint{{0.10, 0.25}, {0.20, 0.25}, {0.50, 0.25}, {1, 0.25}},
		},
	}
}

// ParseWeighting reads a shipped weighting by name (see Weightings), or a
// custom one written LOAD:WEIGHT pairs separated by commas, loads as
// fractions or percentages: "0.1:0.2, 0.5:0.5, 1:0.3" or "10%:20, 50%:50,
// 100%:30". Custom weights are scaled to sum to 1.
func ParseWeighting(s string) (Weighting, error) {
	s = strings.TrimSpace(s)
	for _, w := range Weightings() {
		if strings.EqualFold(s, w.Name) {
			return w, nil
		}
	}
	if !strings.Contains(s, ":") {
		names := make([]string, 0, 4)
		for _, w := range Weightings() {
			names = append(names, w.Name)
		}
		return Weighting{}, fmt.Errorf("weighting %q: not one of %s, nor LOAD:WEIGHT pairs such as \"0.1:0.2, 0.5:0.5, 1:0.3\"", s, strings.Join(names, ", "))
	}
	w := Weighting{Name: "custom", Title: "custom weighting", Source: "given by the user"}
	for i, f := range strings.Split(s, ",") {
		a, b, ok := strings.Cut(strings.TrimSpace(f), ":")
		if !ok {
			return Weighting{}, fmt.Errorf("weighting %q: item %d %q is not LOAD:WEIGHT", s, i+1, f)
		}
		load, err := parseFraction(a)
		if err != nil {
			return Weighting{}, fmt.Errorf("weighting %q: item %d load: %w", s, i+1, err)
		}
		wt, err := strconv.ParseFloat(strings.TrimSpace(b), 64)
		if err != nil || math.IsNaN(wt) || math.IsInf(wt, 0) {
			return Weighting{}, fmt.Errorf("weighting %q: item %d weight %q is not a number", s, i+1, b)
		}
		w.Points = append(w.Points, WeightPoint{Load: q.Ratio(load), Weight: wt})
	}
	if err := w.normalize(); err != nil {
		return Weighting{}, fmt.Errorf("weighting %q: %w", s, err)
	}
	return w, nil
}

// parseFraction reads "0.25" or "25%".
func parseFraction(s string) (float64, error) {
	s = strings.TrimSpace(s)
	scale := 1.0
	if t, ok := strings.CutSuffix(s, "%"); ok {
		s, scale = strings.TrimSpace(t), 0.01
	}
	v, err := strconv.ParseFloat(s, 64)
	if err != nil || math.IsNaN(v) || math.IsInf(v, 0) {
		return 0, fmt.Errorf("%q is not a number", s)
	}
	return v * scale, nil
}

// customWeighting makes a weighting from loads and weights (any positive
// weights; they are scaled to sum to 1).
func customWeighting(name string, pts []WeightPoint) (Weighting, error) {
	w := Weighting{Name: name, Title: "custom weighting " + name, Source: "given by the user", Points: slices.Clone(pts)}
	if err := w.normalize(); err != nil {
		return Weighting{}, fmt.Errorf("weighting %s: %w", name, err)
	}
	return w, nil
}

// normalize checks the points, sorts them by load and scales the weights
// to sum to 1.
func (w *Weighting) normalize() error {
	if len(w.Points) == 0 {
		return errors.New("no loads")
	}
	sum := 0.0
	for i, p := range w.Points {
		if !(p.Load > 0 && p.Load <= 2) {
			return fmt.Errorf("load %d: %g is outside (0, 2] of the rated load", i+1, float64(p.Load))
		}
		if !(p.Weight > 0) {
			return fmt.Errorf("load %g: weight %g must be > 0", float64(p.Load), p.Weight)
		}
		sum += p.Weight
	}
	slices.SortStableFunc(w.Points, func(a, b WeightPoint) int { return cmp.Compare(a.Load, b.Load) })
	for i := 1; i < len(w.Points); i++ {
		if w.Points[i].Load == w.Points[i-1].Load {
			return fmt.Errorf("load %g given twice", float64(w.Points[i].Load))
		}
	}
	for i := range w.Points {
		w.Points[i].Weight /= sum
	}
	return nil
}

// String writes the weighting as its formula, e.g. "0.03·η5 + 0.06·η10".
func (w Weighting) String() string {
	var b strings.Builder
	for i, p := range w.Points {
		if i > 0 {
			b.WriteString(" + ")
		}
		fmt.Fprintf(&b, "%.4g·η%s", p.Weight, strconv.FormatFloat(100*float64(p.Load), 'f', -1, 64))
	}
	return b.String()
}

// ScaleStage returns the rated stage at load fraction x of its load: the
// load current and the output power (when given) times x; for a custom
// stage the three drain currents times x. The inductor is the same at
// every load: a rated stage that states its ripple as a fraction (or takes
// the default) is given the inductance that makes that ripple at the rated
// load, so that the ripple in amperes stays put and light loads reach
// discontinuous or forced-continuous conduction as the stage would.
func ScaleStage(rated stage.Stage, x q.Ratio) (stage.Stage, error) {
	if !(x > 0) || math.IsInf(float64(x), 0) {
		return stage.Stage{}, fmt.Errorf("load fraction %g must be > 0", float64(x))
	}
	s := rated
	k := float64(x)
	s.Pout = q.Power(float64(s.Pout) * k)
	switch s.Topology {
	case stage.Custom:
		s.Ion = q.Current(float64(s.Ion) * k)
		s.Ioff = q.Current(float64(s.Ioff) * k)
		s.Irms = q.Current(float64(s.Irms) * k)
		return s, nil
	case stage.Buck, stage.Boost:
	default:
		return stage.Stage{}, fmt.Errorf("topology %s: load profiles need a buck, boost or custom stage", s.Topology)
	}
	if s.Inductance == 0 {
		pt, err := rated.Resolve()
		if err != nil {
			return stage.Stage{}, fmt.Errorf("rated point: %w", err)
		}
		if pt.Ripple > 0 {
			var vl q.Voltage
			d := float64(pt.Ctrl.Duty)
			if s.Topology == stage.Buck {
				vl = s.Vin - s.Vout
			} else {
				vl = s.Vin
			}
			s.Inductance = q.Inductance(float64(vl) * d / (float64(pt.Ripple) * float64(s.Fsw)))
			s.Ripple = q.Opt[q.Ratio]{}
		} else {
			s.Ripple = q.Some[q.Ratio](0)
		}
	}
	s.Iout = q.Current(float64(s.Iout) * k)
	return s, nil
}

// WeightedPoint is one operating point of a multi-point evaluation.
type WeightedPoint struct {
	Name   string      // e.g. "50 %" or the design file's name for it
	Load   q.Ratio     // fraction of the rated load (0: not a profile point)
	Weight float64     // weight of its efficiency, > 0; the weights sum to 1
	Point  stage.Point // the resolved operating point
}

// Profile is a set of weighted operating points.
type Profile struct {
	Title  string          // what the weights are
	Source string          // where the weights come from (a standard, or the user's file)
	Points []WeightedPoint // the weighted operating points, weights summing to 1
}

// ResolveProfile makes the operating points of weighting w at the rated
// stage, each with the light-load behaviour ll.
func ResolveProfile(rated stage.Stage, w Weighting, ll stage.LightLoad) (Profile, error) {
	pr := Profile{Title: w.Title, Source: w.Source}
	for _, p := range w.Points {
		s, err := ScaleStage(rated, p.Load)
		if err != nil {
			return Profile{}, err
		}
		pt, err := s.ResolveLight(ll)
		if err != nil {
			return Profile{}, fmt.Errorf("%s %% load: %w", strconv.FormatFloat(100*float64(p.Load), 'f', -1, 64), err)
		}
		name := strconv.FormatFloat(100*float64(p.Load), 'f', -1, 64) + " %"
		pr.Points = append(pr.Points, WeightedPoint{Name: name, Load: p.Load, Weight: p.Weight, Point: pt})
	}
	if err := pr.check(); err != nil {
		return Profile{}, err
	}
	return pr, nil
}

// NewProfile makes a profile of explicit named points with weights (any
// positive weights; they are scaled to sum to 1).
func NewProfile(title string, pts []WeightedPoint) (Profile, error) {
	pr := Profile{Title: title, Source: "the design's own points", Points: slices.Clone(pts)}
	sum := 0.0
	for _, p := range pr.Points {
		if !(p.Weight > 0) || math.IsInf(p.Weight, 0) {
			return Profile{}, fmt.Errorf("point %s: weight %g must be > 0", p.Name, p.Weight)
		}
		sum += p.Weight
	}
	for i := range pr.Points {
		pr.Points[i].Weight /= sum
	}
	if err := pr.check(); err != nil {
		return Profile{}, err
	}
	return pr, nil
}

func (pr *Profile) check() error {
	if len(pr.Points) == 0 {
		return errors.New("a profile needs at least one operating point")
	}
	for _, p := range pr.Points {
		if !(p.Point.Stage.Pout > 0) {
			return fmt.Errorf("point %s: weighted efficiency needs the output power (give pout for a custom stage)", p.Name)
		}
	}
	return nil
}

// WeightedResult is one part evaluated at every point of a profile.
type WeightedResult struct {
	Dev     *fit.Device       // the part being ranked
	Partner *fit.Device       // the other place's device when it is not Dev (nil otherwise)
	Results []evaluate.Result // one per profile point, in profile order
	Eff     []float64         // efficiency at each point, Pout/(Pout + loss of the parts)
	// Weighted is Σ wᵢ·ηᵢ, the figure parts are ranked by.
	Weighted float64
	// LossFraction is Σ wᵢ·Pᵢ/Poutᵢ, the weighted loss as a fraction of the
	// output power (about 1 − Weighted when losses are small).
	LossFraction float64
	Screens      evaluate.Screens // union over the points
	Flags        fit.Flags        // union over the points
}

// Screened reports whether the part is set aside at any point.
func (w *WeightedResult) Screened() bool { return w.Screens != 0 }

// Tj returns the hottest junction temperature over the points and whether
// every point has one.
func (w *WeightedResult) Tj() (q.Temperature, bool) {
	var t q.Temperature
	ok := true
	for i := range w.Results {
		tj, found := w.Results[i].Tj()
		if !found {
			ok = false
			continue
		}
		if i == 0 || tj > t {
			t = tj
		}
	}
	return t, ok
}

// EvaluateProfile evaluates part dev (with partner, as in Evaluate) at every
// point of the profile. The efficiency at a point counts the losses of the
// parts swrank models (switches and their drivers), not the rectifier
// diode, the inductor or the capacitors.
func EvaluateProfile(pr *Profile, dev, partner *fit.Device) WeightedResult {
	w := WeightedResult{Dev: dev, Partner: partner, Results: make([]evaluate.Result, len(pr.Points)), Eff: make([]float64, len(pr.Points))}
	for i := range pr.Points {
		p := &pr.Points[i]
		r := evaluate.Evaluate(&p.Point, dev, partner, nil)
		if r.Partner != nil {
			w.Partner = r.Partner
		}
		w.Results[i] = r
		pout := float64(p.Point.Stage.Pout)
		loss := float64(r.Losses.Total())
		w.Eff[i] = pout / (pout + loss)
		w.Weighted += p.Weight * w.Eff[i]
		w.LossFraction += p.Weight * loss / pout
		w.Screens |= r.Screens
		w.Flags |= r.Flags
	}
	return w
}

// rankProfile evaluates every device over the profile and returns the
// results in rank order: parts that pass every screen at every point by
// decreasing weighted efficiency, then the screened ones; ties by name.
// The order does not depend on opt.Workers.
func rankProfile(pr *Profile, devs []fit.Device, partner *fit.Device, opt rank.Options) []WeightedResult {
	out := make([]WeightedResult, len(devs))
	const chunk = 256
	rank.ForChunks(len(devs), opt.WorkerCount(len(devs), chunk), chunk, func(lo, hi int) {
		for i := lo; i < hi; i++ {
			out[i] = EvaluateProfile(pr, &devs[i], partner)
		}
	})
	slices.SortStableFunc(out, compareWeighted)
	return out
}

// compareWeighted orders weighted results: passing before screened, then by
// decreasing weighted efficiency, then by part name.
func compareWeighted(a, b WeightedResult) int {
	if sa, sb := a.Screened(), b.Screened(); sa != sb {
		if sa {
			return 1
		}
		return -1
	}
	if c := cmp.Compare(b.Weighted, a.Weighted); c != 0 {
		return c
	}
	return cmp.Compare(a.Dev.Part.Name, b.Dev.Part.Name)
}
