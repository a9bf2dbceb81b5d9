package extent

import (
	"fmt"
	"math/bits"
	"slices"
)

// Valid is the set of cells with data in the reference model (the first
// model's valid cells that lie in some member), row by row: each row is
// held as runs of columns, or as a bitset of the row where its runs would
// take more memory than the bitset (ragged no-data, every other cell
// missing). A row wholly valid or wholly without data takes a run or
// nothing, so memory follows the boundaries of the cells with data, not
// the number of cells, and never exceeds a whole-grid bitset by more than
// the rows' headers (validRowBytes each).
//
// A nil *Valid holds every cell. Rows are set whole (SetRow); distinct
// rows may be set from different goroutines at once.
type Valid struct {
	width int
	rows  []validRow
}

// validRow is one row: runs (canonical, as rowRuns), or bits when set.
type validRow struct {
	runs rowRuns
	bits []uint64
}

// validRowBytes is the memory of one row's header (two slice headers).
const validRowBytes = 48

// NewValid returns an empty set of the cells of a width x height grid.
func NewValid(width, height int) *Valid {
	return &Valid{width: width, rows: make([]validRow, height)}
}

// MaxValidBytes bounds the memory of a Valid of a width x height grid:
// a bitset of every row, and the rows' headers.
func MaxValidBytes(width, height int) int64 {
	return int64(height) * (int64((width+63)/64)*8 + validRowBytes)
}

// Width and Height are the grid's.
func (v *Valid) Width() int  { return v.width }
func (v *Valid) Height() int { return len(v.rows) }

// SetRow makes runs (pairs c0, c1 of half-open column runs, ascending,
// disjoint and not touching) the valid cells of row, replacing what the
// row held. It copies runs, as runs or as the row's bitset, whichever
// takes less memory.
func (v *Valid) SetRow(row int, runs []int32) {
	words := (v.width + 63) / 64
	switch {
	case len(runs) == 0:
		v.rows[row] = validRow{}
	case 4*len(runs) <= 8*words:
		v.rows[row] = validRow{runs: slices.Clone(rowRuns(runs))}
	default:
		b := make([]uint64, words)
		for i := 0; i < len(runs); i += 2 {
			setBits(b, int(runs[i]), int(runs[i+1]))
		}
		v.rows[row] = validRow{bits: b}
	}
}

// setBits sets bits [c0,c1) of b.
func setBits(b []uint64, c0, c1 int) {
	for c := c0; c < c1; {
		w, off := c>>6, uint(c&63)
		n := min(64-int(off), c1-c)
		mask := ^uint64(0)
		if n < 64 {
			mask = (1<<uint(n) - 1) << off
		}
		b[w] |= mask
		c += n
	}
}

// Has reports whether cell i (row*width + column) is valid. A nil Valid
// holds every cell.
func (v *Valid) Has(i int) bool {
	if v == nil {
		return true
	}
	r, c := &v.rows[i/v.width], i%v.width
	if r.bits != nil {
		return r.bits[c>>6]>>(uint(c)&63)&1 == 1
	}
	return r.runs.has(c)
}

// Row appends row's valid cells to dst as runs (pairs c0, c1, ascending,
// disjoint and not touching) and returns it. A nil Valid holds every cell
// but knows no width: callers ask a non-nil one.
func (v *Valid) Row(row int, dst []int32) []int32 {
	r := &v.rows[row]
	if r.bits == nil {
		return append(dst, r.runs...)
	}
	return appendBitRuns(dst, r.bits, 0, v.width)
}

// appendBitRuns appends the runs of set bits of b in [c0,c1) to dst,
// scanning a word at a time.
func appendBitRuns(dst []int32, b []uint64, c0, c1 int) []int32 {
	c := c0
	for c < c1 {
		w := b[c>>6] >> (uint(c) & 63)
		if w == 0 {
			c += 64 - c&63
			continue
		}
		if w&1 == 0 {
			c += bits.TrailingZeros64(w)
			continue
		}
		start := c
		for c < c1 {
			w = ^b[c>>6] >> (uint(c) & 63)
			if w == 0 {
				c += 64 - c&63
				continue
			}
			c += bits.TrailingZeros64(w)
			break
		}
		dst = append(dst, int32(start), int32(min(c, c1)))
	}
	return dst
}

// clip appends the cells of r (runs of row) that are valid to dst.
func (v *Valid) clip(dst, r rowRuns, row int) rowRuns {
	vr := &v.rows[row]
	if vr.bits == nil {
		return intersect(dst, r, vr.runs)
	}
	for i := 0; i < len(r); i += 2 {
		dst = appendBitRuns(dst, vr.bits, int(r[i]), int(r[i+1]))
	}
	return dst
}

// Bytes is the memory the set holds: the rows' headers and their runs or
// bitsets.
func (v *Valid) Bytes() int64 {
	n := int64(len(v.rows)) * validRowBytes
	for _, r := range v.rows {
		n += int64(cap(r.runs))*4 + int64(cap(r.bits))*8
	}
	return n
}

// AddRow adds runs (as SetRow's) to row's valid cells, refusing a cell the
// row holds already: the merge of shards, whose rows must not overlap.
func (v *Valid) AddRow(row int, runs []int32) error {
	have := v.Row(row, nil)
	if both := intersect(nil, have, runs); len(both) > 0 {
		return fmt.Errorf("valid cell at row %d column %d is in another shard too", row, both[0])
	}
	if len(have) == 0 {
		v.SetRow(row, runs)
		return nil
	}
	v.SetRow(row, union(nil, have, runs))
	return nil
}

// NewValidFunc returns the cells i (row*width + column) of a width x
// height grid for which has(i) is true.
func NewValidFunc(width, height int, has func(i int) bool) *Valid {
	v := NewValid(width, height)
	var runs []int32
	for row := 0; row < height; row++ {
		runs = runs[:0]
		for c := 0; c < width; c++ {
			if has(row*width + c) {
				runs = appendRun(runs, int32(c), int32(c+1))
			}
		}
		v.SetRow(row, runs)
	}
	return v
}
