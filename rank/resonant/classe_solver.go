package resonant

import (
	"fmt"
	"math"

	"gonum.org/v1/gonum/mat"

	q "swrank/devices/quantity"
)

// SolveClassE finds the nominal class E design at loaded Q ql (ωL/R, L
// the whole series inductance) and DC-feed ratio feedRatio (ωL_f/R; 0
// means an ideal RF choke, i.e. a constant feed current) by solving the
// periodic steady state of the idealised circuit: ideal switch with 50 %
// duty, shunt capacitor C₁, series L–C₂ tank, load R. The circuit is
// piecewise linear; each half period is one matrix exponential of the
// state matrix augmented with the source (gonum mat.Dense.Exp), which
// gives the free and the forced response together. A Newton iteration
// with a numerical Jacobian adjusts ω·R·C₁ and the excess reactance X/R
// until the switch voltage and its slope are both zero at turn-on, with
// continuation from a high Q when the direct start fails.
//
// This is the analysis of Raab, "Idealized operation of the class E tuned
// power amplifier", IEEE Trans. Circuits and Systems, CAS-24(12), 1977,
// done numerically; the finite-choke case is the circuit of Kazimierczuk,
// RF Power Amplifiers, Wiley, 2008, ch. 4. ql below MinLoadedQ (1.7879,
// Raab 1977) is rejected.
func SolveClassE(ql, feedRatio q.Ratio) (ClassECoefficients, error) {
	Q, F := float64(ql), float64(feedRatio)
	if math.IsNaN(Q) || Q < MinLoadedQ {
		return ClassECoefficients{}, fmt.Errorf("class E loaded Q %g: %w: nominal operation at 50 %% duty needs QL ≥ %g (Raab 1977)", Q, ErrSpec, MinLoadedQ)
	}
	if math.IsInf(Q, 0) {
		return ClassECoefficients{}, fmt.Errorf("class E loaded Q: %w: the solver needs a finite QL; use IdealClassE for the limit", ErrSpec)
	}
	if math.IsNaN(F) || math.IsInf(F, 0) || F < 0 {
		return ClassECoefficients{}, fmt.Errorf("class E feed ratio %g: %w: must be 0 (ideal RF choke) or a finite number > 0", F, ErrSpec)
	}
	id := IdealClassE()
	guess := [2]float64{float64(id.KC), float64(id.KX)}
	p, err := newtonClassE(Q, F, guess)
	if err != nil {
		// Continuation: start where the ideal values are a good guess and
		// walk 1/Q (and 1/F) to the target.
		q0 := math.Max(Q, 50)
		p = guess
		const steps = 40
		for k := 1; k <= steps; k++ {
			t := float64(k) / steps
			qk := 1 / ((1-t)/q0 + t/Q)
			fk := 0.0
			if F > 0 {
				fk = 1 / (t / F)
			}
			if p, err = newtonClassE(qk, fk, p); err != nil {
				return ClassECoefficients{}, fmt.Errorf("class E at QL %g, feed ratio %g: no nominal solution found (continuation failed at QL %.4g): %w", Q, F, qk, err)
			}
		}
	}
	if p[0] <= 0 {
		return ClassECoefficients{}, fmt.Errorf("class E at QL %g, feed ratio %g: %w: the shunt capacitance would be %g/(ωR) ≤ 0", Q, F, ErrSpec, p[0])
	}
	if p[1] >= Q {
		return ClassECoefficients{}, fmt.Errorf("class E at QL %g, feed ratio %g: %w: the excess reactance %g·R reaches ωL, so the series capacitor would be infinite or negative", Q, F, ErrSpec, p[1])
	}
	c, err := classEWaveform(Q, F, p[0], p[1])
	if err != nil {
		return ClassECoefficients{}, fmt.Errorf("class E at QL %g, feed ratio %g: %w", Q, F, err)
	}
	return c, nil
}

// eCircuit is the normalised class E circuit (ω = 1, R = 1; I_DC = 1 for
// the RF-choke feed, V_DD = 1 for a finite choke) as augmented state
// matrices, one per switch state.
type eCircuit struct {
	finite   bool
	n        int // augmented size (last state is the constant 1)
	on, off  *mat.Dense
	periodic []int // indices of the periodic states
}

