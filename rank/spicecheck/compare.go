package spicecheck

import (
	"cmp"
	"fmt"
	"math"
	"sort"
	"strings"

	"swrank/devices"
	q "swrank/devices/quantity"
	"swrank/rank/evaluate"
	"swrank/rank/fit"
	"swrank/rank/loss"
	"swrank/rank/spice"
	"swrank/rank/stage"
)

// Component names, in report order.
const (
	CompConduction = "conduction"
	CompTurnOn     = "turn-on"
	CompTurnOff    = "turn-off"
	CompCoss       = "coss"
	CompGate       = "gate"
	CompTotal      = "total"
	// CompSwitching is the edges together: turn-on, turn-off and the
	// output capacitance.
	CompSwitching = "switching"
)

// Components lists the compared loss components.
func Components() []string {
	return []string{CompConduction, CompTurnOn, CompTurnOff, CompCoss, CompSwitching, CompGate, CompTotal}
}

// Stage is swrank's custom stage for the simulated cell: the blocking
// voltage the simulation applied (bus plus clamp drop), the load current at
// both edges, the rms current of a flat on-state current over the gate duty,
// the same driver, an ideal partner, and the junction pinned to the
// simulation's temperature (25 °C unless the point says otherwise).
func Stage(p *spice.Point, e *spice.CellEnergies) stage.Stage {
	return stage.Stage{
		Topology: stage.Custom,
		Vblock:   q.Voltage(e.VBlock),
		Ion:      q.Current(p.Current), Ioff: q.Current(p.Current),
		Irms: q.Current(p.Current * math.Sqrt(p.Duty)),
		Fsw:  q.Frequency(p.Fsw),
		Driver: stage.Driver{VOn: q.Voltage(p.VOn), VOff: 0,
			RSource: q.Resistance(p.RSource), RSink: q.Resistance(p.RSink), RgExt: q.Resistance(p.RgExt)},
		TjFixed: q.Some(q.Temperature(cmp.Or(p.Tj, 25))),
		Derate:  q.Ratio(p.Derate),
		// The loop inductance in series with the supply is the layout's
		// (the package's common-source inductance comes with the part).
		LoopInductance: q.Inductance(e.Par.Lloop),
	}
}

// Predict runs swrank's models for the part at the simulated cell.
func Predict(part *devices.Part, p *spice.Point, e *spice.CellEnergies) (evaluate.Result, error) {
	st := Stage(p, e)
	pt, err := st.Resolve()
	if err != nil {
		return evaluate.Result{}, fmt.Errorf("point %s: %w", p.Name, err)
	}
	dev, err := fit.Prepare(part)
	if err != nil {
		return evaluate.Result{}, fmt.Errorf("point %s: %w", p.Name, err)
	}
	res := evaluate.Evaluate(&pt, &dev, nil, nil)
	res.Dev = nil // the prepared device does not outlive this call
	for i := range res.Devices {
		res.Devices[i].Dev = nil
	}
	return res, nil
}

// Row is one device at one point: the predicted and simulated power of each
// component, W.
type Row struct {
	Device, Point string             // the device's and the point's names
	Pred, Sim     map[string]float64 // power by component (Components()), W: swrank's and the simulation's
	Screened      bool               // swrank set the part aside at this point
	ScreenNote    string             // why
	// VoltageOnly is true when the only screen is the drain-voltage rating:
	// the energies are still those of the models and are compared.
	VoltageOnly bool
	Method      string              // swrank's overlap method
	SimE        *spice.CellEnergies // the simulated period
	Trans       loss.Transitions    // swrank's edge intervals
	VplOn       float64             // swrank's plateau at the load current

	// Cells with parasitic inductance.
	Variant string // the variant's name; "" for the plain cell
	Part    string // the library row evaluated (the packaged part for an Lcs variant)
	// VPeakPred is swrank's peak drain voltage (DeviceResult.Vpeak), V;
	// the simulated one is SimE.VPeak.
	VPeakPred float64
	// Eon, Eoff are swrank's overlap energies per cycle
	// (DeviceResult.Eon, Eoff), J; ElcsOn, ElcsOff and Eloop its
	// common-source and loop shares.
	Eon, Eoff, ElcsOn, ElcsOff, Eloop float64
}

