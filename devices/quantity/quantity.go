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
	"unicode/utf8"
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

// Conductance is a conductance in siemens (a transconductance: amperes of
// drain current per volt of gate drive).
type Conductance float64

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
	kindConductance = Kind{Name: "conductance", Symbol: "S", Units: []string{"S", "A/V"}}
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
func (Conductance) Kind() Kind       { return kindConductance }

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

// prefixes are the SI prefixes that Parse accepts and Format prints, from
// yocto to yotta. Format clamps to the ends of this table.
var prefixes = [...]struct {
	sym string
	exp int // power of ten
}{
	{"y", -24}, {"z", -21}, {"a", -18}, {"f", -15}, {"p", -12}, {"n", -9}, {"µ", -6}, {"m", -3},
	{"", 0}, {"k", 3}, {"M", 6}, {"G", 9}, {"T", 12}, {"P", 15}, {"E", 18}, {"Z", 21}, {"Y", 24},
}

// pow10 holds the exact float64 powers of ten 10^0 … 10^22 and is used for
// prefix multipliers and the exact fast path of number parsing.
var pow10 = [...]float64{1e0, 1e1, 1e2, 1e3, 1e4, 1e5, 1e6, 1e7, 1e8, 1e9, 1e10,
	1e11, 1e12, 1e13, 1e14, 1e15, 1e16, 1e17, 1e18, 1e19, 1e20, 1e21, 1e22}

// prefix returns the power of ten of an SI prefix that starts s, and its
// length in bytes (0 when s starts with no prefix). It accepts both micro
// signs (U+00B5, U+03BC) and the ASCII "u".
func prefix(s string) (exp int, n int) {
	if s == "" {
		return 0, 0
	}
	switch s[0] {
	case 'y':
		return -24, 1
	case 'z':
		return -21, 1
	case 'a':
		return -18, 1
	case 'f':
		return -15, 1
	case 'p':
		return -12, 1
	case 'n':
		return -9, 1
	case 'u':
		return -6, 1
	case 'm':
		return -3, 1
	case 'k':
		return 3, 1
	case 'M':
		return 6, 1
	case 'G':
		return 9, 1
	case 'T':
		return 12, 1
	case 'P':
		return 15, 1
	case 'E':
		return 18, 1
	case 'Z':
		return 21, 1
	case 'Y':
		return 24, 1
	}
	if strings.HasPrefix(s, "µ") || strings.HasPrefix(s, "μ") {
		return -6, len("µ")
	}
	return 0, 0
}

// scale multiplies v by 10^exp; for |exp| ≤ 22 with one correctly rounded
// operation (division for negative exponents, so that 280·10⁻³ is the
// nearest float64 to 0.28).
func scale(v float64, exp int) float64 {
	switch {
	case exp == 0:
		return v
	case exp > 0 && exp <= 22:
		return v * pow10[exp]
	case exp < 0 && exp >= -22:
		return v / pow10[-exp]
	}
	return v * math.Pow10(exp)
}

// decimal is a decimal number as scanned: mant·10^exp, negative when neg.
// fast is false when the mantissa has more than 19 significant digits or
// the text is malformed (two points): strconv.ParseFloat then decides.
type decimal struct {
	mant uint64
	exp  int
	neg  bool
	fast bool
}

// scanNumber scans the leading decimal number of s (sign, digits and
// points, an exponent only when digits follow the e, so that "3e" is not
// swallowed) and returns its length in bytes, 0 when s does not start with
// a number.
func scanNumber(s string) (int, decimal) {
	d := decimal{fast: true}
	i := 0
	if i < len(s) && (s[i] == '+' || s[i] == '-') {
		d.neg = s[i] == '-'
		i++
	}
	digits, dots, sig := 0, 0, 0
	for ; i < len(s); i++ {
		c := s[i]
		if c == '.' {
			dots++
			if dots > 1 {
				d.fast = false
			}
			continue
		}
		if c < '0' || c > '9' {
			break
		}
		digits++
		if d.mant == 0 && c == '0' {
			if dots > 0 {
				d.exp--
			}
			continue
		}
		if sig == 19 {
			d.fast = false
			continue
		}
		d.mant = d.mant*10 + uint64(c-'0')
		sig++
		if dots > 0 {
			d.exp--
		}
	}
	if digits == 0 {
		return 0, decimal{}
	}
	if i < len(s) && (s[i] == 'e' || s[i] == 'E') {
		j := i + 1
		eneg := false
		if j < len(s) && (s[j] == '+' || s[j] == '-') {
			eneg = s[j] == '-'
			j++
		}
		k, e := j, 0
		for k < len(s) && s[k] >= '0' && s[k] <= '9' {
			if e < 100000 {
				e = e*10 + int(s[k]-'0')
			}
			k++
		}
		if k > j {
			i = k
			if eneg {
				e = -e
			}
			d.exp += e
		}
	}
	return i, d
}

