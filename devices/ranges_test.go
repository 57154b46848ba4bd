package devices

import (
	"errors"
	"os"
	"slices"
	"strings"
	"testing"

	q "swrank/devices/quantity"
)

// baseRow is an invented, consistent 30 V silicon part with most columns
// filled; each rule's case edits a few of its cells. The 1-based column of
// each name is its place in this list, which the expected messages state.
var baseRow = [][2]string{
	{"part", "BASE"}, {"vds_max", "30"}, {"id_max", "40"}, {"id_pulse", "160"}, // 1-4
	{"vgs_max", "20"}, {"vgs_min", "-20"}, {"tj_max", "150"}, {"rth_ja", "40"}, {"rth_jc", "1.2"}, // 5-9
	{"vgs_th", "1.8"}, {"vgs_th_max", "2.5"}, {"rds_on", "4.5m"}, {"rds_on_vgs", "10"}, {"rds_on_tj", "25"}, // 10-14
	{"rds_on_max", "5.5m"}, {"rds_on_hot", "6.8m"}, {"rds_on_hot_tj", "125"}, // 15-17
	{"qg", "12n"}, {"qg_vgs", "10"}, {"qg_max", "16n"}, {"qgs", "3.5n"}, {"qgd", "2.5n"}, {"qg_th", "1.2n"}, // 18-23
	{"v_plateau", "3.0"}, {"rg_int", "1.2"}, // 24-25
	{"ciss", "1.5n"}, {"coss", "450p"}, {"crss", "40p"}, {"cap_vds", "15"}, // 26-29
	{"qoss", "9n"}, {"eoss", "50n"}, {"oss_vds", "15"}, // 30-32
	{"tr", "5n"}, {"tf", "3n"}, {"tsw_vdd", "15"}, {"tsw_id", "20"}, // 33-36
	{"vsd", "0.8"}, {"vsd_if", "20"}, {"qrr", "20n"}, {"qrr_didt", "100 A/µs"}, // 37-40
	{"l_cs", "0.5n"}, {"l_loop", "1n"}, {"rds_on2", "6m"}, {"rds_on2_vgs", "4.5"}, // 41-44
	{"td_on", "6n"}, {"td_off", "20n"}, // 45-46
}

// rowFile writes baseRow with edits as a library: header on line 1, the
// part on line 2.
func rowFile(edits map[string]string) string {
	var h, r []string
	for _, c := range baseRow {
		h = append(h, c[0])
		v, ok := edits[c[0]]
		if !ok {
			v = c[1]
		}
		r = append(r, v)
	}
	return strings.Join(h, ",") + "\n" + strings.Join(r, ",") + "\n"
}

// ruleCase is one rule: cells edited in baseRow and the located messages.
type ruleCase struct {
	name  string
	edits map[string]string
	want  []string
}

func runRules(t *testing.T, cases []ruleCase, cause error) {
	t.Helper()
	for _, d := range decoders {
		for _, tt := range cases {
			t.Run(d.name+"/"+tt.name, func(t *testing.T) {
				lib, probs := check(strings.NewReader(rowFile(tt.edits)), "r.csv", d.kind, ReadOptions{})
				var got []string
				for _, p := range probs {
					got = append(got, p.Error())
					if !errors.Is(p, cause) {
						t.Errorf("%v does not unwrap to %v", p, cause)
					}
				}
				if !slices.Equal(got, tt.want) {
					t.Errorf("problems:\n%s\nwant:\n%s", strings.Join(got, "\n"), strings.Join(tt.want, "\n"))
				}
				if want := len(tt.want) == 0; (len(lib.Parts) == 1) != want {
					t.Errorf("%d parts", len(lib.Parts))
				}
			})
		}
	}
}

