package resonant

import (
	"errors"
	"math"
	"testing"

	q "swrank/devices/quantity"
)

func classD(t *testing.T, s ClassDSpec) ClassD {
	t.Helper()
	d, err := ClassDOperatingPoint(s)
	if err != nil {
		t.Fatal(err)
	}
	return d
}

// TestClassDFundamental: the series-resonant half-bridge in the
// fundamental approximation (Kazimierczuk & Czarkowski, Resonant Power
// Converters, 2011, ch. 2): at resonance P_o = 2·V_in²/(π²·R) and
// I_m = 2·V_in/(π·R); off resonance tan ψ = Q_L(f/f₀ − f₀/f) and
// P_o = 2·V_in²·cos²ψ/(π²·R).
func TestClassDFundamental(t *testing.T) {
	const src = "Kazimierczuk & Czarkowski 2011, ch. 2"
	d := classD(t, ClassDSpec{Vin: 48, R: 10, Fsw: 100e3, F0: 100e3, QL: 5})
	check(t, "P_o at resonance", float64(d.Po), 2*48*48/(math.Pi*math.Pi*10), 1e-12, src)
	check(t, "I_m at resonance", float64(d.Im), 2*48/(math.Pi*10), 1e-12, src)
	check(t, "I_rms per switch = I_m/2", float64(d.IRms), 48/(math.Pi*10), 1e-12, src)
	check(t, "L = Q·R/ω₀", float64(d.L), 5*10/(2*math.Pi*100e3), 1e-12, src)
	check(t, "C = 1/(Q·R·ω₀)", float64(d.C), 1/(5*10*2*math.Pi*100e3), 1e-12, src)
	if d.ISwitch != 0 || d.Phase != 0 {
		t.Errorf("at resonance: edge current %s, phase %g, want 0 (%s)", d.ISwitch, d.Phase, src)
	}

	above := classD(t, ClassDSpec{Vin: 48, Po: 20, Fsw: 110e3, F0: 100e3, QL: 5})
	psi := math.Atan(5 * (1.1 - 1/1.1))
	check(t, "ψ above resonance", float64(above.Phase), psi, 1e-12, src)
	check(t, "R for 20 W", float64(above.R), 2*48*48*math.Cos(psi)*math.Cos(psi)/(math.Pi*math.Pi*20), 1e-12, src)
	check(t, "P_o = I_m²R/2", float64(above.Im*above.Im)*float64(above.R)/2, 20, 1e-12, src)
	check(t, "edge current I_m·sin ψ", float64(above.ISwitch), float64(above.Im)*math.Sin(psi), 1e-12, src)
	if above.ISwitch <= 0 {
		t.Errorf("above resonance the edge current must favour ZVS (positive), got %s (%s)", above.ISwitch, src)
	}

	below := classD(t, ClassDSpec{Vin: 48, Po: 20, Fsw: 90e3, F0: 100e3, QL: 5, DeadTime: 100e-9})
	if below.ISwitch >= 0 || below.Phase >= 0 || below.QDead != 0 {
		t.Errorf("below resonance: edge current %s, phase %g, dead-time charge %s; want negative, negative, 0 (%s)", below.ISwitch, below.Phase, below.QDead, src)
	}

	// The load phase may be given directly.
	ph := classD(t, ClassDSpec{Vin: 48, Po: 20, Fsw: 110e3, Phase: q.Some(q.Ratio(psi))})
	check(t, "R from the phase", float64(ph.R), float64(above.R), 1e-12, src)
}

