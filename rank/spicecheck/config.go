package spicecheck

import (
	"fmt"
	"math"
	"os"

	"github.com/BurntSushi/toml"

	"swrank/rank/spice"
)

// Swap names a fast, low-capacitance part and a slow, low-Rds(on) part
// whose order must reverse between a low-frequency and a high-frequency
// point.
type Swap struct {
	Fast      string `toml:"fast"`       // the fast part's device name
	Slow      string `toml:"slow"`       // the slow part's device name
	LowPoint  string `toml:"low_point"`  // the point where Slow must lose less
	HighPoint string `toml:"high_point"` // the point where Fast must lose less
}

// Config is the device set and the operating points of the suite.
type Config struct {
	Devices    []spice.Model `toml:"device"`     // the synthetic devices, names unique
	Points     []spice.Point `toml:"point"`      // the cell's operating points, names unique
	Swap       Swap          `toml:"swap"`       // the pair whose order must reverse; optional
	Parasitics ParasiticSet  `toml:"parasitics"` // the cells with parasitic inductance; optional
	ClassE     []ClassECase  `toml:"class_e"`    // the class E stages; optional
	// HeldOut is the held-out device set, drawn from a seed: judged at
	// the same points, never used to choose a constant; optional.
	HeldOut HeldOut `toml:"held_out"`
}

// ParasiticSet is the parasitic-inductance part of the suite: every
// variant on every listed device at every listed point where the device is
// a candidate.
type ParasiticSet struct {
	Devices  []string  `toml:"devices"` // names of suite devices
	Points   []string  `toml:"points"`  // names of suite points
	Variants []Variant `toml:"variant"` // names unique
}

// Variant is one set of parasitic inductances added to the cell.
type Variant struct {
	Name  string  `toml:"name"`  // e.g. "lcs-0.5n"
	Lcs   float64 `toml:"lcs"`   // common-source inductance, H; ≥ 0 (Parasitics.Lcs)
	Lloop float64 `toml:"lloop"` // power-loop inductance in series with the bus supply, H; ≥ 0
	Rloop float64 `toml:"rloop"` // series resistance of the loop, Ω; ≥ 0
	Rdamp float64 `toml:"rdamp"` // damping resistor across lloop, Ω; ≥ 0
}

// Par returns the variant's inductances for the cell.
func (v *Variant) Par() spice.Parasitics {
	return spice.Parasitics{Lcs: v.Lcs, Lloop: v.Lloop, Rloop: v.Rloop, Rdamp: v.Rdamp}
}

// ClassECase is a class E stage with one of the suite's devices as the
// switch (spice.SimulateClassE).
type ClassECase struct {
	Name    string  `toml:"name"`    // the case's name; required
	Device  string  `toml:"device"`  // one of the suite's devices
	Vdd     float64 `toml:"vdd"`     // supply, V; > 0
	Pout    float64 `toml:"pout"`    // design output power, W; > 0
	Fsw     float64 `toml:"fsw"`     // operating frequency, Hz; > 0
	QL      float64 `toml:"ql"`      // loaded Q; ≥ 1.7879
	VOn     float64 `toml:"von"`     // gate drive high level, V; > 0
	RSource float64 `toml:"rsource"` // driver pull-up resistance, Ω; > 0
	RSink   float64 `toml:"rsink"`   // driver pull-down resistance, Ω; > 0
	RgExt   float64 `toml:"rg_ext"`  // external gate resistor, Ω; ≥ 0
	// Edge is the driver's own 0–100 % edge, s; ≥ 0. 0: the benches'
	// 50 ps step-like edge, and swrank is given a step.
	Edge float64 `toml:"edge"`
	// FeedRatio is ωL_f/R of the DC-feed choke from the supply, > 0: large
	// enough to stand for the design's RF choke.
	FeedRatio float64 `toml:"feed_ratio"`
	Cycles    int     `toml:"cycles"` // RF periods simulated; the last is measured; ≥ 20
	// Timed marks a case whose gate delays are a large share of the
	// period: the switch need not turn on at zero voltage, and the test
	// compares swrank's voltage at turn-on and conducting share instead.
	Timed bool `toml:"timed"`
	// Gap names what the models do not yet resolve at this case; its loss
	// and its voltage at turn-on are then held to the wider limits of
	// a known gap (classETolGap, classETolGapVOn) and the gap is
	// reported. Empty: the usual limits.
	Gap string `toml:"gap"`
}

