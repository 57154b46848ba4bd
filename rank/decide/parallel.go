package decide

import (
	"fmt"
	"math"
	"swrank/devices"
	q "swrank/devices/quantity"
	"swrank/rank/evaluate"
	"swrank/rank/fit"
	"swrank/rank/stage"
)

// MaxParallel is the largest number of paralleled devices ParallelPart
// accepts.
const MaxParallel = 64

// DefaultParallelMax is the largest count the choice of the best count
// tries when none is given: 1 to 4 devices in each place (common
// practice: more than four paralleled devices on one driver is rare, and
// their current sharing needs its own design).
const DefaultParallelMax = 4

// ParallelPart returns n copies of part p, on one gate driver and sharing
// their current equally, as one part: resistances divided by n
// (on-resistances, internal gate resistance, each device's own thermal
// resistance, package inductances), charges, capacitances, energies and
// current ratings and transconductance multiplied by n, voltages, times and temperatures
// unchanged. Test conditions stated per device move with it: the
// gate-charge, gfs, threshold, on-resistance, diode and switching-time
// test currents are multiplied by n
// and the switching-time test's gate resistances divided by n (n parts on
// a generator of R/n switch in the same time as one part on R). The price
// is n × price. The name becomes "NAME ×n". n = 1 returns a copy.
//
// Prepared, the part is the device with R/n, n·Q, n·C and Rg,int/n: the
// V·I overlap at the shared current then changes only through the edges
// the shared driver slows (its resistance and peak current feed n times
// the charge) and through each device's Miller plateau, which sits at its
// own share of the current, while conduction falls as 1/n and the gate
// and output-capacitance energies rise as n. Each device's own junction
// resistance carries 1/n of the loss; a case-to-ambient resistance given
// with the stage (a shared heatsink) carries all of it.
//
// Source: parallel connection of identical devices, n of them acting as
// one with R/n and n·Q (common practice; the balance of conduction against
// the n-proportional energies is common practice too); the switching-time
// scaling follows the
// gate-charge method (Balogh 2001): t = n·Q·R/n / ΔV.
func ParallelPart(p *devices.Part, n int) (devices.Part, error) {
	if n < 1 || n > MaxParallel {
		return devices.Part{}, fmt.Errorf("part %q: parallel count %d outside 1 to %d", p.Name, n, MaxParallel)
	}
	c := *p
	if n == 1 {
		return c, nil
	}
	k := float64(n)
	c.Name = fmt.Sprintf("%s ×%d", p.Name, n)
	if c.Price.OK {
		c.Price.V *= k
	}
	mul(&c.IdMax, k)
	mulOpt(&c.IdPulse, k)
	mulOpt(&c.RthJA, 1/k)
	mulOpt(&c.RthJC, 1/k)
	mul(&c.RdsOn, 1/k)
	mulOpt(&c.RdsOnId, k)
	mulOpt(&c.VgsThId, k)
	mulOpt(&c.RdsOnMax, 1/k)
	mulOpt(&c.RdsOn2, 1/k)
	mulOpt(&c.RdsHot, 1/k)
	mul(&c.Qg, k)
	mulOpt(&c.Qg2, k)
	mulOpt(&c.QgId, k)
	mulOpt(&c.QgMax, k)
	mulOpt(&c.Qgs, k)
	mulOpt(&c.Qgd, k)
	mulOpt(&c.QgTh, k)
	mulOpt(&c.Gfs, k)
	mulOpt(&c.GfsId, k)
	mulOpt(&c.RgInt, 1/k)
	mulOpt(&c.Ciss, k)
	mulOpt(&c.Coss, k)
	mulOpt(&c.Crss, k)
	mulOpt(&c.Coss2, k)
	mulOpt(&c.Crss2, k)
	var err error
	if c.CossCurve, err = devices.ScaleCVCurve(c.CossCurve, k); err != nil {
		return devices.Part{}, fmt.Errorf("part %q: coss_curve: %w", p.Name, err)
	}
	if c.CrssCurve, err = devices.ScaleCVCurve(c.CrssCurve, k); err != nil {
		return devices.Part{}, fmt.Errorf("part %q: crss_curve: %w", p.Name, err)
	}
	mulOpt(&c.Qoss, k)
	mulOpt(&c.Eoss, k)
	mulOpt(&c.EossLoss, k)
	mulOpt(&c.TswId, k)
	mulOpt(&c.TswRg, 1/k)
	mulOpt(&c.TswRgen, 1/k)
	mulOpt(&c.VsdIf, k)
	mulOpt(&c.Qrr, k)
	mulOpt(&c.QrrIf, k)
	mulOpt(&c.QrrDidt, k)
	mulOpt(&c.QrrHot, k)
	mulOpt(&c.Irrm, k)
	mulOpt(&c.Lcs, 1/k)
	mulOpt(&c.Lloop, 1/k)
	return c, nil
}

