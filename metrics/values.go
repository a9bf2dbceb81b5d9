package metrics

import (
	"encoding/binary"
	"errors"
	"fmt"
	"math"
	"slices"
	"sort"
)

// MaxSetValues is the most distinct values a ValueSet keeps; a model with
// more is "many-valued" and its set is dropped. Our choice: the Boyce
// histogram has 4096 bins, so a model with more values than that has bins
// holding several values whatever the set says.
const MaxSetValues = 4096

// ValueSet gathers the distinct values of a model's cells while they are
// few (at most MaxSetValues): a Byte raster, a model rounded to two
// decimals, a model of a few classes. The Boyce index reads it to place
// each histogram bin's area exactly at the one value the bin holds
// (Accumulator.SetModelValues), where the histogram alone spreads it
// over the bin. Values gives the set only when the cells hold on average
// at least two cells per value (our choice): a continuous model on a
// small grid, whose cells each hold a value of their own, keeps the
// histogram, as the distance-only null (which has no value set) does, so
// a raster copy of the null scores what the null scores.
//
// The set depends only on the cells added, not on their order or on how
// they were split among workers or shards (Merge is a union), so a run's
// results do not depend on either. The zero value is an empty set.
type ValueSet struct {
	vals  []float64 // ascending, distinct, finite, -0 read as +0
	many  bool      // more than MaxSetValues: vals is nil
	cells int64     // cells added; 0 once many, whatever the split
}

// ValueCache remembers values a ValueSet already holds, so that AddRow
// finds most cells' values with one load and compare (a direct-mapped
// table of 8192 slots, twice MaxSetValues; a miss costs the set's binary
// search, then takes the slot). Without it a Byte model of spatially
// mixed values cost about 31 ns a cell, with it about 1 ns (1.4 ns for
// 1,001 values, 4.3 for 4,000). It is a goroutine's scratch, not part of
// the set: the set, and so every result, is the same with or without
// hits. AddRow clears it when it is handed a set that has no cell yet.
type ValueCache struct{ slot [8192]uint64 }

// AddRow adds the values of the cells i with bins[i] >= 0 (Layout.LocateRow:
// cells with a value), c remembering the values already held. A set that
// has passed MaxSetValues values costs a single test per row.
func (s *ValueSet) AddRow(vals []float64, bins []int32, c *ValueCache) {
	if s.many {
		return
	}
	if s.cells == 0 {
		clear(c.slot[:]) // a new set: nothing in it is known
	}
	for i, v := range vals {
		if bins[i] < 0 {
			continue
		}
		s.cells++
		if v == 0 {
			v = 0 // -0 counts as +0, as the accumulators add it
		}
		k := math.Float64bits(v) + 1 // 0: an empty slot
		h := (k * 0x9E3779B97F4A7C15) >> 51
		if c.slot[h] == k {
			continue
		}
		if !s.add(v) {
			return
		}
		c.slot[h] = k
	}
}

// add inserts v and reports whether the set is still kept.
func (s *ValueSet) add(v float64) bool {
	if v == 0 {
		v = 0 // -0 counts as +0, as the accumulators add it
	}
	i, found := slices.BinarySearch(s.vals, v)
	if found {
		return true
	}
	if len(s.vals) == MaxSetValues {
		s.vals, s.many, s.cells = nil, true, 0
		return false
	}
	s.vals = slices.Insert(s.vals, i, v)
	return true
}

// Merge adds the values of o (another worker's or shard's cells).
func (s *ValueSet) Merge(o ValueSet) {
	if s.many {
		return
	}
	if o.many {
		s.vals, s.many, s.cells = nil, true, 0
		return
	}
	s.cells += o.cells
	if len(o.vals) == 0 {
		return
	}
	// A merge of two ascending lists, dropped past MaxSetValues.
	out := make([]float64, 0, min(len(s.vals)+len(o.vals), MaxSetValues))
	i, j := 0, 0
	for i < len(s.vals) || j < len(o.vals) {
		var v float64
		switch {
		case j == len(o.vals) || (i < len(s.vals) && s.vals[i] < o.vals[j]):
			v, i = s.vals[i], i+1
		case i == len(s.vals) || o.vals[j] < s.vals[i]:
			v, j = o.vals[j], j+1
		default: // equal
			v, i, j = s.vals[i], i+1, j+1
		}
		if len(out) == MaxSetValues {
			s.vals, s.many, s.cells = nil, true, 0
			return
		}
		out = append(out, v)
	}
	s.vals = out
}

