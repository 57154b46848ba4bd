package loss

import (
	"math"
	"testing"

	q "swrank/devices/quantity"
	"swrank/rank/internal/testkit"
)

// The ramp-driven RC's resistive energy over the step's ½·C·V², at the
// three regimes of the closed form (the series RC driven by a linear ramp,
// common practice): a step gives 1; an edge short against the gate
// 1 − y/3 + y²/12 (y = t_e/τ); an edge long against it 2τ/t_e, the adiabatic-charging
// limit E = (RC/T)·C·V² of Athas et al., IEEE Trans. VLSI Systems 2(4),
// 1994 (from memory). The middle row is the closed form by hand:
// x = 1, g = 2·[1 − (1 − e^(−1))] = 2/e.
func TestRampShare(t *testing.T) {
	cases := []struct {
		name      string
		tau, edge float64
		want, rel float64
	}{
		{"step", 1e-9, 0, 1, 0},
		{"edge short against the gate", 1e-9, 1e-12, 1 - 1e-3/3 + 1e-6/12, 1e-10},
		{"at the series' boundary", 1e-9, 1.0001e-12, 1 - 1.0001e-3/3 + 1.0001e-3*1.0001e-3/12, 1e-10},
		{"edge equal to τ", 1e-9, 1e-9, 2 / math.E, 1e-12},
		{"edge long against the gate", 1e-9, 1e-6, 2e-3, 1e-3},
		{"no resistance", 0, 1e-9, 0, 0},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			testkit.Within(t, "share", RampShare(q.Time(c.tau), q.Time(c.edge)), c.want, c.rel)
		})
	}
}

// The gate's delay behind a ramping driver, against the closed forms it
// comes from (the series RC driven by a linear ramp, common practice):
// with τ = 0 the gate follows the ramp; past the edge it is the step
// response from u(t_e) = 1 − (τ/t_e)·(1 − e^(−t_e/τ)); inside the edge
// u(t) = [t − τ·(1 − e^(−t/τ))]/t_e holds at the returned time; a step is
// GateDelay.
func TestGateDelayRamp(t *testing.T) {
	const te, tau = 2e-9, 1e-9
	ramp := DriveRamp{From: 0, To: 10, Edge: te}
	us := 1 - tau/te*(1-math.Exp(-te/tau))
	uAt := func(t float64) float64 { return (t - tau*(1-math.Exp(-t/tau))) / te }
	t.Run("follows the ramp", func(t *testing.T) {
		testkit.Within(t, "t", float64(GateDelayRamp(0, 1e-9, ramp, 2.5)), 0.5e-9, 1e-12)
	})
	t.Run("after the edge", func(t *testing.T) {
		want := te + tau*math.Log((1-us)/(1-0.9))
		testkit.Within(t, "t", float64(GateDelayRamp(1, 1e-9, ramp, 9)), want, 1e-12)
	})
	for _, v := range []float64{0.01, 1, 3, 10 * us * 0.999} {
		got := float64(GateDelayRamp(1, 1e-9, ramp, q.Voltage(v)))
		testkit.Within(t, "u at the returned time", uAt(got), v/10, 1e-9)
	}
	t.Run("falling edge", func(t *testing.T) {
		down := DriveRamp{From: 10, To: 0, Edge: te}
		testkit.Within(t, "t", float64(GateDelayRamp(1, 1e-9, down, 1)), float64(GateDelayRamp(1, 1e-9, ramp, 9)), 1e-12)
	})
	t.Run("step", func(t *testing.T) {
		step := DriveRamp{From: 0, To: 10}
		testkit.Within(t, "t", float64(GateDelayRamp(2, 1e-9, step, 5)), float64(GateDelay(2, 1e-9, 10, 0, 5)), 0)
	})
	if !math.IsInf(float64(GateDelayRamp(1, 1e-9, ramp, 11)), 1) || GateDelayRamp(1, 1e-9, ramp, -1) != 0 {
		t.Error("a level beyond the drive must be +Inf, one already passed 0")
	}
}

