package rank

import (
	"math"
	"strings"
	"testing"

	"swrank/devices"
	q "swrank/devices/quantity"
)

// within fails the test when got is not within rel (relative) of want, or
// within rel absolute when want is 0.
func within(t *testing.T, what string, got, want, rel float64) {
	t.Helper()
	if math.IsNaN(got) || want == 0 && math.Abs(got) > rel || want != 0 && math.Abs(got-want) > rel*math.Abs(want) {
		t.Errorf("%s = %.9g, want %.9g (±%g relative)", what, got, want, rel)
	}
}

// lightPart is an invented 30 V part with a linear output capacitance
// (Q_oss and E_oss with E = Q·V/2) so that the capacitive energies have
// closed forms: C = 1 nF, Q_oss(12 V) = 12 nC, E_oss(12 V) = 72 nJ.
func lightPart() devices.Part {
	return devices.Part{
		Name: "light-a", VdsMax: 30, IdMax: 40, VgsMax: 20, VgsTh: 1.8,
		RdsOn: 5e-3, RdsOnVgs: 5, RdsOnTj: q.Some[q.Temperature](25),
		Qg: 8e-9, QgVgs: 5, QgVds: q.Some[q.Voltage](12), QgId: q.Some[q.Current](10),
		Qgs: q.Some[q.Charge](2e-9), Qgd: q.Some[q.Charge](2e-9), QgTh: q.Some[q.Charge](1e-9),
		VPlateau: q.Some[q.Voltage](2.5), RgInt: q.Some[q.Resistance](1),
		Qoss: q.Some[q.Charge](12e-9), Eoss: q.Some[q.Energy](72e-9), OssVds: q.Some[q.Voltage](12),
		Vsd: q.Some[q.Voltage](0.8), Qrr: q.Some[q.Charge](20e-9),
		RthJA: q.Some[q.ThermalResistance](40),
	}
}

