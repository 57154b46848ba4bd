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

// The gate-charge read-out on a piecewise-linear curve with known
// breakpoints (invented fixture): 0 → 2 V over 2 nC (threshold at 1.5 V,
// 1.5 nC), 2 → 3 V over 1 nC, a flat plateau at 3 V for 4 nC, then 1 V/nC
// to 10 V. Expected: Qg(th) 1.5 nC, Qgs 3 nC, Qgd 4 nC, Vpl 3 V, Qg 14 nC.
func TestExtractGateCharge(t *testing.T) {
	knots := [][2]float64{{0, 0}, {2e-9, 2}, {3e-9, 3}, {7e-9, 3}, {14e-9, 10}, {15e-9, 11}}
	var qs, vg []float64
	for k := 1; k < len(knots); k++ {
		a, b := knots[k-1], knots[k]
		for i := 0; i < 500; i++ {
			f := float64(i) / 500
			qs = append(qs, a[0]+f*(b[0]-a[0]))
			vg = append(vg, a[1]+f*(b[1]-a[1]))
		}
	}
	qs, vg = append(qs, 15e-9), append(vg, 11)
	ds := &Datasheet{Vth: 1.5, QgVgs: 10}
	if err := extractGateCharge(qs, vg, ds); err != nil {
		t.Fatal(err)
	}
	want := []struct {
		name      string
		got, want float64
	}{{"Qg(th)", ds.QgTh, 1.5e-9}, {"Qgs", ds.Qgs, 3e-9}, {"Qgd", ds.Qgd, 4e-9}, {"Vpl", ds.Vpl, 3}, {"Qg", ds.Qg, 14e-9}}
	for _, w := range want {
		if math.Abs(w.got-w.want) > 0.01*w.want {
			t.Errorf("%s = %g, want %g", w.name, w.got, w.want)
		}
	}
	if err := extractGateCharge([]float64{0, 1e-9, 2e-9}, []float64{0, 5, 10}, &Datasheet{Vth: 1.5, QgVgs: 10}); err == nil {
		t.Error("a curve without a plateau was accepted")
	}
}

func TestReadTable(t *testing.T) {
	dir := t.TempDir()
	cases := []struct {
		name, text string
		ok         bool
	}{
		{"good", " time v(d) @m1[id]\n 0 1.5 2e-3\n 1e-9 1.25 -3.5e+00\n", true},
		{"short row", "time v(d)\n0 1\n1\n", false},
		{"bad number", "time v(d)\n0 x\n", false},
		{"header only", "time v(d)\n", false},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			p := filepath.Join(dir, c.name+".dat")
			if err := os.WriteFile(p, []byte(c.text), 0o644); err != nil {
				t.Fatal(err)
			}
			tab, err := readTable(p)
			if (err == nil) != c.ok {
				t.Fatalf("err = %v, want ok=%v", err, c.ok)
			}
			if !c.ok {
				return
			}
			id, err := tab.Col("@m1[id]")
			if err != nil || tab.Len() != 2 || id[1] != -3.5 {
				t.Errorf("table %+v, column %v (%v)", tab, id, err)
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
	m := Model{Name: "sim-unit", VdsMax: 30, IdMax: 10, ITest: 5}
	m.defaults()
	ds := &Datasheet{RdsOn: 0.01, RdsOnVgs: 10, RdsOn2: 0.02, RdsOn2Vgs: 4.5, Vth: 1.5, Qg: 8e-9, QgVgs: 10,
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

// The series capacitor leaves the excess reactance asked for: the tank's
// reactance ωL − 1/(ωC₂) at f is X (Raab 1977, the series branch of class
// E). Invented values.
func TestSeriesCapacitor(t *testing.T) {
	for _, c := range []struct{ f, l, x float64 }{{2e6, 32e-6, 24}, {6.78e6, 4e-6, 9.5}, {1e6, 100e-6, 0}} {
		c2 := SeriesCapacitor(c.f, c.l, c.x)
		w := 2 * math.Pi * c.f
		if got := w*c.l - 1/(w*c2); math.Abs(got-c.x) > 1e-9*w*c.l {
			t.Errorf("f %g, L %g, X %g: C2 %g leaves X = %g", c.f, c.l, c.x, c2, got)
		}
	}
}

// measureClassE on a synthetic last period: a load current I·sin(ωt) into
// R gives P_o = I²·R/2, a drain voltage V·(1 − cos ωt) has mean V and peak
// 2V, and a constant supply current −i(vdd) = I_dc gives V_dd·I_dc
// (definitions of the mean and the rms value; invented numbers).
func TestMeasureClassE(t *testing.T) {
	const (
		f, vdd, idc, il, r, vm = 1e6, 12.0, 0.4, 0.7, 20.0, 12.0
		cycles, n              = 30, 4000
	)
	x := &ClassEParts{Vdd: vdd, F: f, R: r, Cycles: cycles}
	T := 1 / f
	tab := &Table{Names: []string{"time", "v(d)", "v(g)", "v(gx)", "v(p)", "i(vmd)", "i(vmg)", "i(vl)", "i(vdd)"}}
	tab.Cols = make([][]float64, len(tab.Names))
	for k := 0; k <= 2*n; k++ {
		tm := (cycles-2)*T + float64(k)*T/n
		w := 2 * math.Pi * f * tm
		row := []float64{tm, vm * (1 - math.Cos(w)), 0, 0, 0, 0, 0, il * math.Sin(w), -idc}
		for i, v := range row {
			tab.Cols[i] = append(tab.Cols[i], v)
		}
	}
	m, err := measureClassE(tab, x)
	if err != nil {
		t.Fatal(err)
	}
	for _, c := range []struct {
		name      string
		got, want float64
	}{
		{"P_o", m.Po, il * il * r / 2}, {"P_o before", m.PoPrev, il * il * r / 2}, {"mean v", m.VMean, vm},
		{"peak v", m.VPeak, 2 * vm}, {"supply", m.PSupply, vdd * idc}, {"I_dc", m.IDC, idc},
	} {
		if math.Abs(c.got-c.want) > 1e-5*math.Abs(c.want) {
			t.Errorf("%s = %.8g, want %.8g", c.name, c.got, c.want)
		}
	}
	short := &Table{Names: tab.Names, Cols: make([][]float64, len(tab.Names))}
	for i := range tab.Cols {
		short.Cols[i] = tab.Cols[i][:n/2]
	}
	if _, err := measureClassE(short, x); err == nil {
		t.Error("a table that stops before the last period was accepted")
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
