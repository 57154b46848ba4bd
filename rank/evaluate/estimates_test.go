package evaluate

import (
	"testing"

	"swrank/devices"
	q "swrank/devices/quantity"
	"swrank/rank/fit"
	"swrank/rank/internal/testkit"
	"swrank/rank/stage"
)

// Unknown is not zero: each blank value gets its conservative estimate,
// used where the operating point needs it and flagged there. The
// estimates are common practice (docs/library.md, "Estimates for missing
// values"); the checks below are hand calculations from those values.
func TestEstimatesUsedAndFlagged(t *testing.T) {
	for _, c := range []struct {
		name  string
		edit  func(p *devices.Part, s *stage.Stage)
		check func(t *testing.T, r *Result)
	}{
		{"no thermal data, known package: the family's junction to ambient", func(p *devices.Part, s *stage.Stage) {
			p.RthJA, p.RthJC, p.Package = q.Opt[q.ThermalResistance]{}, q.Opt[q.ThermalResistance]{}, "DFN 3x3"
		}, func(t *testing.T, r *Result) {
			testkit.Near(t, "Rth", float64(r.Devices[0].Rth), 80, 1e-12) // DFN 3×3: 40-80 K/W, the top
			wantFlags(t, r, fit.FlagRthJAEstimated)
		}},
		{"no thermal data, heatsink given: the family's junction to case plus it", func(p *devices.Part, s *stage.Stage) {
			p.RthJA, p.RthJC, p.Package = q.Opt[q.ThermalResistance]{}, q.Opt[q.ThermalResistance]{}, "DFN 3x3"
			s.RthCA = q.Some[q.ThermalResistance](20)
		}, func(t *testing.T, r *Result) {
			testkit.Near(t, "Rth", float64(r.Devices[0].Rth), 6+20, 1e-12) // DFN 3×3: 1-6 K/W, the top
			wantFlags(t, r, fit.FlagRthJCEstimated)
		}},
		{"no thermal data, no package: the junction at tj_max", func(p *devices.Part, s *stage.Stage) {
			p.RthJA, p.RthJC, p.Package = q.Opt[q.ThermalResistance]{}, q.Opt[q.ThermalResistance]{}, ""
			s.TjFixed = q.Opt[q.Temperature]{}
		}, func(t *testing.T, r *Result) {
			if tj, _ := r.Tj(); tj != 150 {
				t.Errorf("Tj = %v, want tj_max 150 °C", tj)
			}
			wantFlags(t, r, fit.FlagNoRth)
		}},
		{"no qrr: 3× the output charge of a 30 V part", func(p *devices.Part, s *stage.Stage) {
			p.Qrr, p.QrrHot = q.Opt[q.Charge]{}, q.Opt[q.Charge]{}
		}, func(t *testing.T, r *Result) {
			// Q_oss(12 V) = 9.6 nC (the hand-case part's √ law): Qrr =
			// 28.8 nC at 25 °C (Tj pinned), through the control switch at
			// 12 V and 500 kHz: 0.1728 W, less what the dead time's short
			// conduction leaves unstored (as qrrShort; about 1 % here, the
			// larger charge giving a longer lifetime).
			testkit.Near(t, "Qrr", float64(r.Devices[0].Qrr), 28.8e-9, 1.5e-2)
			testkit.Near(t, "recovery", float64(r.Devices[0].Losses.Recovery), 28.8e-9*12*500e3, 1.5e-2)
			wantFlags(t, r, fit.FlagQrrEstimated)
		}},
		{"qrr with the output charge at a stated voltage: taken out", func(p *devices.Part, s *stage.Stage) {
			p.QrrHasCoss, p.QrrVr = true, q.Some[q.Voltage](12)
		}, func(t *testing.T, r *Result) {
			// 20 nC less Q_oss(12 V) = 9.6 nC (the √ law): 10.4 nC at the
			// test's own commutation (qrrShort), through the control
			// switch at 12 V and 500 kHz: 62.4 mW.
			testkit.Near(t, "Qrr", float64(r.Devices[0].Qrr), 10.4e-9, qrrShort)
			testkit.Near(t, "recovery", float64(r.Devices[0].Losses.Recovery), 10.4e-9*12*500e3, qrrShort)
			wantFlags(t, r, fit.FlagQrrLessCoss)
		}},
		{"qrr with the output charge, its voltage blank: none taken out", func(p *devices.Part, s *stage.Stage) {
			p.QrrHasCoss = true
		}, func(t *testing.T, r *Result) {
			testkit.Near(t, "Qrr", float64(r.Devices[0].Qrr), 20e-9, qrrShort)
			wantFlags(t, r, fit.FlagQrrCondEstimated)
		}},
		{"no rg_int: 3 Ω for silicon, and the other end too", func(p *devices.Part, s *stage.Stage) {
			p.RgInt = q.Opt[q.Resistance]{}
		}, func(t *testing.T, r *Result) {
			wantFlags(t, r, fit.FlagRgIntAssumed)
			if g := r.Devices[0].Losses.GateRint; g <= 0 {
				t.Errorf("gate loss in Rg,int %v with an estimated 3 Ω", g)
			}
		}},
		{"no l_loop, no package: leaded values, the overshoot screen runs", func(p *devices.Part, s *stage.Stage) {
			p.Lloop, p.Package = q.Opt[q.Inductance]{}, ""
		}, func(t *testing.T, r *Result) {
			testkit.Near(t, "L loop", float64(r.Devices[0].Lloop), 2*15e-9, 1e-12) // both places' packages
			wantFlags(t, r, fit.FlagLloopEstimated)
			if r.Devices[0].Vpeak <= 12 {
				t.Errorf("no overshoot with an estimated loop: %v", r.Devices[0].Vpeak)
			}
		}},
		{"no thermal data, the user's value for blank cells", func(p *devices.Part, s *stage.Stage) {
			p.RthJA, p.RthJC, p.Package = q.Opt[q.ThermalResistance]{}, q.Opt[q.ThermalResistance]{}, ""
			s.RthJABlank = q.Some[q.ThermalResistance](33)
		}, func(t *testing.T, r *Result) {
			testkit.Near(t, "Rth", float64(r.Devices[0].Rth), 33, 1e-12)
			wantFlags(t, r, fit.FlagRthJAEstimated)
		}},
		{"strict: a result on estimates is set aside", func(p *devices.Part, s *stage.Stage) {
			p.RgInt = q.Opt[q.Resistance]{}
			s.Strict = true
		}, func(t *testing.T, r *Result) {
			if r.Screens&ScreenEstimated == 0 || len(r.Reasons()) == 0 {
				t.Errorf("strict: screens %v, reasons %v", r.Screens, r.Reasons())
			}
		}},
		{"a value in the wrong unit: not a physical result", func(p *devices.Part, s *stage.Stage) {
			p.RdsOn = 5 // 5 Ω where 5 mΩ was meant: 10 A² × 5 Ω is far above the 12 W processed
		}, func(t *testing.T, r *Result) {
			if r.Screens&ScreenImplausible == 0 {
				t.Errorf("5 Ω at 10 A: screens %v, total %v", r.Screens, r.Losses.Total())
			}
		}},
	} {
		t.Run(c.name, func(t *testing.T) {
			p := testkit.HandCasePart()
			p.Package = "DFN 5x6"
			st := handCaseStage(25)
			st.Pout = 12
			c.edit(&p, &st)
			c.check(t, ptrTo(evalPart(t, p, st, nil)))
		})
	}
}

// Thermal solve left free for the thermal cases: handCaseStage pins Tj.
func TestEstimatedThermalPathSolved(t *testing.T) {
	p := testkit.HandCasePart()
	p.RthJA, p.Package = q.Opt[q.ThermalResistance]{}, "TO-220"
	st := handCaseStage(25)
	st.TjFixed = q.Opt[q.Temperature]{}
	r := evalPart(t, p, st, nil)
	testkit.Near(t, "Rth", float64(r.Devices[0].Rth), 65, 1e-12) // TO-220: 50-65 K/W, the top
	if tj, ok := r.Tj(); !ok || tj <= 25 {
		t.Errorf("Tj %v (%v) with an estimated 65 K/W path", tj, ok)
	}
}

func ptrTo(r Result) *Result { return &r }

func wantFlags(t *testing.T, r *Result, f fit.Flags) {
	t.Helper()
	if r.Flags&f != f {
		t.Errorf("flags %q, want %q among them", r.Flags.Codes(), f.Codes())
	}
}
