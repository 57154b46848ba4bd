package resonant

import (
	"fmt"
	"math"

	"gonum.org/v1/gonum/mat"

	q "swrank/devices/quantity"
)

// highQ stands in for Q_L → ∞ where the state-space model needs a finite
// loaded Q; at this Q the nominal coefficients differ from the closed form
// by about 10⁻⁴.
const highQ = 1e4

// fallSteps is the number of Simpson intervals over the current fall.
const fallSteps = 64

// ClassETurnOffResult is the outcome of ClassETurnOff.
type ClassETurnOffResult struct {
	// TurnOff is the current-fall overlap loss v·i_S averaged over the
	// period, W.
	TurnOff q.Power
	// TurnOn is the loss of a hard turn-on, ½·C₁·v², when the switch
	// voltage has not returned to zero by the gate turn-on, W; 0 when the
	// voltage reaches zero first (the switch's reverse conduction, or an
	// antiparallel diode, then clamps it).
	TurnOn q.Power
	// Po is the output power with the fall, W (slightly below the design's).
	Po q.Power
	// IOff is the switch current at the start of the fall in the steady
	// state with the fall, A (above the lossless design's value).
	IOff q.Current
	// DiodeAngle is how long before the gate turn-on the switch voltage
	// reaches zero and reverse conduction starts, rad (ω·t); 0 when it
	// does not.
	DiodeAngle q.Ratio
	// VTurnOn is the switch voltage when the channel turns on, V; 0 when
	// it has reached zero first.
	VTurnOn q.Voltage
}

// ClassETurnOff is the class E turn-off loss for a linear fall of the
// switch current lasting tf (0 to 100 %; a datasheet 90–10 % time is 0.8
// of it), from the periodic steady state of the design's circuit with the
// fall in it. Each period is: the fall (the switch a current falling
// linearly from its value at the start of the fall to zero in t_f), the
// rest of the off half period until the gate turns on or, earlier, until
// the switch voltage reaches zero and reverse conduction clamps it, then
// the on state. Every piece is linear, so each is one matrix exponential
// (gonum mat.Dense.Exp) with the switch current and its starting value as
// extra states; the instant of zero voltage is found by a root search and
// ∫v·i_S over the fall by Simpson's rule. An ideal design (Q_L → ∞) is
// run at Q_L = 10⁴.
//
// The fall delays the charging of C₁, which shifts the load current so
// that the current at turn-off rises (about +6.7 % at ω·t_f = 0.2, Q_L
// 20); this cancels most of the effect of the falling circuit current
// during the fall (ClassETurnOffWaveform), and the result stays within
// about 1 % of the small-t_f formula (ω·t_f)²/12·P_o of Kazimierczuk, RF
// Power Amplifiers, 2008, ch. 4, for ω·t_f ≤ 0.2. Checked against ngspice
// (TestNgspiceClassETurnOff). Circuit of Raab 1977 with the linear fall
// of Kazimierczuk 2008; the steady-state method is this package's own.
func ClassETurnOff(d ClassE, tf q.Time) (ClassETurnOffResult, error) {
	return ClassETurnOffTimed(d, tf, math.Pi)
}