// Discontinuous conduction against the published conversion ratios of
// Erickson & Maksimović, Fundamentals of Power Electronics, 2nd ed., 2001,
// ch. 5: buck M = 2/(1 + √(1 + 4K/D²)), boost M = (1 + √(1 + 4D²/K))/2,
// with K = 2L/(R·T) and R = Vout/Iout. Resolve solves for D; the check
// puts D back into the book's form. The peak current, the inductor's
// average current (charge balance: Iout for the buck) and the triangle's
// rms Ipk·√(D/3) are checked against their definitions.
func TestResolveDCM(t *testing.T) {
	tests := []struct {
		name            string
		top             Topology
		vin, vout, iout float64
		l, f            float64
	}{
		// 12 V → 5 V, 10 µH, 100 kHz: CCM boundary at 1.458 A.
		{"buck 0.5 A", Buck, 12, 5, 0.5, 10e-6, 100e3},
		{"buck 0.05 A", Buck, 12, 5, 0.05, 10e-6, 100e3},
		{"buck 48 V to 12 V", Buck, 48, 12, 0.2, 22e-6, 250e3},
		// 12 V → 36 V, 10 µH, 100 kHz.
		{"boost 0.1 A", Boost, 12, 36, 0.1, 10e-6, 100e3},
		{"boost 5 V to 12 V", Boost, 5, 12, 0.05, 4.7e-6, 500e3},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			st := Stage{Topology: tc.top, Rectifier: DiodeRect, Vin: q.Voltage(tc.vin), Vout: q.Voltage(tc.vout),
				Iout: q.Current(tc.iout), Fsw: q.Frequency(tc.f), Inductance: q.Inductance(tc.l),
				Diode: Diode{Vf: 0.5, Cj: 100e-12, Qrr: 10e-9}, Driver: Driver{VOn: 5}}
			pt, err := st.Resolve()
			if err != nil {
				t.Fatal(err)
			}
			if pt.Mode != ModeDCM {
				t.Fatalf("mode %s, want discontinuous", pt.Mode)
			}
			d := float64(pt.Ctrl.Duty)
			k := 2 * tc.l * tc.f / (tc.vout / tc.iout)
			var m float64
			if tc.top == Buck {
				m = 2 / (1 + math.Sqrt(1+4*k/(d*d)))
			} else {
				m = (1 + math.Sqrt(1+4*d*d/k)) / 2
			}
			within(t, "M(D, K)", m, tc.vout/tc.vin, 1e-12)
			// Peak current: the inductor voltage over L for D·T.
			vl := tc.vin - tc.vout
			if tc.top == Boost {
				vl = tc.vin
			}
			ipk := vl * d / (tc.l * tc.f)
			within(t, "peak", float64(pt.Ctrl.IPeak), ipk, 1e-12)
			within(t, "rms", float64(pt.Ctrl.IRms), ipk*math.Sqrt(d/3), 1e-12)
			if tc.top == Buck {
				within(t, "average inductor current", float64(pt.IL), tc.iout, 1e-12)
			}
			// Output charge balance: the diode delivers Iout (boost) or
			// Iout − the switch's average (buck).
			d2 := ipk * tc.l * tc.f / tc.vout // buck fall time fraction: Ipk·L/(Vout·T)
			if tc.top == Boost {
				d2 = ipk * tc.l * tc.f / (tc.vout - tc.vin)
			}
			if d+d2 >= 1 {
				t.Errorf("D + D2 = %g: not discontinuous", d+d2)
			}
			if tc.top == Boost {
				within(t, "diode average = Iout", ipk*d2/2, tc.iout, 1e-12)
			}
			// No overlap and no recovery at turn-on: the current starts at
			// zero and the diode has stopped.
			if pt.Ctrl.HardOn || pt.Ctrl.IOn != 0 || !pt.Ctrl.HardOff {
				t.Errorf("control edges: hard on %v, I on %s, hard off %v", pt.Ctrl.HardOn, pt.Ctrl.IOn, pt.Ctrl.HardOff)
			}
			rest := tc.vin - tc.vout
			if tc.top == Boost {
				rest = tc.vin
			}
			within(t, "turn-on voltage", float64(pt.Ctrl.VSoftOn), rest, 1e-12)
			if !strings.Contains(strings.Join(pt.Notes, " "), "discontinuous") {
				t.Errorf("no note of the mode: %q", pt.Notes)
			}
		})
	}
}

// Valley switching: the node rings without loss about its rest from the
// other rail's voltage, so the control switch sees Vin − 2·Vout (buck) or
// 2·Vin − Vout (boost) at the first valley, not below zero (derived: an
// undamped LC ring; see docs/decisions.md).
func TestResolveDCMValley(t *testing.T) {
	tests := []struct {
		top       Topology
		vin, vout float64
		want      float64
	}{
		{Buck, 12, 5, 2},
		{Buck, 12, 8, 0},
		{Boost, 12, 20, 4},
		{Boost, 12, 36, 0},
	}
	for _, tc := range tests {
		st := Stage{Topology: tc.top, Rectifier: DiodeRect, Vin: q.Voltage(tc.vin), Vout: q.Voltage(tc.vout),
			Iout: 0.01, Fsw: 100e3, Inductance: 10e-6, Driver: Driver{VOn: 5}}
		pt, err := st.ResolveLight(LightLoad{Valley: true})
		if err != nil {
			t.Fatal(err)
		}
		if pt.Mode != ModeDCM {
			t.Fatalf("%s %g→%g: mode %s", tc.top, tc.vin, tc.vout, pt.Mode)
		}
		within(t, tc.top.String()+" valley", float64(pt.Ctrl.VSoftOn), tc.want, 1e-12)
	}
}

