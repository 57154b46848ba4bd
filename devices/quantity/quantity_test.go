package quantity

import (
	"errors"
	"math"
	"strconv"
	"strings"
	"testing"
	"unicode"

	"github.com/dustin/go-humanize"
)

// parser adapts Parse[Q] to a common signature for table-driven tests.
type parser struct {
	name  string
	kind  Kind
	parse func(string) (float64, error)
}

func parserOf[Q Quantity]() parser {
	var z Q
	return parser{
		name: z.Kind().Name,
		kind: z.Kind(),
		parse: func(s string) (float64, error) {
			v, err := Parse[Q](s)
			return float64(v), err
		},
	}
}

// allParsers lists every quantity type.
func allParsers() []parser {
	return []parser{
		parserOf[Voltage](), parserOf[Current](), parserOf[Resistance](), parserOf[Capacitance](),
		parserOf[Charge](), parserOf[Time](), parserOf[Frequency](), parserOf[Power](),
		parserOf[Energy](), parserOf[Temperature](), parserOf[ThermalResistance](),
		parserOf[Inductance](), parserOf[Ratio](), parserOf[Slew](), parserOf[Conductance](),
	}
}

func relErr(got, want float64) float64 {
	if want == 0 {
		return math.Abs(got)
	}
	return math.Abs(got-want) / math.Abs(want)
}

// The expected values are the SI prefix definitions (BIPM, The International
// System of Units, 9th ed., 2019, table 7): m = 1e-3, µ = 1e-6, n = 1e-9,
// p = 1e-12, k = 1e3.
func TestParse(t *testing.T) {
	R, C, Q, V, I := parserOf[Resistance](), parserOf[Capacitance](), parserOf[Charge](), parserOf[Voltage](), parserOf[Current]()
	T, S, Tm, Rt := parserOf[Temperature](), parserOf[Slew](), parserOf[Time](), parserOf[Ratio]()
	L, Th, F, E, P := parserOf[Inductance](), parserOf[ThermalResistance](), parserOf[Frequency](), parserOf[Energy](), parserOf[Power]()
	tests := []struct {
		p    parser
		in   string
		want float64
		err  error
	}{
		{R, "280m", 0.28, nil},
		{R, "0.28", 0.28, nil},
		{R, "280 mOhm", 0.28, nil},
		{R, "280 mΩ", 0.28, nil},
		{R, "280mΩ", 0.28, nil},
		{R, "  280 mohm ", 0.28, nil},
		{R, "1.2k", 1200, nil},
		{R, "1.2 kΩ", 1200, nil},
		{R, "4.7 Ohms", 4.7, nil},
		{R, "2R", 2, nil},
		{R, "280\u00a0mΩ", 0.28, nil}, // no-break space
		{R, "280\u202fmΩ", 0.28, nil}, // narrow no-break space
		{C, "71p", 71e-12, nil},
		{C, "71 pF", 71e-12, nil},
		{C, "3.3n", 3.3e-9, nil},
		{C, "4.7e-9", 4.7e-9, nil},
		{C, "4.7E-9 F", 4.7e-9, nil},
		{C, "4.7u", 4.7e-6, nil},
		{C, "4.7µ", 4.7e-6, nil},  // U+00B5 micro sign
		{C, "4.7μF", 4.7e-6, nil}, // U+03BC Greek mu
		{C, "1.1 nF", 1.1e-9, nil},
		{C, ".5p", 0.5e-12, nil},
		{C, "3 nC", 0, ErrUnit},
		{C, "3 V", 0, ErrUnit},
		{C, "3 xF", 0, ErrUnit},
		{Q, "12n", 12e-9, nil},
		{Q, "12 nC", 12e-9, nil},
		{Q, "3 nF", 0, ErrUnit},
		{V, "-20", -20, nil},
		{V, "+4.5 V", 4.5, nil},
		{V, "1.2 kV", 1200, nil},
		{I, "100 A", 100, nil},
		{I, "250 mA", 0.25, nil},
		{S, "100 A/µs", 1e8, nil},
		{S, "100 A/us", 1e8, nil},
		{S, "1 A/ns", 1e9, nil},
		{S, "5e8 A/s", 5e8, nil},
		{S, "1e308 A/ns", 0, ErrNotFinite},
		{T, "25 °C", 25, nil},
		{T, "25", 25, nil},
		{T, "-40 degC", -40, nil},
		{T, "25 m°C", 0, ErrUnit}, // no prefix on a temperature
		{T, "25 K", 0, ErrUnit},
		{Tm, "12 ns", 12e-9, nil},
		{Tm, "3.5n", 3.5e-9, nil},
		{Rt, "1.5", 1.5, nil},
		{Rt, "15%", 0.15, nil},
		{Rt, "1.5m", 0, ErrUnit},
		{L, "1.5 nH", 1.5e-9, nil},
		{Th, "62 K/W", 62, nil},
		{Th, "0.5 °C/W", 0.5, nil},
		{F, "2 MHz", 2e6, nil},
		{F, "100k", 1e5, nil},
		{E, "3.2 µJ", 3.2e-6, nil},
		{P, "1.5 W", 1.5, nil},
		{C, "2 TF", 2e12, nil},  // every prefix Format prints parses back
		{C, "7 aF", 7e-18, nil}, // atto
		// Errors.
		{C, "", 0, ErrEmpty},
		{C, "   ", 0, ErrEmpty},
		{C, "NaN", 0, ErrNotFinite},
		{C, "nan pF", 0, ErrNotFinite},
		{C, "Inf", 0, ErrNotFinite},
		{C, "-Inf", 0, ErrNotFinite},
		{C, "+inf", 0, ErrNotFinite},
		{C, "1e999", 0, ErrNotFinite},
		{C, "1e308k", 0, ErrNotFinite},
		{C, "-1e999", 0, ErrNotFinite},
		{C, "abc", 0, ErrSyntax},
		{C, "-", 0, ErrSyntax},
		{C, ".", 0, ErrSyntax},
		{C, "1.2.3", 0, ErrSyntax},
		{C, "3.3x", 0, ErrUnit},
	}
	for _, tt := range tests {
		got, err := tt.p.parse(tt.in)
		if tt.err != nil {
			if !errors.Is(err, tt.err) {
				t.Errorf("Parse %s %q: error %v, want %v", tt.p.name, tt.in, err, tt.err)
			}
			continue
		}
		if err != nil {
			t.Errorf("Parse %s %q: %v", tt.p.name, tt.in, err)
			continue
		}
		if relErr(got, tt.want) > 1e-15 {
			t.Errorf("Parse %s %q = %g, want %g", tt.p.name, tt.in, got, tt.want)
		}
	}
}

