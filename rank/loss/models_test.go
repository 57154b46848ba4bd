package loss

import (
	"math"
	"testing"

	q "swrank/devices/quantity"
	"swrank/rank/internal/testkit"
)

// Hand calculation from
// the gate-charge method of Erickson & Maksimović, Fundamentals of Power
// Electronics, 2nd ed., ch. 4, and Balogh 2001: 12 V, 10 A, 500 kHz,
// Qgs2 1 nC, Qgd 2 nC, Vpl 2.5 V, Vth 1.8 V, 5 V drive, Rsrc 2 Ω, Rsnk 1 Ω,
// Rg,int 1 Ω. Both variants to 0.1 %.
func TestGateChargeTransitionsByHand(t *testing.T) {
	loop := GateLoop{VOn: 5, VOff: 0, ROn: 2 + 1, ROff: 1 + 1}
	cases := []struct {
		name                   string
		mean                   bool
		tir, tvf, tvr, tif, pw float64
	}{
		// Plateau-current variant: t_on 3.600 ns, t_off 2.400 ns, P_sw 0.1800 W.
		{"plateau current", false, 1.2e-9, 2.4e-9, 1.6e-9, 0.8e-9, 0.1800},
		// Refined (mean gate voltage while the current moves): t_ir 1.053,
		// t_vf 2.400, t_vr 1.600, t_if 0.930 ns; P_sw 0.1795 W.
		{"mean gate voltage", true, 1.0526e-9, 2.4e-9, 1.6e-9, 0.9302e-9, 0.1795},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			tr := GateChargeTransitions(1e-9, 2e-9, 1.8, 2.5, loop, c.mean)
			testkit.Near(t, "t_ir", float64(tr.Tir), c.tir, 1e-3)
			testkit.Near(t, "t_vf", float64(tr.Tvf), c.tvf, 1e-3)
			testkit.Near(t, "t_vr", float64(tr.Tvr), c.tvr, 1e-3)
			testkit.Near(t, "t_if", float64(tr.Tif), c.tif, 1e-3)
			e := OverlapEnergy(12, 10, tr.Tir, tr.Tvf) + OverlapEnergy(12, 10, tr.Tvr, tr.Tif)
			testkit.Near(t, "P_sw", float64(e)*500e3, c.pw, 1e-3)
		})
	}
	// E_on 216.0 nJ and E_off 144.0 nJ in the plateau-current variant.
	tr := GateChargeTransitions(1e-9, 2e-9, 1.8, 2.5, loop, false)
	testkit.Near(t, "E_on", float64(OverlapEnergy(12, 10, tr.Tir, tr.Tvf)), 216e-9, 1e-3)
	testkit.Near(t, "E_off", float64(OverlapEnergy(12, 10, tr.Tvr, tr.Tif)), 144e-9, 1e-3)
}

// Gate-drive split, by hand with the half-per-edge rule (Balogh 2001):
// P_G = Qg·V·f = 8 nC·5 V·500 kHz = 20.00 mW; driver 11.667 mW, Rg,int
// 8.333 mW.
func TestSplitGateEnergyHalfPerEdge(t *testing.T) {
	total := q.Energy(8e-9 * 5)
	s := SplitGateEnergy(total, total/2, 2, 1, 0, 1)
	testkit.Near(t, "driver", float64(s.Driver)*500e3, 11.667e-3, 1e-3)
	testkit.Near(t, "rint", float64(s.Rint)*500e3, 8.333e-3, 1e-3)
	testkit.Near(t, "sum", float64(s.Driver+s.Rext+s.Rint)*500e3, 20.00e-3, 1e-9)
}

