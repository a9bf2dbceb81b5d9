package metrics

import (
	"fmt"
	"math"
	"slices"
	"sort"
)

// maxLookup caps the number of lookup buckets (and so the table's memory).
const maxLookup = 1 << 22

// maxHistBins caps the fine histogram so that a bad argument cannot ask
// for an unbounded allocation.
const maxHistBins = 1 << 22

// minHistBins is the smallest fine histogram accepted by NewLayout.
const minHistBins = 16

// Layout fixes the bins shared by all accumulators of one model. It is built
// once per model from every value at which an exact area is needed: the
// model's values at all presences (training and test) and the fixed
// thresholds. A Layout is immutable, so one Layout may be used by many
// goroutines at once.
//
// For m sorted distinct values d_0 < d_1 < ... < d_{m-1} there are 2m+1
// exact bins:
//
//	bin 0      v < d_0
//	bin 2j+1   v == d_j                 (j = 0..m-1)
//	bin 2j     d_{j-1} < v < d_j        (j = 1..m-1)
//	bin 2m     v > d_{m-1}
//
// Summing exact bins gives the area strictly below, at, and at or above any
// d_j without error, which is all that AUC, partial ROC and threshold
// statistics need. Beside the exact bins the layout defines a fine histogram
// of histBins equal bins over [histMin, histMax) that the Boyce index reads.
type Layout struct {
	d    []float64 // sorted distinct values
	ds   []float64 // d followed by three +Inf sentinels
	d0   float64   // d[0] (+Inf when empty)
	dMax float64   // d[m-1] (-Inf when empty)
	top  int       // 2m, the last exact bin

	// Lookup table: bucket(v) = min(int((v-d0)*scale), nb-1) for v in
	// [d0, dMax]; idx[k] is the first j with bucket(d[j]) >= k, so the
	// candidates for v in bucket k are d[idx[k]:idx[k+1]].
	scale float64
	nb    int
	nbf   float64 // float64(nb)
	idx   []int32

	hMin, hMax, hScale float64
	hBins              int
}

// NewLayout builds the layout of one model. values are every presence value
// (training and test) and every fixed threshold of the model, in any order,
// duplicates allowed; each must be finite. histMin < histMax (both finite)
// is the range of the fine histogram: values outside it are clamped into the
// end bins (exact minimum and maximum are tracked separately by each
// Accumulator). histBins must be at least 16.
func NewLayout(values []float64, histMin, histMax float64, histBins int) (*Layout, error) {
	for i, v := range values {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			return nil, fmt.Errorf("metrics: layout value %d is %v; every value must be finite", i, v)
		}
	}
	if math.IsNaN(histMin) || math.IsInf(histMin, 0) || math.IsNaN(histMax) || math.IsInf(histMax, 0) {
		return nil, fmt.Errorf("metrics: histogram range [%v, %v] must be finite", histMin, histMax)
	}
	if !(histMin < histMax) {
		return nil, fmt.Errorf("metrics: histogram range needs histMin < histMax, got [%v, %v]", histMin, histMax)
	}
	if histBins < minHistBins || histBins > maxHistBins {
		return nil, fmt.Errorf("metrics: histBins is %d, want %d..%d", histBins, minHistBins, maxHistBins)
	}
	hScale := float64(histBins) / (histMax - histMin)
	if math.IsInf(hScale, 0) || math.IsNaN(hScale) || hScale <= 0 {
		return nil, fmt.Errorf("metrics: histogram range [%v, %v] is too narrow or too wide for %d bins", histMin, histMax, histBins)
	}

	d := slices.Clone(values)
	slices.Sort(d)
	d = slices.Compact(d) // -0 and +0 compare equal and collapse too
	m := len(d)
	ds := append(d[:m:m], math.Inf(1), math.Inf(1), math.Inf(1))
	l := &Layout{d: ds[:m], ds: ds, hMin: histMin, hMax: histMax, hScale: hScale, hBins: histBins, nb: 1,
		top: 2 * m, d0: math.Inf(1), dMax: math.Inf(-1)}
	if m > 0 {
		l.d0, l.dMax = d[0], d[m-1]
	}
	if m >= 2 {
		nb := 1
		for nb < 4*m && nb < maxLookup {
			nb <<= 1
		}
		l.nb = nb
		l.scale = float64(nb) / (l.dMax - l.d0)
		if math.IsInf(l.scale, 0) || math.IsNaN(l.scale) {
			// Degenerate spans (overflowing or subnormal): one bucket,
			// binary search inside it.
			l.nb, l.scale = 1, 0
		}
	}
	l.nbf = float64(l.nb)
	l.idx = make([]int32, l.nb+1)
	j := 0
	for k := 0; k <= l.nb; k++ {
		for j < m && l.bucket(d[j]) < k {
			j++
		}
		l.idx[k] = int32(j)
	}
	return l, nil
}

