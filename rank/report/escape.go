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
// reach every format escaped: text and Markdown cells and lines through
// cellText and, as a last guard, guardText over the whole output; CSV cells
// through csvText (formula guard, then escapes); JSON strings through
// encoding/json, with the controls it leaves raw (DEL, C1, bidirectional
// overrides) escaped by guardJSON; SVG text as XML (svg.go).

// cellText is s for a text table cell or line: control characters escaped
// (devices.Printable).
func cellText(s string) string { return devices.Printable(s) }

// markdownCell is s for a Markdown table cell: control characters escaped
// and the pipe, which would end the cell, escaped as Markdown writes it.
func markdownCell(s string) string {
	return strings.ReplaceAll(devices.Printable(s), "|", `\|`)
}

// cells escapes every cell of a table row in place and returns it.
func cells(row []string, markdown bool) []string {
	for j, c := range row {
		if markdown {
			row[j] = markdownCell(c)
		} else {
			row[j] = cellText(c)
		}
	}
	return row
}

// guardText writes what fn writes to w with any control character that
// reached it escaped, line ends kept: the last guard of the text and
// Markdown formats.
func guardText(w io.Writer, fn func(io.Writer) error) error {
	var b bytes.Buffer
	if err := fn(&b); err != nil {
		return err
	}
	lines := strings.SplitAfter(b.String(), "\n")
	var out strings.Builder
	out.Grow(b.Len())
	for _, l := range lines {
		body, nl := strings.CutSuffix(l, "\n")
		out.WriteString(devices.Printable(body))
		if nl {
			out.WriteByte('\n')
		}
	}
	_, err := io.WriteString(w, out.String())
	return err
}

// csvText is s for a CSV cell: a text that a spreadsheet would run as a
// formula neutralised (safeCell), then control characters escaped, so
// that the neutralising prefix stays the cell's first character. It is
// idempotent.
func csvText(s string) string { return devices.Printable(safeCell(s)) }

// guardJSON escapes, in JSON text b, the characters encoding/json writes
// raw that a terminal could act on: DEL, the C1 controls and other
// non-printing characters (bidirectional overrides) become \uXXXX escapes,
// which decode to the same string (RFC 8259, section 7). JSON's own
// syntax is ASCII, so they can only sit in strings.
func guardJSON(b []byte) []byte {
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
