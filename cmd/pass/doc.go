// Package pass reads model rasters block by block and feeds every valid
// cell to the accumulators of every extent holding it: the one streaming
// scoring pass of a run. Blocks are read in the raster's natural block size
// by one reader and scored by parallel workers, each with its own
// accumulators, merged at the end. Accumulators hold integer sums, so the
// merged result does not depend on the number of workers or the order in
// which blocks finish.
//
// The first model's pass can also record the valid cells it meets
// (Options.Valid), so that the extent family is clipped without a separate
// read; values are decoded with the band's scale and offset, and no-data,
// NaN and infinite cells are skipped before any extent is touched.
package pass
