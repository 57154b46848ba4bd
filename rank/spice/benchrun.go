package spice

import (
	"context"
	"errors"
	"fmt"
	"math"
	"strings"
)

// Shares are one switch's losses over the measured period, W, taken at its
// terminals (so that they hold for a subcircuit as for a VDMOS card).
type Shares struct {
	// Conduction is the drain energy while its gate is on, outside the
	// hard-edge windows, times f.
	Conduction float64
	// Switching is the drain energy in the hard-edge windows, times f: the
	// overlap of voltage and current, the output-capacitance energy (at
	// the terminals it appears at turn-off) and the recovered charge of
	// the partner's diode.
	Switching float64
	// Off is the drain energy while its gate is off, outside the hard
	// edges, times f: the body diode's conduction in the dead times
	// (the charge and discharge of its output capacitance cancel over the
	// period).
	Off float64
	// Gate is the energy into the gate terminal, times f: the internal
	// gate resistance's loss.
	Gate float64
	// Drive is the power drawn from the switch's drive supply: every gate
	// resistance's loss, internal, external and the driver's own.
	Drive float64
}

// Switch is the transistor's total: conduction, switching, off and gate, W.
func (s Shares) Switch() float64 { return s.Conduction + s.Switching + s.Off + s.Gate }

// Driver is the drive loss outside the transistor (driver output and
// external resistor), W.
func (s Shares) Driver() float64 { return s.Drive - s.Gate }

// BenchResult is what one bench's simulation shows over its last period
// in periodic steady state.
type BenchResult struct {
	Bench     string   // the bench's description
	Places    []Shares // control switch first, then the synchronous switch
	Rectifier float64  // the rectifier diode's loss, W (diode-rectified stages)
	ILMean    float64  // mean inductor current, A (buck, boost)
	// Bridge is the dead times' waveform of a synchronous buck or boost
	// (nil for the other benches).
	Bridge  *BridgeWave `json:",omitempty"`
	Periods int         // periods simulated in the accepted run
	// PSS is the relative difference of the last two periods' energies
	// (every switch's terminals, drive supplies and the rectifier).
	PSS       float64
	Runs      int     // ngspice runs it took
	Relaxed   bool    // the looser tolerances were needed (the time step stalled with the tight ones)
	StepLimit float64 // maximum time step, s
	Kept      string  `json:"-"` // scratch directory kept (Keep), or ""
	Cached    bool    `json:"-"` // read from the cache, not simulated
}

// Total is the stage's switch and drive loss (rectifier excluded), W.
func (r *BenchResult) Total() float64 {
	var t float64
	for _, s := range r.Places {
		t += s.Switch() + s.Driver()
	}
	return t
}

// SimOptions bound the steady-state search of Simulate.
type SimOptions struct {
	// Tol is the steady-state criterion: the last two periods' energies
	// agree within Tol (relative). Default 0.005 (0.5 %).
	Tol float64
	// Periods is the first run's length, in periods. Default 12 (class E
	// 200: its feed choke settles over about 90 periods).
	Periods int
	// MaxPeriods bounds the doubling of the run length. Default 400
	// (class E 1600).
	MaxPeriods int
	// Cache, when not nil, keeps and returns results by a hash of the
	// model files, the deck and these options.
	Cache *Cache
}

// ErrNoSteadyState marks a bench that did not reach periodic steady state
// within SimOptions.MaxPeriods.
var ErrNoSteadyState = errors.New("no periodic steady state")

