package fit

import (
	"fmt"
	"math"
	"strings"
	"swrank/devices"
	q "swrank/devices/quantity"
	"swrank/rank/loss"
)

// Technology defaults (used when the CSV leaves a value blank).
const (
	// Temperature exponents of the on-resistance power law in kelvin.
	// Silicon above 60 V: drift-dominated, α ≈ 2.0-2.5 (Baliga 2008);
	// low-voltage trench silicon: effective α ≈ 1.2-1.6 (common practice);
	// GaN: about 2× from 25 to 150 °C (common practice, from memory);
	// SiC: 1.75× from 25 to 175 °C, the top of the 1.3-1.8× SiC
	// datasheets show (common practice, from memory), so the unfavourable
	// end: with the typical 1.4× from 25 to 150 °C (α 0.95) a part that
	// left its hot point blank could rank above the same part with it.
	alphaSiHV                  = 2.3
	alphaSiLV                  = 1.5
	alphaGaN                   = 2.0
	alphaSiC                   = 1.35
	defaultTjMax q.Temperature = 150
	// Body-diode drops: silicon 0.8 V, SiC 3.5 V (common practice, from
	// memory); GaN reverse conduction is Vth + |Voff| + I·R (common
	// practice; Lidow et al., GaN Transistors for Efficient Power
	// Conversion, from memory).
	vsdSi  q.Voltage = 1.0
	vsdSiC q.Voltage = 4.5
	// GaN's reverse-conduction drop at 0 V off and no current, taken when
	// vsd is blank: 2.5 V, the upper end of datasheet values at a few
	// amperes (from memory); the channel's I·R is added to it.
	vsdGaN q.Voltage = 2.5
	// Threshold (and plateau) temperature coefficient per volt of the 25 °C
	// threshold, 1/K, when vgs_th_hot is blank: the threshold falls by 40 %
	// from 25 to 125 °C, the steep end of what datasheets show (silicon
	// typically 20-40 %; GaN HEMTs flatter; common practice, from memory).
	// A steeper fall is the unfavourable side for the false-turn-on
	// screen and the turn-off edge.
	vthTCPerVolt = -4e-3
	// The other end, taken by the low twin (Device.Alt): 10 % lower at
	// 125 °C, the flat end (GaN HEMTs).
	vthTCPerVoltLow = -1e-3
	// Forward-drop coefficient of a p-n body diode (silicon and SiC), V/K,
	// for a vsd taken at 25 °C when vsd_hot is blank: −0.5 mV/K, the
	// shallow end of −0.5 to −2 mV/K (common practice, from memory), so
	// that the hot drop is not underestimated.
	vsdTC = -0.5e-3
	// SiC parts are specified and usually driven at 15-20 V on (common
	// practice, from memory).
	SiCDriveMin q.Voltage = 15
)

// Method is how the hard-switching overlap of a device was computed.
type Method uint8

// Methods.
const (
	MethodGateCharge Method = iota // gate-charge intervals (Qgs2, Qgd, plateau, gate current)
	MethodTimes                    // datasheet tr/tf rescaled to the user's gate loop
)

func (m Method) String() string {
	if m == MethodTimes {
		return "tr/tf"
	}
	return "gate-charge"
}

