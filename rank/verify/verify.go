package verify

import (
	"cmp"
	"context"
	"errors"
	"fmt"
	"math"
	"path/filepath"
	"runtime"
	"slices"
	"strings"
	"sync"

	"swrank/devices"
	q "swrank/devices/quantity"
	"swrank/rank/evaluate"
	"swrank/rank/fit"
	"swrank/rank/spice"
	"swrank/rank/stage"
)

// SimTemperature is the junction and ambient temperature of every bench,
// °C (the decks' .options temp and tnom).
const SimTemperature = 25

// DefaultTop is the number of parts verified when Options.Top is 0.
const DefaultTop = 3

// Options tune Run.
type Options struct {
	Top    int           // parts verified, the best that have a model; default 3
	Jobs   int           // simulations at once; default runtime.NumCPU()
	Runner *spice.Runner // ngspice; required
	Sim    spice.SimOptions
	// Base is the directory that relative spice_model paths start from
	// (the library file's directory).
	Base string
	// Progress, when set, is called after each part's simulation with the
	// number done and the number to do.
	Progress func(done, total int)
}

// Share is one loss share of one part, W.
type Share struct {
	Name      string
	Predicted float64 // swrank's model under the bench's conditions, W
	Simulated float64 // integrated over the simulated period, W
}

// Diff is the relative difference (predicted − simulated)/simulated; ok
// is false when the simulated share is zero.
func (s Share) Diff() (float64, bool) {
	if s.Simulated == 0 {
		return 0, false
	}
	return (s.Predicted - s.Simulated) / math.Abs(s.Simulated), true
}

// Part is one verified part.
type Part struct {
	Name    string
	Rank    int     // place in the ranking, 1-based
	Shares  []Share // in the order of the share names
	Flagged []string
	// Cause names the share with the largest difference in watts when the
	// total is flagged.
	Cause string
	Sim   *spice.BenchResult
	Err   error // the part could not be simulated (non-convergence, no steady state): reported, not zeroed
}

// Share returns the share called name.
func (p *Part) Share(name string) (Share, bool) {
	for _, s := range p.Shares {
		if s.Name == name {
			return s, true
		}
	}
	return Share{}, false
}

// Report is the verification of a shortlist.
type Report struct {
	Point   *stage.Point
	Parts   []Part   // in rank order
	Skipped []string // better-ranked parts without a model, with why
	// PredictedOrder and SimulatedOrder are the verified parts by total
	// loss; OrderAgrees is true when they are the same.
	PredictedOrder, SimulatedOrder []string
	OrderAgrees                    bool
}

// Run verifies the best opt.Top parts of results (in rank order, screened
// parts left out) that have a model. A model that cannot be read fails the
// whole run before anything is simulated; a part whose simulation fails is
// reported with its error.
func Run(ctx context.Context, pt *stage.Point, results []evaluate.Result, opt Options) (*Report, error) {
	if opt.Runner == nil {
		return nil, errors.New("verify: no ngspice runner")
	}
	if pt.Stage.Topology == stage.ClassD {
		return nil, errors.New("verify: no class D bench yet (buck, boost, custom and class E are simulated)")
	}
	top := opt.Top
	if top <= 0 {
		top = DefaultTop
	}
	rep := &Report{Point: pt}
	cmpPt, err := benchPoint(pt)
	if err != nil {
		return nil, err
	}
	type job struct {
		idx   int
		bench *spice.Bench
	}
	var jobs []job
	for i := range results {
		r := &results[i]
		if r.Screened() || len(jobs) == top {
			continue
		}
		name := r.Dev.Part.Name
		if missing := noModel(r); missing != "" {
			rep.Skipped = append(rep.Skipped, fmt.Sprintf("%s (rank %d): %s", name, i+1, missing))
			continue
		}
		b, err := NewBench(pt, r, opt.Base)
		if err != nil {
			return nil, fmt.Errorf("%s: %w", name, err)
		}
		p := Part{Name: name, Rank: i + 1}
		pred, err := predict(cmpPt, r)
		if err != nil {
			return nil, fmt.Errorf("%s: %w", name, err)
		}
		p.Shares = pred
		rep.Parts = append(rep.Parts, p)
		jobs = append(jobs, job{len(rep.Parts) - 1, b})
	}
	n := opt.Jobs
	if n <= 0 {
		n = runtime.NumCPU()
	}
	sem := make(chan struct{}, n)
	var wg sync.WaitGroup
	var mu sync.Mutex
	done := 0
	for _, j := range jobs {
		wg.Add(1)
		go func() {
			defer wg.Done()
			sem <- struct{}{}
			defer func() { <-sem }()
			res, err := spice.Simulate(ctx, opt.Runner, j.bench, opt.Sim)
			mu.Lock()
			defer mu.Unlock()
			p := &rep.Parts[j.idx]
			p.Sim, p.Err = res, err
			done++
			if opt.Progress != nil {
				opt.Progress(done, len(jobs))
			}
		}()
	}
	wg.Wait()
	for i := range rep.Parts {
		compare(&rep.Parts[i], pt)
	}
	rep.order()
	return rep, nil
}

// noModel says why a result's devices cannot be simulated, or "".
func noModel(r *evaluate.Result) string {
	for i := 0; i < r.N; i++ {
		if p := r.Devices[i].Dev.Part; strings.TrimSpace(p.SpiceModel) == "" {
			return fmt.Sprintf("no spice_model for %s", p.Name)
		}
	}
	return ""
}

