package spicecheck

import (
	"context"
	"fmt"
	"os"
	"path/filepath"
	"strings"
	"time"

	"swrank/devices"
	"swrank/rank/evaluate"
	"swrank/rank/fit"
	"swrank/rank/spice"
	"swrank/rank/verify"
)

// Half-bridge components, in report order: the whole stage (CompTotal),
// then its parts.
const (
	BridgeDiode     = "dead-time diode" // the synchronous switch's body diode in both dead times
	BridgeRecovery  = "recovery"        // the body diode's reverse recovery
	BridgeSwitching = "ctrl switching"  // the control switch's hard edges without recovery: overlap and output charges
	BridgeSyncCond  = "sync conduction" // the synchronous switch's channel while its gate is on
	BridgeGate      = "gate"            // both gate loops: internal, external and driver resistances
)

// BridgeComponents lists the compared half-bridge components.
func BridgeComponents() []string {
	return []string{CompTotal, BridgeDiode, BridgeRecovery, BridgeSwitching, BridgeSyncCond, BridgeGate}
}

// BridgeRow is one part in both places of one synchronous buck: swrank's
// prediction and the simulation.
type BridgeRow struct {
	Row // Device, Point, Pred and Sim by BridgeComponents(); Screened and ScreenNote

	Screens evaluate.Screens // swrank's screens
	// PredDiode and SimDiode are the diode's conduction time at each edge
	// (after the control switch's turn-off, before its turn-on), s.
	PredDiode, SimDiode [2]float64
	// PredMargin is swrank's dead time left at each edge, s (< 0:
	// cross-conduction).
	PredMargin [2]float64
	// PredGate is swrank's off-gate level at the control switch's turn-on
	// (off level + bounce), SimGate the simulated peak of the die's gate
	// (spice.BridgeWave.OffGatePeak), Vth the characterised threshold, V.
	PredGate, SimGate, Vth float64
	// SimShoot is the simulated shoot-through power: the synchronous
	// channel's forward conduction (BridgeWave.ShootEnergy) times f, W.
	SimShoot      float64
	Bench, Bench0 *spice.BenchResult // the simulation, and the one without stored charge
}

// BridgeSuite is one device set run through the half-bridge points.
type BridgeSuite struct {
	Set     string // "development" or "held-out"
	Library string // the characterised parts CSV
	Rows    []BridgeRow
	Elapsed time.Duration
}

// RunBridge characterises a device set, writes its library and model
// files under o.OutDir/bridge-<set> and simulates every candidate part in
// both places of every point, once as it is and once with its body
// diode's stored charge removed (the difference is the recovery's cost).
func RunBridge(ctx context.Context, r *spice.Runner, cfg *BridgeConfig, set string, models []spice.Model, o SuiteOptions) (*BridgeSuite, error) {
	start := time.Now()
	if o.Workers <= 0 {
		o.Workers = 2
	}
	dir := filepath.Join(o.OutDir, "bridge-"+set)
	if err := os.MkdirAll(filepath.Join(dir, "models"), 0o755); err != nil {
		return nil, err
	}
	sheets, err := characteriseAll(ctx, r, models, o.Workers)
	if err != nil {
		return nil, err
	}
	parts := make([]devices.Part, len(models))
	for i := range models {
		m := &models[i]
		parts[i] = sheets[i].Part(m)
		parts[i].SpiceModel = filepath.Join("models", m.Name+".lib")
		card := strings.ReplaceAll(m.Name, "-", "_")
		m0 := *m
		m0.Tt = 0
		for path, text := range map[string]string{m.Name + ".lib": m.Card(card), m.Name + "-tt0.lib": m0.Card(card)} {
			if err := writeAtomic(filepath.Join(dir, "models", path), []byte("* "+m.Name+": synthetic VDMOS device of the cross-check\n"+text)); err != nil {
				return nil, err
			}
		}
	}
	s := &BridgeSuite{Set: set, Library: filepath.Join(dir, "parts.csv")}
	if err := WriteParts(s.Library, parts); err != nil {
		return nil, err
	}
	lib, err := devices.Load(s.Library)
	if err != nil {
		return nil, fmt.Errorf("reading back the characterised library: %w", err)
	}
	for pi := range cfg.Points {
		p := &cfg.Points[pi]
		for i := range models {
			if p.Candidate(&models[i]) {
				s.Rows = append(s.Rows, BridgeRow{Row: Row{Device: models[i].Name, Point: p.Name, Part: models[i].Name}})
			}
		}
	}
	byName := map[string]*devices.Part{}
	for i := range lib.Parts {
		byName[lib.Parts[i].Name] = &lib.Parts[i]
	}
	err = parallel(ctx, len(s.Rows), o.Workers, func(ctx context.Context, k int) error {
		row := &s.Rows[k]
		part := byName[row.Device]
		if part == nil {
			return fmt.Errorf("%s: part %s missing after loading", s.Library, row.Device)
		}
		return row.run(ctx, r, cfg.point(row.Point), part, dir)
	})
	if err != nil {
		return nil, err
	}
	s.Elapsed = time.Since(start)
	return s, nil
}

