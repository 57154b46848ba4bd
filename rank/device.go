package rank

import (
	"fmt"
	"math"
	"strconv"
	"strings"

	"swrank/devices"
	q "swrank/devices/quantity"
)

// Technology defaults (used when the CSV leaves a value blank).
const (
	// Temperature exponents of the on-resistance power law in kelvin.
	// Silicon above 60 V: drift-dominated, α ≈ 2.0-2.5 (Baliga 2008);
	// low-voltage trench silicon: effective α ≈ 1.2-1.6 (common practice);
	// GaN: about 2× from 25 to 150 °C (common practice, from memory);
	// SiC: about 1.4× from 25 to 150 °C (common practice, from memory).
	alphaSiHV                  = 2.3
	alphaSiLV                  = 1.5
	alphaGaN                   = 2.0
	alphaSiC                   = 0.95
	defaultTjMax q.Temperature = 150
	// Body-diode drops: silicon 0.8 V, SiC 3.5 V (common practice, from
	// memory); GaN reverse conduction is Vth + |Voff| + I·R (team notes).
	vsdSi  q.Voltage = 0.8
	vsdSiC q.Voltage = 3.5
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
	Part *devices.Part

	Gate    GateLaw       // on-resistance against gate voltage at T0
	Temp    TempLaw       // on-resistance against temperature
	VgsLow  q.Voltage     // lowest gate voltage of the on-resistance data
	Oss     OssLaw        // output capacitance law
	OssV    q.Voltage     // voltage of the output-capacitance data
	Method  Method        // how overlap losses are computed
	Vth     q.Voltage     // threshold, V
	VplSpec q.Voltage     // plateau at QgId (estimated when not given)
	QgId    q.Current     // current of the gate-charge (plateau) data
	QgVds   q.Voltage     // drain voltage of the gate-charge data
	Qth     q.Charge      // charge to the threshold
	Qgs2    q.Charge      // charge from threshold to plateau at QgId
	Qgd     q.Charge      // Miller charge at QgVds
	Slope   q.Capacitance // gate charge per volt above the plateau
	RgInt   q.Resistance
	TjMax   q.Temperature
	VgsMin  q.Voltage

	// Datasheet switching-time test, for MethodTimes.
	TswR    q.Resistance // test gate loop: tsw_rg + tsw_rgen + rg_int
	TswHead [2]q.Voltage // test headroom at turn-on (Vgs − Vpl) and turn-off (Vpl)
	TswOK   bool         // the test conditions were given

	Flags Flags // fallbacks that belong to the part, whatever the operating point
}

