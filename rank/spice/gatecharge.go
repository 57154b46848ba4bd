package spice

import (
	"context"
	"fmt"
	"math"
	"strings"
)

// gateCharge: a constant current charges the gate while the drain carries
// QgId from a clamped inductive load (a current source with a clamp diode to
// QgVds). Qg(th) is the charge at Vth, the plateau voltage the gate voltage
// at the middle of the plateau, Qgs the charge where the rising tangent
// before the plateau meets the plateau level, Qgs + Qgd where the tangent
// after the plateau does, and Qg the charge at QgVgs (IEC 60747-8 gate-charge
// definitions; JESD24 constant-current method).
func gateCharge(ctx context.Context, r *Runner, m *Model, u *dut, ds *Datasheet) error {
	// Gate current: a few mA scaled with the part so that the test lasts a
	// few microseconds (it is slow against every time constant of the die).
	qmax := u.cin*(ds.QgVgs+2) + u.cgd*ds.QgVds
	ig := qmax / 5e-6
	tstop := qmax / ig
	ds.GateChargeIg, ds.GateChargeTime = ig, tstop
	var b strings.Builder
	b.WriteString("* gate charge\n")
	b.WriteString(u.card)
	b.WriteString(clampCard)
	b.WriteString(optionsLine)
	fmt.Fprintf(&b, "vdd dd 0 dc %s\nil dd d1 dc %s\ndcl d1 dd dclamp\n"+u.inst("1", "d1", "g1", "0"), num(ds.QgVds), num(m.ITest))
	fmt.Fprintf(&b, "ig 0 g1 pwl(0 0 %s %s)\nrleak g1 0 1e9\n", num(edge), num(ig))
	fmt.Fprintf(&b, ".control\n%stran %s %s 0 %s\nwrdata qg.dat v(g1) v(d1)\nquit 0\n.endc\n.end\n",
		deckPrologue, num(tstop/4000), num(tstop), num(tstop/4000))
	t, err := u.run(ctx, r, m.Name+" gate charge", b.String(), "qg.dat")
	if err != nil {
		return err
	}
	tab := t["qg.dat"]
	tm, vg := tab.Cols[0], mustCol(tab, "v(g1)")
	if vg == nil {
		return fmt.Errorf("missing v(g1) in %v", tab.Names)
	}
	qs := make([]float64, len(tm))
	for k := range tm {
		qs[k] = ig * math.Max(0, tm[k]-edge/2) // charge delivered (the 1 GΩ leak is negligible)
	}
	return extractGateCharge(qs, vg, ds)
}

// extractGateCharge reads Qg(th), Qgs, Qgd, Vpl, Qg and the second total
// Qg2 at Qg2Vgs off a gate-charge curve Vgs(Q) (Q increasing). Qg2 is the
// charge where the curve first reaches the first of secondGateVoltages
// that lies above the plateau with its charge past the plateau's end
// (Qgs + Qgd) and below Qg: a point of the curve's upper part, where
// swrank takes a second total (docs/models.md §3); none of them: Qg2 and
// Qg2Vgs 0 (the row leaves qg2 blank).
func extractGateCharge(qs, vg []float64, ds *Datasheet) error {
	n := len(qs)
	qAt := func(v float64) (float64, bool) { // first charge where Vgs reaches v
		for k := 1; k < n; k++ {
			if vg[k] >= v && vg[k-1] < v {
				return qs[k-1] + (qs[k]-qs[k-1])*(v-vg[k-1])/(vg[k]-vg[k-1]), true
			}
		}
		return 0, false
	}
	vAt := func(qq float64) float64 {
		for k := 1; k < n; k++ {
			if qs[k] >= qq {
				if qs[k] == qs[k-1] {
					return vg[k]
				}
				return vg[k-1] + (vg[k]-vg[k-1])*(qq-qs[k-1])/(qs[k]-qs[k-1])
			}
		}
		return vg[n-1]
	}
	qg, ok := qAt(ds.QgVgs)
	if !ok {
		return fmt.Errorf("gate voltage never reached %g V (max %.3g V)", ds.QgVgs, vg[n-1])
	}
	qth, ok := qAt(ds.Vth)
	if !ok {
		return fmt.Errorf("gate voltage never reached the threshold %g V", ds.Vth)
	}
	// Resample on a uniform charge grid and find the flattest stretch.
	const grid = 4000
	dq := qg / grid
	v := make([]float64, grid+1)
	for k := range v {
		v[k] = vAt(float64(k) * dq)
	}
	slope := func(k int) float64 { return (v[k+1] - v[k]) / dq }
	// Final (post-plateau) slope: the tangent over the last 5 % of Qg.
	k2 := grid - grid/20
	sPost := (v[grid] - v[k2]) / (float64(grid-k2) * dq)
	kmin, smin := -1, math.Inf(1)
	for k := int(qth / dq); k < k2; k++ {
		if s := slope(k); s < smin {
			kmin, smin = k, s
		}
	}
	if kmin < 0 || smin > 0.3*sPost {
		return fmt.Errorf("no Miller plateau found (flattest slope %.3g V/C against %.3g V/C after it)", smin, sPost)
	}
	// The plateau: the stretch around the flattest point where the slope
	// stays below a quarter of the post-plateau slope.
	lim := 0.25 * sPost
	a, z := kmin, kmin
	for a > 0 && slope(a-1) < lim {
		a--
	}
	for z < grid-1 && slope(z+1) < lim {
		z++
	}
	vpl := v[(a+z)/2]
	// Tangent after the plateau, extended back to the plateau level.
	qEnd := qg - (ds.QgVgs-vpl)/sPost
	// Tangent before the plateau, at 80 % of the way from threshold to the
	// plateau, extended forward to the plateau level.
	vPre := ds.Vth + 0.8*(vpl-ds.Vth)
	qp, ok := qAt(vPre)
	if !ok {
		return fmt.Errorf("no rise from threshold to plateau")
	}
	kp := int(qp / dq)
	sPre := slope(kp)
	qgs := qp + (vpl-vPre)/sPre
	if !(qth < qgs && qgs < qEnd && qEnd < qg) {
		return fmt.Errorf("gate-charge breakpoints out of order: Qg(th) %.4g, Qgs %.4g, plateau end %.4g, Qg %.4g",
			qth, qgs, qEnd, qg)
	}
	ds.Qg, ds.QgTh, ds.Qgs, ds.Qgd, ds.Vpl = qg, qth, qgs, qEnd-qgs, vpl
	ds.Qg2, ds.Qg2Vgs = 0, 0
	for _, v2 := range secondGateVoltages(ds.QgVgs) {
		if v2 <= vpl {
			continue
		}
		if q2, ok := qAt(v2); ok && q2 > qEnd && q2 < qg {
			ds.Qg2, ds.Qg2Vgs = q2, v2
			break
		}
	}
	ds.GateCurve = ds.GateCurve[:0]
	for k := 0; k <= grid; k += grid / 40 {
		ds.GateCurve = append(ds.GateCurve, [2]float64{float64(k) * dq, v[k]})
	}
	return nil
}

// secondGateVoltages are the candidate gate voltages of the second total
// gate charge for a test driven to vgs, in order of preference: 45 % of
// vgs rounded to 0.5 V (4.5 V at 10 V, the logic-level figure datasheets
// give beside the 10 V one; common practice), then upwards in 0.5 V steps
// below vgs.
func secondGateVoltages(vgs float64) []float64 {
	var vs []float64
	for v := math.Round(0.45*vgs*2) / 2; v < vgs; v += 0.5 {
		if v > 0 {
			vs = append(vs, v)
		}
	}
	return vs
}
