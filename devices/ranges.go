package devices

import (
	"fmt"
	"strconv"
	"strings"
	"unsafe"

	q "swrank/devices/quantity"
)

// plausible is the range of values a column can hold for a real switching
// transistor, in the column's coherent unit (°C for temperatures). A value
// outside it is almost always written in the wrong magnitude: a datasheet's
// display unit without its prefix ("5" for 5 mΩ), or the wrong prefix.
type plausible struct {
	col    string  // column name, a csv tag of Part
	lo, hi float64 // inclusive bounds
	zero   bool    // 0 is accepted as well (no recovery charge, no inductance, no resistance)
	// prefer is the prefix datasheets print the column in ("m" for mΩ, "n"
	// for nC); a suggestion tries it before m, µ, n and p.
	prefer string
	kilo   bool // a rating that may be meant in k (kV): "k" is tried last
}

// Units that datasheets print without a prefix: thermal resistance in K/W,
// and the slew rate of a recovery test in A/µs.
const (
	thermalSymbol = "K/W"
	slewUnit      = "A/µs"
)

// Voltage and current bounds shared by several columns (common practice).
const (
	vRating = 3.3e3 // highest drain-source rating of a discrete part or module, V
	vTestLo = 0.1   // lowest drain-side test voltage, V
	vGateLo = 0.5   // lowest gate drive at which a datasheet states a value, V
	vGateHi = 30    // highest gate drive, V
	iTestLo = 1e-3  // lowest test current, A
	iTestHi = 10e3  // highest test current, A
	tTestLo = -60   // coldest test temperature, °C (datasheets start at −55 °C)
	tTestHi = 250   // hottest test temperature, °C
)

