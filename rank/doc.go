// Package rank orders parts by their loss at one operating point: Rank
// evaluates every prepared device (fit.Device) at a resolved point
// (stage.Point) and returns the results (evaluate.Result) passing parts
// first, each group by increasing total stage loss, ties by part name;
// Best keeps the n best of a stream; Stream prepares, evaluates and offers
// a library's parts to a Best on worker goroutines as a reader hands them
// out; ForChunks is the worker pool that Rank and the decisions share.
//
// It takes what the steps below it give: the stage and its stresses
// (rank/stage), the loss models (rank/loss) fitted to each part
// (rank/fit), the junction temperature (rank/thermal) and one part's
// evaluation with its screens and their reasons (rank/evaluate). The
// decisions built on rankings (worst case, compare, price, profiles,
// sweep, paralleling) are in rank/decide. docs/architecture.md lists the
// packages in the order the data flows and the rule of their imports.
package rank
