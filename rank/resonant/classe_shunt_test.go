package resonant

import (
	"errors"
	"math"
	"testing"

	q "swrank/devices/quantity"
)

func classE12V10W(t testing.TB) ClassE {
	t.Helper()
	d, err := DesignClassE(ClassESpec{VDD: 12, F: 6.78e6, Po: 10})
	if err != nil {
		t.Fatal(err)
	}
	return d
}

// TestShuntLinearDevice: a linear output capacitance is simply part of C₁
// (Raab 1977; Sokal & Sokal 1975): C_ext = C₁ − C_out, V_SM = 3.562·V_DD,
// X = 1.1525·R, f_max = P_o/(2π²·C_out·V_DD²) (by hand for 12 V, 10 W:
// 11.727 MHz for 300 pF).
func TestShuntLinearDevice(t *testing.T) {
	d := classE12V10W(t)
	r, err := ClassEShunt(d, LinearQoss(300e-12))
	if err != nil {
		t.Fatal(err)
	}
	const src = "hand calculation from Raab 1977"
	check(t, "C_ext", float64(r.CExternal), float64(d.C1)-300e-12, 1e-8, src)
	check(t, "C_dev", float64(r.CDevice), 300e-12, 1e-9, src)
	check(t, "V_SM", float64(r.VPeak), 3.562010*12, 1e-6, src)
	check(t, "X", float64(r.X), 1.152494*float64(d.R), 1e-5, src)
	check(t, "f_max", float64(r.FMax), 11.727e6, 1e-4, src)
	if r.DeviceTooLarge {
		t.Error("300 pF inside a 519 pF shunt flagged as too large")
	}
	// A finite-Q design: the linear law still leaves C₁(Q_L) − C_out.
	d20, err := DesignClassE(ClassESpec{VDD: 12, F: 6.78e6, Po: 10, QL: 20})
	if err != nil {
		t.Fatal(err)
	}
	r20, err := ClassEShunt(d20, LinearQoss(300e-12))
	if err != nil {
		t.Fatal(err)
	}
	check(t, "C_ext at QL 20", float64(r20.CExternal), float64(d20.C1)-300e-12, 1e-8, src)
}

// TestShuntDeviceTooLarge: a device capacitance above C₁ cannot hold class
// E; f_max is below the operating frequency (Raab 1977 f_max formula).
func TestShuntDeviceTooLarge(t *testing.T) {
	d := classE12V10W(t)
	r, err := ClassEShunt(d, LinearQoss(600e-12))
	if err != nil {
		t.Fatal(err)
	}
	if !r.DeviceTooLarge || r.CExternal != 0 {
		t.Errorf("600 pF > C₁ = %s: got DeviceTooLarge %v, C_ext %s", d.C1, r.DeviceTooLarge, r.CExternal)
	}
	check(t, "f_max", float64(r.FMax), 10/(2*math.Pi*math.Pi*600e-12*144), 1e-6, "Kazimierczuk 2008 ch. 4 f_max formula")
}

