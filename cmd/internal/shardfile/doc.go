// Package shardfile is the content of a shard's partial file: what one
// shard of a run computed over its share of grid rows, written as the
// named sections of a metrics partial file (metrics.EncodePartial), read
// back with every section checked, and merged exactly.
//
// A run split into N shards divides the grid's rows with
// metrics.ShardBlocks(I, N, height): in the partial file's header a
// "block" is one grid row, so TotalBlocks is the grid height and Blocks is
// the shard's one range of rows. Rows rather than the rasters' own blocks
// because every pass of a run must cover the same cells in a shard (the
// models may be tiled differently, and the distance-only null has blocks of
// its own), and because the valid cells found by the first model's pass
// clip the family for every later pass.
//
// A Shard holds everything of a run that depends on cells:
//
//   - Valid: the first model's valid cells in the shard's rows that lie in
//     some extent, as column runs per row (the family is clipped to them);
//   - per pass (each model, each user null, the distance-only null): the
//     layout (the model's values at the points and the fixed thresholds;
//     it has no value range, so a shard reads only its own rows of each
//     model), one accumulator per family member (empty ones omitted; each
//     holds its fine histogram on the dyadic grid of its own cells' range,
//     so shards' histograms merge exactly) and the pass statistics
//     (pass.Stats, with whether any cell of the shard's rows has data);
//   - the coarse preview values of the first model in the shard's rows;
//   - the distance-only null's sorting-bias background
//     (nullmodel.Background), when the run has that null;
//   - the run's recorded options (opaque JSON, written and read by the
//     caller) and the family's member ids, so that a merge re-prepares the
//     same run and checks that it did.
//
// Merged adds shards one at a time: accumulators, statistics and
// backgrounds hold integer sums (or min/max), valid runs and preview cells
// of different rows are disjoint, so the merged content is exactly what a
// single pass over every row gives, whatever the order of the shards.
package shardfile