// plausibleRanges is the one table of plausible ranges, one row per
// quantity column (TestPlausibleTable checks that every quantity column has
// one). The bounds are common practice, from memory, for discrete silicon,
// GaN and SiC transistors and small modules, widened so that only a value
// wrong by a large factor falls outside; docs/library.md lists them. The
// table is never changed.
var plausibleRanges = [...]plausible{
	// Ratings.
	{col: "vds_max", lo: 5, hi: vRating, kilo: true},
	{col: "id_max", lo: 10e-3, hi: 2e3},
	{col: "id_pulse", lo: 10e-3, hi: 10e3},
	{col: "vgs_max", lo: 1, hi: 50},
	{col: "vgs_min", lo: -50, hi: 0},
	{col: "tj_max", lo: 100, hi: 250},
	{col: "rth_ja", lo: 1, hi: 1000},
	{col: "rth_jc", lo: 0.01, hi: 200},

	// Threshold.
	{col: "vgs_th", lo: 0.1, hi: 10},
	{col: "vgs_th_max", lo: 0.1, hi: 10},
	{col: "vgs_th_hot", lo: 0.05, hi: 10},
	{col: "vgs_th_hot_tj", lo: tTestLo, hi: tTestHi},
	// Threshold test currents: 250 µA and 1 mA are usual, a few mA for
	// GaN and SiC, up to tens of mA for modules; from 1 µA.
	{col: "vgs_th_id", lo: 1e-6, hi: 1},

	// On-resistance: the typical value up to 20 Ω (small-signal parts);
	// maximum, hot and low-drive values up to 2.5 times that.
	{col: "rds_on", lo: 50e-6, hi: 20, prefer: "m"},
	{col: "rds_on_vgs", lo: vGateLo, hi: vGateHi},
	{col: "rds_on_tj", lo: tTestLo, hi: tTestHi},
	{col: "rds_on_max", lo: 50e-6, hi: 50, prefer: "m"},
	{col: "rds_on2", lo: 50e-6, hi: 50, prefer: "m"},
	{col: "rds_on2_vgs", lo: vGateLo, hi: vGateHi},
	{col: "rds_on_hot", lo: 50e-6, hi: 50, prefer: "m"},
	{col: "rds_on_hot_tj", lo: tTestLo, hi: tTestHi},
	{col: "rds_dyn", lo: 1, hi: 10},
	{col: "rds_dyn_vds", lo: 1, hi: vRating},
	{col: "rds_on_id", lo: iTestLo, hi: iTestHi},

	// Gate charge: the total from 0.1 nC; its parts (to threshold, to the
	// plateau, Miller) of a small GaN part from 10 pC.
	{col: "qg", lo: 0.1e-9, hi: 5e-6, prefer: "n"},
	{col: "qg_vgs", lo: vGateLo, hi: vGateHi},
	{col: "qg2", lo: 10e-12, hi: 5e-6, prefer: "n"},
	{col: "qg2_vgs", lo: vGateLo, hi: vGateHi},
	{col: "qg_vds", lo: vTestLo, hi: vRating},
	{col: "qg_id", lo: iTestLo, hi: iTestHi},
	{col: "qg_max", lo: 0.1e-9, hi: 5e-6, prefer: "n"},
	{col: "qgs", lo: 10e-12, hi: 5e-6, prefer: "n"},
	{col: "qgd", lo: 10e-12, hi: 5e-6, prefer: "n"},
	{col: "qg_th", lo: 10e-12, hi: 5e-6, prefer: "n"},
	{col: "v_plateau", lo: 0.2, hi: 20},
	{col: "gfs", lo: 1e-3, hi: 2e3}, // 1 mS (small-signal) to 2 kS
	{col: "gfs_id", lo: iTestLo, hi: iTestHi},
	{col: "rg_int", lo: 10e-3, hi: 200, zero: true},

	// Capacitances. Crss from 50 fF: high-voltage GaN parts reach 0.1 pF.
	{col: "ciss", lo: 0.5e-12, hi: 100e-9, prefer: "p"},
	{col: "coss", lo: 0.5e-12, hi: 100e-9, prefer: "p"},
	{col: "crss", lo: 50e-15, hi: 100e-9, prefer: "p"},
	{col: "cap_vds", lo: vTestLo, hi: vRating},
	{col: "coss2", lo: 0.5e-12, hi: 100e-9, prefer: "p"},
	{col: "crss2", lo: 50e-15, hi: 100e-9, prefer: "p"},
	{col: "cap2_vds", lo: vTestLo, hi: vRating},

	// Output charge and energy.
	{col: "qoss", lo: 10e-12, hi: 50e-6, prefer: "n"},
	{col: "eoss", lo: 10e-12, hi: 10e-3, prefer: "µ"},
	{col: "oss_vds", lo: vTestLo, hi: vRating},
	{col: "eoss_loss", lo: 1e-12, hi: 10e-3, zero: true, prefer: "n"},
	{col: "eoss_loss_vds", lo: vTestLo, hi: vRating},

	// Switching times: from 20 ps, the order of the transition of a small
	// GaN part driven with an ampere of gate current.
	{col: "tr", lo: 20e-12, hi: 5e-6, prefer: "n"},
	{col: "tf", lo: 20e-12, hi: 5e-6, prefer: "n"},
	// Delay times: from 100 ps (a small GaN part's delay is of the order
	// of a nanosecond) to 10 µs (a large high-voltage part's turn-off
	// delay through a large test resistor stays below a few µs).
	{col: "td_on", lo: 100e-12, hi: 10e-6, prefer: "n"},
	{col: "td_off", lo: 100e-12, hi: 10e-6, prefer: "n"},
	{col: "tsw_vdd", lo: vTestLo, hi: vRating},
	{col: "tsw_id", lo: iTestLo, hi: iTestHi},
	{col: "tsw_vgs", lo: vGateLo, hi: vGateHi},
	{col: "tsw_rg", lo: 10e-3, hi: 1e3, zero: true},
	{col: "tsw_rgen", lo: 10e-3, hi: 1e3, zero: true},

	// Body diode or reverse conduction (SiC and GaN up to a few volts).
	{col: "vsd", lo: 0.1, hi: 10},
	{col: "vsd_if", lo: iTestLo, hi: iTestHi},
	{col: "vsd_hot", lo: 0.05, hi: 10},
	{col: "vsd_hot_tj", lo: tTestLo, hi: tTestHi},
	{col: "qrr", lo: 10e-12, hi: 100e-6, zero: true, prefer: "n"},
	{col: "qrr_if", lo: iTestLo, hi: iTestHi},
	{col: "qrr_didt", lo: 1e6, hi: 1e10, prefer: "A/µs"}, // 1 A/µs to 10 kA/µs
	{col: "qrr_vr", lo: vTestLo, hi: vRating},
	{col: "qrr_tj", lo: tTestLo, hi: tTestHi},
	{col: "qrr_hot", lo: 10e-12, hi: 100e-6, zero: true, prefer: "n"},
	{col: "qrr_hot_tj", lo: tTestLo, hi: tTestHi},
	{col: "trr", lo: 1e-9, hi: 10e-6, prefer: "n"},
	{col: "irrm", lo: 10e-3, hi: 1e3},

	// Package parasitics.
	{col: "l_cs", lo: 10e-12, hi: 100e-9, zero: true, prefer: "n"},
	{col: "l_loop", lo: 10e-12, hi: 100e-9, zero: true, prefer: "n"},
}

