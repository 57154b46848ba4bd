package resonant

import (
	"fmt"
	"math"

	"gonum.org/v1/gonum/integrate/quad"

	q "swrank/devices/quantity"
)

// ClassEShuntResult is how a transistor's nonlinear output capacitance fits
// into the shunt capacitance of a class E design.
type ClassEShuntResult struct {
	// VPeak is the peak switch voltage with the device's law in the shunt
	// (above the linear 3.562·V_DD for a capacitance that falls with
	// voltage), V.
	VPeak q.Voltage
	// CDevice is the device's charge-equivalent capacitance over the swing,
	// Q_oss(VPeak)/VPeak, F.
	CDevice q.Capacitance
	// CExternal is the linear capacitor still to be placed across the
	// switch, F. 0 when DeviceTooLarge.
	CExternal q.Capacitance
	// DeviceTooLarge is set when the device's output capacitance alone is
	// more than the design's shunt capacitance: the part cannot hold
	// nominal class E at this frequency, power and supply. VPeak and
	// CDevice then describe the device alone carrying the design's shunt
	// charge, which is not a nominal operating point.
	DeviceTooLarge bool
	// FMax is the highest frequency at which the device alone is the whole
	// shunt capacitance, at the design's power, supply and loaded Q, Hz.
	FMax q.Frequency
	// X is the excess series reactance that keeps nominal operation with
	// this shunt, Ω (the linear-shunt design's X scaled by the change of the
	// fundamental's quadrature part).
	X q.Resistance
}