// The stored gate energy over a piecewise-linear curve, worked by hand from
// the definition E = ∫(v − Voff)·dQ (Balogh 2001): the gate curve of the
// hand-calculated buck
// (Qth 1 nC to 1.8 V, Qgs2 1 nC to 2.5 V, Qgd 2 nC at 2.5 V, then 1.6 nF to
// 5 V): 1n·0.9 + 1n·2.15 + 2n·2.5 + 4n·3.75 = 23.05 nJ. A linear gate stores
// half of Q·V: 20 nJ of 40 nJ.
func TestGateCurveStoredEnergy(t *testing.T) {
	c := GateCurve{Qth: 1e-9, Qgs2: 1e-9, Qgd: 2e-9, Vth: 1.8, Vpl: 2.5, Slope: 1.6e-9}
	testkit.Near(t, "Qg(5 V)", float64(c.Charge(5)), 8e-9, 1e-12)
	testkit.Near(t, "E stored", float64(c.StoredEnergy(0, 5)), 23.05e-9, 1e-9)
	testkit.Near(t, "E total", float64(GateEnergy(c, 0, 5)), 40e-9, 1e-12)
	// Bipolar drive −3 V to 5 V: the first segment continues below 0 V
	// (slope 1n/1.8 F): Q(−3) = −1.6667 nC; ΔQ = 9.6667 nC, E = ΔQ·8 V.
	testkit.Near(t, "E total bipolar", float64(GateEnergy(c, -3, 5)), (8e-9+3e-9/1.8)*8, 1e-9)
	lin := GateCurve{Qth: 1e-9, Qgs2: 1e-9, Qgd: 0, Vth: 1, Vpl: 2, Slope: 1e-9}
	testkit.Near(t, "E stored linear", float64(lin.StoredEnergy(0, 4)), 0.5*4e-9*4, 1e-9)
}

// Output capacitance with the √ law, Erickson & Maksimović ch. 4 (C(V) =
// C0·√(V0/V): Q = 2·C(V)·V, E = (2/3)·C(V)·V²); hand calculations from
// that law.
func TestOssSqrtLaw(t *testing.T) {
	// A: 400 pF at 12 V → Q_oss 9.60 nC; identical devices: V·Q_oss per
	// hard turn-on → 57.6 mW at 500 kHz.
	a := OssFromCapacitance(400e-12, 12, 0.5)
	testkit.Near(t, "A Q_oss", float64(a.Q(12)), 9.6e-9, 1e-9)
	e := HardTurnOnCossEnergy(a.E(12), 12, a.Q(12), a.E(12))
	testkit.Near(t, "A P", float64(e)*500e3, 57.6e-3, 1e-9)
	// B: 500 pF at 48 V → Q_oss 48.0 nC, E_oss 0.768 µJ, 2.304 µJ per hard
	// turn-on → 1.152 W at 500 kHz (½CV²·f would say 0.288 W).
	b := OssFromCapacitance(500e-12, 48, 0.5)
	testkit.Near(t, "B Q_oss", float64(b.Q(48)), 48e-9, 1e-9)
	testkit.Near(t, "B E_oss", float64(b.E(48)), 0.768e-6, 1e-9)
	eb := HardTurnOnCossEnergy(b.E(48), 48, b.Q(48), b.E(48))
	testkit.Near(t, "B E/turn-on", float64(eb), 2.304e-6, 1e-9)
	testkit.Near(t, "B P", float64(eb)*500e3, 1.152, 1e-9)
	// A linear capacitor (E = ½·Q·V, so the fitted exponent is 0).
	l := OssFromChargeEnergy(100e-9, 0.5*100e-9*50, 50)
	testkit.Near(t, "linear N", l.N, 0, 1e-12)
	testkit.Near(t, "linear Q(25)", float64(l.Q(25)), 50e-9, 1e-9)
	// A √-law part stated by its charge and energy recovers N = ½
	// (E = Q·V/3 for the √ law).
	s := OssFromChargeEnergy(9.6e-9, 9.6e-9*12/3, 12)
	testkit.Near(t, "sqrt N", s.N, 0.5, 1e-9)
}

// Recovery and dead time, by hand: Qrr 20 nC at 12 V, 500 kHz → 0.1200 W
// (Graovac et al. 2006); dead time 2 × 20 ns at Vsd 0.8 V and 10 A → 0.1600 W.
func TestRecoveryAndDeadTime(t *testing.T) {
	testkit.Near(t, "recovery", float64(RecoveryEnergy(20e-9, 12))*500e3, 0.12, 1e-9)
	testkit.Near(t, "dead time", float64(DeadTimeEnergy(0.8, 10, 20e-9, 0.8, 10, 20e-9))*500e3, 0.16, 1e-9)
	testkit.Near(t, "conduction", float64(Conduction(q.Current(math.Sqrt(0.1*100)), 5e-3)), 0.05, 1e-9)
}