// Simulate runs the bench to periodic steady state and integrates each
// switch's loss shares over the last period. A converter's output source
// is moved until the mean inductor current is within 1 % of the bench's
// IL (the switches' drops shift it otherwise); the run is doubled in
// length until the last two periods' energies agree within Tol.
func Simulate(ctx context.Context, r *Runner, b *Bench, o SimOptions) (*BenchResult, error) {
	if o.Tol <= 0 {
		o.Tol = 0.005
	}
	if o.Periods < 3 {
		o.Periods = 12
		if b.Kind == ClassEBench {
			o.Periods = 200
		}
	}
	if o.MaxPeriods < o.Periods {
		o.MaxPeriods = max(400, o.Periods)
		if b.Kind == ClassEBench {
			o.MaxPeriods = 1600
		}
	}
	files, compat, err := b.modelFiles()
	if err != nil {
		return nil, err
	}
	vsrc := b.Vout - b.IL*b.outputR()
	if b.Kind == BoostBench {
		vsrc = b.Vout - b.IL*(1-b.Duty)*b.outputR()
	}
	deck0, err := b.deck(o.Periods, vsrc, benchOptions[0])
	if err != nil {
		return nil, err
	}
	key := Key(files["model.lib"], []byte(compat), []byte(deck0), []byte(fmt.Sprint(o.Tol, o.Periods, o.MaxPeriods)))
	var cached BenchResult
	if r.Keep == false && o.Cache.Get(key, &cached) {
		cached.Cached = true
		return &cached, nil
	}
	n, opt := o.Periods, 0
	for runs := 1; ; runs++ {
		deck, err := b.deck(n, vsrc, benchOptions[opt])
		if err != nil {
			return nil, err
		}
		tabs, dir, err := r.RunJob(ctx, Job{Name: b.Name(), Deck: deck, Files: files, Outputs: []string{"bench.dat"}, Compat: compat})
		if err != nil && opt+1 < len(benchOptions) && strings.Contains(strings.ToLower(err.Error()), "timestep too small") {
			opt++ // the next looser tolerances
			continue
		}
		if err != nil {
			return nil, err
		}
		res, err := b.measure(tabs["bench.dat"], n)
		if err != nil {
			if dir != "" {
				err = fmt.Errorf("%w (deck kept in %s)", err, dir)
			}
			return nil, fmt.Errorf("%s: %w", b.Name(), err)
		}
		res.Runs, res.Kept, res.Relaxed = runs, dir, opt > 0
		converter := b.Kind == BuckBench || b.Kind == BoostBench
		ilOff := converter && math.Abs(res.ILMean-b.IL) > 0.01*math.Abs(b.IL)+1e-3
		if res.PSS <= o.Tol && !ilOff {
			if err := o.Cache.Put(key, res); err != nil {
				return nil, err
			}
			return res, nil
		}
		switch {
		case runs >= 8 || !ilOff && 2*n > o.MaxPeriods:
			why := fmt.Sprintf("the last two periods' energies differ by %.2g %% (tolerance %.2g %%)", 100*res.PSS, 100*o.Tol)
			if ilOff {
				why = fmt.Sprintf("the mean inductor current stays at %.4g A against %.4g A", res.ILMean, b.IL)
			}
			return nil, fmt.Errorf("%s: %w within %d periods and %d runs: %s", b.Name(), ErrNoSteadyState, n, runs, why)
		case ilOff:
			k := b.outputR()
			if b.Kind == BoostBench {
				k *= 1 - b.Duty
			}
			vsrc += (res.ILMean - b.IL) * k
		default:
			n *= 2
		}
	}
}

// modelFiles returns the model text of the bench's devices as one
// model.lib, and the compatibility mode they ask for.
func (b *Bench) modelFiles() (map[string][]byte, string, error) {
	if b.Ctrl == nil {
		return nil, "", fmt.Errorf("bench without a control switch")
	}
	text := append([]byte(nil), b.Ctrl.Text...)
	compat := b.Ctrl.Compat
	if b.Sync != nil && b.Sync.Path != b.Ctrl.Path {
		if b.Sync.Compat != compat {
			return nil, "", fmt.Errorf("%s asks for ngspice compatibility mode %q and %s for %q: they cannot share a deck",
				b.Ctrl.Path, compat, b.Sync.Path, b.Sync.Compat)
		}
		text = append(append(text, '\n'), b.Sync.Text...)
	}
	return map[string][]byte{"model.lib": text}, compat, nil
}