// At the boundary of continuous conduction the two descriptions meet: just
// above, the valley current is ~0; just below, the discontinuous duty is
// the continuous one (Erickson & Maksimović 2001, ch. 5: the boundary is
// K = 1 − D for the buck, K = D(1 − D)² for the boost).
func TestResolveDCMBoundary(t *testing.T) {
	for _, top := range []Topology{Buck, Boost} {
		vin, vout := 12.0, 5.0
		if top == Boost {
			vout = 30
		}
		l, f := 10e-6, 100e3
		var dccm float64
		if top == Buck {
			dccm = vout / vin
		} else {
			dccm = 1 - vin/vout
		}
		// K_crit = 2L/(R·T) at the boundary, R = Vout/Iout.
		kcrit := 1 - dccm
		if top == Boost {
			kcrit = dccm * (1 - dccm) * (1 - dccm)
		}
		ib := kcrit * vout / (2 * l * f)
		for _, side := range []float64{1 + 1e-9, 1 - 1e-9} {
			st := Stage{Topology: top, Rectifier: DiodeRect, Vin: q.Voltage(vin), Vout: q.Voltage(vout),
				Iout: q.Current(ib * side), Fsw: q.Frequency(f), Inductance: q.Inductance(l), Driver: Driver{VOn: 5}}
			pt, err := st.Resolve()
			if err != nil {
				t.Fatal(err)
			}
			wantMode := ModeCCM
			if side < 1 {
				wantMode = ModeDCM
			}
			if pt.Mode != wantMode {
				t.Errorf("%s at %g × boundary: mode %s, want %s", top, side, pt.Mode, wantMode)
			}
			within(t, top.String()+" duty at the boundary", float64(pt.Ctrl.Duty), dccm, 1e-6)
			within(t, top.String()+" valley at the boundary", float64(pt.Ctrl.IOn), 0, 1e-6)
		}
	}
}

// Forced-continuous conduction: with a synchronous switch the current
// reverses (valley IL − ΔI/2 < 0); the synchronous switch turns off hard at
// |valley| and the control switch turns on softly.
func TestResolveFCCM(t *testing.T) {
	st := Stage{Topology: Buck, Vin: 12, Vout: 1.2, Iout: 0.5, Fsw: 500e3, Inductance: 1e-6,
		DeadTime: q.Some[q.Time](20e-9), Driver: Driver{VOn: 5}}
	pt, err := st.Resolve()
	if err != nil {
		t.Fatal(err)
	}
	// ΔI = (12 − 1.2)·0.1/(1 µH·500 kHz) = 2.16 A; valley 0.5 − 1.08 = −0.58 A.
	if pt.Mode != ModeFCCM {
		t.Fatalf("mode %s", pt.Mode)
	}
	within(t, "ripple", float64(pt.Ripple), 2.16, 1e-12)
	within(t, "reversed current", float64(pt.Ctrl.ISoftOn), 0.58, 1e-12)
	within(t, "sync turn-off current", float64(pt.Sync.IOff), 0.58, 1e-12)
	if pt.Ctrl.HardOn || !pt.Ctrl.HardOff || !pt.Sync.HardOff || pt.Sync.HardOn || pt.Sync.IDead2 != 0 {
		t.Errorf("edges: ctrl %+v, sync %+v", pt.Ctrl, pt.Sync)
	}
	// rms of the line from −0.58 A to 1.58 A over D: √(D·(IL² + ΔI²/12)).
	within(t, "control rms", float64(pt.Ctrl.IRms), math.Sqrt(0.1*(0.25+2.16*2.16/12)), 1e-12)
}

