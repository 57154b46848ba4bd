package evaluate

import (
	q "swrank/devices/quantity"
	"swrank/rank/fit"
	"swrank/rank/loss"
	"swrank/rank/stage"
	"swrank/rank/thermal"
)

// Role is the place a device fills in a stage.
type Role uint8

// Roles.
const (
	RoleControl Role = iota // the hard-switching (control) switch
	RoleSync                // the synchronous rectifier switch
)

func (r Role) String() string {
	if r == RoleSync {
		return "sync"
	}
	return "control"
}

// DeviceResult is one switch's share of an evaluation.
type DeviceResult struct {
	Dev     *fit.Device         // the device in this place
	Role    Role                // the place it fills
	Losses  Losses              // its losses and its driver's, W
	Thermal thermal.Solution    // its junction temperature, °C, and how it was found
	Rth     q.ThermalResistance // junction to ambient used, K/W (0: none)
	Rds     q.Resistance        // on-resistance at the drive and the solved Tj (dynamic factor included)
	Method  fit.Method          // how its hard edges were computed
	Flags   fit.Flags           // fallbacks used for this device at this point
	Screens Screens             // reasons it is set aside (0: none)
	Stress  stage.SwitchStress  // what its place asks of it

	VplOn, VplOff q.Voltage        // plateau at the turn-on and turn-off currents, at Tj
	Trans         loss.Transitions // hard-edge intervals at Tj (common-source inductance included)
	Eon, Eoff     q.Energy         // overlap energies per cycle (loop and common-source inductance included)
	Ecoss, Erec   q.Energy         // output-capacitance and recovery energies per cycle
	Edead         q.Energy         // dead-time conduction energy per cycle
	Egate         q.Energy         // gate-drive energy per cycle
	// GateEdge is the part of Losses.GateDriver that the driver's output
	// stage dissipates while its voltage ramps (stage.Driver.Edge; 0 for
	// a step), W.
	GateEdge q.Power
	Qg       q.Charge  // gate charge moved per cycle (on minus off level)
	IdLimit  q.Current // continuous rating derated to the case temperature

	// Second-order results (docs/second-order.md).

	// Vth is the threshold at the solved junction temperature, V.
	Vth q.Voltage
	// Vsd1, Vsd2 are the reverse-conduction drops in the dead times before
	// and after this switch's conduction, at Tj, V (sync only).
	Vsd1, Vsd2 q.Voltage
	// TDiode1, TDiode2 are the diode's full-current conduction times in
	// those dead times: the programmed dead time less what the edges use,
	// s (sync only; ≥ 0).
	TDiode1, TDiode2 q.Time
	// Margin1, Margin2 are what is left of each dead time when the other
	// switch's channel starts to conduct, s: below 0 both conduct at once
	// (ScreenCrossConduction; sync only).
	Margin1, Margin2 q.Time
	// Qrr is the partner's recovered charge counted at this switch's hard
	// turn-on, at the partner's junction temperature, C.
	Qrr q.Charge
	// Lcs is the common-source inductance used in the gate loop, H (0: none,
	// or not used by the tr/tf method).
	Lcs q.Inductance
	// ElcsOn, ElcsOff are the energies per cycle the common-source
	// inductance adds at turn-on and turn-off, J (≥ 0).
	ElcsOn, ElcsOff q.Energy
	// Lloop is the power-loop inductance of the cell (layout plus the
	// packages' l_loop), H, when it was used.
	Lloop q.Inductance
	// Eloop is the net energy per cycle the loop inductance adds to this
	// switch: ½·L·I_off² at turn-off less the turn-on saving, J (may be < 0).
	Eloop q.Energy
	// Vpeak is the highest drain voltage: the blocked voltage plus the
	// loop overshoot, V. It is what the voltage screen compares.
	Vpeak q.Voltage
	// RdsDyn is the dynamic on-resistance factor applied, ≥ 1 (1: none).
	RdsDyn float64
	// FalseOn is the off-state gate margin (false turn-on screen).
	FalseOn FalseTurnOn
}

// FalseTurnOn is the off-state gate check of one switch: how close the gate
// comes to its hot threshold while the other switch of the cell moves the
// node. Every evaluated device has Vth and Margin (the static margin of the
// off level when nothing moves its drain); the dv/dt fields are filled for
// the synchronous switch, whose drain the control switch hard-switches.
type FalseTurnOn struct {
	// DvDtOn is the mean slope of this switch's drain voltage during the
	// other switch's hard turn-on, V/s (positive; 0: no exposure).
	DvDtOn float64
	// DvDtOff is the mean slope at the other switch's hard turn-off, V/s
	// (the drain falls: it pulls the gate negative; 0: no exposure).
	DvDtOff float64
	// Cgd is the charge-equivalent gate-drain capacitance over the swing,
	// Cgs the gate-source capacitance, F.
	Cgd, Cgs q.Capacitance
	// R is the off-state gate loop: driver sink + external + internal, Ω.
	R q.Resistance
	// Bounce is the positive gate excursion above the off level, V.
	Bounce q.Voltage
	// Vth is the threshold at the solved junction temperature, V.
	Vth q.Voltage
	// Margin is Vth − (Voff + Bounce), V: ≤ 0 sets ScreenFalseTurnOn.
	Margin q.Voltage
	// Spike is the negative gate excursion below the off level at the
	// other edge, V (≥ 0).
	Spike q.Voltage
	// SpikeMargin is (Voff − Spike) − vgs_min, V: < 0 sets FlagGateSpike.
	SpikeMargin q.Voltage
	// Checked is true when the dv/dt bounce was computed.
	Checked bool
}

// Result is the evaluation of one part at one operating point.
type Result struct {
	Dev      *fit.Device     // the part being ranked
	Partner  *fit.Device     // the device in the other place when it is not Dev (nil otherwise)
	Position stage.Position  // where Dev sits
	N        int             // number of devices evaluated (1 or 2)
	Devices  [2]DeviceResult // the first N: control switch first, then the synchronous switch
	Losses   Losses          // sum over the devices and their drivers, W
	Flags    fit.Flags       // union of the devices' fallbacks
	Screens  Screens         // union of the devices' screens (0: the part passes)
	Derate   q.Ratio         // the stage's voltage derating, for the screen's message
	Pout     q.Power         // the power the stage processes, W (0: not known), for the screen's message
	RF       RFResult        // class E and class D values (zero for other stages)
}

// Screened reports whether the part is set aside.
func (r *Result) Screened() bool { return r.Screens != 0 }

// Tj returns the hottest junction temperature of the evaluation and whether
// one exists.
func (r *Result) Tj() (q.Temperature, bool) {
	var t q.Temperature
	ok := true
	for i := 0; i < r.N; i++ {
		d := &r.Devices[i]
		if !d.Thermal.Found {
			ok = false
			continue
		}
		if i == 0 || d.Thermal.Tj > t {
			t = d.Thermal.Tj
		}
	}
	return t, ok
}

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

	GateDriver      q.Power // gate-drive energy in the driver: its output resistance and, with a ramping edge, its output stage (DeviceResult.GateEdge)
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
