// Package resonant holds pure models of soft-switched and RF stages: the
// single-switch class E amplifier (ideal closed form and a finite loaded-Q
// periodic-steady-state solver), its switch losses, the share of the shunt
// capacitance that a transistor's nonlinear output capacitance takes, and
// the zero-voltage-switching bookkeeping of a class D (voltage-switching
// half-bridge) stage driving a series-resonant load.
//
// Every function is a pure function of typed inputs from
// swrank/devices/quantity; nothing here reads files or keeps state. Each
// model names its published source in its doc comment; docs/resonant.md
// lists the equations, their assumptions and which values are from memory.
//
// Angles are radians and are carried in q.Ratio (a dimensionless number).
// Reactances are carried in q.Resistance (ohms).
package resonant
