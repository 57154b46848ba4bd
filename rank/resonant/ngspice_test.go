package resonant

// Checks against the reference simulator ngspice (Debian package ngspice).
// The tests skip with a message when ngspice is not installed, unless
// SWRANK_REQUIRE_NGSPICE=1 is set, in which case they fail.

import (
	"bufio"
	"context"
	"fmt"
	"math"
	"os"
	"os/exec"
	"path/filepath"
	"strconv"
	"strings"
	"testing"
	"time"

	q "swrank/devices/quantity"
)

// ngspiceTimeout bounds each simulator run.
const ngspiceTimeout = 60 * time.Second

func ngspicePath(t *testing.T) string {
	t.Helper()
	p, err := exec.LookPath("ngspice")
	if err != nil {
		if os.Getenv("SWRANK_REQUIRE_NGSPICE") == "1" {
			t.Fatalf("ngspice is required (SWRANK_REQUIRE_NGSPICE=1) but not found: %v", err)
		}
		t.Skip("ngspice not found; install the Debian package ngspice to run the simulator checks")
	}
	return p
}

// runNgspice simulates netlist in batch mode and returns the .meas results.
func runNgspice(t *testing.T, netlist string, want ...string) map[string]float64 {
	t.Helper()
	bin := ngspicePath(t)
	dir := t.TempDir()
	file := filepath.Join(dir, "check.cir")
	if err := os.WriteFile(file, []byte(netlist), 0o644); err != nil {
		t.Fatal(err)
	}
	ctx, cancel := context.WithTimeout(context.Background(), ngspiceTimeout)
	defer cancel()
	cmd := exec.CommandContext(ctx, bin, "-b", file)
	cmd.Dir = dir
	out, err := cmd.CombinedOutput()
	if ctx.Err() != nil {
		t.Fatalf("ngspice timed out after %s", ngspiceTimeout)
	}
	if err != nil {
		t.Fatalf("ngspice: %v\n%s", err, out)
	}
	res := map[string]float64{}
	sc := bufio.NewScanner(strings.NewReader(string(out)))
	for sc.Scan() {
		f := strings.Fields(sc.Text())
		if len(f) >= 3 && f[1] == "=" {
			if v, err := strconv.ParseFloat(f[2], 64); err == nil {
				res[strings.ToLower(f[0])] = v
			}
		}
	}
	for _, w := range want {
		if _, ok := res[w]; !ok {
			t.Fatalf("ngspice output has no measurement %q:\n%s", w, out)
		}
	}
	return res
}

// classENetlist is a class E stage with an ideal switch (voltage-controlled
// switch, 1 mΩ on), the design's C₁, L, C₂, R and either an ideal RF choke
// (a current source I_DC) or a finite choke from a V_DD source, run for
// cycles periods; measurements over the last one.
func classENetlist(d ClassE, cycles int, extra string) string {
	T := 1 / float64(d.F)
	var feed string
	if d.LFeed > 0 {
		feed = fmt.Sprintf("V1 vdd 0 DC %.10g\nLf vdd d %.10g IC=%.10g\n", float64(d.VDD), float64(d.LFeed), float64(d.IDC))
	} else {
		feed = fmt.Sprintf("I1 0 d DC %.10g\n", float64(d.IDC))
	}
	n := float64(cycles)
	return fmt.Sprintf(`* class E stage, ideal switch
%sVsw d s 0
S1 s 0 g 0 swm
Vg g 0 PULSE(0 1 0 1p 1p %.10g %.10g)
.model swm sw vt=0.5 vh=0 ron=1m roff=1e9
C1 d 0 %.10g
L1 d a %.10g
C2 a b %.10g
Vs b c 0
R1 c 0 %.10g
%s.options method=gear reltol=1e-6 abstol=1e-12 vntol=1e-9
.tran %.10g %.10g %.10g %.10g uic
.meas tran vpk MAX v(d) FROM=%.10g TO=%.10g
.meas tran vavg AVG v(d) FROM=%.10g TO=%.10g
.meas tran irms RMS i(Vs) FROM=%.10g TO=%.10g
.meas tran isw RMS i(Vsw) FROM=%.10g TO=%.10g
.meas tran von FIND v(d) AT=%.10g
.end
`, feed, T/2-1e-12, T, float64(d.C1), float64(d.L), float64(d.C2), float64(d.R), extra,
		T/4000, n*T, (n-2)*T, T/4000,
		(n-1)*T, n*T, (n-1)*T, n*T, (n-1)*T, n*T, (n-1)*T, n*T, (n-0.0005)*T)
}

