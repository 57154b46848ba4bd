package quantity

import (
	"strconv"
	"strings"
)

// Opt is an optional quantity: a datasheet value that may be left blank.
// The zero Opt is "not given".
type Opt[Q Quantity] struct {
	V  Q    // the value; meaningful only when OK
	OK bool // whether the value was given
}

// Some returns a given value.
func Some[Q Quantity](v Q) Opt[Q] { return Opt[Q]{V: v, OK: true} }

// Or returns the value when given, else def.
func (o Opt[Q]) Or(def Q) Q {
	if o.OK {
		return o.V
	}
	return def
}

// UnmarshalCSV parses a cell; a blank cell leaves the value not given.
func (o *Opt[Q]) UnmarshalCSV(s string) error {
	if isBlank(s) {
		*o = Opt[Q]{}
		return nil
	}
	v, err := Parse[Q](s)
	if err != nil {
		return err
	}
	*o = Opt[Q]{V: v, OK: true}
	return nil
}

// MarshalCSV prints a cell: blank when not given, else the plain number in
// the coherent SI unit, exact to float64 precision.
func (o Opt[Q]) MarshalCSV() (string, error) {
	if !o.OK {
		return "", nil
	}
	return strconv.FormatFloat(float64(o.V), 'g', -1, 64), nil
}

// isBlank reports whether s is empty or white space only, as
// strings.TrimSpace sees it (Unicode white space too, so that a cell holding
// a no-break space counts as blank). Parse returns ErrEmpty, unwrapped,
// exactly for these texts.
func isBlank(s string) bool {
	for i := 0; i < len(s); i++ {
		switch s[i] {
		case ' ', '\t', '\n', '\v', '\f', '\r':
		default:
			if s[i] >= 0x80 {
				return strings.TrimSpace(s) == ""
			}
			return false
		}
	}
	return true
}

func marshal(v float64) (string, error) { return strconv.FormatFloat(v, 'g', -1, 64), nil }

// UnmarshalCSV methods parse a required cell (a blank one is ErrEmpty);
// MarshalCSV methods print the plain SI number.

func (v *Voltage) UnmarshalCSV(s string) (err error) { *v, err = Parse[Voltage](s); return }
func (v *Current) UnmarshalCSV(s string) (err error) { *v, err = Parse[Current](s); return }
func (v *Resistance) UnmarshalCSV(s string) (err error) {
	*v, err = Parse[Resistance](s)
	return
}
func (v *Capacitance) UnmarshalCSV(s string) (err error) {
	*v, err = Parse[Capacitance](s)
	return
}
func (v *Charge) UnmarshalCSV(s string) (err error) { *v, err = Parse[Charge](s); return }
func (v *Time) UnmarshalCSV(s string) (err error)   { *v, err = Parse[Time](s); return }
func (v *Frequency) UnmarshalCSV(s string) (err error) {
	*v, err = Parse[Frequency](s)
	return
}
func (v *Power) UnmarshalCSV(s string) (err error)  { *v, err = Parse[Power](s); return }
func (v *Energy) UnmarshalCSV(s string) (err error) { *v, err = Parse[Energy](s); return }
func (v *Temperature) UnmarshalCSV(s string) (err error) {
	*v, err = Parse[Temperature](s)
	return
}
func (v *ThermalResistance) UnmarshalCSV(s string) (err error) {
	*v, err = Parse[ThermalResistance](s)
	return
}
func (v *Inductance) UnmarshalCSV(s string) (err error) {
	*v, err = Parse[Inductance](s)
	return
}
func (v *Ratio) UnmarshalCSV(s string) (err error) { *v, err = Parse[Ratio](s); return }
func (v *Slew) UnmarshalCSV(s string) (err error)  { *v, err = Parse[Slew](s); return }
func (v *Conductance) UnmarshalCSV(s string) (err error) {
	*v, err = Parse[Conductance](s)
	return
}

func (v Voltage) MarshalCSV() (string, error)           { return marshal(float64(v)) }
func (v Current) MarshalCSV() (string, error)           { return marshal(float64(v)) }
func (v Resistance) MarshalCSV() (string, error)        { return marshal(float64(v)) }
func (v Capacitance) MarshalCSV() (string, error)       { return marshal(float64(v)) }
func (v Charge) MarshalCSV() (string, error)            { return marshal(float64(v)) }
func (v Time) MarshalCSV() (string, error)              { return marshal(float64(v)) }
func (v Frequency) MarshalCSV() (string, error)         { return marshal(float64(v)) }
func (v Power) MarshalCSV() (string, error)             { return marshal(float64(v)) }
func (v Energy) MarshalCSV() (string, error)            { return marshal(float64(v)) }
func (v Temperature) MarshalCSV() (string, error)       { return marshal(float64(v)) }
func (v ThermalResistance) MarshalCSV() (string, error) { return marshal(float64(v)) }
func (v Inductance) MarshalCSV() (string, error)        { return marshal(float64(v)) }
func (v Ratio) MarshalCSV() (string, error)             { return marshal(float64(v)) }
func (v Slew) MarshalCSV() (string, error)              { return marshal(float64(v)) }
func (v Conductance) MarshalCSV() (string, error)       { return marshal(float64(v)) }
