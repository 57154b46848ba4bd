package rank

import (
	"math"
	"testing"

	"swrank/devices"
	q "swrank/devices/quantity"
)

func near(t *testing.T, what string, got, want, rel float64) {
	t.Helper()
	if want == 0 {
		if math.Abs(got) > rel {
			t.Errorf("%s = %.6g, want 0 (±%g)", what, got, rel)
		}
		return
	}
	if math.Abs(got-want) > rel*math.Abs(want) || math.IsNaN(got) {
		t.Errorf("%s = %.6g, want %.6g (±%.2g %%)", what, got, want, 100*rel)
	}
}

// Hand case A of the team notes (../shared/REFERENCES.md), re-derived from
// the gate-charge method of Erickson & Maksimović, Fundamentals of Power
// Electronics, 2nd ed., ch. 4, and Balogh 2001: 12 V, 10 A, 500 kHz,
// Qgs2 1 nC, Qgd 2 nC, Vpl 2.5 V, Vth 1.8 V, 5 V drive, Rsrc 2 Ω, Rsnk 1 Ω,
// Rg,int 1 Ω. Both variants to 0.1 %.
func TestGateChargeTransitionsHandCaseA(t *testing.T) {
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
			near(t, "t_ir", float64(tr.Tir), c.tir, 1e-3)
			near(t, "t_vf", float64(tr.Tvf), c.tvf, 1e-3)
			near(t, "t_vr", float64(tr.Tvr), c.tvr, 1e-3)
			near(t, "t_if", float64(tr.Tif), c.tif, 1e-3)
			e := OverlapEnergy(12, 10, tr.Tir, tr.Tvf) + OverlapEnergy(12, 10, tr.Tvr, tr.Tif)
			near(t, "P_sw", float64(e)*500e3, c.pw, 1e-3)
		})
	}
	// E_on 216.0 nJ and E_off 144.0 nJ in the plateau-current variant.
	tr := GateChargeTransitions(1e-9, 2e-9, 1.8, 2.5, loop, false)
	near(t, "E_on", float64(OverlapEnergy(12, 10, tr.Tir, tr.Tvf)), 216e-9, 1e-3)
	near(t, "E_off", float64(OverlapEnergy(12, 10, tr.Tvr, tr.Tif)), 144e-9, 1e-3)
}

// Gate-drive split of hand case A with the half-per-edge rule (Balogh 2001):
// P_G = Qg·V·f = 8 nC·5 V·500 kHz = 20.00 mW; driver 11.667 mW, Rg,int
// 8.333 mW.
func TestSplitGateEnergyHalfPerEdge(t *testing.T) {
	total := q.Energy(8e-9 * 5)
	s := SplitGateEnergy(total, total/2, 2, 1, 0, 1)
	near(t, "driver", float64(s.Driver)*500e3, 11.667e-3, 1e-3)
	near(t, "rint", float64(s.Rint)*500e3, 8.333e-3, 1e-3)
	near(t, "sum", float64(s.Driver+s.Rext+s.Rint)*500e3, 20.00e-3, 1e-9)
}

// The stored gate energy over a piecewise-linear curve, worked by hand from
// the definition E = ∫(v − Voff)·dQ (Balogh 2001): curve of hand case A
// (Qth 1 nC to 1.8 V, Qgs2 1 nC to 2.5 V, Qgd 2 nC at 2.5 V, then 1.6 nF to
// 5 V): 1n·0.9 + 1n·2.15 + 2n·2.5 + 4n·3.75 = 23.05 nJ. A linear gate stores
// half of Q·V: 20 nJ of 40 nJ.
func TestGateCurveStoredEnergy(t *testing.T) {
	c := GateCurve{Qth: 1e-9, Qgs2: 1e-9, Qgd: 2e-9, Vth: 1.8, Vpl: 2.5, Slope: 1.6e-9}
	near(t, "Qg(5 V)", float64(c.Charge(5)), 8e-9, 1e-12)
	near(t, "E stored", float64(c.StoredEnergy(0, 5)), 23.05e-9, 1e-9)
	near(t, "E total", float64(GateEnergy(c, 0, 5)), 40e-9, 1e-12)
	// Bipolar drive −3 V to 5 V: the first segment continues below 0 V
	// (slope 1n/1.8 F): Q(−3) = −1.6667 nC; ΔQ = 9.6667 nC, E = ΔQ·8 V.
	near(t, "E total bipolar", float64(GateEnergy(c, -3, 5)), (8e-9+3e-9/1.8)*8, 1e-9)
	lin := GateCurve{Qth: 1e-9, Qgs2: 1e-9, Qgd: 0, Vth: 1, Vpl: 2, Slope: 1e-9}
	near(t, "E stored linear", float64(lin.StoredEnergy(0, 4)), 0.5*4e-9*4, 1e-9)
}

