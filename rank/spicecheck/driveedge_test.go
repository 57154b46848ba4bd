package spicecheck

import (
	"context"
	"fmt"
	"strconv"
	"testing"
	"time"

	q "swrank/devices/quantity"
	"swrank/rank/internal/testkit"
	"swrank/rank/loss"
)

// TestDriveRampRC checks the driver-edge models (rank/loss: RampShare,
// GateDelayRamp, RampChargeTime) against the circuit they stand for,
// simulated (reference tool: ngspice 39, the Debian package): a driver
// whose voltage ramps 0 → 10 V in t_e behind 2 Ω into a 1 nF gate (the
// resistor's energy over the rise and the times to 50 % and 90 %), and
// into a gate held at a 4 V plateau (the time the plateau takes to
// receive 2 nC and 8 nC). τ/t_e spans 0.1 to 10.
func TestDriveRampRC(t *testing.T) {
	r := needNgspice(t)
	const v, res, c, vpl = 10.0, 2.0, 1e-9, 4.0
	tau := res * c
	for _, te := range []float64{0.2e-9, 2e-9, 20e-9} {
		t.Run(fmt.Sprintf("edge %g ns", te*1e9), func(t *testing.T) {
			ctx, cancel := context.WithTimeout(context.Background(), time.Minute)
			defer cancel()
			stop := te + 12*tau
			num := func(x float64) string { return strconv.FormatFloat(x, 'g', -1, 64) }
			deck := "* ramp-driven RC and plateau\n" +
				fmt.Sprintf("vs p 0 pwl(0 0 %s %s)\n", num(te), num(v)) +
				fmt.Sprintf("r1 p g %s\nc1 g 0 %s\n", num(res), num(c)) +
				fmt.Sprintf("r2 p h %s\nvpl h 0 dc %s\n", num(res), num(vpl)) +
				".options reltol=1e-6 abstol=1e-12 chgtol=1e-18\n" +
				".control\nset wr_singlescale\nset wr_vecnames\nset noaskquit\n" +
				fmt.Sprintf("tran %s %s 0 %s uic\n", num(stop/20000), num(stop), num(stop/20000)) +
				"wrdata rc.dat v(p) v(g) i(vpl)\nquit 0\n.endc\n.end\n"
			tabs, err := r.Run(ctx, "ramp-driven RC", deck, "rc.dat")
			if err != nil {
				t.Fatal(err)
			}
			tab := tabs["rc.dat"]
			cols, err := tab.Columns("v(p)", "v(g)", "i(vpl)")
			if err != nil {
				t.Fatal(err)
			}
			tm, vp, vg, ipl := tab.Cols[0], cols[0], cols[1], cols[2]
			var eR, qpl float64
			cross := map[float64]float64{}
			charged := map[float64]float64{}
			for k := 1; k < len(tm); k++ {
				dt := tm[k] - tm[k-1]
				p0 := (vp[k-1] - vg[k-1]) * (vp[k-1] - vg[k-1]) / res
				p1 := (vp[k] - vg[k]) * (vp[k] - vg[k]) / res
				eR += 0.5 * (p0 + p1) * dt
				for _, lv := range []float64{0.5 * v, 0.9 * v} {
					if _, ok := cross[lv]; !ok && vg[k-1] < lv && vg[k] >= lv {
						cross[lv] = tm[k-1] + dt*(lv-vg[k-1])/(vg[k]-vg[k-1])
					}
				}
				// i(vpl) flows into the source's + node: the plateau's
				// charge, from when the driver passes the plateau (before,
				// the bench's fixed source would give charge back, which
				// a gate still below its plateau does not).
				dq := 0.5 * (max(ipl[k-1], 0) + max(ipl[k], 0)) * dt
				for _, qq := range []float64{2e-9, 8e-9} {
					if _, ok := charged[qq]; !ok && qpl < qq && qpl+dq >= qq {
						charged[qq] = tm[k-1] + dt*(qq-qpl)/dq
					}
				}
				qpl += dq
			}
			// The resistor's energy, less what it still takes after the
			// run's end (e^(−24) of the step's: negligible).
			share := eR / (0.5 * c * v * v)
			ramp := loss.DriveRamp{From: 0, To: v, Edge: q.Time(te)}
			testkit.Within(t, "resistive share", loss.RampShare(q.Time(tau), q.Time(te)), share, 2e-3)
			for lv, ts := range cross {
				testkit.Within(t, fmt.Sprintf("delay to %g V", lv), float64(loss.GateDelayRamp(res, c, ramp, q.Voltage(lv))), ts, 2e-3)
			}
			for qq, ts := range charged {
				testkit.Within(t, fmt.Sprintf("plateau receives %g nC", qq*1e9), float64(loss.RampChargeTime(q.Charge(qq), res, 0, ramp, vpl, 0)), ts, 2e-3)
			}
			if len(cross) != 2 || len(charged) != 2 {
				t.Fatalf("levels crossed %v, charges reached %v: the run is too short", cross, charged)
			}
			t.Logf("t_e %g ns, τ %g ns: simulated share %.4f, model %.4f", te*1e9, tau*1e9, share, loss.RampShare(q.Time(tau), q.Time(te)))
		})
	}
}
