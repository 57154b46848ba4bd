package resonant

import (
	"errors"
	"fmt"
	"math"

	q "swrank/devices/quantity"
)

// MinLoadedQ is the lowest loaded Q (ωL/R) at which a class E stage with
// 50 % duty, an RF choke feed and a shunt capacitor can meet the nominal
// conditions (zero switch voltage and zero slope at turn-on): at this Q the
// series capacitor needed becomes infinite. Source: Raab, "Idealized
// operation of the class E tuned power amplifier", IEEE Trans. Circuits and
// Systems, CAS-24(12), 1977 (value 1.7879).
const MinLoadedQ = 1.7879

// taylorDegree is the degree of the Taylor series of the shunt-branch
// current after turn-off kept in ClassECoefficients.
const taylorDegree = 20

// ClassECoefficients are the normalised design values of a class E stage:
// one switch with 50 % duty, a DC feed, a shunt capacitor C₁ across the
// switch and a series L–C tank into the load R. They depend only on the
// loaded Q and on the feed; ClassECoefficients.Scale turns them into
// component values and stresses for a supply, frequency and power.
type ClassECoefficients struct {
	// QL is the loaded Q, ωL/R with L the whole series inductance.
	// +Inf for the ideal limit.
	QL q.Ratio
	// FeedRatio is ωL_f/R of the DC-feed choke; +Inf for an ideal RF
	// choke (a constant current).
	FeedRatio q.Ratio
	// KP is P_o·R/V_DD², the output-power coefficient (ideal 8/(π²+4)).
	KP q.Ratio
	// KC is ω·R·C₁, the shunt-capacitance coefficient (ideal 8/(π(π²+4))).
	KC q.Ratio
	// KX is X/R, the excess series reactance at the operating frequency
	// (ideal π(π²−4)/16).
	KX q.Ratio
	// VPeak is the peak switch voltage over V_DD (ideal 3.562).
	VPeak q.Ratio
	// IPeak is the peak switch current over I_DC (ideal 2.862).
	IPeak q.Ratio
	// IOff is the switch current just before turn-off over I_DC (ideal 2).
	IOff q.Ratio
	// IRms is the rms switch current over I_DC (ideal √(π²+28)/4).
	IRms q.Ratio
	// NodeTaylor holds the Taylor coefficients, in θ = ωt from the
	// turn-off instant, of the current that flows into the switch node
	// (feed current minus load-branch current) divided by I_DC. With an
	// ideal switch it all charges C₁; NodeTaylor[0] equals IOff. Used by
	// the turn-off loss.
	NodeTaylor [taylorDegree + 1]float64
}

// IdealClassE returns the closed-form coefficients of class E with 50 %
// duty, an RF choke and Q_L → ∞, every constant derived from its closed
// form. Sources: Sokal & Sokal, "Class E — a new class of high-efficiency
// tuned single-ended switching power amplifiers", IEEE J. Solid-State
// Circuits, SC-10(3), 1975; Raab, IEEE Trans. Circuits and Systems, 1977;
// Kazimierczuk, RF Power Amplifiers, Wiley, 2008, ch. 4.
//
// With the switch on for half a period and the load current a sinusoid
// I_m·sin(θ+φ), zero voltage and zero slope at turn-on give tan φ = −2/π
// and I_m = I_DC·√(π²+4)/2. Then
//
//	KP = 8/(π²+4)            KC = 8/(π(π²+4))        KX = π(π²−4)/16
//	VPeak = 2π·atan(2/π)     IPeak = 1 + √(π²+4)/2    IOff = 2
//	IRms = √(π²+28)/4
//
// and the shunt-branch current after turn-off is
// I_DC·(1 + cos θ − (π/2)·sin θ).
func IdealClassE() ClassECoefficients {
	pi2 := math.Pi * math.Pi
	c := ClassECoefficients{
		QL:        q.Ratio(math.Inf(1)),
		FeedRatio: q.Ratio(math.Inf(1)),
		KP:        q.Ratio(8 / (pi2 + 4)),
		KC:        q.Ratio(8 / (math.Pi * (pi2 + 4))),
		KX:        q.Ratio(math.Pi * (pi2 - 4) / 16),
		// The voltage peaks where tan(θ/2) = −π/2 in the off interval,
		// giving π·(π − 2·atan(π/2)) = 2π·atan(2/π).
		VPeak: q.Ratio(2 * math.Pi * math.Atan(2/math.Pi)),
		IPeak: q.Ratio(1 + math.Sqrt(pi2+4)/2),
		IOff:  2,
		IRms:  q.Ratio(math.Sqrt(pi2+28) / 4),
	}
	// 1 + cos θ − (π/2)·sin θ as a power series.
	fact := 1.0
	for k := 0; k <= taylorDegree; k++ {
		if k > 0 {
			fact *= float64(k)
		}
		var a float64
		if k%2 == 0 {
			a = sign(k/2) / fact
		} else {
			a = -math.Pi / 2 * sign((k-1)/2) / fact
		}
		c.NodeTaylor[k] = a
	}
	c.NodeTaylor[0]++ // the constant 1
	return c
}

