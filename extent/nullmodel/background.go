package nullmodel

import (
	"fmt"
	"math"
	"math/bits"
	"slices"
	"sync"
)

// The distance histogram's bins follow the bits of the float64 distance:
// bin 0 is [0, 1 m), and bin j >= 1 holds the distances whose bit pattern,
// less that of 1 m, shifted right by 42 bits (the exponent and the top 10
// bits of the mantissa) is j-1. So each bin is [2^e (1 + m/1024),
// 2^e (1 + (m+1)/1024)) for some e >= 0 and 0 <= m < 1024: relative width
// between 1/2048 and 1/1024 (at most 0.098%), found without a logarithm.
const (
	binShift = 42
	oneBits  = 0x3ff0000000000000 // math.Float64bits(1)
)

// histLen covers distances up to 2^27 m = 1.3e8 m (the longest geodesic on
// WGS84 is 2.0e7 m): 27 octaves of 1024 bins, plus bin 0.
const histLen = 1 + 27<<10

// distBin returns the histogram bin of distance d >= 0 (m).
func distBin(d float64) int {
	if d < 1 {
		return 0
	}
	return min(1+int((math.Float64bits(d)-oneBits)>>binShift), histLen-1)
}

// binEdges returns the edges [lo, hi) of histogram bin j, in metres.
func binEdges(j int) (lo, hi float64) {
	if j == 0 {
		return 0, 1
	}
	return math.Float64frombits(oneBits + uint64(j-1)<<binShift), math.Float64frombits(oneBits + uint64(j)<<binShift)
}

// bgShards is the number of independently locked partial sums of a
// Background: concurrent Adds take different ones.
const bgShards = 8

// Background accumulates, for each extent, the area-weighted distribution
// of the distance from the extent's cell centres to the nearest site: the
// total area weight, the exact integer sum of weight x distance (each
// distance rounded to whole millimetres, summed in 128 bits) and a
// histogram on bins of relative width at most 1/1024 for the median.
// Weights are the caller's integer area units. Every sum is an integer, so
// the result does not depend on the order of the rows or on which partial
// sum a row went to. Extents are numbered from 0. It is safe for
// concurrent use: Add (and Tally) take the first free one of a few locked
// partial sums, and the readers merge them. A pass's row hook should
// prepare each row once (Row.Set) and add its runs to every extent
// through one Tally.
//
// A pass that adds each cell only to the smallest member of each nested
// group holding it (as the accumulators do) declares the groups with Nest;
// every read and EncodeBackground then sees each extent's whole cells.
//
// A distance-only null pass (pass.Virtual on a BoundedField) hands it the
// midpoints of the cells' brackets, each within nullmodel.BracketTol
// (0.1%) of the cell's distance, so the mean is then within 0.1% of the
// exact one and the median within 0.2%.
type Background struct {
	shards [bgShards]bgShard
	mu     sync.Mutex
	groups [][]int    // Nest's sequences: the partial sums hold ring sums
	whole  []bgExtent // whole-extent sums merged in before the first read
	merged []bgExtent // after the first read
	done   bool
}

// Nest declares that the cells added from now on are ring cells of nested
// groups: each sequence of groups lists nested extents from smallest to
// largest, and a cell of a sequence's extents is added only to the
// smallest of them that holds it. The sums read (and encoded) for extent
// seq[i] are then those of seq[0..i] added up,
//
//	S(seq[i]) = sum_{j <= i} R(seq[j]),
//
// exact: the sums are integers and the histogram's bins are the same for
// every extent. Extents in no sequence keep their own sums. Call it before
// the first Add; Merge's sums are whole-extent sums, never added up again.
func (b *Background) Nest(groups [][]int) {
	b.mu.Lock()
	defer b.mu.Unlock()
	b.groups = groups
}

type bgShard struct {
	mu      sync.Mutex
	ext     []bgExtent
	classes []*bgClass // see Tally.AddAll
}

// bgClass holds the sums of cells added to every extent of ks at once
// (Tally.AddAll), given to each of them when the partial sums are merged.
type bgClass struct {
	ks  []int
	ext bgExtent
}

// bgClassCap is the largest number of classes a partial sum keeps: each
// holds a histogram (histLen int64s, 221 KB).
const bgClassCap = 4

