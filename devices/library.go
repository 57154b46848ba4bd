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
	"unsafe"

	q "swrank/devices/quantity"
)

// Library is a parts library as read from one CSV file.
type Library struct {
	Source   string    // the name given to Read, or the path given to Load
	Dialect  Dialect   // how the file separates cells and writes numbers, told from its header line
	Columns  []string  // the header's column names, trimmed and lower-cased, in file order
	Parts    []Part    // the parts that passed validation, in file order
	Unknown  []string  // columns the loader does not know, each reported once
	Warnings []Problem // non-fatal problems (unknown columns accepted as notes)
}

// Header describes the header row of a library read by Scan.
type Header struct {
	Source  string   // the name given to Scan
	Dialect Dialect  // how the file separates cells and writes numbers, told from the header line
	Line    int      // file line of the header row (after comments and blank lines)
	Columns []string // column names, trimmed and lower-cased, in file order
	Unknown []string // columns the loader does not know
}

// Read reads a parts library in CSV form from r; name is used in messages
// (the file name, usually). See the package documentation for the format.
// It returns every problem at once: the error, when not nil, is a
// ProblemList of the fatal problems. The library is returned in either case
// and holds the parts that passed; its Warnings hold the non-fatal problems.
// It reads with the default ReadOptions, under which a column the loader
// does not know is an error.
func Read(r io.Reader, name string) (*Library, error) {
	return ReadOptions{}.Read(r, name)
}

// Load reads the parts library in the file at path; see Read.
func Load(path string) (*Library, error) {
	return ReadOptions{}.Load(path)
}

func check(r io.Reader, name string, d decoderKind, o ReadOptions) (*Library, ProblemList) {
	lib := &Library{Source: name}
	l := newLoader(name, nil, o)
	l.parts = &lib.Parts
	l.sizeHint = sizeOf(r)
	hdr, probs := l.scan(r, d)
	if len(lib.Parts) == 0 {
		lib.Parts = nil
	}
	lib.Columns, lib.Unknown, lib.Dialect = hdr.Columns, hdr.Unknown, hdr.Dialect
	for _, p := range probs {
		if !p.Fatal {
			lib.Warnings = append(lib.Warnings, *p)
		}
	}
	return lib, probs
}

// sizeOf returns the number of bytes left in r when r can tell (an open
// file, a bytes or strings reader), else 0. It only sizes the part slice.
func sizeOf(r io.Reader) int64 {
	switch r := r.(type) {
	case interface{ Len() int }:
		return int64(r.Len())
	case *os.File:
		if st, err := r.Stat(); err == nil && st.Mode().IsRegular() {
			return st.Size()
		}
	}
	return 0
}

// decoderKind chooses how cells become Part fields. Both give the same
// parts and the same problems; the tests run every case through both.
type decoderKind uint8

const (
	decodeFast     decoderKind = iota // per-column setters built from Part's tags, batches of rows on one goroutine
	decodeParallel                    // the same, with the batches decoded by several goroutines
	decodeGocsv                       // gocsv's reflective unmarshal of rows read by encoding/csv
)

// defaultDecoder is the parallel decoder when there is more than one CPU.
func defaultDecoder() decoderKind {
	if workerCount() > 1 {
		return decodeParallel
	}
	return decodeFast
}

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
	setters []*column       // file column → its column, or nil (unknown, repeated, unnamed)
	fileCol []int           // index in partSchema.cols → 1-based file column, or 0
	missing map[string]bool // required columns absent from the header
	probs   ProblemList
	names   *nameSet          // part names seen, with their lines
	fn      func(*Part) error // called with each valid part (Scan)
	parts   *[]Part           // or: valid parts are decoded in place here (Check)
	stopped bool
	opts    ReadOptions
	decoder decoderKind
	rows    int // data rows seen
	// sizeHint is the input size in bytes when known; with the length of
	// the first row it sizes *parts once instead of growing it.
	sizeHint int64
	dialect  Dialect // told from the header line before the rows are read
}

func newLoader(name string, fn func(*Part) error, o ReadOptions) *loader {
	return &loader{file: name, fn: fn, opts: o}
}

var utf8BOM = []byte{0xEF, 0xBB, 0xBF}

// source yields records with the file line of their first field.
type source interface {
	next() (rec []string, line int, err error)
}

// csvSource reads with encoding/csv (the gocsv decoder's path).
type csvSource struct{ r *csv.Reader }

func (c csvSource) next() ([]string, int, error) {
	rec, err := c.r.Read()
	if rec == nil {
		return nil, 0, err
	}
	line, _ := c.r.FieldPos(0)
	return rec, line, err
}

// newCSVSource is the gocsv decoder's source for cells separated by sep.
func newCSVSource(r io.Reader, sep byte) csvSource {
	cr := newCSVReader(r)
	cr.Comma = rune(sep)
	return csvSource{cr}
}

func (t *rowReader) next() ([]string, int, error) {
	rec, err := t.read()
	return rec, t.line, err
}

