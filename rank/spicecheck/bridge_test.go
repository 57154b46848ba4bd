package spicecheck

import (
	"context"
	"os"
	"path/filepath"
	"testing"
	"time"
)

const bridgeConfigPath = "../../testdata/spicecheck/halfbridge.toml"

// TestHalfBridge compares swrank's synchronous buck with ngspice
// simulations of the same stage (reference tool: ngspice 39, the Debian
// package, VDMOS model with body-diode transit time): both switches, a
// driver each, a dead time per edge, the body diodes' conduction and
// reverse recovery. The parts are characterised by simulation the way
// datasheets are made; swrank sees only that datasheet.
func TestHalfBridge(t *testing.T) {
	r := needNgspice(t)
	if testing.Short() {
		t.Skip("skipping the half-bridge cross-check in -short mode")
	}
	cfg, err := LoadBridgeConfig(bridgeConfigPath)
	if err != nil {
		t.Fatal(err)
	}
	out := outDir(t)
	ctx, cancel := context.WithTimeout(context.Background(), 10*time.Minute)
	defer cancel()
	for _, set := range []string{"development", "held-out"} {
		models := cfg.Dev
		if set == "held-out" {
			if os.Getenv("SWRANK_BRIDGE_DEV_ONLY") == "1" {
				continue
			}
			models = cfg.Held
		}
		s, err := RunBridge(ctx, r, cfg, set, models, SuiteOptions{Workers: 2, OutDir: out})
		if err != nil {
			t.Fatal(err)
		}
		sum := s.Summarise(cfg)
		rep := filepath.Join(out, "bridge-"+set, "report.txt")
		if err := writeAtomic(rep, []byte(sum.Text()+"\n"+s.Table())); err != nil {
			t.Fatal(err)
		}
		t.Logf("%s (%v)\n%s", rep, s.Elapsed.Round(time.Millisecond), sum.Text())
		t.Run(set, func(t *testing.T) { checkBridge(t, &sum, set == "held-out") })
	}
}

// checkBridge holds a set to the criteria of the synchronous buck (the
// reference is the ngspice simulation; where they fail, the models are to
// be improved, not the numbers here): the whole stage within 8 % median
// and 20 % worst, the dead time's diode energy within 20 % median, the
// recovery within 25 % median; at every point Kendall τ ≥ 0.9 and the same
// best part; no part set aside for cross-conduction or false turn-on whose
// waveform switches cleanly, none passed that shoots through. The held-out
// set must compare at least three parts at every point.
func checkBridge(t *testing.T, sum *BridgeSummary, heldOut bool) {
	for _, c := range []struct {
		comp          string
		median, worst float64
	}{{CompTotal, 0.08, 0.20}, {BridgeDiode, 0.20, 0}, {BridgeRecovery, 0.25, 0}} {
		st := sum.Stats[c.comp]
		if st.N == 0 || st.Median > c.median || c.worst > 0 && st.Worst > c.worst {
			t.Errorf("%s: median |error| %s (limit %.0f%%), worst %s at %s over %d rows", c.comp,
				pct(st.Median), 100*c.median, pct(st.WorstSigned), st.WorstAt, st.N)
		}
	}
	for _, p := range sum.Points {
		if heldOut && p.Parts < 3 {
			t.Errorf("%s: %d parts compared, want ≥ 3", p.Point, p.Parts)
		}
		if p.Parts > 1 && p.Tau < 0.9 {
			t.Errorf("%s: Kendall τ %.3f < 0.9", p.Point, p.Tau)
		}
		if p.Parts > 0 && p.BestPred != p.BestSim {
			t.Errorf("%s: swrank ranks %s first, the simulation %s", p.Point, p.BestPred, p.BestSim)
		}
	}
	for _, w := range sum.Wrong {
		t.Errorf("screen contradicted: %s", w)
	}
}
