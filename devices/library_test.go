package devices

import (
	"bytes"
	"encoding/csv"
	"errors"
	"fmt"
	"io"
	"math"
	"os"
	"path/filepath"
	"reflect"
	"slices"
	"strings"
	"testing"

	q "swrank/devices/quantity"
)

// decoders lists both ways of decoding cells; every loader test runs on both.
var decoders = []struct {
	name string
	kind decoderKind
}{{"fast", decodeFast}, {"parallel", decodeParallel}, {"gocsv", decodeGocsv}}

func checkFile(t *testing.T, file string, d decoderKind) (*Library, ProblemList) {
	t.Helper()
	b, err := os.ReadFile(filepath.Join("testdata", "parts", file))
	if err != nil {
		t.Fatal(err)
	}
	return check(bytes.NewReader(b), file, d, ReadOptions{})
}

// TestCheckFiles reads each fixture of testdata/parts and compares every
// problem, exactly as a user sees it, with the expected list. The fixtures
// are invented parts; each expectation was checked by hand against the file
// (line, 1-based column index, column name, cell).
func TestCheckFiles(t *testing.T) {
	tests := []struct {
		file  string
		parts int
		want  []string
	}{
		{"good.csv", 3, nil},
		{"bom_comments.csv", 2, nil},
		{"bad_number.csv", 0, []string{
			`bad_number.csv:2:9: qg: "3.3x": wrong unit: "x" is not a unit of charge (use C)`,
			`bad_number.csv:3:6: vgs_th: empty value`,
			`bad_number.csv:3:7: rds_on: "abc": not a number`,
		}},
		{"bad_unit.csv", 1, []string{
			`bad_unit.csv:3:9: qg: "5.5 nF": wrong unit: "nF" is not a unit of charge (use C)`,
			`bad_unit.csv:3:14: coss: "3 nC": wrong unit: "nC" is not a unit of capacitance (use F)`,
		}},
		{"missing_column.csv", 0, []string{
			`missing_column.csv:1: vgs_th: missing required column`,
			`missing_column.csv:1: qg: missing required column`,
		}},
		{"duplicate.csv", 3, []string{
			`duplicate.csv:4:1: part: "EMBER-A": duplicate part name: the part on line 2 has the same name (names are compared ignoring case)`,
			`duplicate.csv:6:1: part: "ember-b": duplicate part name: the part on line 3 has the same name (names are compared ignoring case)`,
		}},
		{"duplicate_column.csv", 1, []string{
			`duplicate_column.csv:1:16: qg: column given twice (first as column 9)`,
		}},
		{"unknown_column.csv", 2, []string{
			`unknown_column.csv:1:16: colour: unknown column`,
			`unknown_column.csv:1:17: vendor_ref: unknown column`,
		}},
		{"misspelt_column.csv", 2, []string{
			`misspelt_column.csv:1:16: rth_ja_: unknown column; did you mean rth_ja?`,
			`misspelt_column.csv:1:17: qg_vsg: unknown column; did you mean qg_vgs?`,
			`misspelt_column.csv:1:18: colour: unknown column`,
		}},
		{"display_units.csv", 1, []string{
			`display_units.csv:5:7: rds_on: 5 reads as 5 Ω; at id_max 40 A it would drop 200 V, more than a quarter of vds_max 30 V; for 5 mΩ write 5m`,
			`display_units.csv:5:9: qg: 30 reads as 30 C, outside 100 pC–5 µC; for 30 nC write 30n`,
			`display_units.csv:5:14: coss: 400 reads as 400 F, outside 500 fF–100 nF; for 400 pF write 400p`,
			`display_units.csv:6:7: rds_on: 4.5 Ohm reads as 4.5 Ω; at id_max 40 A it would drop 180 V, more than a quarter of vds_max 30 V; for 4.5 mΩ write 4.5m`,
			`display_units.csv:6:9: qg: 30p reads as 30 pC, outside 100 pC–5 µC; for 30 nC write 30n`,
			`display_units.csv:6:14: coss: 400n reads as 400 nF, outside 500 fF–100 nF; for 400 pF write 400p`,
			`display_units.csv:7:3: vds_max: 1.2 reads as 1.2 V, outside 5 V–3.3 kV; for 1.2 kV write 1.2k`,
		}},
		{"nan.csv", 1, []string{
			`nan.csv:2:7: rds_on: "NaN": not a finite number`,
			`nan.csv:3:7: rds_on: "Inf": not a finite number`,
			`nan.csv:3:9: qg: "1e999": not a finite number`,
		}},
		{"empty.csv", 0, []string{`empty.csv: empty file: no header row`}},
		{"header_only.csv", 0, []string{`header_only.csv:2: no parts`}},
		{"ragged.csv", 1, []string{
			`ragged.csv:3: wrong number of fields: the row has 3, the header 15`,
			`ragged.csv:4:16: wrong number of fields: the row has 17, the header 15`,
		}},
		{"quotes.csv", 2, []string{
			`quotes.csv:3: byte 6 of the line: bare " in non-quoted-field`,
			`quotes.csv:5: byte 22 of the line: extraneous or missing " in quoted-field`,
		}},
		{"nonphysical.csv", 0, []string{
			`nonphysical.csv:2:7: rds_on: -4.500 mΩ: must be positive`,
			`nonphysical.csv:3:9: qg: 0 C: must be positive`,
			`nonphysical.csv:4:6: vgs_th: 22 reads as 22 V, outside 100 mV–10 V`,
			`nonphysical.csv:5:12: qgd: 13.00 nC: exceeds qg (12.00 nC)`,
			`nonphysical.csv:6:11: qgs: 10.00 nC: qgs + qgd (12.50 nC) exceeds qg (12.00 nC)`,
			`nonphysical.csv:7:13: v_plateau: 1.500 V: must lie between vgs_th (1.800 V) and qg_vgs (10.00 V)`,
			`nonphysical.csv:8:8: rds_on_vgs: 1.500 V: must be above vgs_th (1.800 V)`,
		}},
		{"relations.csv", 1, []string{
			`relations.csv:3:14: crss: 500.0 pF: exceeds coss (450.0 pF)`,
			`relations.csv:4:18: eoss: 80.00 nJ: exceeds ½·qoss·oss_vds (67.50 nJ); a falling Coss(V) gives E_oss ≤ ½·Q_oss·V`,
			`relations.csv:5:20: tj_max: 300 reads as 300 °C, outside 100–250 °C`,
			`relations.csv:6:21: rg_int: -1.000 Ω: must not be negative`,
			`relations.csv:7:22: vgs_min: 2.000 V: the lowest gate voltage must be 0 V or negative`,
			`relations.csv:8:23: rds_dyn: 0.8000: the dynamic on-resistance factor must be at least 1`,
			`relations.csv:9:24: rds_on_max: 4.000 mΩ: below the typical rds_on (4.500 mΩ)`,
			`relations.csv:9:25: qg_max: 10.00 nC: below the typical qg (12.00 nC)`,
			`relations.csv:9:26: vgs_th_max: 1.500 V: below the typical vgs_th (1.800 V)`,
			`relations.csv:10:27: rds_on_hot: 4.000 mΩ at 125.0 °C is below rds_on 4.500 mΩ at 25.00 °C: the on-resistance must rise with temperature`,
			`relations.csv:11:29: rds_on2: 4.000 mΩ at 4.500 V against rds_on 4.500 mΩ at 10.00 V: a higher gate voltage must give a lower or equal on-resistance`,
			`relations.csv:12:31: qg_th: 4.000 nC: exceeds qgs (3.500 nC)`,
			`relations.csv:13:32: rds_on_curve: "25:1 25:1.4": bad rds_on_curve: temperatures must increase`,
			`relations.csv:14:32: rds_on_curve: "25:1": bad rds_on_curve: want 2 to 8 points written T:factor`,
			`relations.csv:15:14: crss: 40.00 pF: exceeds ciss (30.00 pF)`,
		}},
		{"spice.csv", 2, []string{
			`spice.csv:4:17: spice_pins: needed by spice_subckt (the order of the subcircuit's pins, e.g. "d g s")`,
			`spice.csv:5:15: spice_model: needed by spice_subckt (the file holding sub30)`,
			`spice.csv:6:17: spice_pins: "d g x": pin "x" is not d, g, s or k`,
			`spice.csv:7:17: spice_pins: "d d s": the pins must name d, g and s once each (and k at most once)`,
			`spice.csv:8:17: spice_pins: "d g s": given without spice_subckt (a .model card has its pins fixed)`,
		}},
		{"conditional.csv", 0, []string{
			`conditional.csv:2:30: rds_on2_vgs: needed by rds_on2 (its test condition)`,
			`conditional.csv:3:28: rds_on_hot_tj: needed by rds_on_hot (its test condition)`,
			`conditional.csv:4:16: cap_vds: needed by ciss, coss, crss (its test condition)`,
			`conditional.csv:5:19: oss_vds: needed by qoss (its test condition)`,
			`conditional.csv:6:11: qgd: no switching data: give qgs, qgd and v_plateau (or gfs with gfs_id), or tr and tf`,
			`conditional.csv:7:13: coss: no output-capacitance data: give coss with cap_vds, or qoss with oss_vds`,
		}},
	}
	for _, d := range decoders {
		for _, tt := range tests {
			t.Run(d.name+"/"+tt.file, func(t *testing.T) {
				lib, probs := checkFile(t, tt.file, d.kind)
				var got []string
				for _, p := range probs {
					got = append(got, p.Error())
				}
				if !slices.Equal(got, tt.want) {
					t.Errorf("problems:\n%s\nwant:\n%s", strings.Join(got, "\n"), strings.Join(tt.want, "\n"))
				}
				if len(lib.Parts) != tt.parts {
					t.Errorf("%d parts, want %d", len(lib.Parts), tt.parts)
				}
			})
		}
	}
}

