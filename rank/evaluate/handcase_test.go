package evaluate

import (
	"math"
	"swrank/devices"
	q "swrank/devices/quantity"
	"swrank/rank/fit"
	"swrank/rank/internal/testkit"
	"swrank/rank/stage"
	"testing"
)

// Evaluation allocates nothing without a trace (the hot path of ranking).
func TestEvaluateAllocations(t *testing.T) {
	p := testkit.HandCasePart()
	d, _ := fit.Prepare(&p)
	st := stage.Stage{Topology: stage.Buck, Vin: 12, Vout: 3.3, Iout: 8, Fsw: 400e3, Driver: stage.Driver{VOn: 5}, Ambient: 40}
	pt, err := st.Resolve()
	if err != nil {
		t.Fatal(err)
	}
	if a := testing.AllocsPerRun(100, func() { _ = Evaluate(&pt, &d, nil, nil) }); a != 0 {
		t.Errorf("Evaluate allocates %v times per call", a)
	}
}

// A hand calculation end to end through Evaluate, synchronous buck 12 V → 1.2 V at
// 10 A, no ripple, 500 kHz, 20 ns dead time, the same part in both places,
// junction pinned at 25 °C, where the part's threshold, plateau, recovered
// charge and diode drop are stated (so no temperature law moves them) and
// where its 5 mΩ is given. Expected values from
// hand calculation from the gate-charge method (Erickson & Maksimović,
// Fundamentals of Power Electronics, 2nd ed., 2001, ch. 4; Balogh 2001),
// the √-law output charge (Erickson & Maksimović ch. 4) and Qrr·V (Graovac,
// Pürschel & Kiep 2006): control switch
// overlap 0.15966 W (refined variant: t_ir 1.0526, t_vf 2.400, t_vr 1.600,
// t_if 0.9302 ns; the current intervals at a third of V·I·t for the
// square-law channel, Shichman & Hodges 1968, the voltage intervals at a
// half: 12 V·10 A·(1.9828 ns/3 + 4.0 ns/2) = 319.3 nJ at 500 kHz),
// V·Q_oss 57.6 mW, recovery 0.1200 W,
// conduction 0.0500 W, gate 20.00 mW in all; sync switch conduction
// 10²·0.9·5 mΩ = 0.450 W, and its diode's share of the dead times (below).
// qrrShort is the relative tolerance of a recovered charge checked
// against the datasheet's: the hand case's recovery test is at its own
// commutation, but after a long forward conduction, while in the stage the
// body diode has conducted only for the dead time, about 16-20 ns against
// its lifetime τ of a few ns (20 nC at 10 A): the charge-control model
// leaves it short of the steady state by about τ·I_F·exp(−t/τ), under
// 0.5 % (loss.RecoveredChargeAfter).
const qrrShort = 5e-3

