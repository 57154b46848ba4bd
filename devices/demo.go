package devices

import (
	"bytes"
	"embed"
	"io/fs"
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

// demoModels are the invented device models of the demo parts (VDMOS cards
// and one subcircuit), named by their spice_model column.
//
//go:embed demomodels/*.lib
var demoModels embed.FS

// DemoModels returns the demo parts' model files, at the top of the file
// system under the names their spice_model column gives.
func DemoModels() fs.FS {
	sub, err := fs.Sub(demoModels, "demomodels")
	if err != nil {
		panic(err) // the embedded directory is fixed at build time
	}
	return sub
}
