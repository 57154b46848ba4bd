package loss

import (
	"math"
	"testing"

	q "swrank/devices/quantity"
	"swrank/rank/internal/testkit"
)

func fitMiller(t *testing.T, d MillerData) MillerLaw {
	t.Helper()
	m, err := FitMillerLaw(d)
	if err != nil {
		t.Fatal(err)
	}
	return m
}

// With m = 0 the law is the two-constant knee law: it keeps the
// datasheet's Qgd at its test voltage and Crss above the knee (by
// construction; Baliga 2008 for the shape of Cgd(v)).
func TestFitMillerLawKnee(t *testing.T) {
	m := fitMiller(t, MillerData{Qgd: 8e-9, VQg: 15, Knee: 2.8, Crss: []CapPoint{{25, 120e-12}}, VMax: 30})
	testkit.Near(t, "Q(15 V)", float64(m.Charge(15)), 8e-9, 1e-12)
	testkit.Near(t, "C above", float64(m.C(20)), 120e-12, 1e-12)
	// Hand: Clo = (8 nC − 120 pF·12.2 V)/2.8 V = 2.334 nF.
	testkit.Near(t, "Cox", float64(m.Oxide()), (8e-9-120e-12*12.2)/2.8, 1e-12)
	testkit.Near(t, "Q(10 V)", float64(m.Charge(10)), 8e-9-120e-12*5, 1e-12)
}

// The depletion law keeps Qgd at its test voltage exactly, and Crss at its
// test voltage in the drain-gate voltage (the gate at the source), to the
// segment's spread; its charge above the knee follows the closed form of
// C = C1·((φ + U1)/(φ + u))^m, ∫ = C1·(φ + U1)^m·[(φ + u)^(1−m)]/(1 − m)
// (Sze & Ng 2007, ch. 2, the junction law integrated by hand).
func TestFitMillerLawDepletion(t *testing.T) {
	d := MillerData{Qgd: 6e-9, VQg: 50, Knee: 4, Crss: []CapPoint{{50, 40e-12}}, M: 0.5, Phi: 0.7, VMax: 100}
	m := fitMiller(t, d)
	testkit.Near(t, "Q(50 V)", float64(m.Charge(50)), 6e-9, 1e-12)
	if m.Exponent() != 0.5 {
		t.Fatalf("exponent %g, want 0.5 (Qgd leaves room)", m.Exponent())
	}
	// Charge between 20 V and 40 V of the plateau: u from 16 to 36 V.
	k := 40e-12 * math.Sqrt(50.7)
	want := k * 2 * (math.Sqrt(36.7) - math.Sqrt(16.7))
	// Exact at the segments' bounds, within 1 % between them.
	testkit.Near(t, "Q(40)−Q(20)", float64(m.Charge(40)-m.Charge(20)), want, 1e-2)
	// Crss at u = 50 V (v = 54 V) within one segment's spread of 40 pF.
	if c := float64(m.C(54)); math.Abs(c/40e-12-1) > 0.19 {
		t.Errorf("C at the test's drain-gate voltage %.4g F, want 40 pF ± 19 %%", c)
	}
	// Cox from the charge balance: (Qgd − ∫₀^46 C du)/4 V.
	cox := (6e-9 - k*2*(math.Sqrt(46.7)-math.Sqrt(0.7))) / 4
	testkit.Near(t, "Cox", float64(m.Oxide()), cox, 1e-9)
	// The constant law (m = 0) holds less charge in the middle of the
	// edge, where the depletion law puts it: its moment is smaller.
	d0 := d
	d0.M = 0
	m0 := fitMiller(t, d0)
	if !(m.moment(50) > m0.moment(50)) {
		t.Errorf("moment at 50 V: depletion %.4g ≤ constant %.4g", m.moment(50), m0.moment(50))
	}
}

// Two Crss points set the exponent between them, and Qgd that leaves no
// room for the depletion law lowers the exponent below the first point
// until the oxide value meets the law at the knee (Cox ≥ C(0)).
func TestFitMillerLawPoints(t *testing.T) {
	// Points on C = 300 pF·(0.7/(0.7 + u))^0.4.
	c := func(u float64) q.Capacitance { return q.Capacitance(300e-12 * math.Pow(0.7/(0.7+u), 0.4)) }
	m := fitMiller(t, MillerData{Qgd: 20e-9, VQg: 40, Knee: 3, M: 0.5, Phi: 0.7, VMax: 80,
		Crss: []CapPoint{{10, c(10)}, {40, c(40)}}})
	testkit.Near(t, "exponent", m.Exponent(), 0.4, 1e-9)
	testkit.Near(t, "Q(30)−Q(20)", float64(m.Charge(30)-m.Charge(20)),
		300e-12*math.Pow(0.7, 0.4)*(math.Pow(27.7, 0.6)-math.Pow(17.7, 0.6))/0.6, 1e-2)
	testkit.Near(t, "Q at the points", float64(m.Charge(43)-m.Charge(13)),
		300e-12*math.Pow(0.7, 0.4)*(math.Pow(40.7, 0.6)-math.Pow(10.7, 0.6))/0.6, 1e-9)
	// Qgd barely above a constant Crss's share: the exponent falls.
	tight := fitMiller(t, MillerData{Qgd: 2.2e-9, VQg: 50, Knee: 4, Crss: []CapPoint{{50, 40e-12}}, M: 0.5, Phi: 0.7, VMax: 100})
	if e := tight.Exponent(); !(e > 0 && e < 0.5) {
		t.Errorf("exponent %g, want lowered into (0, 0.5)", e)
	}
	testkit.Near(t, "Q(50 V) kept", float64(tight.Charge(50)), 2.2e-9, 1e-9)
	if float64(tight.Oxide()) < float64(tight.C(4.001))*(1-1e-6) {
		t.Errorf("Cox %.4g below the law at the knee %.4g", float64(tight.Oxide()), float64(tight.C(4.001)))
	}
}

