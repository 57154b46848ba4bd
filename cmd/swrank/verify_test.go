package main

import (
	"bytes"
	"math"
	"os"
	"os/exec"
	"path/filepath"
	"regexp"
	"strings"
	"testing"

	"swrank/devices"
)

// needNgspice skips without ngspice unless SWRANK_REQUIRE_NGSPICE=1.
func needNgspice(t *testing.T) {
	t.Helper()
	if testing.Short() {
		t.Skip("-short: no ngspice runs")
	}
	if _, err := exec.LookPath("ngspice"); err != nil {
		if os.Getenv("SWRANK_REQUIRE_NGSPICE") == "1" {
			t.Fatalf("ngspice is required (SWRANK_REQUIRE_NGSPICE=1) but not found: %v", err)
		}
		t.Skip("ngspice not found (apt-get install ngspice on Debian)")
	}
}

// custom is the hard-switched cell of the round trip: 20 V, 8 A, 200 kHz,
// 10 V drive (invented point, inside the cross-check's range).
// custom is the verify tests' stage. The junction is pinned at 25 °C, where
// the benches simulate: rows characterised from a model carry no thermal
// path, which swrank would otherwise take at tj_max (unknown is not zero).
var custom = []string{"--topology", "custom", "--vblock", "20", "--ion", "8", "--ioff", "8", "--irms", "5", "--fsw", "200k", "--vdrive", "10", "--tj", "25"}

// characterise → rank → verify on the invented demo cards: every share
// of the verified parts agrees with the prediction within the margins that
// docs/spice-crosscheck.md reports (no share flagged), and appending the
// same part twice is refused without touching the library.
func TestVerifyRoundTrip(t *testing.T) {
	needNgspice(t)
	dir := t.TempDir()
	lib := filepath.Join(dir, "lib.csv")
	cards := []struct{ name, vds, id, itest string }{
		{"slate-30-lo", "30", "100", "50"}, {"basalt-40", "40", "80", "40"}, {"granite-80", "80", "60", "15"},
	}
	for _, c := range cards {
		b, err := os.ReadFile(filepath.Join("..", "..", "devices", "demomodels", c.name+".lib"))
		if err != nil {
			t.Fatal(err)
		}
		model := filepath.Join(dir, c.name+".lib")
		if err := os.WriteFile(model, b, 0o644); err != nil {
			t.Fatal(err)
		}
		var out, errb bytes.Buffer
		if code := run([]string{"characterise", model, "--vds-max", c.vds, "--id-max", c.id, "--i-test", c.itest, "--append", lib}, &out, &errb); code != 0 {
			t.Fatalf("characterise %s: %d %s", c.name, code, errb.String())
		}
	}
	before, _ := os.ReadFile(lib)
	var out, errb bytes.Buffer
	if code := run([]string{"characterise", filepath.Join(dir, "basalt-40.lib"), "--vds-max", "40", "--id-max", "80", "--append", lib}, &out, &errb); code == 0 ||
		!strings.Contains(errb.String(), "basalt-40: duplicate part name") {
		t.Errorf("a second basalt-40 row: code %d, %q", code, errb.String())
	}
	if after, _ := os.ReadFile(lib); !bytes.Equal(before, after) {
		t.Error("a refused append changed the library")
	}
	l, err := devices.Load(lib)
	if err != nil || len(l.Parts) != 3 || !strings.Contains(l.Parts[0].Notes, "characterised from the model") {
		t.Fatalf("library: %v, %+v", err, l)
	}
	// The second temperature and the second capacitance point (the
	// datasheet's hot column and C–V curve): the on-resistance rises and
	// the diode drop falls with temperature (common practice); the
	// threshold falls 4 mV/K on slate-30-lo's card (tcvth), while the other
	// cards have no threshold coefficient, so their hot threshold, which
	// would not fall, stays blank; Crss and Coss are larger at a tenth of
	// the rating than at half of it (a depleting junction, Sze & Ng 2007
	// ch. 2).
	for _, p := range l.Parts {
		hasTC := p.Name == "slate-30-lo"
		if hasTC && !(p.VgsThHot.OK && math.Abs(float64(p.VgsTh-p.VgsThHot.V)-0.4) < 0.05) {
			t.Errorf("%s: threshold %v → %v at 125 °C, want 0.4 V lower", p.Name, p.VgsTh, p.VgsThHot)
		}
		if !p.RdsHot.OK || p.RdsHotTj.V != 125 || !(p.RdsHot.V > p.RdsOn) || p.VgsThHot.OK != hasTC ||
			!p.VsdHot.OK || !(p.VsdHot.V < p.Vsd.V) || p.VsdHotTj.V != 125 {
			t.Errorf("%s: hot rds %v at %v, vth %v, vsd %v (cold %v)", p.Name, p.RdsHot, p.RdsHotTj, p.VgsThHot, p.VsdHot, p.Vsd)
		}
		if !p.Cap2Vds.OK || p.Cap2Vds.V != p.VdsMax/10 || !(p.Crss2.V > p.Crss.V) || !(p.Coss2.V > p.Coss.V) {
			t.Errorf("%s: second point %v: crss2 %v (crss %v), coss2 %v (coss %v)", p.Name, p.Cap2Vds, p.Crss2, p.Crss, p.Coss2, p.Coss)
		}
		for _, c := range []string{p.CossCurve, p.CrssCurve} {
			pts, err := devices.ParseCVCurve(c)
			if err != nil || len(pts) != 8 || pts[7].V != p.VdsMax {
				t.Errorf("%s: curve %q: %v", p.Name, c, err)
				continue
			}
			for i := 1; i < len(pts); i++ {
				if !(pts[i].C < pts[i-1].C) {
					t.Errorf("%s: curve %q rises at %v", p.Name, c, pts[i].V)
				}
			}
		}
	}
	out.Reset()
	errb.Reset()
	args := append([]string{"verify", "--parts", lib, "--no-cache", "--format", "csv"}, custom...)
	if code := run(args, &out, &errb); code != 0 {
		t.Fatalf("verify: %d %s", code, errb.String())
	}
	rows := strings.Split(strings.TrimSpace(out.String()), "\n")
	if len(rows) != 1+3*5 {
		t.Fatalf("%d CSV rows:\n%s", len(rows), out.String())
	}
	for _, r := range rows[1:] {
		if !strings.Contains(r, ",false,") { // flagged: false
			t.Errorf("share outside its margin: %s", r)
		}
	}
}