// TestDecodersAgree checks that both decoders give identical parts.
func TestDecodersAgree(t *testing.T) {
	files, err := filepath.Glob("testdata/parts/*.csv")
	if err != nil || len(files) == 0 {
		t.Fatal("no fixtures", err)
	}
	for _, f := range files {
		a, pa := checkFile(t, filepath.Base(f), decodeFast)
		for _, d := range []decoderKind{decodeParallel, decodeGocsv} {
			b, pb := checkFile(t, filepath.Base(f), d)
			if !reflect.DeepEqual(a, b) {
				t.Errorf("%s, decoder %d: libraries differ:\n%+v\n%+v", f, d, a, b)
			}
			if pa.Error() != pb.Error() {
				t.Errorf("%s, decoder %d: problems differ", f, d)
			}
		}
	}
}

// TestBOMCommentsCRLF checks a file with a BOM, CRLF line ends, comments,
// blank lines and header names in mixed case with spaces.
func TestBOMCommentsCRLF(t *testing.T) {
	for _, d := range decoders {
		lib, probs := checkFile(t, "bom_comments.csv", d.kind)
		if len(probs) != 0 {
			t.Fatalf("%s: %v", d.name, probs)
		}
		if len(lib.Parts) != 2 || lib.Parts[0].Line != 5 || lib.Parts[1].Line != 8 {
			t.Fatalf("%s: parts %d, lines %v", d.name, len(lib.Parts), lib.Parts)
		}
		p := lib.Parts[1]
		// 9 mOhm, 5.5 nC, 220 pF: SI prefixes m, n, p (BIPM SI brochure, table 7).
		if p.Name != "ember-b" || p.Technology != Silicon || math.Abs(float64(p.RdsOn)-9e-3) > 1e-18 ||
			math.Abs(float64(p.Qg)-5.5e-9) > 1e-21 || !p.Coss.OK || math.Abs(float64(p.Coss.V)-220e-12) > 1e-24 {
			t.Errorf("%s: %+v", d.name, p)
		}
		if lib.Columns[0] != "part" || lib.Columns[1] != "technology" || lib.Columns[14] != "cap_vds" {
			t.Errorf("%s: columns %q", d.name, lib.Columns)
		}
	}
}

