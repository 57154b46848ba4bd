// Package table draws a report.Report as text for a terminal: the lines
// about the operating point, each table in aligned columns (a compact set
// by default, the wide set or chosen columns on request), numbered notes
// for the flags the rows rest on, and the report's sections, every line
// wrapped to the width given.
package table

import (
	"fmt"
	"io"
	"strings"
	"unicode/utf8"

	"swrank/rank/report"

	"github.com/olekukonko/tablewriter"
	"github.com/olekukonko/tablewriter/renderer"
	"github.com/olekukonko/tablewriter/tw"
)

// DefaultWidth is the width used when the output is not a terminal, in
// columns.
const DefaultWidth = 100

// Options choose what the table shows.
type Options struct {
	// Width is the number of columns available (≤ 0: DefaultWidth).
	Width int
	// Wide shows the wide column set: every loss share in its group.
	Wide bool
	// Columns, when given, are the columns shown, in order (field names
	// of report.Fields).
	Columns []string
	// All lists every row of a ranked table (default: the first
	// report.DefaultLimit, and a line saying how many more).
	All bool
}

// gap is the space between two columns.
const gap = "  "

// Write draws rep to w, a library's text with its control characters
// escaped (report.CellText in the cells, report.GuardText over the rest).
func Write(w io.Writer, rep *report.Report, opt Options) error {
	return report.GuardText(w, func(w io.Writer) error { return write(w, rep, opt) })
}

func write(w io.Writer, rep *report.Report, opt Options) error {
	width := opt.Width
	if width <= 0 {
		width = DefaultWidth
	}
	p := &printer{w: w, width: width}
	for _, l := range rep.About {
		p.wrap(l, "", "    ")
	}
	if len(rep.Steps) > 0 {
		p.steps(rep.Steps)
	}
	for i := range rep.Tables {
		t := &rep.Tables[i]
		if t.MachineOnly {
			continue
		}
		p.line("")
		p.table(t, opt)
	}
	for _, s := range rep.Sections {
		p.line("")
		if s.Title != "" {
			p.wrap(s.Title, "", "  ")
		}
		for _, l := range s.Lines {
			switch {
			case s.Verbatim && s.Title != "":
				p.line("- " + l)
			case s.Verbatim:
				p.line(l)
			case s.Title != "":
				p.wrap(l, "- ", "  ")
			default:
				p.wrap(l, "", "  ")
			}
		}
	}
	return p.err
}

// printer writes lines and keeps the first error.
type printer struct {
	w     io.Writer
	width int
	err   error
}

func (p *printer) line(s string) {
	if p.err == nil {
		_, p.err = fmt.Fprintln(p.w, strings.TrimRight(s, " "))
	}
}

// wrap writes s wrapped at word boundaries to the width: the first line
// after first, the others after rest.
func (p *printer) wrap(s, first, rest string) {
	for _, l := range Wrap(s, p.width, first, rest) {
		p.line(l)
	}
}

// Wrap breaks s into lines of at most width columns at spaces, the first
// line prefixed with first and the others with rest. A word longer than a
// line stays whole.
func Wrap(s string, width int, first, rest string) []string {
	var out []string
	line := first
	empty := true
	for _, word := range strings.Split(s, " ") {
		switch {
		case empty:
			line += word
			empty = false
		case width > 0 && utf8.RuneCountInString(line)+1+utf8.RuneCountInString(word) > width:
			out = append(out, line)
			line = rest + word
		default:
			line += " " + word
		}
	}
	return append(out, line)
}

// table draws one table with its notes.
func (p *printer) table(t *report.Table, opt Options) {
	limit := report.DefaultLimit
	if opt.All {
		limit = 0
	}
	rows, more := t.Shown(limit)
	cols := t.Select(opt.Wide, opt.Columns, rows)
	g := report.TextGrid(t, cols, rows)
	if t.Title != "" {
		p.wrap(t.Title, "", "  ")
	}
	cut := -1
	if t.Pivot == nil && !opt.Wide && len(opt.Columns) == 0 {
		fit := t.Fit
		if fit == "" {
			fit = "part"
		}
		cut = index(cols, fit)
	}
	p.grid(g, cut)
	if more > 0 {
		p.wrap(fmt.Sprintf("… and %s ranked below these %d (--all lists every one)", report.Plural(more, "part", "parts more"), len(rows)), "", "  ")
	}
	if len(g.Notes) > 0 {
		p.line("")
		p.line("notes:")
		cw := 0
		for _, n := range g.Notes {
			cw = max(cw, utf8.RuneCountInString(n.Code))
		}
		for i, n := range g.Notes {
			head := fmt.Sprintf("%3d  %-*s  ", i+1, cw, n.Code)
			p.wrap(n.Text, head, strings.Repeat(" ", utf8.RuneCountInString(head)))
		}
	}
}

