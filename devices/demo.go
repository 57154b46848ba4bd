package devices

import (
	"bytes"
	_ "embed"
)

// demoCSV is the demo library: the invented catalogue described in
// docs/demo-library.md.
//
//go:embed demo.csv
var demoCSV []byte

// Demo returns the built-in demo library (Source "demo"): invented parts
// from 20 V small-signal silicon to 150 V power silicon, GaN from 45 V to
// 700 V, and two
// SiC parts, for trying swrank without a library of one's own. Its error is
// a ProblemList, as for Read; the shipped file has no fatal problem.
func Demo() (*Library, error) {
	return Read(bytes.NewReader(demoCSV), "demo")
}

// DemoCSV returns a copy of the demo library's CSV text, for a user who
// wants to start a library of their own from it.
func DemoCSV() []byte {
	return bytes.Clone(demoCSV)
}
