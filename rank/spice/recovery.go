package spice

import (
	"context"
	"fmt"
	"math"
	"strings"
)

// Conditions of the reverse-recovery test.
const (
	// qrrDidt is the rate at which the diode current is ramped down, A/s
	// (100 A/µs; common datasheet practice).
	qrrDidt = 100e6
	// qrrSteps is the number of time steps in the sweep time of the output
	// charge, √(2·Q_oss/(di/dt)) (the time the ramp takes to carry Q_oss
	// past the zero crossing, the shortest event of the test): halving
	// the step moves Q_rr by less than 0.1 % (TestRecoveryChargeControl,
	// tt = 5 ns).
	qrrSteps = 400
	// qrrMaxRev bounds the reverse end of the ramp, in multiples of the
	// forward current: it starts at 2·I_F and doubles until the diode has
	// recovered before the ramp ends.
	qrrMaxRev = 32
	// qrrTrrLevel is the fraction of the peak reverse current at which
	// trr ends, past the peak (common datasheet practice).
	qrrTrrLevel = 0.25
	// qrrFloor is the resolution of the recovered charge, C: below the
	// larger of this and 1 % of Q_oss the measurement (a difference of
	// two charges) is written as 0. 10 pC is the smallest non-zero qrr
	// the library takes (devices/ranges.go).
	qrrFloor = 10e-12
)

// recovery: the body diode's reverse recovery. The diode carries the
// forward current QrrIf (gate shorted to source), which is ramped down
// at QrrDidt through zero into reverse; the drain is clamped at QrrVr
// (the voltage of the Q_oss test) by an ideal diode. The charge that
// flows backwards through the drain, from the current's zero crossing
// until the clamp has taken the current over, is the recovered charge
// (the time integral of the reverse current: common datasheet practice)
// plus what the diode's capacitances pass: Q_oss from 0 V to V_R, and the junction and
// gate-drain charge between the forward drop at the zero crossing and
// 0 V, which Q_oss (from 0 V) does not hold. Q_rr is that charge less
// the capacitances' share (the library's qrr_includes_coss = no):
//
//   - for a synthetic model, or a model file whose diode and VDMOS cards
//     all lie outside subcircuits, less the charge of a second run of
//     the same deck with those cards' transit time set to 0 (altermod
//     tt=0): exactly the stored charge's share, 0 without stored charge;
//   - otherwise (a card inside a subcircuit: its stored charge cannot be
//     taken out), less Q_oss (measured before) and the charge above V_R
//     (the drain settles a clamp drop above it: Coss(V_R)·(v_end − V_R),
//     Coss measured at the same voltage); the figure then holds the
//     junction's charge in forward bias too, as a datasheet's test does.
//
// Below the test's resolution, the larger of 10 pC and 1 % of Q_oss,
// Q_rr is written as 0. Irrm is the peak reverse current and trr the time
// from the zero crossing to where the reverse current, past its peak, has
// fallen to 25 % of Irrm (common datasheet practice).
func recovery(ctx context.Context, r *Runner, m *Model, u *dut, ds *Datasheet) error {
	return recoveryTest(ctx, r, m.Name, u, ds, m.ITest, qrrSteps)
}

