package spice

import (
	"context"
	"fmt"
	"math"
	"strings"
)

// Test conditions of the characterisation (common datasheet practice).
const (
	vgsHigh    = 10.0   // V, first Rds(on) point and Qg level
	vthCurrent = 250e-6 // A, threshold test current
	capFreq    = 1e6    // Hz, capacitance and gate-resistance test frequency
	tswRg      = 3.0    // Ω, external gate resistor of the switching-time test
	tswRgen    = 1.0    // Ω, generator resistance of the switching-time test
	edge       = 50e-12 // s, source edges (1 ns edges under-read the gate energy of small parts; checked against Qg·V)
)

// Characterise extracts the datasheet numbers of m by simulation.
func Characterise(ctx context.Context, r *Runner, m *Model) (*Datasheet, error) {
	return characterise(ctx, r, m, modelDUT(m))
}

// Ratings are what a datasheet states beside a model file's simulated
// numbers: the part's name, ratings and test current (SI units; the
// fields of Model of the same names and ranges).
type Ratings struct {
	Name   string  // part name; required
	VdsMax float64 // V; > 0
	IdMax  float64 // A; > 0
	VgsMax float64 // V; default 20
	ITest  float64 // A; default IdMax/2
	Vgs2   float64 // second Rds(on) gate voltage, V; default 4.5
}

// CharacteriseDevice extracts the datasheet numbers of a model file's
// device by simulation, with the tests of Characterise. It returns the
// ratings as a Model (ratings only) for Datasheet.Part.
func CharacteriseDevice(ctx context.Context, r *Runner, d *Device, rt Ratings) (*Datasheet, *Model, error) {
	m := &Model{Name: rt.Name, VdsMax: rt.VdsMax, IdMax: rt.IdMax, VgsMax: rt.VgsMax, ITest: rt.ITest, Vgs2: rt.Vgs2}
	if m.ITest == 0 {
		m.ITest = m.IdMax / 2
	}
	m.SetDefaults()
	if m.Name == "" || !(m.VdsMax > 0) || !(m.IdMax > 0) || !(m.ITest > 0) {
		return nil, nil, fmt.Errorf("characterising %s: a name, vds_max, id_max and a test current > 0 are required", d.Path)
	}
	if m.ITest > m.IdMax {
		// The row's rds_on_id is the test current, and a library row
		// measures the on-resistance at or below the continuous rating.
		return nil, nil, fmt.Errorf("characterising %s: test current %g A above id_max %g A", d.Path, m.ITest, m.IdMax)
	}
	ds, err := characterise(ctx, r, m, deviceDUT(d))
	return ds, m, err
}

// dut is the device under test as the characterisation decks see it: the
// model text, how to place it, and the sizes the tests are scaled by.
type dut struct {
	card   string                           // deck lines defining the model
	inst   func(ref, d, g, s string) string // one instance line
	files  map[string][]byte
	compat string
	// Sizing (NaN: measured first): input capacitance at 0 V (F), its
	// gate-drain share (F), threshold (V) and gate resistance (Ω).
	cin, cgd, vto, rg float64
	// storeCards are the diode and VDMOS cards whose transit time the
	// recovery test sets to 0 (ngspice's altermod) for its reference run
	// without stored charge; nil when that charge cannot be taken out.
	storeCards []string
}

func modelDUT(m *Model) *dut {
	return &dut{card: m.card("dut"), inst: func(ref, d, g, s string) string {
		return fmt.Sprintf("m%s %s %s %s %s dut\n", ref, d, g, s, s)
	}, cin: m.Cgs + m.Cgdmax, cgd: m.Cgdmax, vto: m.Vto, rg: m.Rg, storeCards: []string{"dut"}}
}

func deviceDUT(d *Device) *dut {
	u := &dut{card: ".include model.lib\n", inst: func(ref, dn, g, s string) string {
		l, _ := d.instance(ref, dn, g, s, s)
		return l
	}, files: map[string][]byte{"model.lib": d.Text}, compat: d.Compat,
		cin: math.NaN(), cgd: math.NaN(), vto: math.NaN(), rg: math.NaN()}
	u.storeCards = storeCards(d)
	return u
}