// With a constant Cgd the voltage moves at a steady rate, and the integral
// forms reduce to the straight-ramp energies of the gate-charge method
// (Erickson & Maksimović, ch. 4): ½·V·I·t with t = Qgd/Ig. Without
// drain-source capacitance the turn-off's channel keeps the load current
// less the gate current that Cgd carries (Kirchhoff's current law at the
// drain) to the end.
func TestMillerEnergiesReduceToRamp(t *testing.T) {
	c := q.Capacitance(50e-12)
	m := KneeLaw(5, c, c)
	v, i, ig := q.Voltage(40), q.Current(10), q.Current(0.8)
	tv := float64(c) * 40 / 0.8
	testkit.Near(t, "fall", float64(MillerFallEnergy(&m, v, i, ig)), 0.5*40*10*tv, 1e-12)
	e, top := millerRiseEnergy(m, OssLaw{K: 0, N: 0.5}, 1, v, i, ig)
	testkit.Near(t, "rise", float64(e), 0.5*40*(10-0.8)*tv, 1e-12)
	testkit.Near(t, "iTop", float64(top), 10-0.8, 1e-12)
}

// millerRiseEnergy's closed form against a direct numerical integration
// of ∫ v·max(0, (i/ig − 1)·Cgd(v) − Cds(v)) dv (midpoint rule, 10⁶
// steps), Cds = 0.8·Coss, for a √-law and a 0.8-law Coss (Erickson &
// Maksimović ch. 4), the knee law and the depletion law, at voltages
// inside the knee, on a segment's bound and between bounds; and the
// current left at the top, i − ig·(1 + Cds/Cgd).
// At light load the channel is off before the drain moves (Ren et al.
// 2006, from memory): no loss, no current left.
func TestMillerRiseEnergyIntegral(t *testing.T) {
	for _, mm := range []float64{0, 0.5} {
		m := fitMiller(t, MillerData{Qgd: 6e-9, VQg: 24, Knee: 3, Crss: []CapPoint{{24, 40e-12}}, M: mm, Phi: 0.7, VMax: 60})
		for _, n := range []float64{0.5, 0.8} {
			oss := OssFromCapacitance(400e-12, 24, n)
			for _, c := range []struct{ i, ig, v float64 }{{10, 1.2, 48}, {4, 1.2, 48}, {20, 0.5, 48}, {10, 1.2, 2}, {6, 0.8, float64(m.lo[min(5, m.n-1)])}, {6, 0.8, 33.3}} {
				steps := 1000000
				var sum float64
				for k := 0; k < steps; k++ {
					x := (float64(k) + 0.5) * c.v / float64(steps)
					sum += x * math.Max(0, (c.i/c.ig-1)*float64(m.C(q.Voltage(x)))-0.8*float64(oss.C(q.Voltage(x)))) * c.v / float64(steps)
				}
				e, top := millerRiseEnergy(m, oss, 0.8, q.Voltage(c.v), q.Current(c.i), q.Current(c.ig))
				testkit.Near(t, "closed form vs numeric", float64(e), sum, 1e-4)
				wantTop := math.Max(0, c.i-c.ig*(1+0.8*float64(oss.C(q.Voltage(c.v)))/float64(m.C(q.Voltage(c.v)))))
				testkit.Near(t, "current left", float64(top), wantTop, 1e-9)
			}
			e, top := millerRiseEnergy(m, oss, 0.8, 48, 0.05, 1.2)
			if e != 0 || top != 0 {
				t.Errorf("light load: E %v, iTop %v, want 0, 0", e, top)
			}
		}
	}
}