// TestProblemFields checks the located fields and the causes.
func TestProblemFields(t *testing.T) {
	for _, d := range decoders {
		_, probs := checkFile(t, "bad_unit.csv", d.kind)
		if len(probs) != 2 {
			t.Fatalf("%s: %v", d.name, probs)
		}
		p := probs[1]
		want := Problem{File: "bad_unit.csv", Line: 3, Column: 14, Field: "coss", Part: "ember-b", Text: "3 nC", Fatal: true}
		got := *p
		got.Err = nil
		if got != want {
			t.Errorf("%s: %+v, want %+v", d.name, got, want)
		}
		if !errors.Is(p, q.ErrUnit) {
			t.Errorf("%s: %v does not unwrap to quantity.ErrUnit", d.name, p)
		}
	}
}

// TestReadErrors checks that Read returns every fatal problem in one
// ProblemList that errors.As and errors.Is see through.
func TestReadErrors(t *testing.T) {
	f, err := os.Open("testdata/parts/relations.csv")
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	lib, err := Read(f, "relations.csv")
	var list ProblemList
	if !errors.As(err, &list) || len(list) != 15 {
		t.Fatalf("error %v", err)
	}
	var p *Problem
	if !errors.As(err, &p) || p.Line != 3 || p.Field != "crss" {
		t.Errorf("first problem %+v", p)
	}
	if !errors.Is(err, ErrInconsistent) || !errors.Is(err, ErrNonPhysical) || !errors.Is(err, ErrCurve) {
		t.Errorf("causes not found in %v", err)
	}
	if lib == nil || len(lib.Parts) != 1 || lib.Parts[0].Name != "OK1" {
		t.Errorf("library %+v", lib)
	}

	lib, err = Load("testdata/parts/unknown_column.csv")
	if !errors.Is(err, ErrUnknownColumn) || !errors.As(err, &list) || len(list) != 2 {
		t.Fatalf("unknown columns: %v", err)
	}
	if !slices.Equal(lib.Unknown, []string{"colour", "vendor_ref"}) || len(lib.Warnings) != 0 || len(lib.Parts) != 2 {
		t.Errorf("unknown %q, warnings %v, %d parts", lib.Unknown, lib.Warnings, len(lib.Parts))
	}
	if lib.Source != "testdata/parts/unknown_column.csv" {
		t.Errorf("source %q", lib.Source)
	}
	if _, err := Load("testdata/parts/no_such_file.csv"); !errors.Is(err, os.ErrNotExist) {
		t.Errorf("missing file: %v", err)
	}
	_, err = Read(strings.NewReader(`part,vds_max`), "x.csv")
	if !errors.Is(err, ErrMissingColumn) {
		t.Errorf("missing columns: %v", err)
	}
	_, err = Read(strings.NewReader("part\n\"a\"b\n"), "x.csv")
	if !errors.Is(err, csv.ErrQuote) {
		t.Errorf("quote error: %v", err)
	}
}