// ClassETurnOffTimed is ClassETurnOff for a switch whose channel turns
// on again offAngle (rad, ω·t) after its current starts to fall, instead
// of half a period: a gate that takes longer to turn the channel off
// than on (its turn-off delay through the plateau above its turn-on delay
// to the threshold) keeps the channel on for more than half the period,
// so it may turn on before the switch voltage has returned to zero and
// dump what the shunt holds, ½·C₁·v² (TurnOn, with VTurnOn). offAngle
// lies in (ω·t_f, 2π); π is the design's 50 % duty. The circuit and the
// steady-state method are those of ClassETurnOff; a zero t_f is taken as
// a fall of 10⁻⁶ rad.
func ClassETurnOffTimed(d ClassE, tf q.Time, offAngle float64) (ClassETurnOffResult, error) {
	if err := nonNegative("current fall time tf", float64(tf)); err != nil {
		return ClassETurnOffResult{}, err
	}
	c := d.Coefficients
	for _, v := range []struct {
		name string
		x    float64
	}{{"supply voltage VDD", float64(d.VDD)}, {"frequency F", float64(d.F)}, {"load R", float64(d.R)}, {"coefficient KC", float64(c.KC)}} {
		if err := positive("class E turn-off: design "+v.name, v.x); err != nil {
			return ClassETurnOffResult{}, err
		}
	}
	w := 2 * math.Pi * float64(d.F)
	e := w * float64(tf)
	if e > MaxTurnOffAngle {
		return ClassETurnOffResult{}, fmt.Errorf("class E turn-off: %w: ω·tf = %.3g rad exceeds %g (a fall of %s at %s takes too much of the period for the model)",
			ErrSpec, e, MaxTurnOffAngle, tf, d.F)
	}
	if e == 0 && offAngle == math.Pi {
		return ClassETurnOffResult{Po: d.Po, IOff: d.IOff}, nil
	}
	e = max(e, 1e-6)
	if !(offAngle > e && offAngle < 2*math.Pi) {
		return ClassETurnOffResult{}, fmt.Errorf("class E turn-off: %w: the channel's off interval %.3g rad lies outside (ω·tf, 2π) = (%.3g, %.3g)",
			ErrSpec, offAngle, e, 2*math.Pi)
	}
	ql, fr := float64(c.QL), float64(c.FeedRatio)
	if math.IsInf(ql, 1) || ql == 0 {
		ql = highQ
	}
	if math.IsInf(fr, 1) {
		fr = 0
	}
	if ql <= float64(c.KX) {
		return ClassETurnOffResult{}, fmt.Errorf("class E turn-off: %w: loaded Q %g not above X/R %g", ErrSpec, ql, float64(c.KX))
	}
	fc := newFallCircuit(newECircuit(ql, fr, float64(c.KC), float64(c.KX)), float64(c.KC), e)
	fc.gate = offAngle
	r, err := fc.solve()
	if err != nil {
		return ClassETurnOffResult{}, fmt.Errorf("class E turn-off with ω·tf = %.3g: %w", e, err)
	}
	// Scale the normalised circuit (R = 1, V_DD = vnorm) to V_DD and R.
	k := float64(d.VDD*d.VDD) / (float64(d.R) * r.vnorm * r.vnorm)
	return ClassETurnOffResult{
		TurnOff:    q.Power(k * r.eFall / (2 * math.Pi)),
		TurnOn:     q.Power(k * r.eHard / (2 * math.Pi)),
		Po:         q.Power(k * r.po),
		IOff:       q.Current(r.ioff * float64(d.VDD) / (float64(d.R) * r.vnorm)),
		DiodeAngle: q.Ratio(offAngle - r.thetaD),
		VTurnOn:    q.Voltage(r.von * float64(d.VDD) / r.vnorm),
	}, nil
}

// fallCircuit is the normalised class E circuit of eCircuit with two more
// states for the fall: the switch current i_S and its starting value g.
type fallCircuit struct {
	base            eCircuit
	b               float64 // ω·R·C₁
	eps             float64 // ω·t_f
	gate            float64 // angle of the channel's turn-on after the start of the fall (π: 50 % duty)
	m               int     // augmented size
	sIS, sG, one    int
	on, off, fall   *mat.Dense
	resetF, resetOn *mat.Dense // linear maps at the start of the fall and at turn-on
	eFall           *mat.Dense // exp(fall·ε)
}

func newFallCircuit(c eCircuit, b, eps float64) *fallCircuit {
	f := &fallCircuit{base: c, b: b, eps: eps, m: c.n + 2, gate: math.Pi}
	f.sIS, f.sG, f.one = c.n-1, c.n, c.n+1
	old := c.n - 1 // constant index in the base circuit
	widen := func(a *mat.Dense) *mat.Dense {
		b := mat.NewDense(f.m, f.m, nil)
		for i := 0; i < c.n; i++ {
			for j := 0; j < c.n; j++ {
				ii, jj := i, j
				if i == old {
					ii = f.one
				}
				if j == old {
					jj = f.one
				}
				b.Set(ii, jj, a.At(i, j))
			}
		}
		return b
	}
	f.on, f.off = widen(c.on), widen(c.off)
	f.fall = mat.DenseCopyOf(f.off)
	f.fall.Set(sV1, f.sIS, -1/b) // B·v1' = feed − iL − i_S
	f.fall.Set(f.sIS, f.sG, -1/eps)
	// Node current selector in the widened state.
	node := make([]float64, f.m)
	node[sIL] = -1
	if c.finite {
		node[sIF] = 1
	} else {
		node[f.one] = 1
	}
	f.resetF = identity(f.m)
	for j := 0; j < f.m; j++ {
		f.resetF.Set(f.sIS, j, node[j])
		f.resetF.Set(f.sG, j, node[j])
	}
	f.resetOn = identity(f.m)
	for _, i := range []int{sV1, f.sIS, f.sG} {
		f.resetOn.Set(i, i, 0)
	}
	f.eFall = expScaled(f.fall, eps)
	return f
}

func identity(n int) *mat.Dense {
	a := mat.NewDense(n, n, nil)
	for i := 0; i < n; i++ {
		a.Set(i, i, 1)
	}
	return a
}

// fallResult is a normalised steady state with the fall.
type fallResult struct {
	thetaD       float64 // angle from the start of the fall at which the on state begins (≤ the gate's)
	eFall, eHard float64 // energies per period (normalised)
	von          float64 // switch voltage at the channel's turn-on (normalised); 0 when it reached zero first
	po, vnorm    float64 // output power and supply voltage (normalised)
	ioff         float64 // node current at the start of the fall
}

