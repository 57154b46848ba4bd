package devices

import (
	"fmt"
	"math"
	"slices"
	"strings"

	q "swrank/devices/quantity"
)

// eossSlack is the relative tolerance of E_oss ≤ ½·Q_oss·V, for datasheet
// figures rounded to two or three digits.
const eossSlack = 0.02

// Validate checks one part, whether loaded or built in code, and returns
// its problems (nil when it has none). Every problem it returns is fatal:
// the models would compute nonsense from such a part. The problems name the
// part and the column; Read and Check add the file, line and column index.
func Validate(p *Part) []Problem {
	v := validator{p: p}
	v.run()
	return v.probs
}

// validator collects the problems of one part. bad holds the columns whose
// cells did not parse: checks that involve them are skipped, so that one
// wrong cell gives one problem.
type validator struct {
	p      *Part
	bad    map[string]bool
	parsed bool // the values came from the parser, which refuses NaN and Inf
	probs  []Problem
	// For a part read from a file: its row and the file column of each
	// schema column (1-based, 0 when absent), so that messages can quote
	// the cell as written.
	rec     []string
	fileCol []int
}

func (v *validator) ok(fields ...string) bool {
	if v.bad == nil {
		return true
	}
	for _, f := range fields {
		if v.bad[f] {
			return false
		}
	}
	return true
}

func (v *validator) add(field string, kind error, format string, args ...any) {
	v.probs = append(v.probs, Problem{
		Field: field, Part: v.p.Name, Fatal: true,
		Err: &valueError{msg: fmt.Sprintf(format, args...), kind: kind},
	})
}

// fmtq prints a quantity with four significant digits for messages.
func fmtq[Q q.Quantity](x Q) string { return q.Format(x, 4) }

// positive checks a required quantity that must be > 0.
func positive[Q q.Quantity](v *validator, field string, x Q) {
	if v.ok(field) && !(x > 0) {
		v.add(field, ErrNonPhysical, "%s: must be positive", fmtq(x))
	}
}

// optPositive checks an optional quantity that must be > 0 when given.
func optPositive[Q q.Quantity](v *validator, field string, x q.Opt[Q]) {
	if x.OK {
		positive(v, field, x.V)
	}
}

// optNonNegative checks an optional quantity that must be ≥ 0 when given.
func optNonNegative[Q q.Quantity](v *validator, field string, x q.Opt[Q]) {
	if x.OK && v.ok(field) && x.V < 0 {
		v.add(field, ErrNonPhysical, "%s: must not be negative", fmtq(x.V))
	}
}

// needs checks that a value's test condition is given.
func (v *validator) needs(field string, given bool, cond string, condGiven bool) {
	if given && !condGiven && v.ok(field, cond) {
		v.add(cond, ErrMissingValue, "needed by %s (its test condition)", field)
	}
}

