package report

import (
	"math"
	"strconv"
	"strings"
)

// TinyShare is the display threshold of a loss share in the text formats,
// as a fraction of its row's total: a share below it prints as 0 (the
// number itself is kept in CSV and JSON). 1e-4 of the total is below the
// models' own accuracy by two orders of magnitude.
const TinyShare = 1e-4

// Dash is what the text formats print for an unknown value.
const Dash = "–"

// FormatCell prints cell c of field key for a reader: an SI prefix and the
// unit for values whose field is in watts, farads, seconds and the like;
// one decimal for temperatures, two for percentages; a loss share below
// TinyShare of the row's total_w as 0; Dash for an unknown value.
func FormatCell(key string, c Cell, row Record) string {
	f, _ := FieldOf(key)
	if !c.Known {
		return Dash
	}
	switch f.Kind {
	case KindText:
		return c.Text
	case KindBool:
		if c.Num != 0 {
			return "yes"
		}
		return "no"
	case KindList:
		return strings.Join(c.List, ", ")
	}
	v := c.Num
	delta := strings.Contains(key, "_delta_") || key == "difference_pct" // a signed change
	switch f.Unit {
	case "W":
		if total, ok := row.Number("total_w"); ok && math.Abs(v) < TinyShare*math.Abs(total) {
			return "0"
		}
		if delta {
			return sign(v) + SI(math.Abs(v), "W")
		}
		return SI(v, "W")
	case "°C":
		return strconv.FormatFloat(v, 'f', 1, 64)
	case "K":
		return sign(v) + strconv.FormatFloat(math.Abs(v), 'f', 1, 64)
	case "%":
		if delta {
			return sign(v) + strconv.FormatFloat(math.Abs(v), 'f', 2, 64)
		}
		return strconv.FormatFloat(v, 'f', 2, 64)
	case "":
		switch key {
		case "price":
			return strconv.FormatFloat(v, 'f', 2, 64)
		case "weight":
			return strconv.FormatFloat(v, 'g', 4, 64)
		}
		if v == math.Trunc(v) && math.Abs(v) < 1e15 {
			return strconv.FormatFloat(v, 'f', 0, 64)
		}
		return strconv.FormatFloat(v, 'g', 4, 64)
	}
	return SI(v, f.Unit)
}

func sign(v float64) string {
	switch {
	case v < 0:
		return "−"
	case v > 0:
		return "+"
	}
	return ""
}

// SI prints v with an SI prefix and unit, three significant digits
// ("872 mW", "1.50 W", "0 W"); "–" for a value that is not finite.
func SI(v float64, unit string) string {
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return Dash
	}
	if v == 0 {
		return "0 " + unit
	}
	const prefixes = "afpnµm kMGTPE"
	a := math.Abs(v)
	e := min(max(int(math.Floor(math.Log10(a)/3)), -6), 6)
	m := v / math.Pow(1000, float64(e))
	// Rounding may carry into the next prefix (999.6 → 1000).
	if math.Abs(m) >= 999.5 && e < 6 {
		e++
		m = v / math.Pow(1000, float64(e))
	}
	p := strings.TrimSpace(string([]rune(prefixes)[e+6]))
	digits := 2
	switch am := math.Abs(m); {
	case am >= 100:
		digits = 0
	case am >= 10:
		digits = 1
	}
	return strconv.FormatFloat(m, 'f', digits, 64) + " " + p + unit
}

// Plural writes n with the singular or plural noun: "1 part", "3 parts".
func Plural(n int, one, many string) string {
	if n == 1 {
		return "1 " + one
	}
	return strconv.Itoa(n) + " " + many
}
