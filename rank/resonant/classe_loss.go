package resonant

import (
	"fmt"
	"math"

	q "swrank/devices/quantity"
)

// MaxTurnOffAngle is the largest ω·t_f (rad) that ClassETurnOff accepts:
// beyond it the current fall takes a sixth of the period and the
// perturbation of the waveform is no longer small.
const MaxTurnOffAngle = 1.0

// ClassEConduction is the switch conduction loss I_rms²·r_DS with the rms
// switch current of the design (ideal: √(π²+28)/4·I_DC, so
// P/P_o = (π²+28)/(2(π²+4))·r_DS/R). Source: Kazimierczuk, RF Power
// Amplifiers, 2008, ch. 4; Raab & Sokal, "Transistor power losses in the
// class E tuned power amplifier", IEEE J. Solid-State Circuits, SC-13(6),
// 1978. First order: the waveforms are those of the lossless design.
func ClassEConduction(d ClassE, rds q.Resistance) (q.Power, error) {
	if err := nonNegative("on-resistance rDS", float64(rds)); err != nil {
		return 0, err
	}
	return q.Power(float64(d.IRms*d.IRms) * float64(rds)), nil
}

// ClassETurnOffSmall is the small-fall-time approximation of the turn-off
// loss for a linear current fall lasting tf (0 to 100 %): the capacitor
// takes I_off·t/t_f, so v = I_off·t²/(2C₁t_f) and
// P_tf ≈ f·I_off²·t_f²/(24·C₁), which for the ideal design
// (I_off = 2·I_DC, C₁ = 0.1836/(ωR)) is (ω·t_f)²/12·P_o. Source:
// Kazimierczuk, RF Power Amplifiers, 2008, ch. 4 (the design's own I_off
// and C₁ are used for a finite-Q design). It ignores the change of the
// circuit current during the fall; ClassETurnOffWaveform keeps it and
// ClassETurnOff also lets the steady state adjust.
func ClassETurnOffSmall(d ClassE, tf q.Time) (q.Power, error) {
	if err := nonNegative("current fall time tf", float64(tf)); err != nil {
		return 0, err
	}
	if err := positive("shunt capacitance C1 of the design", float64(d.C1)); err != nil {
		return 0, err
	}
	i, t := float64(d.IOff), float64(tf)
	return q.Power(float64(d.F) * i * i * t * t / (24 * float64(d.C1))), nil
}

// ClassETurnOffWaveform is the turn-off loss for a linear current fall
// lasting tf (0 to 100 %) from the exact integral of v·i over the fall
// with the rest of the lossless design's waveform held fixed: the switch
// current falls from I_off to 0 in t_f while the circuit current keeps its
// lossless-design waveform n(t), so the shunt capacitor takes
// n(t) − i_S(t),
//
//	C₁·v(t) = ∫₀ᵗ [n(τ) − I_off·(1 − τ/t_f)] dτ,   E = ∫₀^t_f v·I_off·(1 − t/t_f) dt.
//
// With n(θ) = I_DC·Σ a_k·θᵏ (θ = ωt, a_k = NodeTaylor) this is exactly
//
//	E = I_DC²/(ω²C₁) · a₀·[a₀·ε²/24 + Σ_{k≥1} a_k·ε^{k+2}/((k+1)(k+2)(k+3))],   ε = ω·t_f,
//
// and P = f·E. For the ideal design it equals P_o·J(ε) with
// J(ε) = 1 − sin ε/ε − ε²/12 + (π/2)·((1 − cos ε)/ε − ε/2)
// = ε²/12·(1 − πε/4 − ε²/10 + …); the first term is the small-t_f formula
// of Kazimierczuk, RF Power Amplifiers, 2008, ch. 4 (ClassETurnOffSmall).
// The method is that of Kazimierczuk's derivation with the circuit current
// kept; the series is derived here (docs/resonant.md). Because the
// circuit current falls after turn-off this is below the small-t_f value
// (by about πε/4). It holds the turn-off current at the lossless value;
// in the real steady state the fall raises it (ClassETurnOff), which
// undoes most of the difference, so use ClassETurnOff for losses. At
// zero-voltage turn-on there is no overlap loss.
func ClassETurnOffWaveform(d ClassE, tf q.Time) (q.Power, error) {
	if err := nonNegative("current fall time tf", float64(tf)); err != nil {
		return 0, err
	}
	if err := positive("shunt capacitance C1 of the design", float64(d.C1)); err != nil {
		return 0, err
	}
	w := 2 * math.Pi * float64(d.F)
	e := w * float64(tf)
	if e > MaxTurnOffAngle {
		return 0, fmt.Errorf("class E turn-off: %w: ω·tf = %.3g rad exceeds %g (a fall of %s at %s takes too much of the period for the model)",
			ErrSpec, e, MaxTurnOffAngle, tf, d.F)
	}
	a := d.Coefficients.NodeTaylor
	s := a[0] * e * e / 24
	pow := e * e // ε^{k+2} for k = 0
	for k := 1; k < len(a); k++ {
		pow *= e
		kk := float64(k)
		s += a[k] * pow / ((kk + 1) * (kk + 2) * (kk + 3))
	}
	energy := float64(d.IDC*d.IDC) / (w * w * float64(d.C1)) * a[0] * s
	if math.IsNaN(energy) || energy < 0 {
		return 0, fmt.Errorf("class E turn-off: the fall of %s gives energy %g (bad design coefficients)", tf, energy)
	}
	return q.Power(energy * float64(d.F)), nil
}

