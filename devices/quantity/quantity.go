// Package quantity gives each physical quantity that swrank handles its own
// named type, with parsing from the way engineers write datasheet values
// ("280m", "280 mOhm", "71 pF", "3.3n", "1.2k", "4.7e-9") and printing with
// SI prefixes. A capacitance can therefore never be passed where a charge is
// expected: the compiler refuses it.
//
// Every type has float64 as its underlying type and stores its value in the
// coherent SI unit named in its doc comment, except Temperature, which stores
// degrees Celsius as datasheets state it.
package quantity

import (
	"errors"
	"fmt"
	"math"
	"strconv"
	"strings"

	"github.com/dustin/go-humanize"
)

// Voltage is an electric potential difference in volts.
type Voltage float64

// Current is an electric current in amperes.
type Current float64

// Resistance is an electric resistance in ohms.
type Resistance float64

// Capacitance is a capacitance in farads.
type Capacitance float64

// Charge is an electric charge in coulombs.
type Charge float64

// Time is a time interval in seconds.
type Time float64

// Frequency is a frequency in hertz.
type Frequency float64

// Power is a power in watts.
type Power float64

// Energy is an energy in joules.
type Energy float64

// Temperature is a temperature in degrees Celsius.
type Temperature float64

// ThermalResistance is a thermal resistance in kelvin per watt.
type ThermalResistance float64

// Inductance is an inductance in henries.
type Inductance float64

// Ratio is a dimensionless number (a fraction, a factor, an exponent).
type Ratio float64

// Slew is a rate of change of current in amperes per second.
type Slew float64

// Kind names a physical quantity and the unit spellings accepted for it.
type Kind struct {
	Name   string   // the quantity, e.g. "capacitance"
	Symbol string   // the unit printed, e.g. "F"
	Units  []string // the unit spellings accepted after an optional SI prefix
	// NoPrefix is true for quantities where an SI prefix makes no sense
	// (temperature in °C, dimensionless ratios).
	NoPrefix bool
	// Scaled lists compound unit spellings with their multiplier to the
	// coherent unit, e.g. "A/µs" → 1e6 for a current slew rate.
	Scaled map[string]float64
}

var (
	kindVoltage     = Kind{Name: "voltage", Symbol: "V", Units: []string{"V"}}
	kindCurrent     = Kind{Name: "current", Symbol: "A", Units: []string{"A"}}
	kindResistance  = Kind{Name: "resistance", Symbol: "Ω", Units: []string{"Ω", "Ohm", "ohm", "Ohms", "ohms", "R"}}
	kindCapacitance = Kind{Name: "capacitance", Symbol: "F", Units: []string{"F"}}
	kindCharge      = Kind{Name: "charge", Symbol: "C", Units: []string{"C"}}
	kindTime        = Kind{Name: "time", Symbol: "s", Units: []string{"s"}}
	kindFrequency   = Kind{Name: "frequency", Symbol: "Hz", Units: []string{"Hz"}}
	kindPower       = Kind{Name: "power", Symbol: "W", Units: []string{"W"}}
	kindEnergy      = Kind{Name: "energy", Symbol: "J", Units: []string{"J"}}
	kindTemperature = Kind{Name: "temperature", Symbol: "°C", Units: []string{"°C", "degC", "C"}, NoPrefix: true}
	kindThermal     = Kind{Name: "thermal resistance", Symbol: "K/W", Units: []string{"K/W", "°C/W", "C/W"}}
	kindInductance  = Kind{Name: "inductance", Symbol: "H", Units: []string{"H"}}
	kindRatio       = Kind{Name: "ratio", Symbol: "", Units: []string{"%"}, NoPrefix: true}
	kindSlew        = Kind{Name: "current slew rate", Symbol: "A/s", Units: []string{"A/s"},
		Scaled: map[string]float64{"A/ms": 1e3, "A/us": 1e6, "A/µs": 1e6, "A/μs": 1e6, "A/ns": 1e9}}
)

