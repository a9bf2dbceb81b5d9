package metrics

import (
	"fmt"
	"math"
	"slices"
)

// maxLookup caps the number of lookup buckets (and so the table's memory).
const maxLookup = 1 << 22

// maxHistBins caps the fine histogram so that a bad argument cannot ask
// for an unbounded allocation.
const maxHistBins = 1 << 20

// maxLayoutValues caps the number of distinct layout values (bins are
// indexed with int32 in the lookup table).
const maxLayoutValues = 1 << 28

// minHistBins is the smallest fine histogram accepted by NewLayout.
const minHistBins = 16

// Layout fixes the bins shared by all accumulators of one model. It is built
// once per model from every value at which an exact area is needed: the
// model's values at all presences (training and test) and the fixed
// thresholds. A Layout is immutable, so one Layout may be used by many
// goroutines at once. It depends on these values and on the fine
// histogram's bin count only, not on the model's value range: every shard
// of a run builds the same layout without reading the raster first.
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
// statistics need. Beside the exact bins each Accumulator keeps a fine
// histogram of histBins bins on a grid fixed by its own values (see
// Accumulator), which the Boyce index reads.
type Layout struct {
	d  []float64 // sorted distinct values
	ds []float64 // d followed by two NaN sentinels (compare false, like values > v)

	// A lookup grid narrows the exact-bin search: nb equal buckets over
	// [d_0, d_{m-1}], bucket(v) = clamp(floor((v-d_0)*scale), 0, nb-1),
	// monotone in v. idx[k] is the first j with bucket(d[j]) >= k, so the
	// exact-bin candidates for v in bucket k are d[idx[k]:idx[k+1]].
	lo    float64
	scale float64
	nb    int
	nbf   float64 // float64(nb)
	idx   []int32
	// tab[k] settles bucket k at once where it can: 2*idx[k] (the bin of
	// every v in it) when it holds no layout value, -1-idx[k] when it holds
	// one or two (compare v with d[idx[k]] and d[idx[k]+1]), crowded when
	// more (bisect).
	tab []int32

	hBins int

	// hFloor is the finest histogram grid exponent any accumulator on
	// this layout may use, when floored (see WithHistFloor).
	hFloor  int
	floored bool
}

// LayoutOption sets an optional property of a Layout in NewLayout.
type LayoutOption func(*Layout) error

// WithHistFloor fixes the finest grid an accumulator's fine histogram may
// use: its exponent is never below e (minGridExp..1023), so every bin is a
// union of bins [g*2^e, (g+1)*2^e) of the floor grid and every histogram
// edge of any accumulator on the layout is a multiple of 2^e, known before
// the pass. Without it (the default, used for rasters) the grid follows
// each accumulator's own range alone. With it the canonical exponent of a
// range is max(e, the unfloored one), still growing with the range, so
// adding, merging and decoding stay order independent (see gridExp).
//
// The distance-only null uses it so that a cell's proven bounds can be
// checked against every histogram edge before the pass (see HistFloor).
func WithHistFloor(e int) LayoutOption {
	return func(l *Layout) error {
		if e < minGridExp || e > 1023 {
			return fmt.Errorf("metrics: histogram floor exponent %d, want %d..1023", e, minGridExp)
		}
		l.hFloor, l.floored = e, true
		return nil
	}
}

// FloorExp returns the exponent of the largest power of two at or below
// x (x > 0, finite, normal): 2^e <= x < 2^(e+1).
func FloorExp(x float64) int {
	_, ex := math.Frexp(x) // x = f*2^ex, 0.5 <= f < 1
	return ex - 1
}