// TestRangeRules checks the plausible ranges: what was read, the range and
// the likely intent, located at line, column and field.
func TestRangeRules(t *testing.T) {
	runRules(t, []ruleCase{
		{"base row", nil, nil},
		{"display units", map[string]string{"rds_on": "5", "qg": "30", "coss": "400"}, []string{
			`r.csv:2:12: rds_on: 5 reads as 5 Ω; at id_max 40 A it would drop 200 V, more than a quarter of vds_max 30 V; for 5 mΩ write 5m`,
			`r.csv:2:18: qg: 30 reads as 30 C, outside 100 pC–5 µC; for 30 nC write 30n`,
			`r.csv:2:27: coss: 400 reads as 400 F, outside 500 fF–100 nF; for 400 pF write 400p`,
		}},
		{"whole row in display units", map[string]string{
			"rds_on": "4.5", "rds_on_max": "5.5", "rds_on_hot": "6.8", "rds_on2": "6",
			"qg": "12", "qg_max": "16", "qgs": "3.5", "qgd": "2.5", "qg_th": "1.2",
			"ciss": "1500", "coss": "450", "crss": "40", "qoss": "9", "eoss": "0.05",
			"tr": "5", "tf": "3", "qrr": "20", "l_cs": "0.5", "l_loop": "1",
		}, []string{
			`r.csv:2:12: rds_on: 4.5 reads as 4.5 Ω; at id_max 40 A it would drop 180 V, more than a quarter of vds_max 30 V; for 4.5 mΩ write 4.5m`,
			`r.csv:2:15: rds_on_max: 5.5 reads as 5.5 Ω; at id_max 40 A it would drop 220 V, more than a quarter of vds_max 30 V; for 5.5 mΩ write 5.5m`,
			`r.csv:2:16: rds_on_hot: 6.8 reads as 6.8 Ω; at id_max 40 A it would drop 272 V, more than a quarter of vds_max 30 V; for 6.8 mΩ write 6.8m`,
			`r.csv:2:18: qg: 12 reads as 12 C, outside 100 pC–5 µC; for 12 nC write 12n`,
			`r.csv:2:20: qg_max: 16 reads as 16 C, outside 100 pC–5 µC; for 16 nC write 16n`,
			`r.csv:2:21: qgs: 3.5 reads as 3.5 C, outside 10 pC–5 µC; for 3.5 nC write 3.5n`,
			`r.csv:2:22: qgd: 2.5 reads as 2.5 C, outside 10 pC–5 µC; for 2.5 nC write 2.5n`,
			`r.csv:2:23: qg_th: 1.2 reads as 1.2 C, outside 10 pC–5 µC; for 1.2 nC write 1.2n`,
			`r.csv:2:26: ciss: 1500 reads as 1.5 kF, outside 500 fF–100 nF; for 1500 pF write 1500p`,
			`r.csv:2:27: coss: 450 reads as 450 F, outside 500 fF–100 nF; for 450 pF write 450p`,
			`r.csv:2:28: crss: 40 reads as 40 F, outside 50 fF–100 nF; for 40 pF write 40p`,
			`r.csv:2:30: qoss: 9 reads as 9 C, outside 10 pC–50 µC; for 9 nC write 9n`,
			`r.csv:2:31: eoss: 0.05 reads as 50 mJ, outside 10 pJ–10 mJ; for 0.05 µJ write 0.05µ`,
			`r.csv:2:33: tr: 5 reads as 5 s, outside 20 ps–5 µs; for 5 ns write 5n`,
			`r.csv:2:34: tf: 3 reads as 3 s, outside 20 ps–5 µs; for 3 ns write 3n`,
			`r.csv:2:39: qrr: 20 reads as 20 C, outside 10 pC–100 µC; for 20 nC write 20n`,
			`r.csv:2:41: l_cs: 0.5 reads as 500 mH, outside 10 pH–100 nH; for 0.5 nH write 0.5n`,
			`r.csv:2:42: l_loop: 1 reads as 1 H, outside 10 pH–100 nH; for 1 nH write 1n`,
			`r.csv:2:43: rds_on2: 6 reads as 6 Ω; at id_max 40 A it would drop 240 V, more than a quarter of vds_max 30 V; for 6 mΩ write 6m`,
		}},
		{"prefix slips", map[string]string{"qg": "30p", "coss": "450n", "rg_int": "1.2m"}, []string{
			`r.csv:2:18: qg: 30p reads as 30 pC, outside 100 pC–5 µC; for 30 nC write 30n`,
			`r.csv:2:25: rg_int: 1.2m reads as 1.2 mΩ, outside 10 mΩ–200 Ω; for 1.2 Ω write 1.2`,
			`r.csv:2:27: coss: 450n reads as 450 nF, outside 500 fF–100 nF; for 450 pF write 450p`,
		}},
		// Delay times copied in ns without the prefix, or with the wrong
		// one (100 ps–10 µs).
		{"delay times in display units", map[string]string{"td_on": "6", "td_off": "20p"}, []string{
			`r.csv:2:45: td_on: 6 reads as 6 s, outside 100 ps–10 µs; for 6 ns write 6n`,
			`r.csv:2:46: td_off: 20p reads as 20 ps, outside 100 ps–10 µs; for 20 ns write 20n`,
		}},
		{"delay time in ms", map[string]string{"td_off": "0.02m"}, []string{
			`r.csv:2:46: td_off: 0.02m reads as 20 µs, outside 100 ps–10 µs; for 0.02 µs write 0.02µ`,
		}},
		{"rating in kV", map[string]string{"vds_max": "1.2"}, []string{
			`r.csv:2:2: vds_max: 1.2 reads as 1.2 V, outside 5 V–3.3 kV; for 1.2 kV write 1.2k`,
		}},
		{"millivolts", map[string]string{"vgs_th": "1800"}, []string{
			`r.csv:2:10: vgs_th: 1800 reads as 1.8 kV, outside 100 mV–10 V; for 1800 mV write 1800m`,
		}},
		{"slew in A/µs", map[string]string{"qrr_didt": "100"}, []string{
			`r.csv:2:40: qrr_didt: 100 reads as 0.0001 A/µs, outside 1–10000 A/µs; for 100 A/µs write 100 A/µs`,
		}},
		{"no prefix fits", map[string]string{"tj_max": "300", "rth_ja": "0.5", "rds_on_hot_tj": "400"}, []string{
			`r.csv:2:7: tj_max: 300 reads as 300 °C, outside 100–250 °C`,
			`r.csv:2:8: rth_ja: 0.5 reads as 0.5 K/W, outside 1–1000 K/W`,
			`r.csv:2:17: rds_on_hot_tj: 400 reads as 400 °C, outside -60 °C to 250 °C`,
		}},
		{"exponent, no suggestion", map[string]string{"coss": "4.7e-6"}, []string{
			`r.csv:2:27: coss: 4.7e-6 reads as 4.7 µF, outside 500 fF–100 nF`,
		}},
		{"unit written", map[string]string{"rds_on": "4.5 Ohm", "coss": "450 F"}, []string{
			`r.csv:2:12: rds_on: 4.5 Ohm reads as 4.5 Ω; at id_max 40 A it would drop 180 V, more than a quarter of vds_max 30 V; for 4.5 mΩ write 4.5m`,
			`r.csv:2:27: coss: 450 F: outside 500 fF–100 nF; for 450 pF write 450p`,
		}},
		{"zero accepted", map[string]string{"rg_int": "0", "qrr": "0", "l_cs": "0", "l_loop": "0"}, nil},
		{"small-signal part in range", map[string]string{
			"vds_max": "60", "id_max": "0.3", "id_pulse": "1.2", "rds_on": "5", "rds_on_max": "7.5", "rds_on_hot": "8",
			"rds_on2": "7", "qg": "0.8n", "qg_max": "1n", "qgs": "0.3n", "qgd": "0.2n", "qg_th": "0.1n",
			"ciss": "40p", "coss": "10p", "crss": "3p", "qoss": "0.4n", "eoss": "2n",
		}, nil},
	}, ErrImplausible)

	// A sign problem is reported once, not again as out of range.
	runRules(t, []ruleCase{{"sign first", map[string]string{"rds_on": "-5"}, []string{
		`r.csv:2:12: rds_on: -5.000 Ω: must be positive`,
	}}, {"negative delay times", map[string]string{"td_on": "-6n", "td_off": "0"}, []string{
		`r.csv:2:45: td_on: -6.000 ns: must be positive`,
		`r.csv:2:46: td_off: 0 s: must be positive`,
	}}}, ErrNonPhysical)
}

