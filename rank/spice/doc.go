// Package spice simulates switching transistors with ngspice (the Debian
// package): it builds the decks, runs them and reads back what they show.
//
// It takes a synthetic device described by ngspice VDMOS model parameters
// and the ratings of its invented datasheet (Model), and a circuit to put
// it in: an operating point of the clamped-inductive hard-switched cell
// (Point, CellOptions with its parasitic inductances) or the component
// values of a class E stage (ClassEParts). It gives:
//
//   - the device's datasheet, measured by simulated datasheet tests the way
//     a datasheet is made (Characterise), and that datasheet as a parts
//     library row holding only what a datasheet shows (Datasheet.Part);
//   - the energies of one switching period of the hard-switched cell, split
//     into conduction, edges, output capacitance and gate drive
//     (SimulateCell);
//   - the peak and mean drain voltage, output, supply, switch and driver
//     power over the last RF period of a class E stage (SimulateClassE).
//
// Runner finds ngspice (FindNgspice), runs one deck in a temporary
// directory under a deadline and reads its wrdata output columns (Table).
// All values are in SI units. The package knows nothing of swrank's loss
// models: rank/spicecheck compares them with what this package simulates,
// and docs/spice-crosscheck.md describes the decks, the measurement
// convention and the figures.
package spice
