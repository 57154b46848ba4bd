package resonant

import (
	"fmt"
	"math"

	q "swrank/devices/quantity"
)

// ClassDSpec is a class D operating point: a voltage-switching half-bridge
// (50 % duty each switch) from a DC bus into a series R–L–C load.
type ClassDSpec struct {
	// Vin is the DC bus voltage across the half-bridge, V. Required, > 0.
	Vin q.Voltage
	// Po is the output power in R, W, > 0. Give exactly one of Po and R.
	Po q.Power
	// R is the load resistance, Ω, > 0. Give exactly one of Po and R.
	R q.Resistance
	// Fsw is the switching frequency, Hz. Required, > 0.
	Fsw q.Frequency
	// F0 is the resonant frequency of the series L–C, Hz, > 0. Give F0
	// with QL, or Phase instead of both.
	F0 q.Frequency
	// QL is the loaded Q at resonance, ω₀L/R, > 0 (with F0).
	QL q.Ratio
	// Phase is the load phase ψ at Fsw, rad, in (−π/2, π/2): positive
	// when the tank is inductive (current lags). Overrides F0 and QL.
	Phase q.Opt[q.Ratio]
	// DeadTime is the time from one switch's turn-off to the other's
	// turn-on at each edge, s. ≥ 0; default 0.
	DeadTime q.Time
}

// ClassD is a class D operating point with the tank current and the
// current at the switching edges, fundamental approximation.
type ClassD struct {
	Vin      q.Voltage    // supply, V
	Fsw      q.Frequency  // switching frequency, Hz
	DeadTime q.Time       // dead time at each edge, s
	R        q.Resistance // load resistance, Ω
	Po       q.Power      // output power, W
	// Phase is the load phase ψ at Fsw, rad; > 0 inductive (above
	// resonance), < 0 capacitive (below).
	Phase q.Ratio
	// Im is the amplitude of the (sinusoidal) tank current, A.
	Im q.Current
	// ISwitch is the tank current at each switching edge, A: |I_m·sin ψ|
	// in magnitude, positive when it flows the way that moves the switch
	// node towards the next switch's rail (inductive, ZVS possible),
	// negative when it drives the partner's body diode (capacitive).
	ISwitch q.Current
	// IRms is the rms current of each switch, I_m/2, A.
	IRms q.Current
	// QDead is the charge the tank current can move through the switch
	// node during the dead time, C; 0 unless inductive. Past the current's
	// zero crossing (dead time longer than ψ/ω) it counts the charge that
	// flows back.
	QDead q.Charge
	// CurrentReverses is set when the tank current crosses zero within the
	// dead time (inductive operation with a dead time longer than ψ/ω).
	CurrentReverses bool
	// L and C are the tank values from F0 and QL (0 when Phase was given).
	L q.Inductance  // H
	C q.Capacitance // F
}