// idealTurnOffFraction is J(ε) = P_tf/P_o of ClassETurnOffWaveform for the ideal
// design in closed form (derived, docs/resonant.md); a series for small ε
// avoids the cancellation in 1 − sin ε/ε.
func idealTurnOffFraction(e float64) float64 {
	if e < 0.5 {
		// a = 1 − sin ε/ε − ε²/6 = Σ_{k≥2} (−1)^{k+1} ε^{2k}/(2k+1)!
		// b = (1 − cos ε)/ε − ε/2 = Σ_{k≥2} (−1)^{k+1} ε^{2k−1}/(2k)!
		var a, b float64
		for k := 2; k < 12; k++ {
			odd := math.Pow(e, float64(2*k-1)) / factorial(2*k)
			b += sign(k+1) * odd
			a += sign(k+1) * odd * e / float64(2*k+1)
		}
		return a + math.Pi/2*b + e*e/12
	}
	return 1 - math.Sin(e)/e - e*e/6 + math.Pi/2*((1-math.Cos(e))/e-e/2) + e*e/12
}

func factorial(n int) float64 {
	f := 1.0
	for i := 2; i <= n; i++ {
		f *= float64(i)
	}
	return f
}

// Hysteresis is a soft-switching output-capacitance loss stated for a part:
// an energy lost per cycle at a stated voltage swing.
type Hysteresis struct {
	// E is the energy lost per cycle at VStated, J. ≥ 0; 0 means none.
	E q.Energy
	// VStated is the swing at which E was stated, V. > 0 when E > 0.
	VStated q.Voltage
	// Exponent is the power law in the swing, E(V) = E·(V/VStated)^Exponent.
	// > 0; default (0) 1.5, an assumption from memory of published
	// measurements (docs/resonant.md).
	Exponent q.Ratio
}

// HysteresisLoss is the output-capacitance hysteresis loss of a
// soft-switched part whose drain swings to vswing at frequency f:
// f·E·(vswing/VStated)^Exponent. Published as a measured fraction of E_oss
// lost per cycle even at zero-voltage switching (from memory: Fedison et
// al., APEC 2016; Zulauf et al., IEEE Trans. Power Electronics, 2018); the
// power-law scaling with the swing is an assumption.
func HysteresisLoss(h Hysteresis, vswing q.Voltage, f q.Frequency) (q.Power, error) {
	if err := nonNegative("hysteresis energy", float64(h.E)); err != nil {
		return 0, err
	}
	if h.E == 0 {
		return 0, nil
	}
	if err := positive("hysteresis stated voltage", float64(h.VStated)); err != nil {
		return 0, err
	}
	if err := nonNegative("voltage swing", float64(vswing)); err != nil {
		return 0, err
	}
	if err := positive("frequency", float64(f)); err != nil {
		return 0, err
	}
	n := float64(h.Exponent)
	if n == 0 {
		n = 1.5
	}
	if err := positive("hysteresis exponent", n); err != nil {
		return 0, err
	}
	return q.Power(float64(h.E) * math.Pow(float64(vswing/h.VStated), n) * float64(f)), nil
}