// ClassEShunt places a transistor with output-charge law qoss inside the
// shunt capacitance of design d. In the Q_L → ∞ limit with zero voltage
// and zero slope at turn-on, the currents of class E do not depend on the
// capacitance law: the shunt branch receives the charge
// Q(θ) = (I_DC/ω)·(θ + sin θ + (π/2)(cos θ − 1)) during the off half
// period (θ from turn-off), whatever it is made of. With a linear external
// capacitor C_ext in parallel with the device, the switch voltage v(θ)
// solves C_ext·v + Q_oss(v) = Q(θ); C_ext is chosen so that the mean
// switch voltage equals V_DD (the feed choke carries no DC voltage). The
// peak voltage is the voltage at the peak charge, reached at
// θ = 2·atan(2/π); R is unchanged and the excess reactance follows from
// the fundamental of v. FMax is the frequency at which C_ext reaches 0.
//
// This charge-balance model is this package's own (docs/resonant.md),
// built on the ideal waveforms of Raab 1977; it shows the published
// effect that a nonlinear output capacitance raises the peak voltage above
// 3.562·V_DD (Chudobiak, "The use of parasitic nonlinear capacitors in
// class E amplifiers", IEEE Trans. Circuits and Systems I, 41(12), 1994).
// For a finite-Q design the charge is scaled to the design's own C₁
// (π·C₁·V_DD in place of I_DC/ω), an approximation.
func ClassEShunt(d ClassE, qoss QossFunc) (ClassEShuntResult, error) {
	if qoss == nil {
		return ClassEShuntResult{}, fmt.Errorf("class E shunt: %w: no Q_oss law given", ErrSpec)
	}
	for _, c := range []struct {
		name string
		v    float64
	}{{"supply voltage VDD", float64(d.VDD)}, {"frequency F", float64(d.F)}, {"shunt capacitance C1", float64(d.C1)}, {"load R", float64(d.R)}} {
		if err := positive("class E shunt: design "+c.name, c.v); err != nil {
			return ClassEShuntResult{}, err
		}
	}
	sh, err := newShunt(qoss, float64(d.VDD))
	if err != nil {
		return ClassEShuntResult{}, err
	}
	vdd := float64(d.VDD)
	sd := math.Pi * float64(d.C1) * vdd // charge scale of the design

	// Device alone at the design's charge.
	m0, err := sh.mean(0, sd)
	if err != nil {
		return ClassEShuntResult{}, err
	}
	var res ClassEShuntResult
	cext := 0.0
	if m0 < vdd {
		res.DeviceTooLarge = true
	} else {
		// The mean voltage falls as C_ext grows; at C_ext = C₁ it is at
		// most V_DD (the device only adds capacitance).
		c1 := float64(d.C1)
		m1, err := sh.mean(c1, sd)
		if err != nil {
			return res, err
		}
		var bad error
		cext, err = findRoot(func(c float64) float64 {
			m, err := sh.mean(c, sd)
			if err != nil && bad == nil {
				bad = err
			}
			return m - vdd
		}, 0, c1, m0-vdd, m1-vdd, 1e-10*c1)
		if bad != nil {
			return res, bad
		}
		if err != nil {
			return res, fmt.Errorf("class E shunt: external capacitance: %w", err)
		}
	}
	res.CExternal = q.Capacitance(cext)

	thetaM := 2 * math.Atan(2/math.Pi)
	vpk, err := sh.voltage(cext, sd*thetaM)
	if err != nil {
		return res, err
	}
	res.VPeak = q.Voltage(vpk)
	qpk, err := evalQoss(qoss, res.VPeak)
	if err != nil {
		return res, err
	}
	res.CDevice = q.Capacitance(float64(qpk) / vpk)

	// Excess reactance from the fundamental of v (ratio to the linear
	// closed form, applied to the design's X).
	ratio, err := sh.reactanceRatio(cext, sd)
	if err != nil {
		return res, err
	}
	res.X = q.Resistance(float64(d.X) * ratio / float64(IdealClassE().KX))

	// FMax: the charge scale s* at which the device alone gives mean V_DD;
	// the shunt charge scales as 1/f at fixed R and P.
	lo, hi := sd, sd
	mlo, mhi := m0, m0
	for k := 0; mlo >= vdd; k++ {
		if k > 200 {
			return res, fmt.Errorf("class E shunt: the Q_oss law gives a mean voltage ≥ V_DD at any charge (is it zero?)")
		}
		hi, mhi = lo, mlo
		lo /= 2
		if mlo, err = sh.mean(0, lo); err != nil {
			return res, err
		}
	}
	for k := 0; mhi < vdd; k++ {
		if k > 200 {
			return res, fmt.Errorf("class E shunt: the Q_oss law never reaches mean V_DD")
		}
		lo, mlo = hi, mhi
		hi *= 2
		if mhi, err = sh.mean(0, hi); err != nil {
			return res, err
		}
	}
	var bad error
	sStar, err := findRoot(func(s float64) float64 {
		m, err := sh.mean(0, s)
		if err != nil && bad == nil {
			bad = err
		}
		return m - vdd
	}, lo, hi, mlo-vdd, mhi-vdd, 1e-11*hi)
	if bad != nil {
		return res, bad
	}
	if err != nil {
		return res, fmt.Errorf("class E shunt: maximum frequency: %w", err)
	}
	res.FMax = q.Frequency(float64(d.F) * sd / sStar)
	return res, nil
}

// shunt evaluates the switch voltage of a nonlinear shunt over the off
// half period at fixed Gauss–Legendre nodes.
type shunt struct {
	qoss    QossFunc
	vscale  float64   // a voltage of the right order (V_DD) to start brackets
	theta   []float64 // nodes on [0, π]
	weight  []float64
	qhat    []float64 // θ + sin θ + (π/2)(cos θ − 1) at the nodes
	lastV   []float64 // last solution per node (bracket hint)
	scratch []float64
}

