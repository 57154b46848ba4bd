package report

import (
	"math"
	"slices"
)

// SchemaVersion is the version of the JSON document (and of the field
// names in every format). It changes when a field is renamed or removed or
// changes its unit; adding a field keeps it.
const SchemaVersion = 2

// Cell is one value of a record: a number in the SI unit of its field, a
// text, a yes/no or a list of texts, as the field's Kind says. An unknown
// number has Known false; renderers print it blank (CSV), null (JSON) or
// "–" (table).
type Cell struct {
	Num   float64  // the number, in the field's unit (Kind Bool: 1 true, 0 false)
	Known bool     // the cell holds a value
	Text  string   // the text (Kind Text)
	List  []string // the texts (Kind List)
}

// Num makes a known number; NaN and ±Inf make an unknown one, so that no
// renderer prints them.
func Num(v float64) Cell {
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return Cell{}
	}
	return Cell{Num: v, Known: true}
}

// Unknown is a number that is not known.
func Unknown() Cell { return Cell{} }

// Text makes a text cell ("" is unknown).
func Text(s string) Cell { return Cell{Text: s, Known: s != ""} }

// Bool makes a yes/no cell.
func Bool(b bool) Cell {
	if b {
		return Cell{Num: 1, Known: true}
	}
	return Cell{Known: true}
}

// List makes a list cell (never nil, so JSON writes [] for none).
func List(s []string) Cell {
	if s == nil {
		s = []string{}
	}
	return Cell{List: s, Known: true}
}

// Value is one named cell of a record.
type Value struct {
	Key  string // the field name (Fields)
	Cell Cell   // its value
}

// Record is an ordered list of named cells: a row of a table, or the
// operating point.
type Record []Value

// Set sets key to c, replacing an earlier value of the same key.
func (r *Record) Set(key string, c Cell) {
	for i := range *r {
		if (*r)[i].Key == key {
			(*r)[i].Cell = c
			return
		}
	}
	*r = append(*r, Value{key, c})
}

// Get returns the cell of key and whether the record has it.
func (r Record) Get(key string) (Cell, bool) {
	for _, v := range r {
		if v.Key == key {
			return v.Cell, true
		}
	}
	return Cell{}, false
}

// Number returns the number of key, and whether it is known.
func (r Record) Number(key string) (float64, bool) {
	c, ok := r.Get(key)
	return c.Num, ok && c.Known
}

// Row is one row of a table: its cells, and the records nested under it
// (each device of a synchronous stage, each point of a load profile),
// which JSON writes under the row and the other formats leave out.
type Row struct {
	Record
	// Flags are the codes of the approximations the row rests on
	// (fit.Flags), which the table numbers as notes under it.
	Flags []string
	// Sub are the nested records, by name ("devices", "points").
	Sub map[string][]Record
	// SetAside is true for a part a screen sets aside.
	SetAside bool
	// NotEvaluated is true for a part set aside before it could be
	// evaluated (rank.SetAside): CSV and JSON write its row, the text
	// formats say it in the set-aside section only.
	NotEvaluated bool
}

// Table is a table of the report.
type Table struct {
	// Name is its member name in JSON ("results", "crossovers", "grid").
	Name string
	// Title is a line printed above it in the text formats ("": none).
	Title string
	// Compact are the columns shown by default, Wide the columns --wide
	// shows; every key of the rows can be asked for with --columns.
	Compact, Wide []string
	// Rows are in order (rank order for the results).
	Rows []Row
	// Pivot, when set, makes the text formats draw the table as a grid:
	// one line per value of Pivot.Row, one column per value of Pivot.Col,
	// Pivot.Val in the cells.
	Pivot *Pivot
	// Ranked is true for a table of parts in rank order: the text formats
	// list the top rows and say how many more there are.
	Ranked bool
	// MachineOnly is true for a table the text formats leave out (they
	// say the same in sections).
	MachineOnly bool
	// More counts parts ranked but not in Rows (a library read as a
	// stream keeps only its leaders), 0 otherwise.
	More int
	// Fit is the column the text table cuts (ending it in …) so that the
	// compact set fits the width; "" cuts the part's name.
	Fit string
}

// Pivot names the fields of a table drawn as a grid.
type Pivot struct {
	Row, Col, Val string // field names
	// Last is a field of the Row value printed in a last column ("best").
	Last string
}

// Keys returns every field name that appears in the rows, in first-seen
// order.
func (t *Table) Keys() []string {
	var out []string
	for _, r := range t.Rows {
		for _, v := range r.Record {
			if !slices.Contains(out, v.Key) {
				out = append(out, v.Key)
			}
		}
	}
	return out
}

