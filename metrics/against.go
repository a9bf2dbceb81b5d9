package metrics

import (
	"math"
	"math/bits"
)

// AUCAgainst returns the area-weighted AUC of the presence values vals
// against the background held by a (for example a ring, a.Sub of two
// nested extents), with ties counted half (Hanley & McNeil 1982):
//
//	sum_p [2 W(< v_p) + W(= v_p)] / (2 n W)
//
// The numerator is summed exactly in 128-bit integers from the integer
// areas of a's bins, so the result does not depend on the order of vals;
// the only rounding is the final division, and the result is kept inside
// [0, 1] against that rounding. Every value must be a layout value of a
// (ok is false otherwise), and ok is false when vals is empty or a holds
// no area.
func (a *Accumulator) AUCAgainst(vals []float64) (auc float64, ok bool) {
	if len(vals) == 0 || a.Area() <= 0 {
		return 0, false
	}
	// below[i]: the area of bins 0..i-1, summed once (AreaAt sums them
	// again for every value): the same integers, so the same result.
	below := make([]int64, len(a.bins)+1)
	for i, b := range a.bins {
		below[i+1] = below[i] + b.area
	}
	var hi, lo uint64
	for _, v := range vals {
		j := a.layout.index(v)
		if j < 0 {
			return 0, false
		}
		term := 2*uint64(below[2*j+1]) + uint64(a.bins[2*j+1].area) // <= 2 W < 2^64
		var carry uint64
		lo, carry = bits.Add64(lo, term, 0)
		hi += carry
	}
	num := float64(hi)*0x1p64 + float64(lo)
	return math.Min(1, math.Max(0, num/(2*float64(len(vals))*float64(a.Area())))), true
}