// Output capacitance with the √ law, Erickson & Maksimović ch. 4 (C(V) =
// C0·√(V0/V): Q = 2·C(V)·V, E = (2/3)·C(V)·V²); hand cases A and B of the
// team notes.
func TestOssSqrtLaw(t *testing.T) {
	// A: 400 pF at 12 V → Q_oss 9.60 nC; identical devices: V·Q_oss per
	// hard turn-on → 57.6 mW at 500 kHz.
	a := OssFromCapacitance(400e-12, 12)
	near(t, "A Q_oss", float64(a.Q(12)), 9.6e-9, 1e-9)
	e := HardTurnOnCossEnergy(a.E(12), 12, a.Q(12), a.E(12))
	near(t, "A P", float64(e)*500e3, 57.6e-3, 1e-9)
	// B: 500 pF at 48 V → Q_oss 48.0 nC, E_oss 0.768 µJ, 2.304 µJ per hard
	// turn-on → 1.152 W at 500 kHz (½CV²·f would say 0.288 W).
	b := OssFromCapacitance(500e-12, 48)
	near(t, "B Q_oss", float64(b.Q(48)), 48e-9, 1e-9)
	near(t, "B E_oss", float64(b.E(48)), 0.768e-6, 1e-9)
	eb := HardTurnOnCossEnergy(b.E(48), 48, b.Q(48), b.E(48))
	near(t, "B E/turn-on", float64(eb), 2.304e-6, 1e-9)
	near(t, "B P", float64(eb)*500e3, 1.152, 1e-9)
	// A linear capacitor (E = ½·Q·V, so the fitted exponent is 0).
	l := OssFromChargeEnergy(100e-9, 0.5*100e-9*50, 50)
	near(t, "linear N", l.N, 0, 1e-12)
	near(t, "linear Q(25)", float64(l.Q(25)), 50e-9, 1e-9)
	// A √-law part stated by its charge and energy recovers N = ½
	// (E = Q·V/3 for the √ law).
	s := OssFromChargeEnergy(9.6e-9, 9.6e-9*12/3, 12)
	near(t, "sqrt N", s.N, 0.5, 1e-9)
}

// Recovery and dead time, hand case A: Qrr 20 nC at 12 V, 500 kHz → 0.1200 W
// (Graovac et al. 2006); dead time 2 × 20 ns at Vsd 0.8 V and 10 A → 0.1600 W.
func TestRecoveryAndDeadTime(t *testing.T) {
	near(t, "recovery", float64(RecoveryEnergy(20e-9, 12))*500e3, 0.12, 1e-9)
	near(t, "dead time", float64(DeadTimeEnergy(0.8, 10, 20e-9, 0.8, 10, 20e-9))*500e3, 0.16, 1e-9)
	near(t, "conduction", float64(Conduction(q.Current(math.Sqrt(0.1*100)), 5e-3)), 0.05, 1e-9)
}

// The datasheet-time fallback (team notes, derived from the gate-charge
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
		near(t, "t", float64(ScaleSwitchingTime(10e-9, c.rs, c.rn, c.hs, c.hn)), c.want, 1e-12)
	}
}