// TestScan checks streaming: every valid part in order, and a stop.
func TestScan(t *testing.T) {
	b, err := os.ReadFile("testdata/parts/duplicate.csv")
	if err != nil {
		t.Fatal(err)
	}
	var names []string
	hdr, probs := (ReadOptions{}).Scan(bytes.NewReader(b), "duplicate.csv", func(p *Part) error {
		names = append(names, p.Name)
		return nil
	})
	if !slices.Equal(names, []string{"ember-a", "ember-b", "cinder-a"}) || len(probs) != 2 || hdr.Line != 1 || len(hdr.Columns) != 15 {
		t.Errorf("names %q, problems %v, header %+v", names, probs, hdr)
	}
	stop := errors.New("enough")
	n := 0
	_, probs = (ReadOptions{}).Scan(bytes.NewReader(b), "duplicate.csv", func(p *Part) error {
		n++
		return stop
	})
	if n != 1 || len(probs) != 1 || !errors.Is(probs, stop) || probs[0].Line != 2 {
		t.Errorf("after stop: %d calls, %v", n, probs)
	}
}

// validPart is an invented, consistent 30 V part built in code.
func validPart() Part {
	return Part{
		Name: "row-one", VdsMax: 30, IdMax: 40, VgsMax: 20, VgsTh: 1.8,
		RdsOn: 4.5e-3, RdsOnVgs: 10, Qg: 12e-9, QgVgs: 10,
		Qgs: q.Some[q.Charge](3.5e-9), Qgd: q.Some[q.Charge](2.5e-9), VPlateau: q.Some[q.Voltage](3),
		Coss: q.Some[q.Capacitance](450e-12), CapVds: q.Some[q.Voltage](15),
	}
}

