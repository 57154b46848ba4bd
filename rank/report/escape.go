package report

import (
	"bytes"
	"io"
	"strconv"
	"strings"
	"unicode/utf8"

	"swrank/devices"
)

// Nothing in a library is a command. Part names, package names and notes
// reach every format escaped, each renderer calling the helper of its
// format: text and Markdown cells through CellText and MarkdownCell (so
// that widths are counted on what is printed) and, as a last guard,
// GuardText over the whole output; CSV cells through CSVText (formula
// guard, then escapes); JSON strings through encoding/json, with the
// controls it leaves raw (DEL, C1, bidirectional overrides) escaped by
// GuardJSON; SVG text through CellText before the plot library writes it
// as XML.

// CellText is s for a text table cell or line: control characters escaped
// (devices.Printable).
func CellText(s string) string { return devices.Printable(s) }

// MarkdownCell is s for a Markdown table cell or line: control characters
// escaped and the pipe, which would end a cell, escaped as Markdown
// writes it.
func MarkdownCell(s string) string {
	return strings.ReplaceAll(devices.Printable(s), "|", `\|`)
}

// GuardText writes what fn writes to w with any control character that
// reached it escaped, line ends kept: the last guard of the text and
// Markdown formats.
func GuardText(w io.Writer, fn func(io.Writer) error) error {
	var b bytes.Buffer
	if err := fn(&b); err != nil {
		return err
	}
	var out strings.Builder
	out.Grow(b.Len())
	for _, l := range strings.SplitAfter(b.String(), "\n") {
		body, nl := strings.CutSuffix(l, "\n")
		out.WriteString(devices.Printable(body))
		if nl {
			out.WriteByte('\n')
		}
	}
	_, err := io.WriteString(w, out.String())
	return err
}

// FormulaSafe neutralises a cell that a spreadsheet would run as a formula
// (OWASP guidance on CSV injection: cells starting with = + - @ tab or CR)
// with a leading apostrophe, leaving plain numbers alone.
func FormulaSafe(s string) string {
	if s == "" {
		return s
	}
	if _, err := strconv.ParseFloat(s, 64); err == nil {
		return s
	}
	switch s[0] {
	case '=', '+', '-', '@', '\t', '\r':
		return "'" + s
	}
	return s
}

// CSVText is s for a CSV cell: a text that a spreadsheet would run as a
// formula neutralised (FormulaSafe), then control characters escaped, so
// that the neutralising prefix stays the cell's first character. Numbers
// stay numbers. It is idempotent.
func CSVText(s string) string { return devices.Printable(FormulaSafe(s)) }

// GuardJSON escapes, in JSON text b, the characters encoding/json writes
// raw that a terminal could act on: DEL, the C1 controls and other
// non-printing characters (bidirectional overrides) become \uXXXX escapes,
// which decode to the same string (RFC 8259, section 7). JSON's own
// syntax is ASCII, so they can only sit in strings.
func GuardJSON(b []byte) []byte {
	clean := true
	for _, c := range b {
		if c >= 0x7f {
			clean = false
			break
		}
	}
	if clean {
		return b
	}
	out := make([]byte, 0, len(b)+16)
	for i := 0; i < len(b); {
		r, size := utf8.DecodeRune(b[i:])
		if r >= 0x7f && !strconv.IsPrint(r) && r != utf8.RuneError {
			out = appendJSONEscape(out, r)
		} else {
			out = append(out, b[i:i+size]...)
		}
		i += size
	}
	return out
}

func appendJSONEscape(out []byte, r rune) []byte {
	const hex = "0123456789abcdef"
	if r > 0xFFFF { // a surrogate pair
		r -= 0x10000
		out = appendJSONEscape(out, 0xD800+(r>>10))
		return appendJSONEscape(out, 0xDC00+(r&0x3FF))
	}
	return append(out, '\\', 'u', hex[r>>12&15], hex[r>>8&15], hex[r>>4&15], hex[r&15])
}