// recoveryTest runs the recovery test at forward current iF with steps
// time steps per sweep time of the output charge (see qrrSteps) and
// fills the Qrr fields of ds. It needs ds.Qoss at ds.OssVds and ds.Coss
// at the same voltage.
func recoveryTest(ctx context.Context, r *Runner, name string, u *dut, ds *Datasheet, iF float64, steps int) error {
	ds.QrrIf, ds.QrrDidt, ds.QrrVr = iF, qrrDidt, ds.OssVds
	if !(ds.Qoss > 0) || !(ds.OssVds > 0) || !(iF > 0) || steps < 1 {
		return fmt.Errorf("needs Q_oss (%g C) at V_R %g V and a forward current (%g A) > 0", ds.Qoss, ds.OssVds, iF)
	}
	step := math.Sqrt(2*ds.Qoss/ds.QrrDidt) / float64(steps)
	outs := []string{"rr.dat"}
	if u.storeCards != nil {
		outs = append(outs, "rr0.dat")
	}
	for iRev := 2 * iF; ; iRev *= 2 {
		tRamp := (iF + iRev) / ds.QrrDidt
		t, err := u.run(ctx, r, name+" recovery", recoveryDeck(u, iF, iRev, ds.QrrDidt, ds.QrrVr, step), outs...)
		if err != nil {
			return err
		}
		read := func(out string) (recoveryWave, error) {
			tab := t[out]
			c, err := tab.Columns("v(d1)", "i(vid)")
			if err != nil {
				return recoveryWave{}, err
			}
			return measureRecovery(tab.Cols[0], c[0], c[1], ds.QrrVr)
		}
		w, err := read("rr.dat")
		if w.crossed && !(w.clamped < tRamp) {
			// The ramp ended before the diode recovered: the test would
			// not be at a constant di/dt. A longer ramp.
			if iRev >= qrrMaxRev*iF {
				return fmt.Errorf("the body diode had not recovered when the ramp reached %g A (%g × I_F)", -iRev, iRev/iF)
			}
			continue
		}
		if err != nil {
			return fmt.Errorf("ramp to %g A: %w", -iRev, err)
		}
		var qrr float64
		if u.storeCards != nil {
			w0, err := read("rr0.dat")
			if err != nil {
				return fmt.Errorf("reference run without stored charge, ramp to %g A: %w", -iRev, err)
			}
			qrr = w.qrev - w0.qrev
		} else {
			qrev := w.qrev
			if ds.CapVds == ds.QrrVr && w.vEnd > ds.QrrVr {
				qrev -= ds.Coss * (w.vEnd - ds.QrrVr)
			}
			qrr = qrev - ds.Qoss
		}
		if qrr < math.Max(qrrFloor, 0.01*ds.Qoss) {
			qrr = 0 // no stored charge the test can resolve: a measured none
		}
		ds.Qrr, ds.Irrm, ds.Trr = qrr, w.irrm, w.trr
		return nil
	}
}

// recoveryDeck is the netlist of the recovery test: a current source
// pulls iF out of the drain (the body diode forward, from the DC
// operating point), then ramps at −didt to −iRev and holds; the 0 V
// source vid measures the drain current (positive out of the drain);
// the clamp diode takes the current once the drain reaches vr. With
// u.storeCards, the transient runs a second time with those cards' tt
// set to 0 (ngspice manual, altermod), written to rr0.dat.
func recoveryDeck(u *dut, iF, iRev, didt, vr, step float64) string {
	tRamp := (iF + iRev) / didt
	var b strings.Builder
	b.WriteString("* body-diode reverse recovery\n")
	b.WriteString(u.card)
	b.WriteString(clampCard)
	b.WriteString(optionsLine)
	b.WriteString(u.inst("1", "d1", "0", "0"))
	fmt.Fprintf(&b, "vid d1 dx dc 0\nir dx 0 pwl(0 %s %s %s)\ndcl dx vr dclamp\nvr vr 0 dc %s\n",
		num(iF), num(tRamp), num(-iRev), num(vr))
	tran := fmt.Sprintf("tran %s %s 0 %s\n", num(step), num(1.05*tRamp), num(step))
	fmt.Fprintf(&b, ".control\n%s%swrdata rr.dat v(d1) i(vid)\n", deckPrologue, tran)
	if u.storeCards != nil {
		for _, c := range u.storeCards {
			fmt.Fprintf(&b, "altermod %s tt=0\n", c)
		}
		fmt.Fprintf(&b, "%swrdata rr0.dat v(d1) i(vid)\n", tran)
	}
	b.WriteString("quit 0\n.endc\n.end\n")
	return b.String()
}