// State indices. The RF-choke circuit uses v1, iL, vC, w and the constant;
// the finite-choke circuit adds iF and u before the constant.
const (
	sV1 = iota // switch (shunt capacitor) voltage
	sIL        // series-branch current
	sVC        // series capacitor voltage divided by Q
	sW         // ∫v1 dθ (for the mean switch voltage)
	sIF        // feed-choke current (finite choke)
	sU         // ∫iF dθ (finite choke)
)

// newECircuit builds the matrices for loaded Q Q, feed ratio F (0: RF
// choke), ω·R·C₁ = B and excess reactance X/R.
func newECircuit(Q, F, B, X float64) eCircuit {
	c := eCircuit{finite: F > 0}
	if c.finite {
		c.n = 7
		c.periodic = []int{sV1, sIL, sVC, sIF}
	} else {
		c.n = 5
		c.periodic = []int{sV1, sIL, sVC}
	}
	one := c.n - 1
	build := func(closed bool) *mat.Dense {
		a := mat.NewDense(c.n, c.n, nil)
		// Series branch: Q·iL' = v1 − vC − iL; vC' = iL/C₂ with
		// 1/(ωRC₂) = Q − X. The state kept is s = vC/Q, so that every
		// entry stays of order one at high Q: iL' = (v1 − iL)/Q − s,
		// s' = (1 − X/Q)·iL.
		a.Set(sIL, sV1, 1/Q)
		a.Set(sIL, sVC, -1)
		a.Set(sIL, sIL, -1/Q)
		a.Set(sVC, sIL, 1-X/Q)
		a.Set(sW, sV1, 1)
		if c.finite {
			// F·iF' = 1 − v1; u' = iF.
			a.Set(sIF, one, 1/F)
			a.Set(sIF, sV1, -1/F)
			a.Set(sU, sIF, 1)
		}
		if !closed {
			// B·v1' = feed − iL.
			if c.finite {
				a.Set(sV1, sIF, 1/B)
			} else {
				a.Set(sV1, one, 1/B)
			}
			a.Set(sV1, sIL, -1/B)
		}
		return a
	}
	c.on, c.off = build(true), build(false)
	return c
}

// node returns the current into the switch node (feed minus series
// branch): the switch current when closed, B·v1' when open.
func (c eCircuit) node(z []float64) float64 {
	if c.finite {
		return z[sIF] - z[sIL]
	}
	return z[c.n-1] - z[sIL]
}

// halfPeriod returns the transition matrices over one half period, on
// and off.
func (c eCircuit) halfPeriod() (on, off *mat.Dense) {
	on, off = expScaled(c.on, math.Pi), expScaled(c.off, math.Pi)
	return on, off
}

// expScaled returns exp(a·t).
func expScaled(a *mat.Dense, t float64) *mat.Dense {
	var s, e mat.Dense
	s.Scale(t, a)
	e.Exp(&s)
	return &e
}

// steady returns the augmented state at turn-on (θ = 0, integrals reset,
// v1 = 0) of the periodic steady state, and the state just before the
// next turn-on (θ = 2π⁻).
func (c eCircuit) steady(on, off *mat.Dense) (z0, zEnd []float64, err error) {
	var m mat.Dense
	m.Mul(off, on)
	one := c.n - 1
	z0, err = periodicState(&m, c.periodic, c.n, one)
	if err != nil {
		return nil, nil, fmt.Errorf("periodic steady state: %w", err)
	}
	zEnd = make([]float64, c.n)
	for i := 0; i < c.n; i++ {
		var s float64
		for j := 0; j < c.n; j++ {
			s += m.At(i, j) * z0[j]
		}
		zEnd[i] = s
	}
	return z0, zEnd, nil
}

// scales returns V_DD and I_DC of the normalised steady state ending in
// zEnd (one full period).
func (c eCircuit) scales(zEnd []float64) (vdd, idc float64) {
	if c.finite {
		return 1, zEnd[sU] / (2 * math.Pi)
	}
	return zEnd[sW] / (2 * math.Pi), 1
}

