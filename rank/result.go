package rank

import (
	q "swrank/devices/quantity"
)

// Losses are the time-averaged losses of one switch and its driver, W.
// The first seven heat the transistor; the last three heat the driver and
// the external gate resistor.
type Losses struct {
	Conduction q.Power // I_rms²·Rds(on) at Tj and the drive voltage
	TurnOn     q.Power // V·I overlap at hard turn-on
	TurnOff    q.Power // V·I overlap at hard turn-off
	Coss       q.Power // output-capacitance energy dumped at hard turn-on (and hysteresis)
	DeadTime   q.Power // body-diode (reverse) conduction during the dead times
	Recovery   q.Power // the partner's reverse recovery, dissipated in this switch
	GateRint   q.Power // gate-drive energy in the internal gate resistance

	GateDriver      q.Power // gate-drive energy in the driver's output resistance
	GateRext        q.Power // gate-drive energy in the external gate resistor
	DriverQuiescent q.Power // driver supply × quiescent current
}

// Switch is the loss that heats the transistor.
func (l Losses) Switch() q.Power {
	return l.Conduction + l.TurnOn + l.TurnOff + l.Coss + l.DeadTime + l.Recovery + l.GateRint
}

// Driver is the loss outside the transistor: driver and external resistor.
func (l Losses) Driver() q.Power { return l.GateDriver + l.GateRext + l.DriverQuiescent }

// Total is Switch plus Driver.
func (l Losses) Total() q.Power { return l.Switch() + l.Driver() }

// Add returns the component-wise sum.
func (l Losses) Add(o Losses) Losses {
	return Losses{
		Conduction: l.Conduction + o.Conduction, TurnOn: l.TurnOn + o.TurnOn, TurnOff: l.TurnOff + o.TurnOff,
		Coss: l.Coss + o.Coss, DeadTime: l.DeadTime + o.DeadTime, Recovery: l.Recovery + o.Recovery,
		GateRint: l.GateRint + o.GateRint, GateDriver: l.GateDriver + o.GateDriver,
		GateRext: l.GateRext + o.GateRext, DriverQuiescent: l.DriverQuiescent + o.DriverQuiescent,
	}
}
