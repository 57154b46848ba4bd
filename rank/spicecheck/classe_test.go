package spicecheck

import (
	"context"
	"math"
	"path/filepath"
	"testing"
	"time"

	"swrank/devices"
	q "swrank/devices/quantity"
	"swrank/rank/evaluate"
	"swrank/rank/fit"
	"swrank/rank/resonant"
	"swrank/rank/spice"
	"swrank/rank/stage"
)

// Tolerances of the class E check (docs/spice-crosscheck.md): "a few per
// cent" is 3 % on the peak switch voltage and on the output power; the
// stage's whole loss (switch and driver) is held to the main suite's 20 %
// on totals.
const (
	classETolVPeak = 0.03
	classETolPo    = 0.03
	classETolLoss  = 0.20
	// classETolGap and classETolGapVOn hold the loss and the voltage at
	// turn-on (of the supply) of a case with a named gap (ClassECase.Gap);
	// the voltage's usual limit is 10 % of the supply.
	classETolGap    = 0.50
	classETolVOn    = 0.10
	classETolGapVOn = 0.20
	// classETolShare holds the channel's conducting share, of the period:
	// 6 ns at 6.78 MHz (the waveform's share counts from 2 % of the
	// channel's peak current, a threshold of its own).
	classETolShare = 0.04
)