// TestClassDHardSwitching: at resonance nothing moves the node; each
// transistor dissipates V·Q_oss(V) per cycle (Kazimierczuk & Czarkowski
// 2011 ch. 2; by hand with the √ law of Erickson & Maksimović 2001 ch. 4:
// 500 pF at 48 V → 2.304 µJ, 1.152 W at 500 kHz), and for unlike parts
// E_S(V) + V·Q_K(V) − E_K(V) (hand calculation from the energy balance of
// the commutation).
func TestClassDHardSwitching(t *testing.T) {
	d := classD(t, ClassDSpec{Vin: 48, Po: 50, Fsw: 500e3, F0: 500e3, QL: 4, DeadTime: 50e-9})
	law := SqrtQoss(500e-12, 48)
	e, err := ClassDTurnOn(d, law, law)
	if err != nil {
		t.Fatal(err)
	}
	if e.ZVS || e.PartnerDiode || e.VResidual != 48 {
		t.Errorf("at resonance: %+v, want hard switching at 48 V without diode conduction", e)
	}
	check(t, "E per hard turn-on", float64(e.ETurnOn), 2.304e-6, 1e-6, "hand calculation; Kazimierczuk & Czarkowski 2011 ch. 2")
	l, err := ClassDLosses(d, ClassDSwitch{Qoss: law})
	if err != nil {
		t.Fatal(err)
	}
	check(t, "turn-on power per switch", float64(l.TurnOn), 1.152, 1e-6, "hand calculation from f·V·Q_oss, Kazimierczuk & Czarkowski 2011 ch. 2")

	cs, ck := 200e-12, 700e-12
	e2, err := ClassDTurnOn(d, LinearQoss(q.Capacitance(cs)), LinearQoss(q.Capacitance(ck)))
	if err != nil {
		t.Fatal(err)
	}
	check(t, "unlike parts", float64(e2.ETurnOn), 0.5*cs*48*48+ck*48*48-0.5*ck*48*48, 1e-6, "E_S + V·Q_K − E_K (notes [D], energy bookkeeping)")

	// Below resonance: hard, and the partner's diode conducts for the
	// whole dead time (recovery to be added by the caller).
	below := classD(t, ClassDSpec{Vin: 48, Po: 50, Fsw: 450e3, F0: 500e3, QL: 4, DeadTime: 50e-9})
	eb, err := ClassDTurnOn(below, law, law)
	if err != nil {
		t.Fatal(err)
	}
	if !eb.PartnerDiode || eb.TDiode != 50e-9 || eb.ZVS {
		t.Errorf("below resonance: %+v, want the partner's diode for 50 ns and no ZVS (Kazimierczuk & Czarkowski ch. 2)", eb)
	}
	check(t, "E below resonance", float64(eb.ETurnOn), 2.304e-6, 1e-6, "V·Q_oss, hand calculation with the √ law")
}

// deadTimeForZVS returns the dead time at which the edge current moves
// exactly the charge q (inverse of (I_m/ω)(cos(ψ−ωt) − cos ψ)).
func deadTimeForZVS(d ClassD, charge float64) float64 {
	w := 2 * math.Pi * float64(d.Fsw)
	psi := float64(d.Phase)
	return (psi - math.Acos(math.Cos(psi)+w*charge/float64(d.Im))) / w
}

// TestClassDZVSBoundary: ZVS needs |i|·t_dead ≥ Q_S(V) + Q_K(V) = 2·Q_oss(V)
// for identical parts (notes [D]; Kazimierczuk & Czarkowski ch. 2); the
// sinusoidal dead-time charge tends to |i|·t_dead for a short dead time.
func TestClassDZVSBoundary(t *testing.T) {
	law := SqrtQoss(50e-12, 48)
	base := ClassDSpec{Vin: 48, Po: 50, Fsw: 500e3, F0: 450e3, QL: 4}
	d := classD(t, base)
	need := 2 * float64(law(48))
	td := deadTimeForZVS(d, need)
	// Short dead time (ω·t_d ≪ ψ): the sinusoid is a straight line.
	check(t, "t_dead vs 2Q_oss/|i|", td, need/float64(d.ISwitch), 0.01, "|i|·t_dead = 2·Q_oss, notes [D]")
	for _, tc := range []struct {
		f   float64
		zvs bool
	}{{1.001, true}, {0.999, false}} {
		s := base
		s.DeadTime = q.Time(td * tc.f)
		e, err := ClassDTurnOn(classD(t, s), law, law)
		if err != nil {
			t.Fatal(err)
		}
		if e.ZVS != tc.zvs {
			t.Errorf("dead time %.4g × boundary: ZVS %v, want %v", tc.f, e.ZVS, tc.zvs)
		}
		check(t, "charge needed", float64(e.QNeeded), need, 1e-12, "2·Q_oss(V)")
	}
	check(t, "QDead short", float64(classD(t, ClassDSpec{Vin: 48, Po: 50, Fsw: 500e3, F0: 450e3, QL: 4, DeadTime: 1e-10}).QDead),
		float64(d.ISwitch)*1e-10, 1e-3, "|i|·t_dead, notes [D]")
}