// Junction temperature, checks [D] of the team notes: Ta 50 °C, Rth 40 K/W,
// 8 A through 10 mΩ at 25 °C, 0.5 W of other loss: α 2.3 → Tj 117.72 °C,
// P 1.693 W, loop gain 0.281; linear 0.7 %/K → Tj 111.01 °C, gain 0.179.
func TestSolveJunction(t *testing.T) {
	pow := ThermalModel{Fixed: 0.5, Cond: 64 * 0.010, Law: &TempLaw{T0: 25, Alpha: 2.3}}
	s := SolveJunction(&pow, 50, 40, 175)
	if s.Status != ThermalSolved {
		t.Fatalf("status %v", s.Status)
	}
	near(t, "Tj power law", float64(s.Tj), 117.72, 1e-4)
	near(t, "gain power law", s.Gain, 0.281, 5e-3)
	lin := ThermalModel{Fixed: 0.5, Cond: 64 * 0.010, Law: &TempLaw{T0: 25, NPts: 2, Pts: [8][2]float64{{25, 1}, {125, 1.7}}}}
	s = SolveJunction(&lin, 50, 40, 175)
	near(t, "Tj linear", float64(s.Tj), 111.01, 1e-4)
	near(t, "gain linear", s.Gain, 0.179, 5e-3)

	// Runaway: with the same part on 150 K/W the loss grows faster than the
	// heat path removes it; no steady state exists (derived: g ≥ 1
	// everywhere above the last crossing).
	s = SolveJunction(&pow, 50, 150, 175)
	if s.Found || s.Status != ThermalRunaway {
		t.Errorf("150 K/W: got %+v, want runaway", s)
	}
	// A steady state above Tj,max is reported as such, with its value.
	s = SolveJunction(&ThermalModel{Fixed: 2, Law: &TempLaw{T0: 25, Alpha: 2}}, 25, 70, 150)
	if s.Status != ThermalAboveMax || !s.Found {
		t.Errorf("2 W on 70 K/W: got %v, want above tj_max", s.Status)
	}
	near(t, "Tj above max", float64(s.Tj), 165, 1e-6)
}

// The square-law plateau shift (team notes [R], from the long-channel
// saturation law I = k(Vgs − Vth)², Sze & Ng ch. 6): four times the current
// doubles the overdrive.
func TestPlateauAt(t *testing.T) {
	near(t, "4× current", float64(PlateauAt(2, 3, 10, 40)), 4, 1e-12)
	near(t, "same current", float64(PlateauAt(2, 3, 10, 10)), 3, 1e-12)
	near(t, "Miller charge at 4× voltage", float64(MillerChargeAt(10e-9, 25, 100)), 20e-9, 1e-12)
}

// The two-point gate law passes through both points (R0 + k/(Vgs − Vth),
// Sze & Ng ch. 6 channel resistance), by construction checked numerically.
func TestFitGateLaw(t *testing.T) {
	g, ok := FitGateLaw(10, 5e-3, 4.5, 7e-3, 2)
	if !ok {
		t.Fatal("fit rejected")
	}
	near(t, "R(10)", float64(g.At(10)), 5e-3, 1e-12)
	near(t, "R(4.5)", float64(g.At(4.5)), 7e-3, 1e-12)
	// Hand: x1 = 1/8, x2 = 1/2.5; k = −2m/(0.125 − 0.4) = 7.2727 mΩ·V;
	// R0 = 5m − k/8 = 4.0909 mΩ.
	near(t, "R0", float64(g.R0), 4.0909e-3, 1e-4)
}

// Derating of the continuous current with case temperature (common
// practice: I = √((Tj,max − Tc)/(Rth,jc·R(Tj,max)))): at Tc = 100 °C with
// Tj,max 175 °C the rating falls to √(75/150) = 0.7071 of the 25 °C value.
func TestCurrentRatingAt(t *testing.T) {
	near(t, "100 °C", float64(CurrentRatingAt(100, 175, 100)), 70.71, 1e-3)
	near(t, "25 °C", float64(CurrentRatingAt(100, 175, 25)), 100, 1e-12)
	near(t, "at Tj,max", float64(CurrentRatingAt(100, 175, 175)), 0, 1e-12)
}

// handCasePart is hand case A's transistor as a parts-library row.
func handCasePart() devices.Part {
	return devices.Part{
		Name: "hand-a", VdsMax: 30, IdMax: 60, VgsMax: 20, VgsTh: 1.8,
		RdsOn: 5e-3, RdsOnVgs: 5, RdsOnTj: q.Some[q.Temperature](25),
		Qg: 8e-9, QgVgs: 5, QgVds: q.Some[q.Voltage](12), QgId: q.Some[q.Current](10),
		Qgs: q.Some[q.Charge](2e-9), Qgd: q.Some[q.Charge](2e-9), QgTh: q.Some[q.Charge](1e-9),
		VPlateau: q.Some[q.Voltage](2.5), RgInt: q.Some[q.Resistance](1),
		Coss: q.Some[q.Capacitance](400e-12), CapVds: q.Some[q.Voltage](12),
		Vsd: q.Some[q.Voltage](0.8), Qrr: q.Some[q.Charge](20e-9),
		RthJA: q.Some[q.ThermalResistance](40),
	}
}