// ClassDOperatingPoint works out the load and the edge currents of a class
// D stage by the fundamental approximation: the switch node is a square
// wave 0…V_in whose fundamental, amplitude 2·V_in/π, drives the series
// load Z = R·(1 + j·Q_L·(f/f₀ − f₀/f)); the harmonics are neglected. Then
// tan ψ = Q_L·(f/f₀ − f₀/f), I_m = (2V_in/π)·cos ψ/R,
// P_o = 2·V_in²·cos²ψ/(π²·R), and at each edge the current is I_m·sin ψ.
// The charge moved during the dead time t_d is
// (I_m/ω)·(cos(ψ − ω·t_d) − cos ψ), which is |i|·t_d for a short dead
// time. Source: Kazimierczuk & Czarkowski, Resonant Power Converters, 2nd
// ed., Wiley, 2011, ch. 2 (the edge charge integral derived here).
func ClassDOperatingPoint(s ClassDSpec) (ClassD, error) {
	if err := positive("class D bus voltage Vin", float64(s.Vin)); err != nil {
		return ClassD{}, err
	}
	if err := positive("class D switching frequency Fsw", float64(s.Fsw)); err != nil {
		return ClassD{}, err
	}
	if err := nonNegative("class D dead time", float64(s.DeadTime)); err != nil {
		return ClassD{}, err
	}
	d := ClassD{Vin: s.Vin, Fsw: s.Fsw, DeadTime: s.DeadTime}
	var psi float64
	if s.Phase.OK {
		psi = float64(s.Phase.V)
		if math.IsNaN(psi) || math.Abs(psi) >= math.Pi/2 {
			return ClassD{}, fmt.Errorf("class D load phase %g rad: %w: must be inside (−π/2, π/2)", psi, ErrSpec)
		}
	} else {
		if err := positive("class D resonant frequency F0", float64(s.F0)); err != nil {
			return ClassD{}, err
		}
		if err := positive("class D loaded Q QL", float64(s.QL)); err != nil {
			return ClassD{}, err
		}
		u := float64(s.Fsw / s.F0)
		psi = math.Atan(float64(s.QL) * (u - 1/u))
	}
	c2 := math.Cos(psi) * math.Cos(psi)
	vin := float64(s.Vin)
	switch {
	case s.Po != 0 && s.R != 0:
		return ClassD{}, fmt.Errorf("class D: %w: give the output power Po or the load R, not both", ErrSpec)
	case s.Po != 0:
		if err := positive("class D output power Po", float64(s.Po)); err != nil {
			return ClassD{}, err
		}
		d.Po = s.Po
		d.R = q.Resistance(2 * vin * vin * c2 / (math.Pi * math.Pi * float64(s.Po)))
	case s.R != 0:
		if err := positive("class D load R", float64(s.R)); err != nil {
			return ClassD{}, err
		}
		d.R = s.R
		d.Po = q.Power(2 * vin * vin * c2 / (math.Pi * math.Pi * float64(s.R)))
	default:
		return ClassD{}, fmt.Errorf("class D: %w: give the output power Po or the load R", ErrSpec)
	}
	d.Phase = q.Ratio(psi)
	im := 2 * vin / math.Pi * math.Cos(psi) / float64(d.R)
	d.Im = q.Current(im)
	d.ISwitch = q.Current(im * math.Sin(psi))
	d.IRms = q.Current(im / 2)
	if !s.Phase.OK {
		w0 := 2 * math.Pi * float64(s.F0)
		d.L = q.Inductance(float64(s.QL) * float64(d.R) / w0)
		d.C = q.Capacitance(1 / (float64(s.QL) * float64(d.R) * w0))
	}
	return d.WithDeadTime(s.DeadTime), nil
}

// WithDeadTime returns the operating point with the node's swing interval
// t (s, ≥ 0) in place of its dead time: the charge the tank current moves
// in it, (I_m/ω)·(cos(ψ − ωt) − cos ψ) when inductive, and whether the
// current reverses within it. A switch pair whose gates lengthen or
// shorten the programmed dead time (the incoming channel's turn-on delay
// less the outgoing one's turn-off delay) sees this interval instead
// (Kazimierczuk & Czarkowski, Resonant Power Converters, 2nd ed., 2011,
// ch. 2: the node swings while both channels are off).
func (d ClassD) WithDeadTime(t q.Time) ClassD {
	d.DeadTime, d.QDead, d.CurrentReverses = max(t, 0), 0, false
	psi := float64(d.Phase)
	if psi > 0 {
		w := 2 * math.Pi * float64(d.Fsw)
		wtd := w * float64(d.DeadTime)
		d.CurrentReverses = wtd > psi
		im := float64(d.Im)
		d.QDead = q.Charge(max(im/w*(math.Cos(psi-wtd)-math.Cos(psi)), 0))
	}
	return d
}