type bgExtent struct {
	area         int64
	sumHi, sumLo uint64 // sum of weight x round(distance in mm)
	hist         []int64
}

// Add adds cells of extent k >= 0: distance dist[i] (m; NaN cells are
// skipped) and area weight weights[i] >= 0. It must not be called after
// the first read (Area, Mean, Median, SortingBias).
func (b *Background) Add(k int, dist []float64, weights []int64) {
	var r Row
	r.Set(dist, weights)
	t := b.Tally()
	t.Add(k, &r, 0, len(dist))
	t.Done()
}

// Row is one row of cells prepared for a Background: each cell's histogram
// bin and weight, and the prefix sums of the weights and of weight x
// distance in whole millimetres (128 bits), computed once for all the
// extents the cells are added to, so that a run's sums are two
// differences. When every cell has the same weight w (rows of a
// latitude-longitude or equal-area grid) the prefix sums are those of the
// millimetres alone, a run's sum is w times their difference (the same
// integer) and no weight is kept per cell, as long as a row's millimetres add up below 2^64 (rows shorter
// than maxConstRow of distances below 2^27 m, the histogram's range;
// other rows take the 128-bit sums).
type Row struct {
	bin    []int32
	w      []int64  // each cell's weight, when they differ (constW false)
	pa     []int64  // pa[i]: sum of the weights of cells < i
	ph, pl []uint64 // sum of weight x mm of cells < i, high and low words (mod 2^128)
	pm     []uint64 // one weight w: sum of mm of cells < i
	constW bool
	w0     uint64
}

// maxConstRow is the length below which a row of one weight and
// distances below 2^27 m sums its millimetres (each below 2^37) in 64 bits.
const maxConstRow = 1 << 26

// Set prepares the cells: distance dist[i] (m; NaN: the cell is skipped)
// and area weight weights[i] >= 0.
func (r *Row) Set(dist []float64, weights []int64) { r.set(dist, false, weights, false) }

// SetValues is Set on the distances 0 - vals[i]: the null model's values
// (minus the distances), without a copy.
func (r *Row) SetValues(vals []float64, weights []int64) { r.set(vals, true, weights, false) }

// SetValuesEqual is SetValues on weights that the caller knows are all
// equal (a latitude-longitude row's): the same row, without comparing
// them.
func (r *Row) SetValuesEqual(vals []float64, weights []int64) { r.set(vals, true, weights, true) }

// set is Set on dist, or on 0 - dist[i] when neg; equal says the weights
// are all equal. Rows of one weight keep no weight per cell (the
// histogram adds w0).
func (r *Row) set(dist []float64, neg bool, weights []int64, equal bool) {
	n := len(dist)
	if cap(r.bin) < n || cap(r.pa) < n+1 {
		r.bin, r.w = make([]int32, n), make([]int64, n)
		r.pa, r.ph, r.pl, r.pm = make([]int64, n+1), make([]uint64, n+1), make([]uint64, n+1), make([]uint64, n+1)
	}
	r.bin, r.w = r.bin[:n], r.w[:n]
	r.pa, r.ph, r.pl, r.pm = r.pa[:n+1], r.ph[:n+1], r.pl[:n+1], r.pm[:n+1]
	one := n > 0 && n < maxConstRow && weights[0] >= 0
	if !equal {
		for _, w := range weights[:n] {
			one = one && w == weights[0]
		}
	}
	r.constW = one
	var area int64
	if one {
		w := weights[0]
		r.w0 = uint64(w)
		var sum uint64
		far := false
		bin, pa, pm := r.bin[:n], r.pa[:n], r.pm[:n]
		for i, d := range dist {
			if neg {
				d = 0 - d
			}
			pa[i], pm[i] = area, sum
			if d != d { // NaN
				bin[i] = -1
				continue
			}
			far = far || !(d < 1<<27)
			bin[i] = int32(distBin(d))
			sum += roundMM(d)
			area += w
		}
		r.pa[n], r.pm[n] = area, sum
		if !far {
			return
		}
		r.constW, area = false, 0
	}
	var sumHi, sumLo uint64
	for i, d := range dist {
		if neg {
			d = 0 - d
		}
		r.pa[i], r.ph[i], r.pl[i] = area, sumHi, sumLo
		if math.IsNaN(d) {
			r.bin[i], r.w[i] = -1, 0
			continue
		}
		w := weights[i]
		r.bin[i], r.w[i] = int32(distBin(d)), w
		ph, pl := bits.Mul64(roundMM(d), uint64(w))
		area += w
		var carry uint64
		sumLo, carry = bits.Add64(sumLo, pl, 0)
		sumHi, _ = bits.Add64(sumHi, ph, carry)
	}
	r.pa[n], r.ph[n], r.pl[n] = area, sumHi, sumLo
}

