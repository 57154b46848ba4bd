// Package spicecheck cross-checks swrank's loss models against circuit
// simulation with ngspice (the Debian package).
//
// For each synthetic device, described by ngspice VDMOS model parameters,
// the package characterises the model the way a datasheet is made
// (Characterise), so that swrank sees only datasheet numbers; simulates a
// clamped-inductive hard-switched cell and integrates its energies over one
// period (SimulateCell); and compares the simulated losses with swrank's
// custom stage for the same cell (Compare). docs/spice-crosscheck.md
// describes the tests, the measurement convention and the figures.
package spicecheck

import (
	"fmt"
	"math"
	"os"
	"strconv"
	"strings"

	"github.com/BurntSushi/toml"
)

// Model is one synthetic device: its VDMOS parameters (what the simulator
// sees) and the ratings and test conditions its invented datasheet states
// (what the characterisation uses). All values in SI units.
type Model struct {
	Name  string `toml:"name"`  // part name, e.g. "sim-fast-30"
	Notes string `toml:"notes"` // free text for the report

	// Ratings and datasheet test conditions.
	VdsMax float64 `toml:"vds_max"` // drain-source rating, V; > 0
	IdMax  float64 `toml:"id_max"`  // continuous current rating, A; > 0
	VgsMax float64 `toml:"vgs_max"` // gate rating, V; default 20
	ITest  float64 `toml:"i_test"`  // drain current of the Rds(on), gate-charge, switching-time and diode tests, A; > 0
	Vgs2   float64 `toml:"vgs2"`    // second gate voltage of the Rds(on) test, V; > vto; default 4.5

	// VDMOS parameters (ngspice 39 manual, VDMOS model).
	Vto    float64 `toml:"vto"`    // threshold, V; > 0
	Kp     float64 `toml:"kp"`     // transconductance, A/V²; > 0
	Lambda float64 `toml:"lambda"` // channel-length modulation, 1/V; ≥ 0; default 0
	Rd     float64 `toml:"rd"`     // drain resistance, Ω; > 0
	Rs     float64 `toml:"rs"`     // source resistance, Ω; > 0
	Rg     float64 `toml:"rg"`     // gate resistance, Ω; > 0
	Cgs    float64 `toml:"cgs"`    // gate-source capacitance (constant), F; > 0
	Cgdmax float64 `toml:"cgdmax"` // gate-drain capacitance, on-state maximum, F; > 0
	Cgdmin float64 `toml:"cgdmin"` // gate-drain capacitance, off-state minimum, F; > 0
	A      float64 `toml:"a"`      // shape of the Cgd transition, 1/V; > 0
	Cjo    float64 `toml:"cjo"`    // body-diode zero-bias junction capacitance (Cds), F; > 0
	Vj     float64 `toml:"vj"`     // junction potential, V; default 0.8
	M      float64 `toml:"m"`      // grading coefficient; default 0.5
	Is     float64 `toml:"is"`     // body-diode saturation current, A; default 1e-12
	N      float64 `toml:"n"`      // body-diode emission coefficient; default 1
}

// Point is one operating point of the switching cell. Its candidates are
// the devices rated above Vbus/Derate (and at most MaxRating when given).
type Point struct {
	Name    string  `toml:"name"`
	Vbus    float64 `toml:"vbus"`    // clamp supply, V; > 0
	Current float64 `toml:"current"` // load current, A; > 0
	Fsw     float64 `toml:"fsw"`     // switching frequency, Hz; > 0
	Duty    float64 `toml:"duty"`    // gate duty cycle; (0.1, 0.8)
	VOn     float64 `toml:"von"`     // gate drive high level, V; > 0
	RSource float64 `toml:"rsource"` // driver pull-up resistance, Ω; > 0
	RSink   float64 `toml:"rsink"`   // driver pull-down resistance, Ω; > 0
	RgExt   float64 `toml:"rg_ext"`  // external gate resistor, Ω; > 0
	Derate  float64 `toml:"derate"`  // voltage derating for the candidate set; default 0.8
	// MaxRating leaves out parts rated above it, V (a designer does not
	// put a 100 V part on a 20 V bus); 0 = no limit.
	MaxRating float64 `toml:"max_rating"`
	Comment   string  `toml:"comment"` // why the point is there
}

