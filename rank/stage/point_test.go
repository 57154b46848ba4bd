package stage

import (
	"math"
	"strings"
	"testing"

	q "swrank/devices/quantity"
	"swrank/rank/internal/testkit"
	"swrank/rank/loss"
)

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
			testkit.Within(t, "M(D, K)", m, tc.vout/tc.vin, 1e-12)
			// Peak current: the inductor voltage over L for D·T.
			vl := tc.vin - tc.vout
			if tc.top == Boost {
				vl = tc.vin
			}
			ipk := vl * d / (tc.l * tc.f)
			testkit.Within(t, "peak", float64(pt.Ctrl.IPeak), ipk, 1e-12)
			testkit.Within(t, "rms", float64(pt.Ctrl.IRms), ipk*math.Sqrt(d/3), 1e-12)
			if tc.top == Buck {
				testkit.Within(t, "average inductor current", float64(pt.IL), tc.iout, 1e-12)
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
				testkit.Within(t, "diode average = Iout", ipk*d2/2, tc.iout, 1e-12)
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
			testkit.Within(t, "turn-on voltage", float64(pt.Ctrl.VSoftOn), rest, 1e-12)
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
		testkit.Within(t, tc.top.String()+" valley", float64(pt.Ctrl.VSoftOn), tc.want, 1e-12)
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
			testkit.Within(t, top.String()+" duty at the boundary", float64(pt.Ctrl.Duty), dccm, 1e-6)
			testkit.Within(t, top.String()+" valley at the boundary", float64(pt.Ctrl.IOn), 0, 1e-6)
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
	testkit.Within(t, "ripple", float64(pt.Ripple), 2.16, 1e-12)
	testkit.Within(t, "reversed current", float64(pt.Ctrl.ISoftOn), 0.58, 1e-12)
	testkit.Within(t, "sync turn-off current", float64(pt.Sync.IOff), 0.58, 1e-12)
	if pt.Ctrl.HardOn || !pt.Ctrl.HardOff || !pt.Sync.HardOff || pt.Sync.HardOn || pt.Sync.IDead2 != 0 {
		t.Errorf("edges: ctrl %+v, sync %+v", pt.Ctrl, pt.Sync)
	}
	// rms of the line from −0.58 A to 1.58 A over D: √(D·(IL² + ΔI²/12)).
	testkit.Within(t, "control rms", float64(pt.Ctrl.IRms), math.Sqrt(0.1*(0.25+2.16*2.16/12)), 1e-12)
}

// The capacitive turn-on energy against its closed forms. Identical linear
// capacitors C: E(vr) = C·vr² (at vr = V the hard turn-on V·Q_oss,
// Kazimierczuk & Czarkowski 2011 ch. 2). A diode partner (linear Cj):
// E = E_S(vr) + ½·Cj·vr². By hand with the √ law (Erickson & Maksimović
// 2001 ch. 4): C_oss(48 V) = 500 pF, hard
// turn-on against an identical part: 2.304 µJ.
func TestSoftTurnOnEnergy(t *testing.T) {
	lin := loss.OssLaw{K: 1e-9, N: 0}
	testkit.Within(t, "linear, full", float64(loss.SoftTurnOnEnergy(lin, lin, 12, 12)), 1e-9*144, 1e-12)
	testkit.Within(t, "linear, half", float64(loss.SoftTurnOnEnergy(lin, lin, 12, 6)), 1e-9*36, 1e-12)
	testkit.Within(t, "linear, zero", float64(loss.SoftTurnOnEnergy(lin, lin, 12, 0)), 0, 1e-30)
	diode := loss.OssLaw{K: 100e-12, N: 0}
	testkit.Within(t, "diode partner", float64(loss.SoftTurnOnEnergy(lin, diode, 12, 7)), 0.5*1e-9*49+0.5*100e-12*49, 1e-12)
	sq := loss.OssFromCapacitance(500e-12, 48, 0.5)
	testkit.Within(t, "500 pF at 48 V, √ law", float64(loss.SoftTurnOnEnergy(sq, sq, 48, 48)), 2.304e-6, 1e-9)
	testkit.Within(t, "hard turn-on agrees", float64(loss.SoftTurnOnEnergy(sq, sq, 48, 48)),
		float64(loss.HardTurnOnCossEnergy(sq.E(48), 48, sq.Q(48), sq.E(48))), 1e-12)
	// Continuous and increasing in the residual voltage.
	prev := -1.0
	for vr := 0.0; vr <= 48; vr += 0.5 {
		e := float64(loss.SoftTurnOnEnergy(sq, sq, 48, q.Voltage(vr)))
		if e < prev {
			t.Fatalf("not increasing at %g V: %g after %g", vr, e, prev)
		}
		prev = e
	}
}

// The node swing: linear capacitors move by dq/(C_S + C_K) (charge
// balance); a √-law pair satisfies its own balance equation.
func TestSwingResidual(t *testing.T) {
	lin := loss.OssLaw{K: 1e-9, N: 0}
	testkit.Within(t, "linear", float64(loss.SwingResidual(lin, lin, 12, 6e-9)), 12-6e-9/2e-9, 1e-9)
	testkit.Within(t, "complete", float64(loss.SwingResidual(lin, lin, 12, 30e-9)), 0, 1e-15)
	testkit.Within(t, "none", float64(loss.SwingResidual(lin, lin, 12, 0)), 12, 1e-15)
	sq := loss.OssFromCapacitance(500e-12, 48, 0.5)
	dq := q.Charge(40e-9)
	vr := loss.SwingResidual(sq, sq, 48, dq)
	x := 48 - vr
	testkit.Within(t, "√-law balance", float64(sq.Q(x)+sq.Q(48)-sq.Q(48-x)), float64(dq), 1e-8)
}
