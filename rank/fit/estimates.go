package fit

import (
	"bytes"
	"math"
	"swrank/devices"
	q "swrank/devices/quantity"
	"swrank/rank/loss"
)

// This file holds the conservative estimates that stand in for missing
// datasheet values. Unknown is not zero: a blank cell never makes a part
// look better than its complete row would, so each estimate sits at the
// unfavourable end of what the trade sees for the part's technology or
// package (docs/library.md, "Estimates for missing values", gives the
// table). The evaluation sets an estimate's flag (EstimateFlags) where it
// uses the estimate, so that a result counts only the estimates its
// operating point rests on.

// PackageFamily holds the common-practice ranges of one family of
// packages: the top of each range is the estimate used when the part's own
// value is missing. Values are common practice, from memory of typical
// datasheets and application measurements; they bound the usual parts of
// the family, not every part.
type PackageFamily struct {
	// Name is the family as docs/library.md lists it.
	Name string
	// Match holds lower-case fragments of the package column (spaces,
	// dashes and dots removed) that select the family; the first family
	// with a matching fragment wins.
	Match []string
	// RthJC is the junction-to-case range, K/W; RthJA the junction to
	// ambient on a typical board without heatsink, K/W.
	RthJC, RthJA [2]q.ThermalResistance
	// Lcs is the range of the package's common-source inductance, Lloop of
	// its share of the power loop, H.
	Lcs, Lloop [2]q.Inductance
}

// packageFamilies lists the package families, most specific first
// (read-only). The last entry, with no Match, stands for a part whose
// package is not given or not recognised: leaded-package values for the
// inductances. docs/library.md prints the table.
var packageFamilies = [...]PackageFamily{
	{"small leaded (SOT-23, SC-70)", []string{"sot23", "sot323", "sc70", "sot363"}, kw(20, 150), kw(100, 400), nH(0.5, 1.5), nH(1, 3)},
	{"leadless 2×2 to 3.3×3.3 mm (DFN, QFN)", []string{"dfn2x2", "dfn3x3", "qfn3x3", "dfn33x33", "qfn33x33", "pqfn33", "dfn3"}, kw(1, 6), kw(40, 80), nH(0.1, 0.5), nH(0.3, 1)},
	{"leadless 5×6 mm (DFN, QFN, power SO-8)", []string{"dfn5x6", "qfn5x6", "pqfn56", "so8fl", "powerso8", "dfn5"}, kw(0.5, 3), kw(30, 70), nH(0.2, 0.7), nH(0.5, 1.5)},
	{"leadless 8×8 mm and larger (DFN, TOLL)", []string{"dfn8x8", "qfn8x8", "toll", "tolt", "dfn8"}, kw(0.2, 1.5), kw(25, 60), nH(0.2, 1), nH(0.5, 2)},
	{"land-grid and chip-scale (LGA, BGA, CSP)", []string{"lga", "bga", "csp", "wlcsp"}, kw(0.3, 4), kw(30, 80), nH(0.02, 0.1), nH(0.1, 0.4)},
	{"DPAK (TO-252)", []string{"dpak", "to252"}, kw(0.8, 4), kw(40, 90), nH(1, 2.5), nH(2, 5)},
	{"D²PAK (TO-263)", []string{"d2pak", "to263"}, kw(0.4, 2), kw(35, 65), nH(2, 4), nH(4, 8)},
	{"TO-247 and TO-220 with a Kelvin source (4 pins)", []string{"to2474", "to2204", "to2637"}, kw(0.2, 1.5), kw(30, 65), nH(0.2, 1), nH(6, 15)},
	{"TO-220", []string{"to220"}, kw(0.4, 4), kw(50, 65), nH(4, 7), nH(6, 12)},
	{"TO-247", []string{"to247"}, kw(0.2, 1.5), kw(30, 45), nH(5, 10), nH(8, 15)},
	{"not given or not recognised", nil, kw(0, 0), kw(0, 0), nH(0, 10), nH(0, 15)},
}

// nH is a range of inductances in nanohenries; kw of thermal
// resistances in K/W.
func nH(a, b float64) [2]q.Inductance {
	return [2]q.Inductance{q.Inductance(a * 1e-9), q.Inductance(b * 1e-9)}
}
func kw(a, b float64) [2]q.ThermalResistance {
	return [2]q.ThermalResistance{q.ThermalResistance(a), q.ThermalResistance(b)}
}