// Values returns the distinct values, ascending, and true when there are
// at most MaxSetValues of them and at least two cells per value on
// average; nil and false otherwise.
func (s *ValueSet) Values() ([]float64, bool) {
	if s.many || 2*int64(len(s.vals)) > s.cells {
		return nil, false
	}
	return s.vals, true
}

// Encode writes the set: a uint64 flag (1: more than MaxSetValues), the
// number of cells added, the number of values, then each value's float64
// bits, little-endian.
func (s *ValueSet) Encode() []byte {
	flag := uint64(0)
	if s.many {
		flag = 1
	}
	b := binary.LittleEndian.AppendUint64(nil, flag)
	b = binary.LittleEndian.AppendUint64(b, uint64(s.cells))
	b = binary.LittleEndian.AppendUint64(b, uint64(len(s.vals)))
	for _, v := range s.vals {
		b = binary.LittleEndian.AppendUint64(b, math.Float64bits(v))
	}
	return b
}

// DecodeValueSet reads what Encode wrote, refusing a set that no pass
// makes (values not ascending, not finite, -0, too many, a many-valued
// set with values).
func DecodeValueSet(b []byte) (ValueSet, error) {
	if len(b) < 24 {
		return ValueSet{}, fmt.Errorf("value set of %d bytes, want at least 24", len(b))
	}
	flag, cells, n := binary.LittleEndian.Uint64(b), binary.LittleEndian.Uint64(b[8:]), binary.LittleEndian.Uint64(b[16:])
	switch {
	case flag > 1:
		return ValueSet{}, fmt.Errorf("value set flag %d, want 0 or 1", flag)
	case n > MaxSetValues || (flag == 1 && (n != 0 || cells != 0)) || cells > math.MaxInt64 || n > cells:
		return ValueSet{}, fmt.Errorf("value set of %d values on %d cells (flag %d) is impossible", n, cells, flag)
	case uint64(len(b)) != 24+8*n:
		return ValueSet{}, fmt.Errorf("value set of %d values in %d bytes, want %d", n, len(b), 24+8*n)
	}
	s := ValueSet{many: flag == 1, cells: int64(cells)}
	if n > 0 {
		s.vals = make([]float64, n)
	}
	for i := range s.vals {
		v := math.Float64frombits(binary.LittleEndian.Uint64(b[24+8*i:]))
		if math.IsNaN(v) || math.IsInf(v, 0) || (v == 0 && math.Signbit(v)) || (i > 0 && !(s.vals[i-1] < v)) {
			return ValueSet{}, errors.New("value set values are not distinct ascending finite numbers")
		}
		s.vals[i] = v
	}
	return s, nil
}

// binPoints returns, for the histogram bins i0..i0+nb-1 of a, the one
// value of the model's value set that each bin can hold besides the
// layout values (whose areas are point masses already), with ok[k] true
// when there is exactly one: all of that bin's spread area then lies at
// that value. Nil when a has no value set.
func (a *Accumulator) binPoints(i0, nb int) (point []float64, ok []bool) {
	if a.values == nil {
		return nil, nil
	}
	point, ok = make([]float64, nb), make([]bool, nb)
	count := make([]int, nb)
	lo, _ := a.histEdges(i0)
	_, hi := a.histEdges(i0 + nb - 1)
	j := sort.SearchFloat64s(a.values, lo)
	for ; j < len(a.values) && a.values[j] <= hi; j++ {
		v := a.values[j]
		k := int(gridBin(v, a.he)-a.hbase) - i0
		if k < 0 || k >= nb || a.layout.Locate(v)%2 == 1 {
			continue // outside these bins, or a layout value
		}
		count[k]++
		point[k] = v
	}
	for k, c := range count {
		ok[k] = c == 1
	}
	return point, ok
}