// ClassDEdge is the outcome of one switch turn-on (the same at both edges
// of a symmetric half-bridge).
type ClassDEdge struct {
	// ZVS is set when the switch node fully reaches the incoming switch's
	// rail within the dead time.
	ZVS bool
	// VResidual is the voltage across the incoming switch when its gate
	// turns on, V: 0 at full ZVS, V_in when hard-switched.
	VResidual q.Voltage
	// ETurnOn is the energy dissipated in the incoming switch at turn-on,
	// J: E_S(V_r) + V·[Q_K(V) − Q_K(V − V_r)] − [E_K(V) − E_K(V − V_r)].
	// Reverse recovery is not included (see PartnerDiode).
	ETurnOn q.Energy
	// PartnerDiode is set in capacitive operation (below resonance): the
	// partner's body diode carries the current through the dead time and
	// is reverse-recovered by this turn-on; add its Q_rr·V_in.
	PartnerDiode bool
	// TDiode is the time a body diode conducts per edge, s: the incoming
	// switch's own diode after a full ZVS transition until its gate turns
	// on, or the partner's diode for the whole dead time when
	// PartnerDiode. Multiply by the diode drop and the edge current for
	// the dead-time conduction loss.
	TDiode q.Time
	// QNeeded is Q_oss,S(V) + Q_oss,K(V), the charge for a full
	// transition, C.
	QNeeded q.Charge
}

// ClassDTurnOn is the turn-on of the incoming switch S, with output-charge
// law qS, while its partner K (law qK) has just turned off, in class D
// operating point d. ZVS needs inductive operation (f_sw above resonance)
// and a dead-time charge of at least Q_S(V) + Q_K(V). With less, the node
// stops at a residual V_r across S, given by
// Q_K(V − V_r) + Q_S(V) − Q_S(V_r) = Q_dead, and S dissipates
// E_S(V_r) + V·[Q_K(V) − Q_K(V − V_r)] − [E_K(V) − E_K(V − V_r)]
// (S's own stored energy, plus the charge the supply delivers through S to
// finish charging K less the part stored in K), continuous from 0 at
// V_r = 0 to the hard-switched E_S(V) + V·Q_K(V) − E_K(V) at V_r = V,
// which for identical parts is V·Q_oss(V). Sources: Kazimierczuk &
// Czarkowski, Resonant Power Converters, 2nd ed., 2011, ch. 2; the
// partial-ZVS energy bookkeeping is derived (docs/resonant.md).
func ClassDTurnOn(d ClassD, qS, qK QossFunc) (ClassDEdge, error) {
	if qS == nil || qK == nil {
		return ClassDEdge{}, fmt.Errorf("class D turn-on: %w: both Q_oss laws are needed", ErrSpec)
	}
	if err := positive("class D bus voltage Vin", float64(d.Vin)); err != nil {
		return ClassDEdge{}, err
	}
	v := d.Vin
	qSV, err := evalQoss(qS, v)
	if err != nil {
		return ClassDEdge{}, err
	}
	qKV, err := evalQoss(qK, v)
	if err != nil {
		return ClassDEdge{}, err
	}
	e := ClassDEdge{QNeeded: qSV + qKV}
	var vr float64
	switch {
	case d.Phase < 0:
		// Capacitive: the partner's diode holds the node; hard turn-on.
		e.PartnerDiode = d.ISwitch != 0
		if e.PartnerDiode {
			e.TDiode = d.DeadTime
		}
		vr = float64(v)
	case d.Phase > 0 && effectiveDeadCharge(d, float64(e.QNeeded)) >= float64(e.QNeeded):
		e.ZVS = true
		if im := float64(d.Im); im > 0 && !d.CurrentReverses {
			// Time at which the node arrives: (I_m/ω)(cos(ψ−ωt) − cos ψ) = Q.
			w := 2 * math.Pi * float64(d.Fsw)
			psi := float64(d.Phase)
			c := math.Cos(psi) + w*float64(e.QNeeded)/im
			if c <= 1 {
				t := (psi - math.Acos(c)) / w
				e.TDiode = q.Time(math.Max(float64(d.DeadTime)-t, 0))
			}
		}
	default:
		// Partial (or no) ZVS: residual across S.
		qd := 0.0
		if d.Phase > 0 {
			qd = effectiveDeadCharge(d, float64(e.QNeeded))
		}
		var bad error
		g := func(x float64) float64 {
			a, err := evalQoss(qK, q.Voltage(float64(v)-x))
			if err != nil && bad == nil {
				bad = err
			}
			b, err := evalQoss(qS, q.Voltage(x))
			if err != nil && bad == nil {
				bad = err
			}
			return float64(a) + float64(qSV) - float64(b) - qd
		}
		if qd <= 0 {
			vr = float64(v)
		} else if vr, err = findRoot(g, 0, float64(v), float64(qKV+qSV)-qd, -qd, 1e-12*float64(v)); err != nil {
			return e, fmt.Errorf("class D residual voltage: %w", err)
		}
		if bad != nil {
			return e, bad
		}
	}
	e.VResidual = q.Voltage(vr)
	if vr > 0 {
		eS, err := OssEnergy(qS, q.Voltage(vr))
		if err != nil {
			return e, err
		}
		eKV, err := OssEnergy(qK, v)
		if err != nil {
			return e, err
		}
		eKr, err := OssEnergy(qK, v-q.Voltage(vr))
		if err != nil {
			return e, err
		}
		qKr, err := evalQoss(qK, v-q.Voltage(vr))
		if err != nil {
			return e, err
		}
		en := float64(eS) + float64(v)*float64(qKV-qKr) - float64(eKV-eKr)
		e.ETurnOn = q.Energy(math.Max(en, 0))
	}
	return e, nil
}

