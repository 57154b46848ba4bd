package decide

import (
	"cmp"
	"fmt"
	"math"
	"runtime"
	"slices"
	"strings"
	q "swrank/devices/quantity"
	"swrank/rank"
	"swrank/rank/evaluate"
	"swrank/rank/fit"
	"swrank/rank/numeric"
	"swrank/rank/stage"
)

// SweepVar is the operating-point variable a sweep moves.
type SweepVar uint8

// Sweep variables.
const (
	SweepFsw    SweepVar = iota // switching frequency, Hz
	SweepIout                   // load current, A (buck and boost)
	SweepVin                    // input voltage, V (custom stage: the blocking voltage)
	SweepVdrive                 // gate drive on level, V
)

var sweepNames = [...]struct{ name, title, unit string }{
	SweepFsw:    {"fsw", "switching frequency", "Hz"},
	SweepIout:   {"iout", "load current", "A"},
	SweepVin:    {"vin", "input voltage", "V"},
	SweepVdrive: {"vdrive", "gate drive", "V"},
}

func (v SweepVar) String() string {
	if int(v) < len(sweepNames) {
		return sweepNames[v].name
	}
	return fmt.Sprintf("sweep(%d)", v)
}

// Title is the variable's name in words, e.g. "switching frequency".
func (v SweepVar) Title() string { return sweepNames[v%SweepVar(len(sweepNames))].title }

// Unit is the variable's unit symbol.
func (v SweepVar) Unit() string { return sweepNames[v%SweepVar(len(sweepNames))].unit }

// ParseSweepVar reads fsw, iout, vin or vdrive.
func ParseSweepVar(s string) (SweepVar, error) {
	names := make([]string, len(sweepNames))
	for i, n := range sweepNames {
		if strings.EqualFold(s, n.name) {
			return SweepVar(i), nil
		}
		names[i] = n.name
	}
	return 0, fmt.Errorf("unknown sweep variable %q (want %s)", s, strings.Join(names, ", "))
}

// Apply sets the variable to x in stage s.
func (v SweepVar) Apply(s *stage.Stage, x float64) error {
	switch v {
	case SweepFsw:
		s.Fsw = q.Frequency(x)
	case SweepIout:
		if s.Topology == stage.Custom {
			return fmt.Errorf("sweep over iout needs a buck or boost stage (a custom stage gives its currents directly)")
		}
		s.Iout = q.Current(x)
	case SweepVin:
		if s.Topology == stage.Custom {
			s.Vblock = q.Voltage(x)
		} else {
			s.Vin = q.Voltage(x)
		}
	case SweepVdrive:
		s.Driver.VOn = q.Voltage(x)
	default:
		return fmt.Errorf("unknown sweep variable %d", v)
	}
	return nil
}

// SweepSpec is the grid of a sweep.
type SweepSpec struct {
	Var    SweepVar // the stage variable swept
	Lo, Hi float64  // ends of the range, Lo < Hi; > 0 for a log grid
	Steps  int      // grid points, 2 to MaxSweepSteps
	Log    bool     // logarithmic steps (equal ratios) instead of linear
}

// MaxSweepSteps bounds the grid of a sweep.
const MaxSweepSteps = 100000

// DefaultSweepSteps is the number of grid points of a sweep when none is
// given: enough to bracket the crossovers, which are then refined, without
// a long table (common practice).
const DefaultSweepSteps = 40

// DefaultSweepTop is how many parts a sweep follows when no part is named:
// the best over the range (Top), few enough for one table and one plot.
const DefaultSweepTop = 5

// DefaultLog reports whether a sweep of v steps logarithmically (equal
// ratios) when no scale is given: the switching frequency, whose losses
// matter over decades; the others step linearly.
func (v SweepVar) DefaultLog() bool { return v == SweepFsw }