// TestNgspiceClassE: the finite-Q solver's component values simulated by
// ngspice until steady state: peak switch voltage, output power, mean
// switch voltage (= V_DD), rms switch current and zero voltage at turn-on.
func TestNgspiceClassE(t *testing.T) {
	for _, tc := range []struct {
		name   string
		spec   ClassESpec
		cycles int
	}{
		{"QL 20, RF choke", ClassESpec{VDD: 12, F: 6.78e6, Po: 10, QL: 20}, 120},
		{"QL 3, RF choke", ClassESpec{VDD: 24, F: 1e6, Po: 50, QL: 3}, 60},
		{"QL 20, choke ωLf/R = 10", ClassESpec{VDD: 12, F: 6.78e6, Po: 10, QL: 20, FeedRatio: 10}, 120},
	} {
		t.Run(tc.name, func(t *testing.T) {
			d, err := DesignClassE(tc.spec)
			if err != nil {
				t.Fatal(err)
			}
			m := runNgspice(t, classENetlist(d, tc.cycles, ""), "vpk", "vavg", "irms", "isw", "von")
			po := m["irms"] * m["irms"] * float64(d.R)
			const src = "ngspice 39 transient, ideal switch"
			check(t, "peak switch voltage", m["vpk"], float64(d.VPeak), 0.01, src)
			check(t, "output power", po, float64(d.Po), 0.01, src)
			check(t, "rms switch current", m["isw"], float64(d.IRms), 0.01, src)
			check(t, "mean switch voltage", m["vavg"], float64(d.VDD), 0.01, src)
			if math.Abs(m["von"]) > 0.01*float64(d.VPeak) {
				t.Errorf("switch voltage at turn-on %.4g V, want ≈ 0 (%s)", m["von"], src)
			}
			t.Logf("ngspice/solver: V_pk %.5f, P_o %.5f, I_rms %.5f, V_avg/V_DD %.5f, v_on %.3g V",
				m["vpk"]/float64(d.VPeak), po/float64(d.Po), m["isw"]/float64(d.IRms), m["vavg"]/float64(d.VDD), m["von"])
		})
	}
}

// TestNgspiceClassETurnOff: the switch as a behavioural current
// min(v/1 mΩ, i_lim(t)) whose limit falls linearly from the predicted
// turn-off current to zero in t_f (ω·t_f = 0.2); ngspice finds the
// steady state and ∫v·i over the fall is compared with ClassETurnOff
// (steady state with the fall). The small-t_f formula of Kazimierczuk
// 2008 ch. 4 is printed alongside.
func TestNgspiceClassETurnOff(t *testing.T) {
	d, err := DesignClassE(ClassESpec{VDD: 12, F: 6.78e6, Po: 10, QL: 20})
	if err != nil {
		t.Fatal(err)
	}
	const eps = 0.2
	w := 2 * math.Pi * float64(d.F)
	tf := eps / w
	r, err := ClassETurnOff(d, q.Time(tf))
	if err != nil {
		t.Fatal(err)
	}
	T := 1 / float64(d.F)
	const cycles = 60
	n := float64(cycles)
	idc := float64(r.Po+r.TurnOff+r.TurnOn) / float64(d.VDD) // supply current of the steady state with the fall
	lim := fmt.Sprintf("0 100 %.10g 100 %.10g %.10g %.10g 0 %.10g 0 %.10g 100", T/2-1e-12, T/2, float64(r.IOff), T/2+tf, T-1e-12, T)
	meas := fmt.Sprintf(`.meas tran eoff INTEG v(p) FROM=%.10g TO=%.10g
.meas tran irms RMS i(Vs) FROM=%.10g TO=%.10g
.meas tran vavg AVG v(d) FROM=%.10g TO=%.10g
.meas tran ipre FIND i(Vsw) AT=%.10g
`, (n-0.5)*T, (n-0.5)*T+2*tf, (n-1)*T, n*T, (n-1)*T, n*T, (n-0.5)*T-2e-12)
	netlist := limitedSwitchNetlist("class E turn-off with a linear current fall", d, idc, lim, n, n-2, meas)
	m := runNgspice(t, netlist, "eoff", "irms", "vavg", "ipre")
	const src = "ngspice 39 transient, behavioural switch with a linear fall"
	ptf := m["eoff"] * float64(d.F)
	po := m["irms"] * m["irms"] * float64(d.R)
	check(t, "turn-off current", m["ipre"], float64(r.IOff), 0.005, src)
	check(t, "mean switch voltage", m["vavg"], float64(d.VDD), 0.005, src)
	check(t, "output power", po, float64(r.Po), 0.005, src)
	check(t, "turn-off loss", ptf, float64(r.TurnOff), 0.02, src)
	small, err := ClassETurnOffSmall(d, q.Time(tf))
	if err != nil {
		t.Fatal(err)
	}
	wave, err := ClassETurnOffWaveform(d, q.Time(tf))
	if err != nil {
		t.Fatal(err)
	}
	t.Logf("ω·t_f %.2f: ngspice P_tf %.5g W; steady-state model %.5g W (ratio %.4f); small-t_f %.5g W (small/ngspice %.4f); frozen waveform %.5g W (ratio %.4f)",
		eps, ptf, float64(r.TurnOff), ptf/float64(r.TurnOff), float64(small), float64(small)/ptf, float64(wave), float64(wave)/ptf)
}