// Hand case A end to end through Evaluate, synchronous buck 12 V → 1.2 V at
// 10 A, no ripple, 500 kHz, 20 ns dead time, the same part in both places,
// junction pinned at 25 °C, where the part's threshold, plateau, recovered
// charge and diode drop are stated (so no temperature law moves them) and
// where its 5 mΩ is given. Expected values from
// the team notes (re-derived above from the cited methods): control switch
// overlap 0.1795 W (refined variant), V·Q_oss 57.6 mW, recovery 0.1200 W,
// conduction 0.0500 W, gate 20.00 mW in all; sync switch dead time 0.1600 W,
// conduction 10²·0.9·5 mΩ = 0.450 W.
func TestEvaluateHandCaseA(t *testing.T) {
	p := handCasePart()
	d, err := Prepare(&p)
	if err != nil {
		t.Fatal(err)
	}
	st := Stage{
		Topology: Buck, Vin: 12, Vout: 1.2, Iout: 10, Fsw: 500e3,
		Ripple: q.Some[q.Ratio](0), DeadTime: q.Some[q.Time](20e-9),
		Driver:  Driver{VOn: 5, RSource: 2, RSink: 1},
		TjFixed: q.Some[q.Temperature](25),
	}
	pt, err := st.Resolve()
	if err != nil {
		t.Fatal(err)
	}
	r := Evaluate(&pt, &d, nil, nil)
	c := r.Devices[0].Losses
	near(t, "control overlap", float64(c.TurnOn+c.TurnOff), 0.1795, 1e-3)
	near(t, "control coss", float64(c.Coss), 57.6e-3, 1e-6)
	near(t, "control recovery", float64(c.Recovery), 0.12, 1e-6)
	near(t, "control conduction", float64(c.Conduction), 0.05, 1e-6)
	near(t, "control gate", float64(c.GateDriver+c.GateRext+c.GateRint), 20e-3, 1e-6)
	s := r.Devices[1].Losses
	near(t, "sync dead time", float64(s.DeadTime), 0.16, 1e-6)
	near(t, "sync conduction", float64(s.Conduction), 0.45, 1e-6)
	near(t, "sync overlap", float64(s.TurnOn+s.TurnOff+s.Coss+s.Recovery), 0, 1e-12)
	if r.Screened() {
		t.Errorf("screened: %v", r.Reasons())
	}
	// The same evaluation traced gives the same numbers.
	var tr Trace
	r2 := Evaluate(&pt, &d, nil, &tr)
	if r2.Losses != r.Losses || len(tr.Steps) == 0 {
		t.Errorf("traced evaluation differs: %+v vs %+v", r2.Losses, r.Losses)
	}
}

// Evaluation allocates nothing without a trace (the hot path of ranking).
func TestEvaluateAllocations(t *testing.T) {
	p := handCasePart()
	d, _ := Prepare(&p)
	st := Stage{Topology: Buck, Vin: 12, Vout: 3.3, Iout: 8, Fsw: 400e3, Driver: Driver{VOn: 5}, Ambient: 40}
	pt, err := st.Resolve()
	if err != nil {
		t.Fatal(err)
	}
	if a := testing.AllocsPerRun(100, func() { _ = Evaluate(&pt, &d, nil, nil) }); a != 0 {
		t.Errorf("Evaluate allocates %v times per call", a)
	}
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
		near(t, "C", float64(p.C()), l.K*math.Pow(x, -l.N), 1e-13)
		near(t, "Q", float64(p.Q()), l.K*math.Pow(x, 1-l.N)/(1-l.N), 1e-13)
		near(t, "E", float64(p.E()), l.K*math.Pow(x, 2-l.N)/(2-l.N), 1e-13)
		near(t, "OssLaw.C", float64(l.C(v)), float64(p.C()), 1e-15)
		near(t, "OssLaw.Q", float64(l.Q(v)), float64(p.Q()), 1e-15)
		near(t, "OssLaw.E", float64(l.E(v)), float64(p.E()), 1e-15)
	}
	for _, v := range []q.Voltage{0, -1} {
		p := l.At(v)
		near(t, "C at 1 mV", float64(p.C()), l.K*math.Pow(1e-3, -l.N), 1e-13)
		near(t, "Q", float64(p.Q()), 0, 0)
		near(t, "E", float64(p.E()), 0, 0)
	}
}