// TestClassEVDMOS simulates class E stages with one of the suite's VDMOS
// devices as the switch (reference tool: ngspice 39) and compares the peak
// switch voltage with swrank's Result.RF.VPeak, the output power with the
// design's P_o and the stage's loss with swrank's. The tank is simulated
// twice: with the series capacitor of swrank's design (stage.Point.RF.E.C2,
// sized for a linear shunt), and with the excess reactance that
// rank/resonant's ClassEShunt finds for the device's nonlinear Coss.
func TestClassEVDMOS(t *testing.T) {
	r := needNgspice(t)
	if testing.Short() {
		t.Skip("skipping the ngspice class E check in -short mode")
	}
	cfg, err := LoadConfig(configPath)
	if err != nil {
		t.Fatal(err)
	}
	if len(cfg.ClassE) == 0 {
		t.Fatal("no class_e case in the config")
	}
	ctx, cancel := context.WithTimeout(context.Background(), 2*time.Minute)
	defer cancel()
	dir := t.TempDir()

	type run struct {
		c     *ClassECase
		tank  string // "design C2" or "shunt X"
		pt    stage.Point
		res   evaluate.Result
		parts spice.ClassEParts
		sim   *spice.ClassEMeasured
	}
	var runs []*run
	for i := range cfg.ClassE {
		c := &cfg.ClassE[i]
		m := cfg.model(c.Device)
		// The device's datasheet, characterised and read back from a
		// parts CSV, as in the main suite.
		ds, err := spice.Characterise(ctx, r, m)
		if err != nil {
			t.Fatal(err)
		}
		lib := filepath.Join(dir, c.Name+".csv")
		if err := WriteParts(lib, []devices.Part{ds.Part(m)}); err != nil {
			t.Fatal(err)
		}
		parts, err := devices.Load(lib)
		if err != nil {
			t.Fatal(err)
		}
		st := ClassEStage(c)
		pt, err := st.Resolve()
		if err != nil {
			t.Fatalf("%s: %v", c.Name, err)
		}
		dev, err := fit.Prepare(&parts.Parts[0])
		if err != nil {
			t.Fatalf("%s: %v", c.Name, err)
		}
		res := evaluate.Evaluate(&pt, &dev, nil, nil)
		res.Dev = nil
		for k := range res.Devices {
			res.Devices[k].Dev = nil
		}
		if res.Screened() {
			t.Fatalf("%s: swrank screens %s out (%s); the case must suit the part", c.Name, c.Device, screenNames(res.Screens))
		}
		sh, err := resonant.ClassEShunt(pt.RF.E, dev.Oss.Q)
		if err != nil {
			t.Fatalf("%s: %v", c.Name, err)
		}
		design := ClassEPartsFor(c, &pt, &res)
		shunt := design
		shunt.C2 = spice.SeriesCapacitor(c.Fsw, design.L, float64(sh.X))
		t.Logf("%s (%s): R %.3f Ω, L %s, C2 %s (design, X %.3f Ω) or %s (shunt X %.3f Ω), C1 %s = device %s + external %s",
			c.Name, c.Device, design.R, pt.RF.E.L, pt.RF.E.C2, float64(pt.RF.E.X), q.Format(q.Capacitance(shunt.C2), 3), float64(sh.X),
			res.RF.CRequired, res.RF.CDevice, res.RF.CExternal)
		runs = append(runs, &run{c: c, tank: "design C2", pt: pt, res: res, parts: design},
			&run{c: c, tank: "shunt X", pt: pt, res: res, parts: shunt})
		if c.Timed && res.RF.DriveZVS > 0 {
			// The tank tuned for the part's own Coss, driven at the duty
			// swrank hands over for zero-voltage turn-on.
			zvs := shunt
			zvs.Duty = float64(res.RF.DriveZVS)
			runs = append(runs, &run{c: c, tank: "ZVS drive", pt: pt, res: res, parts: zvs})
		}
	}
	start := time.Now()
	err = parallel(ctx, len(runs), 2, func(ctx context.Context, i int) error {
		sim, err := spice.SimulateClassE(ctx, r, cfg.model(runs[i].c.Device), &runs[i].parts)
		runs[i].sim = sim
		return err
	})
	if err != nil {
		t.Fatal(err)
	}
	t.Logf("%d class E simulations of %d periods in %v", len(runs), runs[0].parts.Cycles, time.Since(start).Round(time.Millisecond))

	for _, u := range runs {
		t.Run(u.c.Name+"/"+u.tank, func(t *testing.T) {
			s, x, rf := u.sim, &u.parts, &u.res.RF
			// The simulated driver is an ideal source: a real driver's
			// ramping output stage (GateEdge) has no place in it.
			loss := float64(u.res.Losses.Total() - u.res.Devices[0].GateEdge)
			simLoss := s.PSwitch + s.PDrv
			if u.tank == "ZVS drive" {
				// The drive swrank hands over: the drain at zero when the
				// channel turns on (within classETolVOn of the supply) and
				// the loss swrank gives for it.
				zl := float64(rf.TotalZVS - u.res.Devices[0].GateEdge)
				t.Logf("drive %.4f: drain at %.3f V when the channel starts (at 50 %%: swrank %.3f V); loss simulated %.1f mW, swrank %.1f mW (%s), at 50 %% swrank %.1f mW",
					x.Duty, s.VChannelOn, float64(rf.VResidual), 1e3*simLoss, 1e3*zl, pct(RelErr(zl, simLoss)), 1e3*loss)
				tolV, tol := classETolVOn, classETolLoss
				if u.c.Gap != "" {
					tolV, tol = classETolGapVOn, classETolGap
				}
				if s.VChannelOn > tolV*x.Vdd {
					t.Errorf("drain at %.3f V when the channel turns on: the drive %.4f does not restore zero-voltage turn-on", s.VChannelOn, x.Duty)
				}
				if e := RelErr(zl, simLoss); math.Abs(e) > tol {
					t.Errorf("loss at the ZVS drive: swrank %.1f mW, simulated %.1f mW (%s, beyond ±%.0f%%)", 1e3*zl, 1e3*simLoss, pct(e), 100*tol)
				}
				return
			}
			t.Logf("V_peak simulated %.3f V, swrank %.3f V (%s; linear shunt %.3f V); P_o simulated %.4f W, design %.4f W (%s); "+
				"loss simulated %.1f mW, swrank %.1f mW (%s); mean v %.4f V; v at turn-on %.3f V; I_dc %.4f A (design %.4f A)",
				s.VPeak, float64(rf.VPeak), pct(RelErr(float64(rf.VPeak), s.VPeak)), float64(u.pt.RF.E.VPeak),
				s.Po, x.Po, pct(RelErr(x.Po, s.Po)), 1e3*simLoss, 1e3*loss, pct(RelErr(loss, simLoss)),
				s.VMean, s.VOn, s.IDC, x.IDC)
			// Steady state: the feed choke carries no DC voltage, and the
			// output power no longer moves from one period to the next.
			if math.Abs(s.VMean-x.Vdd) > 0.005*x.Vdd {
				t.Errorf("mean drain voltage %.4f V, not within 0.5 %% of the supply %.4g V: not in steady state", s.VMean, x.Vdd)
			}
			if math.Abs(s.Po-s.PoPrev) > 1e-3*s.Po {
				t.Errorf("output power still moving: %.5f W, the period before %.5f W", s.Po, s.PoPrev)
			}
			// A switch whose channel conducts well past half the period
			// does not run the nominal design: its peak voltage and output
			// power are not the design's (reported, not held).
			nominal := math.Abs(float64(rf.OnShare)-0.5) <= 0.05
			if e := RelErr(float64(rf.VPeak), s.VPeak); nominal && math.Abs(e) > classETolVPeak {
				t.Errorf("peak switch voltage: swrank %.3f V, simulated %.3f V (%s, beyond ±%.0f%%)", float64(rf.VPeak), s.VPeak, pct(e), 100*classETolVPeak)
			}
			if e := RelErr(x.Po, s.Po); nominal && math.Abs(e) > classETolPo {
				t.Errorf("output power: design %.4f W, simulated %.4f W (%s, beyond ±%.0f%%)", x.Po, s.Po, pct(e), 100*classETolPo)
			}
			tol := classETolLoss
			if u.c.Gap != "" {
				tol = classETolGap
				t.Logf("known gap, loss held to ±%.0f%% and the voltage at turn-on to %.0f%% of the supply: %s",
					100*tol, 100*classETolGapVOn, u.c.Gap)
			}
			if e := RelErr(loss, simLoss); math.Abs(e) > tol {
				t.Errorf("switch and driver loss: swrank %.1f mW, simulated %.1f mW (%s, beyond ±%.0f%%)", 1e3*loss, 1e3*simLoss, pct(e), 100*tol)
			}
			// The channel's timing: swrank's voltage at turn-on within 10 %
			// of the supply, its conducting share within classETolShare.
			l := &u.res.Devices[0].Losses
			t.Logf("channel on for %.3f of the period (swrank %.3f), drain at %.3f V when it starts (swrank %.3f V); "+
				"simulated switch %.1f mW, driver %.1f mW; swrank conduction %.1f, turn-off %.1f, turn-on %.1f, gate in part %.1f, driver %.1f mW, t_f %s",
				s.OnShare, float64(rf.OnShare), s.VChannelOn, float64(rf.VResidual), 1e3*s.PSwitch, 1e3*s.PDrv,
				1e3*float64(l.Conduction), 1e3*float64(l.TurnOff), 1e3*float64(l.TurnOn), 1e3*float64(l.GateRint), 1e3*float64(l.Driver()), rf.Tf)
			tolV := classETolVOn
			if u.c.Gap != "" {
				tolV = classETolGapVOn
			}
			if math.Abs(float64(rf.VResidual)-max(s.VChannelOn, 0)) > tolV*x.Vdd {
				t.Errorf("voltage at turn-on: swrank %.3f V, simulated %.3f V (beyond %.0f %% of the supply)", float64(rf.VResidual), s.VChannelOn, 100*tolV)
			}
			if math.Abs(float64(rf.OnShare)-s.OnShare) > classETolShare {
				t.Errorf("channel on for %.3f of the period, swrank %.3f", s.OnShare, float64(rf.OnShare))
			}
			// With the excess reactance for the device's own Coss and
			// gates fast against the period, the switch turns on at zero
			// voltage (within 2 % of the peak).
			if !u.c.Timed && u.tank == "shunt X" && math.Abs(s.VOn) > 0.02*s.VPeak {
				t.Errorf("drain voltage at turn-on %.3f V: not zero-voltage switching", s.VOn)
			}
		})
	}
}
