package quantity

import (
	"errors"
	"strings"
	"testing"
)

// TestParseDecimalComma checks cells as a spreadsheet saves them where the
// comma is the decimal separator (common practice in continental-European
// locales: "0,28" for 0.28).
func TestParseDecimalComma(t *testing.T) {
	for _, c := range []struct {
		text string
		kind Kind
		want float64
		err  error
	}{
		{"0,28", kindResistance, 0.28, nil},
		{"280 mΩ", kindResistance, 0.28, nil},
		{"4,7 nC", kindCharge, 4.7e-9, nil},
		{"4,7nC", kindCharge, 4.7e-9, nil},
		{"1,2k", kindFrequency, 1200, nil},
		{"4,7e-9", kindCharge, 4.7e-9, nil},
		{"-0,5", kindVoltage, -0.5, nil},
		{",5", kindVoltage, 0.5, nil},
		{"0.28", kindResistance, 0.28, nil}, // a decimal point still reads
		{"12", kindVoltage, 12, nil},
		{"100 A/µs", kindSlew, 1e8, nil},
		{"1,5 A/µs", kindSlew, 1.5e6, nil},
		{"25 °C", kindTemperature, 25, nil},
		{"1.200,5", kindVoltage, 0, ErrSyntax}, // no digit grouping
		{"1,2,3", kindVoltage, 0, ErrSyntax},
		{"4,7 nF", kindCharge, 0, ErrUnit},
		{"", kindVoltage, 0, ErrEmpty},
		{"NaN", kindVoltage, 0, ErrNotFinite},
	} {
		got, err := ParseFloatDecimalComma(c.text, c.kind)
		if c.err != nil {
			if !errors.Is(err, c.err) {
				t.Errorf("%q: error %v, want %v", c.text, err, c.err)
			}
			continue
		}
		if err != nil || relErr(got, c.want) > 1e-15 {
			t.Errorf("%q = %v, %v; want %v", c.text, got, err, c.want)
		}
		if p, err := NewParser(c.kind).ParseDecimalComma(c.text); err != nil || p != got {
			t.Errorf("Parser %q = %v, %v; want %v", c.text, p, err, got)
		}
	}
}

// TestDecimalCommaIsPoint checks that a decimal comma reads exactly as the
// same text with a point, and that the error of a bad cell quotes the
// cell as written.
func TestDecimalCommaIsPoint(t *testing.T) {
	for _, s := range []string{"0,28", "4,7 nC", "1,2k", "3,14159265358979323846", "1,5e-3", "7,", "x,5", "1,2,3", "2,2 µs"} {
		for _, k := range []Kind{kindCharge, kindTime, kindFrequency, kindRatio} {
			a, errA := ParseFloatDecimalComma(s, k)
			b, errB := ParseFloat(strings.ReplaceAll(s, ",", "."), k)
			if (errA == nil) != (errB == nil) || a != b {
				t.Errorf("%q (%s): %v, %v; with a point %v, %v", s, k.Name, a, errA, b, errB)
			}
			if errA != nil && !strings.Contains(errA.Error(), `"`+s+`"`) {
				t.Errorf("%q: error %v does not quote the cell", s, errA)
			}
		}
	}
}

// BenchmarkParseFloatDecimalComma is BenchmarkParseFloat with decimal
// commas.
func BenchmarkParseFloatDecimalComma(b *testing.B) {
	cells := []string{"4,2 mΩ", "12n", "1,1 nF", "30 V", "1,55e-08", "2,44", "100 A/µs", "25", "3,77 ns", "796m"}
	kinds := []Kind{kindResistance, kindCharge, kindCapacitance, kindVoltage, kindCharge, kindResistance, kindSlew, kindTemperature, kindTime, kindVoltage}
	b.ReportAllocs()
	for b.Loop() {
		for i, c := range cells {
			if _, err := ParseFloatDecimalComma(c, kinds[i]); err != nil {
				b.Fatal(err)
			}
		}
	}
}