// TestParseErrorText checks that an error names the text and says why.
func TestParseErrorText(t *testing.T) {
	tests := []struct {
		p    parser
		in   string
		want string
	}{
		{parserOf[Charge](), "3.3x", `"3.3x": wrong unit: "x" is not a unit of charge (use C)`},
		{parserOf[Charge](), "abc", `"abc": not a number`},
		{parserOf[Charge](), "", `empty value`},
		{parserOf[Charge](), "NaN", `"NaN": not a finite number`},
	}
	for _, tt := range tests {
		_, err := tt.p.parse(tt.in)
		if err == nil || err.Error() != tt.want {
			t.Errorf("Parse %q: error %v, want %s", tt.in, err, tt.want)
		}
	}
}

// TestParseAgainstHumanize compares with an outside reference:
// github.com/dustin/go-humanize ParseSI, which parses "number [prefix]unit".
// For inputs that both accept (no exponent; a unit humanize leaves intact
// that our kind also knows), the values must agree within 1e-12 relative.
func TestParseAgainstHumanize(t *testing.T) {
	inputs := []struct {
		p  parser
		in string
	}{
		{parserOf[Resistance](), "280m"},
		{parserOf[Resistance](), "280 mOhm"},
		{parserOf[Resistance](), "280 mΩ"},
		{parserOf[Resistance](), "0.28"},
		{parserOf[Resistance](), "1.2k"},
		{parserOf[Resistance](), "4.7 MΩ"},
		{parserOf[Capacitance](), "71p"},
		{parserOf[Capacitance](), "71 pF"},
		{parserOf[Capacitance](), "3.3n"},
		{parserOf[Capacitance](), "4.7µ"},
		{parserOf[Capacitance](), "4.7μF"},
		{parserOf[Capacitance](), "1.1 nF"},
		{parserOf[Capacitance](), "0.0033 µF"},
		{parserOf[Capacitance](), "7 aF"},
		{parserOf[Charge](), "12.5 nC"},
		{parserOf[Voltage](), "-20"},
		{parserOf[Voltage](), "1.2 kV"},
		{parserOf[Current](), "250 mA"},
		{parserOf[Time](), "12.34 ns"},
		{parserOf[Frequency](), "2 MHz"},
		{parserOf[Frequency](), "13.56 MHz"},
		{parserOf[Energy](), "3.2 µJ"},
		{parserOf[Inductance](), "1.5 nH"},
		{parserOf[Power](), "750 mW"},
		{parserOf[Capacitance](), "2 TF"},
		{parserOf[Temperature](), "25 °C"},
		{parserOf[ThermalResistance](), "62 K/W"},
	}
	for _, tt := range inputs {
		ref, unit, herr := humanize.ParseSI(tt.in)
		if herr != nil || (unit != "" && !hasUnit(&tt.p.kind, strings.TrimSpace(unit))) {
			t.Fatalf("reference does not accept %q (unit %q, %v): fix the table", tt.in, unit, herr)
		}
		got, err := tt.p.parse(tt.in)
		if err != nil {
			t.Errorf("Parse %q: %v", tt.in, err)
			continue
		}
		if relErr(got, ref) > 1e-12 {
			t.Errorf("Parse %q = %.17g, humanize.ParseSI = %.17g", tt.in, got, ref)
		}
	}
}