// newCSVReader configures encoding/csv for parts libraries: '#' comment
// lines, ragged rows reported by the loader, a UTF-8 BOM skipped. Blank
// lines and CRLF line ends are handled by encoding/csv itself.
func newCSVReader(r io.Reader) *csv.Reader {
	br := bufio.NewReaderSize(r, 64<<10)
	if b, err := br.Peek(len(utf8BOM)); err == nil && bytes.Equal(b, utf8BOM) {
		_, _ = br.Discard(len(utf8BOM))
	}
	cr := csv.NewReader(br)
	cr.Comment = '#'
	cr.FieldsPerRecord = -1
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

func (l *loader) scan(r io.Reader, d decoderKind) (Header, ProblemList) {
	name := l.file
	l.decoder = d
	l.hdr.Source = name
	br := bufio.NewReaderSize(r, 64<<10)
	dl, prob := detectDialect(br)
	if prob != nil {
		l.problem(prob)
		return l.hdr, l.probs
	}
	l.dialect, l.hdr.Dialect = dl, dl
	var src source
	if d == decodeGocsv {
		src = newCSVSource(br, dl.Sep)
	} else {
		src = newRowReader(br, dl.Sep)
	}
	if !l.readHeader(src) {
		return l.hdr, l.probs
	}
	switch d {
	case decodeGocsv:
		l.readGocsv(src)
	case decodeParallel:
		l.readParallel(src.(*rowReader))
	default:
		l.readBatches(src.(*rowReader))
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
func (l *loader) readHeader(src source) bool {
	rec, line, err := src.next()
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
	l.hdr.Line = line
	sch := partSchema
	l.colOf = make([]int, len(rec))
	l.setters = make([]*column, len(rec))
	l.fileCol = make([]int, len(sch.cols))
	l.hdr.Columns = make([]string, len(rec))
	for j, h := range rec {
		n := strings.Clone(normalizeHeader(h))
		l.hdr.Columns[j] = n
		l.colOf[j] = -1
		ci, known := sch.byName[n]
		switch {
		case n == "":
			// An unnamed column (often a trailing comma): ignored.
		case !known:
			if !slices.Contains(l.hdr.Unknown, n) { // report each name once
				l.hdr.Unknown = append(l.hdr.Unknown, n)
				l.problem(&Problem{Line: line, Column: j + 1, Field: n, Text: strings.Clone(h),
					Err: unknownColumn(n, l.opts.UnknownAsNotes), Fatal: !l.opts.UnknownAsNotes})
			}
		case l.fileCol[ci] != 0:
			l.problem(&Problem{Line: line, Column: j + 1, Field: n, Text: strings.Clone(h), Fatal: true,
				Err: fmt.Errorf("%w (first as column %d)", ErrDuplicateColumn, l.fileCol[ci])})
		default:
			l.colOf[j] = ci
			l.setters[j] = &sch.cols[ci]
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
func (l *loader) next(src source) (rec []string, line int) {
	return l.nextRow(src, &l.probs, &l.rows)
}

// nextRow is next with the problems and the row count kept where the
// caller says (the reading goroutine of the parallel decoder keeps its own).
func (l *loader) nextRow(src source, probs *ProblemList, rows *int) (rec []string, line int) {
	for {
		rec, line, err := src.next()
		if err != nil {
			var pe *csv.ParseError
			switch {
			case errors.Is(err, io.EOF):
				return nil, 0
			case errors.As(err, &pe):
				*rows++
				*probs = append(*probs, &Problem{File: l.file, Line: pe.Line, Err: fmt.Errorf("byte %d of the line: %w", pe.Column, pe.Err), Fatal: true})
				continue
			default:
				*probs = append(*probs, &Problem{File: l.file, Err: fmt.Errorf("reading: %w", err), Fatal: true})
				return nil, 0
			}
		}
		*rows++
		if len(rec) != len(l.colOf) {
			*probs = append(*probs, l.fieldCountProblem(rec, line))
			continue
		}
		return rec, line
	}
}

// decode fills p from a record and checks it; it only reads the loader's
// header state, so that several goroutines may decode at once.
func (l *loader) decode(p *Part, rec []string, line int, w *worker) (ProblemList, bool) {
	*p = Part{}
	e := w.errs[:0]
	setters := l.setters[:len(rec)]
	if len(w.last) != len(setters) {
		w.last = make([]lastCell, len(setters))
	}
	last := w.last[:len(setters)]
	base := unsafe.Pointer(p)
	comma := l.dialect.DecimalComma
	for j, cell := range rec {
		c := setters[j]
		if c == nil {
			continue
		}
		// Quantities inline, other kinds through column.set: same results.
		if c.kind == cellOpt || c.kind == cellQty {
			var v float64
			var err error
			if lc := &last[j]; lc.ok && lc.text == cell {
				v = lc.v // test conditions repeat down a column: parsed once
			} else {
				v, err = c.parse(cell, comma)
				if err == nil {
					*lc = lastCell{text: cell, v: v, ok: true}
				}
			}
			ptr := unsafe.Add(base, c.offset)
			switch {
			case err == nil:
				*(*float64)(ptr) = v
				if c.kind == cellOpt {
					*(*bool)(unsafe.Add(ptr, c.okOff)) = true
				}
			case err == q.ErrEmpty && c.kind == cellOpt:
				// Blank optional cell: not given (the zero value).
			default:
				e = append(e, cellErr{j, err})
			}
			continue
		}
		if err := c.set(p, cell, comma); err != nil {
			e = append(e, cellErr{j, err})
		}
	}
	w.errs = e
	return l.checkRow(p, rec, line, e)
}

// sizeFor sizes the name set and the part slice from the length of a
// typical row, in bytes, and the input size, when known.
func (l *loader) sizeFor(rowLen int) {
	rows := 64
	if l.sizeHint > 0 {
		est := l.sizeHint / int64(max(rowLen, 16))
		rows = int(min(est+est/8+16, 1<<24))
	}
	l.names = newNameSet(min(rows, 1<<20))
	if l.parts != nil && *l.parts == nil && l.sizeHint > 0 && l.decoder == decodeGocsv {
		*l.parts = make([]Part, 0, rows) // the other decoders place parts themselves
	}
}

// rowBytes is the length of a record as written (without quotes).
func rowBytes(rec []string) int {
	n := len(rec)
	for _, c := range rec {
		n += len(c)
	}
	return n
}

// finish completes a decoded row (gocsv decoder): checks, then commit.
func (l *loader) finish(p *Part, rec []string, line int, errs []cellErr) bool {
	probs, fatal := l.checkRow(p, rec, line, errs)
	l.probs = append(l.probs, probs...)
	if fatal {
		return false
	}
	ok, first := l.commit(p, line)
	if !ok {
		l.duplicate(p, line, rec[l.partCol()-1], first)
	}
	return ok
}

// checkRow completes a decoded row: trims the text columns, turns the
// cells that did not decode into problems and validates the part. It
// reports whether any problem is fatal. The part's strings share the row's
// one allocation. It only reads the loader's header state.
func (l *loader) checkRow(p *Part, rec []string, line int, errs []cellErr) (ProblemList, bool) {
	p.Line = line
	p.Name = strings.TrimSpace(p.Name)
	p.Package = strings.TrimSpace(p.Package)
	p.Notes = strings.TrimSpace(p.Notes)
	p.RdsCurve = strings.TrimSpace(p.RdsCurve)
	p.CossCurve, p.CrssCurve = strings.TrimSpace(p.CossCurve), strings.TrimSpace(p.CrssCurve)
	if l.dialect.DecimalComma {
		p.RdsCurve = curveDecimalCommas(p.RdsCurve)
		p.CossCurve, p.CrssCurve = curveDecimalCommas(p.CossCurve), curveDecimalCommas(p.CrssCurve)
	}
	var probs ProblemList
	fatal := l.missing != nil // without a required column no part is complete
	v := validator{p: p, bad: l.missing, parsed: true, rec: rec, fileCol: l.fileCol}
	if len(errs) > 0 {
		v.bad = make(map[string]bool, len(errs)+len(l.missing))
		for k := range l.missing {
			v.bad[k] = true
		}
		for _, e := range errs {
			n := l.hdr.Columns[e.col]
			v.bad[n] = true
			probs = append(probs, &Problem{File: l.file, Line: line, Column: e.col + 1, Field: n, Part: p.Name, Text: rec[e.col], Err: e.err, Fatal: true})
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
		pr.File, pr.Line = l.file, line
		fatal = fatal || pr.Fatal
		probs = append(probs, pr)
	}
	return probs, fatal
}

// commit accepts a checked part unless its name was seen before, and hands
// it to fn (when decoding in place, the caller keeps it). For a duplicate it
// returns false and the line of the first part of that name.
func (l *loader) commit(p *Part, line int) (ok bool, first int) {
	if first, ok := l.names.add(p.Name, line); !ok {
		return false, first
	}
	if l.fn != nil {
		if err := l.fn(p); err != nil {
			l.problem(&Problem{Line: line, Part: p.Name, Err: err, Fatal: true})
			l.stopped = true
		}
	}
	return true, 0
}

// partCol is the 1-based file column of the part names.
func (l *loader) partCol() int { return l.fileCol[partSchema.byName["part"]] }

// duplicate reports a part whose name was seen on line first.
func (l *loader) duplicate(p *Part, line int, cell string, first int) {
	l.problem(&Problem{Line: line, Column: l.partCol(), Field: "part", Part: p.Name, Text: cell, Fatal: true,
		Err: &valueError{msg: fmt.Sprintf("%q: %v: the part on line %d has the same name (names are compared ignoring case)",
			p.Name, ErrDuplicatePart, first), kind: ErrDuplicatePart}})
}

// curveDecimalCommas turns the decimal commas of an rds_on_curve cell
// ("25:1 100:1,4") into points: a comma between two digits. Other commas
// still separate points.
func curveDecimalCommas(s string) string {
	if strings.IndexByte(s, ',') < 0 {
		return s
	}
	b := []byte(s)
	for i := 1; i+1 < len(b); i++ {
		if b[i] == ',' && isDigit(b[i-1]) && isDigit(b[i+1]) {
			b[i] = '.'
		}
	}
	return string(b)
}

func isDigit(c byte) bool { return c >= '0' && c <= '9' }
