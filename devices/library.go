package devices

import (
	"bufio"
	"bytes"
	"encoding/csv"
	"errors"
	"fmt"
	"io"
	"os"
	"slices"
	"sort"
	"strings"
)

// Library is a parts library as read from one CSV file.
type Library struct {
	Source   string    // the name given to Read, or the path given to Load
	Columns  []string  // the header's column names, trimmed and lower-cased, in file order
	Parts    []Part    // the parts that passed validation, in file order
	Unknown  []string  // columns the loader does not know, each reported once
	Warnings []Problem // non-fatal problems (unknown columns)
}

// Header describes the header row of a library read by Scan.
type Header struct {
	Source  string   // the name given to Scan
	Line    int      // file line of the header row (after comments and blank lines)
	Columns []string // column names, trimmed and lower-cased, in file order
	Unknown []string // columns the loader does not know
}

// Read reads a parts library in CSV form from r; name is used in messages
// (the file name, usually). See the package documentation for the format.
// It returns every problem at once: the error, when not nil, is a
// ProblemList of the fatal problems. The library is returned in either case
// and holds the parts that passed; its Warnings hold the non-fatal problems.
func Read(r io.Reader, name string) (*Library, error) {
	lib, probs := Check(r, name)
	if f := probs.Fatals(); len(f) > 0 {
		return lib, f
	}
	return lib, nil
}

// Load reads the parts library in the file at path; see Read.
func Load(path string) (*Library, error) {
	f, err := os.Open(path)
	if err != nil {
		return nil, fmt.Errorf("parts library: %w", err)
	}
	defer f.Close()
	return Read(f, path)
}

// Check reads a parts library like Read and returns every problem found,
// warnings included, in file order: what a user needs to fix. The library
// is unusable when any problem is fatal (probs.Fatal()).
func Check(r io.Reader, name string) (*Library, ProblemList) {
	return check(r, name, decodeFast)
}

func check(r io.Reader, name string, d decoderKind) (*Library, ProblemList) {
	lib := &Library{Source: name}
	hdr, probs := scan(r, name, d, func(p *Part) error {
		lib.Parts = append(lib.Parts, *p)
		return nil
	})
	lib.Columns, lib.Unknown = hdr.Columns, hdr.Unknown
	for _, p := range probs {
		if !p.Fatal {
			lib.Warnings = append(lib.Warnings, *p)
		}
	}
	return lib, probs
}

// Scan reads a parts library like Check but holds no parts: it calls fn
// for each valid part, in file order, with a pointer to a Part that is
// reused for the next row (copy it to keep it). When fn returns an error,
// Scan stops and the list ends with a fatal problem wrapping that error.
// Duplicate names are still detected, from the names seen so far.
func Scan(r io.Reader, name string, fn func(*Part) error) (Header, ProblemList) {
	return scan(r, name, decodeFast, fn)
}

// decoderKind chooses how cells become Part fields. Both give the same
// parts and the same problems; the tests run every case through both.
type decoderKind uint8

const (
	decodeFast  decoderKind = iota // per-column setters built from Part's tags, streaming
	decodeGocsv                    // gocsv's reflective unmarshal of the whole file
)

// cellErr is a cell that did not decode.
type cellErr struct {
	col int // 0-based index in the record
	err error
}

// loader holds the state of one read.
type loader struct {
	file    string
	hdr     Header
	colOf   []int           // file column → index in partSchema.cols, or −1
	fileCol []int           // index in partSchema.cols → 1-based file column, or 0
	missing map[string]bool // required columns absent from the header
	probs   ProblemList
	names   map[string]int // lower-cased part name → line of its first row
	fn      func(*Part) error
	stopped bool
	rows    int // data rows seen
}

var utf8BOM = []byte{0xEF, 0xBB, 0xBF}