// run predicts and simulates one row.
func (row *BridgeRow) run(ctx context.Context, r *spice.Runner, p *BridgePoint, part *devices.Part, dir string) error {
	pt, err := p.Stage().Resolve()
	if err != nil {
		return fmt.Errorf("point %s: %w", p.Name, err)
	}
	dev, err := fit.Prepare(part)
	if err != nil {
		return fmt.Errorf("%s: %w", part.Name, err)
	}
	res := evaluate.Evaluate(&pt, &dev, nil, nil)
	b, err := verify.NewBench(&pt, &res, dir)
	if err != nil {
		return fmt.Errorf("%s at %s: %w", part.Name, p.Name, err)
	}
	b0 := *b
	d0, err := spice.LoadDevice(filepath.Join(dir, "models", part.Name+"-tt0.lib"), "", "")
	if err != nil {
		return err
	}
	b0.Ctrl, b0.Sync = d0, d0
	if row.Bench, err = spice.Simulate(ctx, r, b, spice.SimOptions{}); err != nil {
		return fmt.Errorf("%s at %s: %w", part.Name, p.Name, err)
	}
	if row.Bench0, err = spice.Simulate(ctx, r, &b0, spice.SimOptions{}); err != nil {
		return fmt.Errorf("%s at %s without stored charge: %w", part.Name, p.Name, err)
	}
	row.fill(&res, p.Fsw)
	return nil
}

// fill pairs the prediction res with the two simulations at frequency fsw (Hz).
func (row *BridgeRow) fill(res *evaluate.Result, fsw float64) {
	sy := &res.Devices[1]
	l := res.Losses
	row.Screens, row.Screened = res.Screens, res.Screened()
	if row.Screened {
		row.ScreenNote = screenNames(res.Screens)
	}
	row.Pred = map[string]float64{
		CompTotal:       float64(l.Total() - l.DriverQuiescent),
		BridgeDiode:     float64(l.DeadTime),
		BridgeRecovery:  float64(l.Recovery),
		BridgeSwitching: float64(l.TurnOn + l.TurnOff + l.Coss),
		BridgeSyncCond:  float64(sy.Losses.Conduction),
		BridgeGate:      float64(l.GateRint + l.GateRext + l.GateDriver),
	}
	s, s0 := row.Bench, row.Bench0
	var drive float64
	for _, x := range s.Places {
		drive += x.Drive
	}
	row.Sim = map[string]float64{
		CompTotal:       s.Total(),
		BridgeDiode:     s0.Places[1].Off,
		BridgeRecovery:  s.Total() - s0.Total(),
		BridgeSwitching: s0.Places[0].Switching,
		BridgeSyncCond:  s.Places[1].Conduction,
		BridgeGate:      drive,
	}
	row.PredDiode = [2]float64{float64(sy.TDiode1), float64(sy.TDiode2)}
	row.PredMargin = [2]float64{float64(sy.Margin1), float64(sy.Margin2)}
	if w := s.Bridge; w != nil {
		row.SimDiode, row.SimGate = w.DiodeTime, w.OffGatePeak
		row.SimShoot = w.ShootEnergy * fsw
	}
	row.Vth = float64(sy.Dev.Part.VgsTh)
	row.PredGate = float64(sy.FalseOn.Vth - sy.FalseOn.Margin)
}

// point returns the bridge point called name.
func (c *BridgeConfig) point(name string) *BridgePoint {
	for i := range c.Points {
		if c.Points[i].Name == name {
			return &c.Points[i]
		}
	}
	return nil
}