// The law's segments keep the depletion law's charge at every bound (the
// constants are its mean over each segment), are positive, and do not
// rise with the voltage above the knee, for one point, two points, and a
// Qgd that lowers the exponent below the first point (the charge of
// C = C₁·((φ + U₁)/(φ + u))^m integrated by hand, Sze & Ng 2007 ch. 2,
// checked against depletion.charge, which sums the closed form per
// interval between points).
func TestFitMillerLawSegments(t *testing.T) {
	for _, d := range []MillerData{
		{Qgd: 6e-9, VQg: 50, Knee: 4, Crss: []CapPoint{{50, 40e-12}}, M: 0.5, Phi: 0.7, VMax: 100},
		{Qgd: 6e-9, VQg: 15, Knee: 3, Crss: []CapPoint{{3, 300e-12}, {15, 80e-12}}, M: 0.5, Phi: 0.7, VMax: 30},
		{Qgd: 2.5e-9, VQg: 15, Knee: 3, Crss: []CapPoint{{3, 300e-12}, {15, 80e-12}}, M: 0.5, Phi: 0.7, VMax: 30},
		{Qgd: 2.2e-9, VQg: 50, Knee: 4, Crss: []CapPoint{{50, 40e-12}}, M: 0.5, Phi: 0.7, VMax: 1200},
	} {
		m := fitMiller(t, d)
		dep := newDepletion(d)
		dep.mBelow = m.Exponent()
		vk := m.lo[1]
		for k := 1; k < m.n; k++ {
			if !(m.c[k] > 0) || (k > 1 && m.c[k] > m.c[k-1]*(1+1e-12)) {
				t.Errorf("%v: segment %d at %.4g V: C %.4g F after %.4g F", d.Crss, k, m.lo[k], m.c[k], m.c[k-1])
			}
			got := float64(m.Charge(q.Voltage(m.lo[k]))) - float64(m.Oxide())*vk
			testkit.Near(t, "charge at a bound", got, dep.charge(0, m.lo[k]-vk), 1e-9)
		}
	}
}

// The unclamped Miller rise of a class E turn-off by hand, with the
// two-constant law (oxide 1 nF below 3 V, 100 pF above), 3 A against a
// 1 A plateau current (a = 2) into a 500 pF shunt: below 3 V the channel
// keeps 2·1 nF − 500 pF = 1.5 nF per volt of swing, ∫₀³ v·1.5 nF dv =
// 6.75 nJ; above it 2·100 pF < 500 pF, the shunt takes all. With a 200 pF
// shunt: 1.8 nF·3²/2 = 8.1 nJ below 3 V and nothing above (2·100 pF −
// 200 pF = 0); with 100 pF, 1.9 nF·3²/2 plus 100 pF·(10² − 3²)/2 =
// 4.55 nJ up to a 10 V peak (the gate-charge voltage interval with the
// drain's displacement current, Balogh 2001).
func TestMillerShuntRiseEnergy(t *testing.T) {
	law := KneeLaw(3, 1e-9, 100e-12)
	cases := []struct {
		name       string
		shunt      float64
		i, ig, top float64
		want       float64
	}{
		{"oxide region only", 500e-12, 3, 1, 10, 6.75e-9},
		{"at the balance", 200e-12, 3, 1, 10, 1.8e-9 * 9 / 2},
		{"up to the peak", 100e-12, 3, 1, 10, 1.9e-9*9/2 + 100e-12*(100-9)/2},
		{"fast gate", 5e-9, 3, 1, 10, 0},
		{"no plateau current", 500e-12, 3, 0, 10, 0},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			got := MillerShuntRiseEnergy(&law, q.Capacitance(c.shunt), q.Voltage(c.top), q.Current(c.i), q.Current(c.ig))
			testkit.Within(t, "E", float64(got), c.want, 1e-12)
		})
	}
}

// The Miller charge moved while the channel still conducts at a turn-off,
// by hand, with the two-constant law (1 nF below 3 V, 100 pF above) and a
// constant drain-source capacitance (N = 0) of 300 pF, 3 A against a 1 A
// plateau current (a = 2): below 3 V, 2·1 nF > 300 pF, the gate stays on
// its plateau while 3 nC moves; above it 2·100 pF < 300 pF, the drain's
// capacitance takes the whole current and the channel is off, so of the
// 4.2 nC up to 15 V only 3 nC moves on the plateau (the node balance of the
// gate-charge method's voltage interval, Balogh 2001). With a √ law
// Cds = K·v^−½ the crossing in the upper segment is where 2·100 pF = K/√v.
func TestRisePlateauCharge(t *testing.T) {
	law := KneeLaw(3, 1e-9, 100e-12)
	flat := RiseBase(&law, OssLaw{K: 300e-12, N: 0}, 1)
	r := flat.At(&law, 15)
	_, _, qp := r.EnergyCharge(3, 1, nil)
	testkit.Within(t, "plateau charge, constant Cds", float64(qp), 3e-9, 1e-12)
	// √ law with K = 200 pF·√8: the channel conducts again above 8 V.
	sq := RiseBase(&law, OssLaw{K: 200e-12 * math.Sqrt(8), N: 0.5}, 1)
	r2 := sq.At(&law, 15)
	_, _, qp2 := r2.EnergyCharge(3, 1, nil)
	// Below 3 V: 2 nF against K/√v, above K/√3 = 326.6 pF from 3 V down to
	// where K/√v = 2 nF (v = 0.08 V): all of [0.08, 3] and the bit below
	// within riseEps of the segment; above 3 V from 8 V to 15 V.
	want := 1e-9*(3-0.08) + 100e-12*(15-8)
	testkit.Within(t, "plateau charge, √ law", float64(qp2), want, 3e-3)
}