// TestClassDPartialZVSLinear: identical linear capacitances C: the node
// stops at V − Q_d/(2C) and the loss is C·V_r² (hand calculation from the
// energy balance E_S(V_r) + V[Q_K(V) − Q_K(V−V_r)] − [E_K(V) − E_K(V−V_r)]).
func TestClassDPartialZVSLinear(t *testing.T) {
	const c = 1e-9
	for _, td := range []q.Time{0, 20e-9, 60e-9} {
		d := classD(t, ClassDSpec{Vin: 100, Po: 100, Fsw: 200e3, F0: 180e3, QL: 3, DeadTime: td})
		e, err := ClassDTurnOn(d, LinearQoss(c), LinearQoss(c))
		if err != nil {
			t.Fatal(err)
		}
		vr := 100 - float64(d.QDead)/(2*c)
		if vr <= 0 {
			t.Fatalf("dead time %s already gives ZVS; pick a shorter one", td)
		}
		check(t, "V_r", float64(e.VResidual), vr, 1e-9, "charge balance, notes [D]")
		check(t, "E = C·V_r²", float64(e.ETurnOn), c*vr*vr, 1e-6, "notes [D] with linear C")
	}
}

// TestClassDContinuity: the turn-on energy is continuous across the ZVS
// boundary (notes [D]); sweeping the dead time, neighbouring points differ
// by little and the energy goes to zero at the boundary.
func TestClassDContinuity(t *testing.T) {
	law := JunctionQoss(2e-9, 0.7, 0.5)
	base := ClassDSpec{Vin: 48, Po: 50, Fsw: 500e3, F0: 450e3, QL: 4}
	d := classD(t, base)
	tb := deadTimeForZVS(d, 2*float64(law(48)))
	const n = 400
	prev, maxJump := -1.0, 0.0
	var hard float64
	for k := 0; k <= n; k++ {
		s := base
		s.DeadTime = q.Time(2 * tb * float64(k) / n)
		e, err := ClassDTurnOn(classD(t, s), law, law)
		if err != nil {
			t.Fatal(err)
		}
		en := float64(e.ETurnOn)
		if k == 0 {
			hard = en
			check(t, "E at zero dead time", en, 48*float64(law(48)), 1e-6, "V·Q_oss (Kazimierczuk & Czarkowski ch. 2)")
		} else {
			maxJump = math.Max(maxJump, math.Abs(en-prev))
		}
		prev = en
	}
	if maxJump > 0.02*hard {
		t.Errorf("largest step of E between neighbouring dead times %.3g J (%.2g %% of the hard value), want < 2 %% (continuity, notes [D])", maxJump, 100*maxJump/hard)
	}
	s := base
	s.DeadTime = q.Time(tb * 0.9999)
	e, err := ClassDTurnOn(classD(t, s), law, law)
	if err != nil {
		t.Fatal(err)
	}
	if float64(e.ETurnOn) > 1e-4*hard {
		t.Errorf("just short of ZVS: E %.3g J, want → 0 (continuity, notes [D])", float64(e.ETurnOn))
	}
}