// numberEnd returns the length of the leading decimal number in s.
func numberEnd(s string) int {
	n, _ := scanNumber(s)
	return n
}

// isSpace is unicode.IsSpace for r ≥ U+0080, without the table search: the
// Unicode White_Space characters above ASCII.
func isSpace(r rune) bool {
	switch r {
	case 0x85, 0xA0, 0x1680, 0x2028, 0x2029, 0x202F, 0x205F, 0x3000:
		return true
	}
	return r >= 0x2000 && r <= 0x200A
}

// trim is strings.TrimSpace with a fast exit for text that starts and ends
// with a printable character.
func trim(s string) string {
	if len(s) > 0 {
		a, b := s[0], s[len(s)-1]
		if a > ' ' && a < utf8.RuneSelf {
			if b > ' ' && b < utf8.RuneSelf {
				return s
			}
			if b >= utf8.RuneSelf {
				if r, _ := utf8.DecodeLastRuneInString(s); !isSpace(r) {
					return s
				}
			}
		}
	}
	return strings.TrimSpace(s)
}

// ParseFloat parses text written as a number with an optional SI prefix and
// an optional unit of kind k: "280m", "280 mOhm", "71 pF", "4.7e-9", "1.2k".
// Surrounding white space is ignored, and so are spaces (also no-break and
// thin spaces) between the number, the prefix and the unit. A unit that does
// not belong to k is an error wrapping ErrUnit; an empty text wraps ErrEmpty;
// NaN, infinities and values beyond the float64 range wrap ErrNotFinite;
// anything else that is not a number wraps ErrSyntax.
func ParseFloat(text string, k Kind) (float64, error) {
	return parseFloat(text, &k)
}

func parseFloat(text string, k *Kind) (float64, error) {
	s := trim(text)
	if s == "" {
		return 0, ErrEmpty
	}
	n, d := scanNumber(s)
	if n == 0 {
		low := strings.ToLower(s)
		if strings.Contains(low, "nan") || strings.Contains(low, "inf") {
			return 0, fmt.Errorf("%q: %w", text, ErrNotFinite)
		}
		return 0, fmt.Errorf("%q: %w", text, ErrSyntax)
	}
	rest := s[n:]
	if rest == "" {
		if v, ok := d.exact(0); ok {
			return v, nil // the common bare number
		}
	} else if c := rest[0]; c == ' ' || c == '\t' || c >= utf8.RuneSelf {
		rest = trimGap(rest)
	}
	pexp, mul := 0, 1.0
	switch {
	case rest == "":
	case k.NoPrefix:
		if rest == "%" && k.Symbol == "" {
			pexp = -2
		} else if !hasUnit(k, rest) {
			return 0, unitError(text, rest, *k)
		}
	case hasUnit(k, rest):
	default:
		if k.Scaled != nil {
			if m, ok := k.Scaled[rest]; ok {
				mul = m
				break
			}
		}
		var plen int
		pexp, plen = prefix(rest)
		if plen == 0 {
			return 0, unitError(text, rest, *k)
		}
		unit := rest[plen:]
		if unit != "" && (unit[0] == ' ' || unit[0] == '\t' || unit[0] == 0xC2 || unit[0] == 0xE2) {
			unit = trimGap(unit)
		}
		if unit != "" && !hasUnit(k, unit) {
			return 0, unitError(text, rest, *k)
		}
	}
	if mul == 1 {
		if v, ok := d.exact(pexp); ok {
			return v, nil
		}
	}
	v, err := d.value(s[:n], pexp)
	if err != nil {
		if errors.Is(err, strconv.ErrRange) {
			return 0, fmt.Errorf("%q: %w", text, ErrNotFinite)
		}
		return 0, fmt.Errorf("%q: %w", text, ErrSyntax)
	}
	if mul != 1 {
		v *= mul
	}
	if math.IsInf(v, 0) {
		return 0, fmt.Errorf("%q: %w", text, ErrNotFinite)
	}
	return v, nil
}

// hasUnit reports whether u is one of k's unit spellings.
func hasUnit(k *Kind, u string) bool {
	if u == "" {
		return false
	}
	for _, x := range k.Units {
		if len(x) == len(u) && x[0] == u[0] && x == u {
			return true
		}
	}
	return false
}