// sign returns (−1)^n.
func sign(n int) float64 {
	if n%2 == 0 {
		return 1
	}
	return -1
}

// ClassE is a class E design at one operating point: component values and
// switch stresses. Every field is in coherent SI units.
type ClassE struct {
	// Coefficients are the normalised values the design was scaled from.
	Coefficients ClassECoefficients

	VDD q.Voltage    // supply voltage, V
	F   q.Frequency  // operating frequency, Hz
	R   q.Resistance // load resistance, Ω
	Po  q.Power      // output power (ideal, lossless switch), W
	IDC q.Current    // DC supply current, A (P_o/V_DD)

	IRms  q.Current // rms switch current, A
	IPeak q.Current // peak switch current, A
	IOff  q.Current // switch current just before turn-off, A
	VPeak q.Voltage // peak switch voltage, V

	C1 q.Capacitance // total shunt capacitance across the switch, F (device output capacitance included)
	X  q.Resistance  // excess series reactance at F (inductive), Ω
	// L is the series inductance QL·R/ω, H; 0 in the ideal limit.
	L q.Inductance
	// C2 is the series capacitance 1/(ω·(ωL − X)), F; 0 in the ideal
	// limit (a tank resonant at F plus the excess reactance X).
	C2 q.Capacitance
	// LFeed is the DC-feed inductance FeedRatio·R/ω, H; 0 for an ideal
	// RF choke.
	LFeed q.Inductance
}

// ErrSpec is wrapped by every error about bad input to this package.
var ErrSpec = errors.New("invalid operating point")

// Scale turns normalised coefficients into a design at supply vdd and
// frequency f, for either the output power po or the load resistance r
// (give exactly one, the other 0). It uses P_o = KP·V_DD²/R,
// I_DC = P_o/V_DD (lossless), C₁ = KC/(ωR), X = KX·R; published scaling of
// Raab 1977 and Kazimierczuk 2008, ch. 4.
func (c ClassECoefficients) Scale(vdd q.Voltage, f q.Frequency, po q.Power, r q.Resistance) (ClassE, error) {
	if err := positive("supply voltage VDD", float64(vdd)); err != nil {
		return ClassE{}, err
	}
	if err := positive("frequency F", float64(f)); err != nil {
		return ClassE{}, err
	}
	if !(c.KP > 0) || !(c.KC > 0) || math.IsInf(float64(c.KP), 0) {
		return ClassE{}, fmt.Errorf("class E coefficients: %w: KP %g, KC %g must be positive and finite", ErrSpec, c.KP, c.KC)
	}
	switch {
	case po != 0 && r != 0:
		return ClassE{}, fmt.Errorf("class E: %w: give the output power Po or the load R, not both", ErrSpec)
	case po != 0:
		if err := positive("output power Po", float64(po)); err != nil {
			return ClassE{}, err
		}
		r = q.Resistance(float64(c.KP) * float64(vdd*vdd) / float64(po))
	case r != 0:
		if err := positive("load resistance R", float64(r)); err != nil {
			return ClassE{}, err
		}
		po = q.Power(float64(c.KP) * float64(vdd*vdd) / float64(r))
	default:
		return ClassE{}, fmt.Errorf("class E: %w: give the output power Po or the load R", ErrSpec)
	}
	w := 2 * math.Pi * float64(f)
	idc := float64(po) / float64(vdd)
	d := ClassE{
		Coefficients: c,
		VDD:          vdd, F: f, R: r, Po: po,
		IDC:   q.Current(idc),
		IRms:  q.Current(float64(c.IRms) * idc),
		IPeak: q.Current(float64(c.IPeak) * idc),
		IOff:  q.Current(float64(c.IOff) * idc),
		VPeak: q.Voltage(float64(c.VPeak) * float64(vdd)),
		C1:    q.Capacitance(float64(c.KC) / (w * float64(r))),
		X:     q.Resistance(float64(c.KX) * float64(r)),
	}
	if ql := float64(c.QL); ql > 0 && !math.IsInf(ql, 0) {
		d.L = q.Inductance(ql * float64(r) / w)
		d.C2 = q.Capacitance(1 / (w * float64(r) * (ql - float64(c.KX))))
	}
	if fr := float64(c.FeedRatio); fr > 0 && !math.IsInf(fr, 0) {
		d.LFeed = q.Inductance(fr * float64(r) / w)
	}
	return d, nil
}