// Kind methods tie each type to its units; Parse and Format use them.
func (Voltage) Kind() Kind           { return kindVoltage }
func (Current) Kind() Kind           { return kindCurrent }
func (Resistance) Kind() Kind        { return kindResistance }
func (Capacitance) Kind() Kind       { return kindCapacitance }
func (Charge) Kind() Kind            { return kindCharge }
func (Time) Kind() Kind              { return kindTime }
func (Frequency) Kind() Kind         { return kindFrequency }
func (Power) Kind() Kind             { return kindPower }
func (Energy) Kind() Kind            { return kindEnergy }
func (Temperature) Kind() Kind       { return kindTemperature }
func (ThermalResistance) Kind() Kind { return kindThermal }
func (Inductance) Kind() Kind        { return kindInductance }
func (Ratio) Kind() Kind             { return kindRatio }
func (Slew) Kind() Kind              { return kindSlew }

// Quantity is the set of the named types above.
type Quantity interface {
	~float64
	Kind() Kind
}

// Errors returned (wrapped) by Parse.
var (
	ErrEmpty     = errors.New("empty value")
	ErrSyntax    = errors.New("not a number")
	ErrUnit      = errors.New("wrong unit")
	ErrNotFinite = errors.New("not a finite number")
)

// prefix returns the multiplier of an SI prefix that starts s, and its length
// in bytes. It accepts both micro signs and the ASCII "u".
func prefix(s string) (float64, int) {
	if s == "" {
		return 1, 0
	}
	switch s[0] {
	case 'f':
		return 1e-15, 1
	case 'p':
		return 1e-12, 1
	case 'n':
		return 1e-9, 1
	case 'u':
		return 1e-6, 1
	case 'm':
		return 1e-3, 1
	case 'k':
		return 1e3, 1
	case 'M':
		return 1e6, 1
	case 'G':
		return 1e9, 1
	}
	if strings.HasPrefix(s, "µ") || strings.HasPrefix(s, "μ") {
		return 1e-6, len("µ")
	}
	return 1, 0
}

// numberEnd returns the length of the leading decimal number in s
// (sign, digits, point, exponent).
func numberEnd(s string) int {
	i := 0
	if i < len(s) && (s[i] == '+' || s[i] == '-') {
		i++
	}
	digits := 0
	for i < len(s) && (s[i] >= '0' && s[i] <= '9' || s[i] == '.') {
		i++
		digits++
	}
	if digits == 0 {
		return 0
	}
	// An exponent only if followed by digits, so that "3e" is not swallowed.
	if i < len(s) && (s[i] == 'e' || s[i] == 'E') {
		j := i + 1
		if j < len(s) && (s[j] == '+' || s[j] == '-') {
			j++
		}
		k := j
		for k < len(s) && s[k] >= '0' && s[k] <= '9' {
			k++
		}
		if k > j {
			i = k
		}
	}
	return i
}

// ParseFloat parses text written as a number with an optional SI prefix and
// an optional unit of kind k: "280m", "280 mOhm", "71 pF", "4.7e-9", "1.2k".
// Surrounding white space is ignored. A unit that does not belong to k is an
// error wrapping ErrUnit; an empty text wraps ErrEmpty; NaN and infinities
// wrap ErrNotFinite.
func ParseFloat(text string, k Kind) (float64, error) {
	s := strings.TrimSpace(text)
	if s == "" {
		return 0, ErrEmpty
	}
	n := numberEnd(s)
	if n == 0 {
		low := strings.ToLower(s)
		if strings.Contains(low, "nan") || strings.Contains(low, "inf") {
			return 0, fmt.Errorf("%q: %w", text, ErrNotFinite)
		}
		return 0, fmt.Errorf("%q: %w", text, ErrSyntax)
	}
	v, err := strconv.ParseFloat(s[:n], 64)
	if err != nil {
		if errors.Is(err, strconv.ErrRange) {
			return 0, fmt.Errorf("%q: %w", text, ErrNotFinite)
		}
		return 0, fmt.Errorf("%q: %w", text, ErrSyntax)
	}
	rest := strings.TrimLeft(s[n:], " ")
	if rest == "" {
		return v, nil
	}
	if mul, ok := k.Scaled[rest]; ok {
		return v * mul, nil
	}
	if k.NoPrefix {
		if rest == "%" && k.Symbol == "" {
			return v / 100, nil
		}
		for _, u := range k.Units {
			if rest == u {
				return v, nil
			}
		}
		return 0, unitError(text, rest, k)
	}
	for _, u := range k.Units {
		if rest == u {
			return v, nil
		}
	}
	mul, plen := prefix(rest)
	if plen == 0 {
		return 0, unitError(text, rest, k)
	}
	unit := strings.TrimLeft(rest[plen:], " ")
	if unit != "" {
		ok := false
		for _, u := range k.Units {
			if unit == u {
				ok = true
				break
			}
		}
		if !ok {
			return 0, unitError(text, rest, k)
		}
	}
	v *= mul
	if math.IsInf(v, 0) {
		return 0, fmt.Errorf("%q: %w", text, ErrNotFinite)
	}
	return v, nil
}

