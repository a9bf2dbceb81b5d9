// Package metrics scores one suitability model on one evaluation extent,
// exactly, from a stream of background cells and sets of presence values,
// and compares scores between extents or models on shared test presences.
// It is pure Go (no raster library): the raster pass feeds it numbers.
//
// # Flow
//
// Per model, build a Layout from every presence value (training and test)
// and every fixed threshold, and the size of each accumulator's fine
// histogram:
//
//	l, err := metrics.NewLayout(values, 4096)
//
// The layout needs no value range: each accumulator lays its fine histogram
// on a dyadic grid fixed by its own cells (see Accumulator), so the layout
// is known before the raster is read and is the same in every shard. Give
// enough bins that a Boyce window spans many of them: the Boyce index is
// the only metric that reads the histogram.
//
// Per extent, make an Accumulator. For each raster cell, locate the value
// once and add it to every extent that holds the cell:
//
//	bin := l.Locate(v)
//	for mask != 0 {
//		k := bits.TrailingZeros64(mask)
//		mask &= mask - 1
//		accs[k].AddLocated(bin, v, areaWeight)
//	}
//
// A raster pass does the same a row at a time: LocateRow locates a row's
// values into bins (-1 for no value), and AddRow adds a run of them to an
// accumulator. Cells that go to several accumulators at once (a block
// inside several extents) can be added once to a Shared, which Drain then
// adds to each of them.
//
// Accumulators from different goroutines or tiles are combined with Merge;
// the ring between two nested extents is outer.Sub(inner). Finally Score
// turns an accumulator and the presence values into Scores.
//
// # Exactness
//
// Background area is an integer weight per cell (the caller picks the unit),
// summed in int64, so merged results do not depend on order. Because every
// presence value and fixed threshold is a layout value, the area below, at
// and above each of them is known exactly, and so are the full AUC, the
// partial ROC curve and the threshold statistics. Only the Boyce index reads
// the fine histogram (see Boyce for the approximation). Score's cost does
// not depend on the number of cells; the partial ROC bootstrap works on
// counts of resampled presences.
//
// # Uncertainty and paired comparisons
//
// The background of an extent is its complete population of cells, so the
// only sampling variation is that of the test presences. Scores.Placements
// holds each test presence's placement V_i (its AUC term), Scores.AUCSE the
// standard error of their mean, and Scores.AUCUnweightedVarDeLong DeLong's
// full variance for readers who treat cells as a sample. For comparisons,
// NewEvaluator keeps one model x extent's test presences with their global
// indices (ScoreEvaluator makes it beside the scores, from what Score
// computed), and Compare gives paired differences on the presences two
// evaluators share: from the placements for the AUCs (PairedPlacements),
// and from one set of full-size resamples (Draws, the same index sets for
// every model and extent) for partial ROC, omission and Boyce.
//
// # Partial results and shards
//
// EncodeLayout and EncodeAccumulator write a layout and an accumulator
// exactly (int64 sums, float64 bit patterns) in a versioned, checksummed
// binary form; DecodeAccumulator accepts an accumulator only onto the layout
// with the same Fingerprint. Decoded partial accumulators merge into exactly
// the accumulator of a single pass, so a run split into shards of raster
// blocks can be merged byte for byte. EncodePartial and DecodePartial wrap
// named encodings in a partial file with a ShardHeader (tool version, input
// checksums, settings hash, seed, shard I/N, block ranges), and
// CheckShardSet refuses a set of shards that is not exactly one run's
// shards 1..N covering every block once.
//
// # Undefined quantities
//
// No returned number is NaN or infinite. When the whole record cannot be
// scored (no background, no test presences, constant suitability)
// Scores.Scored is false and Scores.NotScored says why. A partial ROC curve
// that cannot be formed (or whose 1-E crossing falls among tied test
// presences) has Formed false, Ratio 0 and a Reason; bootstrap resamples
// that cannot be formed are counted in NotFormed. An undefined Boyce index
// has Defined false, Index 0 and a Reason. AUCTrain is 0 and the
// training-presence thresholds are absent when there are no training
// presences.
//
// # Methods
//
//   - Full AUC (Mann-Whitney, ties 1/2): Hanley & McNeil (1982) Radiology
//     143:29-36. See Scores.AUC.
//   - Partial ROC: Peterson, Papes & Soberon (2008) Ecological Modelling
//     213:63-72. See PartialROC.
//   - Threshold omission and binomial test: Anderson, Lew & Peterson (2003)
//     Ecological Modelling 162:211-232. See Threshold.
//   - Continuous Boyce index: Hirzel, Le Lay, Helfer, Randin & Guisan (2006)
//     Ecological Modelling 199:142-152. See Boyce.
//   - Placements and DeLong's variance: DeLong, DeLong & Clarke-Pearson
//     (1988) Biometrics 44:837-845. See PlacementSE, PairedPlacements.
//   - The t interval of a mean of paired differences: Student (1908)
//     Biometrika 6:1-25. See PairedPlacements, T975.
//   - Percentile intervals of paired resamples: Efron & Tibshirani (1993)
//     An Introduction to the Bootstrap, ch. 13. See Compare.
package metrics
