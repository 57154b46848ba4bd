package report

import (
	"os"
	"strings"
	"testing"
)

// Tiny shares print as 0 against their row's total (TinyShare), unknown
// values as a dash, never NaN; deltas carry their sign.
func TestFormatCell(t *testing.T) {
	row := Record{{"total_w", Num(1.2)}}
	cases := []struct {
		name, key string
		cell      Cell
		row       Record
		want      string
	}{
		{"a share of a picowatt against 1.2 W", "coss_w", Num(158e-12), row, "0"},
		{"a share just above the threshold", "coss_w", Num(200e-6), row, "200 µW"},
		{"a plain share", "conduction_w", Num(0.411), row, "411 mW"},
		{"no total: printed as is", "coss_w", Num(158e-12), nil, "158 pW"},
		{"unknown", "tj_c", Unknown(), row, Dash},
		{"not a number is unknown", "total_w", Num(nan()), row, Dash},
		{"temperature", "tj_c", Num(63.04), row, "63.0"},
		{"a negative change", "total_delta_w", Num(-0.203), row, "−203 mW"},
		{"a rise in kelvin", "tj_delta_k", Num(8.24), row, "+8.2"},
		{"yes", "price_front", Bool(true), row, "yes"},
		{"a count", "estimated", Num(2), row, "2"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			if got := FormatCell(c.key, c.cell, c.row); got != c.want {
				t.Errorf("FormatCell(%s, %+v) = %q, want %q", c.key, c.cell, got, c.want)
			}
		})
	}
}

func nan() float64 {
	z := 0.0
	return z / z
}

// One and many: "1 part", never "1 parts".
func TestPlural(t *testing.T) {
	for _, c := range []struct {
		n    int
		want string
	}{{0, "0 parts"}, {1, "1 part"}, {2, "2 parts"}} {
		if got := Plural(c.n, "part", "parts"); got != c.want {
			t.Errorf("Plural(%d) = %q, want %q", c.n, got, c.want)
		}
	}
}

// SI prefixes with three digits, carried across a prefix when rounding
// reaches 1000.
func TestSI(t *testing.T) {
	for _, c := range []struct {
		v    float64
		want string
	}{{0.872, "872 mW"}, {1.5, "1.50 W"}, {0.9996, "1.00 W"}, {0, "0 W"}, {-0.0203, "-20.3 mW"}} {
		if got := SI(c.v, "W"); got != c.want {
			t.Errorf("SI(%g) = %q, want %q", c.v, got, c.want)
		}
	}
}

// Note numbers join their runs.
func TestRanges(t *testing.T) {
	for _, c := range []struct {
		in   []int
		want string
	}{{nil, ""}, {[]int{3}, "3"}, {[]int{1, 2, 3, 5}, "1-3,5"}, {[]int{4, 1, 2}, "1,2,4"}, {[]int{2, 2, 3}, "2,3"}} {
		if got := ranges(c.in); got != c.want {
			t.Errorf("ranges(%v) = %q, want %q", c.in, got, c.want)
		}
	}
}

// A mistyped column gets the closest field name; a family of fields
// matches its members.
func TestCheckColumns(t *testing.T) {
	cases := []struct {
		cols []string
		want string // "" for no error
	}{
		{[]string{"rank", "part", "total_w"}, ""},
		{[]string{"eff_pct_at_50", "conduction_delta_w"}, ""},
		{[]string{"totl_w"}, `did you mean "total_w"`},
		{[]string{"dead_time"}, `did you mean "dead_time_w"`},
		{[]string{"zzzzzzzz"}, `no column "zzzzzzzz"`},
	}
	for _, c := range cases {
		err := CheckColumns(c.cols)
		switch {
		case c.want == "" && err != nil:
			t.Errorf("%v: %v", c.cols, err)
		case c.want != "" && (err == nil || !strings.Contains(err.Error(), c.want)):
			t.Errorf("%v: error %v, want %q", c.cols, err, c.want)
		}
	}
}

// Every field name is listed in docs/output.md, with its unit, and the
// names that two commands once spelt two ways are spelt one way.
func TestOutputDocListsEveryField(t *testing.T) {
	doc, err := os.ReadFile("../../docs/output.md")
	if err != nil {
		t.Fatal(err)
	}
	for _, f := range append(Fields(), PointFields()...) {
		if !strings.Contains(string(doc), "`"+f.Key+"`") {
			t.Errorf("docs/output.md does not list %q", f.Key)
		}
	}
	for _, old := range []string{"deadtime_w", "output_cap_w", "gate_in_FET_w", "gate_rint_w", "gate_rext_w", "tj_degc"} {
		if _, ok := FieldOf(old); ok {
			t.Errorf("field %q is back", old)
		}
	}
}

// A profile point's name becomes a field of the family eff_pct_at_*.
func TestPointKey(t *testing.T) {
	for _, c := range []struct{ name, want string }{{"50 %", "eff_pct_at_50"}, {"light", "eff_pct_at_light"}, {"Full Load", "eff_pct_at_full_load"}} {
		if got := pointKey(c.name); got != c.want {
			t.Errorf("pointKey(%q) = %q, want %q", c.name, got, c.want)
		}
		if _, ok := FieldOf(pointKey(c.name)); !ok {
			t.Errorf("%s is not a field", pointKey(c.name))
		}
	}
}
