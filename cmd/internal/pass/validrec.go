package pass

import (
	"slices"
	"sync"

	"areasweep/extent"
)

// validRec gathers the valid cells a pass meets into an extent.Valid,
// which takes a grid row whole: each block hands over its rows' runs of
// valid cells (within its columns), and the worker that finishes the last
// block of a block row joins that block row's rows, in column order, and
// sets them. Only the block rows being read are held, so its memory
// follows the blocks in flight, not the raster.
type validRec struct {
	v      *extent.Valid
	nx     int // blocks per block row
	blockW int
	blockH int

	mu   sync.Mutex
	live map[int]*validBand // by block row
}

// validBand is one block row's blocks, by block column, until all of them
// are in.
type validBand struct {
	left   int
	blocks []validBlock
}

// validBlock is one block's valid cells: row y's runs (grid columns) are
// runs[off[y]:off[y+1]]; both nil when the block has none.
type validBlock struct{ runs, off []int32 }

func newValidRec(v *extent.Valid, width, blockW, blockH int) *validRec {
	return &validRec{v: v, nx: (width + blockW - 1) / blockW, blockW: blockW, blockH: blockH, live: make(map[int]*validBand)}
}

// add hands over block b's valid cells (runs and row offsets off, len
// b.h+1, as validBlock's; copied) and, when b is the last block of its
// block row, sets that block row's rows.
func (vr *validRec) add(b block, runs, off []int32) {
	by, bx := b.y0/vr.blockH, b.x0/vr.blockW
	var blk validBlock
	if len(runs) > 0 {
		blk = validBlock{runs: slices.Clone(runs), off: slices.Clone(off)}
	}
	vr.mu.Lock()
	bd := vr.live[by]
	if bd == nil {
		bd = &validBand{left: vr.nx, blocks: make([]validBlock, vr.nx)}
		vr.live[by] = bd
	}
	bd.blocks[bx] = blk
	bd.left--
	last := bd.left == 0
	if last {
		delete(vr.live, by)
	}
	vr.mu.Unlock()
	if last {
		bd.set(vr.v, b.y0, b.h)
	}
}

// set joins the blocks' runs of rows y0 <= row < y0+h and sets them in v;
// runs that meet at a block edge become one.
func (bd *validBand) set(v *extent.Valid, y0, h int) {
	var row []int32
	for y := 0; y < h; y++ {
		row = row[:0]
		for _, blk := range bd.blocks {
			if blk.off == nil {
				continue
			}
			c := blk.runs[blk.off[y]:blk.off[y+1]]
			for i := 0; i < len(c); i += 2 {
				row = appendCells(row, 0, c[i], c[i+1])
			}
		}
		v.SetRow(y0+y, row)
	}
}

// appendCells appends the run [c0,c1) to runs, whose runs of the current
// row begin at runs[from:] (ascending), joining it to the row's last run
// when they meet.
func appendCells(runs []int32, from int, c0, c1 int32) []int32 {
	if n := len(runs); n > from && runs[n-1] == c0 {
		runs[n-1] = c1
		return runs
	}
	return append(runs, c0, c1)
}