// newCSVReader configures encoding/csv for parts libraries: '#' comment
// lines, ragged rows reported by the loader, a UTF-8 BOM skipped. Blank
// lines and CRLF line ends are handled by encoding/csv itself.
func newCSVReader(r io.Reader, reuse bool) *csv.Reader {
	br := bufio.NewReaderSize(r, 64<<10)
	if b, err := br.Peek(len(utf8BOM)); err == nil && bytes.Equal(b, utf8BOM) {
		_, _ = br.Discard(len(utf8BOM))
	}
	cr := csv.NewReader(br)
	cr.Comment = '#'
	cr.FieldsPerRecord = -1
	cr.ReuseRecord = reuse
	return cr
}

// normalizeHeader trims a header cell and lower-cases it; it also drops
// zero-width characters and stray byte-order marks that editors leave.
func normalizeHeader(h string) string {
	h = strings.Map(func(r rune) rune {
		switch r {
		case '\uFEFF', '\u200B', '\u200C', '\u200D':
			return -1
		}
		return r
	}, h)
	return strings.ToLower(strings.TrimSpace(h))
}

func scan(r io.Reader, name string, d decoderKind, fn func(*Part) error) (Header, ProblemList) {
	l := &loader{file: name, fn: fn, names: map[string]int{}}
	l.hdr.Source = name
	cr := newCSVReader(r, d == decodeFast)
	if !l.readHeader(cr) {
		return l.hdr, l.probs
	}
	switch d {
	case decodeGocsv:
		l.readGocsv(cr)
	default:
		l.readFast(cr)
	}
	if l.rows == 0 && !l.stopped {
		l.probs = append(l.probs, &Problem{File: name, Line: l.hdr.Line, Err: ErrNoParts, Fatal: true})
	}
	sort.SliceStable(l.probs, func(i, j int) bool {
		a, b := l.probs[i], l.probs[j]
		if a.Line != b.Line {
			return a.Line < b.Line
		}
		return a.Column < b.Column
	})
	return l.hdr, l.probs
}

// problem records a problem with the file filled in.
func (l *loader) problem(p *Problem) {
	p.File = l.file
	l.probs = append(l.probs, p)
}

// readHeader reads the header row and matches it to Part's columns. It
// returns false when there is no usable header.
func (l *loader) readHeader(cr *csv.Reader) bool {
	rec, err := cr.Read()
	for err != nil {
		var pe *csv.ParseError
		switch {
		case errors.Is(err, io.EOF):
			l.problem(&Problem{Err: fmt.Errorf("empty file: %w", ErrNoHeader), Fatal: true})
			return false
		case errors.As(err, &pe):
			l.problem(&Problem{Line: pe.Line, Err: fmt.Errorf("header: byte %d: %w", pe.Column, pe.Err), Fatal: true})
			return false
		default:
			l.problem(&Problem{Err: fmt.Errorf("reading: %w", err), Fatal: true})
			return false
		}
	}
	line, _ := cr.FieldPos(0)
	l.hdr.Line = line
	sch := partSchema
	l.colOf = make([]int, len(rec))
	l.fileCol = make([]int, len(sch.cols))
	l.hdr.Columns = make([]string, len(rec))
	for j, h := range rec {
		n := normalizeHeader(h)
		l.hdr.Columns[j] = n
		l.colOf[j] = -1
		ci, known := sch.byName[n]
		switch {
		case n == "":
			// An unnamed column (often a trailing comma): ignored.
		case !known:
			if !slices.Contains(l.hdr.Unknown, n) { // report each name once
				l.hdr.Unknown = append(l.hdr.Unknown, n)
				l.problem(&Problem{Line: line, Column: j + 1, Field: n, Text: h, Err: ErrUnknownColumn})
			}
		case l.fileCol[ci] != 0:
			l.problem(&Problem{Line: line, Column: j + 1, Field: n, Text: h, Fatal: true,
				Err: fmt.Errorf("%w (first as column %d)", ErrDuplicateColumn, l.fileCol[ci])})
		default:
			l.colOf[j] = ci
			l.fileCol[ci] = j + 1
		}
	}
	for ci := range sch.cols {
		if c := &sch.cols[ci]; c.required && l.fileCol[ci] == 0 {
			if l.missing == nil {
				l.missing = map[string]bool{}
			}
			l.missing[c.name] = true
			l.problem(&Problem{Line: line, Field: c.name, Err: ErrMissingColumn, Fatal: true})
		}
	}
	return true
}