// Grid returns the grid values, both ends included.
func (s SweepSpec) Grid() ([]float64, error) {
	switch {
	case s.Steps < 2 || s.Steps > MaxSweepSteps:
		return nil, fmt.Errorf("sweep steps %d outside 2 to %d", s.Steps, MaxSweepSteps)
	case math.IsNaN(s.Lo) || math.IsNaN(s.Hi) || math.IsInf(s.Lo, 0) || math.IsInf(s.Hi, 0):
		return nil, fmt.Errorf("sweep range %g to %g: not finite", s.Lo, s.Hi)
	case !(s.Lo < s.Hi):
		return nil, fmt.Errorf("sweep range %g to %g: the start must be below the end", s.Lo, s.Hi)
	case s.Log && !(s.Lo > 0):
		return nil, fmt.Errorf("log sweep from %g: the start must be > 0", s.Lo)
	}
	x := make([]float64, s.Steps)
	n := float64(s.Steps - 1)
	for i := range x {
		t := float64(i) / n
		if s.Log {
			x[i] = s.Lo * math.Pow(s.Hi/s.Lo, t)
		} else {
			x[i] = s.Lo + (s.Hi-s.Lo)*t
		}
	}
	x[0], x[len(x)-1] = s.Lo, s.Hi
	return x, nil
}

// CrossKind says what makes the best part change at a crossover.
type CrossKind uint8

// Crossover kinds.
const (
	CrossLoss   CrossKind = iota // the two losses are equal there
	CrossScreen                  // a screen sets one of the two parts aside there
	CrossMode                    // the stage changes conduction mode there and the losses jump
	CrossJump                    // a loss jumps there for another reason
)

func (k CrossKind) String() string {
	switch k {
	case CrossScreen:
		return "screen"
	case CrossMode:
		return "mode change"
	case CrossJump:
		return "jump"
	}
	return "equal loss"
}

// Crossover is a value of the swept variable where the best part changes.
type Crossover struct {
	X        float64   // where, in the variable's unit, to 1e-6 relative
	From, To int       // the best part just below and just above X (index into the sweep's devices)
	Loss     float64   // the loss of From at X, W
	Kind     CrossKind // why the best part changes
	Evals    int       // evaluations of the loss difference the refinement took
}

// SweepResult holds every part's total stage loss over the grid.
type SweepResult struct {
	Spec  SweepSpec     // the grid swept
	X     []float64     // the grid values, in the unit of Spec.Var
	Pts   []stage.Point // the operating point at each grid value
	Devs  []*fit.Device // the parts swept, in the order given
	Notes []string      // what the sweep assumed
	total []float64
	pass  []bool

	base    stage.Stage
	ll      stage.LightLoad
	partner *fit.Device
	workers int
}

// Sweep evaluates every device at every grid value of spec, the rest of
// the operating point from base (with light-load behaviour ll; partner as
// in Evaluate). A sweep over the load current of a stage that states its
// ripple as a fraction keeps the inductor that makes that ripple at the
// top of the range (the rated end), so that light loads run in the mode the
// stage really runs in. Results do not depend on opt.Workers.
func Sweep(base stage.Stage, ll stage.LightLoad, spec SweepSpec, devs []*fit.Device, partner *fit.Device, opt rank.Options) (*SweepResult, error) {
	x, err := spec.Grid()
	if err != nil {
		return nil, err
	}
	r := &SweepResult{Spec: spec, X: x, Devs: devs, base: base, ll: ll, partner: partner, workers: opt.Workers}
	if r.workers <= 0 {
		r.workers = runtime.GOMAXPROCS(0)
	}
	if spec.Var == SweepIout && base.Topology != stage.Custom {
		r.base.Pout = 0
		if base.Inductance == 0 {
			top := base
			top.Iout = q.Current(spec.Hi)
			rated, err := ScaleStage(top, 1)
			if err != nil {
				return nil, fmt.Errorf("sweep at %g A: %w", spec.Hi, err)
			}
			r.base = rated
			r.base.Pout = 0
			if rated.Inductance > 0 {
				r.Notes = append(r.Notes, fmt.Sprintf("the inductor is kept at %s, the value that gives the stated ripple at %s", rated.Inductance, q.Current(spec.Hi)))
			}
		}
	}
	r.Pts = make([]stage.Point, len(x))
	for i, v := range x {
		pt, err := r.pointAt(v)
		if err != nil {
			return nil, err
		}
		r.Pts[i] = pt
	}
	n, m := len(devs), len(x)
	r.total = make([]float64, n*m)
	r.pass = make([]bool, n*m)
	eval := func(lo, hi int) {
		for k := lo; k < hi; k++ {
			for i := range m {
				res := evaluate.Evaluate(&r.Pts[i], devs[k], partner, nil)
				r.total[k*m+i] = float64(res.Losses.Total())
				r.pass[k*m+i] = !res.Screened()
			}
		}
		if opt.Progress != nil {
			opt.Progress(hi - lo)
		}
	}
	rank.ForChunks(n, r.workers, 16, eval)
	return r, nil
}