// TestClassDDeadTimeDetails: after a full ZVS transition the incoming
// switch's diode conducts for the rest of the dead time; a dead time past
// the current's zero crossing lets the node swing back (derived from the
// fundamental approximation, Kazimierczuk & Czarkowski ch. 2).
func TestClassDDeadTimeDetails(t *testing.T) {
	law := LinearQoss(100e-12)
	base := ClassDSpec{Vin: 48, Po: 50, Fsw: 500e3, F0: 450e3, QL: 4, DeadTime: 100e-9}
	d := classD(t, base)
	e, err := ClassDTurnOn(d, law, law)
	if err != nil {
		t.Fatal(err)
	}
	ttr := deadTimeForZVS(d, 2*100e-12*48)
	if !e.ZVS {
		t.Fatalf("expected ZVS: %+v", e)
	}
	check(t, "own-diode time", float64(e.TDiode), 100e-9-ttr, 1e-9, "dead time minus transition time")
	// ψ/ω is the zero crossing; a dead time beyond it loses ZVS.
	late := base
	late.DeadTime = q.Time(1.5 * float64(d.Phase) / (2 * math.Pi * 500e3))
	dl := classD(t, late)
	el, err := ClassDTurnOn(dl, law, law)
	if err != nil {
		t.Fatal(err)
	}
	if !dl.CurrentReverses || el.ZVS || el.VResidual <= 0 {
		t.Errorf("dead time past the zero crossing: reverses %v, ZVS %v, V_r %s; want true, false, > 0", dl.CurrentReverses, el.ZVS, el.VResidual)
	}
}

// TestZVSTurnOffEnergy: linear current fall into the node capacitance.
// Small fall: I²t_f²/(24C) (notes [D]); long fall or small C: the node
// reaches the rail, piecewise form, tending to ½·V·I·t_f (the current-fall
// part of a clamped turn-off, Erickson & Maksimović ch. 4) as C → 0; an
// independent step-by-step integration agrees in both regimes.
func TestZVSTurnOffEnergy(t *testing.T) {
	brute := func(I, T, C, V float64) float64 {
		const n = 200000
		h := T / n
		v, e := 0.0, 0.0
		for k := 0; k < n; k++ {
			tm := (float64(k) + 0.5) * h
			ich := I * (1 - tm/T)
			vm := math.Min(v+h/2*(I-ich)/C, V)
			e += vm * ich * h
			v = math.Min(v+h*(I-ich)/C, V)
		}
		return e
	}
	for _, tc := range []struct{ I, T, C, V float64 }{
		{10, 10e-9, 2e-9, 400},    // I·t_f/(2C) = 25 V < 400 V
		{10, 20e-9, 100e-12, 400}, // 1000 V: reaches the rail
		{30, 50e-9, 50e-12, 48},
	} {
		e, err := ZVSTurnOffEnergy(q.Current(tc.I), q.Time(tc.T), q.Capacitance(tc.C), q.Voltage(tc.V))
		if err != nil {
			t.Fatal(err)
		}
		check(t, "E_off vs integration", float64(e), brute(tc.I, tc.T, tc.C, tc.V), 1e-4, "C·dv/dt = I·t/t_f integrated numerically")
		if tc.I*tc.T/(2*tc.C) < tc.V {
			check(t, "E_off small", float64(e), tc.I*tc.I*tc.T*tc.T/(24*tc.C), 1e-12, "notes [D]")
		}
	}
	// Continuity at I·t_f/(2C) = V.
	const I, T, V = 10.0, 10e-9, 100.0
	cb := I * T / (2 * V)
	a, _ := ZVSTurnOffEnergy(I, T, q.Capacitance(cb*(1+1e-9)), V)
	b, _ := ZVSTurnOffEnergy(I, T, q.Capacitance(cb*(1-1e-9)), V)
	check(t, "continuity at the rail", float64(a), float64(b), 1e-6, "piecewise form, derived")
	z, _ := ZVSTurnOffEnergy(I, T, 1e-18, V)
	check(t, "C → 0", float64(z), 0.5*V*I*T, 1e-3, "Erickson & Maksimović ch. 4")
	if _, err := ZVSTurnOffEnergy(-1, T, 1e-9, V); !errors.Is(err, ErrSpec) {
		t.Errorf("negative current: %v", err)
	}
}

