package devices

import (
	"fmt"
	"slices"
	"strconv"
	"strings"

	q "swrank/devices/quantity"
)

// CVPoint is one point of a capacitance curve: the small-signal
// capacitance at a drain voltage with the gate at the source (the
// datasheet's capacitance test).
type CVPoint struct {
	V q.Voltage     // drain-source voltage, V; > 0
	C q.Capacitance // capacitance, F; > 0
}

// maxCVPoints is the most points a coss_curve or crss_curve cell takes.
const maxCVPoints = 8

// Parsers of the capacitance curves' numbers; like partSchema, built once
// and never changed.
var (
	cvVolt = q.NewParser(q.Voltage(0).Kind())
	cvCap  = q.NewParser(q.Capacitance(0).Kind())
)

// ParseCVCurve reads a coss_curve or crss_curve cell: 2 to 8 points
// "V:C" separated by spaces, commas or semicolons, e.g. "1:820p 5:300p
// 15:120p 30:80p", with voltages (V, optionally written "5V") strictly
// increasing and above 0, and capacitances (F, SI prefixes, optionally
// written "300pF") above 0. Errors wrap ErrCVCurve.
func ParseCVCurve(s string) ([]CVPoint, error) {
	var pts []CVPoint
	for f := range strings.FieldsFuncSeq(s, func(r rune) bool { return r < 128 && curveSep(byte(r)) }) {
		if len(pts) == maxCVPoints {
			return nil, cvCurveError(s, "want 2 to 8 points written V:C")
		}
		a, b, ok := strings.Cut(f, ":")
		v, err1 := cvVolt.Parse(a)
		c, err2 := cvCap.Parse(b)
		if !ok || err1 != nil || err2 != nil || !(v > 0) || !(c > 0) {
			return nil, cvCurveError(s, fmt.Sprintf("point %q is not V:C with a voltage and a capacitance > 0", f))
		}
		if n := len(pts); n > 0 && q.Voltage(v) <= pts[n-1].V {
			return nil, cvCurveError(s, "voltages must increase")
		}
		pts = append(pts, CVPoint{V: q.Voltage(v), C: q.Capacitance(c)})
	}
	if len(pts) < 2 {
		return nil, cvCurveError(s, "want 2 to 8 points written V:C")
	}
	return pts, nil
}

func cvCurveError(s, why string) error {
	return &valueError{msg: fmt.Sprintf("%q: %v: %s", s, ErrCVCurve, why), kind: ErrCVCurve}
}

// FormatCVCurve writes points as a coss_curve or crss_curve cell, plain
// numbers in volts and farads ("1:8.2e-10 5:3e-10").
func FormatCVCurve(pts []CVPoint) string {
	var b strings.Builder
	for i, p := range pts {
		if i > 0 {
			b.WriteByte(' ')
		}
		b.WriteString(strconv.FormatFloat(float64(p.V), 'g', 6, 64))
		b.WriteByte(':')
		b.WriteString(strconv.FormatFloat(float64(p.C), 'g', 6, 64))
	}
	return b.String()
}

// ScaleCVCurve is the curve s with every capacitance times k (k devices in
// parallel); a blank cell stays blank.
func ScaleCVCurve(s string, k float64) (string, error) {
	if strings.TrimSpace(s) == "" {
		return s, nil
	}
	pts, err := ParseCVCurve(s)
	if err != nil {
		return "", err
	}
	pts = slices.Clone(pts)
	for i := range pts {
		pts[i].C *= q.Capacitance(k)
	}
	return FormatCVCurve(pts), nil
}

// CossCurvePoints parses the part's coss_curve; nil, nil when blank.
func (p *Part) CossCurvePoints() ([]CVPoint, error) { return cvCurve(p.CossCurve) }

// CrssCurvePoints parses the part's crss_curve; nil, nil when blank.
func (p *Part) CrssCurvePoints() ([]CVPoint, error) { return cvCurve(p.CrssCurve) }

func cvCurve(s string) ([]CVPoint, error) {
	if strings.TrimSpace(s) == "" {
		return nil, nil
	}
	return ParseCVCurve(s)
}

// checkCVCurves adds a fatal problem for each malformed capacitance curve.
func (v *validator) checkCVCurves() {
	for _, c := range []struct{ name, cell string }{{"coss_curve", v.p.CossCurve}, {"crss_curve", v.p.CrssCurve}} {
		if strings.TrimSpace(c.cell) == "" || !v.ok(c.name) {
			continue
		}
		if _, err := ParseCVCurve(c.cell); err != nil {
			v.probs = append(v.probs, Problem{Field: c.name, Part: v.p.Name, Fatal: true, Err: err})
		}
	}
}