// pointAt resolves the operating point at x.
func (r *SweepResult) pointAt(x float64) (stage.Point, error) {
	s := r.base
	if err := r.Spec.Var.Apply(&s, x); err != nil {
		return stage.Point{}, err
	}
	pt, err := s.ResolveLight(r.ll)
	if err != nil {
		return stage.Point{}, fmt.Errorf("sweep at %s = %s: %w", r.Spec.Var, q.FormatFloat(x, 4, kindOf(r.Spec.Var)), err)
	}
	return pt, nil
}

func kindOf(v SweepVar) q.Kind {
	switch v {
	case SweepFsw:
		return q.Frequency(0).Kind()
	case SweepIout:
		return q.Current(0).Kind()
	}
	return q.Voltage(0).Kind()
}

// Total returns part k's total stage loss at grid point i, W, and whether
// it passes every screen there.
func (r *SweepResult) Total(k, i int) (float64, bool) {
	j := k*len(r.X) + i
	return r.total[j], r.pass[j]
}

// Evaluate evaluates part k at grid point i in full (for the components).
func (r *SweepResult) Evaluate(k, i int) evaluate.Result {
	return evaluate.Evaluate(&r.Pts[i], r.Devs[k], r.partner, nil)
}

// Top returns the indices of the n best parts over the sweep (all when n
// ≤ 0): fewest grid points where a screen sets the part aside, then the
// least mean total loss over the grid, then by name.
func (r *SweepResult) Top(n int) []int {
	type key struct {
		k, screened int
		mean        float64
	}
	m := len(r.X)
	keys := make([]key, len(r.Devs))
	for k := range r.Devs {
		s := 0
		sum := 0.0
		for i := range m {
			t, ok := r.Total(k, i)
			sum += t
			if !ok {
				s++
			}
		}
		keys[k] = key{k, s, sum / float64(m)}
	}
	slices.SortStableFunc(keys, func(a, b key) int {
		if c := cmp.Compare(a.screened, b.screened); c != 0 {
			return c
		}
		if c := cmp.Compare(a.mean, b.mean); c != 0 {
			return c
		}
		return cmp.Compare(r.Devs[a.k].Part.Name, r.Devs[b.k].Part.Name)
	})
	if n <= 0 || n > len(keys) {
		n = len(keys)
	}
	out := make([]int, n)
	for i := range out {
		out[i] = keys[i].k
	}
	return out
}

// Best returns, for each grid point, the part of set (indices into Devs)
// with the least total loss among those that pass every screen there, or
// −1 when none passes. Ties go to the earlier part of set.
func (r *SweepResult) Best(set []int) []int {
	best := make([]int, len(r.X))
	for i := range r.X {
		best[i] = -1
		bl := 0.0
		for _, k := range set {
			t, ok := r.Total(k, i)
			if ok && (best[i] < 0 || t < bl) {
				best[i], bl = k, t
			}
		}
	}
	return best
}

// screenPenalty is added to a screened part's loss in the crossover search,
// so that the difference of two parts stays finite and changes sign where
// a screen sets one aside. Far above any real loss.
const screenPenalty = 1e12

// crossTol is the relative tolerance of a crossover's position.
const crossTol = 1e-6

// Crossovers finds every value of the swept variable where the best part of
// set changes: each change between neighbouring grid points is bracketed
// by them and refined by Brent's method (FindRoot) on the difference of the
// two parts' losses to 1e-6 relative, the position never read off the
// grid. When a third part of set is better at the refined point, the
// bracket is split there and both halves are refined in turn, so that a
// part that is best only between two grid points is found as well.
func (r *SweepResult) Crossovers(set []int) ([]Crossover, error) {
	best := r.Best(set)
	var out []Crossover
	for i := 0; i+1 < len(r.X); i++ {
		a, b := best[i], best[i+1]
		if a == b || a < 0 || b < 0 {
			continue
		}
		cs, err := r.refine(set, r.X[i], r.X[i+1], a, b, 0)
		if err != nil {
			return nil, err
		}
		out = append(out, cs...)
	}
	return out, nil
}

