package evaluate

import (
	q "swrank/devices/quantity"
	"swrank/rank/fit"
	"swrank/rank/internal/testkit"
	"swrank/rank/stage"
	"testing"
)

// Evaluate in discontinuous conduction: no overlap and no recovery at the
// control switch's turn-on, whatever the diode's Qrr; the capacitive loss
// is E_S(Vin − Vout) + ½·Cj·(Vin − Vout)² per cycle (linear part, see
// TestSoftTurnOnEnergy).
func TestEvaluateDCM(t *testing.T) {
	p := testkit.LightPart()
	d, err := fit.Prepare(&p)
	if err != nil {
		t.Fatal(err)
	}
	st := stage.Stage{Topology: stage.Buck, Rectifier: stage.DiodeRect, Vin: 12, Vout: 5, Iout: 0.3, Fsw: 100e3, Inductance: 10e-6,
		Diode: stage.Diode{Vf: 0.4, Qrr: 30e-9, Cj: 200e-12}, Driver: stage.Driver{VOn: 5}, TjFixed: q.Some[q.Temperature](25)}
	pt, err := st.Resolve()
	if err != nil {
		t.Fatal(err)
	}
	r := Evaluate(&pt, &d, nil, nil)
	c := r.Devices[0].Losses
	testkit.Within(t, "turn-on overlap", float64(c.TurnOn), 0, 1e-15)
	testkit.Within(t, "recovery", float64(c.Recovery), 0, 1e-15)
	vr := 7.0
	testkit.Within(t, "coss", float64(c.Coss), (0.5*1e-9*vr*vr+0.5*200e-12*vr*vr)*100e3, 1e-9)
	if c.TurnOff <= 0 {
		t.Errorf("turn-off %g: the peak current is still switched hard", float64(c.TurnOff))
	}
	testkit.Within(t, "conduction", float64(c.Conduction), float64(pt.Ctrl.IRms*pt.Ctrl.IRms)*5e-3, 1e-9)
}

// Evaluate in forced-continuous conduction: the synchronous switch's hard
// turn-off at the reversed current; the control switch without turn-on
// overlap, recovery or (the swing being complete) capacitive loss, but with
// reverse conduction Vsd·I·(t_dt − (Q_S + Q_K)/I) per cycle.
func TestEvaluateFCCM(t *testing.T) {
	p := testkit.LightPart()
	d, err := fit.Prepare(&p)
	if err != nil {
		t.Fatal(err)
	}
	st := stage.Stage{Topology: stage.Buck, Vin: 12, Vout: 1.2, Iout: 0.5, Fsw: 500e3, Inductance: 0.5e-6,
		DeadTime: q.Some[q.Time](40e-9), Driver: stage.Driver{VOn: 5}, TjFixed: q.Some[q.Temperature](25)}
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
	testkit.Within(t, "control turn-on", float64(c.TurnOn), 0, 1e-15)
	testkit.Within(t, "control coss", float64(c.Coss), 0, 1e-15)
	testkit.Within(t, "control recovery", float64(c.Recovery), 0, 1e-15)
	testkit.Within(t, "control reverse conduction", float64(c.DeadTime), 0.8*i*(40e-9-24e-9/i)*500e3, 1e-6)
	s := r.Devices[1].Losses
	if s.TurnOff <= 0 {
		t.Errorf("sync turn-off %g: should be hard at %g A", float64(s.TurnOff), i)
	}
	// The sync's own dead time: only before its turn-on, at the peak.
	testkit.Within(t, "sync dead time", float64(s.DeadTime), 0.8*(0.5+4.32/2)*float64(r.Devices[1].TDiode1)*500e3, 1e-6)

	// A short dead time leaves a residual voltage: partial swing with
	// x = I·t_dt/(2C) (linear parts) and E = C·(V − x)² per cycle.
	st.DeadTime = q.Some[q.Time](5e-9)
	pt, err = st.Resolve()
	if err != nil {
		t.Fatal(err)
	}
	r = Evaluate(&pt, &d, nil, nil)
	x := i * 5e-9 / 2e-9
	testkit.Within(t, "partial swing coss", float64(r.Devices[0].Losses.Coss), 1e-9*(12-x)*(12-x)*500e3, 1e-6)
	testkit.Within(t, "partial swing: no reverse conduction", float64(r.Devices[0].Losses.DeadTime), 0, 1e-15)
}

// The light-load paths keep evaluation free of allocations (the partial
// swing solves with FindRoot on a closure that stays on the stack).
func TestEvaluateLightLoadAllocations(t *testing.T) {
	p := testkit.LightPart()
	d, err := fit.Prepare(&p)
	if err != nil {
		t.Fatal(err)
	}
	for _, st := range []stage.Stage{
		{Topology: stage.Buck, Vin: 12, Vout: 1.2, Iout: 0.5, Fsw: 500e3, Inductance: 0.5e-6, DeadTime: q.Some[q.Time](5e-9), Driver: stage.Driver{VOn: 5}},
		{Topology: stage.Buck, Rectifier: stage.DiodeRect, Vin: 12, Vout: 5, Iout: 0.3, Fsw: 100e3, Inductance: 10e-6, Driver: stage.Driver{VOn: 5}},
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
