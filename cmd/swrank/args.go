package main

import (
	"errors"
	"flag"
	"fmt"
	"strings"

	"swrank/devices"
)

// usageError is a mistake in the command line itself: an unknown flag, a
// value a flag cannot take, a missing or extra argument. It is reported in
// two lines (the mistake, then where the help is) with exit status 2.
type usageError struct{ msg string }

func (e *usageError) Error() string { return e.msg }

// usagef returns a usageError.
func usagef(format string, a ...any) error {
	return &usageError{msg: fmt.Sprintf(format, a...)}
}

// boolFlag is a flag that takes no value (flag's own bool flags).
type boolFlag interface{ IsBoolFlag() bool }

// parse parses args into fs with flags anywhere on the line: before,
// between and after the positional arguments. "--name value",
// "--name=value", "-name value" and a bare "--name" for a true/false flag
// are read; "--" ends the flags; "-" alone is an argument (standard
// input). -h and --help print the usage and return flag.ErrHelp. Every
// other mistake is a usageError naming the flag, with the nearest flag
// names when the name is misspelt.
func parse(fs *flag.FlagSet, args []string) error {
	var pos []string
	for i := 0; i < len(args); i++ {
		a := args[i]
		if a == "--" {
			pos = append(pos, args[i+1:]...)
			break
		}
		if !isFlag(a) {
			pos = append(pos, a)
			continue
		}
		name, value, hasValue := strings.Cut(strings.TrimPrefix(a[1:], "-"), "=")
		if name == "h" || name == "help" {
			fs.Usage()
			return flag.ErrHelp
		}
		f := fs.Lookup(name)
		if f == nil {
			return unknownFlag(fs, name)
		}
		if b, ok := f.Value.(boolFlag); ok && b.IsBoolFlag() {
			if !hasValue {
				value = "true"
			}
		} else if !hasValue {
			if i+1 == len(args) {
				_, help := flag.UnquoteUsage(f)
				return usagef("--%s needs a value: %s", name, help)
			}
			i++
			value = args[i]
		}
		if err := fs.Set(name, value); err != nil {
			return badValue(f, value, err)
		}
	}
	// Only arguments are left: "--" keeps any that start with a dash.
	if err := fs.Parse(append([]string{"--"}, pos...)); err != nil {
		return usagef("%v", err)
	}
	return nil
}

// isFlag reports whether a command-line word names a flag: it starts with
// a dash and is neither "-" (standard input) nor a negative number.
func isFlag(a string) bool {
	if len(a) < 2 || a[0] != '-' {
		return false
	}
	c := a[1]
	return !(c >= '0' && c <= '9' || c == '.')
}

// unknownFlag is the error for a flag fs does not define, suggesting the
// nearest names it does.
func unknownFlag(fs *flag.FlagSet, name string) error {
	var known []string
	fs.VisitAll(func(f *flag.Flag) { known = append(known, f.Name) })
	return usagef("unknown flag --%s%s", name, didYouMean(devices.NearestNames(name, known), "--"))
}

// badValue is the error for a value flag f cannot take.
func badValue(f *flag.Flag, value string, err error) error {
	if b, ok := f.Value.(boolFlag); ok && b.IsBoolFlag() {
		return usagef("--%s=%s: want true or false (or --%s alone)", f.Name, value, f.Name)
	}
	return usagef("--%s: %v", f.Name, err)
}

// didYouMean formats suggestions as " (did you mean --a or --b?)", each
// with prefix; "" when there are none.
func didYouMean(near []string, prefix string) string {
	if len(near) == 0 {
		return ""
	}
	q := make([]string, len(near))
	for i, n := range near {
		q[i] = prefix + n
	}
	return " (did you mean " + strings.Join(q, " or ") + "?)"
}

// errNoPass is the error of a command whose output was written but in
// which no part passes every screen: exit status 3.
var errNoPass = errors.New("no part passes every screen (the reasons are in the output)")

// exitStatuses documents the exit statuses, for swrank -h.
const exitStatuses = `Exit status:
	0  done: the parts are ranked (or the library checked, listed, written)
	1  bad input: a library, design file, operating point or part name
	   that cannot be used (the message names file, line, column and field)
	2  usage: an unknown flag, a value a flag cannot take, a missing or
	   extra argument
	3  no part passes every screen (the output says why each is set aside)`
