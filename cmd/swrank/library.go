package main

import (
	"fmt"
	"io"
	"strings"

	"swrank/devices"
	"swrank/rank"
	"swrank/rank/decide"
	"swrank/rank/fit"
)

// loadLibrary reads the parts library named by the flags (readLibrary)
// and prepares every part for evaluation: a part whose laws cannot be
// fitted is set aside with its reason and costs only itself. Warnings, and
// the dialect when it is not plain CSV, go to stderr.
func loadLibrary(in *inputs, stdin io.Reader, stderr io.Writer) (*devices.Library, []fit.Device, []rank.SetAside, error) {
	lib, err := readLibrary(in, stdin, stderr)
	if err != nil {
		return nil, nil, nil, err
	}
	for _, w := range lib.Warnings {
		fmt.Fprintf(stderr, "swrank: %v\n", w)
	}
	devs, aside := rank.Prepare(lib.Parts)
	return lib, devs, aside, nil
}

// warnSetAside lists the parts set aside on stderr, for the commands
// whose report has no place for them.
func warnSetAside(stderr io.Writer, source string, aside []rank.SetAside) {
	for _, a := range aside {
		fmt.Fprintf(stderr, "swrank: %s: part set aside: %s\n", devices.Printable(source), a)
	}
}

// findDevice returns the device named name (case-insensitive); for a part
// set aside it says why, and for an unknown name it suggests the nearest
// names in the library.
func findDevice(devs []fit.Device, aside []rank.SetAside, name string) (*fit.Device, error) {
	names := make([]string, 0, len(devs)+len(aside))
	for i := range devs {
		if strings.EqualFold(devs[i].Part.Name, name) {
			return &devs[i], nil
		}
		names = append(names, devs[i].Part.Name)
	}
	for _, a := range aside {
		if strings.EqualFold(a.Part, name) {
			return nil, fmt.Errorf("part %q is set aside: %s", name, a.Reason)
		}
	}
	return nil, fmt.Errorf("no part named %q in the library%s", name, didYouMean(devices.NearestNames(name, names), ""))
}

// noteDialect says on stderr, in one line, which dialect a library was
// read in when it is not plain comma-separated CSV.
func noteDialect(stderr io.Writer, source string, d devices.Dialect) {
	if !d.Plain() {
		fmt.Fprintf(stderr, "swrank: %s: read as %s\n", devices.Printable(source), d)
	}
}

// setAsideProblems reports, as warnings, what rank would set aside in the
// parts a check accepted: a part whose laws cannot be fitted, and the
// worst-case copy (maximum values) of a part that cannot be prepared.
// What rank would refuse, check reports first.
func setAsideProblems(path string, lib *devices.Library) devices.ProblemList {
	if lib == nil {
		return nil
	}
	devs, aside := rank.Prepare(lib.Parts)
	var out devices.ProblemList
	for _, a := range aside {
		out = append(out, &devices.Problem{File: path, Line: a.Line, Part: a.Part,
			Err: fmt.Errorf("rank sets this part aside: %s", a.Reason)})
	}
	for i := range devs {
		if _, _, err := decide.WorstCase(&devs[i]); err != nil {
			p := devs[i].Part
			out = append(out, &devices.Problem{File: path, Line: p.Line, Part: p.Name,
				Err: fmt.Errorf("rank cannot evaluate this part's worst case: %w", err)})
		}
	}
	return out
}