// rangeCol is a column with a plausible range, as the check reads it.
type rangeCol struct {
	ci     int     // index in partSchema.cols
	offset uintptr // the field's offset in Part
	okOff  uintptr // cellOpt: offset of Opt.OK within the field
	opt    bool    // optional column: checked only when given
	r      *plausible
}

// buildRangeCols lists the columns of the table in Part's order, for
// partSchema (built once, never changed).
func buildRangeCols(s *schema) []rangeCol {
	var out []rangeCol
	for i := range s.cols {
		c := &s.cols[i]
		for k := range plausibleRanges {
			if r := &plausibleRanges[k]; r.col == c.name {
				out = append(out, rangeCol{ci: i, offset: c.offset, okOff: c.okOff, opt: c.kind == cellOpt, r: r})
			}
		}
	}
	return out
}

// ranges reports every given value outside its column's plausible range,
// skipping columns that did not parse or already have a problem. It reads
// the values in place and allocates only for a problem's message.
func (v *validator) ranges() {
	base := unsafe.Pointer(v.p)
	for i := range partSchema.ranged {
		rc := &partSchema.ranged[i]
		ptr := unsafe.Add(base, rc.offset)
		if rc.opt && !*(*bool)(unsafe.Add(ptr, rc.okOff)) {
			continue
		}
		x, r := *(*float64)(ptr), rc.r
		if (x >= r.lo && x <= r.hi) || (x == 0 && r.zero) {
			continue
		}
		c := &partSchema.cols[rc.ci]
		if !v.ok(c.name) || v.reported(c.name) {
			continue
		}
		v.probs = append(v.probs, Problem{Field: c.name, Part: v.p.Name, Fatal: true,
			Err: &valueError{msg: rangeMessage(r, c.qkind, x, v.cell(rc.ci)), kind: ErrImplausible}})
	}
	v.onDrop()
}

// onDropShare bounds the on-state drop at the continuous current rating,
// id_max·rds_on, as a share of the voltage rating vds_max. Common
// practice, from memory: about 0.2 % for GaN and low-voltage silicon, a
// few per cent for small-signal and high-voltage silicon. A quarter leaves
// a wide margin, while an on-resistance written in Ω where mΩ was meant
// lands far beyond it (5 Ω at 40 A would drop 200 V).
const onDropShare = 0.25

