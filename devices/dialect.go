package devices

import (
	"bufio"
	"bytes"
	"errors"
	"fmt"
	"strconv"
	"strings"
)

// ErrSeparator is the cause of a problem with a header line whose cell
// separator cannot be told.
var ErrSeparator = errors.New("cannot tell the cell separator")

// Dialect is how a library's file separates its cells and writes its
// numbers, as told from its header line. Spreadsheets save "CSV" with the
// list separator of the user's locale: a comma where the decimal
// separator is a point, a semicolon where it is a comma; a tab for "text"
// exports (common practice of spreadsheet programs).
type Dialect struct {
	Sep byte // the cell separator: ',', ';' or '\t'
	// DecimalComma is true when numbers may be written with a decimal
	// comma ("0,28", "4,7 nC"): with a semicolon or tab separator.
	DecimalComma bool
}

// Comma is plain CSV: cells separated by commas, numbers with a point.
var Comma = Dialect{Sep: ','}

// Plain reports whether d is plain comma-separated CSV (or not told, for
// a library built in code).
func (d Dialect) Plain() bool { return d.Sep == ',' || d.Sep == 0 }

// String names the dialect for a message: "comma-separated",
// "semicolon-separated, decimal commas accepted".
func (d Dialect) String() string {
	s := "comma-separated"
	switch d.Sep {
	case ';':
		s = "semicolon-separated"
	case '\t':
		s = "tab-separated"
	}
	if d.DecimalComma {
		s += ", decimal commas accepted"
	}
	return s
}

// dialectOf returns the dialect of the separator sep.
func dialectOf(sep byte) Dialect { return Dialect{Sep: sep, DecimalComma: sep != ','} }

// headerLine returns the first line of br's buffered input that is a
// record (not a '#' comment, not blank), without its line end, and its
// 1-based line number; ok is false when the buffer (64 KiB) holds none.
// A byte-order mark at the start is skipped. It reads nothing: the bytes
// stay buffered for the row reader.
func headerLine(br *bufio.Reader) (line []byte, num int, ok bool) {
	buf, _ := br.Peek(br.Size())
	buf = bytes.TrimPrefix(buf, utf8BOM)
	for len(buf) > 0 {
		num++
		l := buf
		end := bytes.IndexByte(buf, '\n')
		if end >= 0 {
			l, buf = buf[:end], buf[end+1:]
		} else {
			buf = nil
		}
		l = bytes.TrimSuffix(l, []byte{'\r'})
		if len(l) == 0 || l[0] == '#' {
			continue
		}
		return l, num, true
	}
	return nil, 0, false
}

// separators counts the commas, semicolons and tabs of a header line
// outside double quotes.
func separators(line []byte) (counts [3]int) {
	quoted := false
	for _, c := range line {
		switch {
		case c == '"':
			quoted = !quoted
		case quoted:
		case c == ',':
			counts[0]++
		case c == ';':
			counts[1]++
		case c == '\t':
			counts[2]++
		}
	}
	return counts
}

var sepBytes = [3]byte{',', ';', '\t'}
var sepNames = [3]string{"comma", "semicolon", "tab"}

// detectDialect tells the dialect from the header line in br's buffer: the
// one separator it holds, or, when it holds several kinds, the one that
// splits it into the most known column names. A header line with none of
// them (unless it is one known column name, whose missing companions the
// reader reports), or with a tie, is a problem naming what the line holds.
func detectDialect(br *bufio.Reader) (Dialect, *Problem) {
	line, num, ok := headerLine(br)
	if !ok {
		return Comma, nil // no header in sight: the reader reports it
	}
	counts := separators(line)
	kinds := 0
	for _, n := range counts {
		if n > 0 {
			kinds++
		}
	}
	if kinds == 0 && knownNames(string(line), ',') == 1 {
		return Comma, nil // one known column: the missing ones are the problem
	}
	if kinds == 0 {
		return Comma, &Problem{Line: num, Fatal: true, Err: fmt.Errorf("%w: the header line %s has no comma, semicolon or tab between column names",
			ErrSeparator, quoteHead(line))}
	}
	best, bestKnown, tie := -1, -1, false
	for i, n := range counts {
		if n == 0 {
			continue
		}
		known := knownNames(string(line), sepBytes[i])
		switch {
		case known > bestKnown:
			best, bestKnown, tie = i, known, false
		case known == bestKnown:
			tie = true
		}
	}
	if tie {
		var seen []string
		for i, n := range counts {
			if n > 0 {
				seen = append(seen, fmt.Sprintf("%d %s%s", n, sepNames[i], plural(n)))
			}
		}
		return Comma, &Problem{Line: num, Fatal: true, Err: fmt.Errorf("%w: the header line %s has %s, and neither gives more known column names",
			ErrSeparator, quoteHead(line), strings.Join(seen, " and "))}
	}
	return dialectOf(sepBytes[best]), nil
}

// knownNames counts the cells of a header line, split at sep, that name a
// known column.
func knownNames(line string, sep byte) int {
	n := 0
	for _, h := range strings.Split(line, string(sep)) {
		if _, ok := partSchema.byName[normalizeHeader(strings.Trim(strings.TrimSpace(h), `"`))]; ok {
			n++
		}
	}
	return n
}

func plural(n int) string {
	if n == 1 {
		return ""
	}
	return "s"
}

// quoteHead quotes the start of a header line for a message, control
// characters escaped.
func quoteHead(line []byte) string {
	const most = 60
	s := string(line)
	if len(s) > most {
		cut := most
		for cut > 0 && s[cut]&0xC0 == 0x80 { // not inside a UTF-8 sequence
			cut--
		}
		return strconv.Quote(s[:cut]) + "…"
	}
	return strconv.Quote(s)
}