// lossAt is the loss of part k at x for the crossover search, with the
// screen penalty.
func (r *SweepResult) lossAt(k int, pt *stage.Point) (float64, bool) {
	res := evaluate.Evaluate(pt, r.Devs[k], r.partner, nil)
	l := float64(res.Losses.Total())
	if res.Screened() {
		return l + screenPenalty, false
	}
	return l, true
}

func (r *SweepResult) refine(set []int, lo, hi float64, a, b, depth int) ([]Crossover, error) {
	var ferr error
	g := func(x float64) float64 {
		pt, err := r.pointAt(x)
		if err != nil {
			ferr = err
			return math.NaN()
		}
		la, _ := r.lossAt(a, &pt)
		lb, _ := r.lossAt(b, &pt)
		return la - lb
	}
	root, err := numeric.FindRoot(g, lo, hi, crossTol, 0)
	if ferr != nil {
		return nil, ferr
	}
	if err != nil {
		return nil, fmt.Errorf("crossover of %s and %s between %g and %g: %w", r.Devs[a].Part.Name, r.Devs[b].Part.Name, lo, hi, err)
	}
	x := root.X
	pt, err := r.pointAt(x)
	if err != nil {
		return nil, err
	}
	// A third part better at x?
	if depth < 16 && len(set) > 2 {
		la, _ := r.lossAt(a, &pt)
		lb, _ := r.lossAt(b, &pt)
		c, lc := r.bestAt(set, &pt)
		if c >= 0 && c != a && c != b && lc < min(la, lb)*(1-1e-9) && x > lo && x < hi {
			left, err := r.refine(set, lo, x, a, c, depth+1)
			if err != nil {
				return nil, err
			}
			right, err := r.refine(set, x, hi, c, b, depth+1)
			if err != nil {
				return nil, err
			}
			return append(left, right...), nil
		}
	}
	cr := Crossover{X: x, From: a, To: b, Evals: root.Evals}
	cr.Loss, _ = r.lossAt(a, &pt)
	cr.Kind = r.kindAt(x, a, b, lo, hi)
	if cr.Loss >= screenPenalty {
		cr.Loss -= screenPenalty
	}
	return []Crossover{cr}, nil
}

// bestAt returns the part of set with the least penalised loss at pt.
func (r *SweepResult) bestAt(set []int, pt *stage.Point) (int, float64) {
	loss := make([]float64, len(set))
	rank.ForChunks(len(set), r.workers, 256, func(lo, hi int) {
		for j := lo; j < hi; j++ {
			loss[j], _ = r.lossAt(set[j], pt)
		}
	})
	best, bl := -1, 0.0
	for j, k := range set {
		if best < 0 || loss[j] < bl {
			best, bl = k, loss[j]
		}
	}
	return best, bl
}

// kindAt tells why the best part changes at x, looking just either side.
func (r *SweepResult) kindAt(x float64, a, b int, lo, hi float64) CrossKind {
	h := 4 * crossTol * math.Abs(x)
	if h == 0 {
		h = 4 * crossTol * (hi - lo)
	}
	x1, x2 := max(lo, x-h), min(hi, x+h)
	p1, err1 := r.pointAt(x1)
	p2, err2 := r.pointAt(x2)
	if err1 != nil || err2 != nil {
		return CrossJump
	}
	la1, pa1 := r.lossAt(a, &p1)
	lb1, pb1 := r.lossAt(b, &p1)
	la2, pa2 := r.lossAt(a, &p2)
	lb2, pb2 := r.lossAt(b, &p2)
	if pa1 != pa2 || pb1 != pb2 {
		return CrossScreen
	}
	// A continuous crossing leaves a difference that is tiny against the
	// losses just either side; a jump leaves a finite one.
	d1, d2 := la1-lb1, la2-lb2
	scale := math.Max(math.Abs(la1), math.Abs(lb1))
	if math.Abs(d1) <= 1e-3*scale && math.Abs(d2) <= 1e-3*scale {
		return CrossLoss
	}
	if p1.Mode != p2.Mode {
		return CrossMode
	}
	return CrossJump
}
