// Command swrank ranks switching transistors by their total loss at your
// operating point, from a CSV library of datasheet values.
//
//	swrank rank    rank the parts of a library at an operating point
//	swrank explain show one part's whole calculation
//	swrank check   validate a parts library and report every problem
//	swrank compare judge candidates against the part already fitted
//	swrank sweep   sweep a variable and find where the best part changes
//	swrank new     write a starter design file and parts library
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
	run           func(args []string, stdout, stderr io.Writer) error
}

func commands() []command {
	return []command{
		{"rank", "rank the parts of a library by total loss at an operating point", runRank},
		{"explain", "show one part's whole calculation at an operating point", runExplain},
		{"check", "validate a parts library and report every problem at once", runCheck},
		{"compare", "judge replacement candidates against the part already fitted", runCompare},
		{"sweep", "sweep fsw, iout, vin or vdrive and find where the best part changes", runSweep},
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

Example:
	swrank rank --demo --vin 12 --vout 1.2 --iout 10 --fsw 500k --vdrive 5

%s
`, caution)
}

// errUsage marks an error already reported with the command's usage.
var errUsage = errors.New("usage")

// exitError carries a specific exit status.
type exitError struct {
	code int
	err  error
}

func (e *exitError) Error() string { return e.err.Error() }
func (e *exitError) Unwrap() error { return e.err }

func run(args []string, stdout, stderr io.Writer) int {
	if len(args) == 0 {
		usage(stderr)
		return 2
	}
	switch args[0] {
	case "-h", "-help", "--help", "help":
		usage(stdout)
		return 0
	}
	for _, c := range commands() {
		if c.name != args[0] {
			continue
		}
		err := c.run(args[1:], stdout, stderr)
		var ee *exitError
		switch {
		case err == nil:
			return 0
		case errors.Is(err, flag.ErrHelp):
			return 0
		case errors.Is(err, errUsage):
			if err != errUsage {
				fmt.Fprintf(stderr, "swrank %s: %s\n", c.name, printable(err))
			}
			return 2
		case errors.As(err, &ee):
			fmt.Fprintf(stderr, "swrank %s: %s\n", c.name, printable(ee.err))
			return ee.code
		}
		fmt.Fprintf(stderr, "swrank %s: %s\n", c.name, printable(err))
		return 1
	}
	fmt.Fprintf(stderr, "swrank: unknown command %q\n\n", args[0]) // %q escapes controls
	usage(stderr)
	return 2
}

func main() {
	os.Exit(run(os.Args[1:], os.Stdout, os.Stderr))
}

// newFlagSet makes a flag set that prints its usage with the caution.
func newFlagSet(name, synopsis string, stderr io.Writer) *flag.FlagSet {
	fs := flag.NewFlagSet(name, flag.ContinueOnError)
	fs.SetOutput(stderr)
	fs.Usage = func() {
		fmt.Fprintf(fs.Output(), "Usage: swrank %s\n\nFlags (values take SI prefixes: 4.7n, 500k):\n", synopsis)
		fs.PrintDefaults()
		fmt.Fprintf(fs.Output(), "\n%s\n", caution)
	}
	return fs
}

// parse parses args, turning flag errors into errUsage.
func parse(fs *flag.FlagSet, args []string) error {
	if err := fs.Parse(args); err != nil {
		if errors.Is(err, flag.ErrHelp) {
			return err
		}
		return errUsage
	}
	return nil
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
