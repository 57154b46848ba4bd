package report

import (
	"io"

	"github.com/olekukonko/tablewriter"
	"github.com/olekukonko/tablewriter/renderer"
)

// The markdown format: the tables of table.go in Markdown's pipe syntax,
// for pasting into a document.

// withMarkdown adds the Markdown renderer to a table's options when
// markdown is set.
func withMarkdown(opts []tablewriter.Option, markdown bool) []tablewriter.Option {
	if markdown {
		opts = append(opts, tablewriter.WithRenderer(renderer.NewMarkdown()))
	}
	return opts
}

// markdown writes the ranking's table in Markdown, without the operating
// point above it or the notes on the flags.
func (r *Ranking) markdown(w io.Writer) error { return r.table(w, true) }

// markdown writes the decisions' table in Markdown, without the
// description above it.
func (r *Decisions) markdown(w io.Writer) error { return r.table(w, true) }

// markdown writes the comparison's table in Markdown, without the
// operating point above it.
func (r *Comparison) markdown(w io.Writer) error { return r.table(w, true) }

// markdown writes the sweep's table in Markdown, without the description
// above it.
func (r *Sweep) markdown(w io.Writer) error { return r.table(w, true) }