// addHist adds the weights of cells lo <= i < hi of r to hist, at their
// bins (NaN cells left out).
func (r *Row) addHist(hist []int64, lo, hi int) {
	bins := r.bin[lo:hi]
	if r.constW {
		w := int64(r.w0)
		for _, j := range bins {
			if j >= 0 {
				hist[j] += w
			}
		}
		return
	}
	ws := r.w[lo:hi]
	for i, j := range bins {
		if j >= 0 {
			hist[j] += ws[i]
		}
	}
}

// roundMM returns math.Round(d*1000) as an integer for a distance d >= 0
// (m) in whole millimetres, without math.Round's bit manipulation: with x
// = d*1000 below 2^52, t = trunc(x) is exact and so is x - t (both have no
// bits below x's last one), so rounding half away from zero is t + 1 when
// x - t >= 1/2; at or above 2^52, x is an integer already.
func roundMM(d float64) uint64 {
	x := d * 1000
	if !(x < 1<<52) {
		return uint64(x) // uint64(math.Round(x)): x is whole (or not finite)
	}
	t := int64(x) // one instruction, unlike uint64(x); x < 2^52
	if x-float64(t) >= 0.5 {
		t++
	}
	return uint64(t)
}

// Tally is a locked partial sum of a Background, for adding rows.
type Tally struct {
	sh *bgShard
}

// Tally returns a free partial sum, locked until Done: a worker takes one
// per row (or per block) and adds that row's cells to every extent
// holding them.
func (b *Background) Tally() Tally {
	for i := range b.shards {
		if b.shards[i].mu.TryLock() {
			return Tally{&b.shards[i]}
		}
	}
	b.shards[0].mu.Lock()
	return Tally{&b.shards[0]}
}

// Done releases the partial sum.
func (t Tally) Done() { t.sh.mu.Unlock() }

// Add adds cells lo <= i < hi of row r to extent k >= 0.
func (t Tally) Add(k int, r *Row, lo, hi int) {
	e := t.ext(k)
	t.runSums(e, r, lo, hi)
	r.addHist(e.hist, lo, hi)
}

// AddAll adds cells lo <= i < hi of row r to each extent of ks (each >= 0,
// none twice). The partial sum keeps the sums of a few such sets of
// extents as classes of their own (the first bgClassCap sets it meets):
// the cells are added once, to their class, whose sums go to each of its
// extents when the partial sums are merged (integer sums: the same
// totals). Other sets are added extent by extent in one walk of the
// cells.
func (t Tally) AddAll(ks []int, r *Row, lo, hi int) {
	switch len(ks) {
	case 0:
		return
	case 1:
		t.Add(ks[0], r, lo, hi)
		return
	}
	if c := t.class(ks); c != nil {
		t.runSums(&c.ext, r, lo, hi)
		r.addHist(c.ext.hist, lo, hi)
		return
	}
	var hists [8][]int64
	for len(ks) > 0 {
		n := min(len(ks), len(hists))
		for q, k := range ks[:n] {
			e := t.ext(k)
			t.runSums(e, r, lo, hi)
			hists[q] = e.hist
		}
		hs := hists[:n]
		bins := r.bin[lo:hi]
		switch {
		case r.constW && n <= 3:
			addHistConst(hs, bins, int64(r.w0))
		default:
			for i, j := range bins {
				if j < 0 {
					continue
				}
				w := int64(r.w0)
				if !r.constW {
					w = r.w[i+lo]
				}
				for _, h := range hs {
					h[j] += w
				}
			}
		}
		ks = ks[n:]
	}
}

