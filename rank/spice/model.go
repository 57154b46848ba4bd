package spice

import (
	"fmt"
	"math"
	"strconv"
	"strings"
)

// Model is one synthetic device: its VDMOS parameters (what the simulator
// sees) and the ratings and test conditions its invented datasheet states
// (what the characterisation uses). All values in SI units; SetDefaults
// fills the defaults and Check the ranges given beside each field.
type Model struct {
	Name  string `toml:"name"`  // part name, e.g. "sim-fast-30"; required
	Notes string `toml:"notes"` // free text for the report

	// Ratings and datasheet test conditions.
	VdsMax float64 `toml:"vds_max"` // drain-source rating, V; > 0
	IdMax  float64 `toml:"id_max"`  // continuous current rating, A; > 0
	VgsMax float64 `toml:"vgs_max"` // gate rating, V; default 20
	ITest  float64 `toml:"i_test"`  // drain current of the Rds(on), gate-charge, switching-time and diode tests, A; > 0
	Vgs2   float64 `toml:"vgs2"`    // second gate voltage of the Rds(on) test, V; > vto + 0.5 V; default 4.5

	// VDMOS parameters (ngspice 39 manual, VDMOS model).
	Vto    float64 `toml:"vto"`    // threshold, V; > 0
	Kp     float64 `toml:"kp"`     // transconductance, A/V²; > 0
	Lambda float64 `toml:"lambda"` // channel-length modulation, 1/V; ≥ 0; default 0
	Rd     float64 `toml:"rd"`     // drain resistance, Ω; > 0
	Rs     float64 `toml:"rs"`     // source resistance, Ω; > 0
	Rg     float64 `toml:"rg"`     // gate resistance, Ω; > 0
	Cgs    float64 `toml:"cgs"`    // gate-source capacitance (constant), F; > 0
	Cgdmax float64 `toml:"cgdmax"` // gate-drain capacitance, on-state maximum, F; > 0
	Cgdmin float64 `toml:"cgdmin"` // gate-drain capacitance, off-state minimum, F; (0, cgdmax)
	A      float64 `toml:"a"`      // shape of the Cgd transition, 1/V; > 0
	Cjo    float64 `toml:"cjo"`    // body-diode zero-bias junction capacitance (Cds), F; > 0
	Vj     float64 `toml:"vj"`     // junction potential, V; default 0.8
	M      float64 `toml:"m"`      // grading coefficient; default 0.5
	Is     float64 `toml:"is"`     // body-diode saturation current, A; default 1e-12
	N      float64 `toml:"n"`      // body-diode emission coefficient; default 1
	// Tt is the body diode's transit time, s; ≥ 0; default 0 (no stored
	// charge). Its charge-control model stores Q = Tt·I_F (ngspice 39
	// manual, diode and VDMOS models), which gives the reverse recovery
	// of a half-bridge.
	Tt float64 `toml:"tt"`
	// Tcvth is the threshold's temperature coefficient, V/K; ≥ 0; default
	// 0: vto falls by Tcvth per kelvin above tnom (ngspice 39 manual,
	// VDMOS model), as a part's threshold does (a few mV/K, common
	// practice). Written into the card only when > 0.
	Tcvth float64 `toml:"tcvth"`
}

// Point is one operating point of the switching cell. Its candidates are
// the devices rated above Vbus/Derate (and at most MaxRating when given).
// SetDefaults fills the defaults and Check the ranges given beside each
// field.
type Point struct {
	Name    string  `toml:"name"`    // the point's name, e.g. "45V-10A-200k-10V"
	Vbus    float64 `toml:"vbus"`    // clamp supply, V; > 0
	Current float64 `toml:"current"` // load current, A; > 0
	Fsw     float64 `toml:"fsw"`     // switching frequency, Hz; > 0
	Duty    float64 `toml:"duty"`    // gate duty cycle; [0.1, 0.8]
	VOn     float64 `toml:"von"`     // gate drive high level, V; > 0
	RSource float64 `toml:"rsource"` // driver pull-up resistance, Ω; > 0
	RSink   float64 `toml:"rsink"`   // driver pull-down resistance, Ω; > 0
	RgExt   float64 `toml:"rg_ext"`  // external gate resistor, Ω; > 0
	Derate  float64 `toml:"derate"`  // voltage derating for the candidate set; (0, 1]; default 0.8
	// Tj is the junction temperature the cell is simulated at (the
	// simulator's temp, tnom 25 °C) and swrank pinned to, °C; [−40,
	// 175]; default 25.
	Tj float64 `toml:"tj"`
	// MaxRating leaves out parts rated above it, V (a designer does not
	// put a 100 V part on a 20 V bus); ≥ 0; 0 = no limit.
	MaxRating float64 `toml:"max_rating"`
	Comment   string  `toml:"comment"` // why the point is there
}