func (u *dut) run(ctx context.Context, r *Runner, name, deck string, outputs ...string) (map[string]*Table, error) {
	t, _, err := r.RunJob(ctx, Job{Name: name, Deck: deck, Files: u.files, Outputs: outputs, Compat: u.compat})
	return t, err
}

func characterise(ctx context.Context, r *Runner, m *Model, u *dut) (*Datasheet, error) {
	ds := &Datasheet{RdsOnVgs: vgsHigh, RdsOn2Vgs: m.Vgs2, RdsOnId: m.ITest, CapVds: m.VdsMax / 2, Cap2Vds: m.VdsMax / 10, OssVds: m.VdsMax / 2,
		QgVgs: vgsHigh, QgVds: m.VdsMax / 2, QgId: m.ITest,
		TswVdd: m.VdsMax / 2, TswId: m.ITest, TswVgs: vgsHigh, TswRg: tswRg, TswRgen: tswRgen,
		VthCurrent: vthCurrent}
	steps := []struct {
		name string
		fn   func(context.Context, *Runner, *Model, *dut, *Datasheet) error
	}{{"static", static}, {"hot static", hotStatic}, {"capacitances", capacitances}, {"output charge", outputCharge},
		{"recovery", recovery}, {"gate charge", gateCharge}, {"switching times", switchingTimes}}
	for _, s := range steps {
		if err := s.fn(ctx, r, m, u, ds); err != nil {
			return nil, fmt.Errorf("characterising %s: %s test: %w", m.Name, s.name, err)
		}
	}
	return ds, nil
}

// cvFractions are the drain biases of the C–V curves, fractions of the
// rating: eight points spread over the curve a datasheet draws (log-spaced
// from 2 % of the rating, common practice).
func cvFractions() [8]float64 { return [...]float64{0.02, 0.05, 0.1, 0.2, 0.35, 0.5, 0.75, 1} }

// hotTj is the junction temperature of the hot static tests, °C: the
// usual second temperature of a datasheet's Rds(on), Vgs(th) and Vsd
// (common practice).
const hotTj = 125.0

// static: Rds(on) at two gate voltages (ds.RdsOnId, the test current,
// forced into the drain), Vgs(th) with gate tied to drain at ds.VthCurrent
// (250 µA), and the body-diode drop.
func static(ctx context.Context, r *Runner, m *Model, u *dut, ds *Datasheet) error {
	v, err := staticAt(ctx, r, m, u, ds, 25)
	if err != nil {
		return err
	}
	v1, v2, v3, v4 := v[0], v[1], v[2], v[3]
	ds.RdsOn, ds.RdsOn2, ds.Vth, ds.Vsd = v1/ds.RdsOnId, v2/ds.RdsOnId, v3, -v4
	// A datasheet Rds(on) is a linear-region figure: the drain voltage must
	// stay well below the overdrive.
	vto := u.vto
	if math.IsNaN(vto) {
		vto = ds.Vth
	}
	if v2 > 0.3*(ds.RdsOn2Vgs-vto) {
		return fmt.Errorf("at Vgs = %g V and %g A the channel saturates (Vds %.3g V): raise vgs2 or lower i_test",
			ds.RdsOn2Vgs, ds.RdsOnId, v2)
	}
	return nil
}

// hotStatic: the static tests at hotTj (the model's own temperature laws;
// the simulator's temp option, with tnom at 25 °C).
func hotStatic(ctx context.Context, r *Runner, m *Model, u *dut, ds *Datasheet) error {
	v, err := staticAt(ctx, r, m, u, ds, hotTj)
	if err != nil {
		return err
	}
	ds.RdsOnHot, ds.VthHot, ds.VsdHot, ds.HotTj = v[0]/ds.RdsOnId, v[2], -v[3], hotTj
	return nil
}

