package decide

import (
	"bytes"
	"math"
	"testing"

	"swrank/devices"
	q "swrank/devices/quantity"
	"swrank/devices/synth"
	"swrank/rank"
	"swrank/rank/fit"
	"swrank/rank/internal/testkit"
	"swrank/rank/stage"
)

// linearParts are invented parts whose stage loss in a custom cell with no
// current at its edges is exactly P(f) = I_rms²·R + f·E₁ at a pinned
// junction temperature (conduction plus the per-cycle output-capacitance
// and gate energy; hand calculation from that sum): with I_rms = 10 A,
//
//	A: R 2 mΩ, E₁ 2 µJ     → 0.2 W + 2e-6 J·f
//	B: R 4 mΩ, E₁ 1 µJ     → 0.4 W + 1e-6 J·f
//	C: R 8 mΩ, E₁ 0.25 µJ  → 0.8 W + 0.25e-6 J·f
//
// so that the best part changes from A to B at f = 0.2/1e-6 = 200 kHz and
// from B to C at f = 0.4/0.75e-6 = 533.333 kHz (analytic: a + b·f lines).
func linearParts(t testing.TB) []*fit.Device {
	mk := func(name string, r, e1 float64) *fit.Device {
		p := testkit.CaseDPart()
		p.Name, p.RdsOn = name, q.Resistance(r)
		eoss := e1 - 100e-9 // the gate takes 10 nC·10 V per cycle
		p.Eoss, p.Qoss = q.Some(q.Energy(eoss)), q.Some(q.Charge(2*eoss/100))
		d, err := fit.Prepare(&p)
		if err != nil {
			t.Fatal(err)
		}
		return &d
	}
	return []*fit.Device{mk("lin-a", 2e-3, 2e-6), mk("lin-b", 4e-3, 1e-6), mk("lin-c", 8e-3, 0.25e-6)}
}

func linearStage() stage.Stage {
	return stage.Stage{Topology: stage.Custom, Vblock: 100, Irms: 10, Fsw: 100e3, Driver: stage.Driver{VOn: 10},
		TjFixed: q.Some[q.Temperature](25)}
}

func TestSweepLinearCrossovers(t *testing.T) {
	devs := linearParts(t)
	want := []struct {
		x        float64
		from, to int
	}{{200e3, 0, 1}, {0.4 / 0.75e-6, 1, 2}}
	for _, tc := range []struct {
		name  string
		steps int
		log   bool
	}{
		{"fine log grid", 41, true},
		{"linear grid", 50, false},
		// Three points: 10 kHz, 100 kHz, 1 MHz. B is best at none of them;
		// the search must find it between 100 kHz and 1 MHz.
		{"coarse grid hiding B", 3, true},
	} {
		t.Run(tc.name, func(t *testing.T) {
			for _, workers := range []int{1, 2} {
				sw, err := Sweep(linearStage(), stage.LightLoad{}, SweepSpec{Var: SweepFsw, Lo: 10e3, Hi: 1e6, Steps: tc.steps, Log: tc.log},
					devs, nil, rank.Options{Workers: workers})
				if err != nil {
					t.Fatal(err)
				}
				for i, x := range sw.X {
					for k, l := range []func(f float64) float64{
						func(f float64) float64 { return 0.2 + 2e-6*f },
						func(f float64) float64 { return 0.4 + 1e-6*f },
						func(f float64) float64 { return 0.8 + 0.25e-6*f },
					} {
						got, ok := sw.Total(k, i)
						if !ok {
							t.Fatalf("%s screened at %g Hz", devs[k].Part.Name, x)
						}
						testkit.Within(t, "loss", got, l(x), 1e-9)
					}
				}
				cs, err := sw.Crossovers([]int{0, 1, 2})
				if err != nil {
					t.Fatal(err)
				}
				if len(cs) != len(want) {
					t.Fatalf("%d crossovers %+v, want %d", len(cs), cs, len(want))
				}
				for i, w := range want {
					c := cs[i]
					if c.From != w.from || c.To != w.to || c.Kind != CrossLoss {
						t.Errorf("crossover %d: %s → %s (%s), want %s → %s", i, devs[c.From].Part.Name, devs[c.To].Part.Name, c.Kind,
							devs[w.from].Part.Name, devs[w.to].Part.Name)
					}
					if math.Abs(c.X-w.x) > 1e-6*w.x {
						t.Errorf("crossover %d at %.9g Hz, want %.9g Hz within 1e-6", i, c.X, w.x)
					}
				}
			}
		})
	}
}

// A sweep over the input (blocking) voltage of the same cell: the
// per-cycle energy of a linear output capacitance is ½·C·V², so the losses
// are a + b·V² and cross where the two quadratics meet (analytic).
func TestSweepVinQuadratic(t *testing.T) {
	devs := linearParts(t)[:2]
	// At V and f = 100 kHz: A = 0.2 + f·(1.9e-6·(V/100)² + 1e-7) W,
	// B = 0.4 + f·(0.9e-6·(V/100)² + 1e-7) W; A − B = f·1e-6·(V/100)² − 0.2
	// vanishes at (V/100)² = 2, V = 141.42 V.
	sw, err := Sweep(linearStage(), stage.LightLoad{}, SweepSpec{Var: SweepVin, Lo: 50, Hi: 150, Steps: 11}, devs, nil, rank.Options{Workers: 1})
	if err != nil {
		t.Fatal(err)
	}
	cs, err := sw.Crossovers([]int{0, 1})
	if err != nil {
		t.Fatal(err)
	}
	if len(cs) != 1 {
		t.Fatalf("crossovers %+v", cs)
	}
	testkit.Within(t, "crossover voltage", cs[0].X, 100*math.Sqrt2, 1e-6)
}