// TestRelationRules checks values that cannot hold together, located at
// the column named first in each message.
func TestRelationRules(t *testing.T) {
	runRules(t, []ruleCase{
		{"qgs + qgd above qg", map[string]string{"qgs": "10n"}, []string{
			`r.csv:2:21: qgs: 10.00 nC: qgs + qgd (12.50 nC) exceeds qg (12.00 nC)`}},
		{"qgd above qg", map[string]string{"qgd": "13n"}, []string{
			`r.csv:2:22: qgd: 13.00 nC: exceeds qg (12.00 nC)`}},
		{"qgs alone above qg", map[string]string{"qgs": "13n", "qgd": ""}, []string{
			`r.csv:2:21: qgs: 13.00 nC: exceeds qg (12.00 nC)`}},
		{"qg_th above qgs", map[string]string{"qg_th": "4n"}, []string{
			`r.csv:2:23: qg_th: 4.000 nC: exceeds qgs (3.500 nC)`}},
		{"qg_th above qg without qgs", map[string]string{"qgs": "", "qg_th": "13n"}, []string{
			`r.csv:2:23: qg_th: 13.00 nC: exceeds qg (12.00 nC)`}},
		{"crss above coss", map[string]string{"crss": "500p"}, []string{
			`r.csv:2:28: crss: 500.0 pF: exceeds coss (450.0 pF)`}},
		{"crss above ciss", map[string]string{"ciss": "30p"}, []string{
			`r.csv:2:28: crss: 40.00 pF: exceeds ciss (30.00 pF)`}},
		{"hot below cold", map[string]string{"rds_on_hot": "4m"}, []string{
			`r.csv:2:16: rds_on_hot: 4.000 mΩ at 125.0 °C is below rds_on 4.500 mΩ at 25.00 °C: the on-resistance must rise with temperature`}},
		{"threshold at the rds_on drive", map[string]string{"rds_on_vgs": "1.5", "rds_on2": "", "rds_on2_vgs": ""}, []string{
			`r.csv:2:13: rds_on_vgs: 1.500 V: must be above vgs_th (1.800 V)`}},
		{"threshold above vgs_max", map[string]string{"vgs_max": "5", "vgs_th": "6", "vgs_th_max": "7",
			"rds_on_vgs": "4.5", "qg_vgs": "4.5", "rds_on2": "", "rds_on2_vgs": ""}, []string{
			`r.csv:2:10: vgs_th: 6.000 V: must be below vgs_max (5.000 V)`,
			`r.csv:2:13: rds_on_vgs: 4.500 V: must be above vgs_th (6.000 V)`,
			`r.csv:2:19: qg_vgs: 4.500 V: must be above vgs_th (6.000 V)`,
			`r.csv:2:24: v_plateau: 3.000 V: must lie between vgs_th (6.000 V) and qg_vgs (4.500 V)`}},
		{"eoss above Q·V/2", map[string]string{"eoss": "80n"}, []string{
			`r.csv:2:31: eoss: 80.00 nJ: exceeds ½·qoss·oss_vds (67.50 nJ); a falling Coss(V) gives E_oss ≤ ½·Q_oss·V`}},
		{"rds_on_max below rds_on", map[string]string{"rds_on_max": "4m"}, []string{
			`r.csv:2:15: rds_on_max: 4.000 mΩ: below the typical rds_on (4.500 mΩ)`}},
		{"vgs_th_max below vgs_th", map[string]string{"vgs_th_max": "1.5"}, []string{
			`r.csv:2:11: vgs_th_max: 1.500 V: below the typical vgs_th (1.800 V)`}},
		{"id_pulse below id_max", map[string]string{"id_pulse": "30"}, []string{
			`r.csv:2:4: id_pulse: 30.00 A: below the continuous id_max (40.00 A)`}},
	}, ErrInconsistent)
}