// TestShuntNonlinearDevice: a capacitance falling with voltage raises the
// peak above 3.562·V_DD (Chudobiak, IEEE TCAS-I 1994, direction); the
// device's swing-equivalent C plus C_ext then stays below C₁ because the
// peak charge is C₁·3.562·V_DD (this package's charge balance, docs); at
// f_max the external capacitor goes to zero; more nonlinearity, more rise.
func TestShuntNonlinearDevice(t *testing.T) {
	d := classE12V10W(t)
	prev := 3.562010 * 12
	for _, c0 := range []q.Capacitance{50e-12, 150e-12, 300e-12} {
		law := SqrtQoss(c0, 12)
		r, err := ClassEShunt(d, law)
		if err != nil {
			t.Fatal(err)
		}
		if !(float64(r.VPeak) > prev) {
			t.Errorf("√-law %s at 12 V: V_SM %s, want above %.4g V (Chudobiak 1994: nonlinear C raises the peak)", c0, r.VPeak, prev)
		}
		prev = float64(r.VPeak)
		// Charge at the peak equals the linear design's C₁·V_SM.
		qpk := float64(r.CExternal)*float64(r.VPeak) + float64(law(r.VPeak))
		check(t, "peak charge", qpk, float64(d.C1)*3.562010*12, 1e-5, "charge balance on the Raab 1977 waveform")
		// Re-design at f_max: the device alone is the whole shunt.
		df, err := DesignClassE(ClassESpec{VDD: 12, F: r.FMax, Po: 10})
		if err != nil {
			t.Fatal(err)
		}
		rf, err := ClassEShunt(df, law)
		if err != nil {
			t.Fatal(err)
		}
		if float64(rf.CExternal) > 1e-6*float64(df.C1) {
			t.Errorf("√-law %s at f_max %s: C_ext %s, want 0", c0, r.FMax, rf.CExternal)
		}
		check(t, "f_max stable", float64(rf.FMax), float64(r.FMax), 1e-6, "same device, same power and supply")
	}
}

// TestShuntPureSqrtLaw: a device alone with C ∝ V^−½ at f_max reaches
// V_SM/V_DD = q̂max²/mean(q̂²) with q̂ the ideal charge waveform
// (q̂max = 2·atan(2/π), from Raab 1977's waveform): computed here by an
// independent fine midpoint sum, 4.6229.
func TestShuntPureSqrtLaw(t *testing.T) {
	d := classE12V10W(t)
	r, err := ClassEShunt(d, SqrtQoss(100e-12, 12))
	if err != nil {
		t.Fatal(err)
	}
	df, err := DesignClassE(ClassESpec{VDD: 12, F: r.FMax, Po: 10})
	if err != nil {
		t.Fatal(err)
	}
	rf, err := ClassEShunt(df, SqrtQoss(100e-12, 12))
	if err != nil {
		t.Fatal(err)
	}
	const n = 200000
	var s float64
	for k := 0; k < n; k++ {
		th := (float64(k) + 0.5) * math.Pi / n
		qh := th + math.Sin(th) + math.Pi/2*(math.Cos(th)-1)
		s += qh * qh * math.Pi / n
	}
	qm := 2 * math.Atan(2/math.Pi)
	check(t, "V_SM/V_DD, √ law alone", float64(rf.VPeak)/12, qm*qm/(s/(2*math.Pi)), 1e-5, "Raab 1977 waveform with Q ∝ √V")
}

func TestShuntErrors(t *testing.T) {
	d := classE12V10W(t)
	for _, tc := range []struct {
		name string
		d    ClassE
		law  QossFunc
	}{
		{"nil law", d, nil},
		{"negative law", d, func(v q.Voltage) q.Charge { return -1e-9 }},
		{"NaN law", d, func(v q.Voltage) q.Charge { return q.Charge(math.NaN()) }},
		{"empty design", ClassE{}, LinearQoss(1e-12)},
	} {
		if _, err := ClassEShunt(tc.d, tc.law); !errors.Is(err, ErrSpec) {
			t.Errorf("%s: got %v, want ErrSpec", tc.name, err)
		}
	}
	// A law that never exceeds a tiny charge cannot reach the design's.
	flat := func(v q.Voltage) q.Charge { return q.Charge(1e-15 * math.Min(float64(v), 1)) }
	if _, err := ClassEShunt(d, flat); err == nil {
		t.Error("saturating law: want an error")
	}
}

// BenchmarkClassEShunt: the shunt fit runs per part and operating point.
func BenchmarkClassEShunt(b *testing.B) {
	d := classE12V10W(b)
	law := SqrtQoss(150e-12, 12)
	for i := 0; i < b.N; i++ {
		if _, err := ClassEShunt(d, law); err != nil {
			b.Fatal(err)
		}
	}
}
