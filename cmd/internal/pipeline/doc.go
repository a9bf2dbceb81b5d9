// Package pipeline runs one areasweep study from its inputs to its
// outputs. The command fills an Options value (flags merged over the study
// file, validated) and calls Run; everything between is here.
//
// How the data flows (Run):
//
//	Prepare  inputs      every input file exists (checkFiles)
//	         grid        from the first model; the others must be SameAs
//	         memory      the run's estimate against the available memory
//	         points      occurrences read, placed on the grid, sampled on the
//	                     first model (outside / no data), thinned per cell;
//	                     the blocks sampled are kept for its pass
//	         checksums   SHA-256 of every input and of its sidecar files
//	         --out       locked, a staging folder made (package outdir)
//	         family      extent.Build: every member's row runs
//	Pass i   Plan        the source (raster or computed null), its values at
//	                     the points (blocks decoded there are kept, up to
//	                     keptBlockBytes, and not decoded again by the pass),
//	                     the layout of the accumulators
//	         sums        one streaming pass over the cells (Stream), or
//	                     sums from elsewhere (SetSums)
//	         Clip        after the first pass only: the family is clipped to
//	                     the cells with data that pass found; from then on the
//	                     extents are final
//	         Score       metrics per extent, rings per chain, omission lists,
//	                     paired evaluators; sorting bias for the distance null
//	Finish   analysis    distances test-to-training, paired comparisons,
//	                     report.Analyze
//	         outputs     extents.gpkg (.tif), results.json, scores.csv,
//	                     omitted_points.gpkg, the report, run.log; moved into
//	                     --out
//
// The stages can be called one by one for runs split across processes:
//
//	s, err := pipeline.Prepare(ctx, o, io, nil)
//	defer s.Close()
//	for i := range s.Passes() {
//		err = s.Pass(ctx, i) // or: p, _ := s.Plan(i); sums, _ := s.Stream(ctx, p); ...
//	}
//	res, err := s.Finish(ctx)
//
// SetSums replaces where a pass's sums come from (Stream by default): a
// merge of shard files gives the accumulators per member it read back
// instead of reading the cells, and a shard reads only its blocks of
// Plan.Source with the options Stream would use (PassOptions: workers,
// preview, the null's row tally, the set of valid cells while the family is
// unclipped) on Grid and Family. The first pass's Sums must carry the
// valid cells (Clip) and the preview.
//
// Errors are classified with package fault: an input error (exit 2,
// nothing written), an internal error (a bug, exit 3), or any other (exit
// 1). writeFailed words a failure while writing the outputs.
package pipeline
