package extent

import (
	"fmt"
	"runtime"
	"slices"
	"sort"
	"sync"
	"sync/atomic"

	"areasweep/extent/vocab"
)

// Clip restricts the family to the valid cells and measures it again:
// cells, areas, shares and points inside, members that became empty or
// equal to another, and chain nesting. Members already empty or duplicate
// stay so.
func (f *Family) Clip(valid *Valid, trainCells, testCells []int) {
	for k := range f.Members {
		m := &f.Members[k]
		m.Cells, m.AreaKm2, m.Share, m.TrainPoints, m.TestPoints = 0, 0, 0, 0, 0
	}
	b := &builder{g: f.Grid, valid: valid, f: f}
	b.finish(trainCells, testCells)
}

// finish clips every member to the valid cells, measures it, counts
// points, marks empty and duplicate members, and checks chain nesting.
// Members whose Status is not ok keep it and are not reported again.
//
// Members are independent, so they are clipped and measured in parallel;
// each member's area is still summed cell by cell in cell order (the same
// float64 sum whatever the number of cores).
func (b *builder) finish(trainCells, testCells []int) {
	cells := b.measure()
	b.setStatus(cells)
	b.countPoints(trainCells, testCells)
	b.measureDuplicates()
	b.keepChains()
}

// measure clips each member's runs to the valid cells (when known) and
// sets its cell count and, with the valid cells known, its area and share
// of the valid area; it returns the cell counts.
func (b *builder) measure() []int64 {
	f, g := b.f, b.g
	n := len(f.Members)
	cells := make([]int64, n)
	area := make([]float64, n)
	total := 0.0
	// Without the valid cells the family is not yet clipped: Clip will
	// measure it, so areas are not summed twice.
	withArea := b.valid != nil
	var wg sync.WaitGroup
	if withArea {
		wg.Add(1)
		go func() {
			defer wg.Done()
			total = b.validArea()
		}()
	}
	// Each row's one cell area (rows of equal cells), measured once for
	// all the members.
	var rowSame []float64
	var rowOK []bool
	if withArea {
		rowSame, rowOK = make([]float64, g.Height), make([]bool, g.Height)
		for row := range rowSame {
			rowSame[row], rowOK[row] = g.rowArea(row)
		}
	}
	var next atomic.Int64
	for w := 0; w < runtime.GOMAXPROCS(0); w++ {
		wg.Add(1)
		go func() {
			defer wg.Done()
			var areas []float64
			for {
				k := int(next.Add(1) - 1)
				if k >= n {
					return
				}
				rows := f.cells[k].rows
				for row, r := range rows {
					if b.valid != nil && len(r) > 0 {
						r = b.valid.clip(nil, r, row)
						rows[row] = r
					}
					cells[k] += r.cells()
					if !withArea || len(r) == 0 {
						continue
					}
					// One float64 sum per member, cell after cell in cell
					// order; in rows of equal cells repeatAdd gives that
					// sum without doing each addition.
					a := area[k]
					if same := rowSame[row]; rowOK[row] {
						for i := 0; i < len(r); i += 2 {
							a = repeatAdd(a, same, int(r[i+1]-r[i]))
						}
					} else {
						for i := 0; i < len(r); i += 2 {
							areas = g.RowAreasRange(row, int(r[i]), int(r[i+1]), areas)
							for _, x := range areas {
								a += x
							}
						}
					}
					area[k] = a
				}
			}
		}()
	}
	wg.Wait()
	for k := range f.Members {
		f.Members[k].Cells = cells[k]
		f.Members[k].AreaKm2 = area[k]
		if total > 0 {
			f.Members[k].Share = area[k] / total
		}
	}
	return cells
}

// setStatus marks the members that cover no valid cell empty and those
// with exactly the cells of an earlier member duplicates (with a warning
// each), and empties the runs of every member that is not ok.
func (b *builder) setStatus(cells []int64) {
	f, g := b.f, b.g
	for k := range f.Members {
		m := &f.Members[k]
		if m.Status != vocab.StatusOK {
			continue
		}
		if m.Cells == 0 {
			m.Status = vocab.StatusEmpty
			f.Warnings = append(f.Warnings, fmt.Sprintf("extent %s covers no valid cell%s; not scored", m.ID, emptyWhy(*m)))
			continue
		}
		for j := 0; j < k; j++ {
			if f.Members[j].Status == vocab.StatusOK && cells[j] == cells[k] && b.sameCells(j, k) {
				m.Status = vocab.StatusDuplicate
				m.DuplicateOf = f.Members[j].ID
				f.Warnings = append(f.Warnings, fmt.Sprintf("extent %s has exactly the cells of %s; scored once, under %s", m.ID, f.Members[j].ID, f.Members[j].ID))
				break
			}
		}
	}
	// Members that are not ok hold no cell.
	for k := range f.Members {
		if f.Members[k].Status != vocab.StatusOK {
			f.cells[k] = cellRuns{rows: make([]rowRuns, g.Height)}
		}
	}
}

