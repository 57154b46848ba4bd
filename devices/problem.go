package devices

import (
	"errors"
	"strconv"
	"strings"
)

// Causes of problems found in a parts library. A Problem's Err wraps one of
// these (or a quantity error such as quantity.ErrUnit, or an encoding/csv
// error such as csv.ErrQuote); test them with errors.Is.
var (
	ErrNoHeader        = errors.New("no header row")
	ErrMissingColumn   = errors.New("missing required column")
	ErrDuplicateColumn = errors.New("column given twice")
	ErrUnknownColumn   = errors.New("unknown column")
	ErrFieldCount      = errors.New("wrong number of fields")
	ErrDuplicatePart   = errors.New("duplicate part name")
	ErrNonPhysical     = errors.New("not physical")
	ErrImplausible     = errors.New("outside the plausible range")
	ErrInconsistent    = errors.New("inconsistent with another column")
	ErrMissingValue    = errors.New("missing value")
	ErrCurve           = errors.New("bad rds_on_curve")
	ErrCVCurve         = errors.New("bad capacitance curve")
	ErrNoParts         = errors.New("no parts")
)

// Problem is one thing wrong in a parts library, located like
// encoding/csv's ParseError: file, line, column and the column's name.
//
// Error prints "file:line:col: field: cause", e.g.
//
//	parts.csv:12:7: qg: "3.3x": not a number
//
// leaving out what is unknown (a header-level problem has no row; a part
// built in code has no file, and is then named by its part name). Control
// characters from the file are escaped (Printable).
type Problem struct {
	File   string // library name as given to Read, or the path given to Load; "" for parts built in code
	Line   int    // 1-based file line of the row (or of the header); 0 when not from a file
	Column int    // 1-based index of the column in the file; 0 when the column is absent or unknown
	Field  string // column name, e.g. "qg"; "" for problems of a whole row or file
	Part   string // name of the part concerned, when known
	Text   string // the offending cell as written, when there is one
	Err    error  // the cause
	Fatal  bool   // false for warnings, which do not stop a library from loading
}

// Error formats the problem as "file:line:col: field: cause".
func (p *Problem) Error() string {
	var b strings.Builder
	if p.File != "" {
		b.WriteString(p.File)
		if p.Line > 0 {
			b.WriteByte(':')
			b.WriteString(strconv.Itoa(p.Line))
			if p.Column > 0 {
				b.WriteByte(':')
				b.WriteString(strconv.Itoa(p.Column))
			}
		}
		b.WriteString(": ")
	} else if strings.TrimSpace(p.Part) != "" {
		b.WriteString("part ")
		b.WriteString(strconv.Quote(p.Part))
		b.WriteString(": ")
	}
	if p.Field != "" {
		b.WriteString(p.Field)
		b.WriteString(": ")
	}
	if p.Err != nil {
		b.WriteString(p.Err.Error())
	} else {
		b.WriteString("unknown problem")
	}
	if !p.Fatal {
		b.WriteString(" (warning)")
	}
	return Printable(b.String()) // a column name or a cause may quote the file's text
}

// Unwrap returns the cause.
func (p *Problem) Unwrap() error { return p.Err }

// ProblemList is every problem found in one pass, in file order. As an
// error it prints one problem a line; errors.Is and errors.As look into
// each problem and its cause.
type ProblemList []*Problem

// Error prints the problems one a line.
func (l ProblemList) Error() string {
	switch len(l) {
	case 0:
		return "no problems"
	case 1:
		return l[0].Error()
	}
	var b strings.Builder
	for i, p := range l {
		if i > 0 {
			b.WriteByte('\n')
		}
		b.WriteString(p.Error())
	}
	return b.String()
}

// Unwrap returns the problems, for errors.Is and errors.As.
func (l ProblemList) Unwrap() []error {
	out := make([]error, len(l))
	for i, p := range l {
		out[i] = p
	}
	return out
}

// Fatal reports whether any problem is fatal.
func (l ProblemList) Fatal() bool {
	for _, p := range l {
		if p.Fatal {
			return true
		}
	}
	return false
}

// Fatals returns the fatal problems only (nil when there are none).
func (l ProblemList) Fatals() ProblemList {
	var out ProblemList
	for _, p := range l {
		if p.Fatal {
			out = append(out, p)
		}
	}
	return out
}

// Warnings returns the non-fatal problems only (nil when there are none).
func (l ProblemList) Warnings() ProblemList {
	var out ProblemList
	for _, p := range l {
		if !p.Fatal {
			out = append(out, p)
		}
	}
	return out
}

// valueError is a validation cause: its own message, unwrapping to one of
// the sentinel errors above.
type valueError struct {
	msg  string
	kind error
}

func (e *valueError) Error() string { return e.msg }
func (e *valueError) Unwrap() error { return e.kind }
