// Package markdown draws a report.Report's tables in Markdown's pipe
// syntax, for pasting into a design review: the same columns as the text
// table (compact, wide or chosen), the notes as a numbered list and the
// sections as bullet lists. The lines about the operating point come
// first as a bullet list.
package markdown

import (
	"fmt"
	"io"
	"strings"

	"swrank/rank/report"

	"github.com/olekukonko/tablewriter"
	"github.com/olekukonko/tablewriter/renderer"
	"github.com/olekukonko/tablewriter/tw"
)

// Options choose what the tables show (as for the text table).
type Options struct {
	Wide    bool     // the wide column set
	Columns []string // the columns shown, in order (overrides Wide)
	All     bool     // every row of a ranked table
}

// Write draws rep to w in Markdown, a library's text with its control
// characters escaped (report.MarkdownCell, report.GuardText).
func Write(w io.Writer, rep *report.Report, opt Options) error {
	return report.GuardText(w, func(w io.Writer) error { return write(w, rep, opt) })
}

func write(w io.Writer, rep *report.Report, opt Options) error {
	var b strings.Builder
	for _, l := range rep.About {
		if strings.TrimSpace(l) != "" {
			b.WriteString("- " + escape(strings.TrimSpace(l)) + "\n")
		}
	}
	for i := range rep.Tables {
		t := &rep.Tables[i]
		if t.MachineOnly {
			continue
		}
		limit := report.DefaultLimit
		if opt.All {
			limit = 0
		}
		rows, more := t.Shown(limit)
		g := report.TextGrid(t, t.Select(opt.Wide, opt.Columns, rows), rows)
		if b.Len() > 0 {
			b.WriteString("\n")
		}
		writeGrid(&b, g)
		if more > 0 {
			fmt.Fprintf(&b, "\n… and %s ranked below these %d.\n", report.Plural(more, "part", "parts more"), len(rows))
		}
		if len(g.Notes) > 0 {
			b.WriteString("\nNotes:\n\n")
			for k, n := range g.Notes {
				fmt.Fprintf(&b, "%d. `%s` %s\n", k+1, n.Code, escape(n.Text))
			}
		}
	}
	for _, s := range rep.Sections {
		b.WriteString("\n")
		if s.Title != "" {
			b.WriteString(escape(s.Title) + "\n\n")
		}
		for _, l := range s.Lines {
			b.WriteString("- " + escape(l) + "\n")
		}
	}
	_, err := io.WriteString(w, b.String())
	return err
}

// writeGrid writes one pipe table with tablewriter's Markdown renderer:
// numbers right-aligned, text left-aligned, each cell escaped first.
func writeGrid(b *strings.Builder, g report.Grid) {
	align := make([]tw.Align, len(g.Numeric))
	for j, n := range g.Numeric {
		align[j] = tw.AlignLeft
		if n {
			align[j] = tw.AlignRight
		}
	}
	esc := func(cs []string) []string {
		out := make([]string, len(cs))
		for j, c := range cs {
			out[j] = escape(c)
		}
		return out
	}
	t := tablewriter.NewTable(b,
		tablewriter.WithRenderer(renderer.NewMarkdown()),
		tablewriter.WithHeaderAutoFormat(tw.Off),
		tablewriter.WithHeaderAlignmentConfig(tw.CellAlignment{PerColumn: align}),
		tablewriter.WithRowAlignmentConfig(tw.CellAlignment{PerColumn: align}),
		tablewriter.WithHeader(esc(g.Heads)))
	for _, r := range g.Cells {
		_ = t.Append(esc(r)) // writes to a strings.Builder: no error to keep
	}
	_ = t.Render()
}

// escape keeps a cell's pipes from being read as Markdown and its control
// characters from reaching a terminal (report.MarkdownCell).
func escape(s string) string { return report.MarkdownCell(s) }
