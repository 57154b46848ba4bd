// Package evaluate computes one part at one resolved operating point: it
// takes a prepared device (fit.Device), its partner in a synchronous cell
// when there is one, and a stage.Point, and gives a Result: the losses of
// each switch and its driver (Losses), the junction temperature each
// settles at (rank/thermal), the fallbacks used (fit.Flags), the screens
// that set the part aside (Screens) with their reasons, and, when asked, a
// Trace of every formula with its inputs for explain.
//
// A device's evaluation reads as its steps (device.go): gate loops and
// drive screens, the charges of the hard turn-on, the conduction law, the
// thermal fixed point over the whole temperature-dependent loss
// (tempdep.go: gate, transitions, overlap, dead time), the results at the
// solved temperature, and the screens that need it. Resonant stages are in
// rf.go. Evaluate allocates nothing when its Trace is nil.
package evaluate
