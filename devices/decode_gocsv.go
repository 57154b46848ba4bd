package devices

import (
	"encoding/csv"
	"errors"
	"fmt"
	"reflect"
	"strings"

	"github.com/gocarina/gocsv"
)

// rowsReader hands gocsv a header and a run of rows already read by the
// loader's own csv.Reader (comments, BOM and line numbers handled there).
type rowsReader struct {
	header []string
	rows   [][]string
}

func (r *rowsReader) Read() ([]string, error) {
	return nil, errors.New("rowsReader: Read not supported")
}

func (r *rowsReader) ReadAll() ([][]string, error) {
	all := make([][]string, 0, len(r.rows)+1)
	all = append(all, r.header)
	return append(all, r.rows...), nil
}

// readGocsv reads every row, then unmarshals them with gocsv. gocsv stops at
// the first cell that does not decode; the rows before it are already in
// place, the failing row is decoded alone until every bad cell is known, and
// the run resumes after it.
func (l *loader) readGocsv(src source) {
	var rows [][]string
	var lines []int
	for {
		rec, line := l.next(src)
		if rec == nil {
			break
		}
		rows = append(rows, rec)
		lines = append(lines, line)
	}
	// Header for gocsv: known columns under their tag, the rest blank so
	// that gocsv ignores them (unknown and repeated columns).
	header := make([]string, len(l.colOf))
	for j, ci := range l.colOf {
		if ci >= 0 {
			header[j] = partSchema.cols[ci].name
		}
	}
	parts := make([]Part, len(rows))
	errs := make([][]cellErr, len(rows))
	cells := rows
	if l.dialect.DecimalComma {
		cells = l.pointRows(rows)
	}
	for k := 0; k < len(rows); {
		out := parts[k:]
		err := gocsv.UnmarshalCSV(&rowsReader{header, cells[k:]}, &out)
		if err == nil {
			break
		}
		var pe *csv.ParseError
		if !errors.As(err, &pe) || pe.Line < 2 || k+pe.Line-2 >= len(rows) {
			l.problem(&Problem{Line: lines[k], Err: fmt.Errorf("decoding: %w", err), Fatal: true})
			return
		}
		i := k + pe.Line - 2
		parts[i], errs[i] = l.gocsvRow(header, cells[i])
		if l.dialect.DecimalComma {
			l.commaErrors(rows[i], errs[i])
		}
		k = i + 1
	}
	if len(rows) > 0 {
		l.sizeFor(rowBytes(rows[0]))
	}
	for i := range rows {
		if l.stopped {
			return
		}
		if l.finish(&parts[i], rows[i], lines[i], errs[i]) && l.parts != nil {
			*l.parts = append(*l.parts, parts[i])
		}
	}
}

// gocsvRow decodes one row, replacing each cell that fails by a neutral
// value and decoding again, so that every bad cell of the row is found.
func (l *loader) gocsvRow(header, row []string) (Part, []cellErr) {
	cells := append([]string(nil), row...)
	var errs []cellErr
	for range len(cells) + 1 {
		out := make([]Part, 1)
		err := gocsv.UnmarshalCSV(&rowsReader{header, [][]string{cells}}, &out)
		if err == nil {
			return out[0], errs
		}
		var pe *csv.ParseError
		if !errors.As(err, &pe) || pe.Column < 1 || pe.Column > len(cells) {
			return out[0], append(errs, cellErr{0, fmt.Errorf("decoding: %w", err)})
		}
		j := pe.Column - 1
		errs = append(errs, cellErr{j, pe.Err})
		cells[j] = ""
		if ci := l.colOf[j]; ci >= 0 && partSchema.cols[ci].kind == cellQty {
			cells[j] = "1" // a required quantity refuses a blank cell
		}
	}
	return Part{}, errs
}

// pointRows returns rows with the decimal commas of the number cells
// (quantities and prices) written as points, for gocsv, which reads
// numbers with a point only: such a cell reads alike either way
// (quantity.ParseFloatDecimalComma).
func (l *loader) pointRows(rows [][]string) [][]string {
	out := make([][]string, len(rows))
	for i, row := range rows {
		out[i] = row
		for j, cell := range row {
			ci := -1
			if j < len(l.colOf) {
				ci = l.colOf[j]
			}
			if ci < 0 || strings.IndexByte(cell, ',') < 0 {
				continue
			}
			if k := partSchema.cols[ci].kind; k == cellString || k == cellOther && partSchema.cols[ci].typ != reflect.TypeFor[Price]() {
				continue
			}
			if &out[i][0] == &row[0] {
				out[i] = append([]string(nil), row...)
			}
			out[i][j] = strings.ReplaceAll(cell, ",", ".")
		}
	}
	return out
}

// commaErrors replaces the errors of a row decoded from pointRows by those
// of the cells as written, so that they quote the user's text.
func (l *loader) commaErrors(row []string, errs []cellErr) {
	var scratch Part
	for k, e := range errs {
		if e.col >= len(row) || e.col >= len(l.setters) || l.setters[e.col] == nil {
			continue
		}
		if err := l.setters[e.col].set(&scratch, row[e.col], true); err != nil {
			errs[k].err = err
		}
	}
}