// The charge a ramping driver pushes into a gate held at a plateau, by
// hand: 0 → 10 V in 10 ns through 2 Ω into a 4 V plateau. The head turns
// positive at 4 ns and the current rises at 0.5 A/ns; by 10 ns the gate
// has 9 nC (½·3 A·6 ns), then 3 A. So 1 nC takes √(2·1/0.5) = 2 ns after
// 4 ns, 12 nC takes 10 ns + 1 ns; with a 1 A peak-current limit, the
// current caps at 6 ns (1 nC by then) and 2 nC takes 7 ns. A step is Q/I.
func TestRampChargeTime(t *testing.T) {
	ramp := DriveRamp{From: 0, To: 10, Edge: 10e-9}
	cases := []struct {
		name   string
		qq     float64
		ipk    float64
		t0     float64
		d      DriveRamp
		want   float64
		wantAt float64
	}{
		{"inside the edge", 1e-9, 0, 0, ramp, 6e-9, 1e-9},
		{"past the edge", 12e-9, 0, 0, ramp, 11e-9, 1e-9},
		{"from a start inside the edge", 12e-9 - 2.25e-9, 0, 7e-9, ramp, 4e-9, 1e-9},
		{"peak-current limit", 2e-9, 1, 0, ramp, 7e-9, 1e-9},
		{"step", 6e-9, 0, 0, DriveRamp{From: 0, To: 10}, 2e-9, 1e-12},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			got := RampChargeTime(q.Charge(c.qq), 2, q.Current(c.ipk), c.d, 4, q.Time(c.t0))
			testkit.Within(t, "t", float64(got), c.want, c.wantAt)
		})
	}
	down := DriveRamp{From: 10, To: 0, Edge: 10e-9}
	testkit.Within(t, "falling edge into a 6 V plateau", float64(RampChargeTime(1e-9, 2, 0, down, 6, 0)), 6e-9, 1e-9)
	if !math.IsInf(float64(RampChargeTime(1e-9, 2, 0, ramp, 10, 0)), 1) {
		t.Error("a plateau at the drive level must never charge")
	}
}

// The ramp moves the resistive energy into the driver and never changes
// what the driver's supply gives: the four shares add up to the total.
func TestSplitGateEnergyRamp(t *testing.T) {
	s := SplitGateEnergyRamp(10, 4, 2, 1, 1, 1, 0.5, 0.25)
	testkit.Within(t, "sum", float64(s.Driver+s.Rext+s.Rint+s.Edge), 10, 1e-12)
	testkit.Within(t, "edge", float64(s.Edge), 6*0.5+4*0.75, 1e-12)
	testkit.Within(t, "Rint", float64(s.Rint), 3*1.0/4+1*1.0/3, 1e-12)
}

// The displacement current of an off gate under the ideal class E drain
// swing, by hand: with θ from turn-off the switch voltage of Raab 1977
// (Q_L → ∞, 50 % duty) has dv/dθ = π·V_DD·(1 − (π/2)·sin θ + cos θ), so
// with a constant Cgd, E = R·ω·Cgd²·(π·V_DD)²·∫₀^π (…)² dθ and the
// integral is π³/8 − π/2 (Raab, "Idealized operation of the class E
// tuned power amplifier", IEEE Trans. CAS-24(12), 1977, the off-state
// voltage). The Miller law's depletion (one Crss point, m = ½) lowers it.
func TestSwingGateEnergy(t *testing.T) {
	const vdd, c, r = 12.0, 100e-12, 3.0
	w := 2 * math.Pi * 6.78e6
	slope := func(th float64) float64 { return math.Pi * vdd * (1 - math.Pi/2*math.Sin(th) + math.Cos(th)) }
	flat := KneeLaw(0, c, c)
	want := r * w * c * c * math.Pi * math.Pi * vdd * vdd * (math.Pow(math.Pi, 3)/8 - math.Pi/2)
	testkit.Within(t, "constant Cgd", float64(SwingGateEnergy(&flat, 0, r, w, math.Pi, slope)), want, 1e-5)
	testkit.Within(t, "no resistance", float64(SwingGateEnergy(&flat, 0, 0, w, math.Pi, slope)), 0, 0)
	law, err := FitMillerLaw(MillerData{Qgd: 2e-9, VQg: 20, Knee: 3, Crss: []CapPoint{{V: 20, C: 40e-12}}, M: 0.5, Phi: 0.7, VMax: 60})
	if err != nil {
		t.Fatal(err)
	}
	// The same integral with the closed-form voltage of the swing,
	// v = π·V_DD·(θ − (π/2)·(1 − cos θ) + sin θ), on a fine grid.
	v := func(th float64) float64 { return math.Pi * vdd * (th - math.Pi/2*(1-math.Cos(th)) + math.Sin(th)) }
	const n = 200000
	ref, h := 0.0, math.Pi/n
	for k := 0; k < n; k++ {
		th := (float64(k) + 0.5) * h
		cg := float64(law.C(q.Voltage(v(th)) + law.Knee()))
		ref += cg * cg * slope(th) * slope(th) * h
	}
	ref *= r * w
	testkit.Within(t, "Miller law", float64(SwingGateEnergy(&law, 0, r, w, math.Pi, slope)), ref, 2.5e-2) // the midpoint rule on a piecewise-constant law: 1.9 % here
}
