// Package testkit holds the fixtures and comparisons that the tests of
// several rank packages share. Only tests import it.
package testkit

import (
	"math"
	"swrank/devices"
	q "swrank/devices/quantity"
	"testing"
)

// Near fails the test when got is not within rel (relative) of want, or
// within rel absolute when want is 0.
func Near(t *testing.T, what string, got, want, rel float64) {
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

// HandCasePart is the transistor of the hand-calculated synchronous buck
// checks (12 V, 10 A, 500 kHz; gate-charge method of Erickson & Maksimović
// 2001 ch. 4 and Balogh 2001) as a parts-library row.
func HandCasePart() devices.Part {
	return devices.Part{
		Name: "hand-a", VdsMax: 30, IdMax: 60, VgsMax: 20, VgsTh: 1.8,
		RdsOn: 5e-3, RdsOnVgs: 5, RdsOnTj: q.Some[q.Temperature](25),
		Qg: 8e-9, QgVgs: 5, QgVds: q.Some[q.Voltage](12), QgId: q.Some[q.Current](10),
		Qgs: q.Some[q.Charge](2e-9), Qgd: q.Some[q.Charge](2e-9), QgTh: q.Some[q.Charge](1e-9),
		VPlateau: q.Some[q.Voltage](2.5), RgInt: q.Some[q.Resistance](1),
		Coss: q.Some[q.Capacitance](400e-12), CapVds: q.Some[q.Voltage](12),
		// The √-law output charge and energy of that capacitance (Q = 2·C·V,
		// E = Q·V/3), stated so that the law is the same whatever swrank
		// would estimate from one capacitance.
		Qoss: q.Some[q.Charge](9.6e-9), Eoss: q.Some[q.Energy](38.4e-9), OssVds: q.Some[q.Voltage](12),
		Vsd: q.Some[q.Voltage](0.8), Qrr: q.Some[q.Charge](20e-9),
		RthJA: q.Some[q.ThermalResistance](40),
		// The values swrank would otherwise estimate, given so that the
		// checks exercise the formulas with stated inputs: no package
		// inductance; threshold −5 mV/K, diode drop −2 mV/K and recovered
		// charge 2× from 25 to 125 °C (common practice, from memory).
		Lcs: q.Some[q.Inductance](0), Lloop: q.Some[q.Inductance](0),
		VgsThHot: q.Some[q.Voltage](1.3), VgsThHotTj: q.Some[q.Temperature](125),
		VsdHot: q.Some[q.Voltage](0.6), VsdHotTj: q.Some[q.Temperature](125),
		QrrHot: q.Some[q.Charge](40e-9), QrrHotTj: q.Some[q.Temperature](125),
		// The recovery test at the hand case's own commutation (10 A,
		// 10 A in t_ir = 1 nC/0.95 A), so that its checks see the stated
		// charge unmoved by the charge-control scaling.
		QrrIf: q.Some[q.Current](10), QrrDidt: q.Some[q.Slew](9.5e9),
	}
}

// Within fails the test when got is not Within rel (relative) of want, or
// Within rel absolute when want is 0.
func Within(t *testing.T, what string, got, want, rel float64) {
	t.Helper()
	if math.IsNaN(got) || want == 0 && math.Abs(got) > rel || want != 0 && math.Abs(got-want) > rel*math.Abs(want) {
		t.Errorf("%s = %.9g, want %.9g (±%g relative)", what, got, want, rel)
	}
}

// LightPart is an invented 30 V part with a linear output capacitance
// (Q_oss and E_oss with E = Q·V/2) so that the capacitive energies have
// closed forms: C = 1 nF, Q_oss(12 V) = 12 nC, E_oss(12 V) = 72 nJ. The
// rest is the hand-case part's, rated 40 A.
func LightPart() devices.Part {
	p := HandCasePart()
	p.Name, p.IdMax = "light-a", 40
	p.Coss, p.CapVds = q.Opt[q.Capacitance]{}, q.Opt[q.Voltage]{}
	p.Qoss, p.Eoss = q.Some[q.Charge](12e-9), q.Some[q.Energy](72e-9)
	return p
}

// CaseDPart is an invented part for the paralleling hand calculation
// P(N) = I_rms²·R₁/N + N·f·E₁ (common practice): R₁ =
// 4 mΩ (at its drive and 25 °C), and an energy per device and cycle that
// grows with the number of devices of E₁ = E_oss(100 V) + Qg·Vdrive =
// 1.9 µJ + 10 nC·10 V = 2 µJ (linear output capacitance: E = Q·V/2).
func CaseDPart() devices.Part {
	return devices.Part{
		Name: "case-d", VdsMax: 200, IdMax: 100, VgsMax: 20, VgsTh: 3,
		RdsOn: 4e-3, RdsOnVgs: 10, RdsOnTj: q.Some[q.Temperature](25),
		Qg: 10e-9, QgVgs: 10, Tr: q.Some[q.Time](10e-9), Tf: q.Some[q.Time](10e-9),
		Qoss: q.Some[q.Charge](38e-9), Eoss: q.Some[q.Energy](1.9e-6), OssVds: q.Some[q.Voltage](100),
		RthJA: q.Some[q.ThermalResistance](40),
		// Stated rather than estimated: no package inductance, no
		// recovered charge.
		Lcs: q.Some[q.Inductance](0), Lloop: q.Some[q.Inductance](0), Qrr: q.Some[q.Charge](0),
	}
}
