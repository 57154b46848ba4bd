package fit

import (
	"math"
	"swrank/devices"
	q "swrank/devices/quantity"
	"swrank/rank/loss"
)

// ReverseDrop is the drop of the reverse-conducting device at current i and
// junction temperature tj: the datasheet vsd (taken at 25 °C) moved by the
// diode coefficient for silicon and SiC body diodes; for GaN, which has no
// body diode, Vth(Tj) + |Voff| + I·R(Tj) (Lidow et al., GaN Transistors for
// Efficient Power Conversion, third-quadrant conduction; team notes,
// common practice), through the datasheet point when vsd and vsd_if are
// given (taken at Voff = 0 and 25 °C).
func (d *Device) ReverseDrop(i q.Current, vOff q.Voltage, tj q.Temperature) q.Voltage {
	p := d.Part
	if p.Technology == devices.GaN {
		r0 := float64(d.Gate.At(p.RdsOnVgs)) // at rds_on_tj
		return d.ReverseDropGaN(i, vOff, tj, r0*d.Temp.Factor(tj), r0*d.Temp.Factor(25))
	}
	v := vsdSi
	switch {
	case p.Vsd.OK:
		v = p.Vsd.V
	case p.Technology == devices.SiC:
		v = vsdSiC
	}
	return loss.DiodeDropAt(v, d.VsdTC, tj)
}

// ReverseDropGaN is reverseDrop for GaN with the channel resistance r at tj
// and r25 at 25 °C given, Ω.
func (d *Device) ReverseDropGaN(i q.Current, vOff q.Voltage, tj q.Temperature, r, r25 float64) q.Voltage {
	p := d.Part
	voff := q.Voltage(math.Abs(float64(vOff)))
	vth := d.ThresholdAt(tj)
	v := vth + voff + q.Voltage(float64(i)*r)
	if p.Vsd.OK && p.VsdIf.OK {
		// Shift the datasheet point (at Voff = 0, 25 °C) to this current,
		// off level and temperature.
		v = p.Vsd.V + (vth - d.Vth) + voff + q.Voltage(float64(i)*r-float64(p.VsdIf.V)*r25)
	}
	return max(v, 0)
}
