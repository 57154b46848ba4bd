package evaluate

import (
	"swrank/devices"
	q "swrank/devices/quantity"
	"swrank/rank/fit"
	"swrank/rank/loss"
	"swrank/rank/stage"
)

// Evaluate computes the losses of part dev at operating point pt. In a
// synchronous cell, partner (when non-nil) fills the place dev does not;
// otherwise dev fills both. Evaluate allocates nothing when tr is nil.
//
// Each device's junction temperature is solved with its whole loss
// (conduction, edges, dead time, gate) depending on temperature. The two
// devices of a synchronous cell couple one way in this model: the
// synchronous switch's recovered charge, which rises with its temperature,
// is dissipated in the control switch, while nothing of the control switch
// depends on the synchronous switch's temperature. So the synchronous switch
// is solved first, then the control switch with the recovered charge at the
// synchronous switch's junction temperature, then the synchronous switch's
// off-state checks, which need the control switch's edges at its own
// temperature (docs/second-order.md).
func Evaluate(pt *stage.Point, dev, partner *fit.Device, tr *Trace) Result {
	var r Result
	EvaluateInto(&r, pt, dev, partner, tr)
	return r
}

// EvaluateInto is Evaluate writing into r, which it overwrites whole: the
// hot loops use it to keep the result where it is wanted instead of
// copying it out.
func EvaluateInto(r *Result, pt *stage.Point, dev, partner *fit.Device, tr *Trace) {
	var oss ossMemo
	// Each device evaluated below is reset by evalDevice; the rest here.
	r.Dev, r.Partner, r.Position, r.Derate = dev, nil, pt.Stage.Position, pt.Stage.Derate
	r.N, r.Losses, r.Flags, r.Screens, r.RF = 0, Losses{}, 0, 0, RFResult{}
	if pt.Stage.Topology.Resonant() {
		r.Devices = [2]DeviceResult{}
		evaluateRF(r, pt, dev, tr)
	} else if !pt.HasSync {
		r.N = 1
		r.Devices[1] = DeviceResult{}
		var k partnerCharge
		if pt.HasDiode {
			k = diodePartner(&pt.Stage.Diode, pt.Ctrl.V)
		}
		evalDevice(&r.Devices[0], pt, dev, RoleControl, &pt.Ctrl, &k, &oss, tr)
	} else {
		ctrl, sync := dev, dev
		if partner != nil && partner != dev {
			switch pt.Stage.Position {
			case stage.Control:
				sync, r.Partner = partner, partner
			case stage.Sync:
				ctrl, r.Partner = partner, partner
			}
		}
		r.N = 2
		evalDevice(&r.Devices[1], pt, sync, RoleSync, &pt.Sync, nil, &oss, tr)
		k := devicePartner(sync, oss.at(sync, pt.Ctrl.V), &r.Devices[1])
		evalDevice(&r.Devices[0], pt, ctrl, RoleControl, &pt.Ctrl, &k, &oss, tr)
		r.Devices[0].Flags |= k.flags
		offSwitchChecks(&r.Devices[1], &r.Devices[0], pt, &oss, tr)
	}
	for i := 0; i < r.N; i++ {
		d := &r.Devices[i]
		r.Losses = r.Losses.Add(d.Losses)
		r.Flags |= d.Flags
		r.Screens |= d.Screens
	}
	if tr != nil {
		tr.add("", "total", "stage total = Σ switch + Σ driver",
			T("switch", r.Losses.Switch()), T("driver", r.Losses.Driver()), T("total", r.Losses.Total()))
	}
}

// partnerCharge is what the complementary device contributes at the control
// switch's hard turn-on.
type partnerCharge struct {
	qoss  q.Charge      // its output charge at the cell voltage
	eoss  q.Energy      // its stored energy at the cell voltage
	qrr   q.Charge      // its recovered charge (at its junction temperature)
	tj    q.Temperature // its junction temperature (transistor partner)
	lloop q.Inductance  // its package share of the power loop
	flags fit.Flags
	dev   *fit.Device // the partner transistor (nil: diode or ideal)
}

func diodePartner(d *stage.Diode, v q.Voltage) partnerCharge {
	return partnerCharge{
		qoss: q.Charge(float64(d.Cj) * float64(v)),
		eoss: q.Energy(0.5 * float64(d.Cj) * float64(v) * float64(v)),
		qrr:  d.Qrr,
	}
}

// devicePartner is the synchronous switch k seen from the control switch,
// with its output-capacitance law at the cell voltage, ok, and its
// recovered charge at its solved junction temperature kr.Thermal.
func devicePartner(k *fit.Device, ok loss.OssPoint, kr *DeviceResult) partnerCharge {
	p := partnerCharge{qoss: ok.Q(), eoss: ok.E(), lloop: k.Lloop, tj: kr.Thermal.Tj, dev: k}
	if !kr.Thermal.Found {
		p.tj = k.TjMax
	}
	if k.Part.Technology == devices.GaN || kr.Stress.IDead2 <= 0 && kr.Stress.IDead1 <= 0 {
		return p
	}
	if !k.Part.Qrr.OK {
		p.flags |= fit.FlagQrrMissing
		return p
	}
	p.qrr = k.Qrr.At(p.tj)
	p.flags |= fit.FlagQrrInModel
	if !k.QrrHot && p.tj != k.Qrr.T0 {
		p.flags |= fit.FlagQrrTempDefault
	}
	if k.Part.QrrHasCoss {
		p.qrr = max(0, p.qrr-p.qoss)
		p.flags |= fit.FlagQrrLessCoss
	}
	return p
}

// ossMemo keeps an evaluation's output-capacitance laws at the voltages
// last asked for: one power evaluation per device and voltage serves the
// turn-on energy, the partner's charge, the turn-off integral and the
// overshoot checks.
type ossMemo [2]struct {
	d *fit.Device
	p loss.OssPoint
}

func (m *ossMemo) at(d *fit.Device, v q.Voltage) loss.OssPoint {
	for i := range m {
		if m[i].d == d && m[i].p.V == v {
			return m[i].p
		}
	}
	m[1] = m[0]
	m[0].d, m[0].p = d, d.Oss.At(v)
	return m[0].p
}