// staticAt runs the static deck at junction temperature tj (°C) and
// returns the drain voltages of the two Rds(on) tests, the threshold test
// and the diode test.
func staticAt(ctx context.Context, r *Runner, m *Model, u *dut, ds *Datasheet, tj float64) ([4]float64, error) {
	var b strings.Builder
	b.WriteString("* static characterisation\n")
	b.WriteString(u.card)
	b.WriteString(optionsAt(tj))
	fmt.Fprintf(&b, u.inst("1", "d1", "g1", "0")+"vg1 g1 0 dc %s\ni1 0 d1 dc %s\n", num(ds.RdsOnVgs), num(ds.RdsOnId))
	fmt.Fprintf(&b, u.inst("2", "d2", "g2", "0")+"vg2 g2 0 dc %s\ni2 0 d2 dc %s\n", num(ds.RdsOn2Vgs), num(ds.RdsOnId))
	fmt.Fprintf(&b, u.inst("3", "d3", "d3", "0")+"i3 0 d3 dc %s\n", num(ds.VthCurrent))
	fmt.Fprintf(&b, u.inst("4", "d4", "0", "0")+"i4 d4 0 dc %s\n", num(m.ITest))
	b.WriteString(".control\n" + deckPrologue + "op\nwrdata static.dat v(d1) v(d2) v(d3) v(d4)\nquit 0\n.endc\n.end\n")
	var v [4]float64
	t, err := u.run(ctx, r, fmt.Sprintf("%s static %s °C", m.Name, num(tj)), b.String(), "static.dat")
	if err != nil {
		return v, err
	}
	for i, n := range []string{"v(d1)", "v(d2)", "v(d3)", "v(d4)"} {
		c, err := t["static.dat"].Col(n)
		if err != nil {
			return v, err
		}
		v[i] = c[0]
	}
	return v, nil
}

