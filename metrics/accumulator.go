package metrics

import (
	"errors"
	"fmt"
	"math"
)

// sum is the content of one bin: total integer area weight and cell count.
// Area and count sit side by side so that one update touches one cache line.
type sum struct {
	area int64
	n    int64
}

// Accumulator gathers the background of one model on one extent: per exact
// bin and per fine-histogram bin the int64 area sum and int64 cell count,
// the exact minimum and maximum value, the number of cells, the total area
// and the number of skipped (non-finite or negative-weight) cells.
//
// The fine histogram has Layout.HistBins bins of width 2^e on the dyadic
// grid of the accumulator's own value range (see gridExp): at least
// (HistBins-1)/2 bins span [Min, Max]. The grid is coarsened exactly when
// a cell outside it arrives, so it depends only on the cells added, not on
// their order or on how partial accumulators were merged, and no value
// range is needed before the cells are seen.
//
// All sums are integers, so Merge is exact and the result does not depend on
// the order in which cells or partial accumulators are combined. The caller
// chooses the area unit (for example square metres rounded per cell) and
// must keep the total area of one accumulator below 2^63.
//
// An Accumulator is not safe for concurrent use; give each goroutine its own
// and Merge them.
type Accumulator struct {
	layout   *Layout
	bins     []sum
	hist     []sum
	min, max float64 // +Inf / -Inf while empty
	// The histogram's grid: hist[i] holds grid bin hbase+i of exponent he;
	// hinv = 2^-he; hlo, hhi = hbase, hbase+len(hist) as float64, so that
	// v is inside the window iff hlo <= gridX(v, hinv) < hhi (+Inf, -Inf
	// while there is no grid).
	he       int
	hbase    int64
	hinv     float64
	hlo, hhi float64
	cells    int64
	area     int64
	skipped  int64
	// bounded is true when min and max are only bounds (see Sub).
	bounded bool
	// values are the model's distinct values when it has few of them
	// (SetModelValues; nil when unknown), read by the Boyce index only.
	values []float64
}

// SetModelValues gives the accumulator the distinct values of its model's
// cells (ValueSet.Values: ascending, finite, every value a cell of this
// accumulator can hold among them). The Boyce index then counts the area
// of a histogram bin that holds a single such value, besides the layout's
// values, at that value instead of spreading it over the bin. A ring made
// by Sub, and a Clone, keep them. vals is not copied: do not change it.
func (a *Accumulator) SetModelValues(vals []float64) { a.values = vals }

// NewAccumulator returns an empty accumulator on layout l.
func (l *Layout) NewAccumulator() *Accumulator {
	a := &Accumulator{
		layout: l,
		bins:   make([]sum, l.Bins()),
		hist:   make([]sum, l.hBins),
		min:    math.Inf(1),
		max:    math.Inf(-1),
	}
	a.clearGrid()
	return a
}

// Layout returns the layout the accumulator was made on.
func (a *Accumulator) Layout() *Layout { return a.layout }

// Add adds one background cell of value v and area weight w >= 0. A cell
// with a non-finite value or a negative weight is not added; it is counted
// by Skipped.
func (a *Accumulator) Add(v float64, w int64) {
	if math.IsNaN(v) || math.IsInf(v, 0) || w < 0 {
		a.skipped++
		return
	}
	a.AddLocated(a.layout.Locate(v), v, w)
}

// AddLocated adds one cell whose exact bin was found by Locate on the same
// layout. It does no checks: v must be finite and w >= 0. It is the hot path
// of the raster pass: Locate once per cell, then AddLocated (or AddRow) into
// every extent that holds the cell.
func (a *Accumulator) AddLocated(bin int, v float64, w int64) {
	if v == 0 {
		v = 0 // -0 and +0 are one value: Min and Max report +0 whatever the order
	}
	b := &a.bins[bin]
	b.area += w
	b.n++
	x := gridX(v, a.hinv)
	if !(x >= a.hlo && x < a.hhi) {
		a.widen(v, v)
		x = gridX(v, a.hinv)
	}
	h := &a.hist[int(x-a.hlo)]
	h.area += w
	h.n++
	if v < a.min {
		a.min = v
	}
	if v > a.max {
		a.max = v
	}
	a.cells++
	a.area += w
}

