package metrics

import (
	"errors"
	"math"
)

// Shared gathers cells that go to several accumulators of one layout at
// once (the cells of a raster block that lie in several extents), so that
// each cell is added once instead of once per accumulator; Drain then adds
// its sums to each of them. All sums are integers and Merge is exact, so
// each accumulator ends exactly as if the cells had been added to it
// directly.
//
// Begin places its (empty) fine histogram on the finest grid among its
// targets, when they all hold cells already, rather than on the grid of
// its own cells' range: no target's grid is finer, so each merge gives the
// target the grid it would have had anyway (max of the canonical
// exponents, see gridExp), while the shared sums need no regridding as
// their range grows and no coarsening at each merge. That grid may be
// coarser than its own range's, which is why Shared is not an
// Accumulator: it is never encoded or scored.
//
// A Shared is not safe for concurrent use.
type Shared struct {
	acc *Accumulator
	dst []*Accumulator
}

// NewShared returns an empty Shared on layout l.
func (l *Layout) NewShared() *Shared { return &Shared{acc: l.NewAccumulator()} }

// Begin sets the accumulators (made on the same layout) that the cells
// added next go to.
func (s *Shared) Begin(dst []*Accumulator) {
	a := s.acc
	if a.cells != 0 || a.skipped != 0 {
		a.Reset() // not drained
	} else {
		// A Begin whose targets got no cell leaves its grid behind (Drain
		// returns early): an empty target would take that grid, which
		// depends on the blocks this worker saw before, instead of the
		// grid of its own cells (results.json's Boyce window areas
		// differed between runs of one study).
		a.clearGrid()
	}
	s.dst = append(s.dst[:0], dst...)
	var finest *Accumulator
	for _, d := range dst {
		if d.cells == 0 || d.layout != a.layout {
			return // the own grid: an empty target takes it as it is
		}
		if finest == nil || d.he < finest.he {
			finest = d
		}
	}
	if finest != nil {
		a.setGrid(finest.he, finest.min, finest.max)
	}
}

// AddRow adds one row's cells as Accumulator.AddRow does.
func (s *Shared) AddRow(bins []int32, vals []float64, weights []int64) {
	s.acc.AddRow(bins, vals, weights)
}

// Drain adds the cells added since Begin to each of its accumulators and
// empties s.
func (s *Shared) Drain() error {
	a := s.acc
	if a.cells == 0 {
		s.dst = s.dst[:0]
		return nil
	}
	// Cells came through AddRow only, so the exact bins outside those of
	// [Min, Max], and the histogram outside its occupied bins, are empty.
	i0, i1 := a.layout.Locate(a.min), a.layout.Locate(a.max)+1
	for _, d := range s.dst {
		if d == nil || d.layout != a.layout {
			return errors.New("metrics: Shared.Drain: an accumulator is nil or on another layout")
		}
		d.merge(a, i0, i1)
	}
	h0, h1 := a.occupied()
	clear(a.bins[i0:i1])
	clear(a.hist[h0 : h1+1])
	a.clearGrid()
	a.min, a.max = math.Inf(1), math.Inf(-1)
	a.cells, a.area = 0, 0
	s.dst = s.dst[:0]
	return nil
}
