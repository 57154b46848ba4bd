// Package synth writes synthetic parts libraries for tests and benchmarks:
// any number of invented, internally consistent parts with most columns of
// devices.Part filled (docs/performance.md lists the blank ones), written
// the way users write values ("4.2 mOhm",
// "12n", "1.1 nF", "100 A/µs"), reproducible from a seed.
package synth

import (
	"bufio"
	"encoding/csv"
	"fmt"
	"io"
	"math"
	"math/rand/v2"
	"strconv"

	"swrank/devices"
)

// class is a voltage class with its technology and typical figures.
type class struct {
	vds  float64 // drain-source rating, V
	tech string  // si, gan or sic
	fom  float64 // Rds(on)·Qg at rated drive, Ω·C (mΩ·nC × 1e-12), centre of a ±30 % band
	rmin float64 // smallest on-resistance in the class, Ω
	rmax float64 // largest on-resistance in the class, Ω
}

// classes spans small-signal silicon to SiC. Figure-of-merit centres are
// common practice, from memory (30 V Si trench ~40 mΩ·nC, 100 V Si ~150,
// 100 V GaN ~18).
var classes = [...]class{
	{20, "si", 40e-12, 2e-3, 60e-3},
	{30, "si", 40e-12, 1e-3, 50e-3},
	{40, "si", 70e-12, 1.5e-3, 60e-3},
	{60, "si", 120e-12, 2.5e-3, 80e-3},
	{80, "si", 160e-12, 3e-3, 80e-3},
	{100, "si", 150e-12, 3e-3, 100e-3},
	{150, "si", 350e-12, 6e-3, 150e-3},
	{40, "gan", 11e-12, 1.5e-3, 30e-3},
	{100, "gan", 18e-12, 2e-3, 40e-3},
	{200, "gan", 45e-12, 8e-3, 100e-3},
	{650, "gan", 300e-12, 30e-3, 300e-3},
	{650, "sic", 2800e-12, 20e-3, 200e-3},
	{1200, "sic", 4300e-12, 30e-3, 300e-3},
}

var syllables = [...]string{"ka", "ro", "mi", "ta", "ve", "lo", "su", "ne", "pa", "di", "fe", "gu", "ho", "ji", "zo", "ba"}

// packages are the generated packages with the ranges their values are
// drawn from: junction to case and to ambient, K/W, common-source and
// power-loop inductance, H. The ranges lie inside the package families of
// docs/library.md (common practice), whose tops are the estimates swrank
// takes for a blank cell; a test holds the two tables together.
var packages = [...]struct {
	name         string
	rthJC, rthJA [2]float64
	lcs, lloop   [2]float64
}{
	{"SOT-23", [2]float64{20, 150}, [2]float64{100, 400}, [2]float64{0.5e-9, 1.5e-9}, [2]float64{1e-9, 3e-9}},
	{"DFN 2x2", [2]float64{1, 6}, [2]float64{40, 80}, [2]float64{0.1e-9, 0.5e-9}, [2]float64{0.3e-9, 1e-9}},
	{"DFN 3x3", [2]float64{1, 6}, [2]float64{40, 80}, [2]float64{0.1e-9, 0.5e-9}, [2]float64{0.3e-9, 1e-9}},
	{"DFN 5x6", [2]float64{0.5, 3}, [2]float64{30, 70}, [2]float64{0.2e-9, 0.7e-9}, [2]float64{0.5e-9, 1.5e-9}},
	{"LGA 2x1.5", [2]float64{0.3, 4}, [2]float64{30, 80}, [2]float64{0.02e-9, 0.1e-9}, [2]float64{0.1e-9, 0.4e-9}},
	{"LGA 4x2.5", [2]float64{0.3, 4}, [2]float64{30, 80}, [2]float64{0.02e-9, 0.1e-9}, [2]float64{0.1e-9, 0.4e-9}},
	{"TO-220", [2]float64{0.4, 4}, [2]float64{50, 65}, [2]float64{4e-9, 7e-9}, [2]float64{6e-9, 12e-9}},
	{"TO-247-4", [2]float64{0.2, 1.5}, [2]float64{30, 65}, [2]float64{0.2e-9, 1e-9}, [2]float64{6e-9, 15e-9}},
	{"D2PAK", [2]float64{0.4, 2}, [2]float64{35, 65}, [2]float64{2e-9, 4e-9}, [2]float64{4e-9, 8e-9}},
}

