package loss

import (
	"math"

	q "swrank/devices/quantity"
)

// GateLaw is the gate-voltage dependence of the on-resistance,
// R(Vgs) = R0 + K/(Vgs − Vth): a fixed part (drift, substrate, package) plus
// a channel part inversely proportional to the gate overdrive.
//
// Source: the channel resistance of a MOSFET in its linear region is
// L/(W·µ·Cox·(Vgs − Vth)) (Sze & Ng, Physics of Semiconductor Devices, 3rd
// ed., 2007, ch. 6; Baliga 2008, ch. 6); R0 and K are fitted through the
// datasheet's two gate-voltage points.
type GateLaw struct {
	R0  q.Resistance // fixed part, Ω; ≥ 0
	K   float64      // channel part, Ω·V; ≥ 0
	Vth q.Voltage    // threshold of the law, V
	// Top is the gate voltage above which the law is not continued, V:
	// R(Vgs > Top) = R(Top). 0: continued without limit.
	Top q.Voltage
}

// At returns R(Vgs); the caller ensures Vgs > Vth.
func (g GateLaw) At(vgs q.Voltage) q.Resistance {
	if g.Top > 0 && vgs > g.Top {
		vgs = g.Top
	}
	return g.R0 + q.Resistance(g.K/float64(vgs-g.Vth))
}

// FitGateLaw fits R0 + K/(Vgs − Vth) through (v1, r1) and (v2, r2), v1 ≠ v2.
// A fit that would make R0 negative (a curve steeper than the law) is
// replaced by a pure channel law through the higher-voltage point, and ok is
// false.
func FitGateLaw(v1 q.Voltage, r1 q.Resistance, v2 q.Voltage, r2 q.Resistance, vth q.Voltage) (g GateLaw, ok bool) {
	x1 := 1 / float64(v1-vth)
	x2 := 1 / float64(v2-vth)
	k := float64(r1-r2) / (x1 - x2)
	r0 := float64(r1) - k*x1
	if r0 < 0 || k < 0 {
		if v1 > v2 {
			v2, r2 = v1, r1
		}
		return GateLaw{R0: 0, K: float64(r2) * float64(v2-vth), Vth: vth}, false
	}
	return GateLaw{R0: q.Resistance(r0), K: k, Vth: vth}, true
}

// SinglePointGateLaw is the fallback when the datasheet gives one
// gate-voltage point, chosen so that a missing second point never makes a
// part look better: below v1 the whole of r1 is taken as channel
// resistance (the steepest rise the law allows; real parts have 30-60 %
// at the rated drive, common practice, from memory), and above v1 no
// improvement is claimed (Top = v1).
func SinglePointGateLaw(v1 q.Voltage, r1 q.Resistance, vth q.Voltage) GateLaw {
	return GateLaw{R0: 0, K: float64(r1) * float64(v1-vth), Vth: vth, Top: v1}
}

// Conduction is the conduction loss I_rms²·R.
//
// Source: Erickson & Maksimović, Fundamentals of Power Electronics, 2nd ed.,
// 2001, ch. 4 (a MOSFET conducts as a resistance).
func Conduction(irms q.Current, r q.Resistance) q.Power {
	return q.Power(float64(irms) * float64(irms) * float64(r))
}

// DynamicRdsFactor is the dynamic on-resistance multiplier at off-state
// voltage v for a part measured at k·R(on) after blocking vTest: linear in
// the blocked voltage from 1 at 0 V to k at vTest, continued linearly above
// vTest. vTest ≤ 0 means the test voltage is unknown: k is used as given.
//
// Source: common practice for GaN HEMTs (trapping grows with the blocked
// voltage; datasheets that state a dynamic factor give it at one voltage;
// from memory, cf. Lidow et al.). The linear law is our assumption; it is
// conservative above vTest only if the trapping keeps growing.
func DynamicRdsFactor(k q.Ratio, vTest, v q.Voltage) float64 {
	if k <= 1 {
		return 1
	}
	if vTest <= 0 {
		return float64(k)
	}
	return 1 + (float64(k)-1)*max(float64(v), 0)/float64(vTest)
}

// ChannelAtCurrent moves the channel part of an on-resistance, rch as
// measured at drain current iTest with the gate overdrive vov = V_gs − V_th
// (V_th the square-law channel's extrapolated threshold), to drain current
// i, by the triode law of a square-law channel,
//
//	I = K·(2·V_ov·V_ds − V_ds²)
//
// (Sze & Ng, Physics of Semiconductor Devices, 3rd ed., 2007, ch. 6): the
// channel's small-signal resistance is R₀ = 1/(2·K·V_ov) = rch·(1 −
// rch·iTest/(2·V_ov)) (the test point on the law), and at current i it
// drops V_ds = V_ov·(1 − √(1 − 2·x)), x = i·R₀/V_ov, so
//
//	R_ch(i) = V_ds/i = 2·R₀/(1 + √(1 − 2·x)).
//
// The resistance rises with the current, by about x/2 of itself: little at
// full drive, much at a low overdrive and a high current. Where the channel
// cannot carry i in the linear region (x ≥ ½: i above its saturation
// current K·V_ov²), it returns 2·R₀, the resistance at the edge of
// saturation (a lower bound), and ok false; so too, with rch unmoved,
// when the test point itself lies beyond the linear region (rch·iTest ≥
// V_ov) or vov ≤ 0.
func ChannelAtCurrent(rch q.Resistance, vov q.Voltage, iTest, i q.Current) (r q.Resistance, ok bool) {
	if vov <= 0 || rch <= 0 {
		return rch, false
	}
	vt := float64(rch) * float64(max(iTest, 0))
	if vt >= float64(vov) {
		return rch, false
	}
	r0 := float64(rch) * (1 - vt/(2*float64(vov)))
	x := float64(max(i, 0)) * r0 / float64(vov)
	if x >= 0.5 {
		return q.Resistance(2 * r0), false
	}
	return q.Resistance(2 * r0 / (1 + math.Sqrt(1-2*x))), true
}