func newShunt(qoss QossFunc, vscale float64) (*shunt, error) {
	s := &shunt{qoss: qoss, vscale: vscale}
	s.theta = make([]float64, glNodes)
	s.weight = make([]float64, glNodes)
	quad.Legendre{}.FixedLocations(s.theta, s.weight, 0, math.Pi)
	s.qhat = make([]float64, glNodes)
	s.lastV = make([]float64, glNodes)
	s.scratch = make([]float64, glNodes)
	for i, th := range s.theta {
		s.qhat[i] = th + math.Sin(th) + math.Pi/2*(math.Cos(th)-1)
	}
	if _, err := evalQoss(qoss, q.Voltage(vscale)); err != nil {
		return nil, err
	}
	return s, nil
}

// voltage solves cext·v + Q_oss(v) = charge for v ≥ 0.
func (s *shunt) voltage(cext, charge float64) (float64, error) {
	return s.voltageHint(cext, charge, 0)
}

func (s *shunt) voltageHint(cext, charge, hint float64) (float64, error) {
	if charge <= 0 {
		return 0, nil
	}
	var bad error
	g := func(v float64) float64 {
		c, err := evalQoss(s.qoss, q.Voltage(v))
		if err != nil && bad == nil {
			bad = err
		}
		return cext*v + float64(c) - charge
	}
	// Start from the hint or the supply scale and double: the bracket then
	// stays within a factor of two of the root (so the tolerance, relative
	// to hi, is relative to the root), capped by charge/cext.
	hi := s.vscale
	if hint > 0 {
		hi = 1.5 * hint
	}
	if cext > 0 {
		hi = math.Min(hi, charge/cext)
	}
	ghi := g(hi)
	for k := 0; ghi < 0; k++ {
		if k > 200 || bad != nil {
			if bad != nil {
				return 0, bad
			}
			return 0, fmt.Errorf("class E shunt: %w: the Q_oss law never reaches %g C", ErrSpec, charge)
		}
		hi *= 2
		if cext > 0 {
			hi = math.Min(hi, charge/cext)
		}
		ghi = g(hi)
	}
	lo, glo := 0.0, -charge
	if hint > 0 {
		lo = hint / 1.5
		if glo = g(lo); glo > 0 {
			lo, glo = 0, -charge
		}
	}
	v, err := findRoot(g, lo, hi, glo, ghi, 1e-13*hi)
	if bad != nil {
		return 0, bad
	}
	if err != nil {
		return 0, fmt.Errorf("class E shunt voltage: %w", err)
	}
	return v, nil
}

// solve fills s.scratch with the switch voltage at each node for external
// capacitance cext and charge scale sc.
func (s *shunt) solve(cext, sc float64) ([]float64, error) {
	for i := range s.theta {
		v, err := s.voltageHint(cext, sc*s.qhat[i], s.lastV[i])
		if err != nil {
			return nil, err
		}
		s.scratch[i] = v
		s.lastV[i] = v
	}
	return s.scratch, nil
}

// mean is the switch voltage averaged over the whole period (zero in the
// on half).
func (s *shunt) mean(cext, sc float64) (float64, error) {
	v, err := s.solve(cext, sc)
	if err != nil {
		return 0, err
	}
	var m float64
	for i := range v {
		m += s.weight[i] * v[i]
	}
	return m / (2 * math.Pi), nil
}

// reactanceRatio is X/R from the fundamental of the switch voltage: with
// the load current I_m·sin(θ+φ), tan φ = −2/π, X/R is the ratio of the
// projections of v on cos(θ+φ) and sin(θ+φ).
func (s *shunt) reactanceRatio(cext, sc float64) (float64, error) {
	v, err := s.solve(cext, sc)
	if err != nil {
		return 0, err
	}
	var px, pr float64
	for i, th := range s.theta {
		px += s.weight[i] * v[i] * (math.Pi/2*math.Cos(th) + math.Sin(th))
		pr += s.weight[i] * v[i] * (math.Pi/2*math.Sin(th) - math.Cos(th))
	}
	if !(pr > 0) {
		return 0, fmt.Errorf("class E shunt: the switch voltage has no in-phase fundamental")
	}
	return px / pr, nil
}