// A screen sets a part aside at a gate drive above its vgs_max: the best
// part changes there, exactly at the rating (the screen is drive >
// vgs_max), and the crossover says so.
func TestSweepScreenCrossover(t *testing.T) {
	devs := linearParts(t)[:2]
	p := *devs[0].Part
	p.VgsMax = 12.5
	a, err := fit.Prepare(&p)
	if err != nil {
		t.Fatal(err)
	}
	devs[0] = &a
	sw, err := Sweep(linearStage(), stage.LightLoad{}, SweepSpec{Var: SweepVdrive, Lo: 8, Hi: 16, Steps: 9}, devs, nil, rank.Options{Workers: 1})
	if err != nil {
		t.Fatal(err)
	}
	cs, err := sw.Crossovers([]int{0, 1})
	if err != nil {
		t.Fatal(err)
	}
	if len(cs) != 1 || cs[0].Kind != CrossScreen || cs[0].From != 0 || cs[0].To != 1 {
		t.Fatalf("crossovers %+v", cs)
	}
	testkit.Within(t, "screen at vgs_max", cs[0].X, 12.5, 1e-6)
}

// An iout sweep of a synchronous buck keeps the inductor of the rated (top)
// end and runs forced-continuous below the boundary IL = ΔI/2.
func TestSweepIoutModes(t *testing.T) {
	p := testkit.LightPart()
	d, err := fit.Prepare(&p)
	if err != nil {
		t.Fatal(err)
	}
	base := stage.Stage{Topology: stage.Buck, Vin: 12, Vout: 1.2, Fsw: 500e3, Ripple: q.Some[q.Ratio](0.3),
		Driver: stage.Driver{VOn: 5}, TjFixed: q.Some[q.Temperature](25)}
	sw, err := Sweep(base, stage.LightLoad{}, SweepSpec{Var: SweepIout, Lo: 0.5, Hi: 10, Steps: 20}, []*fit.Device{&d}, nil, rank.Options{})
	if err != nil {
		t.Fatal(err)
	}
	for i, x := range sw.X {
		testkit.Within(t, "ripple kept", float64(sw.Pts[i].Ripple), 3, 1e-9)
		want := stage.ModeCCM
		if x < 1.5 {
			want = stage.ModeFCCM
		}
		if sw.Pts[i].Mode != want {
			t.Errorf("at %g A: mode %s, want %s", x, sw.Pts[i].Mode, want)
		}
	}
	if len(sw.Notes) == 0 {
		t.Error("no note of the kept inductor")
	}
}

func TestSweepSpecErrors(t *testing.T) {
	for _, s := range []SweepSpec{
		{Lo: 1, Hi: 2, Steps: 1}, {Lo: 2, Hi: 1, Steps: 3}, {Lo: 0, Hi: 1, Steps: 3, Log: true},
		{Lo: math.NaN(), Hi: 1, Steps: 3}, {Lo: 1, Hi: 2, Steps: MaxSweepSteps + 1},
	} {
		if _, err := s.Grid(); err == nil {
			t.Errorf("Grid(%+v) gave no error", s)
		}
	}
	g, err := SweepSpec{Lo: 1e3, Hi: 1e6, Steps: 4, Log: true}.Grid()
	if err != nil {
		t.Fatal(err)
	}
	for i, w := range []float64{1e3, 1e4, 1e5, 1e6} {
		testkit.Within(t, "log grid", g[i], w, 1e-12)
	}
	if _, err := ParseSweepVar("temperature"); err == nil {
		t.Error("ParseSweepVar accepted an unknown variable")
	}
	s := linearStage()
	if err := SweepIout.Apply(&s, 3); err == nil {
		t.Error("iout sweep of a custom stage accepted")
	}
}

// BenchmarkSweep10kx200 sweeps 10,000 synthetic parts over 200 frequencies
// of a synchronous buck and finds every crossover of the best part (the
// target is 2 s on 2 cores).
func BenchmarkSweep10kx200(b *testing.B) {
	var buf bytes.Buffer
	if err := synth.Generate(&buf, 10000, 1); err != nil {
		b.Fatal(err)
	}
	lib, err := devices.Read(&buf, "synth")
	if err != nil {
		b.Fatal(err)
	}
	devs := make([]fit.Device, len(lib.Parts))
	ptrs := make([]*fit.Device, len(lib.Parts))
	set := make([]int, len(lib.Parts))
	for i := range lib.Parts {
		if devs[i], err = fit.Prepare(&lib.Parts[i]); err != nil {
			b.Fatal(err)
		}
		ptrs[i], set[i] = &devs[i], i
	}
	base := stage.Stage{Topology: stage.Buck, Vin: 12, Vout: 1.2, Iout: 10, Fsw: 500e3, Driver: stage.Driver{VOn: 5}, Ambient: 40}
	spec := SweepSpec{Var: SweepFsw, Lo: 50e3, Hi: 5e6, Steps: 200, Log: true}
	b.ResetTimer()
	var n int
	for b.Loop() {
		sw, err := Sweep(base, stage.LightLoad{}, spec, ptrs, nil, rank.Options{})
		if err != nil {
			b.Fatal(err)
		}
		cs, err := sw.Crossovers(set)
		if err != nil {
			b.Fatal(err)
		}
		n = len(cs)
	}
	b.ReportMetric(float64(n), "crossovers")
	b.ReportMetric(float64(len(devs)*spec.Steps)*float64(b.N)/b.Elapsed().Seconds(), "evals/s")
}
