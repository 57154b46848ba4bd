package loss

import (
	"math"
	q "swrank/devices/quantity"
)

// kelvin converts a Celsius temperature to kelvin.
func kelvin(t q.Temperature) float64 { return float64(t) + 273.15 }

// TempFactor is the ratio R(T)/R(T0) of a power law in absolute temperature,
// R(T) = R(T0)·(T/T0)^α (T in kelvin).
//
// Source: Baliga, Fundamentals of Power Semiconductor Devices, 2008 (mobility
// falls as T^-2.0…2.5 in drift-dominated silicon); the exponent of a given
// part is fitted through its hot datasheet point when one is given.
func TempFactor(t, t0 q.Temperature, alpha float64) float64 {
	return powPos(kelvin(t)/kelvin(t0), alpha)
}

// FitTempExponent returns α of the power law R(T) = R(T0)·(T/T0)^α through
// two datasheet points (r0 at t0, r1 at t1, t1 ≠ t0).
func FitTempExponent(r0 q.Resistance, t0 q.Temperature, r1 q.Resistance, t1 q.Temperature) float64 {
	return math.Log(float64(r1/r0)) / math.Log(kelvin(t1)/kelvin(t0))
}

// CurrentRatingAt derates a continuous drain-current rating given at 25 °C
// case to case temperature tc: I(tc) = I25·√((Tj,max − tc)/(Tj,max − 25)),
// the shape of the datasheet derating curve, which follows from
// I = √((Tj,max − Tc)/(Rth,jc·R(Tj,max))).
//
// Source: common practice (how datasheet continuous-current ratings are
// computed); IEC 60747-8:2010 rating definitions.
func CurrentRatingAt(i25 q.Current, tjMax, tc q.Temperature) q.Current {
	if tc <= 25 {
		return i25
	}
	if tc >= tjMax {
		return 0
	}
	return i25 * q.Current(math.Sqrt(float64(tjMax-tc)/float64(tjMax-25)))
}

// TempLaw is the on-resistance temperature dependence of a part relative to
// its datasheet reference temperature T0: either a power law in absolute
// temperature or a normalised curve through a few points (linear between
// points and beyond the ends).
type TempLaw struct {
	T0    q.Temperature // reference temperature, °C (the datasheet's rds_on_tj)
	Alpha float64       // power-law exponent, used when NPts == 0
	// Pts are (temperature, R/R(T0)) points of a normalised curve, strictly
	// increasing in temperature; the first NPts are used.
	Pts  [8][2]float64
	NPts int     // points of Pts in use, 0 or 2 to 8
	c0   float64 // the curve at T0 (set by prepare; 0: work it out)
	// piece[i] is the curve between Pts[i-1] and Pts[i] over its value at
	// T0: the value at Pts[i-1] and the slope, 1/K (set by prepare, with
	// c0; the thermal loop reads it without dividing).
	piece [8][2]float64
}

// prepare fixes c0 and the normalised pieces of a curve law.
func (l *TempLaw) Prepare() {
	if l.NPts < 2 {
		return
	}
	l.c0 = l.curve(float64(l.T0))
	for i := 1; i < l.NPts; i++ {
		a, b := l.Pts[i-1], l.Pts[i]
		l.piece[i] = [2]float64{a[1] / l.c0, (b[1] - a[1]) / (b[0] - a[0]) / l.c0}
	}
}

// at is the normalised curve and its slope at t (a prepared curve law).
func (l *TempLaw) at(t float64) (float64, float64) {
	p := l.Pts[:l.NPts]
	i := 1
	for i < len(p)-1 && t > p[i][0] {
		i++
	}
	c := &l.piece[i]
	return c[0] + c[1]*(t-p[i-1][0]), c[1]
}

// Factor returns R(T)/R(T0).
func (l *TempLaw) Factor(t q.Temperature) float64 {
	if l.NPts < 2 {
		return TempFactor(t, l.T0, l.Alpha)
	}
	if l.c0 != 0 {
		f, _ := l.at(float64(t))
		return f
	}
	return l.curve(float64(t)) / l.curve(float64(l.T0))
}

// FactorD returns R(T)/R(T0) and its first and second derivatives with
// temperature, 1/K and 1/K² (the second is 0 on a curve's straight pieces).
func (l *TempLaw) FactorD(t q.Temperature) (f, df, d2f float64) {
	if l.NPts < 2 {
		f := TempFactor(t, l.T0, l.Alpha)
		tk := kelvin(t)
		return f, l.Alpha * f / tk, l.Alpha * (l.Alpha - 1) * f / (tk * tk)
	}
	if l.c0 != 0 {
		f, df := l.at(float64(t))
		return f, df, 0
	}
	c0 := l.curve(float64(l.T0))
	p := l.Pts[:l.NPts]
	x := float64(t)
	i := 1
	for i < len(p)-1 && x > p[i][0] {
		i++
	}
	a, b := p[i-1], p[i]
	slope := (b[1] - a[1]) / (b[0] - a[0])
	return (a[1] + slope*(x-a[0])) / c0, slope / c0, 0
}

func (l *TempLaw) curve(t float64) float64 {
	p := l.Pts[:l.NPts]
	i := 1
	for i < len(p)-1 && t > p[i][0] {
		i++
	}
	a, b := p[i-1], p[i]
	return a[1] + (b[1]-a[1])*(t-a[0])/(b[0]-a[0])
}

// ThresholdAt moves a 25 °C threshold (or any gate voltage that tracks it,
// such as the plateau) to junction temperature t with a linear coefficient
// tc in V/K: vth + tc·(t − 25 °C), never below a tenth of vth.
//
// Source: common practice (datasheet normalised-threshold curves: silicon
// about −5 mV/K, silicon carbide similar, GaN HEMTs much flatter; from
// memory).
func ThresholdAt(vth q.Voltage, tc float64, t q.Temperature) q.Voltage {
	return max(vth+q.Voltage(tc*float64(t-25)), vth/10)
}