// TestPlausibleTable checks the table against Part's columns: one row for
// every quantity column, bounds in order, and suggestion prefixes the
// parser reads.
func TestPlausibleTable(t *testing.T) {
	seen := map[string]bool{}
	for _, r := range plausibleRanges {
		ci, ok := partSchema.byName[r.col]
		if !ok {
			t.Errorf("%s: not a column", r.col)
			continue
		}
		c := partSchema.cols[ci]
		if c.kind != cellQty && c.kind != cellOpt {
			t.Errorf("%s: not a quantity column", r.col)
		}
		if seen[r.col] {
			t.Errorf("%s: two rows", r.col)
		}
		seen[r.col] = true
		if !(r.lo < r.hi) || (r.zero && !(r.lo > 0)) {
			t.Errorf("%s: range %g to %g (zero %v)", r.col, r.lo, r.hi, r.zero)
		}
		if r.prefer != "" {
			want := r.prefer + c.qkind.Symbol
			if c.qkind.Scaled != nil {
				want = r.prefer
			}
			if _, err := q.ParseFloat("1 "+want, c.qkind); err != nil {
				t.Errorf("%s: display prefix %q: %v", r.col, r.prefer, err)
			}
		}
	}
	for _, c := range partSchema.cols {
		if (c.kind == cellQty || c.kind == cellOpt) && !seen[c.name] {
			t.Errorf("%s: quantity column without a plausible range", c.name)
		}
	}
	if len(partSchema.ranged) != len(plausibleRanges) {
		t.Errorf("%d ranged columns, %d rows", len(partSchema.ranged), len(plausibleRanges))
	}
}

