package evaluate

import (
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
// overlap 0.1795 W (refined variant), V·Q_oss 57.6 mW, recovery 0.1200 W,
// conduction 0.0500 W, gate 20.00 mW in all; sync switch dead time 0.1600 W,
// conduction 10²·0.9·5 mΩ = 0.450 W.
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
	testkit.Near(t, "control overlap", float64(c.TurnOn+c.TurnOff), 0.1795, 1e-3)
	testkit.Near(t, "control coss", float64(c.Coss), 57.6e-3, 1e-6)
	testkit.Near(t, "control recovery", float64(c.Recovery), 0.12, 1e-6)
	testkit.Near(t, "control conduction", float64(c.Conduction), 0.05, 1e-6)
	testkit.Near(t, "control gate", float64(c.GateDriver+c.GateRext+c.GateRint), 20e-3, 1e-6)
	s := r.Devices[1].Losses
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
