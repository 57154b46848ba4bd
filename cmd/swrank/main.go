// Command swrank ranks switching transistors by their total loss at your
// operating point, from a CSV library of datasheet values.
//
//	swrank rank    rank the parts of a library at an operating point
//	swrank explain show one part's whole calculation
//	swrank check   validate a parts library and report every problem
//	swrank parts   list a library's parts and how complete each row is
//	swrank compare judge candidates against the part already fitted
//	swrank sweep   sweep a variable and find where the best part changes
//	swrank new     write a starter design file and parts library
//	swrank verify  simulate the shortlist in ngspice beside the prediction
//	swrank characterise  a model's datasheet values as a library row
//
// Run "swrank CMD -h" for the inputs of each command, with units and
// defaults.
package main

import (
	"errors"
	"flag"
	"fmt"
	"io"
	"os"
	"strings"

	"swrank/devices"
)

const caution = `Caution: switching converters and RF stages can carry lethal voltages, and
transistors, heatsinks and inductors run hot. swrank estimates losses from
datasheet values; it does not make a design safe. Follow local electrical
codes and qualified practice, and verify every design on the bench.`

// command is one subcommand.
type command struct {
	name, summary string
	run           func(args []string, stdin io.Reader, stdout, stderr io.Writer) error
}

func commands() []command {
	return []command{
		{"rank", "rank the parts of a library by total loss at an operating point", runRank},
		{"explain", "show one part's whole calculation at an operating point", runExplain},
		{"check", "validate a parts library and report every problem at once", runCheck},
		{"parts", "list a library's parts: ratings, package, technology, how complete each row is", runParts},
		{"compare", "judge replacement candidates against the part already fitted", runCompare},
		{"sweep", "sweep fsw, iout, vin or vdrive and find where the best part changes", runSweep},
		{"verify", "simulate the best-ranked parts in ngspice and set simulated losses beside the predicted", runVerify},
		{"characterise", "measure a model's datasheet values in ngspice and write them as a library row", runCharacterise},
		{"new", "write a starter design file and parts library (never overwrites)", runNew},
	}
}

func usage(w io.Writer) {
	fmt.Fprintf(w, `swrank ranks switching transistors by their total loss at your operating
point, from a CSV library of datasheet values.

Usage:
	swrank <command> [flags]

Commands:
`)
	for _, c := range commands() {
		fmt.Fprintf(w, "\t%-8s %s\n", c.name, c.summary)
	}
	fmt.Fprintf(w, `
Run "swrank <command> -h" for its flags, each with its unit and default.
Values take SI prefixes: 280m, 4.7n, 1.2k, 500k, 2M.

Flags may come before or after the arguments; --parts may be given more
than once, and "-" reads a library from standard input.

Example:
	swrank rank --demo --vin 12 --vout 1.2 --iout 10 --fsw 500k --vdrive 5

%s

%s
`, exitStatuses, caution)
}

// exitError carries a specific exit status.
type exitError struct {
	code int
	err  error
}

func (e *exitError) Error() string { return e.err.Error() }
func (e *exitError) Unwrap() error { return e.err }

// run runs the command line args with an empty standard input.
func run(args []string, stdout, stderr io.Writer) int {
	return runIO(args, strings.NewReader(""), stdout, stderr)
}

// runIO runs the command line args and returns the exit status
// (exitStatuses).
func runIO(args []string, stdin io.Reader, stdout, stderr io.Writer) int {
	if len(args) == 0 {
		usage(stderr)
		return 2
	}
	switch args[0] {
	case "-h", "-help", "--help", "help":
		usage(stdout)
		return 0
	}
	var names []string
	for _, c := range commands() {
		names = append(names, c.name)
		if c.name != args[0] {
			continue
		}
		err := c.run(args[1:], stdin, stdout, stderr)
		var ee *exitError
		var ue *usageError
		switch {
		case err == nil:
			return 0
		case errors.Is(err, flag.ErrHelp):
			return 0
		case errors.As(err, &ue):
			fmt.Fprintf(stderr, "swrank %s: %s\nsee swrank %s -h\n", c.name, printable(ue), c.name)
			return 2
		case errors.Is(err, errNoPass):
			fmt.Fprintf(stderr, "swrank %s: %v\n", c.name, err)
			return 3
		case errors.As(err, &ee):
			fmt.Fprintf(stderr, "swrank %s: %s\n", c.name, printable(ee.err))
			return ee.code
		}
		fmt.Fprintf(stderr, "swrank %s: %s\n", c.name, printable(err))
		return 1
	}
	fmt.Fprintf(stderr, "swrank: unknown command %q%s\nsee swrank -h\n", args[0], didYouMean(devices.NearestNames(args[0], names), ""))
	return 2
}

func main() {
	os.Exit(runIO(os.Args[1:], os.Stdin, os.Stdout, os.Stderr))
}

// newFlagSet makes a flag set that prints its usage with the caution.
func newFlagSet(name, synopsis string, stderr io.Writer) *flag.FlagSet {
	fs := flag.NewFlagSet(name, flag.ContinueOnError)
	fs.SetOutput(stderr)
	fs.Usage = func() {
		fmt.Fprintf(fs.Output(), "Usage: swrank %s\n\nFlags (values take SI prefixes: 4.7n, 500k):\n", synopsis)
		printFlags(fs)
		fmt.Fprintf(fs.Output(), "\n%s\n", caution)
	}
	return fs
}

// printFlags lists the flags of fs as they are typed, "--name VALUE", each
// with its help and its default when that is not the zero value.
func printFlags(fs *flag.FlagSet) {
	fs.VisitAll(func(f *flag.Flag) {
		name, help := flag.UnquoteUsage(f)
		if name != "" {
			name = " " + name
		}
		fmt.Fprintf(fs.Output(), "  --%s%s\n    \t%s", f.Name, name, strings.ReplaceAll(help, "\n", "\n    \t"))
		switch f.DefValue {
		case "", "0", "false":
		default:
			fmt.Fprintf(fs.Output(), " (default %s)", f.DefValue)
		}
		fmt.Fprintln(fs.Output())
	})
}

// printable is an error's message with control characters escaped
// (devices.Printable), line by line: a message may quote a library's text.
func printable(err error) string {
	lines := strings.Split(err.Error(), "\n")
	for i, l := range lines {
		lines[i] = devices.Printable(l)
	}
	return strings.Join(lines, "\n")
}
