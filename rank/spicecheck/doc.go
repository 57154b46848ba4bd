// Package spicecheck cross-checks swrank's loss models against circuit
// simulation with ngspice (the Debian package).
//
// It takes the suite's synthetic devices, operating points, parasitic
// variants and class E cases (LoadConfig, testdata/spicecheck/cell.toml)
// and has rank/spice do the simulating: each device is characterised the
// way a datasheet is made (spice.Characterise), so that swrank sees only
// datasheet numbers read back from a parts CSV (WriteParts); the
// clamped-inductive hard-switched cell is simulated and its energies
// integrated over one period (spice.SimulateCell). It gives the simulated
// losses beside swrank's custom stage for the same cell (Predict, NewRow),
// the error and ordering figures (Summarise) and the text report
// (Report). The synchronous half-bridge (LoadBridgeConfig,
// testdata/spicecheck/halfbridge.toml) runs on spice.Bench, the bench of
// swrank verify, over a development set and a held-out set of devices
// (HeldOut), the latter never used to choose a constant (RunBridge,
// Summarise). Its tests hold the acceptance limits. docs/spice-crosscheck.md
// describes the tests, the measurement convention and the figures.
package spicecheck
