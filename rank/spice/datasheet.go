package spice

import (
	"swrank/devices"
	q "swrank/devices/quantity"
)

// Datasheet holds the numbers extracted from a model by simulated
// characterisation, with the test conditions of each (SI units).
type Datasheet struct {
	RdsOn, RdsOnVgs   float64 // on-resistance (Ω) at RdsOnVgs (V, 10 V) and the model's ITest
	RdsOn2, RdsOn2Vgs float64 // on-resistance (Ω) at the second gate voltage (V, the model's Vgs2)
	RdsOnId           float64 // drain current forced in the on-resistance tests (both gate voltages, and hot), A (the model's ITest)
	Vth               float64 // gate threshold at VthCurrent, Vds = Vgs, V
	Vsd               float64 // body-diode drop at ITest, V; > 0
	// The static tests again at the junction temperature HotTj (°C, 125):
	// on-resistance at RdsOnVgs, threshold, body-diode drop.
	RdsOnHot, VthHot, VsdHot, HotTj float64

	Ciss, Coss, Crss, CapVds float64 // small-signal capacitances at 1 MHz (F) and their drain bias CapVds (V, half the rating)
	Coss2, Crss2, Cap2Vds    float64 // Coss and Crss (F) at a second drain bias Cap2Vds (V, a tenth of the rating)
	// The C–V curves: Coss and Crss (F) at the drain biases CVVds (V, the
	// fractions cvFractions of the rating).
	CVVds, CossCV, CrssCV []float64
	RgInt                 float64 // gate resistance at 1 MHz, drain shorted to source, Ω
	Qoss, Eoss, OssVds    float64 // output charge (C) and energy (J) from 0 V to OssVds (V, half the rating)

	// Body-diode reverse recovery (gate shorted to source; the recovery
	// step): Qrr is the recovered charge without the capacitances' charge
	// (Q_oss and the junction's in forward bias; see recovery), C,
	// ≥ 0 (0: none the test resolves, below the larger of 10 pC and 1 %
	// of Qoss), at the forward current QrrIf (A, ITest), the ramp rate
	// QrrDidt (A/s, 100 A/µs) and the clamp voltage QrrVr (V, OssVds);
	// Irrm is the peak reverse current (A, > 0, Coss's charging current
	// included) and Trr the time from the current's zero crossing to
	// 25 % of Irrm past the peak (s, > 0); both for the report.
	Qrr, QrrIf, QrrDidt, QrrVr float64
	Irrm, Trr                  float64

	Qg, QgVgs, QgVds, QgId float64 // total gate charge (C) at QgVgs (V, 10 V) in the gate-charge test at QgVds (V, half the rating) and QgId (A, ITest)
	Qgs, Qgd, QgTh, Vpl    float64 // gate-source, Miller and threshold charges (C); plateau voltage (V)
	// Qg2 is the total gate charge (C) at the second gate voltage Qg2Vgs
	// (V; 4.5 V at a 10 V test, above the plateau) in the same test; both
	// 0 when no such voltage lies above the plateau.
	Qg2, Qg2Vgs float64
	// GateCurve is the gate-charge curve resampled at 41 points from 0 to
	// Qg: pairs of charge (C) and gate voltage (V), charge increasing.
	GateCurve [][2]float64

	Tr, Tf         float64 // 10-90 % current rise and fall times, resistive load, s
	TswVdd         float64 // supply of the switching-time test, V (half the rating)
	TswId          float64 // drain current of the switching-time test, A (ITest)
	TswVgs         float64 // gate drive of the switching-time test, V (10 V)
	TswRg          float64 // external gate resistor of the switching-time test, Ω (3 Ω)
	TswRgen        float64 // generator resistance of the switching-time test, Ω (1 Ω)
	TswTdOn        float64 // turn-on delay td(on), from the generator's rising edge to 10 % of the drain current, s (the library's td_on)
	TswTdOff       float64 // turn-off delay td(off), from the generator's falling edge to 90 % of the drain current, s (the library's td_off)
	GateChargeIg   float64 // constant gate current of the gate-charge test, A
	GateChargeTime float64 // length of the gate-charge test, s
	VthCurrent     float64 // drain current of the threshold test, A (250 µA)
}