// ClassESpec is a class E operating point as the user states it.
type ClassESpec struct {
	// VDD is the supply voltage, V. Required, > 0.
	VDD q.Voltage
	// F is the operating (switching) frequency, Hz. Required, > 0.
	F q.Frequency
	// Po is the output power, W, > 0. Give exactly one of Po and R.
	Po q.Power
	// R is the load resistance, Ω, > 0. Give exactly one of Po and R.
	R q.Resistance
	// QL is the loaded Q of the series tank, ωL/R. 0 (the default) means
	// the ideal limit Q_L → ∞ (closed form); otherwise ≥ MinLoadedQ and
	// the finite-Q solver is used.
	QL q.Ratio
	// FeedRatio is ωL_f/R of the DC-feed choke. 0 (the default) means an
	// ideal RF choke; otherwise > 0 (finite-Q solver only; values below
	// about 1 may have no nominal solution, and small values at low QL may
	// give a low-power solution branch: check KP; see docs/resonant.md).
	FeedRatio q.Ratio
}

// DesignClassE designs a class E stage at s: the closed form of
// IdealClassE when s.QL is 0 (then s.FeedRatio must be 0 too), else the
// periodic steady state of SolveClassE. Sources as for those two functions.
func DesignClassE(s ClassESpec) (ClassE, error) {
	var c ClassECoefficients
	switch {
	case s.QL == 0 && s.FeedRatio == 0:
		c = IdealClassE()
	case s.QL == 0:
		return ClassE{}, fmt.Errorf("class E: %w: a finite feed choke (FeedRatio %g) needs a finite loaded Q QL", ErrSpec, s.FeedRatio)
	default:
		var err error
		if c, err = SolveClassE(s.QL, s.FeedRatio); err != nil {
			return ClassE{}, err
		}
	}
	return c.Scale(s.VDD, s.F, s.Po, s.R)
}

// ClassEMaxFrequency is the highest frequency at which a switch whose
// output capacitance alone is cout can still form the whole shunt
// capacitance of the design coefficients c at output power po and supply
// vdd: f_max = KC·P_o/(2π·KP·C_out·V_DD²), which for the ideal
// coefficients is P_o/(2π²·C_out·V_DD²). Source: Raab 1977; Sokal & Sokal
// 1975; Kazimierczuk 2008, ch. 4. For a nonlinear output capacitance use
// ClassEShunt instead.
func ClassEMaxFrequency(c ClassECoefficients, vdd q.Voltage, po q.Power, cout q.Capacitance) (q.Frequency, error) {
	if err := positive("supply voltage VDD", float64(vdd)); err != nil {
		return 0, err
	}
	if err := positive("output power Po", float64(po)); err != nil {
		return 0, err
	}
	if err := positive("output capacitance Cout", float64(cout)); err != nil {
		return 0, err
	}
	if !(c.KP > 0) || !(c.KC > 0) {
		return 0, fmt.Errorf("class E maximum frequency: %w: coefficients KP %g, KC %g must be positive", ErrSpec, c.KP, c.KC)
	}
	return q.Frequency(float64(c.KC) * float64(po) / (2 * math.Pi * float64(c.KP) * float64(cout) * float64(vdd*vdd))), nil
}

// positive returns an error unless v is finite and > 0.
func positive(name string, v float64) error {
	if math.IsNaN(v) || math.IsInf(v, 0) || v <= 0 {
		return fmt.Errorf("%s: %w: must be a finite number > 0, got %g", name, ErrSpec, v)
	}
	return nil
}

// nonNegative returns an error unless v is finite and ≥ 0.
func nonNegative(name string, v float64) error {
	if math.IsNaN(v) || math.IsInf(v, 0) || v < 0 {
		return fmt.Errorf("%s: %w: must be a finite number ≥ 0, got %g", name, ErrSpec, v)
	}
	return nil
}

// OffSlope is the switch voltage's slope dv/dθ (V/rad) at θ = ω·t after
// turn-off, while the switch is off and, as in the design, the whole
// node current (feed current minus load-branch current) charges the
// linear shunt C₁: I_DC/(ω·C₁)·Σ aₙ·θⁿ over the Taylor coefficients
// NodeTaylor. Valid over the design's off interval, 0 ≤ θ ≤ π.
//
// Source: the switch-node current balance of the class E stage (Raab
// 1977; Kazimierczuk 2008, ch. 4), here through the design's own series.
func (d ClassE) OffSlope(theta float64) float64 {
	w := 2 * math.Pi * float64(d.F)
	if d.C1 <= 0 || w <= 0 {
		return 0
	}
	a := &d.Coefficients.NodeTaylor
	s := 0.0
	for n := len(a) - 1; n >= 0; n-- {
		s = s*theta + a[n]
	}
	return float64(d.IDC) / (w * float64(d.C1)) * s
}