// emptyWhy says, after ": ", what an empty member's emptiness means for
// its kind (a shrunk region narrower than twice the shrink, a layer off
// the raster or in another CRS), so that the warning points at the input
// or setting to change; "" for kinds whose emptiness says it already.
func emptyWhy(m Member) string {
	switch {
	case m.Kind == vocab.KindRegionBuffer && m.DistanceKm < 0:
		return fmt.Sprintf(": no cell with data in the base region lies more than %g km inside its edge (the region is nowhere wider than about %g km, or its inner cells have no data); shrink by less, or leave %g out of --region-buffers", -m.DistanceKm, -2*m.DistanceKm, m.DistanceKm)
	case m.Kind == vocab.KindUser:
		return ": its polygons hold no centre of a cell with data (they lie off the raster, in another area or CRS, are thinner than a cell, or lie over cells without data); check the layer's area and CRS"
	case m.Kind == vocab.KindPointBuffer:
		return fmt.Sprintf(": no centre of a cell with data lies within %g km of a point (a radius under half a cell's diagonal, or points among cells without data)", m.DistanceKm)
	case m.Kind == vocab.KindHull:
		return ": the hull holds no centre of a cell with data (it is thinner than a cell, or lies over cells without data)"
	}
	return ""
}

// countPoints counts the training and test points in each member (cells
// -1: outside the grid).
func (b *builder) countPoints(trainCells, testCells []int) {
	f := b.f
	for _, ci := range trainCells {
		if ci >= 0 {
			for k := range f.Members {
				if f.Has(k, ci) {
					f.Members[k].TrainPoints++
				}
			}
		}
	}
	for _, ci := range testCells {
		if ci >= 0 {
			for k := range f.Members {
				if f.Has(k, ci) {
					f.Members[k].TestPoints++
				}
			}
		}
	}
}

// measureDuplicates gives each duplicate the measures of the member it
// equals.
func (b *builder) measureDuplicates() {
	f := b.f
	n := len(f.Members)
	// A duplicate holds no cell of its own (it is scored under the member
	// it equals) but is measured as that member: the same cells, area,
	// share and points (DuplicateOf names an earlier member with status
	// ok, so it is already measured).
	index := make(map[string]int, n)
	for k, m := range f.Members {
		index[m.ID] = k
	}
	for k := range f.Members {
		m := &f.Members[k]
		if m.Status != vocab.StatusDuplicate {
			continue
		}
		if j, ok := index[m.DuplicateOf]; ok && j < k {
			o := f.Members[j]
			m.Cells, m.AreaKm2, m.Share, m.TrainPoints, m.TestPoints = o.Cells, o.AreaKm2, o.Share, o.TrainPoints, o.TestPoints
		}
	}
}

// keepChains keeps in each nested chain only the members with status ok,
// cuts a chain where a member is not inside the next (with a warning),
// drops chains left with fewer than two members and sets each member's
// chain.
func (b *builder) keepChains() {
	f := b.f
	// Chains: keep only members with Status ok, and check nesting.
	names := make([]string, 0, len(f.Chains))
	for name := range f.Chains {
		names = append(names, name)
	}
	sort.Strings(names)
	// A member names a chain only when it is kept in it: an empty or
	// duplicate member, or one past a cut, is in none (the builders set
	// the chain of every member they add).
	for k := range f.Members {
		f.Members[k].Chain = ""
	}
	for _, name := range names {
		var kept []int
		for _, k := range f.Chains[name] {
			if f.Members[k].Status == vocab.StatusOK {
				kept = append(kept, k)
			}
		}
		for i := 1; i < len(kept); i++ {
			if !f.nested(kept[i-1], kept[i]) {
				f.Warnings = append(f.Warnings, fmt.Sprintf("extent %s is not inside %s; the %s chain is cut there", f.Members[kept[i-1]].ID, f.Members[kept[i]].ID, name))
				kept = kept[:i]
				break
			}
		}
		if len(kept) < 2 {
			delete(f.Chains, name)
			continue
		}
		f.Chains[name] = kept
		for _, k := range kept {
			f.Members[k].Chain = name
		}
	}
}

// validArea is the area of all valid cells (every cell when valid is nil),
// summed cell by cell in cell order.
func (b *builder) validArea() float64 {
	g := b.g
	total := 0.0
	var areas []float64
	var runs []int32
	for row := 0; row < g.Height; row++ {
		runs = runs[:0]
		if b.valid == nil {
			runs = append(runs, 0, int32(g.Width))
		} else {
			runs = b.valid.Row(row, runs)
		}
		for i := 0; i < len(runs); i += 2 {
			areas = g.RowAreasRange(row, int(runs[i]), int(runs[i+1]), areas)
			for _, a := range areas {
				total += a
			}
		}
	}
	return total
}

// sameCells reports whether members j and k hold the same cells. Runs are
// canonical, so equal cells mean equal runs row by row.
func (b *builder) sameCells(j, k int) bool {
	rj, rk := b.f.cells[j].rows, b.f.cells[k].rows
	for row := range rj {
		if !slices.Equal(rj[row], rk[row]) {
			return false
		}
	}
	return true
}
