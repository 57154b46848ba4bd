package decide

import (
	"reflect"
	"strings"
	"testing"

	"swrank/devices"
	q "swrank/devices/quantity"
	"swrank/rank/evaluate"
	"swrank/rank/fit"
	"swrank/rank/internal/testkit"
	"swrank/rank/stage"
)

// Hand calculation from P(N) = I_rms²·R₁/N + N·f·E₁ (paralleled identical
// devices, common practice):
// I_rms 20 A, R₁ 4 mΩ, E₁ 2 µJ, 200 kHz → P(N) = 2.0, 1.6, 1.733, 2.0 W for
// N = 1..4 and N_opt = √(I²R₁/(f·E₁)) = 2. The stage is a custom cell with
// no current at its edges (no overlap), so only conduction, the output
// capacitance and the gate drive remain.
func TestParallelHandCaseD(t *testing.T) {
	p := testkit.CaseDPart()
	d, err := fit.Prepare(&p)
	if err != nil {
		t.Fatal(err)
	}
	st := stage.Stage{Topology: stage.Custom, Vblock: 100, Irms: 20, Fsw: 200e3, Driver: stage.Driver{VOn: 10},
		TjFixed: q.Some[q.Temperature](25)}
	pt, err := st.Resolve()
	if err != nil {
		t.Fatal(err)
	}
	want := []float64{2.0, 1.6, 1.6/3 + 1.2, 2.0}
	c, err := bestParallel(&pt, &d, nil, 4)
	if err != nil {
		t.Fatal(err)
	}
	for i, w := range want {
		testkit.Within(t, "P("+string(rune('1'+i))+")", float64(c.Totals[i]), w, 1e-9)
		if !c.Passing[i] {
			t.Errorf("N = %d screened", i+1)
		}
	}
	if c.N != 2 {
		t.Errorf("best N = %d, want 2", c.N)
	}
	if got := parallelOptimum(1.6, 0.4, 10); got != 2 {
		t.Errorf("parallelOptimum(1.6 W, 0.4 W) = %d, want 2", got)
	}
	testkit.Within(t, "single", float64(c.Single.Losses.Total()), 2.0, 1e-9)
	if !strings.HasSuffix(c.Dev.Part.Name, "×2") {
		t.Errorf("paralleled name %q", c.Dev.Part.Name)
	}
}

// parallelOptimum against the closed form N* = √(A/B) and brute force.
func TestParallelOptimum(t *testing.T) {
	tests := []struct {
		a, b  float64
		limit int
	}{
		{1.6, 0.4, 10}, {10, 0.1, 20}, {10, 0.1, 5}, {1, 1, 4}, {0.1, 1, 4}, {7, 0.3, 64}, {2, 0, 8}, {0, 2, 8},
	}
	for _, tc := range tests {
		bestN, bestP := 1, 0.0
		for n := 1; n <= tc.limit; n++ {
			p := tc.a/float64(n) + float64(n)*tc.b
			if n == 1 || p < bestP-1e-15 {
				bestN, bestP = n, p
			}
		}
		if got := parallelOptimum(q.Power(tc.a), q.Power(tc.b), tc.limit); got != bestN {
			t.Errorf("parallelOptimum(%g, %g, %d) = %d, want %d", tc.a, tc.b, tc.limit, got, bestN)
		}
	}
}

// n devices carrying n times the current, driven by a driver of negligible
// resistance, switch in the time one device takes with its own share: n·Q
// through Rg,int/n is Q through Rg,int, and each device's Miller plateau
// sits at its own share of the current. A real driver resistance slows the
// n-fold charge (gate-charge method, Balogh, "Fundamentals of MOSFET and
// IGBT gate driver circuits", 2001).
func TestParallelEdges(t *testing.T) {
	p := testkit.LightPart()
	d, err := fit.Prepare(&p)
	if err != nil {
		t.Fatal(err)
	}
	overlap := func(rs q.Resistance, n int) float64 {
		i := q.Current(10 * n)
		st := stage.Stage{Topology: stage.Custom, Vblock: 12, Ion: i, Ioff: i, Irms: i / 2, Fsw: 500e3,
			Driver: stage.Driver{VOn: 5, RSource: rs, RSink: rs}, TjFixed: q.Some[q.Temperature](25)}
		pt, err := st.Resolve()
		if err != nil {
			t.Fatal(err)
		}
		dn, err := Parallel(&d, n)
		if err != nil {
			t.Fatal(err)
		}
		l := evaluate.Evaluate(&pt, &dn, nil, nil).Losses
		return float64(l.TurnOn + l.TurnOff)
	}
	one := overlap(1e-9, 1)
	testkit.Within(t, "ideal driver, 3 devices at 3× the current", overlap(1e-9, 3), 3*one, 1e-6)
	if a, b := overlap(2, 1), overlap(2, 3); !(b > 3*a) {
		t.Errorf("2 Ω driver: overlap %g W with 3 devices at 30 A, 3 × %g W with 1 at 10 A: want slower edges", b, a)
	}
}

// Thermal sharing: each device's own junction-to-ambient resistance carries
// 1/N of the loss, Tj = Ta + Rth·P/N (one-resistance thermal model, IEC
// 60747-8 thermal characteristics).
func TestParallelThermal(t *testing.T) {
	p := testkit.CaseDPart()
	d, err := fit.Prepare(&p)
	if err != nil {
		t.Fatal(err)
	}
	st := stage.Stage{Topology: stage.Custom, Vblock: 100, Irms: 8, Fsw: 200e3, Driver: stage.Driver{VOn: 10}, Ambient: 40}
	pt, err := st.Resolve()
	if err != nil {
		t.Fatal(err)
	}
	for _, n := range []int{1, 2, 3} {
		dn, err := Parallel(&d, n)
		if err != nil {
			t.Fatal(err)
		}
		r := evaluate.Evaluate(&pt, &dn, nil, nil)
		tj, ok := r.Tj()
		if !ok {
			t.Fatalf("N = %d: no junction temperature", n)
		}
		testkit.Within(t, "Tj rise", float64(tj-40), 40/float64(n)*float64(r.Losses.Switch()), 1e-5)
	}
}