// cycle returns the periodic state just before the fall (integrals zero),
// for an on state starting at thetaD, and the state at thetaD⁻.
func (f *fallCircuit) cycle(thetaD float64) (x, zd []float64, err error) {
	var m, t mat.Dense
	t.Mul(f.eFall, f.resetF)
	m.Mul(expScaled(f.off, thetaD-f.eps), &t)
	pre := mat.DenseCopyOf(&m) // to θ_d⁻
	m.Mul(f.resetOn, pre)
	t.Mul(expScaled(f.on, 2*math.Pi-thetaD), &m)
	x, err = periodicState(&t, f.base.periodic, f.m, f.one)
	if err != nil {
		return nil, nil, fmt.Errorf("periodic steady state with the fall: %w", err)
	}
	zd = mulVec(pre, x)
	return x, zd, nil
}

func mulVec(a *mat.Dense, x []float64) []float64 {
	r, _ := a.Dims()
	y := make([]float64, r)
	for i := 0; i < r; i++ {
		var s float64
		for j, v := range x {
			s += a.At(i, j) * v
		}
		y[i] = s
	}
	return y
}

// solve finds the steady state: the on state starts at the gate turn-on
// (θ = f.gate from the start of the fall) unless the switch voltage
// reaches zero earlier (reverse conduction then clamps it: the on state
// starts there). A late gate's steady state does not dip to zero before
// it in this circuit (checked from 0.2 to 2 rad late at Q_L 20): a gate
// later than half a period also turns on with voltage left.
func (f *fallCircuit) solve() (fallResult, error) {
	h := func(th float64) (float64, error) {
		_, zd, err := f.cycle(th)
		if err != nil {
			return 0, err
		}
		return zd[sV1], nil
	}
	thetaD := f.gate
	hp, err := h(f.gate)
	if err != nil {
		return fallResult{}, err
	}
	if hp < 0 {
		// The voltage crossed zero before the gate turn-on: find where.
		lo, hlo := f.gate, hp
		for d := math.Sqrt(f.eps) / 4; ; d *= 2 {
			lo = f.gate - d
			if lo <= f.eps {
				return fallResult{}, fmt.Errorf("switch voltage stays at or below zero after the fall")
			}
			if hlo, err = h(lo); err != nil {
				return fallResult{}, err
			}
			if hlo > 0 {
				break
			}
		}
		var bad error
		thetaD, err = findRoot(func(th float64) float64 {
			v, err := h(th)
			if err != nil && bad == nil {
				bad = err
			}
			return v
		}, lo, f.gate, hlo, hp, 1e-12)
		if bad != nil {
			return fallResult{}, bad
		}
		if err != nil {
			return fallResult{}, fmt.Errorf("instant of zero switch voltage: %w", err)
		}
	}
	x, zd, err := f.cycle(thetaD)
	if err != nil {
		return fallResult{}, err
	}
	res := fallResult{thetaD: thetaD}
	// ∫v1·i_S over the fall by Simpson's rule.
	step := expScaled(f.fall, f.eps/fallSteps)
	z := mulVec(f.resetF, x)
	res.ioff = z[f.sIS]
	vals := make([]float64, fallSteps+1)
	for k := 0; k <= fallSteps; k++ {
		vals[k] = z[sV1] * z[f.sIS]
		if k < fallSteps {
			z = mulVec(step, z)
		}
	}
	res.eFall = simpson(vals, f.eps/fallSteps, func(v float64) float64 { return v })
	if thetaD == f.gate && zd[sV1] > 0 {
		res.von = zd[sV1]
		res.eHard = f.b * zd[sV1] * zd[sV1] / 2
	}
	// Supply power and voltage over the period from the integral states.
	full := f.fullPeriod(thetaD, x)
	var pin float64
	if f.base.finite {
		res.vnorm = 1
		pin = full[sU] / (2 * math.Pi)
	} else {
		res.vnorm = full[sW] / (2 * math.Pi)
		pin = res.vnorm
	}
	res.po = pin - (res.eFall+res.eHard)/(2*math.Pi)
	if !(res.vnorm > 0) || !(res.po > 0) || math.IsNaN(res.eFall) || res.eFall < 0 {
		return res, fmt.Errorf("implausible steady state (V %g, P %g, E %g)", res.vnorm, res.po, res.eFall)
	}
	return res, nil
}

// fullPeriod returns the state after one whole period from x.
func (f *fallCircuit) fullPeriod(thetaD float64, x []float64) []float64 {
	z := mulVec(f.resetF, x)
	z = mulVec(f.eFall, z)
	z = mulVec(expScaled(f.off, thetaD-f.eps), z)
	z = mulVec(f.resetOn, z)
	return mulVec(expScaled(f.on, 2*math.Pi-thetaD), z)
}
