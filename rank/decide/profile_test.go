package decide

import (
	"math"
	"strings"
	"testing"

	q "swrank/devices/quantity"
	"swrank/rank"
	"swrank/rank/fit"
	"swrank/rank/internal/testkit"
	"swrank/rank/stage"
)

// The shipped weights against their published tables.
func TestWeightingsPublished(t *testing.T) {
	want := map[string][][2]float64{
		// European weighted efficiency as used by EN 50530: 0.03·η5 +
		// 0.06·η10 + 0.13·η20 + 0.10·η30 + 0.48·η50 + 0.20·η100.
		"euro": {{0.05, 0.03}, {0.10, 0.06}, {0.20, 0.13}, {0.30, 0.10}, {0.50, 0.48}, {1, 0.20}},
		// CEC inverter test protocol: 0.04·η10 + 0.05·η20 + 0.12·η30 +
		// 0.21·η50 + 0.53·η75 + 0.05·η100.
		"cec": {{0.10, 0.04}, {0.20, 0.05}, {0.30, 0.12}, {0.50, 0.21}, {0.75, 0.53}, {1, 0.05}},
		// External power supplies' average efficiency (from memory): the
		// plain mean at 25, 50, 75, 100 %.
		"quarters": {{0.25, 0.25}, {0.5, 0.25}, {0.75, 0.25}, {1, 0.25}},
		// Our own choice, labelled so.
		"10-20-50-100": {{0.1, 0.25}, {0.2, 0.25}, {0.5, 0.25}, {1, 0.25}},
	}
	ws := Weightings()
	if len(ws) != len(want) {
		t.Fatalf("%d weightings, want %d", len(ws), len(want))
	}
	for _, w := range ws {
		pts, ok := want[w.Name]
		if !ok {
			t.Errorf("unexpected weighting %q", w.Name)
			continue
		}
		sum := 0.0
		for i, p := range w.Points {
			sum += p.Weight
			if i >= len(pts) || float64(p.Load) != pts[i][0] || p.Weight != pts[i][1] {
				t.Errorf("%s point %d = %v, want %v", w.Name, i, p, pts)
			}
		}
		testkit.Within(t, w.Name+" weights sum", sum, 1, 1e-12)
		if w.Source == "" {
			t.Errorf("%s has no source", w.Name)
		}
		if g, err := ParseWeighting(strings.ToUpper(w.Name)); err != nil || g.Name != w.Name {
			t.Errorf("ParseWeighting(%q) = %v, %v", w.Name, g.Name, err)
		}
	}
	if !strings.Contains(ws[3].Source, "own choice") || !strings.Contains(ws[2].Source, "from memory") {
		t.Error("the unpublished profiles must say so")
	}
}

func TestParseWeighting(t *testing.T) {
	tests := []struct {
		in   string
		want [][2]float64
		err  string
	}{
		{in: "0.1:0.2, 0.5:0.5, 1:0.3", want: [][2]float64{{0.1, 0.2}, {0.5, 0.5}, {1, 0.3}}},
		{in: "100%:30, 10%:20, 50%:50", want: [][2]float64{{0.1, 0.2}, {0.5, 0.5}, {1, 0.3}}},
		{in: "0.5:1", want: [][2]float64{{0.5, 1}}},
		{in: "fancy", err: "not one of"},
		{in: "0.5:x", err: "weight"},
		{in: "0.5:1, 0.5:1", err: "twice"},
		{in: "0:1", err: "outside"},
		{in: "3:1", err: "outside"},
		{in: "0.5:0", err: "> 0"},
		{in: "0.5:-1, 1:2", err: "> 0"},
		{in: "0.5", err: "not one of"},
		{in: "0.5:1,", err: "not LOAD:WEIGHT"},
	}
	for _, tc := range tests {
		w, err := ParseWeighting(tc.in)
		if tc.err != "" {
			if err == nil || !strings.Contains(err.Error(), tc.err) {
				t.Errorf("ParseWeighting(%q) error %v, want one containing %q", tc.in, err, tc.err)
			}
			continue
		}
		if err != nil {
			t.Errorf("ParseWeighting(%q): %v", tc.in, err)
			continue
		}
		if len(w.Points) != len(tc.want) {
			t.Errorf("ParseWeighting(%q) = %v", tc.in, w.Points)
			continue
		}
		for i, p := range w.Points {
			testkit.Within(t, tc.in+" load", float64(p.Load), tc.want[i][0], 1e-12)
			testkit.Within(t, tc.in+" weight", p.Weight, tc.want[i][1], 1e-12)
		}
	}
}