// benchPoint is pt under the bench's conditions: the junction pinned at
// SimTemperature and no layout loop inductance.
func benchPoint(pt *stage.Point) (*stage.Point, error) {
	p := *pt
	p.Stage.TjFixed = q.Some[q.Temperature](SimTemperature)
	p.Stage.LoopInductance = 0
	return &p, nil
}

// predict evaluates the result's devices again at the bench's point,
// without their package inductances (the bench has none), and returns the
// predicted shares.
func predict(pt *stage.Point, r *evaluate.Result) ([]Share, error) {
	prep := func(d *fit.Device) (*fit.Device, error) {
		if d == nil {
			return nil, nil
		}
		p := *d.Part
		// Stated as none (zero), not left blank: a blank would take the
		// package family's estimate.
		p.Lcs, p.Lloop = q.Some[q.Inductance](0), q.Some[q.Inductance](0)
		fd, err := fit.Prepare(&p)
		if err != nil {
			return nil, err
		}
		return &fd, nil
	}
	dev, err := prep(r.Dev)
	if err != nil {
		return nil, err
	}
	partner, err := prep(r.Partner)
	if err != nil {
		return nil, err
	}
	res := evaluate.Evaluate(pt, dev, partner, nil)
	var cond, sw, dead, gate, swt q.Power
	for i := 0; i < res.N; i++ {
		l := res.Devices[i].Losses
		cond += l.Conduction
		sw += l.TurnOn + l.TurnOff + l.Coss + l.Recovery
		dead += l.DeadTime
		gate += l.GateRint + l.GateDriver + l.GateRext
		swt += l.Switch()
	}
	tot := res.Losses.Total() - res.Losses.DriverQuiescent
	out := []Share{{Name: ShareConduction, Predicted: float64(cond)}, {Name: ShareSwitching, Predicted: float64(sw)}}
	if pt.HasSync {
		out = append(out, Share{Name: ShareDeadTime, Predicted: float64(dead)})
	}
	return append(out, Share{Name: ShareGate, Predicted: float64(gate)}, Share{Name: ShareSwitch, Predicted: float64(swt)},
		Share{Name: ShareTotal, Predicted: float64(tot)}), nil
}

// compare fills the simulated shares and the flags.
func compare(p *Part, pt *stage.Point) {
	if p.Err != nil || p.Sim == nil {
		return
	}
	var cond, sw, off, drive, swt float64
	for _, s := range p.Sim.Places {
		cond += s.Conduction
		sw += s.Switching
		off += s.Off
		drive += s.Drive
		swt += s.Switch()
	}
	sim := map[string]float64{ShareConduction: cond, ShareSwitching: sw, ShareDeadTime: off, ShareGate: drive,
		ShareSwitch: swt, ShareTotal: p.Sim.Total()}
	if !pt.HasSync {
		// No dead time: what the gate-off intervals hold (a turn-off
		// tail past the window, leakage) is the edges'.
		sim[ShareSwitching] += off
	}
	total := math.Abs(p.Sim.Total())
	var worst float64
	for i := range p.Shares {
		s := &p.Shares[i]
		s.Simulated = sim[s.Name]
		d, ok := s.Diff()
		if !ok || math.Abs(d) <= Margin(s.Name) || math.Max(math.Abs(s.Simulated), math.Abs(s.Predicted)) < Floor*total {
			continue
		}
		p.Flagged = append(p.Flagged, s.Name)
		if s.Name != ShareSwitch && s.Name != ShareTotal && s.Name != ShareGate {
			if w := math.Abs(s.Predicted - s.Simulated); w > worst {
				worst, p.Cause = w, s.Name
			}
		}
	}
	if p.Cause == "" && len(p.Flagged) > 0 {
		p.Cause = p.Flagged[0]
	}
}

// order fills the predicted and simulated orders of the parts simulated.
func (r *Report) order() {
	type kv struct {
		name      string
		pred, sim float64
	}
	var xs []kv
	for _, p := range r.Parts {
		if p.Err != nil || p.Sim == nil {
			continue
		}
		t, _ := p.Share(ShareTotal)
		xs = append(xs, kv{p.Name, t.Predicted, t.Simulated})
	}
	by := func(f func(kv) float64) []string {
		s := slices.Clone(xs)
		slices.SortStableFunc(s, func(a, b kv) int { return cmp.Compare(f(a), f(b)) })
		out := make([]string, len(s))
		for i, x := range s {
			out[i] = x.name
		}
		return out
	}
	r.PredictedOrder = by(func(x kv) float64 { return x.pred })
	r.SimulatedOrder = by(func(x kv) float64 { return x.sim })
	r.OrderAgrees = slices.Equal(r.PredictedOrder, r.SimulatedOrder)
}

// ModelPath is where a part's spice_model is found: as written when
// absolute, else under base.
func ModelPath(base string, p *devices.Part) string {
	m := strings.TrimSpace(p.SpiceModel)
	if filepath.IsAbs(m) {
		return m
	}
	return filepath.Join(base, m)
}

// LoadModel reads a part's model file (spice.LoadDevice).
func LoadModel(base string, p *devices.Part) (*spice.Device, error) {
	return spice.LoadDevice(ModelPath(base, p), strings.TrimSpace(p.SpiceSubckt), p.SpicePins)
}
