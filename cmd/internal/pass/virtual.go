package pass

import (
	"fmt"
	"math"

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
// through exactly the scoring path of a Raster (same workers taking block
// indices, same layout lookup and accumulators), with each worker's Source
// computing a block instead of reading it. Only cells that belong to some
// extent are computed.
type Virtual struct {
	g     *extent.Grid
	field Field
}

// NewVirtual returns the virtual model of field on grid g.
func NewVirtual(g *extent.Grid, field Field) *Virtual { return &Virtual{g: g, field: field} }

// Blocks returns the number of blocks of a pass, for progress.
func (v *Virtual) Blocks() int {
	return ((v.g.Width + VirtualBlock - 1) / VirtualBlock) * ((v.g.Height + VirtualBlock - 1) / VirtualBlock)
}

// virtualSource is one worker's Source of a Virtual: it computes the cells
// of a block that lie in some member of the family.
type virtualSource struct {
	v     *Virtual
	fam   *extent.Family
	outer []int // the largest member of each group: their union is every member's cells
	need  []uint64
	span  extent.SpanScratch
}

// ReadBlock fills buf with the field's values, NaN where the cell is in no
// member or has no value.
func (s *virtualSource) ReadBlock(x0, y0, w, h int, buf []float64) error {
	need := s.need[:w*h]
	clear(need)
	for y := range h {
		for _, k := range s.outer {
			runs := s.fam.Span(k, -1, y0+y, x0, x0+w, &s.span)
			for i := 0; i < len(runs); i += 2 {
				for x := int(runs[i]) - x0; x < int(runs[i+1])-x0; x++ {
					need[y*w+x] = 1
				}
			}
		}
	}
	s.v.field.Fill(x0, y0, w, h, need, buf[:w*h])
	return nil
}

func (s *virtualSource) Close() error { return nil }

// Score computes the field once, block by block, and returns one
// accumulator per family member and the pass statistics, as Raster.Score
// does for a raster.
func (v *Virtual) Score(g *extent.Grid, fam *extent.Family, layout *metrics.Layout, opt Options) ([]*metrics.Accumulator, Stats, error) {
	if g != v.g {
		return nil, Stats{}, &InternalError{fmt.Errorf("pass: internal: virtual model scored on another grid")}
	}
	groups := fam.Groups()
	outer := make([]int, len(groups))
	for i, seq := range groups {
		outer[i] = seq[len(seq)-1]
	}
	open := func() (Source, error) {
		return &virtualSource{v: v, fam: fam, outer: outer, need: make([]uint64, VirtualBlock*VirtualBlock)}, nil
	}
	p := plan{width: g.Width, height: g.Height, blockW: VirtualBlock, blockH: VirtualBlock, open: open, decode: func([]float64) {}}
	return score(p, g, fam, groups, layout, opt)
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