// Swap names a fast, low-capacitance part and a slow, low-Rds(on) part
// whose order must reverse between a low-frequency and a high-frequency
// point.
type Swap struct {
	Fast      string `toml:"fast"`
	Slow      string `toml:"slow"`
	LowPoint  string `toml:"low_point"`
	HighPoint string `toml:"high_point"`
}

// Config is the device set and the operating points of the suite.
type Config struct {
	Devices    []Model      `toml:"device"`
	Points     []Point      `toml:"point"`
	Swap       Swap         `toml:"swap"`
	Parasitics ParasiticSet `toml:"parasitics"`
	ClassE     []ClassECase `toml:"class_e"`
}

// ParasiticSet is the parasitic-inductance part of the suite: every
// variant on every listed device at every listed point where the device is
// a candidate.
type ParasiticSet struct {
	Devices  []string  `toml:"devices"`
	Points   []string  `toml:"points"`
	Variants []Variant `toml:"variant"`
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
func (v *Variant) Par() Parasitics {
	return Parasitics{Lcs: v.Lcs, Lloop: v.Lloop, Rloop: v.Rloop, Rdamp: v.Rdamp}
}

// ClassECase is a class E stage with one of the suite's devices as the
// switch (ClassEDeck).
type ClassECase struct {
	Name    string  `toml:"name"`
	Device  string  `toml:"device"`  // one of the suite's devices
	Vdd     float64 `toml:"vdd"`     // supply, V; > 0
	Pout    float64 `toml:"pout"`    // design output power, W; > 0
	Fsw     float64 `toml:"fsw"`     // operating frequency, Hz; > 0
	QL      float64 `toml:"ql"`      // loaded Q; ≥ 1.7879
	VOn     float64 `toml:"von"`     // gate drive high level, V; > 0
	RSource float64 `toml:"rsource"` // driver pull-up resistance, Ω; > 0
	RSink   float64 `toml:"rsink"`   // driver pull-down resistance, Ω; > 0
	RgExt   float64 `toml:"rg_ext"`  // external gate resistor, Ω; ≥ 0
	// FeedRatio is ωL_f/R of the DC-feed choke from the supply, > 0: large
	// enough to stand for the design's RF choke.
	FeedRatio float64 `toml:"feed_ratio"`
	Cycles    int     `toml:"cycles"` // RF periods simulated; the last is measured; ≥ 20
}

// LoadConfig reads and checks a TOML file of devices and points.
func LoadConfig(path string) (*Config, error) {
	b, err := os.ReadFile(path)
	if err != nil {
		return nil, err
	}
	var c Config
	md, err := toml.Decode(string(b), &c)
	if err != nil {
		return nil, fmt.Errorf("%s: %w", path, err)
	}
	if und := md.Undecoded(); len(und) > 0 {
		return nil, fmt.Errorf("%s: unknown keys %v", path, und)
	}
	seen := map[string]bool{}
	for i := range c.Devices {
		m := &c.Devices[i]
		m.defaults()
		if err := m.check(); err != nil {
			return nil, fmt.Errorf("%s: device %d (%s): %w", path, i+1, m.Name, err)
		}
		if seen[m.Name] {
			return nil, fmt.Errorf("%s: device %s listed twice", path, m.Name)
		}
		seen[m.Name] = true
	}
	for i := range c.Points {
		p := &c.Points[i]
		if p.Derate == 0 {
			p.Derate = 0.8
		}
		if err := p.check(); err != nil {
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

func (m *Model) defaults() {
	if m.VgsMax == 0 {
		m.VgsMax = 20
	}
	if m.Vgs2 == 0 {
		m.Vgs2 = 4.5
	}
	if m.Vj == 0 {
		m.Vj = 0.8
	}
	if m.M == 0 {
		m.M = 0.5
	}
	if m.Is == 0 {
		m.Is = 1e-12
	}
	if m.N == 0 {
		m.N = 1
	}
}

func (m *Model) check() error {
	if m.Name == "" {
		return fmt.Errorf("name is required")
	}
	pos := []struct {
		n string
		v float64
	}{{"vds_max", m.VdsMax}, {"id_max", m.IdMax}, {"i_test", m.ITest}, {"vto", m.Vto}, {"kp", m.Kp},
		{"rd", m.Rd}, {"rs", m.Rs}, {"rg", m.Rg}, {"cgs", m.Cgs}, {"cgdmax", m.Cgdmax}, {"cgdmin", m.Cgdmin},
		{"a", m.A}, {"cjo", m.Cjo}}
	for _, p := range pos {
		if !(p.v > 0) || math.IsInf(p.v, 0) {
			return fmt.Errorf("%s must be > 0 (got %g)", p.n, p.v)
		}
	}
	if m.Cgdmin >= m.Cgdmax {
		return fmt.Errorf("cgdmin (%g) must be below cgdmax (%g)", m.Cgdmin, m.Cgdmax)
	}
	if m.Vgs2 <= m.Vto+0.5 {
		return fmt.Errorf("vgs2 (%g V) must exceed vto + 0.5 V", m.Vgs2)
	}
	return nil
}

func (p *Point) check() error {
	pos := []struct {
		n string
		v float64
	}{{"vbus", p.Vbus}, {"current", p.Current}, {"fsw", p.Fsw}, {"von", p.VOn},
		{"rsource", p.RSource}, {"rsink", p.RSink}, {"rg_ext", p.RgExt}}
	for _, x := range pos {
		if !(x.v > 0) || math.IsInf(x.v, 0) {
			return fmt.Errorf("%s must be > 0 (got %g)", x.n, x.v)
		}
	}
	if p.Duty < 0.1 || p.Duty > 0.8 {
		return fmt.Errorf("duty must be within [0.1, 0.8] (got %g)", p.Duty)
	}
	if p.MaxRating < 0 {
		return fmt.Errorf("max_rating must be ≥ 0 (got %g)", p.MaxRating)
	}
	if p.Derate <= 0 || p.Derate > 1 {
		return fmt.Errorf("derate must be within (0, 1] (got %g)", p.Derate)
	}
	return nil
}

// card returns the .model line of the device, named name.
func (m *Model) card(name string) string {
	kv := []struct {
		k string
		v float64
	}{{"vto", m.Vto}, {"kp", m.Kp}, {"lambda", m.Lambda}, {"rd", m.Rd}, {"rs", m.Rs}, {"rg", m.Rg},
		{"cgs", m.Cgs}, {"cgdmax", m.Cgdmax}, {"cgdmin", m.Cgdmin}, {"a", m.A},
		{"cjo", m.Cjo}, {"vj", m.Vj}, {"m", m.M}, {"is", m.Is}, {"n", m.N}, {"tt", 0}}
	var b strings.Builder
	fmt.Fprintf(&b, ".model %s VDMOS(", name)
	for i, x := range kv {
		if i > 0 {
			b.WriteByte(' ')
		}
		b.WriteString(x.k)
		b.WriteByte('=')
		b.WriteString(num(x.v))
	}
	b.WriteString(")\n")
	return b.String()
}

// num prints a number for a netlist, exact to float64 precision.
func num(v float64) string { return strconv.FormatFloat(v, 'g', -1, 64) }

// Simulation settings shared by every deck: 25 °C device and nominal
// temperature (the datasheet reference), and tight local-truncation-error
// control (team notes: the default control is off by up to 10 % on
// switching energies).
const optionsLine = ".options temp=25 tnom=25 method=gear reltol=1e-5 vntol=1e-7 abstol=1e-10 chgtol=1e-16 trtol=1\n"

// clampCard is the clamp (freewheel) diode: no stored charge, no junction
// capacitance, a small drop.
const clampCard = ".model dclamp D(is=1e-9 n=0.3 rs=1m tt=0 cjo=0)\n"

// Candidate reports whether the device is rated for the point.
func (p *Point) Candidate(m *Model) bool {
	return m.VdsMax*p.Derate > p.Vbus && (p.MaxRating == 0 || m.VdsMax <= p.MaxRating)
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
