package pass

import (
	"math"
	"sync/atomic"
	"unsafe"
)

// keptBlocks holds blocks of stored values that Sample read, for the next
// Score of the same raster to take instead of reading (and so decoding)
// them a second time. It holds at most budget bytes; a block beyond the
// budget, or outside the rows the pass will read, is not kept and the
// pass reads it again.
//
// A block is kept as the stored values a read of the whole block gives:
// float64 (the pass's own read, gdalSource.ReadBlock), or float32 for a
// band whose every value is a float32 (Byte, Int8, UInt16, Int16 and
// Float32 bands: Raster.narrow), read by GDAL straight into float32 so
// that a block of 256 x 256 cells takes 256 KiB instead of 512 KiB.
// Widening a float32 to float64 is exact, so a kept block gives the pass
// exactly the values its read would have.
//
// The kept blocks lie in one slab of memory mapped for the Sample
// (blockSlab: anonymous memory, transparent huge pages asked for where the
// system has them) and unmapped when the pass returns: on a virtual
// machine a first touch of fresh memory can cost 20 µs per 4 KiB page, as
// much as decoding the block again, and the slab's huge pages take that
// cost once per 2 MiB; its memory goes back to the system at once.
type keptBlocks struct {
	// slab holds the kept blocks, carved from its start; used is the
	// bytes carved.
	slab []byte
	used atomic.Int64
	// rows: only blocks meeting these grid rows are kept.
	rows RowRange
	// blockH is the blocks' height, nx the blocks per block row.
	blockH, nx int
	// blocks[i] is block i (row-major), or empty when not kept. Sample's
	// workers fill, and the pass's workers take, distinct elements.
	blocks []keptBlock
	// taken counts the blocks the pass took.
	taken atomic.Int64
}

// keptBlock is one block's stored values, full height (y0 = its block
// row's first grid row), in one of two widths.
type keptBlock struct {
	f32 []float32
	f64 []float64
}

// keptBytes is the size of a kept block of n values: 4 or 8 bytes each
// (narrow or not), rounded up to 8 bytes so that every block in the slab
// is aligned for float64.
func keptBytes(n int, narrow bool) int64 {
	if narrow {
		return (int64(n)*4 + 7) &^ 7
	}
	return int64(n) * 8
}

// newKeptBlocks returns an empty store for blocks of a width x height
// raster in blockW x blockH blocks, whose slab holds min(budget, need)
// bytes (need: the blocks Sample may keep), or nil when that is 0 or the
// memory cannot be mapped.
func newKeptBlocks(budget, need int64, rows RowRange, width, height, blockW, blockH int) *keptBlocks {
	size := min(budget, need)
	if size <= 0 || blockW <= 0 || blockH <= 0 {
		return nil
	}
	slab := blockSlab(size)
	if slab == nil {
		return nil // the pass reads every block, as without a budget
	}
	nx := (width + blockW - 1) / blockW
	ny := (height + blockH - 1) / blockH
	return &keptBlocks{slab: slab, rows: rows, blockH: blockH, nx: nx, blocks: make([]keptBlock, nx*ny)}
}

// meets reports whether rows y0 <= row < y0+h meet the kept rows.
func (k *keptBlocks) meets(y0, h int) bool { return y0 < k.rows.End && y0+h > k.rows.First }

// reserve returns a buffer in the slab for block i's n stored values (h
// rows from y0), float32 when narrow, for Sample to read the block into
// and keep; ok is false when the block is outside the kept rows or the
// slab is full (Sample then reads it into its own buffer, and the pass
// reads it again).
func (k *keptBlocks) reserve(i, y0, h, n int, narrow bool) (kb keptBlock, ok bool) {
	if k == nil || !k.meets(y0, h) {
		return keptBlock{}, false
	}
	size := keptBytes(n, narrow)
	var off int64
	for {
		off = k.used.Load()
		if off+size > int64(len(k.slab)) {
			return keptBlock{}, false
		}
		if k.used.CompareAndSwap(off, off+size) {
			break
		}
	}
	p := unsafe.Pointer(&k.slab[off])
	if narrow {
		return keptBlock{f32: unsafe.Slice((*float32)(p), n)}, true
	}
	return keptBlock{f64: unsafe.Slice((*float64)(p), n)}, true
}

// put keeps block i, read into a buffer from reserve.
func (k *keptBlocks) put(i int, kb keptBlock) { k.blocks[i] = kb }

// release unmaps the slab; the blocks may not be used after it. It is
// safe on nil and more than once.
func (k *keptBlocks) release() {
	if k == nil || k.slab == nil {
		return
	}
	clear(k.blocks)
	freeSlab(k.slab)
	k.slab = nil
}

// at returns the j-th stored value of the block.
func (kb keptBlock) at(j int) float64 {
	if kb.f32 != nil {
		return float64(kb.f32[j])
	}
	return kb.f64[j]
}

// take fills b.buf with block i's stored values for b's rows when block i
// is kept, drops it from the store and reports whether it did. b lies in
// block i: the same columns, its rows a range of the block's.
func (k *keptBlocks) take(i int, b block) bool {
	if k == nil || i < 0 || i >= len(k.blocks) {
		return false
	}
	kb := k.blocks[i]
	k.blocks[i] = keptBlock{}
	off := (b.y0 - (i/k.nx)*k.blockH) * b.w
	n := b.w * b.h
	switch {
	case kb.f32 != nil && off >= 0 && off+n <= len(kb.f32):
		for j, v := range kb.f32[off : off+n] {
			b.buf[j] = float64(v)
		}
	case kb.f64 != nil && off >= 0 && off+n <= len(kb.f64):
		copy(b.buf[:n], kb.f64[off:off+n])
	default:
		return false
	}
	k.taken.Add(1)
	return true
}

// allRows is the RowRange of every row.
var allRows = RowRange{0, math.MaxInt}