// trimGap removes the spaces people type between a number, its prefix and
// its unit: ASCII space and tab, no-break space U+00A0, thin space U+2009,
// narrow no-break space U+202F.
func trimGap(s string) string {
	for len(s) > 0 {
		switch c := s[0]; {
		case c == ' ' || c == '\t':
			s = s[1:]
		case c == 0xC2 && strings.HasPrefix(s, "\u00a0"):
			s = s[len("\u00a0"):]
		case c == 0xE2 && (strings.HasPrefix(s, "\u2009") || strings.HasPrefix(s, "\u202f")):
			s = s[len("\u2009"):]
		default:
			return s
		}
	}
	return s
}

// number converts the decimal number s (as delimited by numberEnd) times
// 10^pexp to the nearest float64; see decimal.value.
func number(s string, pexp int) (float64, error) {
	_, d := scanNumber(s)
	return d.value(s, pexp)
}

// value returns d·10^pexp, s being the text d was scanned from. Numbers
// with at most 19 significant digits whose mantissa fits in 53 bits and
// whose total power of ten is within ±22 take an exact fast path: one
// correctly rounded multiplication or division of two exactly
// representable values, so the result is the correctly rounded value
// [Clinger, "How to read floating point numbers accurately", PLDI 1990].
// Everything else goes through strconv.ParseFloat, whose errors (ErrSyntax,
// ErrRange) are returned unchanged.
func (d decimal) value(s string, pexp int) (float64, error) {
	if v, ok := d.exact(pexp); ok {
		return v, nil
	}
	v, err := strconv.ParseFloat(s, 64)
	if err != nil {
		return 0, err
	}
	return scale(v, pexp), nil
}

// exact returns d·10^pexp when the exact fast path applies (see value);
// its results are finite.
func (d decimal) exact(pexp int) (float64, bool) {
	if !d.fast || d.mant > 1<<53 {
		return 0, false
	}
	e := d.exp + pexp
	var v float64
	switch {
	case d.mant == 0:
		v = 0
	case e >= 0 && e <= 22:
		v = float64(d.mant) * pow10[e]
	case e < 0 && e >= -22:
		v = float64(d.mant) / pow10[-e]
	default:
		return 0, false
	}
	if d.neg {
		v = -v
	}
	return v, true
}

func unitError(text, unit string, k Kind) error {
	return fmt.Errorf("%q: %w: %q is not a unit of %s (use %s)", text, ErrUnit, unit, k.Name, strings.Join(k.Units, ", "))
}

// Parse parses text as a quantity of type Q; see ParseFloat.
func Parse[Q Quantity](text string) (Q, error) {
	var zero Q
	k := zero.Kind()
	v, err := parseFloat(text, &k)
	return Q(v), err
}

// Parser parses text as a quantity of kind k; it is ParseFloat with the
// kind bound once, for callers that parse many cells of one column.
type Parser struct{ k Kind }

// NewParser returns a Parser for kind k.
func NewParser(k Kind) *Parser { return &Parser{k: k} }

// Parse is ParseFloat(text, k).
func (p *Parser) Parse(text string) (float64, error) { return parseFloat(text, &p.k) }

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
	m, p, d := siPrefix(v, sig)
	return strconv.FormatFloat(m, 'f', d, 64) + " " + p + k.Symbol
}

// siPrefix splits v into a mantissa and the SI prefix that keeps the
// mantissa, rounded to sig significant digits, within [1, 1000). Beyond the
// ends of the prefix table the mantissa carries the remaining powers of ten.
// It also returns the number of decimals that show sig digits.
func siPrefix(v float64, sig int) (m float64, sym string, dec int) {
	a := math.Abs(v)
	idx := int(math.Floor(math.Log10(a)/3)) + 8 // prefixes[8] is the empty prefix
	idx = max(0, min(idx, len(prefixes)-1))
	m = scale(v, -prefixes[idx].exp)
	dec = decimals(math.Abs(m), sig)
	// Rounding to sig digits can reach 1000 (999.96 -> "1000"), and
	// Log10 can land one step low near a power of 1000: step up a prefix.
	if sig < 1 {
		sig = 1
	}
	if idx < len(prefixes)-1 && math.Abs(m) >= 1000-0.5*math.Pow(10, 3-float64(sig)) {
		idx++
		m = scale(v, -prefixes[idx].exp)
		dec = decimals(1, sig) // m rounds to 1.00…
	}
	return m, prefixes[idx].sym, dec
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
func (v Conductance) String() string       { return Format(v, 3) }