// The capacitive turn-on energy against its closed forms. Identical linear
// capacitors C: E(vr) = C·vr² (at vr = V the hard turn-on V·Q_oss of the
// team notes). A diode partner (linear Cj): E = E_S(vr) + ½·Cj·vr². Hand
// case B of the team notes: C_oss(48 V) = 500 pF with the √ law, hard
// turn-on against an identical part: 2.304 µJ.
func TestSoftTurnOnEnergy(t *testing.T) {
	lin := OssLaw{K: 1e-9, N: 0}
	within(t, "linear, full", float64(SoftTurnOnEnergy(lin, lin, 12, 12)), 1e-9*144, 1e-12)
	within(t, "linear, half", float64(SoftTurnOnEnergy(lin, lin, 12, 6)), 1e-9*36, 1e-12)
	within(t, "linear, zero", float64(SoftTurnOnEnergy(lin, lin, 12, 0)), 0, 1e-30)
	diode := OssLaw{K: 100e-12, N: 0}
	within(t, "diode partner", float64(SoftTurnOnEnergy(lin, diode, 12, 7)), 0.5*1e-9*49+0.5*100e-12*49, 1e-12)
	sq := OssFromCapacitance(500e-12, 48)
	within(t, "hand case B", float64(SoftTurnOnEnergy(sq, sq, 48, 48)), 2.304e-6, 1e-9)
	within(t, "hard turn-on agrees", float64(SoftTurnOnEnergy(sq, sq, 48, 48)),
		float64(HardTurnOnCossEnergy(sq.E(48), 48, sq.Q(48), sq.E(48))), 1e-12)
	// Continuous and increasing in the residual voltage.
	prev := -1.0
	for vr := 0.0; vr <= 48; vr += 0.5 {
		e := float64(SoftTurnOnEnergy(sq, sq, 48, q.Voltage(vr)))
		if e < prev {
			t.Fatalf("not increasing at %g V: %g after %g", vr, e, prev)
		}
		prev = e
	}
}

// The node swing: linear capacitors move by dq/(C_S + C_K) (charge
// balance); a √-law pair satisfies its own balance equation.
func TestSwingResidual(t *testing.T) {
	lin := OssLaw{K: 1e-9, N: 0}
	within(t, "linear", float64(SwingResidual(lin, lin, 12, 6e-9)), 12-6e-9/2e-9, 1e-9)
	within(t, "complete", float64(SwingResidual(lin, lin, 12, 30e-9)), 0, 1e-15)
	within(t, "none", float64(SwingResidual(lin, lin, 12, 0)), 12, 1e-15)
	sq := OssFromCapacitance(500e-12, 48)
	dq := q.Charge(40e-9)
	vr := SwingResidual(sq, sq, 48, dq)
	x := 48 - vr
	within(t, "√-law balance", float64(sq.Q(x)+sq.Q(48)-sq.Q(48-x)), float64(dq), 1e-8)
}

// Evaluate in discontinuous conduction: no overlap and no recovery at the
// control switch's turn-on, whatever the diode's Qrr; the capacitive loss
// is E_S(Vin − Vout) + ½·Cj·(Vin − Vout)² per cycle (linear part, see
// TestSoftTurnOnEnergy).
func TestEvaluateDCM(t *testing.T) {
	p := lightPart()
	d, err := Prepare(&p)
	if err != nil {
		t.Fatal(err)
	}
	st := Stage{Topology: Buck, Rectifier: DiodeRect, Vin: 12, Vout: 5, Iout: 0.3, Fsw: 100e3, Inductance: 10e-6,
		Diode: Diode{Vf: 0.4, Qrr: 30e-9, Cj: 200e-12}, Driver: Driver{VOn: 5}, TjFixed: q.Some[q.Temperature](25)}
	pt, err := st.Resolve()
	if err != nil {
		t.Fatal(err)
	}
	r := Evaluate(&pt, &d, nil, nil)
	c := r.Devices[0].Losses
	within(t, "turn-on overlap", float64(c.TurnOn), 0, 1e-15)
	within(t, "recovery", float64(c.Recovery), 0, 1e-15)
	vr := 7.0
	within(t, "coss", float64(c.Coss), (0.5*1e-9*vr*vr+0.5*200e-12*vr*vr)*100e3, 1e-9)
	if c.TurnOff <= 0 {
		t.Errorf("turn-off %g: the peak current is still switched hard", float64(c.TurnOff))
	}
	within(t, "conduction", float64(c.Conduction), float64(pt.Ctrl.IRms*pt.Ctrl.IRms)*5e-3, 1e-9)
}

