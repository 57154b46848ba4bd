package decide

import (
	"cmp"
	"fmt"
	"math"
	"math/bits"
	"slices"
	"strings"
	"swrank/devices"
	q "swrank/devices/quantity"
	"swrank/rank/evaluate"
	"swrank/rank/fit"
)

// WorstCasePart returns a copy of part p with its maximum datasheet values
// in place of the typical ones, and whether it has any: rds_on_max for
// rds_on (the second gate-voltage point and the hot value scaled by the
// same ratio: the maximum bounds the whole curve), qg_max for qg (qgs, qgd
// and qg_th scaled by the same ratio), vgs_th_max for vgs_th (the plateau
// moved up by the same amount: it sits a current-set overdrive above the
// threshold). The name is unchanged.
//
// Source: datasheet practice (IEC 60747-8:2010: typical and maximum
// values of the same characteristic at the same conditions); the
// proportional scaling of the related values is our assumption.
func WorstCasePart(p *devices.Part) (devices.Part, bool) {
	c := *p
	found := false
	if p.RdsOnMax.OK && p.RdsOnMax.V > p.RdsOn && p.RdsOn > 0 {
		k := float64(p.RdsOnMax.V / p.RdsOn)
		c.RdsOn = p.RdsOnMax.V
		mulOpt(&c.RdsOn2, k)
		mulOpt(&c.RdsHot, k)
		found = true
	}
	if p.QgMax.OK && p.QgMax.V > p.Qg && p.Qg > 0 {
		k := float64(p.QgMax.V / p.Qg)
		c.Qg = p.QgMax.V
		mulOpt(&c.Qgs, k)
		mulOpt(&c.Qgd, k)
		mulOpt(&c.QgTh, k)
		found = true
	}
	if p.VgsThMax.OK && p.VgsThMax.V > p.VgsTh {
		dv := p.VgsThMax.V - p.VgsTh
		c.VgsTh = p.VgsThMax.V
		if c.VPlateau.OK {
			c.VPlateau.V += dv
		}
		found = true
	}
	return c, found
}

// WorstCase prepares the worst-case device of d's part (see WorstCasePart).
// ok is false when the part gives no maximum values (the device returned is
// then d itself).
func WorstCase(d *fit.Device) (dev fit.Device, ok bool, err error) {
	p, ok := WorstCasePart(d.Part)
	if !ok {
		return *d, false, nil
	}
	pp := new(devices.Part)
	*pp = p
	w, err := fit.Prepare(pp)
	if err != nil {
		return fit.Device{}, false, fmt.Errorf("worst case: %w", err)
	}
	return w, true, nil
}

// Spread is the typical against the worst-case loss of the leading parts.
type Spread struct {
	LeaderTyp, LeaderWorst q.Power // the best part's total loss, typical and worst case
	RunnerTyp, RunnerWorst q.Power // the second part's
	// Lead is RunnerTyp − LeaderTyp, the winner's margin on typical values.
	Lead q.Power
	// Width is LeaderWorst − LeaderTyp, how far the winner's own loss can
	// move within its datasheet limits.
	Width q.Power
	// Clear is true when the lead exceeds the width: the choice holds even
	// for a worst-case sample of the winner against a typical runner-up.
	// Otherwise the choice is a coin toss between the two.
	Clear bool
}

// SpreadOf compares the leader and the runner-up, each evaluated with
// typical and worst-case values.
func SpreadOf(leaderTyp, leaderWorst, runnerTyp, runnerWorst q.Power) Spread {
	s := Spread{LeaderTyp: leaderTyp, LeaderWorst: leaderWorst, RunnerTyp: runnerTyp, RunnerWorst: runnerWorst}
	s.Lead = runnerTyp - leaderTyp
	s.Width = max(0, leaderWorst-leaderTyp)
	s.Clear = s.Lead > s.Width
	return s
}

// PriceLoss is a part's price against its loss, for the trade-off.
type PriceLoss struct {
	Price float64 // N × unit price, in the user's currency
	Loss  float64 // total loss (or weighted loss fraction), smaller is better
}

