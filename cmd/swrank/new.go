package main

import (
	"fmt"
	"io"

	"swrank/rank/design"
)

// runNew writes the starter design file and parts library.
func runNew(args []string, stdin io.Reader, stdout, stderr io.Writer) error {
	fs := newFlagSet("new", "new [DIR]", stdout)
	if err := parse(fs, args); err != nil {
		return err
	}
	if fs.NArg() > 1 {
		return usagef("new takes at most one directory, got %d", fs.NArg())
	}
	dir := "."
	if fs.NArg() == 1 {
		dir = fs.Arg(0)
	}
	designPath, partsPath, err := design.WriteStarter(dir)
	if err != nil {
		return err
	}
	fmt.Fprintf(stdout, "wrote %s and %s\nnext: swrank rank --design %s\n", designPath, partsPath, designPath)
	return nil
}