// Generate writes a header and n parts in CSV to w. The same n and seed give
// the same bytes. Every part passes devices.Validate.
func Generate(w io.Writer, n int, seed int64) error {
	if n < 0 {
		return fmt.Errorf("synth: negative part count %d", n)
	}
	bw := bufio.NewWriterSize(w, 64<<10)
	cw := csv.NewWriter(bw)
	cols := devices.Columns()
	if err := cw.Write(cols); err != nil {
		return fmt.Errorf("synth: %w", err)
	}
	g := gen{rng: rand.New(rand.NewPCG(uint64(seed), 0x5357524e4b)), index: map[string]int{}}
	for i, c := range cols {
		g.index[c] = i
	}
	row := make([]string, len(cols))
	for i := 0; i < n; i++ {
		g.part(i, row)
		if err := cw.Write(row); err != nil {
			return fmt.Errorf("synth: %w", err)
		}
	}
	cw.Flush()
	if err := cw.Error(); err != nil {
		return fmt.Errorf("synth: %w", err)
	}
	if err := bw.Flush(); err != nil {
		return fmt.Errorf("synth: %w", err)
	}
	return nil
}

type gen struct {
	rng   *rand.Rand
	index map[string]int
	row   []string
}

// uni returns a uniform random number in [a, b).
func (g *gen) uni(a, b float64) float64 { return a + (b-a)*g.rng.Float64() }

// logUni returns a log-uniform random number in [a, b).
func (g *gen) logUni(a, b float64) float64 { return a * math.Pow(b/a, g.rng.Float64()) }

func (g *gen) set(col, v string) { g.row[g.index[col]] = v }

// round3 rounds to three significant digits, as values are written.
func round3(v float64) float64 {
	if v == 0 {
		return 0
	}
	e := math.Floor(math.Log10(math.Abs(v))) - 2
	p := math.Pow(10, e)
	return math.Round(v/p) * p
}

// spellings of each unit: symbol, ASCII alternative (or "").
var units = map[string][2]string{
	"V": {"V", ""}, "A": {"A", ""}, "Ω": {"Ω", "Ohm"}, "F": {"F", ""}, "C": {"C", ""},
	"s": {"s", ""}, "J": {"J", ""}, "H": {"H", ""}, "K/W": {"K/W", "°C/W"},
}

// si writes v (already rounded) with an SI prefix in one of the ways users
// write it: "4.2 mΩ", "4.2 mOhm", "4.2m", "4.2e-3" (style chosen at random).
func (g *gen) si(v float64, unit string) string { return siStyle(v, unit, g.rng.IntN(8)) }

// siStyle writes v in the style of si numbered style (0-7).
func siStyle(v float64, unit string, style int) string {
	if style == 0 {
		return strconv.FormatFloat(v, 'g', 3, 64)
	}
	exp := 0
	if v != 0 {
		exp = int(math.Floor(math.Log10(math.Abs(v))/3)) * 3
		exp = max(-15, min(exp, 9))
	}
	m := v / math.Pow(10, float64(exp))
	if math.Abs(m) >= 999.5 {
		exp += 3
		m /= 1000
	}
	num := strconv.FormatFloat(m, 'f', -1, 64)
	if len(num) > 6 {
		num = strconv.FormatFloat(m, 'g', 3, 64)
	}
	p := map[int]string{-15: "f", -12: "p", -9: "n", -6: "µ", -3: "m", 0: "", 3: "k", 6: "M", 9: "G"}[exp]
	sp := units[unit]
	switch {
	case style <= 2:
		if p == "" && unit != "Ω" {
			return num + " " + sp[0]
		}
		return num + p // bare prefix: "12n"
	case style <= 4 && sp[1] != "":
		if p == "µ" {
			p = "u"
		}
		return num + " " + p + sp[1]
	}
	return num + " " + p + sp[0]
}