// TestNumberExact checks the exact fast path of number against
// strconv.ParseFloat, the correctly rounded reference, on values with and
// without exponents, near the edges of the fast path.
func TestNumberExact(t *testing.T) {
	for _, s := range []string{
		"0", "-0", "1", "0.1", "0.28", "280e-3", "4.7e-9", "123456789012345678", "9007199254740993",
		"1e22", "1e23", "1e-22", "1e-23", "0.000000000000000000000001", "3.14159265358979",
		"1234567890123456789", "12345678901234567890", "0.1e1", "5e-324", "1.7976931348623157e308",
		"00000000000000000000000000001.5", "1.00000000000000000000000000001", "-2.5e+3",
	} {
		want, werr := strconv.ParseFloat(s, 64)
		got, err := number(s, 0)
		if (werr == nil) != (err == nil) || got != want {
			t.Errorf("number(%q) = %v, %v; strconv %v, %v", s, got, err, want, werr)
		}
	}
}

// TestFormat checks printing: three significant digits, SI prefix, symbol.
func TestFormat(t *testing.T) {
	tests := []struct {
		got, want string
	}{
		{Format(Resistance(0.28), 3), "280 mΩ"},
		{Format(Capacitance(71e-12), 3), "71.0 pF"},
		{Format(Capacitance(3.3e-9), 2), "3.3 nF"},
		{Format(Charge(12e-9), 3), "12.0 nC"},
		{Format(Voltage(100), 3), "100 V"},
		{Format(Voltage(-20), 3), "-20.0 V"},
		{Format(Resistance(1200), 3), "1.20 kΩ"},
		{Format(Resistance(0.9996), 3), "1.00 Ω"}, // rounding reaches 1000 m
		{Format(Resistance(999.96), 4), "1.000 kΩ"},
		{Format(Resistance(999.6), 4), "999.6 Ω"},
		{Format(Frequency(2e6), 3), "2.00 MHz"},
		{Format(Slew(1e8), 3), "100 MA/s"},
		{Format(Temperature(25), 4), "25.00 °C"},
		{Format(Ratio(1.45), 3), "1.45"},
		{Format(Ratio(0), 3), "0"},
		{Format(Current(0), 3), "0 A"},
		{Format(Capacitance(math.NaN()), 3), "n/a"},
		{Format(Energy(math.Inf(1)), 3), "n/a"},
		{Format(Capacitance(2e12), 3), "2.00 TF"},
		{Format(Capacitance(7e-18), 3), "7.00 aF"},
		{Format(Capacitance(1e-30), 3), "0.00000100 yF"}, // below the table: clamp
	}
	for _, tt := range tests {
		if tt.got != tt.want {
			t.Errorf("Format = %q, want %q", tt.got, tt.want)
		}
	}
}