// AddValues adds the cells of one run to each extent of ks (each >= 0,
// none twice; a set is matched as given, as AddAll's): the cells of
// minus value vals[i] (the null model's values, minus the distances; NaN
// cells are skipped), each of weight weights[i], or of weight w when
// weights is nil. It is AddAll on a Row set from the run alone, without
// the Row: each cell's millimetres and bin are found in the same walk
// that adds its weight to the histograms (of up to 4 extents at once, or
// of the set's class), and the run's sums are added up as they go (no
// prefix sums). The sums are the same integers as AddAll's (exact mod
// 2^128 either way: a run of one weight sums its millimetres in 64 bits,
// below 2^64 for fewer than 2^27 cells of distances below 2^27 m, and
// multiplies once, as Row does; a farther cell adds its own 128-bit
// product), so the encoding is the same byte for byte.
func (t Tally) AddValues(ks []int32, vals []float64, weights []int64, w int64) {
	if len(ks) == 0 || len(vals) == 0 {
		return
	}
	for len(vals) > maxConstRow {
		// Runs are block rows in a pass: this only bounds the 64-bit sum.
		t.AddValues(ks, vals[:maxConstRow], weightsHead(weights, maxConstRow), w)
		vals, weights = vals[maxConstRow:], weightsTail(weights, maxConstRow)
	}
	var hs [4]*[histLen]int64
	if len(ks) > 1 {
		if c := t.class32(ks); c != nil {
			hs[0] = (*[histLen]int64)(c.ext.hist)
			valueSums(&hs, 1, vals, weights, w).addTo(&c.ext)
			return
		}
	}
	var es [4]*bgExtent
	for len(ks) > 0 {
		n := min(len(ks), len(hs))
		for _, k := range ks[:n] {
			t.ext(int(k)) // may grow the partial sum's extents: pointers after
		}
		for q, k := range ks[:n] {
			es[q] = &t.sh.ext[k]
			hs[q] = (*[histLen]int64)(es[q].hist)
		}
		s := valueSums(&hs, n, vals, weights, w)
		for _, e := range es[:n] {
			s.addTo(e)
		}
		ks = ks[n:]
	}
}

func weightsHead(w []int64, n int) []int64 {
	if w == nil {
		return nil
	}
	return w[:n]
}

func weightsTail(w []int64, n int) []int64 {
	if w == nil {
		return nil
	}
	return w[n:]
}

// runTotals are a run's area and 128-bit sum of weight x millimetres.
type runTotals struct {
	area         int64
	sumHi, sumLo uint64
}

// addTo adds the run's sums to e's (wrapping as runSums does).
func (s runTotals) addTo(e *bgExtent) {
	e.area += s.area
	var carry uint64
	e.sumLo, carry = bits.Add64(e.sumLo, s.sumLo, 0)
	e.sumHi, _ = bits.Add64(e.sumHi, s.sumHi, carry)
}