// The datasheet-time fallback (hand calculation from the gate-charge
// method): a 10-90 % time is 0.8 of the full transition; doubling the loop
// resistance doubles the time, halving the headroom doubles it too.
func TestScaleSwitchingTime(t *testing.T) {
	cases := []struct {
		rs, rn q.Resistance
		hs, hn q.Voltage
		want   float64
	}{
		{4, 4, 5, 5, 10e-9 / 0.8},
		{4, 8, 5, 5, 20e-9 / 0.8},
		{4, 4, 5, 2.5, 20e-9 / 0.8},
		{0, 8, 0, 2.5, 10e-9 / 0.8}, // unknown test loop: not rescaled
	}
	for _, c := range cases {
		testkit.Near(t, "t", float64(ScaleSwitchingTime(10e-9, c.rs, c.rn, c.hs, c.hn)), c.want, 1e-12)
	}
}

// The square-law plateau shift (common practice, from the long-channel
// saturation law I = k(Vgs − Vth)², Sze & Ng ch. 6): four times the current
// doubles the overdrive.
func TestPlateauAt(t *testing.T) {
	testkit.Near(t, "4× current", float64(PlateauAt(2, 3, 10, 40)), 4, 1e-12)
	testkit.Near(t, "same current", float64(PlateauAt(2, 3, 10, 10)), 3, 1e-12)
	testkit.Near(t, "Miller charge at 4× voltage", float64(MillerChargeAt(10e-9, 25, 100)), 20e-9, 1e-12)
}

// The two-point gate law passes through both points (R0 + k/(Vgs − Vth),
// Sze & Ng ch. 6 channel resistance), by construction checked numerically.
func TestFitGateLaw(t *testing.T) {
	g, ok := FitGateLaw(10, 5e-3, 4.5, 7e-3, 2)
	if !ok {
		t.Fatal("fit rejected")
	}
	testkit.Near(t, "R(10)", float64(g.At(10)), 5e-3, 1e-12)
	testkit.Near(t, "R(4.5)", float64(g.At(4.5)), 7e-3, 1e-12)
	// Hand: x1 = 1/8, x2 = 1/2.5; k = −2m/(0.125 − 0.4) = 7.2727 mΩ·V;
	// R0 = 5m − k/8 = 4.0909 mΩ.
	testkit.Near(t, "R0", float64(g.R0), 4.0909e-3, 1e-4)
}

// Derating of the continuous current with case temperature (common
// practice: I = √((Tj,max − Tc)/(Rth,jc·R(Tj,max)))): at Tc = 100 °C with
// Tj,max 175 °C the rating falls to √(75/150) = 0.7071 of the 25 °C value.
func TestCurrentRatingAt(t *testing.T) {
	testkit.Near(t, "100 °C", float64(CurrentRatingAt(100, 175, 100)), 70.71, 1e-3)
	testkit.Near(t, "25 °C", float64(CurrentRatingAt(100, 175, 25)), 100, 1e-12)
	testkit.Near(t, "at Tj,max", float64(CurrentRatingAt(100, 175, 175)), 0, 1e-12)
}

// OssPoint and the law's methods give the power-law integrals of
// Erickson & Maksimović 2001, ch. 4: C = K·v^−N, Q = K·v^(1−N)/(1−N),
// E = K·v^(2−N)/(2−N), worked here with math.Pow; C at 1 mV and Q, E zero
// at and below zero volts.
func TestOssPoint(t *testing.T) {
	l := OssLaw{K: 2e-9, N: 0.62}
	for _, v := range []q.Voltage{48, 3.3, 600} {
		x := float64(v)
		p := l.At(v)
		testkit.Near(t, "C", float64(p.C()), l.K*math.Pow(x, -l.N), 1e-13)
		testkit.Near(t, "Q", float64(p.Q()), l.K*math.Pow(x, 1-l.N)/(1-l.N), 1e-13)
		testkit.Near(t, "E", float64(p.E()), l.K*math.Pow(x, 2-l.N)/(2-l.N), 1e-13)
		testkit.Near(t, "OssLaw.C", float64(l.C(v)), float64(p.C()), 1e-15)
		testkit.Near(t, "OssLaw.Q", float64(l.Q(v)), float64(p.Q()), 1e-15)
		testkit.Near(t, "OssLaw.E", float64(l.E(v)), float64(p.E()), 1e-15)
	}
	for _, v := range []q.Voltage{0, -1} {
		p := l.At(v)
		testkit.Near(t, "C at 1 mV", float64(p.C()), l.K*math.Pow(1e-3, -l.N), 1e-13)
		testkit.Near(t, "Q", float64(p.Q()), 0, 0)
		testkit.Near(t, "E", float64(p.E()), 0, 0)
	}
}