// Device is a part prepared for evaluation: the laws the models need,
// fitted once from the datasheet values. Prepare builds it; it is read-only
// afterwards and safe to share between goroutines.
type Device struct {
	Part *devices.Part // the validated library row it was prepared from

	Gate    loss.GateLaw  // on-resistance against gate voltage at T0
	Temp    loss.TempLaw  // on-resistance against temperature
	VgsLow  q.Voltage     // lowest gate voltage of the on-resistance data
	Oss     loss.OssLaw   // output capacitance law
	OssV    q.Voltage     // voltage of the output-capacitance data
	Method  Method        // how overlap losses are computed
	Vth     q.Voltage     // threshold, V
	VplSpec q.Voltage     // plateau at QgId (estimated when not given)
	QgId    q.Current     // current of the gate-charge (plateau) data
	QgVds   q.Voltage     // drain voltage of the gate-charge data
	Qth     q.Charge      // charge to the threshold
	Qgs2    q.Charge      // charge from threshold to plateau at QgId
	Qgd     q.Charge      // Miller charge at QgVds
	Slope   q.Capacitance // gate charge per volt above the plateau (beyond the knee)
	KneeV   q.Voltage     // knee above the plateau's end from qg2, V (0: none)
	KneeQ   q.Charge      // charge from the plateau's end to the knee, C
	// VthSq is the square-law channel's extrapolated threshold: vgs_th, or
	// with vgs_th_id the threshold √(vgs_th_id/K) below it (gatepoints.go).
	// The plateau's law and the triode law take it.
	VthSq  q.Voltage
	RdsId  q.Current     // test current of rds_on (0: blank, taken as no current)
	RgInt  q.Resistance  // internal gate resistance, Ω (0 when not given: FlagRgIntAssumed)
	TjMax  q.Temperature // highest junction temperature, °C (default 150 °C: FlagTjMaxDefault)
	VgsMin q.Voltage     // lowest gate-source voltage, V (default −vgs_max; 0 V for GaN)

	// Datasheet switching-time test, for MethodTimes.
	TswR    q.Resistance // test gate loop: tsw_rg + tsw_rgen + rg_int
	TswHead [2]q.Voltage // test headroom at turn-on (Vgs − Vpl) and turn-off (Vpl)
	TswOK   bool         // the test conditions were given

	// DelayCOn and DelayCOff are the gate's charge per volt over the
	// turn-on and turn-off delays, from the datasheet's td_on and td_off
	// under the switching-time test (fitDelays: IEC 60747-8 delay times,
	// the RC gate of Balogh 2001), F; > 0 when derived, 0 when the delay
	// is blank or cannot be used (FlagTdNoConditions). The dead-time
	// timing takes them in place of the gate-charge curve's Qth/Vth
	// (turn-on) and slope or charge above the threshold (turn-off).
	DelayCOn, DelayCOff q.Capacitance

	// Temperature laws beyond the on-resistance (docs/second-order.md).
	VthTC float64 // threshold and plateau coefficient, V/K (technology default)
	VsdTC float64 // body-diode drop coefficient, V/K (0 for GaN: its drop follows Vth and R)
	// VthOwn and VsdOwn are true when the coefficients come from the part's
	// own hot values (vgs_th_hot, vsd_hot) rather than the defaults.
	VthOwn, VsdOwn bool
	Qrr            loss.QrrLaw // own recovered charge against temperature (Q0 = 0: none)
	// QrrHot is true when the recovery law comes from the part's own hot point.
	QrrHot bool
	// QrrTau is the charge-control lifetime that gives the recovered
	// charge at its test current and di/dt (loss.FitRecoveryLifetime), s;
	// QrrIf and QrrDidt are that test's current and rate, the datasheet's
	// or, when blank, the unfavourable ends of the usual test (estimates.go).
	QrrTau q.Time
	// QrrFit is the charge that lifetime recovers at that test,
	// loss.RecoveredCharge(QrrTau, QrrIf, QrrDidt) (qrr less QrrCoss, to
	// the fit's tolerance), C; the evaluation scales the recovered charge
	// by the working point's over it.
	QrrFit q.Charge
	// QrrCoss is the output charge the datasheet's qrr holds, Q_oss at
	// the test's reverse voltage (qrr_includes_coss with qrr_vr), C; 0
	// otherwise (without qrr_vr none is taken out: the figure might hold
	// little). The lifetime is fitted to the charge without it.
	QrrCoss q.Charge
	QrrIf   q.Current
	QrrDidt q.Slew

	// Dynamic on-resistance: factor DynK (≥ 1; 0 when not given) after
	// blocking DynV (0: voltage unknown).
	DynK q.Ratio   // factor after blocking DynV, ≥ 1 (0: not given)
	DynV q.Voltage // voltage of DynK, V (0: unknown)

	// Package parasitics, H (0 when not given).
	Lcs   q.Inductance // common-source inductance
	Lloop q.Inductance // package share of the power loop

	// Gate capacitances for the false-turn-on screen.
	Cgs  q.Capacitance // gate-source, F (0: unknown)
	Crss q.Capacitance // small-signal Crss at CrssV, F (0: not given)
	// Miller is Cgd(v) with a knee (MillerLaw), when HasMiller: the
	// gate-charge method with crss given.
	Miller    loss.MillerLaw // Cgd(v) with a knee
	HasMiller bool           // Miller is fitted
	// Rise is the turn-off integral's part that belongs to the device
	// (loss.RiseBase of Miller and Oss), when HasMiller.
	Rise loss.RiseTable
	// RisePow is the series of that integral's a^(−1/N) (loss.RiseSeries).
	RisePow loss.PowSeries
	CrssV   q.Voltage // voltage of Crss, V
	CgsEst  bool      // Cgs estimated from the gate charge to the plateau

	// Values the library may leave blank, with their estimates filled in
	// (estimates.go; each estimate sets a flag of EstimateFlags).

	// Family is the package family the package column names, and
	// FamilyKnown whether swrank recognised it.
	Family      string
	FamilyKnown bool
	// RthJC and RthJA are the thermal resistances, K/W: the part's, else
	// the top of its package family's range; not OK when neither exists.
	RthJC, RthJA q.Opt[q.ThermalResistance]
	// Vsd is the reverse-conduction drop at 25 °C, V (GaN: at 0 V off), at
	// the current VsdIf, A (0: taken at no current, the channel's I·R
	// added on top).
	Vsd   q.Voltage
	VsdIf q.Current
	// QrrEst is the estimated recovered charge at 25 °C when qrr is blank
	// (0: the part gives qrr, or has no body diode), C.
	QrrEst q.Charge
	// HysteresisFraction is the share of the stored output-capacitance
	// energy lost per soft-switched cycle when eoss_loss is blank (0: the
	// part gives eoss_loss).
	HysteresisFraction float64

	// Low is true in a twin that takes the low end of the bracketed
	// estimates of the gate (rg_int, l_cs, the threshold's temperature law,
	// the gate-charge split, the plateau), LowCap in one that takes the low
	// end of the capacitances' (the output capacitance's exponent, the
	// Miller charge without crss). Alt is the first twin, both ends low;
	// when the part leaves values of both groups blank, its Alt holds the
	// twin with the gate's low ends alone, and that one's Alt the twin with
	// the capacitances' alone, since the two groups can move the loss in
	// opposite directions. nil when the part leaves none of them blank.
	// The evaluation keeps the worst of the chain.
	Low, LowCap bool
	Alt         *Device

	Flags Flags // fallbacks that belong to the part, whatever the operating point
}