// Section is a titled list of lines after the tables (the parts set
// aside, the worst case of the leaders, the price-loss front, the
// crossovers in words, the verdicts).
type Section struct {
	Key   string   // its member name in JSON
	Title string   // the heading in the text formats
	Lines []string // one sentence each
	// Verbatim lines are printed whole, not wrapped: they hold paths and
	// the simulator's own messages, to be copied as they are.
	Verbatim bool
}

// Note explains one flag code that appears in the report's rows.
type Note struct {
	Code string // the flag's short code (fit.Flags.Codes)
	Text string // its sentence
}

// Step is one formula of explain with its terms.
type Step struct {
	Device  string // the place ("control", "sync") or "" for the stage
	Topic   string // what it computes
	Formula string // the equation in words and symbols
	Terms   []Term // its inputs and results
}

// Term is one named value of a Step.
type Term struct {
	Name  string // the symbol or words
	Value Cell   // the number (unknown when not finite)
	Unit  string // the unit symbol ("" for a bare number)
	Text  string // the value printed with its SI prefix and unit
}

// Report is what a command prints, in every format.
type Report struct {
	// Command is the command that built it: rank, compare, sweep,
	// explain or check.
	Command string
	// About are the lines describing the operating point as understood
	// (each default said to be one), the library and the method.
	About []string
	// Point is the operating point as numbers (nil for check); Stress the
	// stresses of each place ("control", "sync").
	Point  Record
	Stress map[string]Record
	// Meta are a few more values of the whole report, written at the top
	// of the JSON document (a sweep's variable, unit and scale).
	Meta Record
	// Library is the library's name, Parts the number of parts in it.
	Library string
	Parts   int
	// Tables, in order; the first is the main one.
	Tables []Table
	// Sections follow the tables.
	Sections []Section
	// Notes explain the flag codes of the rows, in order of first
	// appearance in the main table.
	Notes []Note
	// Steps are explain's formulas.
	Steps []Step
	// Plot is what a sweep draws (nil otherwise).
	Plot *Plot
	// Failed is true when no part passes (the command's exit status
	// tells it).
	Failed bool
}

// Main returns the first table, or nil.
func (r *Report) Main() *Table {
	if len(r.Tables) == 0 {
		return nil
	}
	return &r.Tables[0]
}

// Plot is a sweep's plot: the total loss of each part against the swept
// variable.
type Plot struct {
	Title  string // the plot's title
	XLabel string // the swept variable's name
	XUnit  string // its unit symbol (Hz, A, V)
	YLabel string // the loss's name
	XLog   bool   // the sweep's steps are equal ratios
	// Series are the parts drawn, one curve each.
	Series []Series
	// Crossovers are where the best part changes.
	Crossovers []Mark
	// Regions are the stretches between crossovers with their best part.
	Regions []Region
}

// Series is one part's curve.
type Series struct {
	Name string // the part
	// Index is the part's position in the library (0 first): it picks the
	// part's colour, the same in every plot of a run.
	Index int
	X, Y  []float64 // the grid and the total loss, W
	// Pass is false at the points where a screen sets the part aside
	// (not drawn).
	Pass []bool
}

// Mark is a labelled point of a plot.
type Mark struct {
	X, Y  float64 // in the plot's units
	Label string  // what it marks
}

// Region is a stretch of the swept variable with its best part.
type Region struct {
	From, To float64 // in the variable's unit
	Best     string  // "" when every part is set aside there
}

// DefaultLimit is how many rows of a ranked table the text formats list
// unless every row is asked for.
const DefaultLimit = 20

// Select returns the columns of t to draw: cols when given (their order),
// else the wide or the compact set. Columns with no known value in rows,
// other than rank and part, are left out of the compact set.
func (t *Table) Select(wide bool, cols []string, rows []Row) []string {
	switch {
	case len(cols) > 0:
		return cols
	case wide && len(t.Wide) > 0:
		return t.Wide
	}
	var out []string
	for _, k := range t.Compact {
		if k == "rank" || k == "part" || k == "notes" || k == "status" || anyKnown(rows, k) {
			out = append(out, k)
		}
	}
	return out
}

// anyKnown reports whether any row has a known value of key.
func anyKnown(rows []Row, key string) bool {
	for _, r := range rows {
		if c, ok := r.Get(key); ok && c.Known {
			return true
		}
	}
	return false
}

// Shown returns the rows the text formats list (the first limit rows of
// a ranked table; all with limit ≤ 0), rows not evaluated left out, and
// how many more there are.
func (t *Table) Shown(limit int) ([]Row, int) {
	more := t.More
	rows := t.Rows
	if slices.ContainsFunc(rows, func(r Row) bool { return r.NotEvaluated }) {
		rows = slices.DeleteFunc(slices.Clone(rows), func(r Row) bool { return r.NotEvaluated })
	}
	if !t.Ranked || limit <= 0 || len(rows) <= limit {
		return rows, more
	}
	return rows[:limit], more + len(rows) - limit
}