// SetDefaults fills the fields left at zero that have a default.
func (m *Model) SetDefaults() {
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

// Check returns an error naming the first field out of its range.
func (m *Model) Check() error {
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
	if !(m.Tcvth >= 0) || m.Tcvth > 0.02 {
		return fmt.Errorf("tcvth must be within [0, 0.02] V/K (got %g)", m.Tcvth)
	}
	if !(m.Tt >= 0) || math.IsInf(m.Tt, 0) {
		return fmt.Errorf("tt must be ≥ 0 (got %g)", m.Tt)
	}
	if m.Cgdmin >= m.Cgdmax {
		return fmt.Errorf("cgdmin (%g) must be below cgdmax (%g)", m.Cgdmin, m.Cgdmax)
	}
	if m.Vgs2 <= m.Vto+0.5 {
		return fmt.Errorf("vgs2 (%g V) must exceed vto + 0.5 V", m.Vgs2)
	}
	return nil
}

// SetDefaults fills the fields left at zero that have a default.
func (p *Point) SetDefaults() {
	if p.Derate == 0 {
		p.Derate = 0.8
	}
	if p.Tj == 0 {
		p.Tj = 25
	}
}

// Check returns an error naming the first field out of its range.
func (p *Point) Check() error {
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
	if p.Tj < -40 || p.Tj > 175 {
		return fmt.Errorf("tj must be within [-40, 175] °C (got %g)", p.Tj)
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

// Candidate reports whether the device is rated for the point.
func (p *Point) Candidate(m *Model) bool {
	return m.VdsMax*p.Derate > p.Vbus && (p.MaxRating == 0 || m.VdsMax <= p.MaxRating)
}

// Card returns the device's VDMOS .model line, named name: what a model
// file holds for spice.LoadDevice.
func (m *Model) Card(name string) string { return m.card(name) }

// card returns the .model line of the device, named name.
func (m *Model) card(name string) string {
	kv := []struct {
		k string
		v float64
	}{{"vto", m.Vto}, {"kp", m.Kp}, {"lambda", m.Lambda}, {"rd", m.Rd}, {"rs", m.Rs}, {"rg", m.Rg},
		{"cgs", m.Cgs}, {"cgdmax", m.Cgdmax}, {"cgdmin", m.Cgdmin}, {"a", m.A},
		{"cjo", m.Cjo}, {"vj", m.Vj}, {"m", m.M}, {"is", m.Is}, {"n", m.N}, {"tt", m.Tt}}
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
	if m.Tcvth > 0 {
		b.WriteString(" tcvth=" + num(m.Tcvth))
	}
	b.WriteString(")\n")
	return b.String()
}

// num prints a number for a netlist, exact to float64 precision.
func num(v float64) string { return strconv.FormatFloat(v, 'g', -1, 64) }

// Simulation settings shared by every deck: 25 °C device and nominal
// temperature (the datasheet reference), and tight local-truncation-error
// control (the default control is off by up to 10 % on switching
// energies, as re-runs with a 20× finer step show).
const optionsLine = ".options temp=25 tnom=25 method=gear reltol=1e-5 vntol=1e-7 abstol=1e-10 chgtol=1e-16 trtol=1\n"

// clampCard is the clamp (freewheel) diode: no stored charge, no junction
// capacitance, a small drop.
// optionsAt is optionsLine with the device temperature tj, °C (25 when 0).
func optionsAt(tj float64) string {
	if tj == 0 || tj == 25 {
		return optionsLine
	}
	return strings.Replace(optionsLine, "temp=25 ", "temp="+num(tj)+" ", 1)
}

const clampCard = ".model dclamp D(is=1e-9 n=0.3 rs=1m tt=0 cjo=0)\n"
