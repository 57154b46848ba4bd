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
//
// A part that leaves blank a value whose estimate has no unfavourable end
// has twins with the other ends of those estimates (fit.Device.Alt, a
// chain): each is evaluated and the worst result is kept, set aside before
// passing, then the higher loss (FlagEstimateLow says a twin's was kept).
// A partner with twins steps along its chain with the part (the last twin
// of the shorter chain stays).
func EvaluateInto(r *Result, pt *stage.Point, dev, partner *fit.Device, tr *Trace) {
	if dev.Alt == nil && (partner == nil || partner.Alt == nil) {
		evaluateInto(r, pt, dev, partner, tr)
		return
	}
	evaluateInto(r, pt, dev, partner, nil)
	first := r.Losses.Total()
	kept := 0
	var alt Result
	for k := 1; k < max(chainLen(dev), chainLen(partner)); k++ {
		evaluateInto(&alt, pt, nth(dev, k), nth(partner, k), nil)
		if worse(&alt, r) {
			*r, kept = alt, k
		}
	}
	if tr != nil {
		evaluateInto(r, pt, nth(dev, kept), nth(partner, kept), tr)
		if kept > 0 {
			tr.add("", "estimates", "a blank value with no unfavourable end was taken at both ends of its range; the other end gives the worse result, shown here",
				T("total, first end", first), T("total, this end", r.Losses.Total()))
		}
	}
	if kept == 0 {
		return
	}
	// The result names the part's own devices, not the twins.
	r.Dev, r.Flags = dev, r.Flags|fit.FlagEstimateLow
	if r.Partner != nil {
		r.Partner = partner
	}
	for i := 0; i < r.N; i++ {
		d := &r.Devices[i]
		switch d.Dev {
		case nth(dev, kept):
			d.Dev = dev
		case nth(partner, kept):
			d.Dev = partner
		}
	}
}

// nth is the k-th twin of d's chain (d itself for k = 0, the last twin
// when the chain is shorter; nil for nil).
func nth(d *fit.Device, k int) *fit.Device {
	for ; k > 0 && d != nil && d.Alt != nil; k-- {
		d = d.Alt
	}
	return d
}

// chainLen is the number of devices in d's chain, d included (0 for nil).
func chainLen(d *fit.Device) int {
	n := 0
	for ; d != nil; d = d.Alt {
		n++
	}
	return n
}

// worse reports whether a ranks below b: set aside where b passes, or the
// same standing with a higher total loss.
func worse(a, b *Result) bool {
	if sa, sb := a.Screened(), b.Screened(); sa != sb {
		return sa
	}
	return a.Losses.Total() > b.Losses.Total()
}

// evaluateInto is EvaluateInto for the devices as given.
func evaluateInto(r *Result, pt *stage.Point, dev, partner *fit.Device, tr *Trace) {
	var oss ossMemo
	// Each device evaluated below is reset by evalDevice; the rest here.
	r.Dev, r.Partner, r.Position, r.Derate, r.Pout = dev, nil, pt.Stage.Position, pt.Stage.Derate, pt.Stage.Pout
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
		evalDevice(&r.Devices[0], pt, dev, RoleControl, &pt.Ctrl, &k, nil, &oss, tr)
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
		dt := diodeTimes(pt, ctrl, sync)
		evalDevice(&r.Devices[1], pt, sync, RoleSync, &pt.Sync, nil, &dt, &oss, tr)
		k := devicePartner(sync, oss.at(sync, pt.Ctrl.V), &r.Devices[1], pt.Ctrl.IOn, dt.didtOn, dt.t2)
		evalDevice(&r.Devices[0], pt, ctrl, RoleControl, &pt.Ctrl, &k, nil, &oss, tr)
		crossConduction(&r.Devices[1], &dt, tr)
		r.Devices[0].Flags |= k.flags
		offSwitchChecks(&r.Devices[1], &r.Devices[0], pt, &oss, tr)
	}
	for i := 0; i < r.N; i++ {
		d := &r.Devices[i]
		r.Losses = r.Losses.Add(d.Losses)
		r.Flags |= d.Flags
		r.Screens |= d.Screens
	}
	stageScreens(r, pt)
	if tr != nil {
		tr.add("", "total", "stage total = Σ switch + Σ driver",
			T("switch", r.Losses.Switch()), T("driver", r.Losses.Driver()), T("total", r.Losses.Total()))
	}
}

// partnerCharge is what the complementary device contributes at the control
// switch's hard turn-on.
type partnerCharge struct {
	qoss q.Charge // its output charge at the cell voltage
	eoss q.Energy // its stored energy at the cell voltage
	qrr  q.Charge // its recovered charge (at its junction temperature)
	// rec is its commutation at the working point by the charge-control
	// model (at the datasheet's temperature), iF, didt and tOn the
	// forward current, the rate and the diode's conduction before it;
	// zero when the datasheet's test conditions give no lifetime.
	rec   loss.Recovery
	iF    q.Current
	didt  q.Slew
	tOn   q.Time
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
// recovered charge at its solved junction temperature kr.Thermal, moved
// from the datasheet's test (a long forward conduction) to the
// commutation of forward current iF at rate didt after the diode has
// carried it for tDiode in the dead time (charge-control model,
// loss.RecoveredCharge and loss.RecoveredChargeAfter).
func devicePartner(k *fit.Device, ok loss.OssPoint, kr *DeviceResult, iF q.Current, didt q.Slew, tDiode q.Time) partnerCharge {
	p := partnerCharge{qoss: ok.Q(), eoss: ok.E(), lloop: k.Lloop, tj: kr.Thermal.Tj, dev: k}
	if !kr.Thermal.Found {
		p.tj = k.TjMax
	}
	if !k.Part.Lloop.OK {
		p.flags |= fit.FlagLloopEstimated
	}
	if k.Part.Technology == devices.GaN || kr.Stress.IDead2 <= 0 && kr.Stress.IDead1 <= 0 {
		return p
	}
	// The recovered charge alone: the output charge the datasheet's
	// figure holds (at its stated test voltage) comes out first.
	p.qrr = max(0, k.Qrr.At(p.tj)-k.QrrCoss)
	if k.QrrTau > 0 && iF > 0 && didt > 0 {
		p.rec, p.iF, p.didt, p.tOn = loss.RecoveryAfter(k.QrrTau, iF, didt, tDiode), iF, didt, tDiode
		scale := float64(p.rec.Recovered) / float64(k.QrrFit)
		p.qrr = q.Charge(float64(p.qrr) * scale)
		if !k.Part.QrrIf.OK || !k.Part.QrrDidt.OK {
			p.flags |= fit.FlagQrrCondEstimated
		}
	}
	if k.QrrEst > 0 {
		p.flags |= fit.FlagQrrEstimated
	}
	p.flags |= fit.FlagQrrInModel
	if !k.QrrHot && p.tj != k.Qrr.T0 {
		p.flags |= fit.FlagQrrTempDefault
	}
	switch {
	case k.QrrCoss > 0:
		p.flags |= fit.FlagQrrLessCoss
	case bool(k.Part.QrrHasCoss):
		// The figure holds an output charge at a test voltage not
		// stated: none is taken out (unknown is not zero).
		p.flags |= fit.FlagQrrCondEstimated
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