// ParetoFront returns the indices of the items no other item beats on both
// counts, in increasing price (ties by loss, then index): an item is off the
// front when another costs no more and loses less, or costs less and loses
// no more.
func ParetoFront(items []PriceLoss) []int {
	idx := make([]int, len(items))
	for i := range idx {
		idx[i] = i
	}
	slices.SortStableFunc(idx, func(a, b int) int {
		if c := cmp.Compare(items[a].Price, items[b].Price); c != 0 {
			return c
		}
		return cmp.Compare(items[a].Loss, items[b].Loss)
	})
	var front []int
	for _, i := range idx {
		// Sorted by price then loss, the last item of the front has the
		// least loss so far: i is dominated unless it loses less, or ties
		// it exactly on both counts.
		if len(front) == 0 {
			front = append(front, i)
			continue
		}
		last := items[front[len(front)-1]]
		if items[i].Loss < last.Loss || items[i].Loss == last.Loss && items[i].Price == last.Price {
			front = append(front, i)
		}
	}
	return front
}

// Component is one loss component, for comparisons.
type Component struct {
	Name string                        // as the tables print it
	Get  func(evaluate.Losses) q.Power // the component's power, W
}

// Components returns the loss components in table order, the total last.
func Components() []Component {
	return []Component{
		{"conduction", func(l evaluate.Losses) q.Power { return l.Conduction }},
		{"turn-on", func(l evaluate.Losses) q.Power { return l.TurnOn }},
		{"turn-off", func(l evaluate.Losses) q.Power { return l.TurnOff }},
		{"output cap", func(l evaluate.Losses) q.Power { return l.Coss }},
		{"dead time", func(l evaluate.Losses) q.Power { return l.DeadTime }},
		{"recovery", func(l evaluate.Losses) q.Power { return l.Recovery }},
		{"gate (in FET)", func(l evaluate.Losses) q.Power { return l.GateRint }},
		{"gate driver", func(l evaluate.Losses) q.Power { return l.GateDriver }},
		{"gate resistor", func(l evaluate.Losses) q.Power { return l.GateRext }},
		{"driver supply", func(l evaluate.Losses) q.Power { return l.DriverQuiescent }},
		{"total", func(l evaluate.Losses) q.Power { return l.Total() }},
	}
}

// Delta is a change from the fitted part.
type Delta struct {
	Name     string  // the component, or "total"
	Fitted   float64 // the fitted part's value (W, °C or a fraction)
	Cand     float64 // the candidate's value, same unit
	Abs      float64 // Cand − Fitted
	Rel      float64 // Abs/Fitted (NaN when Fitted is 0)
	Relative bool    // Rel is meaningful
}

func delta(name string, fitted, cand float64) Delta {
	d := Delta{Name: name, Fitted: fitted, Cand: cand, Abs: cand - fitted, Rel: math.NaN()}
	if fitted != 0 {
		d.Rel, d.Relative = d.Abs/math.Abs(fitted), true
	}
	return d
}

// Comparison is a candidate judged against the part already fitted, both
// evaluated at the same operating point.
type Comparison struct {
	Fitted, Cand *evaluate.Result // the fitted part and the candidate, at the same point
	Deltas       []Delta          // the loss components, the total last (W)
	Tj           *Delta           // hottest junction, °C (nil when either has none)
	Eff          *Delta           // stage efficiency, fraction (nil without output power)
	// Decides is the component whose change does most of the total's
	// change (same sign, largest).
	Decides string
	// NewScreens are the screens the candidate fails and the fitted part
	// passes.
	NewScreens evaluate.Screens
	// PackageDiffers is true when both give a package and they differ.
	PackageDiffers bool
	// Verdict is the comparison in one sentence.
	Verdict string
}