// onDrop reports an on-resistance that lies in its column's range but is
// of the wrong magnitude for the part itself: at the part's own current
// rating it would drop more than onDropShare of the voltage rating. A flat
// range cannot tell 5 Ω written for 5 mΩ from a small-signal part's 5 Ω;
// the ratings can. It reads the values in place and allocates only for a
// problem's message.
func (v *validator) onDrop() {
	p := v.p
	if !v.ok("id_max", "vds_max") || v.reported("id_max") || v.reported("vds_max") {
		return
	}
	limit, id := onDropShare*float64(p.VdsMax), float64(p.IdMax)
	for _, c := range [...]struct {
		name  string
		given bool
		r     q.Resistance
	}{{"rds_on", true, p.RdsOn}, {"rds_on_max", p.RdsOnMax.OK, p.RdsOnMax.V},
		{"rds_on2", p.RdsOn2.OK, p.RdsOn2.V}, {"rds_on_hot", p.RdsHot.OK, p.RdsHot.V}} {
		if !c.given || float64(c.r)*id <= limit || !v.ok(c.name) || v.reported(c.name) {
			continue
		}
		v.probs = append(v.probs, Problem{Field: c.name, Part: p.Name, Fatal: true,
			Err: &valueError{msg: v.onDropMessage(c.name, float64(c.r), id, limit), kind: ErrImplausible}})
	}
}

// onDropMessage says what was read, the drop it implies and the likely
// intent: "5 reads as 5 Ω; at id_max 40 A it would drop 200 V, more than a
// quarter of vds_max 30 V; for 5 mΩ write 5m".
func (v *validator) onDropMessage(name string, x, id, limit float64) string {
	ci := partSchema.byName[name]
	var r *plausible
	for i := range partSchema.ranged {
		if partSchema.ranged[i].ci == ci {
			r = partSchema.ranged[i].r
		}
	}
	k, ka, kv := q.Resistance(0).Kind(), q.Current(0).Kind(), q.Voltage(0).Kind()
	text := v.cell(ci)
	var b strings.Builder
	head, _ := readAs(x, k, text)
	fmt.Fprintf(&b, "%s; at id_max %s it would drop %s, more than a quarter of vds_max %s",
		head, fmtShort(id, ka), fmtShort(x*id, kv), fmtShort(limit/onDropShare, kv))
	suggest(&b, r, k, x, text, func(y float64) bool { return y*id <= limit })
	return b.String()
}

// reported reports whether the part already has a problem in column name.
func (v *validator) reported(name string) bool {
	for i := range v.probs {
		if v.probs[i].Field == name {
			return true
		}
	}
	return false
}

// cell returns the text of column ci as written in the file, trimmed, or ""
// for a part built in code.
func (v *validator) cell(ci int) string {
	if v.fileCol == nil || v.fileCol[ci] == 0 || v.fileCol[ci] > len(v.rec) {
		return ""
	}
	return strings.TrimSpace(v.rec[v.fileCol[ci]-1])
}

// rangeMessage says what value was read, the plausible range, and the
// likely intent: "5 reads as 5 Ω, outside 50 µΩ–20 Ω; for 5 mΩ write 5m".
// For a part built in code (text "") it names the value and asks.
func rangeMessage(r *plausible, k q.Kind, x float64, text string) string {
	var b strings.Builder
	head, quoted := readAs(x, k, text)
	b.WriteString(head)
	if quoted {
		b.WriteString(", outside ")
	} else {
		b.WriteString(": outside ")
	}
	b.WriteString(rangeText(r, k))
	suggest(&b, r, k, x, text, nil)
	return b.String()
}

// readAs names a value: "5 reads as 5 Ω" for a cell as written (quoted
// true), or the value alone ("5 Ω") when the cell says just that or the
// part was built in code.
func readAs(x float64, k q.Kind, text string) (s string, quoted bool) {
	read := fmtShort(x, k)
	if text == "" || text == read {
		return read, false
	}
	return text + " reads as " + read, true
}

// suggest appends the likely intent of a value outside its range: the
// first candidate reading of the number as written that lands in the range
// (and satisfies fits, when given). It appends nothing when none does, and
// for a number written with an exponent, whose magnitude was chosen.
func suggest(b *strings.Builder, r *plausible, k q.Kind, x float64, text string, fits func(float64) bool) {
	num := leadingNumber(text)
	if text == "" {
		num = strconv.FormatFloat(x, 'g', -1, 64)
	}
	m, err := strconv.ParseFloat(num, 64)
	if num == "" || err != nil || strings.ContainsAny(num, "eE") {
		return
	}
	for _, c := range candidates(r, k) {
		if y := m * c.mul; y >= r.lo && y <= r.hi && (fits == nil || fits(y)) {
			if text == "" {
				fmt.Fprintf(b, "; was %s %s meant?", num, c.unit)
			} else {
				fmt.Fprintf(b, "; for %s %s write %s%s", num, c.unit, num, c.write)
			}
			return
		}
	}
}

