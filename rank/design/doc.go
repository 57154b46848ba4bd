// Package design reads a design file and the decision inputs around it:
// which load profile, how many paralleled devices, which light-load
// behaviour, shared by the commands rank, compare and sweep.
//
// A design file is a small TOML file that holds a stage: its operating
// point or points, driver, thermal path, derating, the choices of the
// decision commands, and the parts library (a path relative to the design
// file). Its keys are the command-line flags' names and its values the
// text those flags take ("500k", "4.7n", or plain numbers and booleans); a
// flag given on the command line overrides the file. The tables are
// [stage], [driver], [thermal], [derating], [choice] and any number of
// [[point]] tables, each a named, weighted stage (docs/decisions.md).
//
// It takes a command's parsed flags (Decisions.Apply with a Command) and
// gives the stage's weighted points as a decide.Profile
// (Decisions.Profile), the paralleled counts to try
// (Decisions.ParallelCounts) and the light-load behaviour
// (Decisions.LightLoad). WriteStarter writes the starter design file and
// parts library of "swrank new"; WriteAtomic writes any file swrank
// writes, whole or not at all.
//
// It comes after rank/decide in the order of the rank packages, since it
// builds weighted profiles; only the command (cmd/swrank) imports it.
package design