// AddRow adds the cells i of one row with bins[i] >= 0: exact bin bins[i]
// (from Locate or LocateRow), value vals[i] (finite) and area weight
// weights[i] (>= 0), as AddLocated does for each. vals and weights must be
// at least as long as bins.
//
// It finds the run's range first and widens the histogram's grid once for
// it (if needed), so that the loop over the cells has no test but the
// bin's sign; the grid, like every sum, ends the same as when the cells are
// added one at a time (see gridExp).
func (a *Accumulator) AddRow(bins []int32, vals []float64, weights []int64) {
	vals, weights = vals[:len(bins)], weights[:len(bins)]
	lo, hi, ok := rowRange(bins, vals)
	if ok {
		a.addRow(bins, vals, weights, lo, hi)
	}
}

// AddRowTo adds one row's cells to each accumulator of dst as AddRow
// does, finding the run's range once for all of them. The accumulators
// must be distinct.
func AddRowTo(dst []*Accumulator, bins []int32, vals []float64, weights []int64) {
	vals, weights = vals[:len(bins)], weights[:len(bins)]
	lo, hi, ok := rowRange(bins, vals)
	if !ok {
		return
	}
	for _, a := range dst {
		a.addRow(bins, vals, weights, lo, hi)
	}
}

// rowRange returns the smallest and largest value of the cells i with
// bins[i] >= 0 (+0 for a zero of either sign), and false when there is
// none.
func rowRange(bins []int32, vals []float64) (lo, hi float64, ok bool) {
	vals = vals[:len(bins)]
	lo, hi = math.Inf(1), math.Inf(-1)
	for i, bin := range bins {
		if bin >= 0 {
			v := vals[i]
			if v < lo {
				lo = v
			}
			if v > hi {
				hi = v
			}
		}
	}
	if lo > hi {
		return 0, 0, false // no cell
	}
	if lo == 0 {
		lo = 0 // -0 and +0 are one value: Min and Max report +0
	}
	if hi == 0 {
		hi = 0
	}
	return lo, hi, true
}

// addRow is AddRow given the run's range [lo, hi] (rowRange).
func (a *Accumulator) addRow(bins []int32, vals []float64, weights []int64, lo, hi float64) {
	vals, weights = vals[:len(bins)], weights[:len(bins)]
	// gridX is monotone in v, so the window holds [lo, hi] iff it holds
	// both ends.
	if !(gridX(lo, a.hinv) >= a.hlo && gridX(hi, a.hinv) < a.hhi) {
		a.widen(lo, hi)
	}
	ab, hist, inv, base := a.bins, a.hist, a.hinv, a.hbase
	var cells, area int64
	if lo >= 0 {
		// v * 2^-e >= 0 (or -0): truncation is the floor.
		for i, bin := range bins {
			if bin < 0 {
				continue
			}
			w := weights[i]
			b := &ab[bin]
			b.area += w
			b.n++
			h := &hist[int64(vals[i]*inv)-base]
			h.area += w
			h.n++
			cells++
			area += w
		}
	} else {
		for i, bin := range bins {
			if bin < 0 {
				continue
			}
			v, w := vals[i], weights[i]
			b := &ab[bin]
			b.area += w
			b.n++
			x := math.Floor(v * inv)
			if x == 0 && v < 0 {
				x = -1 // v * 2^-e underflowed to -0 (see gridX)
			}
			h := &hist[int64(x)-base]
			h.area += w
			h.n++
			cells++
			area += w
		}
	}
	if lo < a.min {
		a.min = lo
	}
	if hi > a.max {
		a.max = hi
	}
	a.cells += cells
	a.area += area
}