// Prepare fits the models' laws to a validated part. Where the part leaves
// a value blank that can make its edges faster or slower (Alt), it also
// prepares the twin with the other end of each such estimate.
func Prepare(p *devices.Part) (Device, error) {
	var d Device
	err := PrepareInto(&d, p)
	return d, err
}

// PrepareInto is Prepare writing into d, which it overwrites whole (zero on
// an error): a loop over a library prepares each part in the same place.
func PrepareInto(d *Device, p *devices.Part) error {
	var err error
	if *d, err = prepare(p, false, false); err != nil {
		return err
	}
	gate, caps := d.bracketed()
	if !gate && !caps {
		return nil
	}
	alt := new(Device)
	if *alt, err = prepare(p, gate, caps); err != nil {
		*d = Device{}
		return err
	}
	d.Alt = alt
	if gate && caps {
		g, c := new(Device), new(Device)
		if *g, err = prepare(p, true, false); err != nil {
			*d = Device{}
			return err
		}
		if *c, err = prepare(p, false, true); err != nil {
			*d = Device{}
			return err
		}
		g.Alt, alt.Alt = c, g
	}
	return nil
}

// prepare fits the laws with each estimate at its high end (the end that
// costs more loss), or at its low end when low is true.
func prepare(p *devices.Part, low, lowCap bool) (Device, error) {
	d := Device{Part: p, Low: low, LowCap: lowCap, Vth: p.VgsTh, VthSq: p.VgsTh, RdsId: p.RdsOnId.V, RgInt: p.RgInt.Or(rgIntEstimate(p.Technology, low))}
	if !p.RgInt.OK {
		d.Flags |= FlagRgIntAssumed
	}
	d.TjMax = p.TjMax.Or(defaultTjMax)
	if !p.TjMax.OK {
		d.Flags |= FlagTjMaxDefault
	}
	switch {
	case p.VgsMin.OK:
		d.VgsMin = p.VgsMin.V
	case p.Technology == devices.GaN:
		d.VgsMin, d.Flags = 0, d.Flags|FlagVgsMinDefault
	default:
		// Flagged at evaluation, and only for a negative off level: a
		// 0 V off level is inside any silicon or SiC gate rating.
		d.VgsMin = -p.VgsMax
	}
	if !p.IdPulse.OK {
		d.Flags |= FlagIdPulseMissing
	}
	// The fits in turn (called directly: through function values the
	// device would escape to the heap, one allocation a part).
	if err := d.fitGateLaw(); err != nil {
		return Device{}, err
	}
	if err := d.fitTempLaw(); err != nil {
		return Device{}, err
	}
	if err := d.fitOss(); err != nil {
		return Device{}, err
	}
	if err := d.fitGateCharge(); err != nil {
		return Device{}, err
	}
	if err := d.prepareSecondOrder(); err != nil {
		return Device{}, err
	}
	if err := d.fitMiller(); err != nil {
		return Device{}, err
	}
	d.fitDelays()
	d.estimate()
	return d, nil
}

