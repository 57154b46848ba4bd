package main

import (
	"flag"
	"fmt"
	"io"
	"os"
	"strings"

	"golang.org/x/term"

	"swrank/rank/report"
	"swrank/rank/report/csv"
	"swrank/rank/report/json"
	"swrank/rank/report/markdown"
	"swrank/rank/report/table"
)

// defaultFormat is the output format when none is given: the text table.
const defaultFormat = "table"

// checkFormat reports an error unless f names an output format.
func checkFormat(f string) error {
	switch strings.ToLower(f) {
	case "table", "csv", "json", "markdown":
		return nil
	}
	return fmt.Errorf("--format %q: want table, csv, json or markdown", f)
}

// view holds the flags that choose the table's columns.
type view struct {
	wide    bool
	columns string
}

// register registers --wide and --columns on fs.
func (v *view) register(fs *flag.FlagSet) {
	fs.BoolVar(&v.wide, "wide", false, "table and markdown: every loss share, grouped (while closed, at each edge, gate charging), with the method and more")
	fs.StringVar(&v.columns, "columns", "", "table and markdown: the `LIST` of columns to show, comma-separated field names (docs/output.md), e.g. rank,part,total_w,tj_c")
}

// cols returns the columns asked for, checked against the field names.
func (v *view) cols() ([]string, error) {
	if strings.TrimSpace(v.columns) == "" {
		return nil, nil
	}
	var out []string
	for _, c := range strings.Split(v.columns, ",") {
		if c = strings.TrimSpace(c); c != "" {
			out = append(out, c)
		}
	}
	return out, report.CheckColumns(out)
}

// writeReport draws rep in the format asked for; the table follows the
// terminal's width when stdout is one.
func writeReport(w io.Writer, rep *report.Report, in *inputs) error {
	cols, err := in.view.cols()
	if err != nil {
		return err
	}
	switch strings.ToLower(in.format) {
	case "json":
		return json.Write(w, rep)
	case "csv":
		return csv.Write(w, rep)
	case "markdown":
		return markdown.Write(w, rep, markdown.Options{Wide: in.view.wide, Columns: cols, All: in.all})
	}
	return table.Write(w, rep, table.Options{Width: termWidth(w), Wide: in.view.wide, Columns: cols, All: in.all})
}

// termWidth is the width of the terminal w writes to, or 0 (the
// renderer's default) when it is not a terminal.
func termWidth(w io.Writer) int {
	f, ok := w.(*os.File)
	if !ok || !term.IsTerminal(int(f.Fd())) {
		return 0
	}
	width, _, err := term.GetSize(int(f.Fd()))
	if err != nil || width < 40 {
		return 0
	}
	return width
}