// effectiveDeadCharge is the net charge moved through the node by the
// end of the dead time when the node needs qNeeded to reach the rail: the
// tank charge, but when the current reverses within the dead time the
// node, clamped at the rail by the incoming switch's diode at most,
// swings back by the charge that flows after the zero crossing.
func effectiveDeadCharge(d ClassD, qNeeded float64) float64 {
	qd := float64(d.QDead)
	if !d.CurrentReverses {
		return qd
	}
	w := 2 * math.Pi * float64(d.Fsw)
	qmax := float64(d.Im) / w * (1 - math.Cos(float64(d.Phase)))
	return math.Max(math.Min(qmax, qNeeded)-(qmax-qd), 0)
}

// ZVSTurnOffEnergy is the turn-off loss of a switch carrying current i
// whose channel current falls linearly to zero in tf while the switch node
// capacitance cnode (both switches' output capacitance, plus any
// external) takes the diverted current, up to the rail v. While
// I·t_f/(2·C_node) < V the node does not reach the rail during the fall
// and E = I²·t_f²/(24·C_node); otherwise the node reaches V at
// t₁ = √(2·C_node·V·t_f/I) and
//
//	E = I²/(2·C_node·t_f)·(t₁³/3 − t₁⁴/(4·t_f)) + V·I·(t_f − t₁)²/(2·t_f),
//
// which tends to ½·V·I·t_f as C_node → 0 and is continuous at t₁ = t_f.
// Derived from C·dv/dt = I·t/t_f (Kazimierczuk & Czarkowski, Resonant
// Power Converters, 2011, ch. 2 for the lossless-snubber setting; the
// piecewise form is derived, docs/resonant.md). The current is taken as
// constant over the fall.
func ZVSTurnOffEnergy(i q.Current, tf q.Time, cnode q.Capacitance, v q.Voltage) (q.Energy, error) {
	if err := nonNegative("turn-off current", float64(i)); err != nil {
		return 0, err
	}
	if err := nonNegative("current fall time", float64(tf)); err != nil {
		return 0, err
	}
	if err := nonNegative("node capacitance", float64(cnode)); err != nil {
		return 0, err
	}
	if err := positive("rail voltage", float64(v)); err != nil {
		return 0, err
	}
	I, T, C, V := float64(i), float64(tf), float64(cnode), float64(v)
	if I == 0 || T == 0 {
		return 0, nil
	}
	if C == 0 {
		return q.Energy(V * I * T / 2), nil
	}
	if I*T/(2*C) < V {
		return q.Energy(I * I * T * T / (24 * C)), nil
	}
	t1 := math.Sqrt(2 * C * V * T / I)
	return q.Energy(I*I/(2*C*T)*(t1*t1*t1/3-t1*t1*t1*t1/(4*T)) + V*I*(T-t1)*(T-t1)/(2*T)), nil
}