// fitGateLaw fits the on-resistance against gate voltage at the reference
// temperature: through two points when given, else one (FlagRdsOnePoint).
func (d *Device) fitGateLaw() error {
	p := d.Part
	if p.RdsOn <= 0 || p.RdsOnVgs <= p.VgsTh {
		return fmt.Errorf("part %q: rds_on_vgs must exceed vgs_th", p.Name)
	}
	d.VgsLow = p.RdsOnVgs
	if p.RdsOn2.OK && p.RdsOn2Vgs.OK && p.RdsOn2Vgs.V != p.RdsOnVgs && p.RdsOn2Vgs.V > p.VgsTh {
		var ok bool
		d.Gate, ok = loss.FitGateLaw(p.RdsOnVgs, p.RdsOn, p.RdsOn2Vgs.V, p.RdsOn2.V, p.VgsTh)
		if !ok {
			d.Flags |= FlagRdsFitClamped
		}
		d.VgsLow = min(p.RdsOnVgs, p.RdsOn2Vgs.V)
	} else {
		d.Gate = loss.SinglePointGateLaw(p.RdsOnVgs, p.RdsOn, p.VgsTh)
		d.Flags |= FlagRdsOnePoint
	}
	return nil
}

// fitTempLaw fits the on-resistance against temperature: the part's curve,
// its hot point, or the technology's default exponent (FlagTempDefault).
func (d *Device) fitTempLaw() error {
	p := d.Part
	d.Temp.T0 = p.RdsOnTj.Or(25)
	switch {
	case strings.TrimSpace(p.RdsCurve) != "":
		pts, err := p.Curve()
		if err != nil {
			return fmt.Errorf("part %q: rds_on_curve: %w", p.Name, err)
		}
		for i, c := range pts {
			if i == len(d.Temp.Pts) {
				break
			}
			d.Temp.Pts[i] = [2]float64{float64(c.Tj), float64(c.Factor)}
			d.Temp.NPts = i + 1
		}
		d.Temp.Prepare()
	case p.RdsHot.OK && p.RdsHotTj.OK && p.RdsHotTj.V != d.Temp.T0:
		d.Temp = hotPointLaw(d.Temp.T0, loss.FitTempExponent(p.RdsOn, d.Temp.T0, p.RdsHot.V, p.RdsHotTj.V), p.RdsHotTj.V, float64(p.RdsHot.V/p.RdsOn))
	default:
		d.Flags |= FlagTempDefault
		switch {
		case p.Technology == devices.GaN:
			d.Temp.Alpha = alphaGaN
		case p.Technology == devices.SiC:
			d.Temp.Alpha = alphaSiC
		case p.VdsMax > 60:
			d.Temp.Alpha = alphaSiHV
		default:
			d.Temp.Alpha = alphaSiLV
		}
	}
	return nil
}

