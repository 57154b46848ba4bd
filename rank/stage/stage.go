package stage

import (
	"fmt"
	"strings"
	q "swrank/devices/quantity"
)

// Topology is the kind of power stage.
type Topology uint8

// Topologies.
const (
	Buck   Topology = iota // step-down half-bridge cell
	Boost                  // step-up half-bridge cell
	Custom                 // switch stresses given directly
	ClassE                 // single-switch class E RF amplifier
	ClassD                 // voltage-switching half-bridge into a series-resonant load
)

var topologyNames = [...]string{Buck: "buck", Boost: "boost", Custom: "custom", ClassE: "class-e", ClassD: "class-d"}

func (t Topology) String() string {
	if int(t) < len(topologyNames) {
		return topologyNames[t]
	}
	return fmt.Sprintf("topology(%d)", t)
}

// ParseTopology reads buck, boost, custom, class-e or class-d.
func ParseTopology(s string) (Topology, error) {
	for i, n := range topologyNames {
		if strings.EqualFold(s, n) {
			return Topology(i), nil
		}
	}
	return 0, fmt.Errorf("unknown topology %q (want %s)", s, strings.Join(topologyNames[:], ", "))
}

// Rectifier is the device in the second place of a half-bridge cell.
type Rectifier uint8

// Rectifiers.
const (
	Synchronous Rectifier = iota // a second transistor ("sync")
	DiodeRect                    // an external diode ("diode")
)

func (r Rectifier) String() string {
	if r == DiodeRect {
		return "diode"
	}
	return "sync"
}

// ParseRectifier reads sync or diode.
func ParseRectifier(s string) (Rectifier, error) {
	switch strings.ToLower(s) {
	case "sync", "synchronous":
		return Synchronous, nil
	case "diode":
		return DiodeRect, nil
	}
	return 0, fmt.Errorf("unknown rectifier %q (want sync or diode)", s)
}

// Position says which switch of a synchronous cell the ranked part fills.
type Position uint8

// Positions.
const (
	Pair    Position = iota // the part in both places
	Control                 // the part as the control (hard-switching) switch
	Sync                    // the part as the synchronous (soft-switching) switch
)

var positionNames = [...]string{Pair: "pair", Control: "control", Sync: "sync"}

func (p Position) String() string {
	if int(p) < len(positionNames) {
		return positionNames[p]
	}
	return "position?"
}

// ParsePosition reads control, sync or pair.
func ParsePosition(s string) (Position, error) {
	for i, n := range positionNames {
		if strings.EqualFold(s, n) {
			return Position(i), nil
		}
	}
	return 0, fmt.Errorf("unknown position %q (want control, sync or pair)", s)
}

// Driver is the gate driver of each switch (both switches of a cell use the
// same kind of driver).
type Driver struct {
	// VOn is the gate-source voltage applied to turn on, V. Required, > 0.
	VOn q.Voltage
	// VOff is the gate-source voltage applied to turn off, V. ≤ VOn;
	// negative for bipolar drive. Default 0.
	VOff q.Voltage
	// RSource is the driver's pull-up (source) resistance, Ω. ≥ 0.
	// Default 2 Ω (a typical integrated driver; common practice).
	RSource q.Resistance
	// RSink is the driver's pull-down (sink) resistance, Ω. ≥ 0.
	// Default 1 Ω (common practice).
	RSink q.Resistance
	// IPeakSource and IPeakSink limit the gate current at turn-on and
	// turn-off, A. 0 means no limit (the resistances alone set it).
	IPeakSource, IPeakSink q.Current
	// RgExt is the external gate resistor, Ω. ≥ 0. Default 0.
	RgExt q.Resistance
	// IQ is the driver's quiescent current from its supply (VOn − VOff), A.
	// ≥ 0. Default 0.
	IQ q.Current
	// Edge is the time the driver's own output voltage takes to move from
	// one level to the other, 0–100 %, without its load, s. ≥ 0, at most
	// 1 µs. Default 0: a step, the gate-charge method's usual driver
	// (Balogh 2001), which puts all of each edge's energy in the
	// resistances. A driver datasheet's rise time into a load capacitor
	// C_L includes its own resistance: take t_r − 2.2·R_source·C_L, and
	// 1.25 × a 10–90 % figure (docs/models.md, "Driver edge").
	Edge q.Time
}

// Diode is the external rectifier diode of a non-synchronous cell.
type Diode struct {
	Vf  q.Voltage     // forward drop at the load current, V; ≥ 0; default 0.5 V
	Qrr q.Charge      // recovered charge, C; ≥ 0; default 0 (Schottky)
	Cj  q.Capacitance // junction capacitance (taken as linear), F; ≥ 0; default 0
}

