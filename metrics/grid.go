package metrics

import (
	"math"
	"math/bits"
	"sync"
)

// The fine histogram of an Accumulator lies on a dyadic grid: for a grid
// exponent e, cell value v falls in grid bin
//
//	g_e(v) = floor(v * 2^-e),   the interval [g*2^e, (g+1)*2^e),
//
// computed exactly (v * 2^-e only moves the binary point; when it
// underflows to -0 for a tiny negative v, the bin is -1, as the exact
// floor). The bins of exponent e+d are unions of 2^d bins of exponent e
// (g_{e+d}(v) = g_e(v) >> d), so a histogram can be coarsened exactly.
//
// An accumulator's histogram of H bins uses the canonical exponent of its
// value range [lo, hi]:
//
//	e(lo, hi) = the smallest e >= floor(lo, hi) with g_e(hi) - g_e(lo) < H
//	floor(lo, hi) = max(minGridExp, exponent of max(|lo|, |hi|) - gridBits)
//
// The floor keeps |v * 2^-e| below 2^gridBits (bin numbers are exact
// integers in float64 and int64) and 2^-e finite; bins that fine already
// hold one float64 value each. e(lo, hi) grows with the range (a sub-range
// never has a larger exponent), so the histogram of a set of cells is a
// function of the set alone: adding cells in any order, coarsening when the
// range outgrows the grid, and merging partial accumulators (at the larger
// of the canonical exponents) all end on the same exponent with the same
// exact sums. The range [lo, hi] spans at least (H-1)/2 bins of its
// exponent unless the floor applies.
const (
	gridBits   = 51
	minGridExp = -1022
)

// gridInv returns 2^-e (exact for minGridExp <= e <= 1074).
func gridInv(e int) float64 { return math.Ldexp(1, -e) }

// gridX returns g_e(v) as a float64 integer, given inv = 2^-e.
func gridX(v, inv float64) float64 {
	x := math.Floor(v * inv)
	// v*inv underflowed to -0 only for a tiny negative v: its floor is -1.
	if math.Float64bits(x) == 1<<63 {
		x = -1
	}
	return x
}

// gridBin returns g_e(v).
func gridBin(v float64, e int) int64 { return int64(gridX(v, gridInv(e))) }

// gridEdge returns the lower edge of grid bin g of exponent e, g*2^e
// (exact; +-Inf beyond the float64 range).
func gridEdge(g int64, e int) float64 { return math.Ldexp(float64(g), e) }

// gridFloor returns the smallest exponent allowed for the range [lo, hi].
func gridFloor(lo, hi float64) int {
	m := math.Max(math.Abs(lo), math.Abs(hi))
	if m == 0 {
		return minGridExp
	}
	_, ex := math.Frexp(m) // m < 2^ex
	return max(minGridExp, ex-gridBits)
}

// gridExp returns the canonical exponent e(lo, hi) for h bins (lo <= hi,
// both finite).
func gridExp(lo, hi float64, h int) int {
	e := gridFloor(lo, hi)
	// Every e with 2^(r-1) > h*2^e, where hi-lo >= 2^(r-1), spans h bins
	// or more: start just below the first exponent that can fit.
	if span := hi - lo; span > 0 && !math.IsInf(span, 0) {
		_, r := math.Frexp(span)
		e = max(e, r-2-bits.Len(uint(h)))
	}
	for gridBin(hi, e)-gridBin(lo, e) >= int64(h) {
		e++
	}
	return e
}

// scratchPool holds the buffers regrid copies bins through.
var scratchPool = sync.Pool{New: func() any { return new([]sum) }}

// setGrid puts an empty histogram on exponent e with its window centred on
// the bins of [lo, hi].
func (a *Accumulator) setGrid(e int, lo, hi float64) {
	h := int64(len(a.hist))
	glo, ghi := gridBin(lo, e), gridBin(hi, e)
	a.he = e
	a.hbase = glo - (h-1-(ghi-glo))/2
	a.hinv = gridInv(e)
	a.hlo, a.hhi = float64(a.hbase), float64(a.hbase+h)
}

// clearGrid marks the histogram as having no grid yet (no cell): every
// value then fails the window test of the hot path.
func (a *Accumulator) clearGrid() {
	a.he, a.hbase, a.hinv = 0, 0, 1
	a.hlo, a.hhi = math.Inf(1), math.Inf(-1)
}

// occupied returns the window positions of the first and last bin that can
// hold a cell, from the accumulator's (possibly bounding) range.
func (a *Accumulator) occupied() (i0, i1 int) {
	return int(gridBin(a.min, a.he) - a.hbase), int(gridBin(a.max, a.he) - a.hbase)
}

// regrid moves the histogram to exponent e >= a.he with a window that
// holds [lo, hi] (which contains the current range), coarsening and
// shifting the sums exactly. An accumulator without cells gets a fresh
// grid.
func (a *Accumulator) regrid(e int, lo, hi float64) {
	if a.cells == 0 {
		a.setGrid(e, lo, hi)
		return
	}
	h := int64(len(a.hist))
	if e == a.he && gridBin(lo, e) >= a.hbase && gridBin(hi, e) < a.hbase+h {
		return
	}
	i0, i1 := a.occupied()
	sp := scratchPool.Get().(*[]sum)
	old := append((*sp)[:0], a.hist[i0:i1+1]...)
	clear(a.hist[i0 : i1+1])
	from, d := a.hbase+int64(i0), uint(e-a.he)
	a.setGrid(e, lo, hi)
	for i, s := range old {
		if s.n != 0 {
			t := &a.hist[((from+int64(i))>>d)-a.hbase]
			t.area += s.area
			t.n += s.n
		}
	}
	*sp = old
	scratchPool.Put(sp)
}

// widen makes room in the histogram for the values [lo, hi] (lo <= hi,
// neither -0), some of which lie outside its window: the grid of the
// range the cells added so far and [lo, hi] span together.
func (a *Accumulator) widen(lo, hi float64) {
	if a.cells > 0 {
		lo, hi = math.Min(a.min, lo), math.Max(a.max, hi)
	}
	e := a.layout.histExp(lo, hi)
	if a.cells > 0 {
		e = max(e, a.he)
	}
	a.regrid(e, lo, hi)
}

// addHist adds the histogram of b (same number of bins, b.he <= a.he,
// b's range inside a's window) into a, with sign +1 or -1.
func (a *Accumulator) addHist(b *Accumulator, sign int64) {
	if b.cells == 0 {
		return
	}
	i0, i1 := b.occupied()
	from, d := b.hbase+int64(i0), uint(a.he-b.he)
	for i, s := range b.hist[i0 : i1+1] {
		if s.n != 0 {
			t := &a.hist[((from+int64(i))>>d)-a.hbase]
			t.area += sign * s.area
			t.n += sign * s.n
		}
	}
}

// histEdges returns the interval of window bin i, [lo, hi).
func (a *Accumulator) histEdges(i int) (lo, hi float64) {
	g := a.hbase + int64(i)
	return gridEdge(g, a.he), gridEdge(g+1, a.he)
}
