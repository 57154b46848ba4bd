// Package loss holds the loss models as pure functions of typed inputs
// (devices/quantity), one file per model family:
//
//	conduction.go   on-resistance against gate voltage, I²·R, dynamic on-resistance
//	temperature.go  laws of on-resistance, threshold and ratings against temperature
//	gate.go         the gate-charge curve, gate energy and its split, gate currents
//	overlap.go      hard-switching intervals and V·I overlap, the turn-off voltage rise
//	miller.go       the Miller law of Cgd(v) and the turn-on voltage fall
//	oss.go          output-capacitance laws and their energies at hard and soft turn-on
//	diode.go        reverse conduction in the dead time, recovery
//	parasitic.go    common-source and loop inductance, square-law current edges, gate bounce
//	series.go       numeric speed helpers of the hot path (no physics)
//
// Each function's doc comment names its published source; docs/models.md
// gives each equation with its assumptions. The package knows nothing of
// stages, parts or ranking: it takes voltages, currents, charges and
// times, and gives energies, powers and times.
package loss
