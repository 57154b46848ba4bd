package fit

import (
	"fmt"
	"math"

	q "swrank/devices/quantity"
	"swrank/rank/loss"
)

// The datasheet points that refine the square-law channel and the gate
// curve: the threshold's test current (vgs_th_id), the on-resistance's
// (rds_on_id) and a second total gate charge (qg2 at qg2_vgs).

// thresholdFromGfs sets d.VthSq, the square-law channel's extrapolated
// threshold, from the transconductance when the part gives vgs_th_id with
// gfs at gfs_id. In saturation I = K·(V_gs − V_t)² and g_fs = 2·√(K·I), so
// K = g_fs²/(4·I_gfs) and the threshold measured at I_th lies
// √(I_th/K) = 2·√(I_th·I_gfs)/g_fs above V_t (Sze & Ng, Physics of
// Semiconductor Devices, 3rd ed., 2007, ch. 6). It returns whether it set
// it.
func (d *Device) thresholdFromGfs() (bool, error) {
	p := d.Part
	if !p.VgsThId.OK || !(p.Gfs.OK && p.GfsId.OK && p.Gfs.V > 0 && p.GfsId.V > 0) {
		return false, nil
	}
	dv := q.Voltage(2 * math.Sqrt(float64(p.VgsThId.V)*float64(p.GfsId.V)) / float64(p.Gfs.V))
	if !(dv < p.VgsTh) {
		return false, fmt.Errorf("part %q: vgs_th_id: with gfs %s at gfs_id %s the square-law channel puts the threshold at %s, √(vgs_th_id/K) = %s below vgs_th, at or below 0 V",
			p.Name, p.Gfs.V, p.GfsId.V, p.VgsTh-dv, dv)
	}
	d.VthSq = p.VgsTh - dv
	return true, nil
}

// thresholdFromPlateau sets d.VthSq from the plateau vpl at the gate-charge
// test's current d.QgId when the part gives vgs_th_id without gfs: the same
// square law through both, V_pl − V_t = √(I_qg/K) and V_th − V_t =
// √(I_th/K), gives V_t = V_th − (V_pl − V_th)/(r − 1), r = √(I_qg/I_th)
// (Sze & Ng 2007, ch. 6). Nothing is set when I_qg ≤ I_th.
func (d *Device) thresholdFromPlateau(vpl q.Voltage) {
	p := d.Part
	if !p.VgsThId.OK || p.VgsThId.V <= 0 || d.QgId <= p.VgsThId.V || vpl <= p.VgsTh {
		return
	}
	r := math.Sqrt(float64(d.QgId / p.VgsThId.V))
	d.VthSq = p.VgsTh - (vpl-p.VgsTh)/q.Voltage(r-1)
}