// Reset empties the accumulator, keeping its layout and memory.
func (a *Accumulator) Reset() {
	clear(a.bins)
	clear(a.hist)
	a.clearGrid()
	a.min, a.max = math.Inf(1), math.Inf(-1)
	a.cells, a.area, a.skipped = 0, 0, 0
	a.bounded = false
}

// Clone returns an independent copy of a.
func (a *Accumulator) Clone() *Accumulator {
	c := *a
	c.bins = append([]sum(nil), a.bins...)
	c.hist = append([]sum(nil), a.hist...)
	return &c
}

// Merge adds b into a. Both must be made on the same *Layout. The result is
// exact and independent of merge order.
func (a *Accumulator) Merge(b *Accumulator) error {
	if b == nil {
		return errors.New("metrics: Merge: nil accumulator")
	}
	if a.layout != b.layout {
		return errors.New("metrics: Merge: accumulators were made on different layouts")
	}
	a.merge(b, 0, len(b.bins))
	return nil
}

// merge adds b into a (same layout), given that only b's exact bins
// [i0, i1) may be non-empty.
func (a *Accumulator) merge(b *Accumulator, i0, i1 int) {
	ab, bb := a.bins[i0:i1], b.bins[i0:i1]
	for i := range bb {
		ab[i].area += bb[i].area
		ab[i].n += bb[i].n
	}
	if b.cells > 0 {
		if a.cells == 0 {
			a.he, a.hbase, a.hinv, a.hlo, a.hhi = b.he, b.hbase, b.hinv, b.hlo, b.hhi
			copy(a.hist, b.hist)
		} else {
			lo, hi := math.Min(a.min, b.min), math.Max(a.max, b.max)
			a.regrid(max(a.he, b.he, a.layout.histExp(lo, hi)), lo, hi)
			a.addHist(b, 1)
		}
	}
	if b.cells > 0 {
		a.bounded = a.bounded || b.bounded
	}
	a.min = math.Min(a.min, b.min)
	a.max = math.Max(a.max, b.max)
	a.cells += b.cells
	a.area += b.area
	a.skipped += b.skipped
}

// Sub returns a minus b, where b holds a subset of a's cells (b's extent is
// nested inside a's): the "ring" between two nested extents. It fails when
// the layouts differ or when any bin of b exceeds a's.
//
// Bins, histogram, cells, area and skipped count of the ring are exact. The
// ring's minimum and maximum cannot be recovered exactly in general; Sub
// sets them to the tightest bounds the bins allow (Min <= true minimum,
// Max >= true maximum), exact when the ring's lowest (highest) non-empty
// exact bin is an equality bin. RangeExact reports whether both are exact.
func (a *Accumulator) Sub(b *Accumulator) (*Accumulator, error) {
	if b == nil {
		return nil, errors.New("metrics: Sub: nil accumulator")
	}
	if a.layout != b.layout {
		return nil, errors.New("metrics: Sub: accumulators were made on different layouts")
	}
	r := a.Clone()
	for i := range a.bins {
		r.bins[i] = sum{a.bins[i].area - b.bins[i].area, a.bins[i].n - b.bins[i].n}
		if r.bins[i].area < 0 || r.bins[i].n < 0 {
			return nil, fmt.Errorf("metrics: Sub: exact bin %d of the inner accumulator exceeds the outer one (inner is not nested in outer)", i)
		}
	}
	if b.cells > 0 {
		if a.cells == 0 || b.min < a.min || b.max > a.max {
			return nil, errors.New("metrics: Sub: the inner accumulator's values reach outside the outer one's range (inner is not nested in outer)")
		}
		// The ring keeps the outer grid, coarsened if the inner one is
		// coarser (possible only when a is itself a ring).
		r.regrid(max(a.he, b.he), a.min, a.max)
		r.addHist(b, -1)
		for i := range r.hist {
			if r.hist[i].area < 0 || r.hist[i].n < 0 {
				return nil, fmt.Errorf("metrics: Sub: histogram bin %d of the inner accumulator exceeds the outer one (inner is not nested in outer)", i)
			}
		}
	}
	r.cells = a.cells - b.cells
	r.area = a.area - b.area
	r.skipped = a.skipped - b.skipped
	if r.cells < 0 || r.area < 0 || r.skipped < 0 {
		return nil, errors.New("metrics: Sub: inner accumulator has more cells, area or skipped cells than the outer one (inner is not nested in outer)")
	}
	r.bounded = false
	if r.cells > 0 {
		r.ringRange(a)
	} else {
		r.min, r.max = math.Inf(1), math.Inf(-1)
		r.clearGrid()
	}
	return r, nil
}