func TestEvaluateSyncBuckByHand(t *testing.T) {
	p := testkit.HandCasePart()
	d, err := fit.Prepare(&p)
	if err != nil {
		t.Fatal(err)
	}
	st := stage.Stage{
		Topology: stage.Buck, Vin: 12, Vout: 1.2, Iout: 10, Fsw: 500e3,
		Ripple: q.Some[q.Ratio](0), DeadTime: q.Some[q.Time](20e-9),
		Driver:  stage.Driver{VOn: 5, RSource: 2, RSink: 1},
		TjFixed: q.Some[q.Temperature](25),
	}
	pt, err := st.Resolve()
	if err != nil {
		t.Fatal(err)
	}
	r := Evaluate(&pt, &d, nil, nil)
	c := r.Devices[0].Losses
	testkit.Near(t, "control overlap", float64(c.TurnOn+c.TurnOff), 0.15966, 1e-3)
	testkit.Near(t, "control coss", float64(c.Coss), 57.6e-3, 1e-6)
	testkit.Near(t, "control recovery", float64(c.Recovery), 0.12, qrrShort)
	testkit.Near(t, "control conduction", float64(c.Conduction), 0.05, 1e-6)
	testkit.Near(t, "control gate", float64(c.GateDriver+c.GateRext+c.GateRint), 20e-3, 1e-6)
	s := r.Devices[1].Losses
	// The part gives no crss, so its edges' timing rests on an estimate:
	// the diode is credited with none of the dead time the edges take,
	// the whole 20 ns at both edges (0.8 V·10 A·40 ns·500 kHz).
	testkit.Near(t, "sync dead time", float64(s.DeadTime), 0.16, 1e-6)
	testkit.Near(t, "sync conduction", float64(s.Conduction), 0.45, 1e-6)
	testkit.Near(t, "sync overlap", float64(s.TurnOn+s.TurnOff+s.Coss+s.Recovery), 0, 1e-12)
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

// The diode's share of each 20 ns dead time of the hand-worked synchronous buck (the part in
// both places, 10 A, no ripple), a hand calculation from the RC delays of
// the gate and the gate-charge intervals (Balogh 2001): Cgs = Qth/Vth =
// 0.556 nF, the curve's slope above the plateau (8 − 2 − 2) nC/2.5 V =
// 1.6 nF; turn-on loop 3 Ω, turn-off loop 2 Ω. The diode carries the
// current (half of each ramp counted) until the synchronous channel can
// carry half of it, at V½ = 1.8 + 0.7·√(5/10) = 2.295 V (the square-law
// plateau at 5 A, Sze & Ng 2007, ch. 6).
//
//	edge 1: control gate 5 → 2.5 V: 2 Ω·1.6 nF·ln 2 = 2.218 ns; voltage rise
//	        2 nC/1.25 A = 1.6 ns; current fall 1 nC/1.075 A = 0.930 ns, half
//	        counted; sync gate 0 → V½: 3 Ω·0.556 nF·ln(5/2.705) = 1.024 ns
//	        (to its threshold 1.8 V: ln(5/3.2), 0.744 ns, for the margin).
//	        Diode: 20 − (2.218 + 1.6 + 0.465 − 1.024) = 16.74 ns.
//	edge 2: sync gate 5 → V½ at 0 V drain, (6 − 1.707) nC/2.705 V =
//	        1.587 nF: 2 Ω·1.587 nF·ln(5/2.295) = 2.472 ns (to 1.8 V,
//	        (6 − 1) nC/3.2 V: 3.193 ns, for the margin); control gate
//	        0.744 ns and current rise 1 nC/0.95 A = 1.053 ns, half counted.
//	        Diode: 20 − (2.472 − 0.744 − 0.526) = 18.80 ns.
const cgsA = 1e-9 / 1.8

var (
	vHalf = 1.8 + 0.7*math.Sqrt(0.5)
	dOn   = 3 * cgsA * math.Log(5/3.2)
	deadA = 20e-9 - (2*1.6e-9*math.Log(2) + 2e-9/1.25 + 1e-9/1.075/2 - 3*cgsA*math.Log(5/(5-vHalf)))
	deadB = 20e-9 - (2*((6e-9-(1e-9+(vHalf-1.8)/0.7*1e-9))/(5-vHalf))*math.Log(5/vHalf) - dOn - 1e-9/0.95/2)
)

// TestDeadTimeDiodeShare checks the diode times and margins of that buck,
// and that a dead time shorter than the edges need is cross-conduction.
func TestDeadTimeDiodeShare(t *testing.T) {
	// With crss the Cgd law is fitted through qgd at 12 V: the charge the
	// voltage edges move stays 2 nC, and the timing rests on no estimate.
	part := func() devices.Part {
		p := testkit.HandCasePart()
		p.Crss = q.Some[q.Capacitance](50e-12)
		return p
	}
	var tr Trace
	r := evalPart(t, part(), handCaseStage(25), &tr)
	sy := &r.Devices[1]
	testkit.Near(t, "diode edge 1", float64(sy.TDiode1), deadA, 1e-6)
	testkit.Near(t, "diode edge 2", float64(sy.TDiode2), deadB, 1e-6)
	testkit.Near(t, "margin edge 1", float64(sy.Margin1), 20e-9+dOn-(2*1.6e-9*math.Log(2)+2e-9/1.25+1e-9/1.075), 1e-6)
	testkit.Near(t, "margin edge 2", float64(sy.Margin2), 20e-9+dOn-2*(5e-9/3.2)*math.Log(5/1.8), 1e-6)
	if r.Screens&ScreenCrossConduction != 0 || !hasStep(&tr, "sync", "dead-time timing") {
		t.Errorf("20 ns: screens %v", r.Screens)
	}
	// 1 ns at each edge: the synchronous gate is still above its threshold
	// when the control switch's channel starts (3.193 > 1 + 0.744 ns), and
	// the synchronous channel starts before the control switch's current
	// has fallen: both channels conduct, the part is set aside.
	st := handCaseStage(25)
	st.DeadTime = q.Some[q.Time](1e-9)
	r = evalPart(t, part(), st, nil)
	if r.Screens&ScreenCrossConduction == 0 || r.Devices[1].Margin2 >= 0 || r.Devices[1].TDiode2 != 0 {
		t.Errorf("1 ns dead time: screens %v, margins %v %v", r.Screens, r.Devices[1].Margin1, r.Devices[1].Margin2)
	}
	// Per-edge dead times: the edge the control switch turns on after gets
	// its own.
	st = handCaseStage(25)
	st.DeadTimeCtrlOn = q.Some[q.Time](40e-9)
	r = evalPart(t, part(), st, nil)
	testkit.Near(t, "diode edge 2 at 40 ns", float64(r.Devices[1].TDiode2), deadB+20e-9, 1e-6)
	testkit.Near(t, "diode edge 1 at 20 ns", float64(r.Devices[1].TDiode1), deadA, 1e-6)
}

// A driver of its own for the synchronous switch: its off loop holds the
// gate (the false turn-on check reads its sink), its drive levels set its
// gate loss, and the control switch keeps the stage's driver.
func TestSyncDriver(t *testing.T) {
	st := handCaseStage(25)
	base := evalPart(t, testkit.HandCasePart(), st, nil)
	st.SyncDriver = stage.Driver{VOn: 10, RSource: 2, RSink: 0.5}
	r := evalPart(t, testkit.HandCasePart(), st, nil)
	if r.Devices[0].Losses.GateDriver != base.Devices[0].Losses.GateDriver {
		t.Errorf("control gate loss moved with the sync driver: %v vs %v", r.Devices[0].Losses.GateDriver, base.Devices[0].Losses.GateDriver)
	}
	// The synchronous gate now swings 10 V: more charge; the on-resistance
	// is not lowered (one datasheet point at 5 V: no improvement claimed
	// above it).
	if r.Devices[1].Qg <= base.Devices[1].Qg || r.Devices[1].Rds != base.Devices[1].Rds {
		t.Errorf("sync at 10 V: Qg %v (5 V: %v), Rds %v (5 V: %v)", r.Devices[1].Qg, base.Devices[1].Qg, r.Devices[1].Rds, base.Devices[1].Rds)
	}
	testkit.Near(t, "sync off loop", float64(r.Devices[1].FalseOn.R), 0.5+1, 1e-12)
}
