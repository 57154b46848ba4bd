package main

import (
	"io"

	"swrank/rank/report"
)

// runParts lists the parts of one or more libraries with their ratings,
// package and how complete each row is.
func runParts(args []string, stdin io.Reader, stdout, stderr io.Writer) error {
	var in inputs
	fs := newFlagSet("parts", "parts LIB.csv ... (\"-\": standard input; or --demo) [--format table|csv|json|markdown]", stdout)
	fs.BoolVar(&in.demo, "demo", false, "list the built-in demo library")
	fs.BoolVar(&in.read.UnknownAsNotes, "notes-columns", false, "accept columns swrank does not know as your own notes (default: an error naming the closest known column)")
	fs.StringVar(&in.format, "format", defaultFormat, "output `FORMAT`: table, csv, json or markdown")
	if err := parse(fs, args); err != nil {
		return err
	}
	in.parts = fs.Args()
	if len(in.parts) == 0 && !in.demo {
		return usagef("parts takes one or more library files (- for standard input), or --demo")
	}
	if err := checkFormat(in.format); err != nil {
		return usagef("%v", err)
	}
	lib, devs, aside, err := loadLibrary(&in, stdin, stderr)
	if err != nil {
		return err
	}
	rep := report.PartsList{Source: lib.Source, Devices: devs, SetAside: aside}
	return writeReport(stdout, rep.Report(), &in)
}