// capacitances: Ciss (gate driven, drain AC-shorted at CapVds), Coss and
// Crss (drain driven at CapVds, and again at Cap2Vds, gate AC-shorted to
// source) at 1 MHz, and the gate resistance as the real part of the gate
// impedance with the drain shorted to the source.
func capacitances(ctx context.Context, r *Runner, m *Model, u *dut, ds *Datasheet) error {
	var b strings.Builder
	b.WriteString("* small-signal capacitances\n")
	b.WriteString(u.card)
	b.WriteString(optionsLine)
	fmt.Fprintf(&b, u.inst("1", "d1", "g1", "0")+"vd1 d1 0 dc %s\nvg1 g1 0 dc 0 ac 1\n", num(ds.CapVds))
	fmt.Fprintf(&b, u.inst("2", "d2", "g2", "0")+"vd2 d2 0 dc %s ac 1\nvg2 g2 0 dc 0\n", num(ds.CapVds))
	b.WriteString(u.inst("3", "0", "g3", "0") + "vg3 g3 0 dc 0 ac 1\n")
	// At 0 V as well: the input and gate-drain capacitances at their
	// largest, which size the gate-charge and switching-time tests of a
	// model file.
	b.WriteString(u.inst("4", "d4", "g4", "0") + "vd4 d4 0 dc 0\nvg4 g4 0 dc 0 ac 1\n")
	b.WriteString(u.inst("5", "d5", "g5", "0") + "vd5 d5 0 dc 0 ac 1\nvg5 g5 0 dc 0\n")
	fmt.Fprintf(&b, u.inst("6", "d6", "g6", "0")+"vd6 d6 0 dc %s ac 1\nvg6 g6 0 dc 0\n", num(ds.Cap2Vds))
	ds.CVVds = ds.CVVds[:0]
	for i, f := range cvFractions() {
		ds.CVVds = append(ds.CVVds, f*m.VdsMax)
		fmt.Fprintf(&b, u.inst(fmt.Sprint("c", i), fmt.Sprint("dc", i), fmt.Sprint("gc", i), "0")+"vdc%d dc%d 0 dc %s ac 1\nvgc%d gc%d 0 dc 0\n",
			i, i, num(ds.CVVds[i]), i, i)
	}
	fmt.Fprintf(&b, ".control\n%sac lin 1 %s %s\n", deckPrologue, num(capFreq), num(capFreq))
	fmt.Fprintf(&b, "let w = 2*pi*%s\n", num(capFreq))
	b.WriteString("let z1 = -1/i(vg1)\nlet ciss = -1/(w*imag(z1))\n")
	b.WriteString("let coss = imag(-i(vd2))/w\nlet crss = imag(i(vg2))/w\n")
	b.WriteString("let z3 = -1/i(vg3)\nlet rgint = real(z3)\n")
	b.WriteString("let z4 = -1/i(vg4)\nlet ciss0 = -1/(w*imag(z4))\nlet crss0 = imag(i(vg5))/w\n")
	b.WriteString("let coss2 = imag(-i(vd6))/w\nlet crss2 = imag(i(vg6))/w\n")
	cv := ""
	for i := range len(cvFractions()) {
		fmt.Fprintf(&b, "let cossc%d = imag(-i(vdc%d))/w\nlet crssc%d = imag(i(vgc%d))/w\n", i, i, i, i)
		cv += fmt.Sprintf(" cossc%d crssc%d", i, i)
	}
	b.WriteString("wrdata caps.dat ciss coss crss rgint ciss0 crss0 coss2 crss2" + cv + "\nquit 0\n.endc\n.end\n")
	t, err := u.run(ctx, r, m.Name+" capacitances", b.String(), "caps.dat")
	if err != nil {
		return err
	}
	vals := map[string]*float64{"ciss": &ds.Ciss, "coss": &ds.Coss, "crss": &ds.Crss, "rgint": &ds.RgInt,
		"coss2": &ds.Coss2, "crss2": &ds.Crss2}
	for n, p := range vals {
		c, err := t["caps.dat"].Col(n)
		if err != nil {
			return err
		}
		if !(c[0] > 0) {
			return fmt.Errorf("%s = %g, want > 0", n, c[0])
		}
		*p = c[0]
	}
	ds.CossCV, ds.CrssCV = make([]float64, len(cvFractions())), make([]float64, len(cvFractions()))
	for i := range len(cvFractions()) {
		co, err1 := t["caps.dat"].Col(fmt.Sprint("cossc", i))
		cr, err2 := t["caps.dat"].Col(fmt.Sprint("crssc", i))
		if err1 != nil || err2 != nil || !(co[0] > 0) || !(cr[0] > 0) {
			return fmt.Errorf("no capacitance at %s V for the C–V curve", num(ds.CVVds[i]))
		}
		ds.CossCV[i], ds.CrssCV[i] = co[0], cr[0]
	}
	if math.IsNaN(u.cin) {
		c0, err1 := t["caps.dat"].Col("ciss0")
		g0, err2 := t["caps.dat"].Col("crss0")
		if err1 != nil || err2 != nil || !(c0[0] > 0) || !(g0[0] > 0) {
			return fmt.Errorf("no input capacitance at 0 V")
		}
		// 1.5 × the 0 V values: room for the test to reach its gate voltage.
		u.cin, u.cgd, u.rg = 1.5*c0[0], 1.5*g0[0], ds.RgInt
	}
	return nil
}

// outputCharge: the drain is ramped slowly from 0 V to OssVds with the gate
// shorted to the source; Q_oss = ∫i dt and E_oss = ∫v·i dt (IEC 60747-8
// definitions of output charge and stored energy).
func outputCharge(ctx context.Context, r *Runner, m *Model, u *dut, ds *Datasheet) error {
	const ramp = 2e-6
	var b strings.Builder
	b.WriteString("* output charge and energy\n")
	b.WriteString(u.card)
	b.WriteString(optionsLine)
	fmt.Fprintf(&b, u.inst("1", "d1", "0", "0")+"vd1 d1 0 pwl(0 0 %s %s)\n", num(ramp), num(ds.OssVds))
	fmt.Fprintf(&b, ".control\n%stran %s %s 0 %s\nwrdata oss.dat v(d1) i(vd1)\nquit 0\n.endc\n.end\n",
		deckPrologue, num(ramp/2000), num(ramp), num(ramp/2000))
	t, err := u.run(ctx, r, m.Name+" output charge", b.String(), "oss.dat")
	if err != nil {
		return err
	}
	tab := t["oss.dat"]
	tm, v, i := tab.Cols[0], mustCol(tab, "v(d1)"), mustCol(tab, "i(vd1)")
	if tm == nil || v == nil || i == nil {
		return fmt.Errorf("missing columns in %v", tab.Names)
	}
	var qq, e float64
	for k := 1; k < len(tm); k++ {
		dt := tm[k] - tm[k-1]
		i0, i1 := -i[k-1], -i[k]
		qq += 0.5 * (i0 + i1) * dt
		e += 0.5 * (v[k-1]*i0 + v[k]*i1) * dt
	}
	if !(qq > 0 && e > 0) {
		return fmt.Errorf("Q_oss %g, E_oss %g: want > 0", qq, e)
	}
	ds.Qoss, ds.Eoss = qq, e
	return nil
}

