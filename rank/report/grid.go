package report

import (
	"slices"
	"strconv"
	"strings"
)

// Grid is a table as text cells, ready for a text renderer to lay out.
type Grid struct {
	Heads   []string   // the column headings
	Groups  []string   // each column's loss group ("" none)
	Numeric []bool     // right-align the column
	Cells   [][]string // one line per row
	// Notes are the notes the rows refer to, numbered from 1 in order.
	Notes []Note
}

// TextGrid turns rows of t into text cells for the columns cols: values
// printed by FormatCell, the junction temperature with ~ when its thermal
// path is estimated, the notes column as the numbers of the rows' notes
// (1-3,5), a library's text with its control characters escaped
// (CellText). A table with a Pivot becomes a grid of its Val field.
func TextGrid(t *Table, cols []string, rows []Row) Grid {
	if t.Pivot != nil {
		return pivotGrid(t.Pivot, rows)
	}
	var g Grid
	number := map[string]int{}
	for _, r := range rows {
		for _, c := range r.Flags {
			if _, ok := number[c]; !ok {
				number[c] = len(number) + 1
				g.Notes = append(g.Notes, Note{Code: c, Text: noteText(c)})
			}
		}
	}
	for _, k := range cols {
		f, _ := FieldOf(k)
		g.Heads = append(g.Heads, Head(k))
		g.Groups = append(g.Groups, f.Group)
		g.Numeric = append(g.Numeric, f.Kind == KindNumber && k != "notes")
	}
	for _, r := range rows {
		line := make([]string, len(cols))
		for j, k := range cols {
			switch k {
			case "notes":
				var ns []int
				for _, c := range r.Flags {
					ns = append(ns, number[c])
				}
				line[j] = ranges(ns)
				continue
			}
			c, ok := r.Get(k)
			if !ok {
				line[j] = ""
				if k == "rank" {
					line[j] = Dash
				}
				continue
			}
			s := FormatCell(k, c, r.Record)
			if k == "tj_c" && c.Known {
				if e, _ := r.Get("tj_estimated"); e.Known && e.Num != 0 {
					s = "~" + s
				}
			}
			line[j] = CellText(s)
		}
		g.Cells = append(g.Cells, line)
	}
	return g
}

// pivotGrid draws rows as one line per value of p.Row and one column per
// value of p.Col, p.Val in the cells (in parentheses for a row set aside)
// and the p.Col whose p.Last is yes in a last column.
func pivotGrid(p *Pivot, rows []Row) Grid {
	var xs []string
	var cols []string
	cells := map[[2]string]string{}
	last := map[string]string{}
	for _, r := range rows {
		xc, _ := r.Get(p.Row)
		x := FormatCell(p.Row, xc, r.Record)
		cc, _ := r.Get(p.Col)
		col := CellText(cc.Text)
		if !slices.Contains(xs, x) {
			xs = append(xs, x)
		}
		if !slices.Contains(cols, col) {
			cols = append(cols, col)
		}
		vc, _ := r.Get(p.Val)
		v := FormatCell(p.Val, vc, nil)
		if r.SetAside {
			v = "(" + v + ")"
		}
		cells[[2]string{x, col}] = v
		if lc, ok := r.Get(p.Last); ok && lc.Known && lc.Num != 0 {
			last[x] = col
		}
	}
	g := Grid{Heads: append(append([]string{Head(p.Row)}, cols...), Head(p.Last))}
	g.Numeric = make([]bool, len(g.Heads))
	g.Groups = make([]string, len(g.Heads))
	for j := range g.Numeric {
		g.Numeric[j] = j < len(g.Heads)-1
	}
	for _, x := range xs {
		line := []string{x}
		for _, c := range cols {
			line = append(line, cells[[2]string{x, c}])
		}
		b := last[x]
		if b == "" {
			b = "none"
		}
		g.Cells = append(g.Cells, append(line, b))
	}
	return g
}

// ranges writes sorted note numbers with runs joined: 1-3,5.
func ranges(ns []int) string {
	slices.Sort(ns)
	ns = slices.Compact(ns)
	var parts []string
	for i := 0; i < len(ns); {
		j := i
		for j+1 < len(ns) && ns[j+1] == ns[j]+1 {
			j++
		}
		switch {
		case j == i:
			parts = append(parts, strconv.Itoa(ns[i]))
		case j == i+1:
			parts = append(parts, strconv.Itoa(ns[i]), strconv.Itoa(ns[j]))
		default:
			parts = append(parts, strconv.Itoa(ns[i])+"-"+strconv.Itoa(ns[j]))
		}
		i = j + 1
	}
	return strings.Join(parts, ",")
}