// CompareParts judges candidate against fitted at pout (0: no efficiency).
func CompareParts(fitted, cand *evaluate.Result, pout q.Power) Comparison {
	c := Comparison{Fitted: fitted, Cand: cand}
	for _, comp := range Components() {
		c.Deltas = append(c.Deltas, delta(comp.Name, float64(comp.Get(fitted.Losses)), float64(comp.Get(cand.Losses))))
	}
	if tf, ok := fitted.Tj(); ok {
		if tc, ok := cand.Tj(); ok {
			d := delta("Tj", float64(tf), float64(tc))
			c.Tj = &d
		}
	}
	if pout > 0 {
		ef := float64(pout) / float64(pout+fitted.Losses.Total())
		ec := float64(pout) / float64(pout+cand.Losses.Total())
		d := delta("efficiency", ef, ec)
		c.Eff = &d
	}
	c.NewScreens = cand.Screens &^ fitted.Screens
	fp, cp := strings.TrimSpace(fitted.Dev.Part.Package), strings.TrimSpace(cand.Dev.Part.Package)
	c.PackageDiffers = fp != "" && cp != "" && !strings.EqualFold(fp, cp)

	total := c.Deltas[len(c.Deltas)-1]
	best := -1
	for i, d := range c.Deltas[:len(c.Deltas)-1] {
		if d.Abs != 0 && math.Signbit(d.Abs) == math.Signbit(total.Abs) && (best < 0 || math.Abs(d.Abs) > math.Abs(c.Deltas[best].Abs)) {
			best = i
		}
	}
	if best >= 0 {
		c.Decides = c.Deltas[best].Name
	}
	c.Verdict = c.verdict()
	return c
}

func (c *Comparison) verdict() string {
	total := c.Deltas[len(c.Deltas)-1]
	var b strings.Builder
	tol := 1e-9 * math.Max(math.Abs(total.Fitted), math.Abs(total.Cand))
	switch {
	case c.Cand.Screened() || c.Fitted.Screened():
		// A result set aside is not a valid operating point: its loss is
		// not compared.
		b.WriteString("not compared: set aside")
	case math.Abs(total.Abs) <= tol:
		b.WriteString("the same total loss")
	default:
		word := "better"
		if total.Abs > 0 {
			word = "worse"
		}
		fmt.Fprintf(&b, "%s by %s", word, q.Format(q.Power(math.Abs(total.Abs)), 3))
		if total.Relative {
			fmt.Fprintf(&b, " (%.1f %%)", 100*math.Abs(total.Rel))
		}
		if c.Decides != "" {
			for _, d := range c.Deltas {
				if d.Name == c.Decides {
					fmt.Fprintf(&b, ", decided by %s (%s%s)", d.Name, sign(d.Abs), q.Format(q.Power(math.Abs(d.Abs)), 3))
				}
			}
		}
	}
	if c.Fitted.Screened() && !c.Cand.Screened() {
		b.WriteString("; passes the screens the fitted part fails")
	}
	if c.NewScreens != 0 {
		fmt.Fprintf(&b, "; fails %s", strings.Join(ScreenNames(c.NewScreens), ", "))
	}
	if c.PackageDiffers {
		fmt.Fprintf(&b, "; package %s instead of %s", c.Cand.Dev.Part.Package, c.Fitted.Dev.Part.Package)
	}
	return b.String()
}

func sign(v float64) string {
	if v < 0 {
		return "−"
	}
	return "+"
}

// ScreenNames names the screens set in s, in bit order.
func ScreenNames(s evaluate.Screens) []string {
	var out []string
	for s != 0 {
		i := bits.TrailingZeros32(uint32(s))
		s &^= 1 << i
		out = append(out, screenName(evaluate.Screens(1)<<i))
	}
	return out
}

func screenName(s evaluate.Screens) string {
	switch s {
	case evaluate.ScreenVoltage:
		return "voltage margin"
	case evaluate.ScreenPeakCurrent:
		return "peak current rating"
	case evaluate.ScreenRmsCurrent:
		return "rms current rating"
	case evaluate.ScreenGateMax:
		return "gate rating (vgs_max)"
	case evaluate.ScreenGateMin:
		return "gate rating (vgs_min)"
	case evaluate.ScreenBelowThreshold:
		return "drive level (below threshold)"
	case evaluate.ScreenBelowPlateau:
		return "drive level (below plateau)"
	case evaluate.ScreenTjMax:
		return "junction temperature"
	case evaluate.ScreenRunaway:
		return "thermal runaway"
	case evaluate.ScreenNoOutputCap:
		return "output-capacitance data"
	case evaluate.ScreenFalseTurnOn:
		return "false turn-on"
	}
	return fmt.Sprintf("screen %d", bits.TrailingZeros32(uint32(s)))
}