// FamilyOf returns the package family of package name pkg (the last,
// unrecognised family when no fragment matches) and whether it was
// recognised. It allocates nothing (it runs for every part of a library).
func FamilyOf(pkg string) (PackageFamily, bool) {
	var buf [64]byte
	var has [4]uint64 // the bytes the key holds, one bit each
	key := buf[:0]
	for i := 0; i < len(pkg) && len(key) < len(buf); i++ {
		c := pkg[i]
		switch {
		case c == ' ' || c == '-' || c == '.' || c == '_' || c == '/':
			continue
		case 'A' <= c && c <= 'Z':
			c += 'a' - 'A'
		}
		key = append(key, c)
		has[c>>6] |= 1 << (c & 63)
	}
	if len(key) > 0 {
		for i := range packageFamilies[:len(packageFamilies)-1] {
			for _, m := range packageFamilies[i].Match {
				// A fragment whose first byte the key lacks cannot be in it.
				if has[m[0]>>6]&(1<<(m[0]&63)) != 0 && bytes.Contains(key, []byte(m)) {
					return packageFamilies[i], true
				}
			}
		}
	}
	return packageFamilies[len(packageFamilies)-1], false
}

// Technology estimates (common practice, from memory of datasheets).
const (
	// Internal gate resistance when rg_int is blank, Ω: silicon 0.5-3 Ω,
	// SiC 1-5 Ω, GaN 0.3-1 Ω (the high end; the low end in the twin).
	rgIntSi  q.Resistance = 3
	rgIntSiC q.Resistance = 5
	rgIntGaN q.Resistance = 1
	rgIntLow q.Resistance = 0.3
	// Recovered charge when qrr is blank, as a multiple of the output
	// charge at the output-capacitance test voltage: low-voltage silicon
	// (≤ 40 V) 0.5-3×, higher-voltage silicon up to about 8×, SiC body
	// diodes 0.3-3×.
	qrrPerQossSiLV = 3.0
	qrrPerQossSiHV = 8.0
	qrrPerQossSiC  = 3.0
	// Soft-switching output-capacitance hysteresis when eoss_loss is
	// blank, as a fraction of the energy stored at the swing: reported
	// 2-20 % for superjunction, GaN and SiC parts.
	hysteresisFraction = 0.2
	// Dynamic on-resistance factor of a GaN part when rds_dyn is blank.
	rdsDynGaN = 1.4
	// The recovery test's rate when qrr_didt is blank, A/s.
	qrrDidtTest q.Slew = 100e6
)

// estimate fills the values the part leaves blank with their conservative
// estimates and sets the flags that say so. It runs after the laws are
// fitted (it needs the output-capacitance law and the threshold).
func (d *Device) estimate() {
	p := d.Part
	fam, known := FamilyOf(p.Package)
	d.Family, d.FamilyKnown = fam.Name, known

	// Thermal path: the part's values, else the top of its package family;
	// with neither, evaluation takes the junction at tj_max.
	d.RthJC, d.RthJA = p.RthJC, p.RthJA
	if !d.RthJC.OK && known {
		d.RthJC = q.Some(fam.RthJC[1])
	}
	if !d.RthJA.OK && known {
		d.RthJA = q.Some(fam.RthJA[1])
	}

	// Package parasitics.
	if !p.Lcs.OK {
		d.Lcs = fam.Lcs[end(d.Low)]
	}
	if !p.Lloop.OK {
		d.Lloop = fam.Lloop[1]
	}

	// Recovered charge of a body diode, from the output charge.
	if qrr, _ := d.qrrGiven(); p.Technology != devices.GaN && !qrr.OK {
		k := qrrPerQossSiHV
		switch {
		case p.Technology == devices.SiC:
			k = qrrPerQossSiC
		case p.VdsMax <= 40:
			k = qrrPerQossSiLV
		}
		d.QrrEst = q.Charge(k * float64(d.Oss.Q(d.OssV)))
		d.Qrr = QrrLawOf(d.QrrEst)
	}

	// Dynamic on-resistance of a GaN part: 1.4× after blocking 80 % of its
	// rating, the top of the 1.05-1.4× that GaN datasheets state (common
	// practice, from memory); silicon and SiC parts have none.
	if p.Technology == devices.GaN && !p.RdsDyn.OK {
		d.DynK, d.DynV = rdsDynGaN, 0.8*p.VdsMax
	}

	// The recovery test's conditions, for moving the charge to the working
	// current and di/dt: the datasheet's, else the unfavourable ends of
	// the usual test (a quarter of id_max, 100 A/µs; common practice, from
	// memory: datasheets test at 0.25-1 × id_max and 100-500 A/µs). A lower
	// test current and a slower test rate fit a longer lifetime, which
	// moves more charge to a faster, larger commutation.
	// A figure that holds the output charge at a stated test voltage is
	// fitted without it.
	if p.Technology != devices.GaN && d.Qrr.Q0 > 0 {
		if bool(p.QrrHasCoss) && p.QrrVr.OK {
			d.QrrCoss = d.Oss.Q(p.QrrVr.V)
		}
		d.QrrIf, d.QrrDidt = p.QrrIf.Or(p.IdMax/4), p.QrrDidt.Or(qrrDidtTest)
		d.QrrTau, _ = loss.FitRecoveryLifetime(max(0, d.Qrr.At(25)-d.QrrCoss), d.QrrIf, d.QrrDidt)
		if d.QrrTau > 0 {
			d.QrrFit = loss.RecoveredCharge(d.QrrTau, d.QrrIf, d.QrrDidt)
		}
	}

	// Soft-switching hysteresis: a fraction of the stored energy.
	if !(p.EossLoss.OK && p.EossLossVds.OK) {
		d.HysteresisFraction = hysteresisFraction
	}
}