// TestValidate checks parts built in code, without a file.
func TestValidate(t *testing.T) {
	tests := []struct {
		name  string
		edit  func(*Part)
		want  []string
		cause error
	}{
		{"valid", func(p *Part) {}, nil, nil},
		{"nan", func(p *Part) { p.RdsOn = q.Resistance(math.NaN()) }, []string{`part "row-one": rds_on: not a finite number`}, q.ErrNotFinite},
		{"inf opt", func(p *Part) { p.Ciss = q.Some(q.Capacitance(math.Inf(1))) }, []string{`part "row-one": ciss: not a finite number`}, q.ErrNotFinite},
		{"no name", func(p *Part) { p.Name = " " }, []string{`part: empty part name`}, ErrMissingValue},
		{"tr tf suffice", func(p *Part) {
			p.Qgs, p.Qgd, p.VPlateau = q.Opt[q.Charge]{}, q.Opt[q.Charge]{}, q.Opt[q.Voltage]{}
			p.Tr, p.Tf = q.Some[q.Time](5e-9), q.Some[q.Time](3e-9)
		}, nil, nil},
		{"qoss suffices", func(p *Part) {
			p.Coss = q.Opt[q.Capacitance]{}
			p.Qoss, p.OssVds = q.Some[q.Charge](9e-9), q.Some[q.Voltage](15)
		}, nil, nil},
		{"eoss at the bound", func(p *Part) {
			// Constant C: Q = C·V, E = ½·C·V² = ½·Q·V exactly (IEC 60747-8 integrals).
			p.Qoss, p.Eoss, p.OssVds = q.Some[q.Charge](450e-12*15), q.Some[q.Energy](0.5*450e-12*15*15), q.Some[q.Voltage](15)
		}, nil, nil},
		{"gan qrr zero", func(p *Part) { p.Technology = GaN; p.Qrr = q.Some[q.Charge](0) }, nil, nil},
		{"tj_max 250 ok", func(p *Part) { p.TjMax = q.Some[q.Temperature](250) }, nil, nil},
		{"tj_max 25", func(p *Part) { p.TjMax = q.Some[q.Temperature](25) },
			[]string{`part "row-one": tj_max: 25 °C: outside 100–250 °C`}, ErrImplausible},
		{"rds_on in display units", func(p *Part) { p.RdsOn = 4.5 },
			[]string{`part "row-one": rds_on: 4.5 Ω; at id_max 40 A it would drop 180 V, more than a quarter of vds_max 30 V; was 4.5 mΩ meant?`}, ErrImplausible},
		{"qg in display units", func(p *Part) { p.Qg = 12 },
			[]string{`part "row-one": qg: 12 C: outside 100 pC–5 µC; was 12 nC meant?`}, ErrImplausible},
		{"hot at same temperature is not checked", func(p *Part) {
			p.RdsHot, p.RdsHotTj = q.Some[q.Resistance](4e-3), q.Some[q.Temperature](25)
		}, nil, nil},
		{"second gate point above", func(p *Part) {
			p.RdsOnVgs = 4.5
			p.RdsOn2, p.RdsOn2Vgs = q.Some[q.Resistance](5e-3), q.Some[q.Voltage](10)
		}, []string{`part "row-one": rds_on2: 5.000 mΩ at 10.00 V against rds_on 4.500 mΩ at 4.500 V: a higher gate voltage must give a lower or equal on-resistance`}, ErrInconsistent},
		{"eoss_loss needs swing", func(p *Part) { p.EossLoss = q.Some[q.Energy](1e-9) },
			[]string{`part "row-one": eoss_loss_vds: needed by eoss_loss (its test condition)`}, ErrMissingValue},
		{"qrr_hot needs tj", func(p *Part) { p.QrrHot = q.Some[q.Charge](30e-9) },
			[]string{`part "row-one": qrr_hot_tj: needed by qrr_hot (its test condition)`}, ErrMissingValue},
		{"gfs needs its current", func(p *Part) { p.Gfs = q.Some[q.Conductance](20) },
			[]string{`part "row-one": gfs_id: needed by gfs (its test condition)`}, ErrMissingValue},
		{"gfs in display units", func(p *Part) { p.Gfs, p.GfsId = q.Some[q.Conductance](20e3), q.Some[q.Current](10) },
			[]string{`part "row-one": gfs: 20 kS: outside 1 mS–2 kS; was 20000 mS meant?`}, ErrImplausible},
		{"eoss needs oss_vds", func(p *Part) { p.Eoss = q.Some[q.Energy](30e-9) },
			[]string{`part "row-one": oss_vds: needed by eoss (its test condition)`}, ErrMissingValue},
	}
	for _, tt := range tests {
		p := validPart()
		tt.edit(&p)
		probs := Validate(&p)
		var got []string
		for i := range probs {
			got = append(got, probs[i].Error())
			if tt.cause != nil && !errors.Is(&probs[i], tt.cause) {
				t.Errorf("%s: %v does not unwrap to %v", tt.name, &probs[i], tt.cause)
			}
		}
		if !slices.Equal(got, tt.want) {
			t.Errorf("%s: got\n%s\nwant\n%s", tt.name, strings.Join(got, "\n"), strings.Join(tt.want, "\n"))
		}
	}
}