// Every column of the parts library is either scaled with the count or
// left alone: a new column must be classified here (and in ParallelPart).
func TestParallelPartColumns(t *testing.T) {
	scale := map[string]float64{
		"IdMax": 3, "IdPulse": 3, "Qg": 3, "QgId": 3, "QgMax": 3, "Qgs": 3, "Qgd": 3, "QgTh": 3,
		"Ciss": 3, "Coss": 3, "Crss": 3, "Qoss": 3, "Eoss": 3, "EossLoss": 3, "TswId": 3, "VsdIf": 3,
		"Qrr": 3, "QrrIf": 3, "QrrDidt": 3, "QrrHot": 3, "Gfs": 3, "GfsId": 3, "Coss2": 3, "Crss2": 3, "Irrm": 3,
		"Qg2": 3, "RdsOnId": 3, "VgsThId": 3,
		"RthJA": 1.0 / 3, "RthJC": 1.0 / 3, "RdsOn": 1.0 / 3, "RdsOnMax": 1.0 / 3, "RdsOn2": 1.0 / 3,
		"RdsHot": 1.0 / 3, "RgInt": 1.0 / 3, "TswRg": 1.0 / 3, "TswRgen": 1.0 / 3, "Lcs": 1.0 / 3, "Lloop": 1.0 / 3,
	}
	same := map[string]bool{
		"Package": true, "Technology": true, "Notes": true, "VdsMax": true, "VgsMax": true, "VgsMin": true,
		"TjMax": true, "VgsTh": true, "VgsThMax": true, "VgsThHot": true, "VgsThHotTj": true, "VsdHot": true, "VsdHotTj": true, "RdsOnVgs": true, "RdsOnTj": true, "RdsOn2Vgs": true,
		"RdsHotTj": true, "RdsCurve": true, "RdsDyn": true, "RdsDynVds": true, "QgVgs": true, "Qg2Vgs": true, "QgVds": true,
		"VPlateau": true, "CapVds": true, "Cap2Vds": true, "OssVds": true, "EossLossVds": true, "Tr": true, "TdOn": true, "TdOff": true, "QrrVr": true, "Tf": true,
		"TswVdd": true, "TswVgs": true, "Vsd": true, "QrrTj": true, "QrrHotTj": true, "Trr": true, "QrrHasCoss": true, "Line": true,
		// The one device's simulation model, kept (swrank verify takes
		// no paralleled parts).
		"SpiceModel": true, "SpiceSubckt": true, "SpicePins": true,
	}
	// A part with every numeric column at 2 and every optional one given.
	var p devices.Part
	pv := reflect.ValueOf(&p).Elem()
	for i := range pv.NumField() {
		f := pv.Field(i)
		switch {
		case f.Kind() == reflect.Float64:
			f.SetFloat(2)
		case f.Kind() == reflect.Struct && f.NumField() == 2 && f.Field(1).Kind() == reflect.Bool && f.Field(0).Kind() == reflect.Float64:
			f.Field(0).SetFloat(2)
			f.Field(1).SetBool(true)
		}
	}
	p.Name, p.Price = "cols", devices.Price{V: 1.5, OK: true}
	p.CossCurve, p.CrssCurve = "1:2e-9 10:5e-10", "1:4e-10 10:1e-10"
	c, err := ParallelPart(&p, 3)
	if err != nil {
		t.Fatal(err)
	}
	cv := reflect.ValueOf(c)
	typ := pv.Type()
	for i := range typ.NumField() {
		name := typ.Field(i).Name
		switch name {
		case "Name":
			if c.Name != "cols ×3" {
				t.Errorf("name %q", c.Name)
			}
			continue
		case "Price":
			testkit.Within(t, "price", c.Price.V, 4.5, 1e-12)
			continue
		case "CossCurve", "CrssCurve": // the capacitances ×3, the voltages kept
			want := map[string]string{"CossCurve": "1:6e-09 10:1.5e-09", "CrssCurve": "1:1.2e-09 10:3e-10"}[name]
			if got := cv.Field(i).String(); got != want {
				t.Errorf("%s %q, want %q", name, got, want)
			}
			continue
		}
		k, scaled := scale[name]
		if !scaled && !same[name] {
			t.Errorf("column field %s is not classified for paralleling", name)
			continue
		}
		if !scaled {
			k = 1
		}
		f := cv.Field(i)
		var got float64
		switch {
		case f.Kind() == reflect.Float64:
			got = f.Float()
		case f.Kind() == reflect.Struct && f.NumField() == 2 && f.Field(0).Kind() == reflect.Float64:
			got = f.Field(0).Float()
		default:
			if !reflect.DeepEqual(f.Interface(), pv.Field(i).Interface()) {
				t.Errorf("%s changed", name)
			}
			continue
		}
		testkit.Within(t, name, got, 2*k, 1e-12)
	}
	if _, err := ParallelPart(&p, 0); err == nil {
		t.Error("ParallelPart(0) gave no error")
	}
	if _, err := ParallelPart(&p, MaxParallel+1); err == nil {
		t.Error("ParallelPart(MaxParallel+1) gave no error")
	}
}
