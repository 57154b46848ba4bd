package devices

import (
	"fmt"
	"strings"
)

// Pin names of the spice_pins column: drain, gate, source and Kelvin
// source (tied to the source in the simulated stage).
const (
	PinDrain  = "d"
	PinGate   = "g"
	PinSource = "s"
	PinKelvin = "k"
)

// ParsePins reads a spice_pins cell: pin names separated by spaces or
// commas, each d, g, s or k, with d, g and s exactly once and k at most
// once. It returns the names in order, lower case.
func ParsePins(s string) ([]string, error) {
	f := strings.FieldsFunc(strings.ToLower(s), func(r rune) bool { return r == ' ' || r == ',' || r == '\t' })
	seen := map[string]int{}
	for _, p := range f {
		switch p {
		case PinDrain, PinGate, PinSource, PinKelvin:
			seen[p]++
		default:
			return nil, fmt.Errorf("%q: pin %q is not d, g, s or k", s, p)
		}
	}
	for _, p := range []string{PinDrain, PinGate, PinSource, PinKelvin} {
		if n := seen[p]; n > 1 || n == 0 && p != PinKelvin {
			return nil, fmt.Errorf("%q: the pins must name d, g and s once each (and k at most once)", s)
		}
	}
	return f, nil
}

// checkSpice checks the simulation-model columns: a subcircuit needs a
// model file and its pin order, and the pin order names each pin once.
func (v *validator) checkSpice() {
	p := v.p
	model, sub, pins := strings.TrimSpace(p.SpiceModel), strings.TrimSpace(p.SpiceSubckt), strings.TrimSpace(p.SpicePins)
	if sub != "" && model == "" && v.ok("spice_model", "spice_subckt") {
		v.add("spice_model", ErrMissingValue, "needed by spice_subckt (the file holding %s)", sub)
	}
	if sub != "" && pins == "" && v.ok("spice_pins", "spice_subckt") {
		v.add("spice_pins", ErrMissingValue, "needed by spice_subckt (the order of the subcircuit's pins, e.g. \"d g s\")")
	}
	if pins != "" && v.ok("spice_pins") {
		if sub == "" {
			v.add("spice_pins", ErrInconsistent, "%q: given without spice_subckt (a .model card has its pins fixed)", pins)
		} else if _, err := ParsePins(pins); err != nil {
			v.add("spice_pins", ErrInconsistent, "%v", err)
		}
	}
}