func (v *validator) run() {
	p := v.p
	if !v.parsed {
		v.finite()
	}
	if len(v.probs) > 0 {
		return // NaN or Inf in a part built in code: nothing else is meaningful
	}
	if strings.TrimSpace(p.Name) == "" && v.ok("part") {
		v.add("part", ErrMissingValue, "empty part name")
	}

	// Signs and ranges of single values.
	positive(v, "vds_max", p.VdsMax)
	positive(v, "id_max", p.IdMax)
	positive(v, "vgs_max", p.VgsMax)
	positive(v, "vgs_th", p.VgsTh)
	positive(v, "rds_on", p.RdsOn)
	positive(v, "rds_on_vgs", p.RdsOnVgs)
	positive(v, "qg", p.Qg)
	positive(v, "qg_vgs", p.QgVgs)
	optPositive(v, "id_pulse", p.IdPulse)
	optPositive(v, "rth_ja", p.RthJA)
	optPositive(v, "rth_jc", p.RthJC)
	optPositive(v, "vgs_th_max", p.VgsThMax)
	optPositive(v, "rds_on_max", p.RdsOnMax)
	optPositive(v, "rds_on2", p.RdsOn2)
	optPositive(v, "rds_on2_vgs", p.RdsOn2Vgs)
	optPositive(v, "rds_on_hot", p.RdsHot)
	optPositive(v, "rds_dyn_vds", p.RdsDynVds)
	optPositive(v, "qg2", p.Qg2)
	optPositive(v, "qg2_vgs", p.Qg2Vgs)
	optPositive(v, "rds_on_id", p.RdsOnId)
	optPositive(v, "vgs_th_id", p.VgsThId)
	optPositive(v, "qg_vds", p.QgVds)
	optPositive(v, "qg_id", p.QgId)
	optPositive(v, "qg_max", p.QgMax)
	optPositive(v, "qgs", p.Qgs)
	optPositive(v, "qgd", p.Qgd)
	optPositive(v, "qg_th", p.QgTh)
	optPositive(v, "v_plateau", p.VPlateau)
	optPositive(v, "gfs", p.Gfs)
	optPositive(v, "gfs_id", p.GfsId)
	optNonNegative(v, "rg_int", p.RgInt)
	optPositive(v, "ciss", p.Ciss)
	optPositive(v, "coss", p.Coss)
	optPositive(v, "crss", p.Crss)
	optPositive(v, "cap_vds", p.CapVds)
	optPositive(v, "coss2", p.Coss2)
	optPositive(v, "crss2", p.Crss2)
	optPositive(v, "cap2_vds", p.Cap2Vds)
	optPositive(v, "trr", p.Trr)
	optPositive(v, "irrm", p.Irrm)
	optPositive(v, "qoss", p.Qoss)
	optPositive(v, "eoss", p.Eoss)
	optPositive(v, "oss_vds", p.OssVds)
	optNonNegative(v, "eoss_loss", p.EossLoss)
	optPositive(v, "eoss_loss_vds", p.EossLossVds)
	optPositive(v, "tr", p.Tr)
	optPositive(v, "tf", p.Tf)
	optPositive(v, "td_on", p.TdOn)
	optPositive(v, "td_off", p.TdOff)
	optPositive(v, "tsw_vdd", p.TswVdd)
	optPositive(v, "tsw_id", p.TswId)
	optPositive(v, "tsw_vgs", p.TswVgs)
	optNonNegative(v, "tsw_rg", p.TswRg)
	optNonNegative(v, "tsw_rgen", p.TswRgen)
	optPositive(v, "vsd", p.Vsd)
	optPositive(v, "vsd_if", p.VsdIf)
	optNonNegative(v, "qrr", p.Qrr)
	optPositive(v, "qrr_if", p.QrrIf)
	optPositive(v, "qrr_didt", p.QrrDidt)
	optPositive(v, "qrr_vr", p.QrrVr)
	optNonNegative(v, "qrr_hot", p.QrrHot)
	optPositive(v, "vgs_th_hot", p.VgsThHot)
	optPositive(v, "vsd_hot", p.VsdHot)
	optNonNegative(v, "l_cs", p.Lcs)
	optNonNegative(v, "l_loop", p.Lloop)
	if p.VgsMin.OK && v.ok("vgs_min") && p.VgsMin.V > 0 {
		v.add("vgs_min", ErrNonPhysical, "%s: the lowest gate voltage must be 0 V or negative", fmtq(p.VgsMin.V))
	}
	if p.RdsDyn.OK && v.ok("rds_dyn") && p.RdsDyn.V < 1 {
		v.add("rds_dyn", ErrNonPhysical, "%s: the dynamic on-resistance factor must be at least 1", fmtq(p.RdsDyn.V))
	}
	// Magnitudes: each value within its column's plausible range (the
	// table in ranges.go), temperatures included.
	v.ranges()
	if len(v.probs) > 0 {
		return // relations between values assume the signs and magnitudes are right
	}

	// Ratings: a pulse may carry more current than the continuous rating,
	// never less.
	if p.IdPulse.OK && v.ok("id_pulse", "id_max") && p.IdPulse.V < p.IdMax {
		v.add("id_pulse", ErrInconsistent, "%s: below the continuous id_max (%s)", fmtq(p.IdPulse.V), fmtq(p.IdMax))
	}

	// Gate voltages.
	if v.ok("vgs_th", "vgs_max") && p.VgsTh >= p.VgsMax {
		v.add("vgs_th", ErrInconsistent, "%s: must be below vgs_max (%s)", fmtq(p.VgsTh), fmtq(p.VgsMax))
	}
	if v.ok("rds_on_vgs", "vgs_th") && p.RdsOnVgs <= p.VgsTh {
		v.add("rds_on_vgs", ErrInconsistent, "%s: must be above vgs_th (%s)", fmtq(p.RdsOnVgs), fmtq(p.VgsTh))
	} else if v.ok("rds_on_vgs", "vgs_max") && p.RdsOnVgs > p.VgsMax {
		v.add("rds_on_vgs", ErrInconsistent, "%s: must not exceed vgs_max (%s)", fmtq(p.RdsOnVgs), fmtq(p.VgsMax))
	}
	if v.ok("qg_vgs", "vgs_th") && p.QgVgs <= p.VgsTh {
		v.add("qg_vgs", ErrInconsistent, "%s: must be above vgs_th (%s)", fmtq(p.QgVgs), fmtq(p.VgsTh))
	} else if v.ok("qg_vgs", "vgs_max") && p.QgVgs > p.VgsMax {
		v.add("qg_vgs", ErrInconsistent, "%s: must not exceed vgs_max (%s)", fmtq(p.QgVgs), fmtq(p.VgsMax))
	}
	if p.VgsThMax.OK && v.ok("vgs_th_max", "vgs_th") && p.VgsThMax.V < p.VgsTh {
		v.add("vgs_th_max", ErrInconsistent, "%s: below the typical vgs_th (%s)", fmtq(p.VgsThMax.V), fmtq(p.VgsTh))
	}

	// On-resistance.
	if p.RdsOnMax.OK && v.ok("rds_on_max", "rds_on") && p.RdsOnMax.V < p.RdsOn {
		v.add("rds_on_max", ErrInconsistent, "%s: below the typical rds_on (%s)", fmtq(p.RdsOnMax.V), fmtq(p.RdsOn))
	}
	v.needs("rds_on2", p.RdsOn2.OK, "rds_on2_vgs", p.RdsOn2Vgs.OK)
	if p.RdsOn2.OK && p.RdsOn2Vgs.OK && v.ok("rds_on2", "rds_on2_vgs", "rds_on", "rds_on_vgs", "vgs_th", "vgs_max") {
		g1, g2 := p.RdsOnVgs, p.RdsOn2Vgs.V
		switch {
		case g2 <= p.VgsTh:
			v.add("rds_on2_vgs", ErrInconsistent, "%s: must be above vgs_th (%s)", fmtq(g2), fmtq(p.VgsTh))
		case g2 > p.VgsMax:
			v.add("rds_on2_vgs", ErrInconsistent, "%s: must not exceed vgs_max (%s)", fmtq(g2), fmtq(p.VgsMax))
		case g2 > g1 && p.RdsOn2.V > p.RdsOn, g2 < g1 && p.RdsOn2.V < p.RdsOn:
			v.add("rds_on2", ErrInconsistent, "%s at %s against rds_on %s at %s: a higher gate voltage must give a lower or equal on-resistance",
				fmtq(p.RdsOn2.V), fmtq(g2), fmtq(p.RdsOn), fmtq(g1))
		case g2 == g1 && p.RdsOn2.V != p.RdsOn:
			v.add("rds_on2_vgs", ErrInconsistent, "%s: same gate voltage as rds_on_vgs with a different on-resistance", fmtq(g2))
		}
	}
	v.needs("rds_on_hot", p.RdsHot.OK, "rds_on_hot_tj", p.RdsHotTj.OK)
	if p.RdsHot.OK && p.RdsHotTj.OK && v.ok("rds_on_hot", "rds_on_hot_tj", "rds_on", "rds_on_tj") {
		t0 := p.RdsOnTj.Or(25)
		if p.RdsHotTj.V > t0 && p.RdsHot.V < p.RdsOn {
			v.add("rds_on_hot", ErrInconsistent, "%s at %s is below rds_on %s at %s: the on-resistance must rise with temperature",
				fmtq(p.RdsHot.V), fmtq(p.RdsHotTj.V), fmtq(p.RdsOn), fmtq(t0))
		}
	}
	if strings.TrimSpace(p.RdsCurve) != "" && v.ok("rds_on_curve") {
		var pts [maxCurvePoints]CurvePoint
		if _, err := scanCurve(p.RdsCurve, &pts); err != nil {
			v.probs = append(v.probs, Problem{Field: "rds_on_curve", Part: p.Name, Fatal: true, Err: err})
		}
	}

	v.checkSpice()
	v.checkCVCurves()

	// Gate charge.
	if p.QgMax.OK && v.ok("qg_max", "qg") && p.QgMax.V < p.Qg {
		v.add("qg_max", ErrInconsistent, "%s: below the typical qg (%s)", fmtq(p.QgMax.V), fmtq(p.Qg))
	}
	// The charges to threshold, to the plateau and across it are parts of
	// the total at the same qg_vgs: none exceeds it, nor does qgs + qgd.
	if p.Qgd.OK && v.ok("qgd", "qg") && p.Qgd.V > p.Qg {
		v.add("qgd", ErrInconsistent, "%s: exceeds qg (%s)", fmtq(p.Qgd.V), fmtq(p.Qg))
	} else if p.Qgs.OK && v.ok("qgs", "qg") && p.Qgs.V > p.Qg {
		v.add("qgs", ErrInconsistent, "%s: exceeds qg (%s)", fmtq(p.Qgs.V), fmtq(p.Qg))
	} else if p.Qgs.OK && p.Qgd.OK && v.ok("qgs", "qgd", "qg") && p.Qgs.V+p.Qgd.V > p.Qg {
		v.add("qgs", ErrInconsistent, "%s: qgs + qgd (%s) exceeds qg (%s)", fmtq(p.Qgs.V), fmtq(p.Qgs.V+p.Qgd.V), fmtq(p.Qg))
	}
	if p.QgTh.OK && p.Qgs.OK && v.ok("qg_th", "qgs") && p.QgTh.V > p.Qgs.V {
		v.add("qg_th", ErrInconsistent, "%s: exceeds qgs (%s)", fmtq(p.QgTh.V), fmtq(p.Qgs.V))
	} else if p.QgTh.OK && !p.Qgs.OK && v.ok("qg_th", "qgs", "qg") && p.QgTh.V > p.Qg {
		v.add("qg_th", ErrInconsistent, "%s: exceeds qg (%s)", fmtq(p.QgTh.V), fmtq(p.Qg))
	}
	if p.VPlateau.OK && v.ok("v_plateau", "vgs_th", "qg_vgs") && (p.VPlateau.V <= p.VgsTh || p.VPlateau.V >= p.QgVgs) {
		v.add("v_plateau", ErrInconsistent, "%s: must lie between vgs_th (%s) and qg_vgs (%s)",
			fmtq(p.VPlateau.V), fmtq(p.VgsTh), fmtq(p.QgVgs))
	}
	v.checkQg2()
	v.checkTestCurrents()

	// Capacitances, output charge and energy.
	if !p.CapVds.OK && v.ok("cap_vds") {
		var by []string
		for _, c := range []struct {
			name  string
			given bool
		}{{"ciss", p.Ciss.OK}, {"coss", p.Coss.OK}, {"crss", p.Crss.OK}} {
			if c.given && v.ok(c.name) {
				by = append(by, c.name)
			}
		}
		if len(by) > 0 {
			v.add("cap_vds", ErrMissingValue, "needed by %s (its test condition)", strings.Join(by, ", "))
		}
	}
	v.needs("coss2", p.Coss2.OK, "cap2_vds", p.Cap2Vds.OK)
	v.needs("crss2", p.Crss2.OK, "cap2_vds", p.Cap2Vds.OK)
	if p.Cap2Vds.OK && p.CapVds.OK && v.ok("cap2_vds", "cap_vds") && p.Cap2Vds.V == p.CapVds.V {
		v.add("cap2_vds", ErrInconsistent, "%s: the same voltage as cap_vds; the second point must be at another voltage", fmtq(p.Cap2Vds.V))
	}
	if p.Crss2.OK && !p.Crss.OK && v.ok("crss2", "crss") {
		v.add("crss", ErrMissingValue, "needed by crss2 (the second point of the same curve)")
	}
	if p.Coss2.OK && !(p.Coss.OK || p.Qoss.OK || p.Eoss.OK) && v.ok("coss2", "coss", "qoss", "eoss") {
		v.add("coss", ErrMissingValue, "needed by coss2 (the second point of the same curve)")
	}
	if p.Crss2.OK && p.Coss2.OK && v.ok("crss2", "coss2") && p.Crss2.V > p.Coss2.V {
		v.add("crss2", ErrInconsistent, "%s: exceeds coss2 (%s)", fmtq(p.Crss2.V), fmtq(p.Coss2.V))
	}
	if p.Crss.OK && p.Coss.OK && v.ok("crss", "coss") && p.Crss.V > p.Coss.V {
		v.add("crss", ErrInconsistent, "%s: exceeds coss (%s)", fmtq(p.Crss.V), fmtq(p.Coss.V))
	} else if p.Crss.OK && p.Ciss.OK && v.ok("crss", "ciss") && p.Crss.V > p.Ciss.V {
		v.add("crss", ErrInconsistent, "%s: exceeds ciss (%s)", fmtq(p.Crss.V), fmtq(p.Ciss.V))
	}
	v.needs("qoss", p.Qoss.OK, "oss_vds", p.OssVds.OK)
	if !p.Qoss.OK || p.OssVds.OK { // report a missing oss_vds once
		v.needs("eoss", p.Eoss.OK, "oss_vds", p.OssVds.OK)
	}
	// Q_oss(V) = ∫₀^V C(v) dv and E_oss(V) = ∫₀^V v·C(v) dv (IEC 60747-8
	// definitions of output charge and energy stored in the output
	// capacitance). A FET's C(v) does not rise with v, so by Chebyshev's
	// integral inequality (v increasing, C non-increasing)
	// ∫v·C dv ≤ (1/V)·∫v dv·∫C dv = ½·V·Q_oss, with equality for a
	// constant capacitance.
	if p.Qoss.OK && p.Eoss.OK && p.OssVds.OK && v.ok("qoss", "eoss", "oss_vds") {
		bound := 0.5 * float64(p.Qoss.V) * float64(p.OssVds.V)
		if float64(p.Eoss.V) > bound*(1+eossSlack) {
			v.add("eoss", ErrInconsistent, "%s: exceeds ½·qoss·oss_vds (%s); a falling Coss(V) gives E_oss ≤ ½·Q_oss·V",
				fmtq(p.Eoss.V), fmtq(q.Energy(bound)))
		}
	}
	v.needs("eoss_loss", p.EossLoss.OK, "eoss_loss_vds", p.EossLossVds.OK)
	v.needs("qrr_hot", p.QrrHot.OK, "qrr_hot_tj", p.QrrHotTj.OK)
	v.needs("gfs", p.Gfs.OK, "gfs_id", p.GfsId.OK)
	v.needs("vgs_th_hot", p.VgsThHot.OK, "vgs_th_hot_tj", p.VgsThHotTj.OK)
	v.needs("vsd_hot", p.VsdHot.OK, "vsd_hot_tj", p.VsdHotTj.OK)
	// Both fall with temperature in every technology swrank models
	// (common practice; Baliga 2008 for the threshold's negative tempco).
	if p.VgsThHot.OK && p.VgsThHotTj.OK && p.VgsThHotTj.V > 25 && v.ok("vgs_th_hot", "vgs_th") && p.VgsThHot.V > p.VgsTh {
		v.add("vgs_th_hot", ErrNonPhysical, "%s: above vgs_th (%s); the threshold falls as the junction heats", fmtq(p.VgsThHot.V), fmtq(p.VgsTh))
	}
	if p.VsdHot.OK && p.Vsd.OK && p.VsdHotTj.OK && p.VsdHotTj.V > 25 && v.ok("vsd_hot", "vsd") && p.VsdHot.V > p.Vsd.V {
		v.add("vsd_hot", ErrNonPhysical, "%s: above vsd (%s); a diode's drop falls as the junction heats", fmtq(p.VsdHot.V), fmtq(p.Vsd.V))
	}

	// Data the models need.
	plateau := p.VPlateau.OK || p.Gfs.OK && p.GfsId.OK
	if !(p.Qgs.OK && p.Qgd.OK && plateau) && !(p.Tr.OK && p.Tf.OK) && v.ok("qgs", "qgd", "v_plateau", "tr", "tf") {
		field := "qgs"
		switch {
		case !p.Qgs.OK:
		case !p.Qgd.OK:
			field = "qgd"
		default:
			field = "v_plateau"
		}
		v.add(field, ErrMissingValue, "no switching data: give qgs, qgd and v_plateau (or gfs with gfs_id), or tr and tf")
	}
	if !(p.Coss.OK && p.CapVds.OK) && !(p.Qoss.OK && p.OssVds.OK) && v.ok("coss", "cap_vds", "qoss", "oss_vds") {
		v.add("coss", ErrMissingValue, "no output-capacitance data: give coss with cap_vds, or qoss with oss_vds")
	}
}