func mul[Q q.Quantity](v *Q, k float64) { *v = Q(float64(*v) * k) }

func mulOpt[Q q.Quantity](v *q.Opt[Q], k float64) {
	if v.OK {
		v.V = Q(float64(v.V) * k)
	}
}

// Parallel prepares n paralleled copies of d's part as one device (see
// ParallelPart). The derived part is allocated; d is not changed.
func Parallel(d *fit.Device, n int) (fit.Device, error) {
	if n == 1 {
		return *d, nil
	}
	p, err := ParallelPart(d.Part, n)
	if err != nil {
		return fit.Device{}, err
	}
	pp := new(devices.Part)
	*pp = p
	return fit.Prepare(pp)
}

// ParallelChoice is the outcome of bestParallel for one part.
type ParallelChoice struct {
	N       int             // the chosen number of devices in each place the part fills
	Dev     *fit.Device     // the paralleled device (the part itself when N = 1)
	Result  evaluate.Result // the evaluation with N devices
	Single  evaluate.Result // the evaluation with one device
	Totals  []q.Power       // total stage loss for 1..len(Totals) devices
	Passing []bool          // whether each count passes every screen
}

// bestParallel evaluates part d with 1 to maxN paralleled devices in each
// place it fills (a named partner is not paralleled) and picks the count
// with the least total stage loss among those that pass every screen, or
// the least loss overall when none passes. Ties go to the smaller count.
func bestParallel(pt *stage.Point, d, partner *fit.Device, maxN int) (ParallelChoice, error) {
	if maxN < 1 || maxN > MaxParallel {
		return ParallelChoice{}, fmt.Errorf("parallel limit %d outside 1 to %d", maxN, MaxParallel)
	}
	c := ParallelChoice{Totals: make([]q.Power, maxN), Passing: make([]bool, maxN)}
	best := -1
	bestPass := false
	for n := 1; n <= maxN; n++ {
		dn, err := Parallel(d, n)
		if err != nil {
			return ParallelChoice{}, err
		}
		dp := &dn
		if n == 1 {
			dp = d
		}
		r := evaluate.Evaluate(pt, dp, partner, nil)
		c.Totals[n-1], c.Passing[n-1] = r.Losses.Total(), !r.Screened()
		if n == 1 {
			c.Single = r
		}
		pass := !r.Screened()
		if best < 0 || pass && !bestPass || pass == bestPass && r.Losses.Total() < c.Totals[best-1] {
			best, bestPass = n, pass
			c.N, c.Dev, c.Result = n, dp, r
		}
	}
	return c, nil
}

// parallelOptimum is the count that minimises P(N) = A/N + N·B + P0, the
// loss of N paralleled devices whose conduction at one device is A and whose
// N-proportional (gate and output-capacitance) loss per device is B:
// N* = √(A/B), rounded to whichever neighbouring integer gives the lower
// P, and clamped to [1, limit]. With B ≤ 0 more devices always help
// (limit); with A ≤ 0 one is best.
//
// Source: minimising A/N + N·B (hand calculation: at the optimum
// conduction equals the N-proportional loss, common practice).
func parallelOptimum(a, b q.Power, limit int) int {
	if limit < 1 {
		limit = 1
	}
	if b <= 0 {
		return limit
	}
	if a <= 0 {
		return 1
	}
	x := math.Sqrt(float64(a) / float64(b))
	lo := max(1, min(limit, int(math.Floor(x))))
	hi := max(1, min(limit, lo+1))
	p := func(n int) float64 { return float64(a)/float64(n) + float64(n)*float64(b) }
	if p(hi) < p(lo) {
		return hi
	}
	return lo
}
