// Package pass reads model rasters block by block and feeds every valid
// cell to the accumulators of the extents holding it: the one streaming
// scoring pass of a run. Each of N workers opens its own Source (one GDAL
// dataset handle per worker, so that decoding runs on every core), takes
// the next block, reads, decodes and scores it with its own accumulators,
// merged at the end. A cell is added once per nested sequence of extents
// (extent.Family.Groups), to the smallest extent of the sequence holding
// it, and the accumulators are merged outwards along each sequence after
// the pass. Within a block, each row's runs of cells are overlaid into
// segments that go to one same set of extents; a set of several extents
// that holds many of the block's cells gets a shared accumulator
// (metrics.Shared), so those cells are added once and the sums are merged
// into each of those extents at the end of the block (block.go).
// Accumulators hold integer sums, so the result does not depend on the
// number of workers, the order in which blocks finish, or which cells were
// shared.
//
// A model whose values are computed rather than read (Virtual: a Field
// such as the distance-only null) goes through the same workers and code:
// each worker's Source computes the cells of its block that lie in some
// extent, those of the block's segments: the pass plans a block before it
// reads it, so a computed model's source follows the same plan instead of
// walking the extents again. Options.Rows lets a caller see each row's values and area
// weights (the null's sorting-bias tally). Options.RowRange restricts a
// pass to a range of grid rows (a shard's share of a run): passes over
// ranges that split the grid add up exactly to the whole pass, and
// Options.Rows sees the same values in them. A panic on a worker ends the
// pass with an *InternalError instead of the process.
//
// The first model's pass can also record the valid cells it meets
// (Options.Valid), so that the extent family is clipped without a separate
// read; values are decoded with the band's scale and offset, and no-data,
// NaN and infinite cells are skipped before any extent is touched.
package pass