// Each way verify and characterise can fail gives its own message, and
// nothing on stdout or in the library file.
func TestVerifyErrors(t *testing.T) {
	needNgspice(t)
	dir := t.TempDir()
	vd := filepath.Join("..", "..", "testdata", "verify")
	kept := regexp.MustCompile(`deck kept in (\S+?)\)`)
	cases := []struct {
		name string
		args []string
		code int
		want string // in stderr, or in stdout for a part that failed
	}{
		{"missing ngspice", append([]string{"verify", "--demo", "--ngspice", filepath.Join(dir, "no-ngspice")}, custom...), 1,
			"apt-get install ngspice"},
		{"characterise without ngspice", []string{"characterise", filepath.Join(vd, "stall.lib"), "--vds-max", "30", "--id-max", "10",
			"--ngspice", filepath.Join(dir, "no-ngspice"), "--append", filepath.Join(dir, "new.csv")}, 1, "apt-get install ngspice"},
		{"no convergence", append([]string{"verify", "--parts", filepath.Join(vd, "stall.csv"), "--no-cache"}, custom...), 1,
			"stall: simulation failed: hard-switched cell of stall: ngspice reported:"},
		{"missing model file", append([]string{"verify", "--parts", filepath.Join(vd, "missing.csv")}, custom...), 1,
			"missing: model file " + filepath.Join(vd, "no-such-model.lib") + ": no such file or directory"},
		{"wrong pin count", append([]string{"verify", "--parts", filepath.Join(vd, "pins.csv")}, custom...), 1,
			"fourpin.lib:4: subcircuit fourpin has 4 pins (d g s k) but spice_pins lists 3 (d g s)"},
		{"characterise a missing file", []string{"characterise", filepath.Join(dir, "none.lib"), "--vds-max", "30", "--id-max", "10",
			"--append", filepath.Join(dir, "new.csv")}, 1, "none.lib: no such file or directory"},
		{"characterise wrong pins", []string{"characterise", filepath.Join(vd, "fourpin.lib"), "--subckt", "fourpin", "--pins", "d g s",
			"--vds-max", "30", "--id-max", "10", "--append", filepath.Join(dir, "new.csv")}, 1, "has 4 pins (d g s k) but spice_pins lists 3"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			var out, errb bytes.Buffer
			code := run(c.args, &out, &errb)
			if code != c.code {
				t.Errorf("exit %d, want %d; stderr %q", code, c.code, errb.String())
			}
			if m := kept.FindStringSubmatch(out.String()); m != nil {
				os.RemoveAll(m[1])
			}
			if c.name == "no convergence" {
				if !strings.Contains(out.String(), c.want) || !strings.Contains(out.String(), "deck kept in") {
					t.Errorf("stdout lacks %q and the kept deck:\n%s", c.want, out.String())
				}
				return
			}
			if !strings.Contains(errb.String(), c.want) {
				t.Errorf("stderr %q lacks %q", errb.String(), c.want)
			}
			if out.Len() != 0 {
				t.Errorf("partial output: %q", out.String())
			}
			if _, err := os.Stat(filepath.Join(dir, "new.csv")); err == nil {
				t.Error("a failed characterise left a library file")
			}
		})
	}
}
