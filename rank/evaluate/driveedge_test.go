package evaluate

import (
	"testing"

	q "swrank/devices/quantity"
	"swrank/rank/fit"
	"swrank/rank/internal/testkit"
	"swrank/rank/stage"
)

// A driver whose own output ramps moves gate energy out of the loop's
// resistances into its output stage and never changes what its supply
// gives, [Qg(Von) − Qg(Voff)]·ΔV·f (energy conservation over the gate loop,
// Balogh 2001; the ramp-driven RC of loss.RampShare); it slows the hard
// edges, never speeds them; and a zero edge is the step exactly.
func TestDriveEdgeMovesGateEnergy(t *testing.T) {
	p := testkit.HandCasePart()
	d, err := fit.Prepare(&p)
	if err != nil {
		t.Fatal(err)
	}
	eval := func(edge q.Time) DeviceResult {
		st := stage.Stage{Topology: stage.Buck, Vin: 12, Vout: 1.2, Iout: 10, Fsw: 500e3,
			Driver: stage.Driver{VOn: 5, Edge: edge}, TjFixed: q.Some[q.Temperature](25)}
		pt, err := st.Resolve()
		if err != nil {
			t.Fatal(err)
		}
		return Evaluate(&pt, &d, nil, nil).Devices[0]
	}
	step, zero := eval(0), eval(0)
	if step.Losses != zero.Losses || step.GateEdge != 0 {
		t.Fatalf("a zero edge must be the step: %+v, edge share %g", zero.Losses, float64(step.GateEdge))
	}
	gate := func(r DeviceResult) float64 {
		return float64(r.Losses.GateDriver + r.Losses.GateRext + r.Losses.GateRint)
	}
	prev := step
	for _, edge := range []q.Time{0.5e-9, 2e-9, 10e-9} {
		r := eval(edge)
		testkit.Within(t, "gate energy drawn", gate(r), gate(step), 1e-9)
		if !(r.GateEdge > prev.GateEdge && r.Losses.GateRint < prev.Losses.GateRint) {
			t.Errorf("edge %s: the driver's ramp takes %s (before %s), Rg,int %s (before %s): a slower edge must move more out of the resistances",
				edge, r.GateEdge, prev.GateEdge, r.Losses.GateRint, prev.Losses.GateRint)
		}
		if r.Trans.Tvf < step.Trans.Tvf || r.Trans.Tir < step.Trans.Tir || r.Losses.TurnOn < step.Losses.TurnOn {
			t.Errorf("edge %s: turn-on intervals %s/%s and loss %s against the step's %s/%s and %s: a ramp never speeds an edge",
				edge, r.Trans.Tir, r.Trans.Tvf, r.Losses.TurnOn, step.Trans.Tir, step.Trans.Tvf, step.Losses.TurnOn)
		}
		t.Logf("edge %s: Tir %s, Tvf %s, turn-on %s; Rg,int %s, driver's ramp %s", edge, r.Trans.Tir, r.Trans.Tvf, r.Losses.TurnOn, r.Losses.GateRint, r.GateEdge)
		prev = r
	}
	if long := eval(10e-9); !(long.Trans.Tvf > step.Trans.Tvf) {
		t.Errorf("a 10 ns edge, longer than the gate's delay to its threshold, must stretch the voltage fall: %s against %s", long.Trans.Tvf, step.Trans.Tvf)
	}
}