// Evaluate in forced-continuous conduction: the synchronous switch's hard
// turn-off at the reversed current; the control switch without turn-on
// overlap, recovery or (the swing being complete) capacitive loss, but with
// reverse conduction Vsd·I·(t_dt − (Q_S + Q_K)/I) per cycle.
func TestEvaluateFCCM(t *testing.T) {
	p := lightPart()
	d, err := Prepare(&p)
	if err != nil {
		t.Fatal(err)
	}
	st := Stage{Topology: Buck, Vin: 12, Vout: 1.2, Iout: 0.5, Fsw: 500e3, Inductance: 0.5e-6,
		DeadTime: q.Some[q.Time](40e-9), Driver: Driver{VOn: 5}, TjFixed: q.Some[q.Temperature](25)}
	pt, err := st.Resolve()
	if err != nil {
		t.Fatal(err)
	}
	// ΔI = 10.8·0.1/(0.5 µH·500 kHz) = 4.32 A; reversed 2.16 − 0.5 = 1.66 A;
	// charge moved 1.66 A·40 ns = 66.4 nC > 2·12 nC: a complete swing,
	// then 40 ns − 24 nC/1.66 A = 25.54 ns of reverse conduction at 0.8 V.
	i := 4.32/2 - 0.5
	r := Evaluate(&pt, &d, nil, nil)
	c := r.Devices[0].Losses
	within(t, "control turn-on", float64(c.TurnOn), 0, 1e-15)
	within(t, "control coss", float64(c.Coss), 0, 1e-15)
	within(t, "control recovery", float64(c.Recovery), 0, 1e-15)
	within(t, "control reverse conduction", float64(c.DeadTime), 0.8*i*(40e-9-24e-9/i)*500e3, 1e-6)
	s := r.Devices[1].Losses
	if s.TurnOff <= 0 {
		t.Errorf("sync turn-off %g: should be hard at %g A", float64(s.TurnOff), i)
	}
	// The sync's own dead time: only before its turn-on, at the peak.
	within(t, "sync dead time", float64(s.DeadTime), 0.8*(0.5+4.32/2)*40e-9*500e3, 1e-6)

	// A short dead time leaves a residual voltage: partial swing with
	// x = I·t_dt/(2C) (linear parts) and E = C·(V − x)² per cycle.
	st.DeadTime = q.Some[q.Time](5e-9)
	pt, err = st.Resolve()
	if err != nil {
		t.Fatal(err)
	}
	r = Evaluate(&pt, &d, nil, nil)
	x := i * 5e-9 / 2e-9
	within(t, "partial swing coss", float64(r.Devices[0].Losses.Coss), 1e-9*(12-x)*(12-x)*500e3, 1e-6)
	within(t, "partial swing: no reverse conduction", float64(r.Devices[0].Losses.DeadTime), 0, 1e-15)
}

// The light-load paths keep evaluation free of allocations (the partial
// swing solves with FindRoot on a closure that stays on the stack).
func TestEvaluateLightLoadAllocations(t *testing.T) {
	p := lightPart()
	d, err := Prepare(&p)
	if err != nil {
		t.Fatal(err)
	}
	for _, st := range []Stage{
		{Topology: Buck, Vin: 12, Vout: 1.2, Iout: 0.5, Fsw: 500e3, Inductance: 0.5e-6, DeadTime: q.Some[q.Time](5e-9), Driver: Driver{VOn: 5}},
		{Topology: Buck, Rectifier: DiodeRect, Vin: 12, Vout: 5, Iout: 0.3, Fsw: 100e3, Inductance: 10e-6, Driver: Driver{VOn: 5}},
	} {
		pt, err := st.Resolve()
		if err != nil {
			t.Fatal(err)
		}
		if a := testing.AllocsPerRun(50, func() { _ = Evaluate(&pt, &d, nil, nil) }); a != 0 {
			t.Errorf("%s: Evaluate allocates %v times per call", pt.Mode, a)
		}
	}
}
