package pass

import (
	"fmt"
	"math"
	"sync"

	"areasweep/extent"
	"areasweep/metrics"
)

// Field computes a model's values block by block instead of reading them:
// Fill sets dst[y*w+x] to the value of cell (x0+x, y0+y) for every cell
// whose need word is not zero (need nil: every cell), and NaN where the
// cell has no value; the other cells may be left NaN. A cell's value must
// not depend on the block it is computed in. Fill is called from several
// goroutines at once.
type Field interface {
	Fill(x0, y0, w, h int, need []uint64, dst []float64)
}

// VirtualBlock is the side, in cells, of the blocks of a Virtual.
const VirtualBlock = 256

// Virtual is a model on the grid whose values a Field computes: it goes
// through exactly the scoring path of a Raster (same blocks to workers, same
// layout lookup and accumulators), with the read replaced by Fill on the
// worker. Only cells that belong to some extent are computed.
type Virtual struct {
	g     *extent.Grid
	field Field
}

// NewVirtual returns the virtual model of field on grid g.
func NewVirtual(g *extent.Grid, field Field) *Virtual { return &Virtual{g: g, field: field} }

func (v *Virtual) blockSize() (int, int) { return VirtualBlock, VirtualBlock }

// Blocks returns the number of blocks of a pass, for progress.
func (v *Virtual) Blocks() int {
	return ((v.g.Width + VirtualBlock - 1) / VirtualBlock) * ((v.g.Height + VirtualBlock - 1) / VirtualBlock)
}

// each sends the blocks, row of blocks by row of blocks, with empty buffers:
// the values are computed on the workers (prepare).
func (v *Virtual) each(out chan<- block, free chan []float64) error {
	defer close(out)
	for y0 := 0; y0 < v.g.Height; y0 += VirtualBlock {
		for x0 := 0; x0 < v.g.Width; x0 += VirtualBlock {
			w, h := min(VirtualBlock, v.g.Width-x0), min(VirtualBlock, v.g.Height-y0)
			buf := <-free
			out <- block{x0, y0, w, h, buf[:w*h]}
		}
	}
	return nil
}

// needPool recycles the per-block copies of the membership words.
var needPool = sync.Pool{New: func() any { b := make([]uint64, VirtualBlock*VirtualBlock); return &b }}

// prepare fills the block's values for the cells of some extent.
func (v *Virtual) prepare(fam *extent.Family, b block) {
	np := needPool.Get().(*[]uint64)
	defer needPool.Put(np)
	need := (*np)[:b.w*b.h]
	for y := range b.h {
		base := (b.y0+y)*v.g.Width + b.x0
		copy(need[y*b.w:(y+1)*b.w], fam.Mask[base:base+b.w])
	}
	v.field.Fill(b.x0, b.y0, b.w, b.h, need, b.buf)
}

// Score computes the field once, block by block, and returns one
// accumulator per family member and the pass statistics, as Raster.Score
// does for a raster.
func (v *Virtual) Score(g *extent.Grid, fam *extent.Family, layout *metrics.Layout, opt Options) ([]*metrics.Accumulator, Stats, error) {
	if g != v.g {
		return nil, Stats{}, fmt.Errorf("pass: internal: virtual model scored on another grid")
	}
	return score(v, g, fam, layout, opt)
}

// Sample returns the field's value at each cell index (row*width+col) and
// whether it is valid, computed as in a pass. Cells < 0 are reported
// invalid.
func (v *Virtual) Sample(g *extent.Grid, cells []int) ([]float64, []bool, error) {
	vals := make([]float64, len(cells))
	ok := make([]bool, len(cells))
	buf := make([]float64, 1)
	for i, c := range cells {
		if c < 0 {
			continue
		}
		v.field.Fill(c%g.Width, c/g.Width, 1, 1, nil, buf)
		vals[i], ok[i] = buf[0], !math.IsNaN(buf[0])
	}
	return vals, ok, nil
}

// CellCentres returns a function that fills lons and lats with the WGS84
// coordinates of the centres of cells c0 <= c < c1 of a row of g (NaN where
// they cannot be transformed): the cell positions of a Field.
func CellCentres(g *extent.Grid) func(row, c0, c1 int, lons, lats []float64) {
	return func(row, c0, c1 int, lons, lats []float64) {
		xs := make([]float64, c1-c0)
		ys := make([]float64, c1-c0)
		for c := c0; c < c1; c++ {
			xs[c-c0], ys[c-c0] = g.Centre(c, row)
		}
		g.ToLonLat(xs, ys, lons[:c1-c0], lats[:c1-c0])
	}
}
