package quantity

// Decimal commas: spreadsheets save numbers with the separator of the
// user's locale, and where the comma is the decimal separator a cell reads
// "0,28" or "4,7 nC". The devices loader parses such files' cells here.

// ParseFloatDecimalComma is ParseFloat for text written with a decimal
// comma, as spreadsheets save it where the comma is the decimal separator:
// "0,28", "4,7 nC", "1,2k", "4,7e-9". A decimal point is accepted as well;
// a number with two separators ("1.200,5", "1,2,3") is not a number (no
// digit grouping).
func ParseFloatDecimalComma(text string, k Kind) (float64, error) {
	return parseFloat(text, &k, ',')
}

// ParseDecimalComma is ParseFloatDecimalComma(text, k).
func (p *Parser) ParseDecimalComma(text string) (float64, error) {
	return parseFloat(text, &p.k, ',')
}
