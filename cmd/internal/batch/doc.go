// Package batch runs the studies of a batch on one machine: several at
// once, within a number of concurrent jobs and a memory budget, each
// study's failure kept to itself; and it keeps the completion marker that
// makes a re-run skip the studies already done.
//
// It knows nothing of GDAL or of how a study runs: its caller (package
// batchrun) gives it each study's memory need and a function that runs
// study i. Its output is a list of per-study errors in the table's order,
// so what the caller writes afterwards does not depend on the order the
// studies finished in.
//
// # Scheduling
//
// A study may start when fewer than Jobs studies run and its need fits in
// what the running studies leave of the budget. Studies are taken in
// table order; when the next one does not fit, a later one that fits may
// start first (the outputs do not depend on the order). A study whose
// need alone exceeds the budget is refused with ErrTooLarge.
//
// # Completion marker
//
// A finished study's folder holds slurm.MarkerName, the same marker the
// SLURM array script writes, so a study finished by either way counts as
// done for both. WriteMarker writes it last and atomically (temporary
// file, then rename) only after the study succeeded; its lines are
// "key<TAB>value", among them the SHA-256 of the study's settings, so that
// a re-run can tell a study whose table row changed since, and each input
// file's size, modification time and SHA-256 (Marker.SetInputs), so that
// it can tell a study whose input file was replaced under the same path:
// Checker.Check hashes only the files whose size or time changed, so a
// file touched without a change of content still counts as unchanged. A
// marker without input lines (written before they existed) compares the
// settings alone.
package batch