// storeCards returns the diode and VDMOS cards of a model file that its
// device uses (the elements that store charge in a SPICE diode, tt): the
// card of a VDMOS card file; the cards a subcircuit's element lines name
// (ngspice drops the others, and altermod would not find them). It
// returns nil when there is none, or when one lies inside a subcircuit,
// where the simulator renames it and the recovery test could not take its
// stored charge out.
func storeCards(d *Device) []string {
	if !d.Subckt {
		return []string{d.Name}
	}
	var cards []string
	used := map[string]bool{}
	depth := 0
	for _, l := range logicalLines(d.Text) {
		f := strings.Fields(strings.ReplaceAll(l.text, "(", " ( "))
		switch {
		case len(f) == 0 || strings.HasPrefix(f[0], "*"):
		case strings.EqualFold(f[0], ".subckt"):
			depth++
		case strings.EqualFold(f[0], ".ends"):
			depth--
		case len(f) >= 3 && strings.EqualFold(f[0], ".model") && (strings.EqualFold(f[2], "d") || strings.EqualFold(f[2], "vdmos")):
			if depth > 0 {
				return nil
			}
			cards = append(cards, f[1])
		case !strings.HasPrefix(f[0], "."):
			for _, x := range f[1:] {
				used[strings.ToLower(x)] = true
			}
		}
	}
	var out []string
	for _, c := range cards {
		if used[strings.ToLower(c)] {
			out = append(out, c)
		}
	}
	return out
}

// recoveryWave is what the recovery test reads off its waveforms.
type recoveryWave struct {
	qrev    float64 // charge that flowed backwards through the drain from the zero crossing to the end, C
	irrm    float64 // peak reverse current, A
	trr     float64 // from the zero crossing to qrrTrrLevel·irrm past the peak, s
	clamped float64 // time the drain first reached 0.9·vr, s; +Inf when it never did
	crossed bool    // the drain current crossed zero
	vEnd    float64 // drain voltage at the end, V
}

// measureRecovery reads the recovered charge, the peak reverse current and
// trr off a recovery waveform: times tm (increasing), drain voltage vd and
// drain current id (positive out of the drain, the diode's forward
// direction). The waveform must start forward, cross zero, and end with
// the reverse current back under 1 % of its peak (the clamp has taken it).
func measureRecovery(tm, vd, id []float64, vr float64) (recoveryWave, error) {
	w := recoveryWave{clamped: math.Inf(1)}
	n := len(tm)
	if n < 3 || len(vd) != n || len(id) != n {
		return w, fmt.Errorf("recovery waveform of %d times, %d voltages, %d currents", n, len(vd), len(id))
	}
	k0 := -1
	for k := 1; k < n; k++ {
		if id[k-1] > 0 && id[k] <= 0 {
			k0 = k
			break
		}
	}
	if k0 < 0 {
		return w, fmt.Errorf("the drain current never crossed zero (from %g A to %g A)", id[0], id[n-1])
	}
	w.crossed = true
	t0 := tm[k0-1] + (tm[k0]-tm[k0-1])*id[k0-1]/(id[k0-1]-id[k0])
	// Trapezoids of the reverse current −id from the zero crossing on.
	prevT, prevI := t0, 0.0
	kp := k0
	for k := k0; k < n; k++ {
		ir := -id[k]
		w.qrev += 0.5 * (prevI + ir) * (tm[k] - prevT)
		prevT, prevI = tm[k], ir
		if ir > w.irrm {
			w.irrm, kp = ir, k
		}
	}
	for k := k0; k < n; k++ {
		if vd[k] >= 0.9*vr {
			w.clamped = tm[k]
			break
		}
	}
	w.vEnd = vd[n-1]
	if !(w.irrm > 0) || -id[n-1] > 0.01*w.irrm {
		return w, fmt.Errorf("the reverse current (peak %g A) did not return to zero (%g A at the end)", w.irrm, -id[n-1])
	}
	lvl := qrrTrrLevel * w.irrm
	for k := kp + 1; k < n; k++ {
		if -id[k] <= lvl {
			a, b := -id[k-1], -id[k]
			w.trr = tm[k-1] + (tm[k]-tm[k-1])*(a-lvl)/(a-b) - t0
			break
		}
	}
	if !(w.qrev > 0) || !(w.trr > 0) || math.IsInf(w.qrev, 0) || math.IsInf(w.trr, 0) || math.IsInf(w.irrm, 0) {
		return w, fmt.Errorf("recovered charge %g C, Irrm %g A, trr %g s: want finite and > 0", w.qrev, w.irrm, w.trr)
	}
	return w, nil
}