func (g *gen) part(i int, row []string) {
	g.row = row
	c := classes[g.rng.IntN(len(classes))]
	name := fmt.Sprintf("%s%s%s-%d", syllables[g.rng.IntN(len(syllables))], syllables[g.rng.IntN(len(syllables))],
		syllables[g.rng.IntN(len(syllables))], i+1)
	g.set("part", name)
	pkg := &packages[g.rng.IntN(len(packages))]
	g.set("package", pkg.name)
	tech := c.tech
	if g.rng.IntN(4) == 0 {
		tech = map[string]string{"si": "Si", "gan": "GaN", "sic": "SiC"}[tech]
	}
	g.set("technology", tech)
	g.set("notes", fmt.Sprintf("synthetic %g V %s part", c.vds, c.tech))
	g.set("price", strconv.FormatFloat(g.logUni(0.05, 12), 'g', 3, 64))

	// Ratings and gate.
	vds := c.vds
	rds := round3(g.logUni(c.rmin, c.rmax))
	var vgsMax, vgsMin, vgs1, vgs2, vth, vqg, tjMax, rg, vsd float64
	switch c.tech {
	case "gan":
		vgsMax, vgsMin, vgs1, vgs2, vqg, tjMax = 6, -4, 5, 4, 5, 150
		vth, rg, vsd = round3(g.uni(1.1, 1.7)), round3(g.uni(0.3, 0.8)), round3(g.uni(1.6, 2.4))
	case "sic":
		vgsMax, vgsMin, vgs1, vgs2, vqg, tjMax = 22, -8, 18, 15, 18, 175
		vth, rg, vsd = round3(g.uni(2.5, 3.5)), round3(g.uni(1.5, 4)), round3(g.uni(3.3, 4.2))
	default:
		vgsMax, vgsMin, vgs1, vgs2, vqg, tjMax = 20, -20, 10, 4.5, 10, 150+25*float64(g.rng.IntN(2))
		vth, rg, vsd = round3(g.uni(1.2, 3.2)), round3(g.uni(0.5, 3)), round3(g.uni(0.7, 0.95))
	}
	idMax := round3(math.Min(300, math.Sqrt(g.uni(10, 30)/rds))) // a few watts of conduction loss at the rating
	g.set("vds_max", g.si(vds, "V"))
	g.set("id_max", g.si(idMax, "A"))
	g.set("id_pulse", g.si(round3(idMax*g.uni(3, 5)), "A"))
	g.set("vgs_max", g.si(vgsMax, "V"))
	g.set("vgs_min", g.si(vgsMin, "V"))
	g.set("tj_max", strconv.FormatFloat(tjMax, 'f', -1, 64)+" °C")
	g.set("rth_ja", g.si(round3(g.uni(pkg.rthJA[0], pkg.rthJA[1])), "K/W"))
	g.set("rth_jc", g.si(round3(g.uni(pkg.rthJC[0], pkg.rthJC[1])), "K/W"))
	g.set("vgs_th", g.si(vth, "V"))
	g.set("vgs_th_max", g.si(round3(vth*g.uni(1.2, 1.5)), "V"))
	g.set("vgs_th_hot", g.si(round3(vth*g.uni(0.6, 0.8)), "V"))
	g.set("vgs_th_hot_tj", "125")

	// On-resistance.
	g.set("rds_on", g.si(rds, "Ω"))
	g.set("rds_on_vgs", g.si(vgs1, "V"))
	g.set("rds_on_tj", "25")
	g.set("rds_on_max", g.si(round3(rds*g.uni(1.15, 1.35)), "Ω"))
	g.set("rds_on2", g.si(round3(rds*g.uni(1.1, 1.45)), "Ω"))
	g.set("rds_on2_vgs", g.si(vgs2, "V"))
	hot := g.uni(1.4, 1.9)
	g.set("rds_on_hot", g.si(round3(rds*hot), "Ω"))
	g.set("rds_on_hot_tj", "125 °C")
	g.set("rds_on_curve", fmt.Sprintf("25:1 75:%.3g 125:%.3g 150:%.3g", 1+(hot-1)*0.5, hot, 1+(hot-1)*1.25))
	dyn := 1.0
	if c.tech == "gan" {
		dyn = round3(g.uni(1.05, 1.4))
	}
	g.set("rds_dyn", strconv.FormatFloat(dyn, 'f', -1, 64))
	g.set("rds_dyn_vds", g.si(round3(0.8*vds), "V"))

	// Gate charge (see docs/demo-library.md for the relations).
	qg := round3(c.fom / rds * g.uni(0.75, 1.3))
	vpl := round3(vth + g.uni(0.7, 1.6))
	if c.tech == "sic" {
		vpl = round3(vth + g.uni(4, 5.5))
	}
	qgd := qg * g.uni(0.18, 0.3)
	ciss := (qg - qgd) / (0.95*vpl + 1.2*(vqg-vpl))
	qgs := 0.95 * ciss * vpl
	g.set("qg", g.si(qg, "C"))
	g.set("qg_vgs", g.si(vqg, "V"))
	g.set("qg_vds", g.si(vds/2, "V"))
	g.set("qg_id", g.si(round3(idMax/2), "A"))
	g.set("qg_max", g.si(round3(qg*g.uni(1.2, 1.4)), "C"))
	g.set("qgs", g.si(round3(qgs), "C"))
	g.set("qgd", g.si(round3(qgd), "C"))
	g.set("qg_th", g.si(round3(qgs*vth/vpl), "C"))
	g.set("v_plateau", g.si(vpl, "V"))
	g.set("rg_int", g.si(rg, "Ω"))

	// Capacitances and output charge at half the rating.
	v := vds / 2
	crss := qgd / (g.uni(2, 4) * v)
	qoss := qg * g.uni(0.8, 3)
	coss := qoss / (g.uni(2, 3) * v)
	g.set("ciss", g.si(round3(ciss), "F"))
	g.set("coss", g.si(round3(coss), "F"))
	g.set("crss", g.si(round3(math.Min(crss, 0.5*coss)), "F"))
	g.set("cap_vds", g.si(v, "V"))
	eoss := qoss * v * g.uni(0.28, 0.42)
	g.set("qoss", g.si(round3(qoss), "C"))
	g.set("eoss", g.si(round3(eoss), "J"))
	g.set("oss_vds", g.si(v, "V"))
	g.set("eoss_loss", g.si(round3(eoss*g.uni(0.02, 0.15)), "J"))
	g.set("eoss_loss_vds", g.si(v, "V"))

	// Switching times at the gate-charge test point.
	rgen, rext := 2.0, round3(g.uni(1, 10))
	ig := (vqg - vpl) / (rgen + rext + rg)
	g.set("tr", g.si(round3(qgd/ig*g.uni(0.9, 1.3)), "s"))
	g.set("tf", g.si(round3(qgd/(vpl/(rgen+rext+rg))*g.uni(0.9, 1.3)), "s"))
	g.set("tsw_vdd", g.si(v, "V"))
	g.set("tsw_id", g.si(round3(idMax/2), "A"))
	g.set("tsw_vgs", g.si(vqg, "V"))
	g.set("tsw_rg", g.si(rext, "Ω"))
	g.set("tsw_rgen", g.si(rgen, "Ω"))

	// Reverse conduction.
	g.set("vsd", g.si(vsd, "V"))
	g.set("vsd_if", g.si(round3(idMax/2), "A"))
	g.set("vsd_hot", g.si(round3(vsd*g.uni(0.75, 0.9)), "V"))
	g.set("vsd_hot_tj", "125")
	qrr := 0.0
	if c.tech != "gan" {
		qrr = round3(qg * g.uni(0.5, 3))
	}
	g.set("qrr", g.si(qrr, "C"))
	g.set("qrr_if", g.si(round3(idMax/2), "A"))
	if g.rng.IntN(2) == 0 {
		g.set("qrr_didt", "100 A/µs")
	} else {
		g.set("qrr_didt", "5e8 A/s")
	}
	g.set("qrr_tj", "25")
	g.set("qrr_hot", g.si(round3(qrr*g.uni(1.5, 2.5)), "C"))
	g.set("qrr_hot_tj", "125")
	if g.rng.IntN(2) == 0 {
		g.set("qrr_includes_coss", "yes")
	} else {
		g.set("qrr_includes_coss", "no")
	}
	g.set("l_cs", g.si(round3(g.logUni(pkg.lcs[0], pkg.lcs[1])), "H"))
	g.set("l_loop", g.si(round3(g.logUni(pkg.lloop[0], pkg.lloop[1])), "H"))

	g.gatePoints(i, c.tech, idMax, vqg, vpl, qgs, qgd, ciss)
}

