package spicecheck

import (
	"context"
	"errors"
	"math"
	"os"
	"path/filepath"
	"strings"
	"sync/atomic"
	"testing"

	"swrank/devices"
	"swrank/rank/spice"
)

// Kendall's τ_a = (C − D)/(n(n−1)/2) (Kendall, Biometrika 30, 1938). The
// third case is counted by hand from the definition: simulated totals
// 3, 4, 1, 2, 5 against predicted 1..5 give 6 concordant and 4 discordant
// pairs, τ = 0.2.
func TestKendallTau(t *testing.T) {
	mk := func(pred, sim []float64) []Row {
		rows := make([]Row, len(pred))
		for i := range pred {
			rows[i] = Row{Device: string(rune('a' + i)), Pred: map[string]float64{CompTotal: pred[i]},
				Sim: map[string]float64{CompTotal: sim[i]}}
		}
		return rows
	}
	cases := []struct {
		name       string
		pred, sim  []float64
		conc, disc int
		tau        float64
	}{
		{"same order", []float64{1, 2, 3, 4}, []float64{10, 20, 30, 40}, 6, 0, 1},
		{"reversed", []float64{1, 2, 3, 4}, []float64{4, 3, 2, 1}, 0, 6, -1},
		{"hand-counted", []float64{1, 2, 3, 4, 5}, []float64{3, 4, 1, 2, 5}, 6, 4, 0.2},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			rows := mk(c.pred, c.sim)
			conc, disc := Pairs(rows)
			if conc != c.conc || disc != c.disc {
				t.Fatalf("pairs %d/%d, want %d/%d", conc, disc, c.conc, c.disc)
			}
			if tau := KendallTau(conc, disc, len(rows)); math.Abs(tau-c.tau) > 1e-12 {
				t.Errorf("τ = %g, want %g", tau, c.tau)
			}
		})
	}
}

func TestParallel(t *testing.T) {
	var n atomic.Int64
	if err := parallel(context.Background(), 20, 2, func(_ context.Context, i int) error { n.Add(int64(i)); return nil }); err != nil {
		t.Fatal(err)
	}
	if n.Load() != 190 {
		t.Errorf("sum %d, want 190", n.Load())
	}
	boom := errors.New("boom")
	err := parallel(context.Background(), 20, 2, func(_ context.Context, i int) error {
		if i == 3 {
			return boom
		}
		return nil
	})
	if !errors.Is(err, boom) {
		t.Errorf("err = %v, want boom", err)
	}
}

func TestWritePartsAtomic(t *testing.T) {
	dir := t.TempDir()
	p := filepath.Join(dir, "parts.csv")
	if err := os.WriteFile(p, []byte("old"), 0o644); err != nil {
		t.Fatal(err)
	}
	m := spice.Model{Name: "sim-unit", VdsMax: 30, IdMax: 10, ITest: 5}
	m.SetDefaults()
	ds := &spice.Datasheet{RdsOn: 0.01, RdsOnVgs: 10, RdsOn2: 0.02, RdsOn2Vgs: 4.5, Vth: 1.5, Qg: 8e-9, QgVgs: 10,
		QgVds: 15, QgId: 5, Qgs: 2e-9, Qgd: 1e-9, QgTh: 1e-9, Vpl: 2.7, RgInt: 1, Ciss: 5e-10, Coss: 1e-10,
		Crss: 2e-11, CapVds: 15, Qoss: 2e-9, Eoss: 1.5e-8, OssVds: 15, Vsd: 0.8,
		Tr: 1e-9, Tf: 2e-9, TswVdd: 15, TswId: 5, TswVgs: 10, TswRg: 3, TswRgen: 1}
	if err := WriteParts(p, []devices.Part{ds.Part(&m)}); err != nil {
		t.Fatal(err)
	}
	lib, err := devices.Load(p)
	if err != nil {
		t.Fatal(err)
	}
	if len(lib.Parts) != 1 || lib.Parts[0].Name != "sim-unit" || float64(lib.Parts[0].RdsOn) != 0.01 ||
		float64(lib.Parts[0].Qgd.V) != 1e-9 || !lib.Parts[0].Eoss.OK {
		t.Errorf("read back %+v", lib.Parts)
	}
	left, _ := filepath.Glob(filepath.Join(dir, ".parts.csv.*"))
	if len(left) != 0 {
		t.Errorf("temporary files left: %v", left)
	}
}

// The parasitic and class E sections of the config are checked: each bad
// entry is refused with its name in the message.
func TestConfigChecks(t *testing.T) {
	base, err := os.ReadFile(configPath)
	if err != nil {
		t.Fatal(err)
	}
	dir := t.TempDir()
	cases := []struct {
		name, add, want string
	}{
		{"unknown device", "\n[[class_e]]\nname = \"x\"\ndevice = \"nope\"\nvdd = 12\npout = 4\nfsw = 2e6\nql = 20\nvon = 10\nrsource = 1\nrsink = 1\nfeed_ratio = 100\ncycles = 50\n", "unknown device"},
		{"low Q", "\n[[class_e]]\nname = \"x\"\ndevice = \"sim-fast-60\"\nvdd = 12\npout = 4\nfsw = 2e6\nql = 1.5\nvon = 10\nrsource = 1\nrsink = 1\nfeed_ratio = 100\ncycles = 50\n", "ql must be"},
		{"few cycles", "\n[[class_e]]\nname = \"x\"\ndevice = \"sim-fast-60\"\nvdd = 12\npout = 4\nfsw = 2e6\nql = 20\nvon = 10\nrsource = 1\nrsink = 1\nfeed_ratio = 100\ncycles = 5\n", "cycles must be"},
		{"empty variant", "\n[[parasitics.variant]]\nname = \"none\"\n", "adds no inductance"},
		{"negative inductance", "\n[[parasitics.variant]]\nname = \"neg\"\nlcs = -1e-9\n", "lcs must be ≥ 0"},
		{"damping alone", "\n[[parasitics.variant]]\nname = \"rd\"\nlcs = 1e-9\nrdamp = 10\n", "rdamp without lloop"},
		{"duplicate variant", "\n[[parasitics.variant]]\nname = \"lcs-1n\"\nlcs = 1e-9\n", "listed twice"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			p := filepath.Join(dir, strings.ReplaceAll(c.name, " ", "-")+".toml")
			if err := os.WriteFile(p, append(append([]byte(nil), base...), c.add...), 0o644); err != nil {
				t.Fatal(err)
			}
			_, err := LoadConfig(p)
			if err == nil || !strings.Contains(err.Error(), c.want) {
				t.Errorf("err = %v, want one containing %q", err, c.want)
			}
		})
	}
	if _, err := LoadConfig(configPath); err != nil {
		t.Errorf("the suite's own config: %v", err)
	}
}