// TestNgspiceClassEShunt: a reverse-biased junction (the diode model's
// depletion capacitance C_j0/(1 + v/V_j)^m) as the device, with the
// external capacitor and excess reactance from ClassEShunt, at Q_L 100.
// ngspice must show the predicted peak voltage (above 3.562·V_DD), a mean
// switch voltage of V_DD, the output power and zero voltage at turn-on.
func TestNgspiceClassEShunt(t *testing.T) {
	const (
		cj0 = 600e-12
		vj  = 0.7
		mj  = 0.5
		ql  = 100
	)
	d, err := DesignClassE(ClassESpec{VDD: 12, F: 6.78e6, Po: 10})
	if err != nil {
		t.Fatal(err)
	}
	sh, err := ClassEShunt(d, JunctionQoss(cj0, vj, mj))
	if err != nil {
		t.Fatal(err)
	}
	if sh.DeviceTooLarge {
		t.Fatalf("the test device should fit: %+v", sh)
	}
	w := 2 * math.Pi * float64(d.F)
	L := ql * float64(d.R) / w
	C2 := 1 / (w * (ql*float64(d.R) - float64(sh.X)))
	T := 1 / float64(d.F)
	// Start the tank on its Q_L → ∞ steady state at the turn-on instant:
	// load current I_m·sin(θ+φ) at θ = π (θ from turn-off), tan φ = −2/π.
	im := float64(d.IDC) * math.Sqrt(math.Pi*math.Pi+4) / 2
	phi := -math.Atan(2 / math.Pi)
	i0 := im * math.Sin(math.Pi+phi)
	vc0 := -im * math.Cos(math.Pi+phi) / (w * C2) // ∫i dt/C₂ of the sinusoid
	const cycles = 120
	n := float64(cycles)
	netlist := fmt.Sprintf(`* class E with a junction capacitance in the shunt
I1 0 d DC %.10g
Vsw d s 0
S1 s 0 g 0 swm
Vg g 0 PULSE(0 1 0 1p 1p %.10g %.10g)
.model swm sw vt=0.5 vh=0 ron=1m roff=1e9
D1 0 d dj
.model dj D(IS=1e-15 CJO=%.10g VJ=%.10g M=%.10g RS=0 TT=0)
Cx d 0 %.10g
L1 d a %.10g IC=%.10g
C2 a b %.10g IC=%.10g
Vs b c 0
R1 c 0 %.10g
.options method=gear reltol=1e-6 abstol=1e-12 vntol=1e-9
.tran %.10g %.10g %.10g %.10g uic
.meas tran vpk MAX v(d) FROM=%.10g TO=%.10g
.meas tran vavg AVG v(d) FROM=%.10g TO=%.10g
.meas tran irms RMS i(Vs) FROM=%.10g TO=%.10g
.meas tran von FIND v(d) AT=%.10g
.end
`, float64(d.IDC), T/2-1e-12, T, cj0, vj, mj, float64(sh.CExternal), L, i0, C2, vc0, float64(d.R),
		T/4000, n*T, (n-2)*T, T/4000,
		(n-1)*T, n*T, (n-1)*T, n*T, (n-1)*T, n*T, (n-0.0005)*T)
	m := runNgspice(t, netlist, "vpk", "vavg", "irms", "von")
	const src = "ngspice 39 transient, diode depletion capacitance"
	check(t, "peak switch voltage", m["vpk"], float64(sh.VPeak), 0.02, src)
	check(t, "mean switch voltage", m["vavg"], 12, 0.02, src)
	check(t, "output power", m["irms"]*m["irms"]*float64(d.R), 10, 0.02, src)
	if math.Abs(m["von"]) > 0.02*float64(sh.VPeak) {
		t.Errorf("switch voltage at turn-on %.4g V, want ≈ 0 (%s)", m["von"], src)
	}
	t.Logf("junction shunt: predicted V_pk %.4g V (linear 42.74 V), ngspice %.4g V; V_avg %.4g V; v_on %.3g V; C_ext %s, C_dev %s, X %s",
		float64(sh.VPeak), m["vpk"], m["vavg"], m["von"], sh.CExternal, sh.CDevice, sh.X)
}

// limitedSwitchNetlist is the class E stage d of the ngspice tests: a supply
// current idc into the drain (an ideal choke), the switch as a
// behavioural current min(v/1 mΩ, v(lim)) whose limit follows the PWL
// points lim, the shunt, the series tank and the load, run for n periods
// from rest with the waveform saved from period from on, and the .meas
// lines meas.
func limitedSwitchNetlist(title string, d ClassE, idc float64, lim string, n, from float64, meas string) string {
	T := 1 / float64(d.F)
	return fmt.Sprintf(`* %s
I1 0 d DC %.10g
Vsw d s 0
B1 s 0 I = min(V(s)/1m, V(lim))
Vlim lim 0 PWL(%s r=0)
Bp p 0 V = V(d)*I(Vsw)
C1 d 0 %.10g
L1 d a %.10g
C2 a b %.10g
Vs b c 0
R1 c 0 %.10g
.options method=gear reltol=1e-6 abstol=1e-12 vntol=1e-9
.tran %.10g %.10g %.10g %.10g uic
%s.end
`, title, idc, lim, float64(d.C1), float64(d.L), float64(d.C2), float64(d.R), T/4000, n*T, from*T, T/4000, meas)
}
