package loss

import (
	"math"
	q "swrank/devices/quantity"
	"swrank/rank/numeric"
)

// OssLaw is the output capacitance as a power law of the drain voltage,
// C(v) = K·v^(−N), 0 ≤ N < 1: N = ½ is the abrupt-junction (√) law, N = 0 a
// linear capacitor.
//
// Source: Erickson & Maksimović 2001, ch. 4 (√ law and its Q_oss, E_oss);
// the exponent is fitted to the datasheet's own E_oss/(Q_oss·V) when both are
// given. Q_oss and E_oss as defined in IEC 60747-8:2010.
type OssLaw struct {
	K float64 // F·V^N
	N float64 // exponent, [0, 0.95]
}

// Q returns the output charge ∫₀^v C dv = K·v^(1−N)/(1−N) (0 for v ≤ 0).
func (l OssLaw) Q(v q.Voltage) q.Charge { return l.At(v).Q() }

// E returns the stored energy ∫₀^v v·C dv = K·v^(2−N)/(2−N) (0 for v ≤ 0).
func (l OssLaw) E(v q.Voltage) q.Energy { return l.At(v).E() }

// C returns the small-signal capacitance K·v^−N at v (at 1 mV for v ≤ 0).
func (l OssLaw) C(v q.Voltage) q.Capacitance { return l.At(v).C() }

// OssPoint is an output-capacitance law at one voltage: C, Q and E all
// follow from the one power v^(2−N) (the law's formulas rewritten:
// K·v^−N = K·v^(2−N)/v², K·v^(1−N) = K·v^(2−N)/v).
type OssPoint struct {
	L  OssLaw    // the law
	V  q.Voltage // the voltage, V
	pv float64   // V^(2−N) (0 for V ≤ 0)
}

// At evaluates the law at v.
func (l OssLaw) At(v q.Voltage) OssPoint {
	p := OssPoint{L: l, V: v}
	if v > 0 {
		p.pv = powPos(float64(v), 2-l.N)
	}
	return p
}

// C is the small-signal capacitance (OssLaw.C).
func (p OssPoint) C() q.Capacitance {
	if p.V <= 0 {
		return p.L.At(1e-3).C()
	}
	return q.Capacitance(p.L.K * p.pv / (float64(p.V) * float64(p.V)))
}

// Q is the output charge (OssLaw.Q).
func (p OssPoint) Q() q.Charge {
	if p.V <= 0 {
		return 0
	}
	return q.Charge(p.L.K * p.pv / float64(p.V) / (1 - p.L.N))
}

// E is the stored energy (OssLaw.E).
func (p OssPoint) E() q.Energy {
	return q.Energy(p.L.K * p.pv / (2 - p.L.N))
}

// OssFromCapacitance is the power law C = K·v^(−n) through one
// small-signal datasheet point c at v (n = 0.5: the √ law of an abrupt
// junction; larger n: more of the charge at low voltage). 0 ≤ n < 1.
func OssFromCapacitance(c q.Capacitance, v q.Voltage, n float64) OssLaw {
	return OssLaw{K: float64(c) * math.Pow(float64(v), n), N: n}
}

// OssFromCharge is the power law C = K·v^(−n) through a datasheet Q_oss
// at v: Q(v) = K·v^(1−n)/(1−n). 0 ≤ n < 1.
func OssFromCharge(qoss q.Charge, v q.Voltage, n float64) OssLaw {
	return OssLaw{K: float64(qoss) * (1 - n) / math.Pow(float64(v), 1-n), N: n}
}

// OssFromChargeEnergy fits the power law to Q_oss and E_oss at v: for
// C = K·v^(−N), E/(Q·V) = (1−N)/(2−N).
func OssFromChargeEnergy(qoss q.Charge, eoss q.Energy, v q.Voltage) OssLaw {
	r := float64(eoss) / (float64(qoss) * float64(v))
	n := (1 - 2*r) / (1 - r)
	if n < 0 {
		n = 0
	}
	if n > 0.95 {
		n = 0.95
	}
	return OssLaw{K: float64(qoss) * (1 - n) / math.Pow(float64(v), 1-n), N: n}
}