// grid lays out g in aligned columns. Column cut (when ≥ 0) is cut (with
// …) so that the table fits the width.
func (p *printer) grid(g report.Grid, cut int) {
	n := len(g.Heads)
	if n == 0 {
		return
	}
	// A group of one column needs no name above it (its heading is the
	// group's name); in a group of more, the group's sum is its "sum".
	g.Groups = append([]string(nil), g.Groups...)
	for j := 0; j < n; {
		k := j
		for k+1 < n && g.Groups[k+1] == g.Groups[j] {
			k++
		}
		if g.Groups[j] != "" {
			if k == j {
				g.Heads[j], g.Groups[j] = g.Groups[j], ""
			} else {
				for i := j; i <= k; i++ {
					if g.Heads[i] == g.Groups[i] {
						g.Heads[i] = "sum"
					}
				}
			}
		}
		j = k + 1
	}
	w := make([]int, n)
	for j, h := range g.Heads {
		w[j] = utf8.RuneCountInString(h)
	}
	for _, r := range g.Cells {
		for j, c := range r {
			w[j] = max(w[j], utf8.RuneCountInString(c))
		}
	}
	total := func() int {
		s := 2 * (n - 1)
		for _, x := range w {
			s += x
		}
		return s
	}
	if cut >= 0 && total() > p.width {
		w[cut] = max(8, w[cut]-(total()-p.width))
	}
	if hasGroups(g.Groups) {
		widenGroups(g.Groups, w)
		p.line(groupLine(g.Groups, w))
	}
	p.render(g.Heads, g.Cells, w, g.Numeric)
}

// render draws the headings and the rows with tablewriter, borderless:
// columns apart by gap, a rule under the headings. The cells come padded
// to the widths w (numbers right-aligned, text left-aligned, cut to fit),
// so that the group line above lines up with the columns.
func (p *printer) render(heads []string, cells [][]string, w []int, numeric []bool) {
	var b strings.Builder
	sym := tw.NewSymbolCustom("swrank").WithColumn(gap).WithRow("─").WithCenter(gap).
		WithHeaderMid(gap).WithMidLeft("").WithMidRight("").WithHeaderLeft("").WithHeaderRight("")
	t := tablewriter.NewTable(&b,
		tablewriter.WithRenderer(renderer.NewBlueprint(tw.Rendition{Borders: tw.BorderNone, Symbols: sym,
			Settings: tw.Settings{Separators: tw.Separators{BetweenColumns: tw.On}, Lines: tw.Lines{ShowHeaderLine: tw.On}}})),
		tablewriter.WithHeaderAutoFormat(tw.Off),
		tablewriter.WithTrimSpace(tw.Off),
		tablewriter.WithPadding(tw.Padding{Overwrite: true}),
		tablewriter.WithHeader(padCells(heads, w, numeric)))
	for _, r := range cells {
		if p.err == nil {
			p.err = t.Append(padCells(r, w, numeric))
		}
	}
	if p.err == nil {
		p.err = t.Render()
	}
	for _, l := range strings.Split(strings.TrimRight(b.String(), "\n"), "\n") {
		p.line(l)
	}
}

// padCells pads each cell to its column's width w, numbers to the right
// and text to the left, cut to fit.
func padCells(cells []string, w []int, numeric []bool) []string {
	out := make([]string, len(cells))
	for j, c := range cells {
		c = cut(c, w[j])
		pad := strings.Repeat(" ", w[j]-utf8.RuneCountInString(c))
		if numeric[j] {
			out[j] = pad + c
		} else {
			out[j] = c + pad
		}
	}
	return out
}

func index(list []string, s string) int {
	for i, x := range list {
		if x == s {
			return i
		}
	}
	return -1
}

func hasGroups(gs []string) bool {
	for _, g := range gs {
		if g != "" {
			return true
		}
	}
	return false
}

// widenGroups widens the last column of each run of one group so that
// the group's name fits above the run.
func widenGroups(groups []string, w []int) {
	for j := 0; j < len(groups); {
		k, span := j, w[j]
		for k+1 < len(groups) && groups[k+1] == groups[j] {
			k++
			span += len(gap) + w[k]
		}
		if n := utf8.RuneCountInString(groups[j]); groups[j] != "" && n > span {
			w[k] += n - span
		}
		j = k + 1
	}
}

// groupLine names each run of columns of one loss group above them.
func groupLine(groups []string, w []int) string {
	var b strings.Builder
	for j := 0; j < len(groups); {
		k := j
		span := w[j]
		for k+1 < len(groups) && groups[k+1] == groups[j] {
			k++
			span += len(gap) + w[k]
		}
		if j > 0 {
			b.WriteString(gap)
		}
		if groups[j] == "" {
			b.WriteString(strings.Repeat(" ", span))
		} else {
			label := groups[j]
			if utf8.RuneCountInString(label) > span {
				label = cut(label, span)
			}
			fill := span - utf8.RuneCountInString(label)
			b.WriteString(strings.Repeat("╌", fill/2) + label + strings.Repeat("╌", fill-fill/2))
		}
		j = k + 1
	}
	return b.String()
}

// cut shortens s to n columns, ending in … when it was longer.
func cut(s string, n int) string {
	if utf8.RuneCountInString(s) <= n {
		return s
	}
	r := []rune(s)
	if n < 1 {
		return ""
	}
	return string(r[:n-1]) + "…"
}

// steps writes explain's formulas, under a heading for each device.
func (p *printer) steps(steps []report.Step) {
	last := "-"
	for _, s := range steps {
		head := s.Device
		if head == "" {
			head = "stage"
		}
		if head != last {
			p.line("")
			p.line("[" + head + "]")
			last = head
		}
		p.wrap(s.Topic+": "+s.Formula, "  ", "      ")
		for _, t := range s.Terms {
			p.line(fmt.Sprintf("      %-30s %s", t.Name, t.Text))
		}
	}
}
