// Package verify checks a ranking's shortlist in simulation: for the best
// parts that name an ngspice model (the spice_model column) it builds the
// stage's bench (rank/spice), runs it to periodic steady state, and sets
// the simulated loss shares beside the predicted ones, flagging the shares
// that differ by more than the margins the cross-check against ngspice
// supports (docs/spice-crosscheck.md), and says whether the simulated order
// of the shortlist agrees with the predicted one.
//
// The prediction compared is made under the bench's conditions: the
// junction at the simulation's 25 °C and no package or layout inductance
// (the bench has none); the ranking itself is left as ranked.
package verify