func TestParseCurve(t *testing.T) {
	tests := []struct {
		in   string
		want []CurvePoint
		ok   bool
	}{
		{"25:1 100:1.45 150:1.8", []CurvePoint{{25, 1}, {100, 1.45}, {150, 1.8}}, true},
		{"25:1;125:1.6", []CurvePoint{{25, 1}, {125, 1.6}}, true},
		{"-40:0.8, 25:1, 175°C:2.1", []CurvePoint{{-40, 0.8}, {25, 1}, {175, 2.1}}, true},
		{"25:1", nil, false},
		{"25:1 100", nil, false},
		{"25:1 100:0", nil, false},
		{"25:1 100:-1", nil, false},
		{"100:1 25:1.4", nil, false},
		{"25:1 100:NaN", nil, false},
		{"25:1 100:140%", nil, false},
		{"25:1 a:1.4", nil, false},
		{"1:1 2:1 3:1 4:1 5:1 6:1 7:1 8:1 9:1", nil, false},
	}
	for _, tt := range tests {
		got, err := ParseCurve(tt.in)
		if (err == nil) != tt.ok || !slices.Equal(got, tt.want) {
			t.Errorf("ParseCurve(%q) = %v, %v", tt.in, got, err)
		}
		if err != nil && !errors.Is(err, ErrCurve) {
			t.Errorf("ParseCurve(%q): %v does not wrap ErrCurve", tt.in, err)
		}
	}
	p := Part{RdsCurve: " "}
	if pts, err := p.Curve(); pts != nil || err != nil {
		t.Errorf("blank curve: %v, %v", pts, err)
	}
}

// TestColumns checks the schema derived from Part's tags against the
// required columns of the library format.
func TestColumns(t *testing.T) {
	want := []string{"part", "vds_max", "id_max", "vgs_max", "vgs_th", "rds_on", "rds_on_vgs", "qg", "qg_vgs"}
	if got := RequiredColumns(); !slices.Equal(got, want) {
		t.Errorf("required %q, want %q", got, want)
	}
	all := Columns()
	if len(all) != reflect.TypeFor[Part]().NumField()-1 { // every field but Line
		t.Errorf("%d columns", len(all))
	}
}

// TestMalformed feeds inputs that must give problems, never a panic.
func TestMalformed(t *testing.T) {
	good, err := os.ReadFile("testdata/parts/good.csv")
	if err != nil {
		t.Fatal(err)
	}
	inputs := []string{
		"", "\xef\xbb\xbf", "\x00\x01\x02", "#only a comment\n", "\"", "part\n\"", "a,b,c\n1,2\n",
		strings.Repeat("x", 1<<20), "part,qg\n" + strings.Repeat("9", 100000) + ",1\n",
		string(good[:len(good)/2]), strings.ReplaceAll(string(good), ",", ",\""),
		string(good) + string(good[30:]), "part,part,part\n1,2,3\n",
	}
	for _, d := range decoders {
		for _, in := range inputs {
			lib, probs := check(strings.NewReader(in), "m.csv", d.kind, ReadOptions{})
			if lib == nil || !probs.Fatal() {
				t.Errorf("%s: %.40q: no fatal problem (%v)", d.name, in, probs)
			}
		}
	}
}