// Stage is an operating point as the user states it. Resolve checks it,
// fills the defaults and works out the switch stresses.
type Stage struct {
	Topology  Topology  // default Buck
	Rectifier Rectifier // default Synchronous
	Position  Position  // default Pair (ignored with a diode rectifier: Control)

	Vin  q.Voltage // input voltage, V; > 0; buck and boost
	Vout q.Voltage // output voltage, V; buck: 0 < Vout < Vin; boost: Vout > Vin
	Iout q.Current // output (load) current, A; > 0
	// Pout is the output power used for percentages, W. Default Vout·Iout
	// (custom: none, percentages are then omitted).
	Pout q.Power
	Fsw  q.Frequency // switching frequency, Hz; > 0

	// Ripple is the peak-to-peak inductor ripple as a fraction of the
	// average inductor current; used when Inductance is 0. Range [0, 2];
	// default (not given) 0.3 (common practice: 20-40 %).
	Ripple q.Opt[q.Ratio]
	// Inductance is the cell's inductor, H. When > 0 it sets the ripple.
	Inductance q.Inductance
	// DeadTime is the time between one switch turning off and the other
	// turning on, at each of the two edges, s. ≥ 0. Default (not given)
	// 20 ns.
	DeadTime q.Opt[q.Time]
	// DeadTimeSyncOn is the dead time after the control switch turns off,
	// before the synchronous switch turns on, s; DeadTimeCtrlOn the one
	// after the synchronous switch turns off, before the control switch
	// turns on. ≥ 0; default (not given) DeadTime.
	DeadTimeSyncOn, DeadTimeCtrlOn q.Opt[q.Time]

	Diode Diode // the rectifier diode when Rectifier is DiodeRect

	// LoopInductance is the power-loop (commutation-loop) inductance of
	// the layout: board traces, input capacitors, and the package of an
	// external rectifier diode, H. The transistors' own package share
	// (their l_loop column) is added to it. ≥ 0; default 0 (no loop
	// inductance counted). See docs/second-order.md.
	LoopInductance q.Inductance
	// CommonSourceInductance is the layout's common-source inductance:
	// the stretch of source trace that the gate loop's return shares with
	// the power loop, H. Each transistor's own l_cs is added to it (the
	// gate-charge method's edges take it). ≥ 0; default 0. See
	// docs/second-order.md.
	CommonSourceInductance q.Inductance

	// Custom stage: the switch stresses directly.
	Vblock q.Voltage // blocking voltage at the hard edges, V; > 0
	Ion    q.Current // drain current at turn-on, A; ≥ 0
	Ioff   q.Current // drain current at turn-off, A; ≥ 0
	Irms   q.Current // rms drain current, A; ≥ 0

	// Resonant stages (class E, class D).
	// RLoad is the load resistance seen by the stage, Ω; give it or Pout.
	RLoad q.Resistance
	// QL is the loaded Q of the series tank, ωL/R. 0 means the ideal
	// limit (class E: Q_L → ∞, closed form); class E needs ≥ 1.7879.
	// Class D: required with F0.
	QL q.Ratio
	// F0 is the tank's resonant frequency (class D), Hz; with QL it sets
	// the load phase at Fsw.
	F0 q.Frequency
	// Phase is the load phase at Fsw (class D), rad; > 0 above resonance.
	// Overrides F0 and QL.
	Phase q.Opt[q.Ratio]

	// Driver is the gate driver of each switch; VOn is required.
	Driver Driver
	// SyncDriver is the synchronous switch's gate driver when it differs
	// from the control switch's (a high-side and a low-side driver);
	// VOn 0 (not given): the same as Driver.
	SyncDriver Driver

	// Ambient is the ambient temperature, °C. Default 25 °C.
	Ambient q.Temperature
	// RthCA is the case-to-ambient thermal resistance (heatsink and
	// interface), K/W. When given it is added to a part's junction-to-case
	// value and overrides its junction-to-ambient value.
	RthCA q.Opt[q.ThermalResistance]
	// RthJCBlank and RthJABlank are the junction-to-case and
	// junction-to-ambient resistances taken for a part that leaves its own
	// blank, K/W, > 0, in place of its package family's estimate (the
	// user's own layout and parts; flagged as estimates all the same).
	// Not given: the family's estimate (docs/library.md).
	RthJCBlank, RthJABlank q.Opt[q.ThermalResistance]
	// TjFixed pins the junction temperature of every device (no thermal
	// solve), °C.
	TjFixed q.Opt[q.Temperature]
	// Derate is the fraction of the voltage rating that the peak drain
	// voltage may reach. Range (0, 1]; default 0.8.
	Derate q.Ratio
	// Strict sets aside every part whose result rests on an estimated
	// value (a blank datasheet cell). Default false: estimates are used,
	// conservatively, and shown.
	Strict bool
}

// DriverOf is the gate driver of the synchronous switch (sync true) or of
// the control switch: SyncDriver when it is given, else Driver.
func (s *Stage) DriverOf(sync bool) *Driver {
	if sync && s.SyncDriver.VOn > 0 {
		return &s.SyncDriver
	}
	return &s.Driver
}
