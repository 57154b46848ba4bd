// Package csv writes a report.Report's main table as CSV for a
// spreadsheet or a script: one header row of field names (report.Fields:
// the unit is in the name, total_w, tj_c), then one row per part (or per
// part and point). Numbers are plain, in the unit of their header, without
// prefixes; an unknown value is an empty cell; yes/no are true/false;
// lists are joined with "; ". Every cell goes through Safe, so that no
// part name becomes a spreadsheet formula and no control character of a
// library reaches the file.
package csv

import (
	"encoding/csv"
	"fmt"
	"io"
	"strconv"
	"strings"

	"swrank/rank/report"
)

// Write writes the first table of rep that has rows (every row, every
// field), or an error when the report has no table (explain and check
// print text or JSON).
func Write(w io.Writer, rep *report.Report) error {
	t := rep.Main()
	if t == nil {
		return fmt.Errorf("%s has no table to write as CSV: use --format table or json", rep.Command)
	}
	keys := t.Keys()
	cw := csv.NewWriter(w)
	if err := cw.Write(keys); err != nil {
		return fmt.Errorf("csv: %w", err)
	}
	for _, r := range t.Rows {
		line := make([]string, len(keys))
		for j, k := range keys {
			c, ok := r.Get(k)
			if ok {
				line[j] = Safe(Cell(k, c))
			}
		}
		if err := cw.Write(line); err != nil {
			return fmt.Errorf("csv: %w", err)
		}
	}
	cw.Flush()
	if err := cw.Error(); err != nil {
		return fmt.Errorf("csv: %w", err)
	}
	return nil
}

// Cell writes one cell of field key: a plain number in the field's unit
// (empty when unknown), the text, true/false, or the list joined by "; ".
func Cell(key string, c report.Cell) string {
	if !c.Known {
		return ""
	}
	f, _ := report.FieldOf(key)
	switch f.Kind {
	case report.KindText:
		return c.Text
	case report.KindBool:
		return strconv.FormatBool(c.Num != 0)
	case report.KindList:
		return strings.Join(c.List, "; ")
	}
	return strconv.FormatFloat(c.Num, 'g', 6, 64)
}

// Safe neutralises a cell that a spreadsheet would run as a formula
// (OWASP guidance on CSV injection: cells starting with = + - @ tab or CR),
// leaving plain numbers alone, then escapes its control characters
// (report.CSVText).
func Safe(s string) string { return report.CSVText(s) }