// fitGateCharge takes the gate-charge curve and chooses the method of the
// hard edges: gate-charge intervals when qgs, qgd and v_plateau are given,
// else the datasheet tr/tf with their test conditions.
func (d *Device) fitGateCharge() error {
	p := d.Part
	d.QgVds = p.QgVds.Or(p.VdsMax / 2)
	if !p.QgVds.OK {
		d.Flags |= FlagQgVdsAssumed
	}
	d.QgId = p.QgId.Or(p.IdMax / 2)
	if !p.QgId.OK {
		d.Flags |= FlagQgIdAssumed
	}
	fromGfs, err := d.thresholdFromGfs()
	if err != nil {
		return err
	}
	d.VplSpec = d.plateau(p.VgsTh + 1)
	if p.Qgs.OK || p.Qgd.OK || !(p.Tr.OK && p.Tf.OK) {
		// The gate-charge method, with what the row leaves blank estimated
		// (estimates.go): a partial gate-charge curve is closer to the part
		// than datasheet times, which are usually measured at another
		// load and gate loop.
		qgs, qgd, vpl := d.gateChargeEstimates()
		if !(vpl > p.VgsTh && p.QgVgs > vpl) {
			return fmt.Errorf("part %q: v_plateau %s must lie between vgs_th %s and qg_vgs %s", p.Name, vpl, p.VgsTh, p.QgVgs)
		}
		d.Method = MethodGateCharge
		d.VplSpec = vpl
		if !fromGfs {
			d.thresholdFromPlateau(vpl)
		}
		qgs, qgd = d.secondTotal(qgs, qgd, vpl)
		if p.QgTh.OK && p.QgTh.V < qgs {
			d.Qth, d.Qgs2 = p.QgTh.V, qgs-p.QgTh.V
		} else {
			// A constant Cgs up to the plateau: Qth/Qgs = Vth/Vpl.
			d.Qth = qgs * q.Charge(p.VgsTh/vpl)
			d.Qgs2 = qgs - d.Qth
			d.Flags |= FlagQgThAssumed
		}
		d.Qgd = qgd
	} else if p.Tr.OK && p.Tf.OK {
		d.Method = MethodTimes
		d.Flags |= FlagGateLinear
		if !fromGfs {
			d.thresholdFromPlateau(d.VplSpec)
		}
		if p.TswVgs.OK && (p.TswRg.OK || p.TswRgen.OK) {
			d.TswOK = true
			d.TswR = p.TswRg.V + p.TswRgen.V + d.RgInt
			vpl := d.VplSpec
			if p.TswId.OK {
				vpl = loss.PlateauAt(d.VthSq, d.VplSpec, d.QgId, p.TswId.V)
			}
			d.TswHead = [2]q.Voltage{p.TswVgs.V - vpl, vpl}
		} else {
			d.Flags |= FlagTswNoConditions
		}
	}
	return nil
}

