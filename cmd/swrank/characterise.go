package main

import (
	"context"
	"fmt"
	"io"
	"path/filepath"
	"strings"

	"swrank/devices"
	q "swrank/devices/quantity"
	"swrank/rank/spice"
)

const characteriseSynopsis = `characterise MODEL.lib --vds-max V --id-max A [--subckt NAME --pins "d g s"] [--name PART] [--i-test A] [--append FILE.csv] [--ngspice PATH] [--timeout D]`

func runCharacterise(args []string, stdin io.Reader, stdout, stderr io.Writer) error {
	var sf simFlags
	var subckt, pins, name, appendTo string
	var rt spice.Ratings
	var vdsMax, vgsMax, vgs2 q.Voltage
	var idA, itestA q.Current
	fs := newFlagSet("characterise", characteriseSynopsis, stderr)
	sf.register(fs)
	fs.StringVar(&subckt, "subckt", "", "subcircuit `NAME` in the model file (default: the file's one VDMOS .model card)")
	fs.StringVar(&pins, "pins", "", "the subcircuit's pin order, `PINS` of d, g, s and k, e.g. \"d g s\"")
	fs.StringVar(&name, "name", "", "part `NAME` of the row (default: the model's name)")
	fs.StringVar(&appendTo, "append", "", "add the row to the library `FILE.csv` (created when missing; never overwrites a row) instead of printing it")
	fs.Var(qty[q.Voltage]{&vdsMax}, "vds-max", "drain-source rating, `V` (required)")
	fs.Var(qty[q.Current]{&idA}, "id-max", "continuous drain current rating, `A` (required)")
	fs.Var(qty[q.Current]{&itestA}, "i-test", "drain current of the on-resistance, gate-charge, switching-time and diode tests, `A` (default id-max/2)")
	fs.Var(qty[q.Voltage]{&vgsMax}, "vgs-max", "gate rating, `V` (default 20)")
	fs.Var(qty[q.Voltage]{&vgs2}, "vgs2", "second gate voltage of the on-resistance test, `V` (default 4.5)")
	// MODEL may come before or after the flags.
	if err := parse(fs, args); err != nil {
		return err
	}
	if fs.NArg() == 0 {
		fs.Usage()
		return usagef("characterise takes one model file")
	}
	model := fs.Arg(0)
	if err := parse(fs, fs.Args()[1:]); err != nil {
		return err
	}
	if fs.NArg() > 0 {
		return usagef("characterise takes one model file (got also %q)", fs.Args())
	}
	rt.VdsMax, rt.IdMax, rt.ITest, rt.VgsMax, rt.Vgs2 = float64(vdsMax), float64(idA), float64(itestA), float64(vgsMax), float64(vgs2)
	if !(rt.VdsMax > 0) || !(rt.IdMax > 0) {
		return usagef("--vds-max and --id-max are required (a model file holds no ratings)")
	}
	dev, err := spice.LoadDevice(model, subckt, pins)
	if err != nil {
		return err
	}
	if appendTo != "" {
		// Fail before simulating when the row could not be added.
		if err := devices.CheckAppend(appendTo, nameOr(name, dev.Name)); err != nil {
			return err
		}
	}
	r, err := sf.runner()
	if err != nil {
		return err
	}
	rt.Name = nameOr(name, dev.Name)
	ds, m, err := spice.CharacteriseDevice(context.Background(), r, dev, rt)
	if err != nil {
		return err
	}
	p := ds.Part(m)
	p.Package, p.Notes = "", "characterised from the model "+filepath.Base(model)+" by ngspice simulation (swrank characterise); typical values at 25 °C"
	p.SpiceModel, p.SpiceSubckt, p.SpicePins = model, subckt, strings.Join(dev.Pins, " ")
	if appendTo == "" {
		return devices.WritePart(stdout, &p)
	}
	if rel, err := filepath.Rel(filepath.Dir(appendTo), model); err == nil && !filepath.IsAbs(model) {
		p.SpiceModel = rel
	} else if abs, err := filepath.Abs(model); err == nil {
		p.SpiceModel = abs
	}
	if err := devices.AppendPart(appendTo, &p); err != nil {
		return err
	}
	fmt.Fprintf(stderr, "swrank: %s added to %s\n", p.Name, appendTo)
	return nil
}

func nameOr(name, def string) string {
	if name != "" {
		return name
	}
	return def
}