// gatePoints fills the test currents of the threshold and the
// on-resistance and the second total gate charge from the row's other
// values, drawing nothing from the random stream (the rows generated
// before these columns existed stay the same bytes); the spelling style
// follows the part's index.
//
// vgs_th_id is 250 µA for silicon and a few mA for GaN and SiC (common
// practice, from memory); rds_on_id is half of id_max (the other tests'
// current); qg2 lies on the row's straight gate curve above the plateau
// (slope 1.2·Ciss, see the gate charge above) at qg2_vgs, the first 0.5 V
// step from 45 % of qg_vgs (4.5 V at 10 V) at least 0.5 V above the
// plateau.
func (g *gen) gatePoints(i int, tech string, idMax, vqg, vpl, qgs, qgd, ciss float64) {
	ith := map[string]float64{"si": 250e-6, "gan": 2e-3, "sic": 5e-3}[tech]
	v2 := math.Round(0.45*vqg*2) / 2
	for v2 < vpl+0.5 {
		v2 += 0.5
	}
	qg2 := round3(qgs) + round3(qgd) + 1.2*ciss*(v2-vpl)
	g.set("vgs_th_id", siStyle(ith, "A", i%8))
	g.set("rds_on_id", siStyle(round3(idMax/2), "A", (i+1)%8))
	g.set("qg2", siStyle(round3(qg2), "C", (i+2)%8))
	g.set("qg2_vgs", siStyle(v2, "V", (i+3)%8))
}