// A profile keeps the inductor: the rated ripple in amperes stays put
// (ΔI = V_L·D/(L·f), Erickson & Maksimović 2001, ch. 2), so light loads
// reach forced-continuous (synchronous) or discontinuous (diode)
// conduction.
func TestScaleStage(t *testing.T) {
	for _, rect := range []stage.Rectifier{stage.Synchronous, stage.DiodeRect} {
		rated := stage.Stage{Topology: stage.Buck, Rectifier: rect, Vin: 12, Vout: 1.2, Iout: 10, Fsw: 500e3,
			Ripple: q.Some[q.Ratio](0.3), Driver: stage.Driver{VOn: 5}}
		for _, x := range []float64{1, 0.5, 0.2, 0.05} {
			s, err := ScaleStage(rated, q.Ratio(x))
			if err != nil {
				t.Fatal(err)
			}
			testkit.Within(t, "load current", float64(s.Iout), 10*x, 1e-12)
			testkit.Within(t, "output power", float64(s.Pout), 0, 0) // default Vout·Iout filled by Resolve
			pt, err := s.Resolve()
			if err != nil {
				t.Fatal(err)
			}
			testkit.Within(t, "output power", float64(pt.Stage.Pout), 12*x, 1e-12)
			wantMode := stage.ModeCCM
			if x < 0.15 { // the ripple 3 A exceeds twice the load below 1.5 A
				wantMode = stage.ModeFCCM
				if rect == stage.DiodeRect {
					wantMode = stage.ModeDCM
				}
			}
			if pt.Mode != wantMode {
				t.Errorf("%s at %g: mode %s, want %s", rect, x, pt.Mode, wantMode)
			}
			if pt.Mode != stage.ModeDCM {
				testkit.Within(t, "ripple", float64(pt.Ripple), 3, 1e-9)
			}
		}
	}
	// A custom stage scales its currents and power.
	c := stage.Stage{Topology: stage.Custom, Vblock: 48, Ion: 2, Ioff: 4, Irms: 3, Pout: 100, Fsw: 1e5, Driver: stage.Driver{VOn: 10}}
	s, err := ScaleStage(c, 0.25)
	if err != nil {
		t.Fatal(err)
	}
	if s.Ion != 0.5 || s.Ioff != 1 || s.Irms != 0.75 || s.Pout != 25 {
		t.Errorf("custom scaled: %+v", s)
	}
	if _, err := ScaleStage(c, 0); err == nil {
		t.Error("ScaleStage at 0 gave no error")
	}
}

// Weighted efficiency against its closed form, and against summed watts.
// Two parts in a custom cell with no current at the edges: P(x) = (20 A·x)²·R
// + f·E₁ (conduction and the per-cycle energy of the paralleling model,
// common practice), Pout

