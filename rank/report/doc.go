// Package report writes what swrank computes, in each output format of its
// commands. It formats and computes nothing else: percentages and sums for
// display at most.
//
// It takes the results of the rank packages as they are:
//
//   - Ranking: a plain ranking, evaluate.Result in rank order at one
//     stage.Point (from rank.Rank or rank.Best), with decide.Leaders for
//     the worst case of the leading parts and the price-loss front;
//   - Decisions: the decision path of rank, decide.Candidate at a
//     decide.Plan (a point or a load profile, paralleled counts);
//   - Comparison: decide.Comparison of candidates against the part
//     already fitted;
//   - Sweep: a decide.SweepResult with its crossovers, also drawn as a
//     plot (Sweep.Plot);
//   - WriteExplain: one evaluate.Result with the evaluate.Trace of the
//     same evaluation;
//   - WriteCheck: the devices.ProblemList of a parts library.
//
// and gives text to an io.Writer in the format asked for: table (text, in
// table.go with the text around the tables in text.go), csv (csv.go),
// json (json.go, json_decide.go), markdown (markdown.go), and SVG or PNG
// for a plot (svg.go). CheckFormat tells the format names.
//
// report may import every rank package; only the command (cmd/swrank)
// imports it.
package report