// NodeCapacitance is the charge-equivalent capacitance of a half-bridge
// switch node over a full swing to v, (Q_S(v) + Q_K(v))/v, the linear
// capacitance that moves the same charge (time-related C_o(tr) of IEC
// 60747-8, summed over both switches).
func NodeCapacitance(qS, qK QossFunc, v q.Voltage) (q.Capacitance, error) {
	if qS == nil || qK == nil {
		return 0, fmt.Errorf("node capacitance: %w: both Q_oss laws are needed", ErrSpec)
	}
	if err := positive("voltage", float64(v)); err != nil {
		return 0, err
	}
	a, err := evalQoss(qS, v)
	if err != nil {
		return 0, err
	}
	b, err := evalQoss(qK, v)
	if err != nil {
		return 0, err
	}
	return q.Capacitance(float64(a+b) / float64(v)), nil
}

// ClassDSwitch is what the class D loss model needs from the transistor
// used in both places of the half-bridge.
type ClassDSwitch struct {
	RDS  q.Resistance // on-resistance at the working temperature, Ω; ≥ 0
	Tf   q.Time       // channel current fall time, 0 to 100 %, s; ≥ 0
	Qoss QossFunc     // output-charge law; required
	// CExtra is capacitance added across each switch (snubber), F; ≥ 0.
	CExtra q.Capacitance
}

// ClassDLoss are the time-averaged losses of one switch of a symmetric
// class D half-bridge (both switches the same part), W.
type ClassDLoss struct {
	Conduction q.Power    // (I_m/2)²·r_DS
	TurnOn     q.Power    // ETurnOn·f_sw (partial ZVS or hard)
	TurnOff    q.Power    // ZVSTurnOffEnergy·f_sw (inductive only)
	Edge       ClassDEdge // the turn-on edge the losses were booked from
}

// Switch is the loss that heats the transistor (recovery and dead-time
// diode conduction excluded; see Edge).
func (l ClassDLoss) Switch() q.Power { return l.Conduction + l.TurnOn + l.TurnOff }

// ClassDLosses are the losses of one switch of a symmetric class D stage
// d with the same part s in both places: conduction with I_rms = I_m/2,
// the turn-on of ClassDTurnOn and, when inductive, the turn-off of
// ZVSTurnOffEnergy at the edge current with the node capacitance of both
// switches. In capacitive operation the turn-off current is already in
// the switch's own diode direction and there is no turn-off overlap; the
// partner's recovery is flagged in Edge. Sources as for those functions.
func ClassDLosses(d ClassD, s ClassDSwitch) (ClassDLoss, error) {
	if err := nonNegative("on-resistance rDS", float64(s.RDS)); err != nil {
		return ClassDLoss{}, err
	}
	if err := nonNegative("extra capacitance", float64(s.CExtra)); err != nil {
		return ClassDLoss{}, err
	}
	qoss := s.Qoss
	if qoss == nil {
		return ClassDLoss{}, fmt.Errorf("class D losses: %w: no Q_oss law given", ErrSpec)
	}
	if s.CExtra > 0 {
		dev, extra := s.Qoss, s.CExtra
		qoss = func(v q.Voltage) q.Charge { return dev(v) + q.Charge(float64(extra)*float64(v)) }
	}
	var l ClassDLoss
	var err error
	if l.Edge, err = ClassDTurnOn(d, qoss, qoss); err != nil {
		return l, err
	}
	l.Conduction = q.Power(float64(d.IRms*d.IRms) * float64(s.RDS))
	l.TurnOn = q.Power(float64(l.Edge.ETurnOn) * float64(d.Fsw))
	if d.Phase > 0 {
		cn, err := NodeCapacitance(qoss, qoss, d.Vin)
		if err != nil {
			return l, err
		}
		eoff, err := ZVSTurnOffEnergy(d.ISwitch, s.Tf, cn, d.Vin)
		if err != nil {
			return l, err
		}
		l.TurnOff = q.Power(float64(eoff) * float64(d.Fsw))
	}
	return l, nil
}
