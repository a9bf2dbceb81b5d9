package nullmodel

import (
	"math"
	"math/bits"
	"slices"
	"sync"
)

// lnStep is the natural logarithm of the ratio between consecutive edges of
// the distance histogram: bins of relative width 1/1000.
var lnStep = math.Log1p(1e-3)

// histLen covers distances up to 1e8 m (the longest geodesic on WGS84 is
// 2.0e7 m): bin 0 is [0, 1 m), bin j >= 1 is [1.001^(j-1), 1.001^j) m.
var histLen = 2 + int(math.Log(1e8)/lnStep)

// distBin returns the histogram bin of distance d >= 0 (m).
func distBin(d float64) int {
	if d < 1 {
		return 0
	}
	return min(1+int(math.Log(d)/lnStep), histLen-1)
}

// binEdges returns the edges [lo, hi) of histogram bin j, in metres.
func binEdges(j int) (lo, hi float64) {
	if j == 0 {
		return 0, 1
	}
	return math.Exp(float64(j-1) * lnStep), math.Exp(float64(j) * lnStep)
}

// Background accumulates, for each extent, the area-weighted distribution
// of the distance from the extent's cell centres to the nearest site: the
// total area weight, the exact integer sum of weight x distance (each
// distance rounded to whole millimetres, summed in 128 bits) and a
// histogram on bins of relative width 1/1000 for the median. Weights are
// the caller's integer area units. Every sum is an integer, so the result
// does not depend on the order of the rows. Extents are numbered from 0
// and tracked as they are first added to. It is safe for concurrent use.
type Background struct {
	mu  sync.Mutex
	ext []bgExtent
}

type bgExtent struct {
	area         int64
	sumHi, sumLo uint64 // sum of weight x round(distance in mm)
	hist         []int64
}

// Add adds cells of extent k >= 0: distance dist[i] (m; NaN cells are
// skipped) and area weight weights[i] >= 0.
func (b *Background) Add(k int, dist []float64, weights []int64) {
	b.mu.Lock()
	defer b.mu.Unlock()
	if k >= len(b.ext) {
		b.ext = append(b.ext, make([]bgExtent, k+1-len(b.ext))...)
	}
	e := &b.ext[k]
	if e.hist == nil {
		e.hist = make([]int64, histLen)
	}
	for i, d := range dist {
		if math.IsNaN(d) {
			continue
		}
		w := weights[i]
		hi, lo := bits.Mul64(uint64(math.Round(d*1000)), uint64(w))
		e.area += w
		var carry uint64
		e.sumLo, carry = bits.Add64(e.sumLo, lo, 0)
		e.sumHi, _ = bits.Add64(e.sumHi, hi, carry)
		e.hist[distBin(d)] += w
	}
}

// get returns extent k's sums (zero when nothing was added to it).
func (b *Background) get(k int) *bgExtent {
	if k < len(b.ext) {
		return &b.ext[k]
	}
	return &bgExtent{}
}

// Area returns the total area weight of extent k.
func (b *Background) Area(k int) int64 { return b.get(k).area }

// Mean returns the area-weighted mean distance (m) of extent k,
//
//	sum_c w_c round(1000 d_c) / (1000 sum_c w_c),
//
// exact but for the rounding of each distance to the millimetre and the
// final division; 0 when the extent has no area.
func (b *Background) Mean(k int) float64 {
	e := b.get(k)
	if e.area <= 0 {
		return 0
	}
	sum := float64(e.sumHi)*0x1p64 + float64(e.sumLo)
	return sum / float64(e.area) / 1000
}

// Median returns the area-weighted median distance (m) of extent k: the
// distance at which the cumulative area reaches half the total, read from
// the histogram with linear interpolation inside the bin that holds it. The
// error is below one bin width: 0.1% of the distance (1 m below 1 m).
// It is 0 when the extent has no area.
func (b *Background) Median(k int) float64 {
	e := b.get(k)
	if e.area <= 0 {
		return 0
	}
	half := float64(e.area) / 2
	cum := 0.0
	for j, a := range e.hist {
		if a == 0 {
			continue
		}
		if cum+float64(a) >= half {
			lo, hi := binEdges(j)
			return lo + (half-cum)/float64(a)*(hi-lo)
		}
		cum += float64(a)
	}
	return 0 // not reached: the bins sum to the area
}

// SortingBias compares the test points' distances to the nearest training
// point with the background's (Hijmans 2012):
//
//	RatioMean   = mean_i t_i / (sum_c w_c d_c / sum_c w_c)
//	RatioMedian = median_i t_i / weighted median_c d_c
//
// where t_i is the distance from test point i to the nearest training point
// and d_c that from the centre of cell c of the extent, with weight w_c its
// area. Values well below 1 mean the test points sit nearer the training
// points than the extent's cells do, so distance alone finds them: the
// spatial sorting bias that inflates a score on that extent.
type SortingBias struct {
	// TestN is the number of test points.
	TestN int
	// TestMeanM and TestMedianM summarise t_i (m); the median of an even
	// count is the mean of the middle two.
	TestMeanM, TestMedianM float64
	// BackgroundMeanM and BackgroundMedianM summarise d_c (m), area-weighted
	// (see Background.Mean and Background.Median).
	BackgroundMeanM, BackgroundMedianM float64
	// RatioMean and RatioMedian are the ratios; each is 0 when its
	// denominator is 0.
	RatioMean, RatioMedian float64
	// Defined is false when there is no test point or no background area;
	// Reason then says which.
	Defined bool
	Reason  string
}

// SortingBias returns the sorting-bias ratios of extent k for the test
// distances test (m, any order).
func (b *Background) SortingBias(k int, test []float64) SortingBias {
	sb := SortingBias{TestN: len(test)}
	switch {
	case len(test) == 0:
		sb.Reason = "no test point inside this extent"
		return sb
	case b.get(k).area <= 0:
		sb.Reason = "extent has no area"
		return sb
	}
	sb.Defined = true
	s := slices.Clone(test)
	slices.Sort(s)
	sum := 0.0
	for _, v := range s {
		sum += v
	}
	n := len(s)
	sb.TestMeanM = sum / float64(n)
	sb.TestMedianM = s[n/2]
	if n%2 == 0 {
		sb.TestMedianM = (s[n/2-1] + s[n/2]) / 2
	}
	sb.BackgroundMeanM, sb.BackgroundMedianM = b.Mean(k), b.Median(k)
	if sb.BackgroundMeanM > 0 {
		sb.RatioMean = sb.TestMeanM / sb.BackgroundMeanM
	}
	if sb.BackgroundMedianM > 0 {
		sb.RatioMedian = sb.TestMedianM / sb.BackgroundMedianM
	}
	return sb
}