// NewLayout builds the layout of one model. values are every presence value
// (training and test) and every fixed threshold of the model, in any order,
// duplicates allowed; each must be finite. histBins, in 16..2^20, is the
// size of each accumulator's fine histogram.
func NewLayout(values []float64, histBins int, opts ...LayoutOption) (*Layout, error) {
	for i, v := range values {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			return nil, fmt.Errorf("metrics: layout value %d is %v; every value must be finite", i, v)
		}
	}
	if histBins < minHistBins || histBins > maxHistBins {
		return nil, fmt.Errorf("metrics: histBins is %d, want %d..%d", histBins, minHistBins, maxHistBins)
	}
	d := slices.Clone(values)
	slices.Sort(d)
	d = slices.Compact(d) // -0 and +0 compare equal and collapse too
	for i := range d {
		if d[i] == 0 {
			d[i] = 0 // keep +0 whichever zero survived
		}
	}
	m := len(d)
	if m > maxLayoutValues {
		return nil, fmt.Errorf("metrics: %d distinct layout values, at most %d are supported", m, maxLayoutValues)
	}
	ds := append(d[:m:m], math.NaN(), math.NaN())
	l := &Layout{d: ds[:m], ds: ds, hBins: histBins, nb: 1}
	for _, o := range opts {
		if err := o(l); err != nil {
			return nil, err
		}
	}

	// About 16 buckets per layout value over their span (at most
	// maxLookup), so that most buckets hold no layout value (LocateRow
	// reads their bin from tab alone: with 4 per value a raster pass
	// located cells about twice as slowly, BenchmarkLocateRow) and few
	// hold more than two. A span that overflows (or one value) leaves one
	// bucket: bisection, still exact.
	if m >= 2 {
		span := d[m-1] - d[0]
		for l.nb < 16*m && l.nb < maxLookup {
			l.nb <<= 1
		}
		l.lo, l.scale = d[0], float64(l.nb)/span
		if math.IsInf(span, 0) || math.IsInf(l.scale, 0) || !(l.scale > 0) {
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
	l.tab = make([]int32, l.nb)
	for k := range l.tab {
		switch j, n := l.idx[k], l.idx[k+1]-l.idx[k]; {
		case n == 0:
			l.tab[k] = 2 * j
		case n <= 2:
			l.tab[k] = -1 - j
		default:
			l.tab[k] = crowded
		}
	}
	return l, nil
}

// crowded marks a lookup bucket of more than two layout values.
const crowded = math.MinInt32

// bucket maps v to its lookup bucket, clamped to [0, nb-1] (NaN gives 0).
// It is monotone non-decreasing in v, which is what makes the lookup exact.
func (l *Layout) bucket(v float64) int {
	x := (v - l.lo) * l.scale
	switch {
	case !(x >= 0):
		return 0
	case x < l.nbf:
		return int(x)
	}
	return l.nb - 1
}

// Locate returns the exact bin of v (see Layout). It costs O(1) on average:
// the lookup grid gives the bin at once when v's bucket holds no layout
// value, and otherwise narrows the search to the (usually one or two)
// layout values in the bucket, compared without branches; a crowded
// bucket falls back to bisection. NaN is mapped to 0; callers that may see
// NaN should use Accumulator.Add, which skips it.
func (l *Layout) Locate(v float64) int {
	k := 0
	if x := (v - l.lo) * l.scale; x >= 0 { // false for NaN
		k = l.nb - 1
		if x < l.nbf {
			k = int(x)
		}
	}
	e := l.tab[k]
	if e >= 0 {
		return int(e)
	}
	if e != crowded {
		// One or two candidates a = d[j], b = d[j+1]; every d from j+2 on
		// (or a NaN sentinel) compares as > v. Each candidate below v
		// moves the bin up by 2, one equal to v by 1 (NaN: none).
		j := int(-1 - e)
		w := l.ds[j : j+2 : j+2]
		a, b := w[0], w[1]
		return 2*j + b2i(v >= a) + b2i(v > a) + b2i(v >= b) + b2i(v > b)
	}
	// Crowded bucket: bisect for the first d >= v in d[j:end].
	lo, hi := int(l.idx[k]), int(l.idx[k+1])
	end := hi
	for lo < hi {
		mid := int(uint(lo+hi) >> 1)
		if l.d[mid] < v {
			lo = mid + 1
		} else {
			hi = mid
		}
	}
	if lo < end && l.d[lo] == v {
		return 2*lo + 1
	}
	return 2 * lo
}

// LocateRow sets bins[i] to Locate(vals[i]), or to -1 where vals[i] is
// NaN, for every i < len(vals); bins must be at least as long as vals. It
// returns the number n of values that are not NaN and, when n > 0, the
// smallest and largest of them, lo and hi (+0 for a zero of either sign).
// It is Locate over a row of cells in one loop, the first step of a raster
// pass (Accumulator.AddRow skips the cells at -1). Most cells fall in a
// lookup bucket without a layout value (there are about 16 buckets per
// value), which gives their bin at once; the others are compared with the
// bucket's one or two values, or bisected in a crowded bucket.
func (l *Layout) LocateRow(vals []float64, bins []int32) (n int, lo, hi float64) {
	bins = bins[:len(vals)]
	dlo, scale, nb, nbf := l.lo, l.scale, l.nb, l.nbf
	tab, ds := l.tab, l.ds
	lo, hi = math.Inf(1), math.Inf(-1)
	nan := 0
	for i, v := range vals {
		if v != v { // NaN
			bins[i] = -1
			nan++
			continue
		}
		if v < lo {
			lo = v
		}
		if v > hi {
			hi = v
		}
		k := 0
		if x := (v - dlo) * scale; x >= 0 {
			k = nb - 1
			if x < nbf {
				k = int(x)
			}
		}
		e := tab[k]
		if e >= 0 {
			// No layout value in the bucket: d[j-1] < v < d[j] for
			// j = idx[k], as bucket is monotone.
			bins[i] = e
			continue
		}
		if e == crowded {
			bins[i] = int32(l.Locate(v))
			continue
		}
		// One or two candidates a = d[j], b = d[j+1]; every d from j+2 on
		// (or a NaN sentinel) compares as > v. Each candidate below v
		// moves the bin up by 2, one equal to v by 1.
		j := int(-1 - e)
		w := ds[j : j+2 : j+2]
		a, b := w[0], w[1]
		bins[i] = int32(2*j + b2i(v >= a) + b2i(v > a) + b2i(v >= b) + b2i(v > b))
	}
	if lo == 0 {
		lo = 0 // -0 becomes +0
	}
	if hi == 0 {
		hi = 0
	}
	return len(vals) - nan, lo, hi
}

// Values returns a copy of the sorted distinct layout values d_0..d_{m-1}.
func (l *Layout) Values() []float64 { return slices.Clone(l.d) }

// Cell returns the values that share v's exact bin: {d_j} (closed) when
// Locate gives 2j+1 (v is d_j), the open interval (d_{j-1}, d_j) when it
// gives 2j, with no end (an infinity) at j = 0 or j = m.
func (l *Layout) Cell(v float64) (lo, hi float64, closed bool) {
	bin := l.Locate(v)
	j := bin >> 1
	if bin&1 == 1 {
		return l.d[j], l.d[j], true
	}
	lo, hi = math.Inf(-1), math.Inf(1)
	if j > 0 {
		lo = l.d[j-1]
	}
	if j < len(l.d) {
		hi = l.d[j]
	}
	return lo, hi, false
}

// Bins returns the number of exact bins, 2m+1.
func (l *Layout) Bins() int { return 2*len(l.d) + 1 }

// HistBins returns the number of bins of each accumulator's fine histogram.
func (l *Layout) HistBins() int { return l.hBins }

// HistFloor returns the layout's histogram floor exponent e and true, or
// 0 and false when it has none (see WithHistFloor).
func (l *Layout) HistFloor() (e int, ok bool) { return l.hFloor, l.floored }

// FloorBin returns the bin of v on the floor grid, floor(v * 2^-e) for
// the floor exponent e (-0 counted as +0, as Accumulator.Add does); it is
// meaningful only when HistFloor reports a floor. An accumulator on l
// whose histogram has exponent e' >= e puts v in grid bin
// FloorBin(v) >> (e'-e) (dyadic bins of a coarser level are unions of
// floor bins), so two values with the same FloorBin share the histogram
// bin of every accumulator on l, whatever its range: the bins are known
// before the pass.
func (l *Layout) FloorBin(v float64) int64 {
	if v == 0 {
		v = 0
	}
	return gridBin(v, l.hFloor)
}

// histExp returns the canonical histogram exponent of the range [lo, hi]
// on l: gridExp, raised to the floor when there is one.
func (l *Layout) histExp(lo, hi float64) int {
	e := gridExp(lo, hi, l.hBins)
	if l.floored {
		e = max(e, l.hFloor)
	}
	return e
}

// minExp returns the smallest histogram exponent an accumulator on l may
// hold for the range [lo, hi].
func (l *Layout) minExp(lo, hi float64) int {
	e := gridFloor(lo, hi)
	if l.floored {
		e = max(e, l.hFloor)
	}
	return e
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
