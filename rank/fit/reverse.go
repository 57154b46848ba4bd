package fit

import (
	"math"
	"swrank/devices"
	q "swrank/devices/quantity"
	"swrank/rank/loss"
)

// ReverseDrop is the drop of the reverse-conducting device at current i and
// junction temperature tj: the datasheet vsd (taken at 25 °C, or its
// estimate, Device.Vsd) moved by the diode coefficient for silicon and SiC
// body diodes; for GaN, which has no body diode, the drop through its
// datasheet point (or estimate) at Voff = 0 and 25 °C, moved to i, the off
// level and tj: Vsd + ΔVth(Tj) + |Voff| + I·R(Tj) − I_vsd·R(25 °C) (Lidow
// et al., GaN Transistors for Efficient Power Conversion, third-quadrant
// conduction: the channel conducts once the gate-drain voltage passes the
// threshold; common practice).
func (d *Device) ReverseDrop(i q.Current, vOff q.Voltage, tj q.Temperature) q.Voltage {
	p := d.Part
	if p.Technology == devices.GaN {
		r0 := float64(d.Gate.At(p.RdsOnVgs)) // at rds_on_tj
		return d.ReverseDropGaN(i, vOff, tj, r0*d.Temp.Factor(tj), r0*d.Temp.Factor(25))
	}
	return loss.DiodeDropAt(d.Vsd, d.VsdTC, tj)
}

// ReverseDropGaN is ReverseDrop for GaN with the channel resistance r at tj
// and r25 at 25 °C given, Ω.
func (d *Device) ReverseDropGaN(i q.Current, vOff q.Voltage, tj q.Temperature, r, r25 float64) q.Voltage {
	voff := q.Voltage(math.Abs(float64(vOff)))
	vth := d.ThresholdAt(tj)
	v := d.Vsd + (vth - d.Vth) + voff + q.Voltage(float64(i)*r-float64(d.VsdIf)*r25)
	return max(v, 0)
}
