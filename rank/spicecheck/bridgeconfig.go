package spicecheck

import (
	"fmt"
	"math"
	"path/filepath"

	q "swrank/devices/quantity"
	"swrank/rank/spice"
	"swrank/rank/stage"
)

// BridgeConfig is the synchronous-buck half-bridge part of the suite: its
// operating points and its two device sets, the development set (the
// cell's devices with a body-diode transit time) and a held-out set drawn
// from a seed (HeldOut).
type BridgeConfig struct {
	// CellConfig names the cell's configuration (relative to this file):
	// its devices form the development set, its held_out the held-out
	// set.
	CellConfig string `toml:"cell_config"`
	// TtPerVolt gives each development device a body-diode transit time
	// in proportion to its rating, s/V; > 0.
	TtPerVolt float64       `toml:"tt_per_volt"`
	Points    []BridgePoint `toml:"point"` // names unique

	// Dev and Held are the two device sets, filled by LoadBridgeConfig.
	Dev, Held []spice.Model `toml:"-"`
}

// BridgeDriver is one switch's gate driver at a bridge point.
type BridgeDriver struct {
	VOn     float64 `toml:"von"`     // on level, V; > 0
	VOff    float64 `toml:"voff"`    // off level, V; ≤ 0; default 0
	RSource float64 `toml:"rsource"` // pull-up resistance, Ω; > 0
	RSink   float64 `toml:"rsink"`   // pull-down resistance, Ω; > 0
	RgExt   float64 `toml:"rg_ext"`  // external gate resistor, Ω; ≥ 0
}

// BridgePoint is one synchronous buck: the same part in both places.
type BridgePoint struct {
	Name   string  `toml:"name"`   // e.g. "12V-1.2V-10A-500k"
	Vin    float64 `toml:"vin"`    // input, V; > 0
	Vout   float64 `toml:"vout"`   // output, V; (0, vin)
	Iout   float64 `toml:"iout"`   // load current, A; > 0
	Fsw    float64 `toml:"fsw"`    // switching frequency, Hz; > 0
	Ripple float64 `toml:"ripple"` // inductor ripple, peak-to-peak over iout; (0, 2]
	// DeadTime is [after the control switch's turn-off, after the
	// synchronous switch's], s; each ≥ 0.
	DeadTime [2]float64   `toml:"dead_time"`
	Ctrl     BridgeDriver `toml:"ctrl"` // the control switch's driver
	// Sync is the synchronous switch's driver; a zero von: the same as
	// Ctrl.
	Sync BridgeDriver `toml:"sync"`
	// Derate and MaxRating bound the candidates: rated above
	// vin/derate and at most max_rating, V. Derate default 0.8.
	Derate    float64 `toml:"derate"`
	MaxRating float64 `toml:"max_rating"`
	Comment   string  `toml:"comment"`
}

// Candidate reports whether the device is rated for the point.
func (p *BridgePoint) Candidate(m *spice.Model) bool {
	return m.VdsMax*p.Derate > p.Vin && (p.MaxRating == 0 || m.VdsMax <= p.MaxRating)
}

// Stage is swrank's synchronous buck for the point, the junction pinned to
// the simulation's 25 °C.
func (p *BridgePoint) Stage() stage.Stage {
	drv := func(d BridgeDriver) stage.Driver {
		return stage.Driver{VOn: q.Voltage(d.VOn), VOff: q.Voltage(d.VOff), RSource: q.Resistance(d.RSource),
			RSink: q.Resistance(d.RSink), RgExt: q.Resistance(d.RgExt)}
	}
	s := stage.Stage{Topology: stage.Buck, Rectifier: stage.Synchronous, Position: stage.Pair,
		Vin: q.Voltage(p.Vin), Vout: q.Voltage(p.Vout), Iout: q.Current(p.Iout), Fsw: q.Frequency(p.Fsw),
		Ripple:         q.Some(q.Ratio(p.Ripple)),
		DeadTime:       q.Some(q.Time(p.DeadTime[0])),
		DeadTimeSyncOn: q.Some(q.Time(p.DeadTime[0])), DeadTimeCtrlOn: q.Some(q.Time(p.DeadTime[1])),
		Driver:  drv(p.Ctrl),
		TjFixed: q.Some[q.Temperature](25),
		Derate:  q.Ratio(p.Derate),
	}
	if p.Sync.VOn > 0 {
		s.SyncDriver = drv(p.Sync)
	}
	return s
}

func (p *BridgePoint) check() error {
	for _, x := range []struct {
		n string
		v float64
	}{{"vin", p.Vin}, {"vout", p.Vout}, {"iout", p.Iout}, {"fsw", p.Fsw}, {"ripple", p.Ripple},
		{"ctrl.von", p.Ctrl.VOn}, {"ctrl.rsource", p.Ctrl.RSource}, {"ctrl.rsink", p.Ctrl.RSink}} {
		if !(x.v > 0) || math.IsInf(x.v, 0) {
			return fmt.Errorf("%s must be > 0 (got %g)", x.n, x.v)
		}
	}
	if p.Vout >= p.Vin || p.Ripple > 2 {
		return fmt.Errorf("vout must be below vin and ripple at most 2 (got %g V, %g V, %g)", p.Vout, p.Vin, p.Ripple)
	}
	if !(p.DeadTime[0] >= 0 && p.DeadTime[1] >= 0) {
		return fmt.Errorf("dead_time must be ≥ 0 (got %g)", p.DeadTime)
	}
	if p.Derate <= 0 || p.Derate > 1 {
		return fmt.Errorf("derate must be within (0, 1] (got %g)", p.Derate)
	}
	return nil
}

// LoadBridgeConfig reads the half-bridge configuration and builds both
// device sets.
func LoadBridgeConfig(path string) (*BridgeConfig, error) {
	var c BridgeConfig
	if err := decodeFile(path, &c); err != nil {
		return nil, err
	}
	if !(c.TtPerVolt > 0) {
		return nil, fmt.Errorf("%s: tt_per_volt must be > 0 (got %g)", path, c.TtPerVolt)
	}
	cell, err := LoadConfig(filepath.Join(filepath.Dir(path), c.CellConfig))
	if err != nil {
		return nil, fmt.Errorf("%s: cell_config: %w", path, err)
	}
	for _, m := range cell.Devices {
		m.Tt = c.TtPerVolt * m.VdsMax
		c.Dev = append(c.Dev, m)
	}
	if c.Held, err = cell.HeldOut.Devices(); err != nil {
		return nil, fmt.Errorf("%s: %w", path, err)
	}
	names := map[string]bool{}
	for i := range c.Points {
		p := &c.Points[i]
		if p.Derate == 0 {
			p.Derate = 0.8
		}
		if err := p.check(); err != nil {
			return nil, fmt.Errorf("%s: point %d (%s): %w", path, i+1, p.Name, err)
		}
		if p.Name == "" || names[p.Name] {
			return nil, fmt.Errorf("%s: point %d: name %q empty or listed twice", path, i+1, p.Name)
		}
		names[p.Name] = true
	}
	return &c, nil
}