// secondTotal takes the second total gate charge qg2 at qg2_vgs into the
// gate curve fitted with the charges qgs to the plateau and qgd across it
// and the plateau vpl (the part's or their estimates), and sets the curve
// above the plateau (d.Slope, d.KneeV, d.KneeQ). It returns qgs and qgd,
// changed only where they were estimates.
//
// Without qg2 the curve rises from the plateau's end straight to qg at
// qg_vgs. With qg2 above the plateau (and above qgs + qgd) the two totals
// fix the slope, (qg − qg2)/(qg_vgs − qg2_vgs), and the curve passes
// through both: a chord from the plateau's end to the lower of the two,
// then the slope through the higher and beyond (the knee, where the drain
// finishes falling). Estimated qgs and qgd that exceed the lower total
// are scaled down to the straight line through the two totals continued
// to the plateau (they cannot exceed a total above the plateau). With qg2
// below the plateau it is a point on the curve's lower part: a blank qgs is
// set through it (a constant Cgs to the plateau, Q_gs = qg2·V_pl/qg2_vgs,
// or through qg_th from the threshold on); given values are checked by
// validation. Source: the piecewise-linear gate-charge curve of Balogh,
// "Fundamentals of MOSFET and IGBT Gate Driver Circuits", 2001, and the
// IEC 60747-8:2010 definitions.
func (d *Device) secondTotal(qgs, qgd q.Charge, vpl q.Voltage) (q.Charge, q.Charge) {
	p := d.Part
	d.Slope = aboveSlope(p.Qg-qgs-qgd, p.QgVgs-vpl)
	if !p.Qg2.OK || !p.Qg2Vgs.OK || p.Qg2Vgs.V == p.QgVgs || p.Qg2.V <= 0 {
		return qgs, qgd
	}
	v2, q2 := p.Qg2Vgs.V, p.Qg2.V
	var fixed q.Charge // the given part of qgs + qgd
	if p.Qgs.OK {
		fixed += qgs
	}
	if p.Qgd.OK {
		fixed += qgd
	}
	if v2 <= vpl || fixed >= min(q2, p.Qg) {
		// On the lower curve (or at the plateau).
		if p.Qgs.OK || v2 > vpl {
			return qgs, qgd
		}
		est := q2 * q.Charge(vpl/v2)
		if p.QgTh.OK && v2 > p.VgsTh && p.QgTh.V < q2 {
			est = p.QgTh.V + (q2-p.QgTh.V)*q.Charge((vpl-p.VgsTh)/(v2-p.VgsTh))
		}
		if est > 0 && est+qgd < p.Qg {
			qgs = est
			if p.Qgd.OK {
				d.Flags &^= FlagGateChargeEstimated
			}
			d.Slope = aboveSlope(p.Qg-qgs-qgd, p.QgVgs-vpl)
		}
		return qgs, qgd
	}
	vLo, qLo, vHi, qHi := v2, q2, p.QgVgs, p.Qg
	if vLo > vHi {
		vLo, qLo, vHi, qHi = vHi, qHi, vLo, qLo
	}
	s := aboveSlope(qHi-qLo, vHi-vLo)
	if sum := qgs + qgd; sum > qLo {
		// Estimates above the lower total: down to the line through both
		// totals at the plateau, never below the given part.
		target := max(qLo-q.Charge(float64(s)*float64(vLo-vpl)), fixed)
		k := (target - fixed) / (sum - fixed)
		if !p.Qgs.OK {
			qgs *= k
		}
		if !p.Qgd.OK {
			qgd *= k
		}
	}
	d.Slope, d.KneeV, d.KneeQ = s, vLo-vpl, qLo-qgs-qgd
	return qgs, qgd
}

// aboveSlope is a charge per volt, dq/dv, not below 0.
func aboveSlope(dq q.Charge, dv q.Voltage) q.Capacitance {
	if dv <= 0 {
		return 0
	}
	return q.Capacitance(math.Max(0, float64(dq)) / float64(dv))
}

// rdsMoveFlagged is the rise of the on-resistance, as a fraction of it, from
// which a part that leaves rds_on_id blank is flagged: had its values been
// measured at no current, the triode law would put the resistance at the
// working current that much higher.
const rdsMoveFlagged = 0.01

// RdsAt is the on-resistance at gate voltage vgs and drain current i, at
// the gate law's reference temperature: the gate law with its channel part
// K/(V_gs − V_th) moved from the test current of rds_on (rds_on_id) to i
// by the triode law (loss.ChannelAtCurrent), at the overdrive above the
// square-law threshold d.VthSq. A part without rds_on_id takes its values
// as measured at no current where the law then moves them up by more than
// 1 % (FlagRdsIdAssumed), and as they stand otherwise. A part with one
// gate-voltage point (FlagRdsOnePoint) is moved up, never down.
// FlagRdsSaturated says the channel saturates. The
// caller ensures vgs > the law's threshold.
func (d *Device) RdsAt(vgs q.Voltage, i q.Current) (q.Resistance, Flags) {
	g := d.Gate
	if g.Top > 0 && vgs > g.Top {
		vgs = g.Top
	}
	rch := q.Resistance(g.K / float64(vgs-g.Vth))
	r, ok := loss.ChannelAtCurrent(rch, vgs-d.VthSq, d.RdsId, i)
	var f Flags
	if !d.Part.RdsOnId.OK {
		// Unknown test current: where a test at no current would put
		// the resistance more than 1 % higher, take that (the
		// unfavourable end) and flag it; a smaller move is left out.
		if r-rch > q.Resistance(rdsMoveFlagged)*(g.R0+rch) {
			return g.R0 + r, f | FlagRdsIdAssumed
		}
		return g.R0 + rch, f
	}
	if !ok {
		f |= FlagRdsSaturated
	}
	if d.Flags&FlagRdsOnePoint != 0 && r < rch {
		// One gate-voltage point: the law takes the whole of rds_on as
		// channel (the steepest rise below rds_on_vgs), which would also
		// make the largest fall towards a smaller current. The share is
		// unknown, so no fall is claimed (a share of 0 for the current
		// law): a missing rds_on2 never makes a part look better.
		r = rch
	}
	return g.R0 + r, f
}
