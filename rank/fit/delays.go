package fit

import (
	"math"

	q "swrank/devices/quantity"
)

// Fractions of the switching-time test's gate pulse and drain current
// that bound the delay times (IEC 60747-8 definitions): td(on) runs from
// 10 % of the gate pulse to 10 % of the drain voltage's fall, td(off) from
// 90 % of the gate pulse's fall to 10 % of the drain voltage's rise. In
// the resistive-load test the current moves with the drain voltage, so
// those ends are 10 % and 90 % of the test current.
const (
	tdPulseOn  = 0.1 // share of the gate pulse at which td(on) starts
	tdPulseOff = 0.9 // share of the gate pulse at which td(off) starts
	tdCurOn    = 0.1 // share of the test current at which td(on) ends
	tdCurOff   = 0.9 // share of the test current at which td(off) ends
)

// fitDelays derives the gate's delay capacitances DelayCOn and DelayCOff
// from the datasheet delay times td_on and td_off, under the
// switching-time test's conditions: gate drive tsw_vgs from 0 V, current
// tsw_id, gate loop R_test = tsw_rg + tsw_rgen + Rg,int (the part's
// rg_int, or its estimate, flagged rg?). As for tr/tf, the test needs
// tsw_vgs and at least one of tsw_rg and tsw_rgen (the blank one taken as
// 0 Ω); the delays need tsw_id as well. A delay given without them, or
// one the RC gate cannot produce under them (delayCapacitance), is not
// used: its capacitance stays 0 and FlagTdNoConditions is set.
//
// The gate of the test rises from 0 V towards Vgs,test (turn-on) and falls
// from Vgs,test towards 0 V (turn-off) as an RC circuit, and its channel
// carries a current i once the gate passes the square-law plateau
// V_pl(i) (PlateauAt): with V10 = V_pl(0.1·tsw_id), V90 = V_pl(0.9·tsw_id).
// Each delay ends at 10 % of the drain's swing, so it also holds the time
// the gate stays near its plateau while the Miller charge of that tenth
// of the swing moves (MillerChargeAt; the test's supply tsw_vdd, else
// none counted): at turn-on the swing from V to 0.9·V, with the gate
// current (Vgs,test − V10)/R_test; at turn-off the swing from 0 to 0.1·V,
// where Cgd is largest, with V90/R_test:
//
//	td_on  = R_test·C_on·ln(0.9·Vgs,test/(Vgs,test − V10)) + R_test·[Q_M(V) − Q_M(0.9·V)]/(Vgs,test − V10)
//	td_off = R_test·C_off·ln(0.9·Vgs,test/V90) + R_test·Q_M(0.1·V)/V90
//
// solved for C_on and C_off.
//
// Source: the delay-time definitions of IEC 60747-8:2010 (switching
// times); the delays as the RC response of the gate through the gate loop
// (Balogh, "Design and Application Guide for High Speed MOSFET Gate Drive
// Circuits", 2001).
func (d *Device) fitDelays() {
	p := d.Part
	if !p.TdOn.OK && !p.TdOff.OK {
		return
	}
	if !(p.TswVgs.OK && p.TswId.OK && (p.TswRg.OK || p.TswRgen.OK)) {
		d.Flags |= FlagTdNoConditions
		return
	}
	r := p.TswRg.V + p.TswRgen.V + d.RgInt
	vgs, id := p.TswVgs.V, p.TswId.V
	// The Miller intervals inside each delay (0 without the test's
	// supply).
	var mOn, mOff q.Time
	if v := p.TswVdd.V; p.TswVdd.OK && d.Qgd > 0 {
		v10, v90 := d.PlateauAt(tdCurOn*id), d.PlateauAt(tdCurOff*id)
		if vgs > v10 {
			mOn = q.Time(float64(r) * float64(d.MillerChargeAt(v)-d.MillerChargeAt((1-tdCurOn)*v)) / float64(vgs-v10))
		}
		if v90 > 0 {
			mOff = q.Time(float64(r) * float64(d.MillerChargeAt((1-tdCurOff)*v)) / float64(v90))
		}
	}
	if p.TdOn.OK {
		v10 := d.PlateauAt(tdCurOn * id)
		d.DelayCOn = delayCapacitance(p.TdOn.V-mOn, r, (1-tdPulseOn)*vgs, vgs-v10)
		if d.DelayCOn == 0 {
			d.Flags |= FlagTdNoConditions
		}
	}
	if p.TdOff.OK {
		v90 := d.PlateauAt(tdCurOff * id)
		d.DelayCOff = delayCapacitance(p.TdOff.V-mOff, r, tdPulseOff*vgs, v90)
		if d.DelayCOff == 0 {
			d.Flags |= FlagTdNoConditions
		}
	}
}

// delayCapacitance is the capacitance C that makes an RC gate through r
// take td to close the gap to its drive from num to den,
// td = r·C·ln(num/den) (loss.GateDelay solved for C), F. It is 0 when no
// such positive, finite C exists: r or td not positive, or den/num
// outside (0, 1) (the gate already past the delay's end at its start, or
// never reaching it).
//
// Source: the RC gate delay (Balogh, "Design and Application Guide for
// High Speed MOSFET Gate Drive Circuits", 2001).
func delayCapacitance(td q.Time, r q.Resistance, num, den q.Voltage) q.Capacitance {
	x := float64(den) / float64(num)
	if !(td > 0) || !(r > 0) || !(x > 0 && x < 1) {
		return 0
	}
	c := float64(td) / (float64(r) * math.Log(1/x))
	if math.IsNaN(c) || math.IsInf(c, 0) || !(c > 0) {
		return 0
	}
	return q.Capacitance(c)
}