// prepareSecondOrder fills the laws of docs/second-order.md: temperature
// coefficients, the recovery law, dynamic on-resistance, package parasitics
// and the gate capacitances of the false-turn-on screen.
func (d *Device) prepareSecondOrder() error {
	p := d.Part
	bad := func(field, format string, a ...any) error {
		return fmt.Errorf("part %q: %s: %s", p.Name, field, fmt.Sprintf(format, a...))
	}
	d.VthTC = vthTCPerVolt * float64(p.VgsTh)
	if d.Low {
		d.VthTC = vthTCPerVoltLow * float64(p.VgsTh)
	}
	if p.Technology != devices.GaN {
		d.VsdTC = vsdTC
	}
	switch {
	case p.Vsd.OK:
		d.Vsd = p.Vsd.V
		d.VsdIf = p.VsdIf.V // 0 when not given: the drop taken at no current
	case p.Technology == devices.GaN:
		d.Vsd = vsdGaN
	case p.Technology == devices.SiC:
		d.Vsd = vsdSiC
	default:
		d.Vsd = vsdSi
	}
	// The part's own hot points replace the defaults (vgs_th is at 25 °C;
	// vsd at its stated temperature, taken as 25 °C).
	if p.VgsThHot.OK && p.VgsThHotTj.OK && p.VgsThHotTj.V != 25 {
		d.VthTC, d.VthOwn = float64(p.VgsThHot.V-p.VgsTh)/float64(p.VgsThHotTj.V-25), true
	}
	if p.Technology != devices.GaN && p.Vsd.OK && p.VsdHot.OK && p.VsdHotTj.OK && p.VsdHotTj.V != 25 {
		d.VsdTC, d.VsdOwn = float64(p.VsdHot.V-p.Vsd.V)/float64(p.VsdHotTj.V-25), true
	}

	// Recovery (GaN has none).
	qrr, fromTrr := d.qrrGiven()
	if p.Technology != devices.GaN && qrr.OK {
		if fromTrr {
			d.Flags |= FlagQrrFromTrr
		}
		if qrr.V < 0 {
			return bad("qrr", "must be ≥ 0 C (got %s)", qrr.V)
		}
		t0 := p.QrrTj.Or(25)
		hot := p.QrrHot.OK && p.QrrHotTj.OK
		if hot && (p.QrrHot.V < 0 || p.QrrHotTj.V == t0) {
			return bad("qrr_hot", "needs a charge ≥ 0 at a qrr_hot_tj other than qrr_tj (%s)", t0)
		}
		d.Qrr, d.QrrHot = loss.FitQrrLaw(qrr.V, t0, p.QrrHot.V, p.QrrHotTj.V, hot), hot

	}

	// Dynamic on-resistance.
	if p.RdsDyn.OK {
		if !(p.RdsDyn.V >= 1) || math.IsInf(float64(p.RdsDyn.V), 0) {
			return bad("rds_dyn", "factor must be ≥ 1 (got %g)", float64(p.RdsDyn.V))
		}
		d.DynK = p.RdsDyn.V
		if p.RdsDynVds.OK {
			if !(p.RdsDynVds.V > 0) {
				return bad("rds_dyn_vds", "must be > 0 V (got %s)", p.RdsDynVds.V)
			}
			d.DynV = p.RdsDynVds.V
		}
	}

	// Package parasitics.
	if p.Lcs.OK {
		if !(p.Lcs.V >= 0) {
			return bad("l_cs", "must be ≥ 0 H (got %s)", p.Lcs.V)
		}
		d.Lcs = p.Lcs.V
	}
	if p.Lloop.OK {
		if !(p.Lloop.V >= 0) {
			return bad("l_loop", "must be ≥ 0 H (got %s)", p.Lloop.V)
		}
		d.Lloop = p.Lloop.V
	}

	// Gate capacitances: Cgs = Ciss − Crss at cap_vds (Cgs hardly depends
	// on the drain voltage); else the charge to the plateau over the
	// plateau voltage less the gate-drain share of it (the drain stays at
	// the test voltage: Crss, or the larger Qgd/qg_vds without it), at
	// least half of it. A smaller Cgs lifts the off gate more (the false
	// turn-on screen): the estimate errs that way.
	if p.Crss.OK && p.CapVds.OK && p.Crss.V > 0 && p.CapVds.V > 0 {
		d.Crss, d.CrssV = p.Crss.V, p.CapVds.V
	}
	switch {
	case p.Ciss.OK && p.Crss.OK && p.Ciss.V > p.Crss.V:
		d.Cgs = p.Ciss.V - p.Crss.V
	case d.Method == MethodGateCharge:
		c := float64(d.Qth+d.Qgs2) / float64(d.VplSpec)
		cgd := float64(d.Crss)
		if cgd == 0 && d.QgVds > 0 {
			cgd = float64(d.Qgd) / float64(d.QgVds)
		}
		d.Cgs, d.CgsEst = q.Capacitance(max(c-cgd, c/2)), true
	}
	return nil
}