func unitError(text, unit string, k Kind) error {
	return fmt.Errorf("%q: %w: %q is not a unit of %s (use %s)", text, ErrUnit, unit, k.Name, strings.Join(k.Units, ", "))
}

// Parse parses text as a quantity of type Q; see ParseFloat.
func Parse[Q Quantity](text string) (Q, error) {
	var zero Q
	v, err := ParseFloat(text, zero.Kind())
	return Q(v), err
}

// Format prints v with an SI prefix, sig significant digits and the unit
// symbol, e.g. "280 mΩ", "71.0 pF". Zero prints as "0".
func Format[Q Quantity](v Q, sig int) string {
	return FormatFloat(float64(v), sig, v.Kind())
}

// FormatFloat is Format for a bare float64 of kind k.
func FormatFloat(v float64, sig int, k Kind) string {
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return "n/a"
	}
	if v == 0 {
		if k.Symbol == "" {
			return "0"
		}
		return "0 " + k.Symbol
	}
	if k.NoPrefix {
		s := strconv.FormatFloat(v, 'f', decimals(math.Abs(v), sig), 64)
		if k.Symbol == "" {
			return s
		}
		return s + " " + k.Symbol
	}
	m, p := humanize.ComputeSI(v)
	// Rounding to sig digits can reach 1000 (999.96 -> "1000"); step up a prefix.
	if math.Abs(m) >= 1000-0.5*math.Pow(10, 3-float64(sig)) && p != "G" {
		m, p = humanize.ComputeSI(v * 1.0000001)
		if math.Abs(m) < 1 {
			m *= 1000
		}
	}
	return strconv.FormatFloat(m, 'f', decimals(math.Abs(m), sig), 64) + " " + p + k.Symbol
}

// decimals returns how many decimals show sig significant digits of a.
func decimals(a float64, sig int) int {
	if a == 0 {
		return 0
	}
	d := sig - 1 - int(math.Floor(math.Log10(a)))
	if d < 0 {
		return 0
	}
	return d
}

// String methods print three significant digits with an SI prefix.
func (v Voltage) String() string           { return Format(v, 3) }
func (v Current) String() string           { return Format(v, 3) }
func (v Resistance) String() string        { return Format(v, 3) }
func (v Capacitance) String() string       { return Format(v, 3) }
func (v Charge) String() string            { return Format(v, 3) }
func (v Time) String() string              { return Format(v, 3) }
func (v Frequency) String() string         { return Format(v, 3) }
func (v Power) String() string             { return Format(v, 3) }
func (v Energy) String() string            { return Format(v, 3) }
func (v Temperature) String() string       { return Format(v, 4) }
func (v ThermalResistance) String() string { return Format(v, 3) }
func (v Inductance) String() string        { return Format(v, 3) }
func (v Ratio) String() string             { return Format(v, 3) }
func (v Slew) String() string              { return Format(v, 3) }