// valueSums walks the cells of AddValues once: each cell of minus value
// vals[i] (NaN skipped) adds its weight at its bin of the histograms
// hs[:n] (1 <= n <= 4), and the run's sums are returned. One weight w
// (weights nil): the millimetres of the cells below 2^27 m are summed in
// 64 bits (fewer than 2^27 cells: below 2^64) and multiplied by w once,
// as Row does for a row of one weight; a cell at or beyond 2^27 m adds
// its own product in 128 bits, as Row does for a row holding one (the
// same integer mod 2^128). Each cell of 0 <= d < 2^27 m is found by
// nearCell, one loop per number of histograms; the others (NaN, far or
// negative) by otherCell.
func valueSums(hs *[4]*[histLen]int64, n int, vals []float64, weights []int64, w int64) runTotals {
	var s runTotals
	h0, h1, h2, h3 := hs[0], hs[1], hs[2], hs[3]
	if weights == nil {
		var cells int64
		var mm uint64
		switch n {
		case 1:
			for _, v := range vals {
				d := 0 - v
				if !(d >= 0 && d < 1<<27) {
					cells += s.otherCell(d, w, &mm, hs, n)
					continue
				}
				j, m := nearCell(d)
				mm += m
				cells++
				h0[j] += w
			}
		case 2:
			for _, v := range vals {
				d := 0 - v
				if !(d >= 0 && d < 1<<27) {
					cells += s.otherCell(d, w, &mm, hs, n)
					continue
				}
				j, m := nearCell(d)
				mm += m
				cells++
				h0[j] += w
				h1[j] += w
			}
		case 3:
			for _, v := range vals {
				d := 0 - v
				if !(d >= 0 && d < 1<<27) {
					cells += s.otherCell(d, w, &mm, hs, n)
					continue
				}
				j, m := nearCell(d)
				mm += m
				cells++
				h0[j] += w
				h1[j] += w
				h2[j] += w
			}
		default:
			for _, v := range vals {
				d := 0 - v
				if !(d >= 0 && d < 1<<27) {
					cells += s.otherCell(d, w, &mm, hs, n)
					continue
				}
				j, m := nearCell(d)
				mm += m
				cells++
				h0[j] += w
				h1[j] += w
				h2[j] += w
				h3[j] += w
			}
		}
		s.area = cells * w
		ph, pl := bits.Mul64(mm, uint64(w))
		var carry uint64
		s.sumLo, carry = bits.Add64(s.sumLo, pl, 0)
		s.sumHi, _ = bits.Add64(s.sumHi, ph, carry)
		return s
	}
	weights = weights[:len(vals)]
	for i, v := range vals {
		d := 0 - v
		if d != d {
			continue
		}
		wi := weights[i]
		j := distBin(d)
		ph, pl := bits.Mul64(roundMM(d), uint64(wi))
		s.area += wi
		var carry uint64
		s.sumLo, carry = bits.Add64(s.sumLo, pl, 0)
		s.sumHi, _ = bits.Add64(s.sumHi, ph, carry)
		h0[j] += wi
		if n > 1 {
			h1[j] += wi
			if n > 2 {
				h2[j] += wi
				if n > 3 {
					h3[j] += wi
				}
			}
		}
	}
	return s
}

// nearCell returns distBin(d) and roundMM(d) for 0 <= d < 2^27 (m), with
// no conversion between integers and floats: x = d*1000 is below 2^37, so
// y = x + 2^52 (rounded to nearest, ties to even: each float64 in [2^52,
// 2^53) is an integer) holds the integer r nearest to x in its mantissa,
// and x - r (exact) is 1/2 only at a tie that went down to an even r,
// where rounding half away from zero (roundMM) takes r + 1. The explicit
// float64 conversions keep the products and sums from being fused.
func nearCell(d float64) (int, uint64) {
	x := float64(d * 1000)
	y := float64(x + 0x1p52)
	mm := math.Float64bits(y) - 0x4330000000000000 // math.Float64bits(0x1p52)
	if x-(y-0x1p52) >= 0.5 {
		mm++
	}
	j := 0
	if d >= 1 {
		// distBin, whose clamp is not reached below 2^27 m.
		j = 1 + int((math.Float64bits(d)-oneBits)>>binShift)
	}
	return j, mm
}

// otherCell is valueSums' walk for a cell of one weight w whose distance
// d is not in [0, 2^27): NaN (left out, 0 returned) or, which a distance
// never is, negative (its millimetres added to mm as Row adds them) or
// at least 2^27 m (its product added to s in 128 bits, as Row does for a
// row holding such a cell); it returns the cells counted.
func (s *runTotals) otherCell(d float64, w int64, mm *uint64, hs *[4]*[histLen]int64, n int) int64 {
	if d != d {
		return 0
	}
	if d < 1<<27 {
		*mm += roundMM(d)
	} else {
		ph, pl := bits.Mul64(roundMM(d), uint64(w))
		var carry uint64
		s.sumLo, carry = bits.Add64(s.sumLo, pl, 0)
		s.sumHi, _ = bits.Add64(s.sumHi, ph, carry)
	}
	j := distBin(d)
	for _, h := range hs[:n] {
		h[j] += w
	}
	return 1
}

// addHistConst adds w at bin j of each of the 2 or 3 histograms hs (each
// histLen long) for every bin j >= 0 of bins: AddAll's walk for a row of
// one weight, one loop per count with each histogram in a register and no
// bounds check beyond j < histLen (negative bins, NaN cells, compare as
// large unsigned values and are left out).
func addHistConst(hs [][]int64, bins []int32, w int64) {
	switch len(hs) {
	case 2:
		h0, h1 := (*[histLen]int64)(hs[0]), (*[histLen]int64)(hs[1])
		for _, j := range bins {
			if uint32(j) < histLen {
				h0[j] += w
				h1[j] += w
			}
		}
	case 3:
		h0, h1, h2 := (*[histLen]int64)(hs[0]), (*[histLen]int64)(hs[1]), (*[histLen]int64)(hs[2])
		for _, j := range bins {
			if uint32(j) < histLen {
				h0[j] += w
				h1[j] += w
				h2[j] += w
			}
		}
	default:
		for _, h := range hs {
			h := (*[histLen]int64)(h)
			for _, j := range bins {
				if uint32(j) < histLen {
					h[j] += w
				}
			}
		}
	}
}