// Part turns the datasheet into a parts-library row: only what a datasheet
// shows (ratings, typical values and their test conditions), never the
// model parameters.
func (ds *Datasheet) Part(m *Model) devices.Part {
	v := func(x float64) q.Opt[q.Voltage] { return q.Some(q.Voltage(x)) }
	p := devices.Part{
		Name: m.Name, Package: "sim", Technology: devices.Silicon,
		Notes:  "synthetic VDMOS model characterised by ngspice",
		VdsMax: q.Voltage(m.VdsMax), IdMax: q.Current(m.IdMax), VgsMax: q.Voltage(m.VgsMax),
		TjMax: q.Some[q.Temperature](150),
		VgsTh: q.Voltage(ds.Vth),
		RdsOn: q.Resistance(ds.RdsOn), RdsOnVgs: q.Voltage(ds.RdsOnVgs), RdsOnTj: q.Some[q.Temperature](25),
		RdsOn2: q.Some(q.Resistance(ds.RdsOn2)), RdsOn2Vgs: v(ds.RdsOn2Vgs),
		Qg: q.Charge(ds.Qg), QgVgs: q.Voltage(ds.QgVgs), QgVds: v(ds.QgVds), QgId: q.Some(q.Current(ds.QgId)),
		Qgs: q.Some(q.Charge(ds.Qgs)), Qgd: q.Some(q.Charge(ds.Qgd)), QgTh: q.Some(q.Charge(ds.QgTh)),
		VPlateau: v(ds.Vpl), RgInt: q.Some(q.Resistance(ds.RgInt)),
		Ciss: q.Some(q.Capacitance(ds.Ciss)), Coss: q.Some(q.Capacitance(ds.Coss)), Crss: q.Some(q.Capacitance(ds.Crss)),
		CapVds: v(ds.CapVds),
		Qoss:   q.Some(q.Charge(ds.Qoss)), Eoss: q.Some(q.Energy(ds.Eoss)), OssVds: v(ds.OssVds),
		Tr: q.Some(q.Time(ds.Tr)), Tf: q.Some(q.Time(ds.Tf)), TswVdd: v(ds.TswVdd), TswId: q.Some(q.Current(ds.TswId)),
		TswVgs: v(ds.TswVgs), TswRg: q.Some(q.Resistance(ds.TswRg)), TswRgen: q.Some(q.Resistance(ds.TswRgen)),
		Vsd: v(ds.Vsd), VsdIf: q.Some(q.Current(m.ITest)),
		// What the simulated die has, which a datasheet would state and
		// swrank would otherwise estimate: no package inductance (the
		// cell's own parasitics are the stage's), and lossless output
		// capacitance (the model's capacitances store and return their
		// energy: no soft-switching hysteresis).
		Lcs: q.Some[q.Inductance](0), Lloop: q.Some[q.Inductance](0),
		EossLoss: q.Some[q.Energy](0), EossLossVds: v(ds.OssVds),
	}
	// The hot column, each value only where the model moves it the way a
	// part does (a VDMOS card without a threshold coefficient raises its
	// 250 µA threshold slightly as the mobility falls): the rest stays
	// blank, for swrank's flagged default.
	if t := q.Some(q.Temperature(ds.HotTj)); ds.HotTj > 25 {
		if ds.RdsOnHot > ds.RdsOn {
			p.RdsHot, p.RdsHotTj = q.Some(q.Resistance(ds.RdsOnHot)), t
		}
		if ds.VthHot > 0 && ds.VthHot < ds.Vth {
			p.VgsThHot, p.VgsThHotTj = q.Some(q.Voltage(ds.VthHot)), t
		}
		if ds.VsdHot > 0 && ds.VsdHot < ds.Vsd {
			p.VsdHot, p.VsdHotTj = q.Some(q.Voltage(ds.VsdHot)), t
		}
	}
	// The test currents of the on-resistance and the threshold, when the
	// tests state them.
	if ds.RdsOnId > 0 {
		p.RdsOnId = q.Some(q.Current(ds.RdsOnId))
	}
	if ds.VthCurrent > 0 {
		p.VgsThId = q.Some(q.Current(ds.VthCurrent))
	}
	// The second total gate charge, when a voltage above the plateau
	// had one.
	if ds.Qg2Vgs > 0 && ds.Qg2 > 0 {
		p.Qg2, p.Qg2Vgs = q.Some(q.Charge(ds.Qg2)), v(ds.Qg2Vgs)
	}
	if n := len(ds.CVVds); n >= 2 && len(ds.CossCV) == n && len(ds.CrssCV) == n {
		co, cr := make([]devices.CVPoint, n), make([]devices.CVPoint, n)
		for i, v := range ds.CVVds {
			co[i] = devices.CVPoint{V: q.Voltage(v), C: q.Capacitance(ds.CossCV[i])}
			cr[i] = devices.CVPoint{V: q.Voltage(v), C: q.Capacitance(ds.CrssCV[i])}
		}
		p.CossCurve, p.CrssCurve = devices.FormatCVCurve(co), devices.FormatCVCurve(cr)
	}
	if ds.Cap2Vds > 0 && ds.Coss2 > 0 && ds.Crss2 > 0 {
		p.Coss2, p.Crss2, p.Cap2Vds = q.Some(q.Capacitance(ds.Coss2)), q.Some(q.Capacitance(ds.Crss2)), v(ds.Cap2Vds)
	}
	// The delay times, when the switching-time test measured them.
	if ds.TswTdOn > 0 && ds.TswTdOff > 0 {
		p.TdOn, p.TdOff = q.Some(q.Time(ds.TswTdOn)), q.Some(q.Time(ds.TswTdOff))
	}
	// The recovered charge without the output charge (the test takes the
	// capacitances' charge out: qrr_includes_coss no), when the recovery
	// test ran (a datasheet without it leaves the columns blank).
	if ds.QrrIf > 0 && ds.QrrDidt > 0 {
		p.Qrr, p.QrrIf, p.QrrDidt = q.Some(q.Charge(ds.Qrr)), q.Some(q.Current(ds.QrrIf)), q.Some(q.Slew(ds.QrrDidt))
		p.QrrTj, p.QrrHasCoss = q.Some[q.Temperature](25), false
		if ds.Trr > 0 && ds.Irrm > 0 {
			p.Trr, p.Irrm = q.Some(q.Time(ds.Trr)), q.Some(q.Current(ds.Irrm))
		}
	}
	return p
}