// = 1 kW·x. Part A (R 2.5 mΩ, E₁ 2.5 µJ: P = x² + 0.5 W) loses less in
// summed European-weighted watts (0.835 W against 0.937 W), part B (R
// 6.25 mΩ, E₁ 0.5 µJ: P = 2.5·x² + 0.1 W) has the higher weighted
// efficiency: the published weights apply to efficiencies (EN 50530), and
// they rank B first.
func TestWeightedEfficiency(t *testing.T) {
	mk := func(name string, r float64, e1 float64) fit.Device {
		p := testkit.CaseDPart()
		p.Name, p.RdsOn = name, q.Resistance(r)
		eoss := e1 - 100e-9 // the gate takes 10 nC·10 V per cycle
		p.Eoss, p.Qoss = q.Some(q.Energy(eoss)), q.Some(q.Charge(2*eoss/100))
		d, err := fit.Prepare(&p)
		if err != nil {
			t.Fatal(err)
		}
		return d
	}
	devs := []fit.Device{mk("part-a", 2.5e-3, 2.5e-6), mk("part-b", 6.25e-3, 0.5e-6)}
	rated := stage.Stage{Topology: stage.Custom, Vblock: 100, Irms: 20, Pout: 1000, Fsw: 200e3, Driver: stage.Driver{VOn: 10},
		TjFixed: q.Some[q.Temperature](25)}
	w, _ := ParseWeighting("euro")
	pr, err := ResolveProfile(rated, w, stage.LightLoad{})
	if err != nil {
		t.Fatal(err)
	}
	loss := []func(x float64) float64{
		func(x float64) float64 { return x*x + 0.5 },
		func(x float64) float64 { return 2.5*x*x + 0.1 },
	}
	for workers := 1; workers <= 2; workers++ {
		res := rankProfile(&pr, devs, nil, rank.Options{Workers: workers})
		if res[0].Dev.Part.Name != "part-b" {
			t.Errorf("first %s, want part-b", res[0].Dev.Part.Name)
		}
		for _, r := range res {
			k := 0
			if r.Dev.Part.Name == "part-b" {
				k = 1
			}
			var eta, frac, watts float64
			for _, p := range w.Points {
				x := float64(p.Load)
				eta += p.Weight * 1000 * x / (1000*x + loss[k](x))
				frac += p.Weight * loss[k](x) / (1000 * x)
				watts += p.Weight * loss[k](x)
			}
			testkit.Within(t, r.Dev.Part.Name+" weighted efficiency", r.Weighted, eta, 1e-12)
			testkit.Within(t, r.Dev.Part.Name+" weighted loss fraction", r.LossFraction, frac, 1e-9)
			var sum float64
			for i, p := range pr.Points {
				sum += p.Weight * float64(r.Results[i].Losses.Total())
			}
			testkit.Within(t, r.Dev.Part.Name+" weighted watts", sum, watts, 1e-9)
		}
		if math.Abs(res[0].Weighted-res[1].Weighted) < 1e-4 {
			t.Errorf("the case should separate the parts: %g vs %g", res[0].Weighted, res[1].Weighted)
		}
	}
	// The watts would have ranked A first.
	testkit.Within(t, "A watts", 0.334875+0.5, 0.834875, 1e-12)
	testkit.Within(t, "B watts", 2.5*0.334875+0.1, 0.9371875, 1e-12)
}

// Named points with any positive weights are scaled to sum to 1.
func TestNewProfile(t *testing.T) {
	st := stage.Stage{Topology: stage.Buck, Vin: 12, Vout: 3.3, Iout: 5, Fsw: 300e3, Driver: stage.Driver{VOn: 5}}
	a, err := st.Resolve()
	if err != nil {
		t.Fatal(err)
	}
	st.Iout = 1
	b, err := st.Resolve()
	if err != nil {
		t.Fatal(err)
	}
	pr, err := NewProfile("design", []WeightedPoint{{Name: "full", Weight: 3, Point: a}, {Name: "idle", Weight: 1, Point: b}})
	if err != nil {
		t.Fatal(err)
	}
	testkit.Within(t, "full weight", pr.Points[0].Weight, 0.75, 1e-12)
	testkit.Within(t, "idle weight", pr.Points[1].Weight, 0.25, 1e-12)
	if _, err := NewProfile("bad", []WeightedPoint{{Name: "x", Weight: 0, Point: a}}); err == nil {
		t.Error("zero weight accepted")
	}
	if _, err := NewProfile("empty", nil); err == nil {
		t.Error("empty profile accepted")
	}
}