func mustCol(t *Table, n string) []float64 {
	c, err := t.Col(n)
	if err != nil {
		return nil
	}
	return c
}

// switchingTimes: resistive load from TswVdd at TswId, gate driven from
// 0 to TswVgs through the generator and external resistances. tr and tf are
// the 10-90 % times of the drain current (IEC 60747-8 switching times).
func switchingTimes(ctx context.Context, r *Runner, m *Model, u *dut, ds *Datasheet) error {
	rtot := ds.TswRg + ds.TswRgen + u.rg
	ton := 40*rtot*u.cin + 40*rtot*u.cgd*ds.TswVdd/ds.TswVgs + 20e-9
	const delay = 5e-9
	tstop := delay + 2*ton
	var b strings.Builder
	b.WriteString("* switching times, resistive load\n")
	b.WriteString(u.card)
	b.WriteString(optionsLine)
	fmt.Fprintf(&b, "vdd dd 0 dc %s\nrl dd d1 %s\n"+u.inst("1", "d1", "g1", "0"), num(ds.TswVdd), num(ds.TswVdd/ds.TswId))
	fmt.Fprintf(&b, "vgen p 0 pulse(0 %s %s %s %s %s %s)\nrgen p gx %s\nrgx gx g1 %s\n",
		num(ds.TswVgs), num(delay), num(edge), num(edge), num(ton), num(4*ton), num(ds.TswRgen), num(ds.TswRg))
	fmt.Fprintf(&b, ".control\n%stran %s %s 0 %s\nwrdata tsw.dat v(d1) v(g1)\nquit 0\n.endc\n.end\n",
		deckPrologue, num(tstop/20000), num(tstop), num(tstop/20000))
	t, err := u.run(ctx, r, m.Name+" switching times", b.String(), "tsw.dat")
	if err != nil {
		return err
	}
	tab := t["tsw.dat"]
	tm, vd := tab.Cols[0], mustCol(tab, "v(d1)")
	if vd == nil {
		return fmt.Errorf("missing v(d1)")
	}
	id := make([]float64, len(vd))
	imax := 0.0
	for k := range vd {
		id[k] = (ds.TswVdd - vd[k]) / (ds.TswVdd / ds.TswId)
		if tm[k] < delay+ton {
			imax = math.Max(imax, id[k])
		}
	}
	cross := func(from float64, level float64, up bool) (float64, bool) {
		for k := 1; k < len(tm); k++ {
			if tm[k] <= from {
				continue
			}
			if up && id[k-1] < level && id[k] >= level || !up && id[k-1] > level && id[k] <= level {
				return tm[k-1] + (tm[k]-tm[k-1])*(level-id[k-1])/(id[k]-id[k-1]), true
			}
		}
		return 0, false
	}
	i10, i90 := 0.1*imax, 0.9*imax
	a, ok1 := cross(delay, i10, true)
	z, ok2 := cross(delay, i90, true)
	c, ok3 := cross(delay+ton, i90, false)
	d, ok4 := cross(delay+ton, i10, false)
	if !(ok1 && ok2 && ok3 && ok4) {
		return fmt.Errorf("drain current did not cross 10 %% and 90 %% of %.3g A on both edges", imax)
	}
	ds.Tr, ds.Tf = z-a, d-c
	ds.TswTdOn, ds.TswTdOff = a-delay, c-(delay+ton)
	return nil
}