// residual returns the switch voltage and the switch-node current just
// before turn-on, normalised to V_DD and I_DC: both are zero at the
// nominal design.
func classEResidual(Q, F float64, p [2]float64) ([2]float64, error) {
	c := newECircuit(Q, F, p[0], p[1])
	on, off := c.halfPeriod()
	_, zEnd, err := c.steady(on, off)
	if err != nil {
		return [2]float64{}, err
	}
	vdd, idc := c.scales(zEnd)
	if !(vdd > 0) || !(idc > 0) {
		return [2]float64{}, fmt.Errorf("steady state with V_DD %g, I_DC %g", vdd, idc)
	}
	r := [2]float64{zEnd[sV1] / vdd, c.node(zEnd) / idc}
	if math.IsNaN(r[0]) || math.IsNaN(r[1]) {
		return r, fmt.Errorf("residual is not a number at B %g, X %g", p[0], p[1])
	}
	return r, nil
}

// newtonClassE solves classEResidual = 0 for p = (ω·R·C₁, X/R) from
// guess, by damped Newton with a central-difference Jacobian.
func newtonClassE(Q, F float64, guess [2]float64) ([2]float64, error) {
	const (
		tol     = 1e-11 // converged
		loose   = 1e-7  // accepted when rounding stalls the iteration (high Q)
		maxIter = 50
	)
	p := guess
	r, err := classEResidual(Q, F, p)
	if err != nil {
		return p, err
	}
	norm := math.Hypot(r[0], r[1])
	for it := 0; it < maxIter; it++ {
		if norm < tol {
			return p, nil
		}
		var jac [2][2]float64
		for j := 0; j < 2; j++ {
			h := 1e-6 * math.Max(math.Abs(p[j]), 1e-2)
			pp, pm := p, p
			pp[j] += h
			pm[j] -= h
			rp, err := classEResidual(Q, F, pp)
			if err != nil {
				return p, err
			}
			rm, err := classEResidual(Q, F, pm)
			if err != nil {
				return p, err
			}
			for i := 0; i < 2; i++ {
				jac[i][j] = (rp[i] - rm[i]) / (2 * h)
			}
		}
		det := jac[0][0]*jac[1][1] - jac[0][1]*jac[1][0]
		if det == 0 || math.IsNaN(det) {
			return p, fmt.Errorf("singular Jacobian at B %g, X %g", p[0], p[1])
		}
		d := [2]float64{
			(jac[1][1]*r[0] - jac[0][1]*r[1]) / det,
			(-jac[1][0]*r[0] + jac[0][0]*r[1]) / det,
		}
		// Damping: halve the step until the residual falls and the shunt
		// capacitance stays positive. X may pass Q here (a negative series
		// capacitor is still a valid linear circuit); SolveClassE rejects
		// such a result.
		step := 1.0
		for {
			np := [2]float64{p[0] - step*d[0], p[1] - step*d[1]}
			if np[0] > 0 {
				nr, err := classEResidual(Q, F, np)
				if err == nil {
					if nn := math.Hypot(nr[0], nr[1]); nn < norm || nn < tol {
						p, r, norm = np, nr, nn
						break
					}
				}
			}
			step /= 2
			if step < 1e-6 {
				if norm < loose {
					return p, nil
				}
				return p, fmt.Errorf("Newton stalled at B %g, X %g (residual %g)", p[0], p[1], norm)
			}
		}
	}
	if norm < loose {
		return p, nil
	}
	return p, fmt.Errorf("Newton did not converge in %d steps (residual %g)", maxIter, norm)
}

// waveformSteps is the number of samples per half period used for peaks,
// rms values and the output power.
const waveformSteps = 512

