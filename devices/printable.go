package devices

import (
	"strconv"
	"strings"
	"unicode/utf8"
)

// Printable returns s with every character that a terminal or a reader
// could take for something other than text written as a Go escape, as
// strconv.Quote writes it: C0 controls (tab, CR, LF and ESC among them),
// DEL, C1 controls, other non-printing characters such as bidirectional
// overrides (\u202e), and bytes that are not UTF-8 (\xff). Printable
// Unicode such as "µ" or "Ω", spaces and backslashes are kept as they are.
// Nothing in a library is a command: part names, package names, notes and
// column names are shown through Printable.
func Printable(s string) string {
	for i := 0; i < len(s); i++ {
		if c := s[i]; c < 0x20 || c >= 0x7f {
			return printableSlow(s, i)
		}
	}
	return s // plain printable ASCII, the usual case
}

func printableSlow(s string, from int) string {
	var b strings.Builder
	b.Grow(len(s) + 8)
	b.WriteString(s[:from])
	for i := from; i < len(s); {
		r, size := utf8.DecodeRuneInString(s[i:])
		switch {
		case r == utf8.RuneError && size == 1:
			b.WriteString(`\x`)
			b.WriteString(strconv.FormatUint(uint64(s[i])>>4, 16))
			b.WriteString(strconv.FormatUint(uint64(s[i])&15, 16))
		case r == ' ' || strconv.IsPrint(r):
			b.WriteString(s[i : i+size])
		default:
			q := strconv.QuoteRune(r)
			b.WriteString(q[1 : len(q)-1])
		}
		i += size
	}
	return b.String()
}
