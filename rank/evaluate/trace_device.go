package evaluate

import (
	"math"

	q "swrank/devices/quantity"
	"swrank/rank/fit"
)

// traceDevice records the temperature-dependent steps of one device.
func traceDevice(tr *Trace, name string, out *DeviceResult, m *devModel, a *tempState, fixed q.Power, r0 q.Resistance, tj q.Temperature) {
	d, st, s := m.d, m.st, m.s
	drv := m.drv
	hist := make([]Term, 0, 16)
	for i := 0; i < out.Thermal.Iterations && i < len(out.Thermal.History); i++ {
		hist = append(hist, T("iterate", out.Thermal.History[i]))
	}
	hist = append(hist, T("Ta", s.Ambient), T("Rth", out.Rth), T("P fixed", fixed),
		T("P edges+dead+gate at Tj", a.p), T("P conduction at Tj", out.Losses.Conduction),
		N("loop gain", out.Thermal.Gain), N("steps", float64(out.Thermal.Iterations)), tjTerm(out))
	tr.add(name, "thermal", "Tj = Ta + Rth·P(Tj), P(Tj) the whole device loss (conduction, edges, dead time, gate), fixed point from Ta ("+out.Thermal.Status.String()+")", hist...)
	terms := []Term{T("Tj", tj), N("Vth tempco (V/K)", d.VthTC), T("Vth 25 °C", d.Vth), T("Vth at Tj", a.vth),
		T("gate shelf, datasheet 25 °C", d.VplSpec), T("gate shelf at turn-on, Tj", a.vplOn), T("gate shelf at turn-off, Tj", a.vplOff)}
	if m.dead {
		terms = append(terms, N("Vsd tempco (V/K)", d.VsdTC))
	}
	tr.add(name, "temperature", "Vth(Tj) = Vth(25 °C) + k·(Tj − 25 °C); the gate shelf (where the gate holds while the drain swings) moves with it (a lower shelf: faster turn-on, slower turn-off)", terms...)
	tr.add(name, "gate", "P_G = [Qg(Von) − Qg(Voff)]·(Von − Voff)·f over the curve at Tj, split per edge by the loop resistances; behind a ramping driver (drive edge) the share 1 − g of each edge stays in the driver's output stage, g = 2x·[1 − x·(1 − e^(−1/x))], x = τ/t_edge",
		T("Qg moved", a.qg), T("Von", drv.VOn), T("Voff", drv.VOff), T("E stored in gate", a.stored),
		T("driver pull-up R (effective)", m.rdOn), T("driver pull-down R (effective)", m.rdOff), T("Rg ext", drv.RgExt), T("Rg int", d.RgInt),
		T("drive edge", drv.Edge), T("E gate/cycle", a.egate), T("driver", out.Losses.GateDriver), T("of which its ramping edge", out.GateEdge), T("Rg ext", out.Losses.GateRext),
		T("Rg int", out.Losses.GateRint), T("quiescent", out.Losses.DriverQuiescent),
		T("Miller charge moved off the plateau at turn-off", a.qCollapse), T("its energy, left to the drain", a.eCollapse))
	if m.hard && m.driveOK {
		if d.Method == fit.MethodGateCharge {
			tr.add(name, "transitions", "gate-charge method at Tj: each edge interval lasts t = Q / I_gate, I_gate = (V_drive − V_gate)/R_gate path (at the mean gate voltage (Vth+V_shelf)/2 while the current moves)",
				T("Qgd at V", d.MillerChargeAt(st.V)), T("Vth", a.vth),
				T("gate shelf at turn-on", a.vplOn), T("gate shelf at turn-off", a.vplOff), T("gate path R, charging", m.rOn), T("gate path R, discharging", m.rOff),
				T("on: current takes over", a.trans.Tir), T("on: drain swings down", a.trans.Tvf), T("off: drain swings up", a.trans.Tvr), T("off: current lets go", a.trans.Tif))
		} else {
			tr.add(name, "transitions", "datasheet times at Tj: t = t_10-90/0.8 · (R_loop/R_test) · (headroom_test/headroom)",
				T("tr", d.Part.Tr.V), T("tf", d.Part.Tf.V), T("R test", d.TswR),
				T("drive above the shelf, on", drv.VOn-a.vplOn), T("shelf above the off level", a.vplOff-drv.VOff),
				T("on: drain swings down", a.trans.Tvf), T("off: drain swings up", a.trans.Tvr))
		}
		if m.lcs > 0 {
			tr.add(name, "common-source inductance", "t = (R·Qgs2 + Lcs·I)/(V_drive − V_gate,mean): Lcs·di/dt is taken out of the gate path's drive while the current moves",
				T("Lcs", m.lcs), T("current takes over, without", a.tir0), T("current takes over, with", a.trans.Tir), T("current lets go, without", a.tif0), T("current lets go, with", a.trans.Tif),
				T("ΔE on", a.elcsOn), T("ΔE off", a.elcsOff))
		}
		if m.lloop > 0 {
			tr.add(name, "power-path inductance", "turn-on: the switch sees V − L·di/dt while the current rises; turn-off: V + L·di/dt while it falls (+½·L·I²); peak = V + L·I_off/t_fall",
				T("L power path (layout + packages)", m.lloop), T("layout", s.LoopInductance), T("own package", d.Lloop),
				T("I off", st.IOff), T("t fall", a.tFall), peakTerm(a.vpeak, d.Part.VdsMax),
				T("½·L·I_off²", q.Energy(0.5*float64(m.lloop)*float64(st.IOff)*float64(st.IOff))),
				T("net ΔE per cycle", a.eloop))
		}
		tr.add(name, "overlap", "E = ½·V·I·t per interval (loop and common-source inductance included); P = E·f",
			T("V", st.V), T("I on", st.IOn), T("I off", st.IOff), T("E on", a.eon), T("E off", a.eoff),
			T("P on", out.Losses.TurnOn), T("P off", out.Losses.TurnOff))
	}
	if m.dead {
		tr.add(name, "dead time", "E = Vsd(Tj)·(I1·t_dt + I2·t_dt)",
			T("Vsd 1", a.vsd1), T("I1", st.IDead1), T("Vsd 2", a.vsd2), T("I2", st.IDead2), T("t_dt", s.DeadTime.V),
			T("P", out.Losses.DeadTime))
	}
	if out.RdsDyn > 1 {
		tr.add(name, "dynamic on-resistance", "k(V) = 1 + (k_test − 1)·V/V_test (k_test as stated when V_test is unknown)",
			N("k test", float64(d.DynK)), T("V test", d.DynV), T("V blocked", st.V), N("k(V)", out.RdsDyn))
	}
	tr.add(name, "conduction", "P = I_rms²·Rds(on)(Vgs, Tj), Rds = [R0 + k/(Vgs − Vth)]·F(Tj)·k_dyn",
		T("I rms", st.IRms), T("R at Vgs, T0", r0), T("T0", d.Temp.T0), N("F(Tj)", d.Temp.Factor(tj)), N("k dyn", out.RdsDyn),
		T("Rds", out.Rds), T("P", out.Losses.Conduction))
	tr.add(name, "off-state margin", "margin = Vth(Tj) − Voff (static; the dv/dt bounce of the synchronous switch follows)",
		T("Vth at Tj", a.vth), T("Voff", drv.VOff), T("margin", a.vth-drv.VOff))
}

// tjTerm is the solved junction temperature, or a term with no value
// (printed "none") when no steady temperature exists (runaway).
func tjTerm(out *DeviceResult) Term {
	if !out.Thermal.Found {
		return Term{Name: "Tj, runaway", Value: math.NaN(), Kind: q.Temperature(0).Kind()}
	}
	return T("Tj", out.Thermal.Tj)
}

// peakTerm is the peak drain voltage, or, when the overshoot would pass
// vds_max, the breakdown voltage the part would avalanche at instead of a
// number it cannot reach.
func peakTerm(vpeak, vdsMax q.Voltage) Term {
	if vpeak > vdsMax {
		return T("V peak: past vds_max, the part would avalanche near", vdsMax)
	}
	return T("V peak", vpeak)
}