// finite reports NaN and infinite values, which only parts built in code
// can hold (the parser refuses them).
func (v *validator) finite() {
	for i := range partSchema.cols {
		c := &partSchema.cols[i]
		if (c.kind == cellQty || c.kind == cellOpt) && c.given(v.p) {
			if x := c.value(v.p); math.IsNaN(x) || math.IsInf(x, 0) {
				v.probs = append(v.probs, Problem{Field: c.name, Part: v.p.Name, Fatal: true,
					Err: fmt.Errorf("%w", q.ErrNotFinite)})
			}
		}
	}
}

// CurvePoint is one point of a normalised on-resistance curve.
type CurvePoint struct {
	Tj     q.Temperature // junction temperature, °C
	Factor q.Ratio       // Rds(on)(Tj) / Rds(on) at rds_on_tj, > 0
}

// ParseCurve reads an rds_on_curve cell: 2 to 8 points "T:factor" separated
// by spaces, commas or semicolons, e.g. "25:1 100:1.45 150:1.8", with
// temperatures (°C, optionally written "100°C") strictly increasing and
// factors positive plain numbers. Errors wrap ErrCurve.
func ParseCurve(s string) ([]CurvePoint, error) {
	var pts [maxCurvePoints]CurvePoint
	n, err := scanCurve(s, &pts)
	if err != nil {
		return nil, err
	}
	return slices.Clone(pts[:n]), nil
}

