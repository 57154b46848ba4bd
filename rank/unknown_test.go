package rank_test

import (
	"bytes"
	"fmt"
	"reflect"
	"sort"
	"strings"
	"testing"

	"swrank/devices"
	q "swrank/devices/quantity"
	"swrank/devices/synth"
	"swrank/rank"
	"swrank/rank/evaluate"
	"swrank/rank/fit"
	"swrank/rank/stage"
)

// Unknown is not zero: blanking any optional column of any part never
// moves that part up the ranking. A missing datasheet value gets a
// conservative estimate (or the part is set aside), so the complete row
// always ranks at least as well as any copy of it with a value removed.
// The property is checked over the demo library and a generated library,
// at a set of operating points that covers every topology, a hot point and
// light load (the rule is the project's own; the points are common
// practice for the stages).
func TestBlankingNeverRanksHigher(t *testing.T) {
	demo, err := devices.Demo()
	if err != nil {
		t.Fatal(err)
	}
	var buf bytes.Buffer
	if err := synth.Generate(&buf, 24, 7); err != nil {
		t.Fatal(err)
	}
	gen, err := devices.Read(&buf, "generated")
	if err != nil {
		t.Fatal(err)
	}
	points := blankingPoints(t)
	for _, lib := range []struct {
		name  string
		parts []devices.Part
	}{{"demo", demo.Parts}, {"generated", gen.Parts}} {
		t.Run(lib.name, func(t *testing.T) {
			checked, fails := 0, map[string][]string{}
			for _, pt := range points {
				base := rankParts(t, lib.parts, &pt.p)
				for i := range lib.parts {
					was := position(base, lib.parts[i].Name)
					for _, col := range optionalSet(&lib.parts[i]) {
						checked++
						p := lib.parts[i]
						blank(&p, col)
						r, ok := evaluatePart(&p, &pt.p)
						if !ok || r.Screened() {
							continue // set aside: below every passing part
						}
						now := placeAmong(base, &r)
						if was < 0 || base[was].Screened() || now < was {
							fails[col] = append(fails[col], fmt.Sprintf("%s at %s: place %d → %d", p.Name, pt.name, was+1, now+1))
						}
					}
				}
			}
			t.Logf("%s: %d parts, %d part-column-point cases", lib.name, len(lib.parts), checked)
			cols := make([]string, 0, len(fails))
			for c := range fails {
				cols = append(cols, c)
			}
			sort.Strings(cols)
			for _, c := range cols {
				f := fails[c]
				t.Errorf("blank %s moves %d cases up, e.g. %s", c, len(f), strings.Join(f[:min(3, len(f))], "; "))
			}
		})
	}
}

type namedPoint struct {
	name string
	p    stage.Point
}