// ClassESwitch is what the class E loss model needs from one transistor
// and its drive at the operating point.
type ClassESwitch struct {
	// RDS is the on-resistance at the working junction temperature and
	// drive, Ω. ≥ 0.
	RDS q.Resistance
	// Tf is the drain-current fall time at turn-off, 0 to 100 %, s. ≥ 0.
	Tf q.Time
	// Hysteresis is the optional output-capacitance hysteresis loss.
	Hysteresis Hysteresis
	// VSwing is the peak switch voltage the hysteresis is scaled to, V.
	// ≥ 0; default (0) the design's VPeak (pass ClassEShunt's VPeak for a
	// nonlinear output capacitance).
	VSwing q.Voltage
	// Driver is the gate-drive power drawn from the driver supply, W
	// (e.g. Qg·V_drive·f plus quiescent). ≥ 0.
	Driver q.Power
}

// ClassELoss are the time-averaged losses of a class E switch, W.
type ClassELoss struct {
	Conduction q.Power // I_rms²·r_DS
	TurnOff    q.Power // current-fall overlap (ClassETurnOff)
	TurnOn     q.Power // hard turn-on if the voltage is not back to zero (ClassETurnOff)
	Hysteresis q.Power // output-capacitance hysteresis
	Driver     q.Power // gate-drive supply power (outside the power stage)
	// StageEfficiency is P_o/(P_o + switch losses), the power stage alone.
	StageEfficiency q.Ratio
	// Efficiency is P_o/(P_o + switch losses + driver power).
	Efficiency q.Ratio
}

// Switch is the loss that heats the transistor.
func (l ClassELoss) Switch() q.Power { return l.Conduction + l.TurnOff + l.TurnOn + l.Hysteresis }

// ClassELosses adds up the losses of switch s in design d and the
// efficiencies, first order: each loss from the lossless waveforms, the
// supply power of the stage P_o + losses. Sources as for ClassEConduction,
// ClassETurnOff and HysteresisLoss; efficiency definitions of
// Kazimierczuk, RF Power Amplifiers, 2008, ch. 1.
func ClassELosses(d ClassE, s ClassESwitch) (ClassELoss, error) {
	var l ClassELoss
	var err error
	if l.Conduction, err = ClassEConduction(d, s.RDS); err != nil {
		return l, err
	}
	toff, err := ClassETurnOff(d, s.Tf)
	if err != nil {
		return l, err
	}
	l.TurnOff, l.TurnOn = toff.TurnOff, toff.TurnOn
	vsw := s.VSwing
	if err = nonNegative("hysteresis voltage swing", float64(vsw)); err != nil {
		return l, err
	}
	if vsw == 0 {
		vsw = d.VPeak
	}
	if l.Hysteresis, err = HysteresisLoss(s.Hysteresis, vsw, d.F); err != nil {
		return l, err
	}
	if err = nonNegative("gate-driver power", float64(s.Driver)); err != nil {
		return l, err
	}
	l.Driver = s.Driver
	if l.StageEfficiency, l.Efficiency, err = Efficiency(d.Po, l.Switch(), l.Driver); err != nil {
		return l, err
	}
	return l, nil
}

// Efficiency returns the efficiency of a power stage delivering po with
// losses stage (supply power po + stage), and the efficiency including the
// gate driver's supply power driver: po/(po + stage + driver). Definitions
// of drain and overall efficiency, Kazimierczuk, RF Power Amplifiers,
// 2008, ch. 1.
func Efficiency(po, stage, driver q.Power) (stageEff, total q.Ratio, err error) {
	if err := positive("output power", float64(po)); err != nil {
		return 0, 0, err
	}
	if err := nonNegative("stage loss", float64(stage)); err != nil {
		return 0, 0, err
	}
	if err := nonNegative("driver power", float64(driver)); err != nil {
		return 0, 0, err
	}
	return q.Ratio(po / (po + stage)), q.Ratio(po / (po + stage + driver)), nil
}