// OvershootRatio is swrank's overshoot above the blocked voltage over the
// simulated one, (VPeakPred − V)/(VPeakSim − V) with V the simulated
// off-state voltage; NaN when the simulation shows none.
func (r *Row) OvershootRatio() float64 {
	sim := r.SimE.VPeak - r.SimE.VBlock
	if !(sim > 0) {
		return math.NaN()
	}
	return (r.VPeakPred - r.SimE.VBlock) / sim
}

// NewRow pairs a prediction with a simulation.
func NewRow(dev string, p *spice.Point, res *evaluate.Result, e *spice.CellEnergies) Row {
	f := p.Fsw
	l := res.Losses
	d := &res.Devices[0]
	r := Row{Device: dev, Point: p.Name, SimE: e, Screened: res.Screened(), Method: d.Method.String(),
		Trans: d.Trans, VplOn: float64(d.VplOn), VPeakPred: float64(d.Vpeak),
		Eon: float64(d.Eon), Eoff: float64(d.Eoff), ElcsOn: float64(d.ElcsOn), ElcsOff: float64(d.ElcsOff),
		Eloop: float64(d.Eloop)}
	if r.Screened {
		r.ScreenNote = screenNames(res.Screens)
		r.VoltageOnly = res.Screens == evaluate.ScreenVoltage
	}
	r.Pred = map[string]float64{
		CompConduction: float64(l.Conduction),
		CompTurnOn:     float64(l.TurnOn),
		CompTurnOff:    float64(l.TurnOff),
		CompCoss:       float64(l.Coss),
		CompSwitching:  float64(l.TurnOn + l.TurnOff + l.Coss),
		CompGate:       float64(l.GateRint + l.GateDriver + l.GateRext),
		CompTotal:      float64(l.Total()),
	}
	r.Sim = map[string]float64{
		CompConduction: e.Cond * f,
		CompTurnOn:     e.OnOverlap * f,
		CompTurnOff:    e.Off * f,
		CompCoss:       e.OnCoss * f,
		CompSwitching:  (e.OnOverlap + e.Off + e.OnCoss) * f,
		CompGate:       e.Gate() * f,
		CompTotal:      e.Total() * f,
	}
	return r
}

// RelErr is (predicted − simulated)/simulated.
func RelErr(pred, sim float64) float64 {
	if sim == 0 {
		if pred == 0 {
			return 0
		}
		return math.Inf(1)
	}
	return (pred - sim) / sim
}

// Err returns the relative error of one component.
func (r *Row) Err(comp string) float64 { return RelErr(r.Pred[comp], r.Sim[comp]) }

// SwitchingShare is the simulated share of turn-on, turn-off and
// output-capacitance loss in the total.
func (r *Row) SwitchingShare() float64 {
	return (r.Sim[CompTurnOn] + r.Sim[CompTurnOff] + r.Sim[CompCoss]) / r.Sim[CompTotal]
}

// Stats are the median and the worst (largest magnitude) relative error.
type Stats struct {
	N             int     // rows summarised
	Median, Worst float64 // of |error|; ≥ 0 (0.1 = 10 %)
	WorstSigned   float64 // the worst error with its sign
	WorstAt       string  // where it is, "device @ point"
}

// ErrStats summarises the relative errors of a component over rows.
func ErrStats(rows []Row, comp string) Stats {
	return statsOf(rows, func(r *Row) float64 { return r.Err(comp) })
}

// statsOf summarises the error err of each row: the median |error| and
// the worst, with its sign and place.
func statsOf(rows []Row, err func(*Row) float64) Stats {
	var abs []float64
	s := Stats{}
	for i := range rows {
		r := &rows[i]
		e := err(r)
		abs = append(abs, math.Abs(e))
		if math.Abs(e) >= s.Worst {
			s.Worst, s.WorstSigned, s.WorstAt = math.Abs(e), e, r.Device+" @ "+r.Point
		}
	}
	s.N = len(abs)
	s.Median = median(abs)
	return s
}

