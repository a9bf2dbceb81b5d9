package metrics

import (
	"fmt"
	"math"
	"slices"
)

// Defaults applied by Settings.WithDefaults to zero-valued fields.
const (
	DefaultE          = 0.05
	DefaultIterations = 1000
	DefaultFraction   = 0.5
	DefaultBoyceWidth = 0.1
	DefaultBoyceSteps = 100
)

// Upper limits that keep a bad setting from asking for unbounded work.
const (
	MaxIterations = 1_000_000
	MaxBoyceSteps = 100_000
)

// Settings are the scoring choices shared by all models and extents of a run.
// Zero values mean "use the default".
type Settings struct {
	// E lists the allowable omission rates of partial ROC, each in (0,1).
	// Nil or empty means {0.05}.
	E []float64
	// Iterations is the number of bootstrap resamples B >= 1 (0 means 1000).
	Iterations int
	// Fraction is the share of test presences drawn, with replacement, in
	// each resample, in (0,1] (0 means 0.5).
	Fraction float64
	// Seed seeds the published bootstrap and the area-random draws of one
	// Score. The caller derives one per extent from the run seed (not per
	// model: identical predictions get identical draws).
	Seed uint64
	// FixedThresholds are user thresholds scored beside the training
	// presence thresholds. Each must also be passed to NewLayout so that the
	// area at or above it is exact.
	FixedThresholds []float64
	// ThresholdTrain, when not nil, are the training presence values the
	// minimum and 10th-percentile training presence thresholds are taken
	// from, instead of the train values passed to Score. A caller scoring
	// one model on many extents passes all of the model's training values
	// here, so that the thresholds are properties of the model, the same on
	// every extent, while AUCTrain still uses the training presences inside
	// the extent. Each value must be a layout value.
	ThresholdTrain []float64
	// BoyceWidth is the Boyce moving-window width as a fraction of the
	// extent's value range, in (0,1] (0 means 0.1).
	BoyceWidth float64
	// BoyceSteps is the number of window positions, >= 1 (0 means 100).
	BoyceSteps int
	// ModelMin and ModelMinArea are the model's smallest value over its
	// whole raster and the area (units) of the cells at it; ModelMinArea 0
	// when not known. PartialROC.PRandom reads them (newAreaModel) when
	// ModelLowest is empty.
	ModelMin     float64
	ModelMinArea int64
	// ModelLowest are the model's smallest distinct values over its whole
	// raster with the exact area of each (the pass's Stats.Lowest), and
	// ModelRuns the values held by long runs of equal cells with the area
	// of those runs (Stats.Runs); ModelArea is the area of the raster's
	// cells in any extent (0 when not known). PartialROC.PRandom reads them
	// (newAreaModel): they are where a large area may sit at one value.
	ModelLowest MassList
	ModelRuns   MassList
	ModelArea   int64
}

// WithDefaults returns s with every zero-valued field set to its default.
func (s Settings) WithDefaults() Settings {
	if len(s.E) == 0 {
		s.E = []float64{DefaultE}
	} else {
		s.E = slices.Clone(s.E)
	}
	if s.Iterations == 0 {
		s.Iterations = DefaultIterations
	}
	if s.Fraction == 0 {
		s.Fraction = DefaultFraction
	}
	if s.BoyceWidth == 0 {
		s.BoyceWidth = DefaultBoyceWidth
	}
	if s.BoyceSteps == 0 {
		s.BoyceSteps = DefaultBoyceSteps
	}
	s.FixedThresholds = slices.Clone(s.FixedThresholds)
	return s
}

// Validate reports the first setting that is out of range, naming the field.
// Zero values are valid (they select the defaults).
func (s Settings) Validate() error {
	s = s.WithDefaults()
	for i, e := range s.E {
		if !(e > 0 && e < 1) {
			return fmt.Errorf("metrics: settings: E[%d] = %v, each allowable omission must be in (0,1)", i, e)
		}
	}
	if s.Iterations < 1 || s.Iterations > MaxIterations {
		return fmt.Errorf("metrics: settings: Iterations = %d, want 1..%d (0 selects %d)", s.Iterations, MaxIterations, DefaultIterations)
	}
	if !(s.Fraction > 0 && s.Fraction <= 1) {
		return fmt.Errorf("metrics: settings: Fraction = %v, the resample fraction must be in (0,1] (0 selects %v)", s.Fraction, DefaultFraction)
	}
	for i, t := range s.FixedThresholds {
		if math.IsNaN(t) || math.IsInf(t, 0) {
			return fmt.Errorf("metrics: settings: FixedThresholds[%d] = %v, thresholds must be finite", i, t)
		}
	}
	if !(s.BoyceWidth > 0 && s.BoyceWidth <= 1) {
		return fmt.Errorf("metrics: settings: BoyceWidth = %v, the window width must be in (0,1] of the value range (0 selects %v)", s.BoyceWidth, DefaultBoyceWidth)
	}
	if s.BoyceSteps < 1 || s.BoyceSteps > MaxBoyceSteps {
		return fmt.Errorf("metrics: settings: BoyceSteps = %d, want 1..%d (0 selects %d)", s.BoyceSteps, MaxBoyceSteps, DefaultBoyceSteps)
	}
	return nil
}