// class returns the partial sum's class of the extents ks, made if there
// is room, nil if not.
func (t Tally) class(ks []int) *bgClass {
	sh := t.sh
	for _, c := range sh.classes {
		if slices.Equal(c.ks, ks) {
			return c
		}
	}
	if len(sh.classes) == bgClassCap {
		return nil
	}
	c := &bgClass{ks: slices.Clone(ks), ext: bgExtent{hist: make([]int64, histLen)}}
	sh.classes = append(sh.classes, c)
	return c
}

// class32 is class for extents given as int32s.
func (t Tally) class32(ks []int32) *bgClass {
	sh := t.sh
	for _, c := range sh.classes {
		if len(c.ks) == len(ks) && equal32(c.ks, ks) {
			return c
		}
	}
	if len(sh.classes) == bgClassCap {
		return nil
	}
	c := &bgClass{ks: make([]int, len(ks)), ext: bgExtent{hist: make([]int64, histLen)}}
	for i, k := range ks {
		c.ks[i] = int(k)
	}
	sh.classes = append(sh.classes, c)
	return c
}

// equal32 reports whether a and b (of one length) hold the same extents
// in the same order.
func equal32(a []int, b []int32) bool {
	for i, k := range b {
		if a[i] != int(k) {
			return false
		}
	}
	return true
}

// ext returns extent k's partial sums, made on first use.
func (t Tally) ext(k int) *bgExtent {
	sh := t.sh
	if k >= len(sh.ext) {
		sh.ext = append(sh.ext, make([]bgExtent, k+1-len(sh.ext))...)
	}
	e := &sh.ext[k]
	if e.hist == nil {
		e.hist = make([]int64, histLen)
	}
	return e
}

// runSums adds the area and distance sums of cells lo <= i < hi of r to e.
func (t Tally) runSums(e *bgExtent, r *Row, lo, hi int) {
	// The run's sums from the prefix sums (128-bit differences wrap as the
	// sums do), then its cells' histogram bins.
	e.area += r.pa[hi] - r.pa[lo]
	var dh, dl uint64
	if r.constW {
		dh, dl = bits.Mul64(r.pm[hi]-r.pm[lo], r.w0)
	} else {
		var borrow uint64
		dl, borrow = bits.Sub64(r.pl[hi], r.pl[lo], 0)
		dh, _ = bits.Sub64(r.ph[hi], r.ph[lo], borrow)
	}
	var carry uint64
	e.sumLo, carry = bits.Add64(e.sumLo, dl, 0)
	e.sumHi, _ = bits.Add64(e.sumHi, dh, carry)
}

// get returns extent k's sums, merging the partial sums at the first call
// (zero when nothing was added to it).
func (b *Background) get(k int) *bgExtent {
	b.mu.Lock()
	defer b.mu.Unlock()
	b.flush()
	if k < len(b.merged) {
		return &b.merged[k]
	}
	return &bgExtent{}
}

// flush merges the partial sums into b.merged, once, adding up each nested
// sequence's ring sums (Nest); b.mu must be held.
func (b *Background) flush() {
	if b.done {
		return
	}
	b.done = true
	for i := range b.shards {
		sh := &b.shards[i]
		sh.mu.Lock()
		for _, c := range sh.classes {
			// The class's sums are dropped after: an extent with none yet
			// takes them (and the histogram) instead of a copy into fresh
			// memory; the others add them.
			took := -1
			for _, k := range c.ks {
				if k >= len(sh.ext) {
					sh.ext = append(sh.ext, make([]bgExtent, k+1-len(sh.ext))...)
				}
				if took < 0 && sh.ext[k].hist == nil {
					took = k
					continue
				}
				addExtent(&sh.ext[k], &c.ext)
			}
			if took >= 0 {
				sh.ext[took] = c.ext
			}
		}
		b.merged = takeExtents(b.merged, sh.ext)
		sh.ext, sh.classes = nil, nil
		sh.mu.Unlock()
	}
	for _, seq := range b.groups {
		for i := 1; i < len(seq); i++ {
			if seq[i-1] >= len(b.merged) || b.merged[seq[i-1]].hist == nil {
				continue
			}
			if seq[i] >= len(b.merged) {
				b.merged = append(b.merged, make([]bgExtent, seq[i]+1-len(b.merged))...)
			}
			addExtent(&b.merged[seq[i]], &b.merged[seq[i-1]])
		}
	}
	b.merged = takeExtents(b.merged, b.whole)
	b.whole = nil
}