func median(x []float64) float64 {
	if len(x) == 0 {
		return math.NaN()
	}
	y := append([]float64(nil), x...)
	sort.Float64s(y)
	n := len(y)
	if n%2 == 1 {
		return y[n/2]
	}
	return (y[n/2-1] + y[n/2]) / 2
}

// Order returns the device names sorted by the total loss of one side
// (pred or sim), lowest first.
func Order(rows []Row, pred bool) []string {
	idx := make([]int, len(rows))
	for i := range idx {
		idx[i] = i
	}
	val := func(i int) float64 {
		if pred {
			return rows[i].Pred[CompTotal]
		}
		return rows[i].Sim[CompTotal]
	}
	sort.SliceStable(idx, func(a, b int) bool { return val(idx[a]) < val(idx[b]) })
	out := make([]string, len(rows))
	for i, k := range idx {
		out[i] = rows[k].Device
	}
	return out
}

// BestTie is the simulated margin within which the part swrank puts first
// counts as the best: 1 % of the simulated best's total loss, well inside
// the part-to-part spread of a datasheet's typical values (common
// practice), so that a near tie in the simulation is not scored as a
// wrong choice. Reports print the margin whenever it is used.
const BestTie = 0.01

// BestGap is how much more the part swrank puts first loses in the
// simulation than the simulated best, relative to the latter: 0 when they
// are the same part.
func BestGap(rows []Row) float64 {
	if len(rows) == 0 {
		return 0
	}
	best, pred := math.Inf(1), 0.0
	first := Order(rows, true)[0]
	for _, r := range rows {
		best = min(best, r.Sim[CompTotal])
		if r.Device == first {
			pred = r.Sim[CompTotal]
		}
	}
	return pred/best - 1
}

// Pairs counts the concordant and discordant pairs of the two orderings of
// rows by total loss (ties count as neither).
func Pairs(rows []Row) (conc, disc int) {
	for i := 0; i < len(rows); i++ {
		for j := i + 1; j < len(rows); j++ {
			a := rows[i].Pred[CompTotal] - rows[j].Pred[CompTotal]
			b := rows[i].Sim[CompTotal] - rows[j].Sim[CompTotal]
			switch {
			case a*b > 0:
				conc++
			case a*b < 0:
				disc++
			}
		}
	}
	return conc, disc
}

// KendallTau is (concordant − discordant)/(all pairs), Kendall's τ_a
// (Kendall, "A new measure of rank correlation", Biometrika 30, 1938).
func KendallTau(conc, disc, n int) float64 {
	pairs := n * (n - 1) / 2
	if pairs == 0 {
		return math.NaN()
	}
	return float64(conc-disc) / float64(pairs)
}

// screenNames spells out the screens that set a part aside.
func screenNames(s evaluate.Screens) string {
	names := []struct {
		s evaluate.Screens
		n string
	}{{evaluate.ScreenVoltage, "voltage rating"}, {evaluate.ScreenPeakCurrent, "peak current"},
		{evaluate.ScreenRmsCurrent, "rms current"}, {evaluate.ScreenGateMax, "drive above vgs_max"},
		{evaluate.ScreenGateMin, "drive below vgs_min"}, {evaluate.ScreenBelowThreshold, "drive below threshold"},
		{evaluate.ScreenBelowPlateau, "drive below plateau"}, {evaluate.ScreenTjMax, "tj_max"},
		{evaluate.ScreenRunaway, "thermal runaway"}, {evaluate.ScreenNoOutputCap, "no output-capacitance data"},
		{evaluate.ScreenFalseTurnOn, "false turn-on"}, {evaluate.ScreenCrossConduction, "cross-conduction"},
		{evaluate.ScreenShuntTooSmall, "shunt too small"}, {evaluate.ScreenTooSlow, "too slow"},
		{evaluate.ScreenImplausible, "loss above the stage's power"}, {evaluate.ScreenEstimated, "estimated"}}
	var out []string
	for _, x := range names {
		if s&x.s != 0 {
			out = append(out, x.n)
			s &^= x.s
		}
	}
	if s != 0 {
		out = append(out, fmt.Sprintf("other (%#x)", uint32(s)))
	}
	return strings.Join(out, ", ")
}