// decodeFile decodes the TOML file at path into v; a key v has no place
// for is an error.
func decodeFile(path string, v any) error {
	b, err := os.ReadFile(path)
	if err != nil {
		return err
	}
	md, err := toml.Decode(string(b), v)
	if err != nil {
		return fmt.Errorf("%s: %w", path, err)
	}
	if und := md.Undecoded(); len(und) > 0 {
		return fmt.Errorf("%s: unknown keys %v", path, und)
	}
	return nil
}

// LoadConfig reads and checks a TOML file of devices and points.
func LoadConfig(path string) (*Config, error) {
	var c Config
	if err := decodeFile(path, &c); err != nil {
		return nil, err
	}
	seen := map[string]bool{}
	for i := range c.Devices {
		m := &c.Devices[i]
		m.SetDefaults()
		if err := m.Check(); err != nil {
			return nil, fmt.Errorf("%s: device %d (%s): %w", path, i+1, m.Name, err)
		}
		if seen[m.Name] {
			return nil, fmt.Errorf("%s: device %s listed twice", path, m.Name)
		}
		seen[m.Name] = true
	}
	for i := range c.Points {
		p := &c.Points[i]
		p.SetDefaults()
		if err := p.Check(); err != nil {
			return nil, fmt.Errorf("%s: point %d (%s): %w", path, i+1, p.Name, err)
		}
	}
	pts := map[string]bool{}
	for _, p := range c.Points {
		if pts[p.Name] {
			return nil, fmt.Errorf("%s: point %s listed twice", path, p.Name)
		}
		pts[p.Name] = true
	}
	w := c.Swap
	if w.Fast != "" || w.Slow != "" {
		if !seen[w.Fast] || !seen[w.Slow] || !pts[w.LowPoint] || !pts[w.HighPoint] {
			return nil, fmt.Errorf("%s: swap names an unknown device or point (%+v)", path, w)
		}
	}
	if err := c.Parasitics.check(seen, pts); err != nil {
		return nil, fmt.Errorf("%s: parasitics: %w", path, err)
	}
	for i := range c.ClassE {
		if err := c.ClassE[i].check(seen); err != nil {
			return nil, fmt.Errorf("%s: class_e %d (%s): %w", path, i+1, c.ClassE[i].Name, err)
		}
	}
	return &c, nil
}

func (x *ParasiticSet) check(devs, pts map[string]bool) error {
	for _, d := range x.Devices {
		if !devs[d] {
			return fmt.Errorf("unknown device %q", d)
		}
	}
	for _, p := range x.Points {
		if !pts[p] {
			return fmt.Errorf("unknown point %q", p)
		}
	}
	names := map[string]bool{}
	for i, v := range x.Variants {
		if v.Name == "" || names[v.Name] {
			return fmt.Errorf("variant %d: name %q empty or listed twice", i+1, v.Name)
		}
		names[v.Name] = true
		for _, f := range []struct {
			n string
			v float64
		}{{"lcs", v.Lcs}, {"lloop", v.Lloop}, {"rloop", v.Rloop}, {"rdamp", v.Rdamp}} {
			if !(f.v >= 0) || math.IsInf(f.v, 0) {
				return fmt.Errorf("variant %s: %s must be ≥ 0 (got %g)", v.Name, f.n, f.v)
			}
		}
		if v.Lcs == 0 && v.Lloop == 0 {
			return fmt.Errorf("variant %s adds no inductance", v.Name)
		}
		if v.Rdamp > 0 && v.Lloop == 0 {
			return fmt.Errorf("variant %s: rdamp without lloop", v.Name)
		}
	}
	return nil
}

func (c *ClassECase) check(devs map[string]bool) error {
	if c.Name == "" {
		return fmt.Errorf("name is required")
	}
	if !devs[c.Device] {
		return fmt.Errorf("unknown device %q", c.Device)
	}
	for _, x := range []struct {
		n string
		v float64
	}{{"vdd", c.Vdd}, {"pout", c.Pout}, {"fsw", c.Fsw}, {"von", c.VOn}, {"rsource", c.RSource},
		{"rsink", c.RSink}, {"feed_ratio", c.FeedRatio}} {
		if !(x.v > 0) || math.IsInf(x.v, 0) {
			return fmt.Errorf("%s must be > 0 (got %g)", x.n, x.v)
		}
	}
	if !(c.RgExt >= 0) {
		return fmt.Errorf("rg_ext must be ≥ 0 (got %g)", c.RgExt)
	}
	if !(c.QL >= 1.7879) {
		return fmt.Errorf("ql must be ≥ 1.7879 (got %g)", c.QL)
	}
	if c.Cycles < 20 {
		return fmt.Errorf("cycles must be ≥ 20 (got %d)", c.Cycles)
	}
	return nil
}