// classEWaveform samples the steady state at the solved B, X and returns
// the normalised coefficients.
func classEWaveform(Q, F, B, X float64) (ClassECoefficients, error) {
	c := newECircuit(Q, F, B, X)
	on, off := c.halfPeriod()
	z0, zEnd, err := c.steady(on, off)
	if err != nil {
		return ClassECoefficients{}, err
	}
	vdd, idc := c.scales(zEnd)
	h := math.Pi / waveformSteps
	stepOn, stepOff := expScaled(c.on, h), expScaled(c.off, h)

	n := c.n
	z := mat.NewVecDense(n, append([]float64(nil), z0...))
	var next mat.VecDense
	isw := make([]float64, waveformSteps+1) // switch current, on interval
	vsw := make([]float64, waveformSteps+1) // switch voltage, off interval
	il := make([]float64, 2*waveformSteps+1)
	for k := 0; k <= waveformSteps; k++ {
		isw[k] = c.node(z.RawVector().Data)
		il[k] = z.AtVec(sIL)
		if k < waveformSteps {
			next.MulVec(stepOn, z)
			z.CopyVec(&next)
		}
	}
	zOff := append([]float64(nil), z.RawVector().Data...)
	for k := 0; k <= waveformSteps; k++ {
		vsw[k] = z.AtVec(sV1)
		il[waveformSteps+k] = z.AtVec(sIL)
		if k < waveformSteps {
			next.MulVec(stepOff, z)
			z.CopyVec(&next)
		}
	}

	// Output power R·<iL²> (R = 1) by Simpson's rule over the period.
	po := simpson(il, h, func(x float64) float64 { return x * x }) / (2 * math.Pi)
	irms := math.Sqrt(simpson(isw, h, func(x float64) float64 { return x * x }) / (2 * math.Pi))
	res := ClassECoefficients{
		QL:        q.Ratio(Q),
		FeedRatio: q.Ratio(F),
		KP:        q.Ratio(po / (vdd * vdd)),
		KC:        q.Ratio(B),
		KX:        q.Ratio(X),
		VPeak:     q.Ratio(peak(vsw) / vdd),
		IPeak:     q.Ratio(peak(isw) / idc),
		IOff:      q.Ratio(isw[waveformSteps] / idc),
		IRms:      q.Ratio(irms / idc),
	}
	if F == 0 {
		res.FeedRatio = q.Ratio(math.Inf(1))
	}
	// Taylor series of the node current after turn-off: the k-th
	// derivative is cᵀ·A_offᵏ·z(π).
	y := mat.NewVecDense(n, zOff)
	fact := 1.0
	for k := 0; k <= taylorDegree; k++ {
		if k > 0 {
			fact *= float64(k)
		}
		res.NodeTaylor[k] = c.node(y.RawVector().Data) / idc / fact
		next.MulVec(c.off, y)
		y.CopyVec(&next)
	}
	for _, v := range []float64{float64(res.KP), float64(res.VPeak), float64(res.IPeak), float64(res.IRms)} {
		if math.IsNaN(v) || math.IsInf(v, 0) || v <= 0 {
			return res, fmt.Errorf("steady state gave a non-positive or non-finite stress (%+v)", res)
		}
	}
	return res, nil
}

// simpson integrates g(y[k]) over samples spaced h (len(y)−1 even).
func simpson(y []float64, h float64, g func(float64) float64) float64 {
	n := len(y) - 1
	s := g(y[0]) + g(y[n])
	for k := 1; k < n; k++ {
		if k%2 == 1 {
			s += 4 * g(y[k])
		} else {
			s += 2 * g(y[k])
		}
	}
	return s * h / 3
}

// peak returns the largest sample, refined by a parabola through it and
// its neighbours when it is inside the record.
func peak(y []float64) float64 {
	k := 0
	for i := range y {
		if y[i] > y[k] {
			k = i
		}
	}
	if k == 0 || k == len(y)-1 {
		return y[k]
	}
	a, b, c := y[k-1], y[k], y[k+1]
	den := a - 2*b + c
	if den >= 0 {
		return b
	}
	return b - (a-c)*(a-c)/(8*den)
}

// periodicState solves for the state z that the one-period transition t
// maps onto itself, z = t·z, with the constant state `one` held at 1: the
// states listed in periodic except v1 (zero at turn-on, when the switch
// shorts the shunt) are unknowns, every other state is 0. n is the state
// dimension.
func periodicState(t mat.Matrix, periodic []int, n, one int) ([]float64, error) {
	var idx []int
	for _, i := range periodic {
		if i != sV1 {
			idx = append(idx, i)
		}
	}
	k := len(idx)
	a := mat.NewDense(k, k, nil)
	b := mat.NewVecDense(k, nil)
	for r, i := range idx {
		for s, j := range idx {
			v := -t.At(i, j)
			if r == s {
				v++
			}
			a.Set(r, s, v)
		}
		b.SetVec(r, t.At(i, one))
	}
	var x mat.VecDense
	if err := x.SolveVec(a, b); err != nil {
		return nil, err
	}
	z := make([]float64, n)
	z[one] = 1
	for r, i := range idx {
		z[i] = x.AtVec(r)
	}
	return z, nil
}