// blankingPoints are the operating points of the property: synchronous
// and diode-rectified bucks, a boost, class E and class D, a hot point
// and light load.
func blankingPoints(t *testing.T) []namedPoint {
	t.Helper()
	drv5 := stage.Driver{VOn: 5}
	drv10 := stage.Driver{VOn: 10, VOff: -3}
	stages := []struct {
		name string
		s    stage.Stage
	}{
		{"buck 12→1.2 V 10 A 500 kHz", stage.Stage{Topology: stage.Buck, Vin: 12, Vout: 1.2, Iout: 10, Fsw: 500e3, Driver: drv5}},
		{"buck 12→5 V 10 A 500 kHz, −3 V off", stage.Stage{Topology: stage.Buck, Vin: 12, Vout: 5, Iout: 10, Fsw: 500e3, Driver: drv10}},
		{"buck 48→12 V 5 A 200 kHz, 20 K/W", stage.Stage{Topology: stage.Buck, Vin: 48, Vout: 12, Iout: 5, Fsw: 200e3, Driver: stage.Driver{VOn: 10}, RthCA: q.Some[q.ThermalResistance](20)}},
		{"diode buck 24→5 V 3 A 300 kHz", stage.Stage{Topology: stage.Buck, Rectifier: stage.DiodeRect, Vin: 24, Vout: 5, Iout: 3, Fsw: 300e3, Driver: stage.Driver{VOn: 10}}},
		{"boost 12→36 V 2 A 300 kHz", stage.Stage{Topology: stage.Boost, Vin: 12, Vout: 36, Iout: 2, Fsw: 300e3, Driver: stage.Driver{VOn: 10}}},
		{"hot buck 24→5 V 6 A, 85 °C, 10 K/W", stage.Stage{Topology: stage.Buck, Vin: 24, Vout: 5, Iout: 6, Fsw: 300e3, Driver: stage.Driver{VOn: 10}, Ambient: 85, RthCA: q.Some[q.ThermalResistance](10)}},
		{"light-load buck 12→3.3 V 0.5 A", stage.Stage{Topology: stage.Buck, Vin: 12, Vout: 3.3, Iout: 0.5, Fsw: 500e3, Driver: drv5}},
		{"class E 12 V 10 W 6.78 MHz Q 10", stage.Stage{Topology: stage.ClassE, Vin: 12, Pout: 10, Fsw: 6.78e6, QL: 10, Driver: drv5}},
		{"class D 48 V 50 W 1 MHz", stage.Stage{Topology: stage.ClassD, Vin: 48, Pout: 50, Fsw: 1e6, F0: 900e3, QL: 5, DeadTime: q.Some[q.Time](40e-9), Driver: drv5}},
	}
	out := make([]namedPoint, len(stages))
	for i, s := range stages {
		p, err := s.s.Resolve()
		if err != nil {
			t.Fatalf("%s: %v", s.name, err)
		}
		out[i] = namedPoint{s.name, p}
	}
	return out
}

// rankParts validates, prepares and ranks parts at pt; a part that fails
// validation or preparation is left out (set aside).
func rankParts(t *testing.T, parts []devices.Part, pt *stage.Point) []evaluate.Result {
	t.Helper()
	devs := make([]fit.Device, 0, len(parts))
	for i := range parts {
		if len(devices.Validate(&parts[i])) > 0 {
			continue
		}
		d, err := fit.Prepare(&parts[i])
		if err != nil {
			continue
		}
		devs = append(devs, d)
	}
	return rank.Rank(pt, devs, nil, rank.Options{Workers: 1})
}

// evaluatePart validates, prepares and evaluates one part at pt; false
// when the part is refused (set aside before evaluation).
func evaluatePart(p *devices.Part, pt *stage.Point) (evaluate.Result, bool) {
	if len(devices.Validate(p)) > 0 {
		return evaluate.Result{}, false
	}
	d, err := fit.Prepare(p)
	if err != nil {
		return evaluate.Result{}, false
	}
	return evaluate.Evaluate(pt, &d, nil, nil), true
}

// placeAmong is the place r would take in the ranking rs, the result of
// the same part left out.
func placeAmong(rs []evaluate.Result, r *evaluate.Result) int {
	n := 0
	for i := range rs {
		if rs[i].Dev.Part.Name != r.Dev.Part.Name && rank.CompareRef(&rs[i], r) < 0 {
			n++
		}
	}
	return n
}

// position is the place of part name in rs, −1 when it is not there.
func position(rs []evaluate.Result, name string) int {
	for i := range rs {
		if rs[i].Dev.Part.Name == name {
			return i
		}
	}
	return -1
}

// optionalSet lists the optional columns that part p gives.
func optionalSet(p *devices.Part) []string {
	required := map[string]bool{}
	for _, c := range devices.RequiredColumns() {
		required[c] = true
	}
	v := reflect.ValueOf(p).Elem()
	var out []string
	for i := 0; i < v.NumField(); i++ {
		tag := v.Type().Field(i).Tag.Get("csv")
		if tag == "" || tag == "-" || required[tag] || tag == "part" || tag == "notes" {
			continue
		}
		if !v.Field(i).IsZero() {
			out = append(out, tag)
		}
	}
	return out
}

// blank empties column col of part p, as a blank cell would.
func blank(p *devices.Part, col string) {
	v := reflect.ValueOf(p).Elem()
	for i := 0; i < v.NumField(); i++ {
		if v.Type().Field(i).Tag.Get("csv") == col {
			v.Field(i).SetZero()
			return
		}
	}
	panic("no column " + col)
}