// takeExtents is addExtents for a src that is dropped afterwards (the
// partial sums when they are merged): an extent of dst with no sums yet
// (no histogram: every sum is zero) takes src's, histogram included,
// instead of a copy into a fresh one (about 221 KB, whose first touch
// costs page faults); the others add them, with addExtent's overflow
// ignored as flush ignores it.
func takeExtents(dst, src []bgExtent) []bgExtent {
	if len(src) > len(dst) {
		dst = append(dst, make([]bgExtent, len(src)-len(dst))...)
	}
	for k := range src {
		if dst[k].hist == nil {
			dst[k], src[k] = src[k], bgExtent{}
			continue
		}
		addExtent(&dst[k], &src[k])
	}
	return dst
}

// addExtents adds src's sums to dst's, extent by extent (dst grows to
// src's length), and reports an overflow of the area or the 128-bit sum.
// Integer sums: the result does not depend on the order of the additions.
func addExtents(dst, src []bgExtent) ([]bgExtent, error) {
	if len(src) > len(dst) {
		dst = append(dst, make([]bgExtent, len(src)-len(dst))...)
	}
	var err error
	for k := range src {
		if addExtent(&dst[k], &src[k]) && err == nil {
			err = fmt.Errorf("%w: extent %d: the sums overflow", ErrBackgroundEncoding, k)
		}
	}
	return dst, err
}

// addExtent adds e's sums to m's and reports an overflow of the area or
// the 128-bit sum.
func addExtent(m, e *bgExtent) (overflow bool) {
	if e.hist == nil {
		return false
	}
	if m.hist == nil {
		m.hist = make([]int64, histLen)
	}
	area := m.area + e.area
	lo, carry := bits.Add64(m.sumLo, e.sumLo, 0)
	hi, over := bits.Add64(m.sumHi, e.sumHi, carry)
	overflow = area < m.area || over != 0
	m.area, m.sumHi, m.sumLo = area, hi, lo
	// Only the bins that hold something: a page of m's histogram that no
	// cell reached is then never written (its first touch would cost a
	// page fault).
	for h, a := range e.hist {
		if a != 0 {
			m.hist[h] += a
		}
	}
	return overflow
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
// error is below one bin width: 0.098% of the distance (1 m below 1 m).
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
	// RatioMean and RatioMedian are the ratios; both are 0 when the
	// record is undefined.
	RatioMean, RatioMedian float64
	// Defined is false when there is no test point or no background area,
	// or when half the extent's area or more lies within 1 m of a training
	// point (the histogram's first bin, [0, 1 m): the median then cannot
	// be told from 0, and a ratio over it would be a ratio over the bin's
	// interpolation); Reason then says which.
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
	if e := b.get(k); len(e.hist) > 0 && 2*e.hist[0] >= e.area {
		// Half the area or more within 1 m of a training point (cells
		// centred on the training points of a tiny extent): the median's
		// bin is [0, 1 m), and a test median over it read as a ratio of
		// thousands (or 0 over 0 when every cell lies on a point).
		return SortingBias{TestN: len(test), Reason: ReasonAtTraining}
	}
	sb.RatioMean = sb.TestMeanM / sb.BackgroundMeanM
	sb.RatioMedian = sb.TestMedianM / sb.BackgroundMedianM
	return sb
}

// ReasonAtTraining is SortingBias.Reason for an extent whose cells lie at
// the training points for half its area or more.
const ReasonAtTraining = "half the extent's area or more lies within 1 m of a training point, so the background's median distance cannot be told from 0"