// bigLibrary builds a library of n rows from the fixture parts, with
// unique names, a bad cell every 97 rows and a duplicate every 89; rows
// get shorter after the first quarter, so that sizing from the first rows
// underestimates (the parallel decoder must then fall back to copying).
func bigLibrary(t *testing.T, n int) []byte {
	t.Helper()
	good, err := os.ReadFile("testdata/parts/good.csv")
	if err != nil {
		t.Fatal(err)
	}
	lines := strings.Split(strings.TrimSpace(string(good)), "\n")
	header, rows := lines[1], lines[2:]
	var b strings.Builder
	b.WriteString(header + ",notes\n")
	for i := range n {
		r := rows[i%len(rows)]
		name, rest, _ := strings.Cut(r, ",")
		id := fmt.Sprintf("%s-%d", name, i)
		switch {
		case i%89 == 88:
			id = fmt.Sprintf("%s-%d", name, i-1) // same name as the row before
		case i%97 == 96:
			rest = strings.Replace(rest, ",30,", ",30x,", 1)
		}
		notes := "n"
		if i < n/4 {
			notes = strings.Repeat("long notes ", 20)
		}
		if i%50 == 7 {
			notes = `"quoted, with a comma"`
		}
		fmt.Fprintf(&b, "%s,%s,%s\n", id, rest, notes)
	}
	return []byte(b.String())
}

// TestParallelMatchesSequential checks the parallel decoder against the
// sequential one on a larger library, with a known size (decoding in place,
// then falling back) and an unknown size (copying).
func TestParallelMatchesSequential(t *testing.T) {
	data := bigLibrary(t, 5000)
	want, wp := check(bytes.NewReader(data), "big.csv", decodeFast, ReadOptions{})
	if len(want.Parts) < 4800 || len(wp) < 30 {
		t.Fatalf("fixture: %d parts, %d problems", len(want.Parts), len(wp))
	}
	// The gocsv decoder, which shares none of the batch code, agrees.
	if g, gp := check(bytes.NewReader(data), "big.csv", decodeGocsv, ReadOptions{}); !reflect.DeepEqual(want, g) || gp.Error() != wp.Error() {
		t.Errorf("gocsv decoder differs on the large library")
	}
	for _, r := range []func() io.Reader{
		func() io.Reader { return bytes.NewReader(data) },
		func() io.Reader { return io.MultiReader(bytes.NewReader(data)) }, // size unknown
	} {
		got, gp := check(r(), "big.csv", decodeParallel, ReadOptions{})
		if !reflect.DeepEqual(want, got) {
			t.Errorf("libraries differ: %d vs %d parts", len(want.Parts), len(got.Parts))
		}
		if wp.Error() != gp.Error() {
			t.Errorf("problems differ")
		}
	}
	// Streaming with an early stop gives the same prefix.
	for _, d := range []decoderKind{decodeFast, decodeParallel} {
		var names []string
		l := newLoader("big.csv", func(p *Part) error {
			names = append(names, p.Name)
			if len(names) == 1000 {
				return errors.New("enough")
			}
			return nil
		}, ReadOptions{})
		_, probs := l.scan(bytes.NewReader(data), d)
		if len(names) != 1000 || names[999] != want.Parts[999].Name || probs[len(probs)-1].Err.Error() != "enough" {
			t.Errorf("decoder %d: stop after %d names, last problem %v", d, len(names), probs[len(probs)-1])
		}
		if d == decodeFast {
			continue
		}
		_, seq := newLoader("big.csv", func(p *Part) error {
			if p.Line == want.Parts[999].Line {
				return errors.New("enough")
			}
			return nil
		}, ReadOptions{}).scan(bytes.NewReader(data), decodeFast)
		if seq.Error() != probs.Error() {
			t.Errorf("stop: problems differ between decoders")
		}
	}
}
