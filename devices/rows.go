package devices

import (
	"bufio"
	"bytes"
	"encoding/csv"
	"errors"
	"io"
	"strings"
)

// rowReader splits CSV text into records exactly as encoding/csv.Reader
// does with Comment '#', FieldsPerRecord −1, LazyQuotes and
// TrimLeadingSpace off, and Comma the same separator: same records, same line numbers, same
// *csv.ParseError values (the tests and the fuzz target compare the two).
// It is faster because a line without quotes, the usual case, is cut into
// fields without copying to a record buffer first, and the record slice is
// reused. The strings of a record share one allocation per row and stay
// valid after the next call.
type rowReader struct {
	r       *bufio.Reader
	raw     []byte // a line longer than the bufio buffer
	numLine int
	buf     []byte   // record buffer of the quoted path
	ends    []int    // field ends in buf
	rec     []string // the record, reused
	line    int      // line of the last record's first field
	sep     byte     // the cell separator: ',', ';' or '\t'
}

// newRowReader reads records separated by sep from r (a *bufio.Reader of
// at least 64 KiB is used as it is).
func newRowReader(r io.Reader, sep byte) *rowReader {
	br := bufio.NewReaderSize(r, 64<<10)
	if b, err := br.Peek(len(utf8BOM)); err == nil && bytes.Equal(b, utf8BOM) {
		_, _ = br.Discard(len(utf8BOM))
	}
	return &rowReader{r: br, sep: sep}
}

// readLine is encoding/csv's readLine: one line with "\r\n" normalised to
// "\n" and a trailing "\r" before EOF dropped.
func (t *rowReader) readLine() ([]byte, error) {
	line, err := t.r.ReadSlice('\n')
	if errors.Is(err, bufio.ErrBufferFull) {
		t.raw = append(t.raw[:0], line...)
		for errors.Is(err, bufio.ErrBufferFull) {
			line, err = t.r.ReadSlice('\n')
			t.raw = append(t.raw, line...)
		}
		line = t.raw
	}
	if n := len(line); n > 0 && err == io.EOF {
		err = nil
		if line[n-1] == '\r' {
			line = line[:n-1]
		}
	}
	t.numLine++
	if n := len(line); n >= 2 && line[n-2] == '\r' && line[n-1] == '\n' {
		line[n-2] = '\n'
		line = line[:n-1]
	}
	return line, err
}

func lengthNL(b []byte) int {
	if len(b) > 0 && b[len(b)-1] == '\n' {
		return 1
	}
	return 0
}

// read returns the next record and the line of its first field. At the
// end of the input it returns io.EOF; a syntax error is a *csv.ParseError
// (the rest of the record's line is skipped, as encoding/csv does).
func (t *rowReader) read() ([]string, error) {
	raw, isRaw, rec, err := t.nextRaw()
	if !isRaw {
		return rec, err
	}
	t.rec = splitFields(t.rec[:0], string(raw), t.sep)
	return t.rec, err
}

// nextRaw reads the next record. A record that is one line without quotes,
// the usual case, comes back unsplit: raw is its text without the line
// end, valid until the next call, and isRaw is true. Any other record comes
// back split, in rec (reused by the next call). err is as for read.
func (t *rowReader) nextRaw() (raw []byte, isRaw bool, rec []string, err error) {
	var line []byte
	var errRead error
	for errRead == nil {
		line, errRead = t.readLine()
		if len(line) > 0 && line[0] == '#' {
			line = nil
			continue
		}
		if errRead == nil && len(line) == lengthNL(line) {
			line = nil
			continue
		}
		break
	}
	if errRead == io.EOF {
		return nil, false, nil, errRead
	}
	t.line = t.numLine
	if bytes.IndexByte(line, '"') < 0 {
		return line[:len(line)-lengthNL(line)], true, nil, errRead
	}
	rec, err = t.readQuoted(line, errRead)
	return nil, false, rec, err
}

// splitFields appends to dst the fields of a record without quotes: the
// text between separators sep.
func splitFields(dst []string, s string, sep byte) []string {
	for {
		i := strings.IndexByte(s, sep)
		if i < 0 {
			return append(dst, s)
		}
		dst = append(dst, s[:i])
		s = s[i+1:]
	}
}

// readQuoted is encoding/csv's field loop, for lines with quotes.
func (t *rowReader) readQuoted(line []byte, errRead error) ([]string, error) {
	var err error
	recLine := t.numLine
	t.buf = t.buf[:0]
	t.ends = t.ends[:0]
	posLine, col := t.numLine, 1
parseField:
	for {
		if len(line) == 0 || line[0] != '"' {
			i := bytes.IndexByte(line, t.sep)
			field := line
			if i >= 0 {
				field = field[:i]
			} else {
				field = field[:len(field)-lengthNL(field)]
			}
			if j := bytes.IndexByte(field, '"'); j >= 0 {
				err = &csv.ParseError{StartLine: recLine, Line: t.numLine, Column: col + j, Err: csv.ErrBareQuote}
				break parseField
			}
			t.buf = append(t.buf, field...)
			t.ends = append(t.ends, len(t.buf))
			if i >= 0 {
				line = line[i+1:]
				col += i + 1
				continue parseField
			}
			break parseField
		}
		line = line[1:]
		col++
		for {
			i := bytes.IndexByte(line, '"')
			switch {
			case i >= 0:
				t.buf = append(t.buf, line[:i]...)
				line = line[i+1:]
				col += i + 1
				switch {
				case len(line) > 0 && line[0] == '"':
					t.buf = append(t.buf, '"')
					line = line[1:]
					col++
				case len(line) > 0 && line[0] == t.sep:
					line = line[1:]
					col++
					t.ends = append(t.ends, len(t.buf))
					continue parseField
				case lengthNL(line) == len(line):
					t.ends = append(t.ends, len(t.buf))
					break parseField
				default:
					err = &csv.ParseError{StartLine: recLine, Line: t.numLine, Column: col - 1, Err: csv.ErrQuote}
					break parseField
				}
			case len(line) > 0:
				t.buf = append(t.buf, line...)
				if errRead != nil {
					break parseField
				}
				col += len(line)
				line, errRead = t.readLine()
				if len(line) > 0 {
					posLine++
					col = 1
				}
				if errRead == io.EOF {
					errRead = nil
				}
			default:
				if errRead == nil {
					err = &csv.ParseError{StartLine: recLine, Line: posLine, Column: col, Err: csv.ErrQuote}
					break parseField
				}
				t.ends = append(t.ends, len(t.buf))
				break parseField
			}
		}
	}
	if err == nil {
		err = errRead
	}
	str := string(t.buf)
	t.rec = t.rec[:0]
	prev := 0
	for _, e := range t.ends {
		t.rec = append(t.rec, str[prev:e])
		prev = e
	}
	return t.rec, err
}