const maxCurvePoints = 8

// Parsers of the curve's numbers; like partSchema, built once and never
// changed.
var (
	curveTemp  = q.NewParser(q.Temperature(0).Kind())
	curveRatio = q.NewParser(q.Ratio(0).Kind())
)

func curveSep(c byte) bool { return c == ' ' || c == '\t' || c == ',' || c == ';' }

// scanCurve parses s into pts without allocating; it returns the number of
// points.
func scanCurve(s string, pts *[maxCurvePoints]CurvePoint) (int, error) {
	n := 0
	for i := 0; i < len(s); {
		if curveSep(s[i]) {
			i++
			continue
		}
		j := i
		for j < len(s) && !curveSep(s[j]) {
			j++
		}
		pt := s[i:j]
		i = j
		if n == maxCurvePoints {
			return 0, curveError(s, "want 2 to 8 points written T:factor")
		}
		a, b, ok := strings.Cut(pt, ":")
		tv, err1 := curveTemp.Parse(a)
		rv, err2 := curveRatio.Parse(b)
		t, r := q.Temperature(tv), q.Ratio(rv)
		if !ok || err1 != nil || err2 != nil || strings.IndexByte(b, '%') >= 0 || !(r > 0) {
			return 0, curveError(s, fmt.Sprintf("point %q is not T:factor with a factor > 0", pt))
		}
		if n > 0 && t <= pts[n-1].Tj {
			return 0, curveError(s, "temperatures must increase")
		}
		pts[n] = CurvePoint{Tj: t, Factor: r}
		n++
	}
	if n < 2 {
		return 0, curveError(s, "want 2 to 8 points written T:factor")
	}
	return n, nil
}

func curveError(s, why string) error {
	return &valueError{msg: fmt.Sprintf("%q: %v: %s", s, ErrCurve, why), kind: ErrCurve}
}

// Curve parses the part's rds_on_curve; it returns nil, nil when blank.
func (p *Part) Curve() ([]CurvePoint, error) {
	if strings.TrimSpace(p.RdsCurve) == "" {
		return nil, nil
	}
	return ParseCurve(p.RdsCurve)
}