// TestPlausibleDocs checks that docs/library.md lists every range as the
// messages print it.
func TestPlausibleDocs(t *testing.T) {
	b, err := os.ReadFile("../docs/library.md")
	if err != nil {
		t.Fatal(err)
	}
	_, doc, ok := strings.Cut(string(b), "\n## Plausible ranges\n")
	if !ok {
		t.Fatal("docs/library.md has no section Plausible ranges")
	}
	for _, rc := range partSchema.ranged {
		c := partSchema.cols[rc.ci]
		want := "| `" + c.name + "` | " + rangeText(rc.r, c.qkind)
		if rc.r.zero {
			want += ", or 0"
		}
		if !strings.Contains(doc, want+" |") {
			t.Errorf("docs/library.md: no row %q", want)
		}
	}
}

// TestRangesNoAlloc checks that the range check of a part in range
// allocates nothing: it runs once per part of a 100k-part library.
func TestRangesNoAlloc(t *testing.T) {
	p := validPart()
	p.IdPulse, p.TjMax, p.RthJA = q.Some[q.Current](160), q.Some[q.Temperature](150), q.Some[q.ThermalResistance](40)
	p.RdsOnMax, p.RdsHot, p.RdsHotTj = q.Some[q.Resistance](5.5e-3), q.Some[q.Resistance](6.8e-3), q.Some[q.Temperature](125)
	p.Tr, p.Tf, p.QrrDidt = q.Some[q.Time](5e-9), q.Some[q.Time](3e-9), q.Some[q.Slew](100e6)
	if probs := Validate(&p); len(probs) > 0 {
		t.Fatal(probs)
	}
	if n := testing.AllocsPerRun(100, func() {
		v := validator{p: &p, parsed: true}
		v.ranges()
		if len(v.probs) > 0 {
			t.Fatal(v.probs)
		}
	}); n != 0 {
		t.Errorf("%g allocations per part", n)
	}
}