// end is the index of a range's end an estimate takes: the top (1), or
// the bottom (0) in the low twin.
func end(low bool) int {
	if low {
		return 0
	}
	return 1
}

// rgIntEstimate is the internal gate resistance taken for a blank rg_int:
// the technology's high end, or the low end in the low twin.
func rgIntEstimate(t devices.Technology, low bool) q.Resistance {
	if low {
		return rgIntLow
	}
	switch t {
	case devices.GaN:
		return rgIntGaN
	case devices.SiC:
		return rgIntSiC
	}
	return rgIntSi
}

// QrrLawOf is the recovery law of a charge q25 at 25 °C with the default
// rise with temperature (loss.QrrRisePerK).
func QrrLawOf(q25 q.Charge) loss.QrrLaw { return loss.FitQrrLaw(q25, 25, 0, 0, false) }

// Gate-charge estimates, as fractions of the total gate charge Qg at
// qg_vgs: the gate-source charge to the plateau and the Miller charge at
// the top of what datasheets show (Qgs 0.15-0.4·Qg, Qgd 0.15-0.35·Qg;
// common practice, from memory), so that the edges are not made faster
// than the part's.
const (
	qgsPerQg    = 0.4
	qgdPerQg    = 0.35
	qgsPerQgLow = 0.15 // the low twin's ends
	qgdPerQgLow = 0.15
)

// plateauOverdrive is the plateau's height above the threshold taken
// when v_plateau is blank, V: about 1 V for silicon and GaN, 4 V for SiC
// at the usual test currents (common practice, from memory).
// The low twin takes the other side: 2 V, and 6 V for SiC.
func plateauOverdrive(t devices.Technology, low bool) q.Voltage {
	od := q.Voltage(1)
	if t == devices.SiC {
		od = 4
	}
	if low {
		od *= 2
		if t == devices.SiC {
			od = 6
		}
	}
	return od
}

// gateChargeEstimates returns the gate-source charge, the Miller charge
// and the plateau of the gate-charge curve: the part's values, or their
// estimates, flagged (FlagGateChargeEstimated, FlagPlateauEstimated).
// Estimated charges keep Qgs + Qgd within 90 % of Qg.
func (d *Device) gateChargeEstimates() (qgs, qgd q.Charge, vpl q.Voltage) {
	p := d.Part
	qgs, qgd = p.Qgs.V, p.Qgd.V
	room := 0.9 * p.Qg
	fs, fd := q.Charge(qgsPerQg), q.Charge(qgdPerQg)
	if d.Low {
		fs, fd = qgsPerQgLow, qgdPerQgLow
	}
	vpl = d.plateau(p.VgsTh + plateauOverdrive(p.Technology, d.Low))
	if !p.Qgs.OK && p.QgTh.OK && p.VgsTh > 0 {
		// The charge to the threshold fixes Cgs: Qgs = Qth·Vpl/Vth, the
		// same constant-Cgs rule that estimates qg_th from qgs.
		fs = p.QgTh.V * q.Charge(vpl/p.VgsTh) / p.Qg
	}
	switch {
	case !p.Qgs.OK && !p.Qgd.OK:
		qgs, qgd = fs*p.Qg, fd*p.Qg
	case !p.Qgs.OK:
		qgs = min(fs*p.Qg, max(room-qgd, 0.05*p.Qg))
	case !p.Qgd.OK:
		qgd = min(fd*p.Qg, max(room-qgs, 0.05*p.Qg))
	}
	if !p.Qgs.OK || !p.Qgd.OK {
		d.Flags |= FlagGateChargeEstimated
	}
	return qgs, qgd, vpl
}