// next reads the next record, reporting syntax errors and ragged rows as
// problems. It returns nil at the end of the input.
func (l *loader) next(cr *csv.Reader) (rec []string, line int) {
	for {
		rec, err := cr.Read()
		if err != nil {
			var pe *csv.ParseError
			switch {
			case errors.Is(err, io.EOF):
				return nil, 0
			case errors.As(err, &pe):
				l.rows++
				l.problem(&Problem{Line: pe.Line, Err: fmt.Errorf("byte %d of the line: %w", pe.Column, pe.Err), Fatal: true})
				continue
			default:
				l.problem(&Problem{Err: fmt.Errorf("reading: %w", err), Fatal: true})
				return nil, 0
			}
		}
		l.rows++
		line, _ := cr.FieldPos(0)
		if len(rec) != len(l.colOf) {
			col := 0
			if len(rec) > len(l.colOf) {
				col = len(l.colOf) + 1
			}
			l.problem(&Problem{Line: line, Column: col, Fatal: true,
				Err: fmt.Errorf("%w: the row has %d, the header %d", ErrFieldCount, len(rec), len(l.colOf))})
			continue
		}
		return rec, line
	}
}

// readFast streams the rows through the per-column setters.
func (l *loader) readFast(cr *csv.Reader) {
	var p Part
	var errs []cellErr
	for !l.stopped {
		rec, line := l.next(cr)
		if rec == nil {
			return
		}
		p = Part{}
		errs = errs[:0]
		for j, cell := range rec {
			if ci := l.colOf[j]; ci >= 0 {
				if err := partSchema.cols[ci].set(&p, cell); err != nil {
					errs = append(errs, cellErr{j, err})
				}
			}
		}
		l.finish(&p, rec, line, errs)
	}
}

// finish completes a decoded row: cell problems, validation, duplicate
// names; it hands a valid part to fn.
func (l *loader) finish(p *Part, rec []string, line int, errs []cellErr) {
	p.Line = line
	p.Name = strings.Clone(strings.TrimSpace(p.Name))
	p.Package = strings.Clone(strings.TrimSpace(p.Package))
	p.Notes = strings.Clone(strings.TrimSpace(p.Notes))
	p.RdsCurve = strings.Clone(strings.TrimSpace(p.RdsCurve))
	fatal := l.missing != nil // without a required column no part is complete
	v := validator{p: p, bad: l.missing}
	if len(errs) > 0 {
		v.bad = make(map[string]bool, len(errs)+len(l.missing))
		for k := range l.missing {
			v.bad[k] = true
		}
		for _, e := range errs {
			n := l.hdr.Columns[e.col]
			v.bad[n] = true
			l.problem(&Problem{Line: line, Column: e.col + 1, Field: n, Part: p.Name, Text: rec[e.col], Err: e.err, Fatal: true})
		}
		fatal = true
	}
	v.run()
	for i := range v.probs {
		pr := &v.probs[i]
		if ci, ok := partSchema.byName[pr.Field]; ok {
			if pr.Column = l.fileCol[ci]; pr.Column > 0 {
				pr.Text = rec[pr.Column-1]
			}
		}
		pr.Line = line
		fatal = fatal || pr.Fatal
		l.problem(pr)
	}
	if fatal {
		return
	}
	key := strings.ToLower(p.Name)
	if first, dup := l.names[key]; dup {
		col := l.fileCol[partSchema.byName["part"]]
		l.problem(&Problem{Line: line, Column: col, Field: "part", Part: p.Name, Text: rec[col-1], Fatal: true,
			Err: &valueError{msg: fmt.Sprintf("%q: %v: the part on line %d has the same name (names are compared ignoring case)",
				p.Name, ErrDuplicatePart, first), kind: ErrDuplicatePart}})
		return
	}
	l.names[strings.Clone(key)] = line
	if err := l.fn(p); err != nil {
		l.problem(&Problem{Line: line, Part: p.Name, Err: err, Fatal: true})
		l.stopped = true
	}
}