// bucket maps v in [d0, dMax] to its lookup bucket. It is monotone
// non-decreasing in v, which is what makes the lookup exact.
func (l *Layout) bucket(v float64) int {
	x := (v - l.d0) * l.scale
	if !(x < l.nbf) { // also catches NaN from Inf*0 on overflowing spans
		return l.nb - 1
	}
	return int(x)
}

// Locate returns the exact bin of v (see Layout) and its fine-histogram bin.
// It costs O(1) on average: a lookup table over [d_0, d_{m-1}] narrows the
// search to the (usually at most two) layout values in v's bucket, which are
// compared without branches; a crowded bucket falls back to bisection.
// NaN is mapped to (0, 0); callers that may see NaN should use
// Accumulator.Add, which skips it.
func (l *Layout) Locate(v float64) (bin, hist int) {
	if v >= l.hMin { // false for NaN
		if v < l.hMax {
			hist = int((v - l.hMin) * l.hScale)
			if hist >= l.hBins {
				hist = l.hBins - 1
			}
		} else {
			hist = l.hBins - 1
		}
	}
	if !(v >= l.d0) { // below d_0, NaN, or no layout values (d0 = +Inf)
		return 0, hist
	}
	if v > l.dMax {
		return l.top, hist
	}
	k := l.nb - 1
	if x := (v - l.d0) * l.scale; x < l.nbf {
		k = int(x)
	}
	j, end := int(l.idx[k]), int(l.idx[k+1])
	if end-j > 2 {
		return l.locateCrowded(v, j, end), hist
	}
	// At most two candidates d[j], d[j+1], and every d from end on is > v
	// (or a +Inf sentinel), so the first d >= v is d[j + (a<v) + (b<v)]
	// and, the values being sorted, it equals v iff one of a, b, c does.
	// The three loads are independent, which keeps the dependency chain
	// short.
	w := l.ds[j : j+3 : j+3]
	a, b, c := w[0], w[1], w[2]
	j += b2i(a < v) + b2i(b < v)
	return 2*j + (b2i(a == v) | b2i(b == v) | b2i(c == v)), hist
}

// locateCrowded finds the exact bin of v among the candidates d[j:end] of
// a bucket holding more than two layout values.
func (l *Layout) locateCrowded(v float64, j, end int) int {
	j += sort.SearchFloat64s(l.d[j:end], v)
	if j < end && l.d[j] == v {
		return 2*j + 1
	}
	return 2 * j
}

// Values returns a copy of the sorted distinct layout values d_0..d_{m-1}.
func (l *Layout) Values() []float64 { return slices.Clone(l.d) }

// Bins returns the number of exact bins, 2m+1.
func (l *Layout) Bins() int { return 2*len(l.d) + 1 }

// HistBins returns the number of fine-histogram bins.
func (l *Layout) HistBins() int { return l.hBins }

// HistRange returns the fine histogram's range [histMin, histMax).
func (l *Layout) HistRange() (histMin, histMax float64) { return l.hMin, l.hMax }

// histWidth is the width of one fine-histogram bin.
func (l *Layout) histWidth() float64 { return (l.hMax - l.hMin) / float64(l.hBins) }

// histEdge returns the lower edge of fine-histogram bin k (k = hBins gives
// the upper end of the range).
func (l *Layout) histEdge(k int) float64 {
	if k >= l.hBins {
		return l.hMax
	}
	return l.hMin + float64(k)*l.histWidth()
}

// index returns j such that v == d_j, or -1 when v is not a layout value.
func (l *Layout) index(v float64) int {
	j, ok := slices.BinarySearch(l.d, v)
	if !ok {
		return -1
	}
	return j
}

// b2i converts a comparison to 0 or 1 without a branch.
func b2i(b bool) int {
	var i int
	if b {
		i = 1
	}
	return i
}