// plateau is the Miller plateau at the gate-charge test's current d.QgId:
// the part's v_plateau; else, from its transconductance gfs at gfs_id,
// the square-law channel's gate voltage for that current,
//
//	V_pl = V_th + 2·√(I_qg·I_gfs)/g_fs
//
// with V_th the square-law channel's extrapolated threshold d.VthSq (the
// datasheet's vgs_th when vgs_th_id is blank; thresholdFromGfs)
// (g_fs = 2·I/(V_gs − V_th) at the gfs test, so V_gs − V_th = 2·I_gfs/g_fs
// there, scaled with √I; Sze & Ng, Physics of Semiconductor Devices, 3rd
// ed., 2007, ch. 6, saturation); else the estimate est, flagged.
func (d *Device) plateau(est q.Voltage) q.Voltage {
	p := d.Part
	switch {
	case p.VPlateau.OK:
		return p.VPlateau.V
	case p.Gfs.OK && p.GfsId.OK && p.Gfs.V > 0 && p.GfsId.V > 0 && d.QgId > 0:
		return d.VthSq + q.Voltage(2*math.Sqrt(float64(d.QgId)*float64(p.GfsId.V))/float64(p.Gfs.V))
	}
	d.Flags |= FlagPlateauEstimated
	return est
}

// The exponents of a one-point output-capacitance law C = K·v^(−N): from a
// capacitance alone, N = 2/3 puts Q_oss(V0) at 3·C(V0)·V0, the top of the
// 2-3× that trench and superjunction parts show (the twin: the √ law, 2×);
// from a charge or an energy alone, N = 0.75 (E_oss = 0.2·Q·V: most of the
// charge at low voltage) with the twin at N = 0.2 (E_oss = 0.44·Q·V), the
// two ends of the usual 0.2-0.45 (common practice, from memory).
const (
	fromCapacitance = iota
	fromCharge
)

func ossExponent(from int, low bool) float64 {
	switch {
	case from == fromCapacitance && !low:
		return 2.0 / 3
	case from == fromCharge && low:
		return 0.2
	case from == fromCharge:
		return 0.75
	}
	return 0.5
}

// bracketed reports whether the part leaves blank a value whose estimate
// has no unfavourable end (see Prepare and the twins Alt), of the gate and
// of the capacitances.
func (d *Device) bracketed() (gate, caps bool) {
	p := d.Part
	gate = !p.RgInt.OK || !p.Lcs.OK || !(p.VgsThHot.OK && p.VgsThHotTj.OK) ||
		d.Flags&(FlagGateChargeEstimated|FlagPlateauEstimated) != 0
	caps = d.Flags&FlagOssSqrtLaw != 0 || d.Method == MethodGateCharge && !d.HasMiller
	return gate, caps
}

// MillerChargeAt is the Miller charge moved by a swing from 0 to v: from
// the fitted Cgd law when the part gives crss, else from Qgd alone, the
// whole charge below its test voltage (loss.MillerChargeAt), or in the low
// twin the √ law (loss.MillerChargeSqrt).
func (d *Device) MillerChargeAt(v q.Voltage) q.Charge {
	if d.HasMiller {
		return d.Miller.Charge(v)
	}
	if d.LowCap {
		return loss.MillerChargeSqrt(d.Qgd, d.QgVds, v)
	}
	return loss.MillerChargeAt(d.Qgd, d.QgVds, v)
}

// hotPointLaw is the on-resistance temperature law through the reference
// point (t0, 1) and one hot point (t1, f1) when the part gives no curve:
// the straight line between them and, beyond them, chords to the power law
// of exponent alpha through the same points 100 K away. A power law in
// absolute temperature is convex, so the chords lie on its unfavourable
// side: a missing curve never makes the part cooler-running than the law
// the two points fit.
func hotPointLaw(t0 q.Temperature, alpha float64, t1 q.Temperature, f1 float64) loss.TempLaw {
	pw := func(t q.Temperature) float64 { return loss.TempFactor(t, t0, alpha) }
	lo, hi := min(t0, t1), max(t0, t1)
	l := loss.TempLaw{T0: t0, Alpha: alpha, NPts: 4}
	l.Pts = [8][2]float64{{float64(lo - 100), pw(lo - 100)}, {float64(t0), 1}, {float64(t1), f1}, {float64(hi + 100), pw(hi + 100)}}
	if t1 < t0 {
		l.Pts[1], l.Pts[2] = [2]float64{float64(t1), f1}, [2]float64{float64(t0), 1}
	}
	l.Prepare()
	return l
}

// qrrGiven is the recovered charge the part gives, and whether it is
// ½·irrm·trr of the same test (qrr blank), the charge of a recovery
// current that rises to irrm and falls back linearly within trr.
//
// Source: the triangular reverse-recovery waveform, Q_rr ≈ ½·I_rrm·t_rr
// (Mohan, Undeland, Robbins, "Power Electronics: Converters, Applications
// and Design", 3rd ed., 2003, ch. 20; from memory).
func (d *Device) qrrGiven() (qrr q.Opt[q.Charge], fromTrr bool) {
	p := d.Part
	if p.Qrr.OK || !(p.Trr.OK && p.Irrm.OK) {
		return p.Qrr, false
	}
	return q.Some(q.Charge(0.5 * float64(p.Irrm.V) * float64(p.Trr.V))), true
}
