package fit

import (
	"cmp"
	"fmt"
	"slices"

	"swrank/devices"
	q "swrank/devices/quantity"
	"swrank/rank/loss"
)

// capPoints gathers a capacitance's points, at most loss.MaxCapPoints, by
// increasing voltage: the table's value at its test voltage, the second
// point, and the curve's points (a curve point at the voltage of a table
// value gives way to it). The points live in buf.
func capPoints(buf *[loss.MaxCapPoints]loss.CapPoint, c1 q.Opt[q.Capacitance], v1 q.Opt[q.Voltage],
	c2 q.Opt[q.Capacitance], v2 q.Opt[q.Voltage], curve []devices.CVPoint) []loss.CapPoint {
	pts := buf[:0]
	add := func(v q.Voltage, c q.Capacitance) {
		if !(v > 0) || !(c > 0) || len(pts) == len(buf) {
			return
		}
		for _, p := range pts {
			if p.V == v {
				return
			}
		}
		pts = append(pts, loss.CapPoint{V: v, C: c})
	}
	if c1.OK && v1.OK {
		add(v1.V, c1.V)
	}
	if c2.OK && v2.OK {
		add(v2.V, c2.V)
	}
	for _, p := range curve {
		add(p.V, p.C)
	}
	slices.SortFunc(pts, func(a, b loss.CapPoint) int { return cmp.Compare(a.V, b.V) })
	return pts
}

// fitOss fits the output-capacitance law: from charge and energy; or from
// charge, energy or one capacitance point with the exponent fitted to the
// capacitance points (coss, coss2, coss_curve) when there are two or more,
// else an estimated one (FlagOssSqrtLaw).
func (d *Device) fitOss() error {
	p := d.Part
	n, from := 0.0, fromCharge
	exponent := func() (float64, error) {
		curve, err := p.CossCurvePoints()
		if err != nil {
			return 0, fmt.Errorf("part %q: coss_curve: %w", p.Name, err)
		}
		var buf [loss.MaxCapPoints]loss.CapPoint
		if pts := capPoints(&buf, p.Coss, p.CapVds, p.Coss2, p.Cap2Vds, curve); len(pts) >= 2 {
			return loss.OssExponent(pts), nil
		}
		d.Flags |= FlagOssSqrtLaw
		return ossExponent(from, d.LowCap), nil
	}
	var err error
	switch {
	case p.Qoss.OK && p.Eoss.OK && p.OssVds.OK:
		d.Oss, d.OssV = loss.OssFromChargeEnergy(p.Qoss.V, p.Eoss.V, p.OssVds.V), p.OssVds.V
	case p.Qoss.OK && p.OssVds.OK:
		n, err = exponent()
		d.Oss, d.OssV = loss.OssFromCharge(p.Qoss.V, p.OssVds.V, n), p.OssVds.V
	case p.Eoss.OK && p.OssVds.OK:
		n, err = exponent()
		d.Oss, d.OssV = loss.OssFromEnergy(p.Eoss.V, p.OssVds.V, n), p.OssVds.V
	case p.Coss.OK && p.CapVds.OK:
		from = fromCapacitance
		n, err = exponent()
		d.Oss, d.OssV = loss.OssFromCapacitance(p.Coss.V, p.CapVds.V, n), p.CapVds.V
	default:
		return fmt.Errorf("part %q: needs coss with cap_vds, or qoss or eoss with oss_vds", p.Name)
	}
	return err
}

// fitMiller fits the law of Cgd(v) (loss.MillerLaw) to crss, crss2 and
// crss_curve and prepares the turn-off integral, when the gate-charge
// method has crss; with crss alone the exponent is estimated
// (FlagCgdShape); without crss the Miller charge stays one lump
// (FlagMillerLumped).
func (d *Device) fitMiller() error {
	if d.Method != MethodGateCharge {
		return nil
	}
	if !(d.Crss > 0 && d.QgVds > 0 && d.Qgd > 0) {
		d.Flags |= FlagMillerLumped
		return nil
	}
	p := d.Part
	curve, err := p.CrssCurvePoints()
	if err != nil {
		return fmt.Errorf("part %q: crss_curve: %w", p.Name, err)
	}
	var buf [loss.MaxCapPoints]loss.CapPoint
	pts := capPoints(&buf, q.Some(d.Crss), q.Some(d.CrssV), p.Crss2, p.Cap2Vds, curve)
	if len(pts) < 2 {
		d.Flags |= FlagCgdShape
	}
	law, err := loss.FitMillerLaw(loss.MillerData{Qgd: d.Qgd, VQg: d.QgVds, Knee: d.VplSpec, Crss: pts,
		M: loss.OnePointExponent, Phi: loss.BuiltIn, VMax: p.VdsMax})
	if err != nil {
		return fmt.Errorf("part %q: %w", p.Name, err)
	}
	d.Miller, d.HasMiller = law, true
	d.Rise = loss.RiseBase(&d.Miller, d.Oss, loss.CdsShare(d.Crss, d.Oss.C(d.CrssV)))
	if d.Oss.N > 0 {
		d.RisePow = loss.RiseSeries(d.Oss)
	}
	return nil
}

// SoftCgd is the gate-drain capacitance while the drain sits near 0 V
// below the gate, as at a soft-switched edge, F: the Miller law's oxide
// value. Without a law it is the top of what the data allow: Qgd/Vpl (the
// whole Miller charge below the knee), or the slope of the gate-charge
// curve above the plateau (measured with the drain near 0 V: Cgs plus
// this Cgd) less the Cgs below it, (Qth + Qgs2)/Vpl, when that is larger.
// The gate-charge test's segments below the plateau hold the drain high,
// where Cgd is small, so a soft edge moves this much more charge per volt
// there.
//
// Source: the gate-drain capacitance of a power MOSFET, the oxide value
// when the drain is below the gate (Baliga 2008, ch. 6); the gate-charge
// curve's segments (Balogh 2001; IEC 60747-8).
func (d *Device) SoftCgd() q.Capacitance {
	if d.HasMiller {
		return d.Miller.Oxide()
	}
	if d.VplSpec <= 0 {
		return 0
	}
	return max(0, d.Slope-q.Capacitance(float64(d.Qth+d.Qgs2)/float64(d.VplSpec)), q.Capacitance(float64(d.Qgd)/float64(d.VplSpec)))
}
