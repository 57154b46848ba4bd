// Package report is the one report model of every swrank command: rank
// on both its paths (a plain ranking, and the decision path with worst
// case, price, load profiles and paralleling), compare, sweep, explain,
// check, verify and parts each build one Report, and one renderer per
// format draws it, each in a package of its own below this one:
//
//   - report/table: the text table for a terminal (a compact default set
//     of columns, --wide and --columns for more, numbered notes);
//   - report/markdown: the same tables in Markdown's pipe syntax;
//   - report/csv: one row per part (or per part and point), plain numbers
//     with the unit in the header;
//   - report/json: the whole document, with a schema version;
//   - report/svg: the plots of a sweep (SVG or PNG).
//
// Field names are defined once, in Fields (fields.go), with their unit and
// meaning; docs/output.md lists them and a test keeps the two in step.
// Every number is held in SI units (watts, kelvin steps, degrees Celsius
// for temperatures); formatting for a reader is the renderers' job, with
// the helpers of format.go shared between them.
//
// The builders (Ranking.Report, Decisions.Report, Comparison.Report,
// Sweep.Report, Explain, Check, Verification.Report, PartsList.Report)
// take the results of the rank packages as they are and compute nothing
// but sums and percentages for display.
// report may import every rank package; its renderers import it; only the
// command (cmd/swrank) imports the renderers.
package report