// TestFormatParseRoundTrip prints and re-reads values of every type.
func TestFormatParseRoundTrip(t *testing.T) {
	values := []float64{1, -1, 0.28, 71e-12, 3.3e-9, 1.2e3, 999.96, 0.9996, 1e-20, 4e20, 123.456, 5e-7}
	for _, p := range allParsers() {
		for _, v := range values {
			for _, sig := range []int{1, 3, 6} {
				text := FormatFloat(v, sig, p.kind)
				got, err := p.parse(text)
				if err != nil {
					t.Errorf("%s: Parse(Format(%g)) = Parse(%q): %v", p.name, v, text, err)
					continue
				}
				if relErr(got, v) > 0.5*math.Pow(10, 1-float64(sig))+1e-12 {
					t.Errorf("%s: Parse(%q) = %g, want %g within %d digits", p.name, text, got, v, sig)
				}
			}
		}
	}
}

// TestOpt checks optional cells: blank is not given, a value is given.
func TestOpt(t *testing.T) {
	var o Opt[Capacitance]
	if err := o.UnmarshalCSV("  "); err != nil || o.OK {
		t.Errorf("blank: %+v, %v", o, err)
	}
	if err := o.UnmarshalCSV("71 pF"); err != nil || !o.OK || relErr(float64(o.V), 71e-12) > 1e-15 {
		t.Errorf("71 pF: %+v, %v", o, err)
	}
	if err := o.UnmarshalCSV("3 nC"); !errors.Is(err, ErrUnit) {
		t.Errorf("3 nC: %v", err)
	}
	if got := o.Or(5); float64(got) != 71e-12 {
		t.Errorf("Or = %v", got)
	}
	if got := (Opt[Capacitance]{}).Or(5); got != 5 {
		t.Errorf("Or on blank = %v", got)
	}
	var v Voltage
	if err := v.UnmarshalCSV(""); !errors.Is(err, ErrEmpty) {
		t.Errorf("required blank: %v", err)
	}
}

// BenchmarkParseFloat measures one cell's parse in typical spellings.
func BenchmarkParseFloat(b *testing.B) {
	cells := []string{"4.2 mΩ", "12n", "1.1 nF", "30 V", "1.55e-08", "2.44", "100 A/µs", "25", "3.77 ns", "796m"}
	kinds := []Kind{kindResistance, kindCharge, kindCapacitance, kindVoltage, kindCharge, kindResistance, kindSlew, kindTemperature, kindTime, kindVoltage}
	b.ReportAllocs()
	for b.Loop() {
		for i, c := range cells {
			if _, err := ParseFloat(c, kinds[i]); err != nil {
				b.Fatal(err)
			}
		}
	}
}

// TestBlank checks that a blank optional cell is exactly a text for which
// Parse returns ErrEmpty itself (the loader relies on it).
func TestBlank(t *testing.T) {
	for _, s := range []string{"", " ", "\t", "\v \r", "\u00a0", " \u2009 ", "x", " 1", "\u00a0m", "-"} {
		_, err := Parse[Voltage](s)
		if isBlank(s) != (err == ErrEmpty) {
			t.Errorf("%q: isBlank %v, Parse error %v", s, isBlank(s), err)
		}
	}
}

// TestIsSpace checks isSpace against unicode.IsSpace above ASCII.
func TestIsSpace(t *testing.T) {
	for r := rune(0x80); r <= 0x10FFFF; r++ {
		if isSpace(r) != unicode.IsSpace(r) {
			t.Fatalf("U+%04X: isSpace %v", r, isSpace(r))
		}
	}
}