// HardTurnOnCossEnergy is the output-capacitance energy dissipated in switch
// S when it turns on hard against voltage v while the complementary device K
// blocks: S's own stored energy plus the energy drawn from the supply to
// charge K, less what K stores, E_oss,S(v) + v·Q_oss,K(v) − E_oss,K(v). For
// identical devices this is v·Q_oss(v), not ½·C·v².
//
// Source: energy bookkeeping of a half-bridge commutation (hand calculation
// from Erickson & Maksimović 2001, ch. 4, on capacitive switching
// loss); Q_oss and E_oss per IEC 60747-8:2010.
func HardTurnOnCossEnergy(eS q.Energy, v q.Voltage, qK q.Charge, eK q.Energy) q.Energy {
	return eS + q.Energy(float64(v)*float64(qK)) - eK
}

// SoftTurnOnEnergy is the output-capacitance energy switch S dissipates
// when it turns on with only vr of the cell voltage v left across it,
// while the complementary device K goes from v − vr to v:
//
//	E = E_S(vr) + v·[Q_K(v) − Q_K(v − vr)] − [E_K(v) − E_K(v − vr)].
//
// At vr = v this is the hard turn-on, HardTurnOnCossEnergy; at vr = 0 (a
// complete zero-voltage swing) it is zero; in between it is continuous.
// A diode partner is a linear capacitor: OssLaw{K: Cj, N: 0}.
//
// Source: energy bookkeeping of the commutation in partial zero-voltage
// switching (hand calculation from Kazimierczuk & Czarkowski, Resonant
// Power Converters, 2nd ed., 2011, ch. 2: the supply delivers
// v·ΔQ_K, the capacitors' stored energy changes by ΔE_K − E_S(vr), the rest
// is dissipated); Q_oss and E_oss as defined in IEC 60747-8:2010.
func SoftTurnOnEnergy(s, k OssLaw, v, vr q.Voltage) q.Energy {
	if vr <= 0 {
		return 0
	}
	vr = min(vr, v)
	dq := k.Q(v) - k.Q(v-vr)
	de := k.E(v) - k.E(v-vr)
	return max(0, s.E(vr)+q.Energy(float64(v)*float64(dq))-de)
}

// SwingResidual is the voltage left across switch S when a charge dq has
// been moved through the switch node from the state S at v, K at 0: the
// node moves by x with Q_K(x) + Q_S(v) − Q_S(v − x) = dq, and the residual
// is v − x (0 once dq ≥ Q_S(v) + Q_K(v), the whole swing). The inductor
// current is taken as constant during the swing (an inductor much larger
// than the resonance with the node capacitance needs).
//
// Source: charge balance of the switch node (Kirchhoff's current law on the
// two output capacitances in series across the cell); partial zero-voltage
// switching as in Kazimierczuk & Czarkowski 2011, ch. 2.
func SwingResidual(s, k OssLaw, v q.Voltage, dq q.Charge) q.Voltage {
	if dq <= 0 {
		return v
	}
	qs := s.Q(v)
	if dq >= qs+k.Q(v) {
		return 0
	}
	g := func(x float64) float64 {
		return float64(k.Q(q.Voltage(x))+qs-s.Q(v-q.Voltage(x))) - float64(dq)
	}
	r, err := numeric.FindRoot(g, 0, float64(v), 1e-9, 1e-12*float64(v))
	if err != nil {
		// g(0) < 0 < g(v) and g is continuous and increasing: FindRoot
		// cannot fail here, but stay on the safe side (a hard edge).
		return v
	}
	return v - q.Voltage(r.X)
}

// OssFromEnergy is the power law C = K·v^(−n) through a datasheet E_oss at
// v: E(v) = K·v^(2−n)/(2−n). 0 ≤ n < 1.
func OssFromEnergy(eoss q.Energy, v q.Voltage, n float64) OssLaw {
	return OssLaw{K: float64(eoss) * (2 - n) / math.Pow(float64(v), 2-n), N: n}
}

// OssExponent is the exponent N of C = K·v^(−N) fitted to small-signal
// points of the datasheet's capacitance curve (at least two, voltages
// distinct): the least-squares slope of ln C against ln v, within the
// law's [0, 0.95]; through two points, ln(c1/c2)/ln(v2/v1).
//
// Source: the power law of OssLaw (Erickson & Maksimović 2001, ch. 4)
// read off a log-log curve by a straight-line least-squares fit (common
// practice).
func OssExponent(pts []CapPoint) float64 {
	var sx, sy, sxx, sxy float64
	for _, p := range pts {
		x, y := math.Log(float64(p.V)), math.Log(float64(p.C))
		sx, sy, sxx, sxy = sx+x, sy+y, sxx+x*x, sxy+x*y
	}
	n := float64(len(pts))
	slope := (n*sxy - sx*sy) / (n*sxx - sx*sx)
	return min(max(-slope, 0), 0.95)
}