// Prepare fits the models' laws to a validated part.
func Prepare(p *devices.Part) (Device, error) {
	d := Device{Part: p, Vth: p.VgsTh, RgInt: p.RgInt.V}
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
		d.VgsMin, d.Flags = -p.VgsMax, d.Flags|FlagVgsMinDefault
	}
	if !p.IdPulse.OK {
		d.Flags |= FlagIdPulseMissing
	}

	// On-resistance against gate voltage at the reference temperature.
	if p.RdsOn <= 0 || p.RdsOnVgs <= p.VgsTh {
		return Device{}, fmt.Errorf("part %s: rds_on_vgs must exceed vgs_th", p.Name)
	}
	d.VgsLow = p.RdsOnVgs
	if p.RdsOn2.OK && p.RdsOn2Vgs.OK && p.RdsOn2Vgs.V != p.RdsOnVgs && p.RdsOn2Vgs.V > p.VgsTh {
		var ok bool
		d.Gate, ok = FitGateLaw(p.RdsOnVgs, p.RdsOn, p.RdsOn2Vgs.V, p.RdsOn2.V, p.VgsTh)
		if !ok {
			d.Flags |= FlagRdsFitClamped
		}
		d.VgsLow = min(p.RdsOnVgs, p.RdsOn2Vgs.V)
	} else {
		d.Gate = SinglePointGateLaw(p.RdsOnVgs, p.RdsOn, p.VgsTh)
		d.Flags |= FlagRdsOnePoint
	}

	// On-resistance against temperature.
	d.Temp.T0 = p.RdsOnTj.Or(25)
	switch {
	case strings.TrimSpace(p.RdsCurve) != "":
		pts, err := parseCurve(p.RdsCurve)
		if err != nil {
			return Device{}, fmt.Errorf("part %s: rds_on_curve: %w", p.Name, err)
		}
		d.Temp.NPts = copy(d.Temp.Pts[:], pts)
	case p.RdsHot.OK && p.RdsHotTj.OK && p.RdsHotTj.V != d.Temp.T0:
		d.Temp.Alpha = FitTempExponent(p.RdsOn, d.Temp.T0, p.RdsHot.V, p.RdsHotTj.V)
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

	// Output capacitance.
	switch {
	case p.Qoss.OK && p.Eoss.OK && p.OssVds.OK:
		d.Oss, d.OssV = OssFromChargeEnergy(p.Qoss.V, p.Eoss.V, p.OssVds.V), p.OssVds.V
	case p.Qoss.OK && p.OssVds.OK:
		d.Oss, d.OssV = OssFromCharge(p.Qoss.V, p.OssVds.V), p.OssVds.V
		d.Flags |= FlagOssSqrtLaw
	case p.Coss.OK && p.CapVds.OK:
		d.Oss, d.OssV = OssFromCapacitance(p.Coss.V, p.CapVds.V), p.CapVds.V
		d.Flags |= FlagOssSqrtLaw
	default:
		return Device{}, fmt.Errorf("part %s: needs coss with cap_vds, or qoss with oss_vds", p.Name)
	}

	// Gate charge.
	d.QgVds = p.QgVds.Or(p.VdsMax / 2)
	if !p.QgVds.OK {
		d.Flags |= FlagQgVdsAssumed
	}
	d.QgId = p.QgId.Or(p.IdMax)
	if !p.QgId.OK {
		d.Flags |= FlagQgIdAssumed
	}
	d.VplSpec = p.VPlateau.Or(p.VgsTh + 1)
	if !p.VPlateau.OK {
		d.Flags |= FlagPlateauEstimated
	}
	if p.Qgs.OK && p.Qgd.OK && p.VPlateau.OK && p.VPlateau.V > p.VgsTh && p.QgVgs > p.VPlateau.V {
		d.Method = MethodGateCharge
		if p.QgTh.OK && p.QgTh.V < p.Qgs.V {
			d.Qth, d.Qgs2 = p.QgTh.V, p.Qgs.V-p.QgTh.V
		} else {
			d.Qth, d.Qgs2 = p.Qgs.V/2, p.Qgs.V/2
			d.Flags |= FlagQgThAssumed
		}
		d.Qgd = p.Qgd.V
		d.Slope = q.Capacitance(math.Max(0, float64(p.Qg-p.Qgs.V-p.Qgd.V)) / float64(p.QgVgs-p.VPlateau.V))
	} else if p.Tr.OK && p.Tf.OK {
		d.Method = MethodTimes
		d.Flags |= FlagGateLinear
		if p.TswVgs.OK && (p.TswRg.OK || p.TswRgen.OK) {
			d.TswOK = true
			d.TswR = p.TswRg.V + p.TswRgen.V + d.RgInt
			vpl := d.VplSpec
			if p.TswId.OK {
				vpl = PlateauAt(p.VgsTh, d.VplSpec, d.QgId, p.TswId.V)
			}
			d.TswHead = [2]q.Voltage{p.TswVgs.V - vpl, vpl}
		} else {
			d.Flags |= FlagTswNoConditions
		}
	} else {
		return Device{}, fmt.Errorf("part %s: needs qgs, qgd and v_plateau, or tr and tf", p.Name)
	}
	return d, nil
}

// parseCurve reads "T:factor T:factor ..." (spaces, commas or semicolons
// between points).
func parseCurve(s string) ([][2]float64, error) {
	f := strings.FieldsFunc(s, func(r rune) bool { return r == ' ' || r == ',' || r == ';' })
	if len(f) < 2 || len(f) > 8 {
		return nil, fmt.Errorf("%q: want 2 to 8 points written T:factor", s)
	}
	pts := make([][2]float64, 0, len(f))
	for _, p := range f {
		a, b, ok := strings.Cut(p, ":")
		if !ok {
			return nil, fmt.Errorf("%q: point %q is not T:factor", s, p)
		}
		t, err1 := strconv.ParseFloat(strings.TrimSuffix(strings.TrimSuffix(a, "C"), "°"), 64)
		v, err2 := strconv.ParseFloat(b, 64)
		if err1 != nil || err2 != nil || v <= 0 || math.IsInf(t, 0) || math.IsNaN(t) || math.IsInf(v, 0) {
			return nil, fmt.Errorf("%q: point %q is not T:factor with factor > 0", s, p)
		}
		if len(pts) > 0 && t <= pts[len(pts)-1][0] {
			return nil, fmt.Errorf("%q: temperatures must increase", s)
		}
		pts = append(pts, [2]float64{t, v})
	}
	return pts, nil
}

// Rds returns the on-resistance at gate voltage vgs and junction
// temperature tj: the gate law scaled by the temperature law.
func (d *Device) Rds(vgs q.Voltage, tj q.Temperature) q.Resistance {
	return d.Gate.At(vgs) * q.Resistance(d.Temp.Factor(tj))
}

// curve returns the gate-charge curve at drain voltage vds and the plateau
// at drain current i. The Qgs2 segment grows with the plateau (it charges
// Cgs from threshold to plateau).
func (d *Device) curve(vds q.Voltage, i q.Current) GateCurve {
	vpl := PlateauAt(d.Vth, d.VplSpec, d.QgId, i)
	if vpl <= d.Vth {
		vpl = d.Vth + 1e-3
	}
	qgs2 := d.Qgs2 * q.Charge((vpl-d.Vth)/(d.VplSpec-d.Vth))
	return GateCurve{
		Qth: d.Qth, Qgs2: qgs2, Qgd: MillerChargeAt(d.Qgd, d.QgVds, vds),
		Vth: d.Vth, Vpl: vpl, Slope: d.Slope,
	}
}