// candidate is one way a written number may have been meant.
type candidate struct {
	mul   float64 // multiplier of the number as written
	unit  string  // the meant unit, as printed: "mΩ"
	write string  // what to write after the number: "m"
}

// candidates lists the readings a suggestion tries, in order: the column's
// display prefix, then m, µ, n and p, then no prefix (for a cell written
// with the wrong one), then k for a rating. A temperature or a ratio takes
// no prefix and gets no suggestion; a slew rate is tried in A/µs.
func candidates(r *plausible, k q.Kind) []candidate {
	if k.NoPrefix {
		return nil
	}
	if k.Scaled != nil {
		return []candidate{{1e6, slewUnit, " " + slewUnit}}
	}
	all := [...]struct {
		sym string
		mul float64
	}{{"m", 1e-3}, {"µ", 1e-6}, {"n", 1e-9}, {"p", 1e-12}, {"", 1}, {"k", 1e3}}
	out := make([]candidate, 0, len(all))
	for _, a := range all {
		if a.sym == r.prefer {
			out = append(out, candidate{a.mul, a.sym + k.Symbol, a.sym})
		}
	}
	for _, a := range all {
		if a.sym != r.prefer && (a.sym != "k" || r.kilo) {
			out = append(out, candidate{a.mul, a.sym + k.Symbol, a.sym})
		}
	}
	return out
}

// leadingNumber returns the number at the start of a cell: sign, digits,
// point and exponent ("4.5" of "4.5 mOhm", "1e-9" of "1e-9F").
func leadingNumber(s string) string {
	i := 0
	if i < len(s) && (s[i] == '+' || s[i] == '-') {
		i++
	}
	digits := 0
	for ; i < len(s) && (s[i] >= '0' && s[i] <= '9' || s[i] == '.'); i++ {
		if s[i] != '.' {
			digits++
		}
	}
	if digits == 0 {
		return ""
	}
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
	return s[:i]
}

// rangeText prints a plausible range: "50 µΩ–20 Ω", "100–250 °C",
// "0.01–200 K/W", "-50 V to 0 V".
func rangeText(r *plausible, k q.Kind) string {
	lo, hi := fmtShort(r.lo, k), fmtShort(r.hi, k)
	if r.lo < 0 {
		return lo + " to " + hi
	}
	if k.Symbol == thermalSymbol || k.Scaled != nil || k.NoPrefix {
		lo, _, _ = strings.Cut(lo, " ") // no prefix: the unit once
	}
	return lo + "–" + hi
}

// fmtShort prints a value with an SI prefix and at most four significant
// digits, without trailing zeros: "5 Ω", "50 µΩ", "3.3 kV", "250 °C". A
// thermal resistance and a slew rate take no prefix ("0.01 K/W",
// "100 A/µs"), as datasheets print them.
func fmtShort(x float64, k q.Kind) string {
	switch {
	case k.Symbol == thermalSymbol:
		return plain(x) + " " + k.Symbol
	case k.Scaled != nil:
		return plain(x/1e6) + " " + slewUnit
	}
	s := q.FormatFloat(x, 4, k)
	num, unit, _ := strings.Cut(s, " ")
	if strings.Contains(num, ".") {
		num = strings.TrimRight(strings.TrimRight(num, "0"), ".")
	}
	if unit == "" {
		return num
	}
	return num + " " + unit
}

// plain prints x with at most four significant digits and no exponent:
// "10000", "0.01".
func plain(x float64) string {
	r, _ := strconv.ParseFloat(strconv.FormatFloat(x, 'g', 4, 64), 64)
	return strconv.FormatFloat(r, 'f', -1, 64)
}
