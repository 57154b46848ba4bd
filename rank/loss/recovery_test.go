package loss

import (
	"math"
	"testing"

	q "swrank/devices/quantity"
	"swrank/rank/internal/testkit"
)

// The charge-control model of a diode's recovery (Kassakian, Schlecht &
// Verghese, Principles of Power Electronics, 1991, ch. 20) with a linear
// current ramp: a hand calculation of its closed form and its two limits,
// the whole stored charge τ·I_F for a fast ramp and a·τ² for a slow one,
// and the fit of τ to a datasheet point.
func TestRecoveredCharge(t *testing.T) {
	tau := q.Time(50e-9)
	for _, c := range []struct {
		name string
		iF   q.Current
		didt q.Slew
		want float64
	}{
		{"closed form", 10, 100e6, 100e6 * 50e-9 * 50e-9 * (1 - math.Exp(-10/(100e6*50e-9)))},
		{"fast: the stored charge", 10, 1e15, 50e-9 * 10},
		{"slow: a·τ²", 1000, 1e6, 1e6 * 50e-9 * 50e-9},
		{"no current", 0, 100e6, 0},
	} {
		testkit.Near(t, c.name, float64(RecoveredCharge(tau, c.iF, c.didt)), c.want, 1e-6)
	}
	// The fit gives back the lifetime of a point it made.
	q0 := RecoveredCharge(tau, 15, 100e6)
	got, ok := FitRecoveryLifetime(q0, 15, 100e6)
	if !ok {
		t.Fatal("no lifetime fitted")
	}
	testkit.Near(t, "fitted τ", float64(got), float64(tau), 1e-6)
	if _, ok := FitRecoveryLifetime(0, 15, 100e6); ok {
		t.Error("a zero charge fitted a lifetime")
	}
}
