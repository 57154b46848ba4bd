package quantity

import (
	"strconv"
	"strings"
)

// Decimal commas: spreadsheets save numbers with the separator of the
// user's locale, and where the comma is the decimal separator a cell reads
// "0,28" or "4,7 nC". The devices loader parses such files' cells here.
// A decimal comma reads exactly as a point would: the text is parsed with
// its commas written as points (a comma is never part of a unit or a
// prefix), so that the plain parser's speed is untouched, and an error
// quotes the cell as written.

// ParseFloatDecimalComma is ParseFloat for text written with a decimal
// comma, as spreadsheets save it where the comma is the decimal separator:
// "0,28", "4,7 nC", "1,2k", "4,7e-9". A decimal point is accepted as well;
// a number with two separators ("1.200,5", "1,2,3") is not a number (no
// digit grouping).
func ParseFloatDecimalComma(text string, k Kind) (float64, error) {
	return parseDecimalComma(text, &k)
}

// ParseDecimalComma is ParseFloatDecimalComma(text, k).
func (p *Parser) ParseDecimalComma(text string) (float64, error) {
	return parseDecimalComma(text, &p.k)
}

func parseDecimalComma(text string, k *Kind) (float64, error) {
	if strings.IndexByte(text, ',') < 0 {
		return parseFloat(text, k)
	}
	points := strings.ReplaceAll(text, ",", ".")
	v, err := parseFloat(points, k)
	if err != nil {
		return 0, &asWritten{msg: strings.Replace(err.Error(), strconv.Quote(points), strconv.Quote(text), 1), err: err}
	}
	return v, nil
}

// asWritten is an error of the parser reworded to quote the cell as
// written; it unwraps to the parser's error (errors.Is finds ErrSyntax,
// ErrUnit, …).
type asWritten struct {
	msg string
	err error
}

func (e *asWritten) Error() string { return e.msg }
func (e *asWritten) Unwrap() error { return e.err }