// ringRange sets r.min and r.max for a ring cut out of outer.
func (r *Accumulator) ringRange(outer *Accumulator) {
	d := r.layout.d
	m := len(d)

	lo, loExact := outer.min, false
	if outer.min == outer.max && !outer.bounded {
		r.min, r.max = outer.min, outer.max
		return
	}
	for i := range r.bins {
		if r.bins[i].n == 0 {
			continue
		}
		if i%2 == 1 {
			lo, loExact = d[i/2], true
		} else if i > 0 {
			lo = math.Max(lo, d[i/2-1])
		}
		break
	}
	// Histogram bins are exact intervals [lower edge, upper edge).
	if !loExact {
		for k := range r.hist {
			if r.hist[k].n != 0 {
				e, _ := r.histEdges(k)
				lo = math.Max(lo, e)
				break
			}
		}
	}

	hi, hiExact := outer.max, false
	for i := len(r.bins) - 1; i >= 0; i-- {
		if r.bins[i].n == 0 {
			continue
		}
		if i%2 == 1 {
			hi, hiExact = d[i/2], true
		} else if i < 2*m {
			hi = math.Min(hi, d[i/2])
		}
		break
	}
	if !hiExact {
		for k := len(r.hist) - 1; k >= 0; k-- {
			if r.hist[k].n != 0 {
				_, e := r.histEdges(k)
				hi = math.Min(hi, math.Nextafter(e, math.Inf(-1)))
				break
			}
		}
	}
	if hi < lo { // cannot happen for consistent input; keep the pair ordered
		hi = lo
	}
	r.min, r.max = lo, hi
	r.bounded = !(loExact && hiExact)
}

// Cells returns the number of cells added.
func (a *Accumulator) Cells() int64 { return a.cells }

// Area returns the total area weight of the cells added.
func (a *Accumulator) Area() int64 { return a.area }

// Skipped returns the number of cells Add refused (non-finite value or
// negative weight).
func (a *Accumulator) Skipped() int64 { return a.skipped }

// Min returns the smallest value added, or 0 when the accumulator is empty.
// For a ring made by Sub it may be a lower bound (see RangeExact).
func (a *Accumulator) Min() float64 {
	if a.cells == 0 {
		return 0
	}
	return a.min
}

// Max returns the largest value added, or 0 when the accumulator is empty.
// For a ring made by Sub it may be an upper bound (see RangeExact).
func (a *Accumulator) Max() float64 {
	if a.cells == 0 {
		return 0
	}
	return a.max
}

// RangeExact reports whether Min and Max are the exact extremes. It is false
// only for accumulators that come from Sub (or merges with them) whose
// extremes fall strictly between layout values.
func (a *Accumulator) RangeExact() bool { return !a.bounded }

// AreaAt returns the exact area weight of the background cells whose value
// is below, equal to, and above v, which must be a layout value.
// ok is false when v is not a layout value.
func (a *Accumulator) AreaAt(v float64) (below, equal, above int64, ok bool) {
	j := a.layout.index(v)
	if j < 0 {
		return 0, 0, 0, false
	}
	for i := 0; i < 2*j+1; i++ {
		below += a.bins[i].area
	}
	equal = a.bins[2*j+1].area
	return below, equal, a.area - below - equal, true
}
