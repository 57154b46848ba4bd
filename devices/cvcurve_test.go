package devices

import (
	"errors"
	"testing"
)

// Capacitance curves are read as "V:C" points with SI prefixes and
// optional units, written back in plain numbers, and scaled for paralleled
// devices; malformed cells are errors naming the rule they break.
func TestParseCVCurve(t *testing.T) {
	for _, tt := range []struct {
		in   string
		n    int
		ok   bool
		c0   float64
		v1   float64
		scal string
	}{
		{"1:820p 5:300p 15:120p", 3, true, 820e-12, 5, "1:1.64e-09 5:6e-10 15:2.4e-10"},
		{"1V:820pF, 5 V:300pF", 0, false, 0, 0, ""}, // a space inside a point splits it
		{"1V:820pF;5V:300pF", 2, true, 820e-12, 5, "1:1.64e-09 5:6e-10"},
		{"5:300p 1:820p", 0, false, 0, 0, ""},
		{"1:820p", 0, false, 0, 0, ""},
		{"1:820p 5:0", 0, false, 0, 0, ""},
		{"1:820p 5:x", 0, false, 0, 0, ""},
		{"1:1p 2:1p 3:1p 4:1p 5:1p 6:1p 7:1p 8:1p 9:1p", 0, false, 0, 0, ""},
	} {
		pts, err := ParseCVCurve(tt.in)
		if (err == nil) != tt.ok {
			t.Errorf("%q: error %v, want ok %v", tt.in, err, tt.ok)
			continue
		}
		if !tt.ok {
			if !errors.Is(err, ErrCVCurve) {
				t.Errorf("%q: %v does not wrap ErrCVCurve", tt.in, err)
			}
			continue
		}
		if len(pts) != tt.n || float64(pts[0].C) != tt.c0 || float64(pts[1].V) != tt.v1 {
			t.Errorf("%q: %+v", tt.in, pts)
		}
		if s, err := ScaleCVCurve(tt.in, 2); err != nil || s != tt.scal {
			t.Errorf("%q ×2: %q, %v; want %q", tt.in, s, err, tt.scal)
		}
	}
}
