package metrics

import (
	"fmt"
	"slices"
)

// Ring is the AUC decomposition of two nested extents A inside B: the
// ring R = B minus A, and the AUCs of B's test presences against A's
// cells, R's cells and B's cells. With W the area,
//
//	AUC_B = (W_A AUC_A' + W_R AUC_R) / (W_A + W_R)
//
// holds exactly, where AUC_A' = AUCInner is the AUC of B's presences
// against A's cells (AUCAgainst; each presence's placement in B is the
// area-weighted mix of its placements in A and in R).
type Ring struct {
	// InnerArea and RingArea are W_A and W_R in the accumulators' integer
	// area unit; RingCells counts R's cells.
	InnerArea, RingArea int64
	RingCells           int64
	// AUCInner, AUCRing and AUCOuter are the AUCs of the test values
	// against A, R and B. AUCRing is 0 when the ring holds no area.
	AUCInner, AUCRing, AUCOuter float64
	// Defined is false when the inner or the outer AUC is undefined (no
	// test value, or an extent without area); the other fields are then 0.
	Defined bool
}

// DecomposeRing returns the ring decomposition of inner inside outer
// (accumulators of one layout, inner's cells a subset of outer's) for the
// test values of the outer extent, each a layout value. An error means the
// accumulators do not nest or do not share a layout.
func DecomposeRing(inner, outer *Accumulator, test []float64) (Ring, error) {
	ring, err := outer.Sub(inner)
	if err != nil {
		return Ring{}, fmt.Errorf("metrics: ring: %w", err)
	}
	aIn, okIn := inner.AUCAgainst(test)
	aOut, okOut := outer.AUCAgainst(test)
	if !okIn || !okOut {
		return Ring{}, nil
	}
	aRing, ok := ring.AUCAgainst(test)
	if !ok {
		aRing = 0
	}
	return Ring{InnerArea: inner.Area(), RingArea: ring.Area(), RingCells: ring.Cells(),
		AUCInner: aIn, AUCRing: aRing, AUCOuter: aOut, Defined: true}, nil
}

// ThresholdRules returns the thresholds Score tests, with only Name and
// Value set, in Score's order: the minimum training presence and the
// 10th-percentile training presence of train (when train is not empty;
// see Threshold), then each fixed value. They depend on the training
// values and the fixed thresholds only, not on the extent.
func ThresholdRules(train, fixed []float64) []Threshold {
	var out []Threshold
	if len(train) > 0 {
		sorted := append([]float64(nil), train...)
		slices.Sort(sorted)
		out = append(out, Threshold{Name: ThresholdMTP, Value: sorted[0]}, Threshold{Name: ThresholdP10, Value: sorted[P10Index(len(sorted))]})
	}
	for _, v := range fixed {
		out = append(out, Threshold{Name: ThresholdFixed, Value: v})
	}
	return out
}

// Omitted returns the indices of the test values a threshold t omits:
// those strictly below it (the values Threshold.Omission counts).
func Omitted(t float64, test []float64) []int {
	out := []int{}
	for i, v := range test {
		if v < t {
			out = append(out, i)
		}
	}
	return out
}