// TestClassDLosses: conduction with I_rms = I_m/2 and the turn-off at the
// edge current with both switches' capacitance; none below resonance
// (Kazimierczuk & Czarkowski ch. 2).
func TestClassDLosses(t *testing.T) {
	law := LinearQoss(200e-12)
	d := classD(t, ClassDSpec{Vin: 48, Po: 50, Fsw: 500e3, F0: 450e3, QL: 4, DeadTime: 100e-9})
	l, err := ClassDLosses(d, ClassDSwitch{RDS: 0.05, Tf: 5e-9, Qoss: law, CExtra: 100e-12})
	if err != nil {
		t.Fatal(err)
	}
	const src = "Kazimierczuk & Czarkowski 2011 ch. 2; notes [D]"
	check(t, "conduction", float64(l.Conduction), float64(d.Im/2)*float64(d.Im/2)*0.05, 1e-12, src)
	cn := 2 * 300e-12
	I := float64(d.ISwitch)
	check(t, "turn-off", float64(l.TurnOff), I*I*25e-18/(24*cn)*500e3, 1e-9, src)
	if !l.Edge.ZVS || l.TurnOn != 0 {
		t.Errorf("expected ZVS without turn-on loss: %+v", l)
	}
	below := classD(t, ClassDSpec{Vin: 48, Po: 50, Fsw: 400e3, F0: 450e3, QL: 4, DeadTime: 100e-9})
	lb, err := ClassDLosses(below, ClassDSwitch{RDS: 0.05, Tf: 5e-9, Qoss: law})
	if err != nil {
		t.Fatal(err)
	}
	check(t, "hard turn-on below resonance", float64(lb.TurnOn), 48*48*200e-12*400e3, 1e-6, src)
	if lb.TurnOff != 0 || !lb.Edge.PartnerDiode {
		t.Errorf("below resonance: turn-off %s, partner diode %v; want 0 and true", lb.TurnOff, lb.Edge.PartnerDiode)
	}
}

func TestClassDErrors(t *testing.T) {
	for _, tc := range []struct {
		name string
		s    ClassDSpec
	}{
		{"no load", ClassDSpec{Vin: 48, Fsw: 1e5, F0: 1e5, QL: 3}},
		{"both", ClassDSpec{Vin: 48, Po: 1, R: 1, Fsw: 1e5, F0: 1e5, QL: 3}},
		{"no F0", ClassDSpec{Vin: 48, Po: 1, Fsw: 1e5, QL: 3}},
		{"no Q", ClassDSpec{Vin: 48, Po: 1, Fsw: 1e5, F0: 1e5}},
		{"phase out of range", ClassDSpec{Vin: 48, Po: 1, Fsw: 1e5, Phase: q.Some[q.Ratio](2)}},
		{"negative dead time", ClassDSpec{Vin: 48, Po: 1, Fsw: 1e5, F0: 1e5, QL: 3, DeadTime: -1}},
		{"NaN bus", ClassDSpec{Vin: q.Voltage(math.NaN()), Po: 1, Fsw: 1e5, F0: 1e5, QL: 3}},
	} {
		if _, err := ClassDOperatingPoint(tc.s); !errors.Is(err, ErrSpec) {
			t.Errorf("%s: got %v, want ErrSpec", tc.name, err)
		}
	}
	d := classD(t, ClassDSpec{Vin: 48, Po: 1, Fsw: 1e5, F0: 1e5, QL: 3})
	if _, err := ClassDTurnOn(d, nil, LinearQoss(1e-12)); !errors.Is(err, ErrSpec) {
		t.Errorf("nil law: %v", err)
	}
	if _, err := ClassDLosses(d, ClassDSwitch{}); !errors.Is(err, ErrSpec) {
		t.Errorf("no law: %v", err)
	}
}