// ThresholdAt is the threshold at junction temperature tj.
func (d *Device) ThresholdAt(tj q.Temperature) q.Voltage { return loss.ThresholdAt(d.Vth, d.VthTC, tj) }

// PlateauAt is the Miller plateau at drain current i (loss.PlateauAt from
// the datasheet plateau at its test current, with the square-law
// channel's threshold VthSq), at the threshold's 25 °C value.
func (d *Device) PlateauAt(i q.Current) q.Voltage {
	return loss.PlateauAt(d.VthSq, d.VplSpec, d.QgId, i)
}

// CgdAt is the charge-equivalent gate-drain capacitance over a swing from 0
// to v, Qgd(v)/v: from the Miller charge when it is known, else from Crss at
// its voltage with the √ law (charge 2·Crss·√(V0·v)). 0 when neither is
// given.
func (d *Device) CgdAt(v q.Voltage) q.Capacitance {
	if v <= 0 {
		return 0
	}
	if d.HasMiller {
		return q.Capacitance(float64(d.Miller.Charge(v)) / float64(v))
	}
	if d.Qgd > 0 {
		return q.Capacitance(float64(d.MillerChargeAt(v)) / float64(v))
	}
	if d.Crss > 0 {
		return q.Capacitance(2 * float64(d.Crss) * math.Sqrt(float64(d.CrssV/v)))
	}
	return 0
}

// Rds returns the on-resistance at gate voltage vgs and junction
// temperature tj: the gate law scaled by the temperature law.
func (d *Device) Rds(vgs q.Voltage, tj q.Temperature) q.Resistance {
	return d.Gate.At(vgs) * q.Resistance(d.Temp.Factor(tj))
}

// Curve returns the gate-charge curve at drain voltage vds and the plateau
// at drain current i, with threshold and plateau shifted by dvth (their
// temperature shift). The Qgs2 segment grows with the plateau (it charges
// Cgs from threshold to plateau); the charge to the threshold follows the
// threshold (a constant Cgs).
func (d *Device) Curve(vds q.Voltage, i q.Current, dvth q.Voltage) loss.GateCurve {
	vth := d.Vth + dvth
	vpl := loss.PlateauAt(d.VthSq+dvth, d.VplSpec+dvth, d.QgId, i)
	if vpl <= vth {
		vpl = vth + 1e-3
	}
	qgs2 := d.Qgs2 * q.Charge((vpl-vth)/(d.VplSpec-d.Vth))
	qth := d.Qth
	if d.Vth > 0 {
		qth *= q.Charge(vth / d.Vth)
	}
	return loss.GateCurve{
		Qth: qth, Qgs2: qgs2, Qgd: d.MillerChargeAt(vds),
		Vth: vth, Vpl: vpl, Slope: d.Slope, KneeV: d.KneeV, KneeQ: d.KneeQ,
	}
}
