package loss

import (
	"testing"

	q "swrank/devices/quantity"
	"swrank/rank/internal/testkit"
)

// integrateRecovery steps the charge-control equation dq/dt = i − q/τ
// (Kassakian, Schlecht & Verghese, Principles of Power Electronics, 1991,
// ch. 20) by explicit steps of h: iF for tOn from no charge, then the
// ramp iF − a·t through zero into reverse until the stored charge is
// gone, and returns the reverse current's integral.
func integrateRecovery(tau, iF, a, tOn, h float64) float64 {
	var qs, rev float64
	for t := 0.0; t < tOn; t += h {
		qs += h * (iF - qs/tau)
	}
	for t := 0.0; qs > 0; t += h {
		i := iF - a*(t+h/2)
		qs += h * (i - qs/tau)
		if i < 0 {
			rev -= h * i
		}
	}
	return rev
}

// The charge-control model of a diode's recovery (Kassakian, Schlecht &
// Verghese 1991, ch. 20) with a linear current ramp: the closed form
// against the model's equation integrated step by step, its two limits,
// the whole stored charge τ·I_F for a fast ramp and a·τ²/2 for a slow one,
// and the fit of τ to a datasheet point.
func TestRecoveredCharge(t *testing.T) {
	tau := q.Time(50e-9)
	for _, c := range []struct {
		name string
		iF   q.Current
		didt q.Slew
		want float64
	}{
		{"datasheet-like test", 10, 100e6, integrateRecovery(50e-9, 10, 100e6, 1e-6, 1e-12)},
		{"fast: the stored charge", 10, 1e15, 50e-9 * 10},
		{"slow: a·τ²/2", 1000, 1e6, 1e6 * 50e-9 * 50e-9 / 2},
		{"no current", 0, 100e6, 0},
	} {
		testkit.Near(t, c.name, float64(RecoveredCharge(tau, c.iF, c.didt)), c.want, 2e-3)
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

// The same model started from the charge a diode stores in a forward
// interval tOn (a body diode in a dead time): the closed form against the
// equation integrated step by step, its long-interval limit
// RecoveredCharge, no charge for an instant's conduction and an instant
// ramp, and a·τ²/2 for a slow ramp whatever came before.
func TestRecoveredChargeAfter(t *testing.T) {
	tau := 30e-9
	for _, c := range []struct {
		name       string
		iF, a, tOn float64
	}{
		{"short dead time, fast ramp", 4.25, 1e9, 14e-9},
		{"dead time of 2τ", 10, 2e9, 60e-9},
		{"slow ramp", 3, 0.1e9, 10e-9},
	} {
		got := float64(RecoveredChargeAfter(q.Time(tau), q.Current(c.iF), q.Slew(c.a), q.Time(c.tOn)))
		testkit.Near(t, c.name, got, integrateRecovery(tau, c.iF, c.a, c.tOn, 1e-12), 2e-3)
	}
	long := RecoveredChargeAfter(q.Time(tau), 10, 1e9, 1)
	testkit.Near(t, "long conduction", float64(long), float64(RecoveredCharge(q.Time(tau), 10, 1e9)), 1e-9)
	if z := RecoveredChargeAfter(q.Time(tau), 10, 1e15, 0); float64(z) > 1e-4*tau*10 {
		t.Errorf("no conduction before an instant ramp: %g C, want 0", float64(z))
	}
	testkit.Near(t, "slow ramp after no conduction", float64(RecoveredChargeAfter(q.Time(tau), 10, 1e6, 0)), 1e6*tau*tau/2, 1e-6)
}
