package pass

import (
	"fmt"
	"math"

	"areasweep/extent"
	"areasweep/extent/geodesy"
	"areasweep/extent/nullmodel"
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

// Binner tells which values a pass keeps apart: Cell(v) is the interval of
// values that share v's exact bin, FloorScale the scale 2^-e of the floor
// grid whose bins floor(v * 2^-e) they must share too (see
// nullmodel.Binner; floorBinner on a floored *metrics.Layout).
type Binner = interface {
	Cell(v float64) (lo, hi float64, closed bool)
	FloorScale() float64
}

// floorBinner is the Binner of a layout with a histogram floor e
// (metrics.WithHistFloor): the values that share v's exact bin, and the
// floor grid, whose bin of v is floor(v * 2^-e) (Layout.FloorBin).
//
// Why this is enough although each accumulator chooses its histogram grid
// from its own cells during the pass: every accumulator on the layout uses
// a dyadic grid of exponent e' >= e, whose bin of v is FloorBin(v) >>
// (e'-e); the edges of every coarser grid are a subset of the floor grid's
// edges (multiples of 2^e' are multiples of 2^e). So when the two ends of
// a cell's bounds have the same exact bin and the same floor bin, so do
// the midpoint and the exact value (bins are intervals), in every
// accumulator at every level it may reach.
type floorBinner struct {
	l     *metrics.Layout
	s     float64   // 2^-e for the floor exponent e
	edges []float64 // nullmodel.FloorEdges of the layout's values
	sub   []float64 // the same on the grid nullmodel.SubFloor times finer
}

// newFloorBinner returns the Binner of a floored layout.
func newFloorBinner(l *metrics.Layout) floorBinner {
	e, _ := l.HistFloor()
	s := math.Ldexp(1, -e)
	vals := l.Values()
	return floorBinner{l: l, s: s, edges: nullmodel.FloorEdges(vals, s), sub: nullmodel.FloorEdges(vals, s*nullmodel.SubFloor)}
}

// FloorEdges returns the edge of an exact bin in each floor bin (see
// nullmodel.EdgeBinner); read-only, shared by the workers.
func (b floorBinner) FloorEdges() []float64 { return b.edges }

// SubFloorEdges returns the edge of an exact bin in each sub-bin of the
// floor grid (see nullmodel.SubEdgeBinner); read-only, shared.
func (b floorBinner) SubFloorEdges() []float64 { return b.sub }

// Cell returns the values that share v's exact bin (see
// nullmodel.Binner and metrics.Layout.Cell).
func (b floorBinner) Cell(v float64) (lo, hi float64, closed bool) { return b.l.Cell(v) }

// FloorScale returns 2^-e for the layout's floor exponent e.
func (b floorBinner) FloorScale() float64 { return b.s }

// BoundedField is a Field that can bound its values instead of computing
// each one: Bounds sets lo[i] <= value <= hi[i] for the cells Fill would
// compute, with lo[i] and hi[i] in the same cell of bins (bins.Cell; a
// cell is an interval, so the value shares their bins), lo[i] == hi[i] equal to Fill's
// value where it computed the cell, NaN where Fill gives NaN. A cell's
// bounds must not depend on the block. A Virtual scores such a field
// exactly as it would score Fill's values: see Virtual.
type BoundedField interface {
	Field
	Bounds(x0, y0, w, h int, need []uint64, bins Binner, lo, hi []float64)
}

// negBounder is a BoundedField that can give the bounds of minus its
// values: Bracket sets lo and hi as Bounds would set 0 - hi and 0 - lo
// (the distance-only null's distances, nullmodel.Field.Bracket), so that a
// Virtual negates them in its own walk of the block instead of a walk of
// Bounds'.
type negBounder interface {
	Bracket(x0, y0, w, h int, need []uint64, bins Binner, lo, hi []float64)
}

// VirtualBlock is the side, in cells, of the blocks of a Virtual: a
// multiple of nullmodel.SuperTile (15), so that no block shares the
// distance field's super-tiles with another.
const VirtualBlock = 240

// Virtual is a model on the grid whose values a Field computes: it goes
// through exactly the scoring path of a Raster (same workers taking block
// indices, same layout lookup and accumulators), with each worker's Source
// computing a block instead of reading it. Only cells that belong to some
// extent are computed.
//
// For a BoundedField on a layout with a histogram floor (the histogram
// edges are then known before the pass, see floorBinner) the block's
// values are the midpoints of the bounds, not the values themselves,
// chosen so that every accumulator is what the exact values give: a
// midpoint lies in its value's exact bin and, at every histogram level an
// accumulator may use, in its histogram bin (bins are intervals whose
// edges are floor-grid edges), and within each block, for every member that
// a cell is added to (the smallest member of each nested group holding
// it), every cell whose bounds reach the block's smallest upper bound
// (largest lower bound) is computed exactly with Fill. Then the block's
// minimum and maximum on that member are exact values, and every other
// cell lies strictly between them, so the merged minimum, maximum and
// the area at the minimum are exact too. Options.Rows and the preview see
// the midpoints of each cell's own bounds (exact where the bounds are),
// not the values exactExtremes computed: those cells depend on the block,
// so a pass over a range of rows (a shard) would show other values than
// a pass over every row; the bounds depend on the cell alone. On a layout
// without a floor every cell is computed with Fill, since the histogram
// edges the bounds would have to avoid are not known before the pass.
type Virtual struct {
	g     *extent.Grid
	field Field
	bg    *nullmodel.Background // Tally's background, or nil
}

// NewVirtual returns the virtual model of field on grid g.
func NewVirtual(g *extent.Grid, field Field) *Virtual { return &Virtual{g: g, field: field} }

// Blocks returns the number of blocks of a pass, for progress.
func (v *Virtual) Blocks() int {
	return ((v.g.Width + VirtualBlock - 1) / VirtualBlock) * ((v.g.Height + VirtualBlock - 1) / VirtualBlock)
}

// BlocksIn returns the number of blocks a pass over rows computes (every
// block when rows is nil), for run.log.
func (v *Virtual) BlocksIn(rows *RowRange) int {
	return blocksIn(v.g.Width, v.g.Height, VirtualBlock, VirtualBlock, rows)
}

// virtualSource is one worker's Source of a Virtual: it computes the cells
// of a block that lie in some member of the family, those of the block's
// segments (the block's plan, handed over by the pass with usePlan before
// each ReadBlock: the family's rings are walked once per block row, in
// the band, not again by the source).
type virtualSource struct {
	v    *Virtual
	ws   *workerState // the plan of the block being read
	need []uint64
	// bounded path
	bf     BoundedField
	bins   Binner
	lo, hi []float64
	shown  []float64   // shownValues' (made on first use)
	last   []float64   // the last block's values (ReadBlock's buf)
	moved  []movedCell // the cells of the last block computed exactly
	minHi  []float64   // per member: smallest upper bound in the block
	maxLo  []float64   // per member: largest lower bound in the block
	segLo  []float64   // per segment of the block: smallest lower bound
	segHi  []float64   // per segment of the block: largest upper bound
	sigMn  []float64   // per signature: the largest of its members' minHi
	sigMx  []float64   // per signature: the smallest of its members' maxLo
	one    [1]float64
	tally  *rowTally // Virtual.Tally's, on the bounded path
}

// usePlan takes the plan of the next block read (see planned).
func (s *virtualSource) usePlan(ws *workerState) { s.ws = ws }

// ReadBlock fills buf with the field's values, NaN where the cell is in no
// member or has no value.
func (s *virtualSource) ReadBlock(x0, y0, w, h int, buf []float64) error {
	if s.ws == nil || len(s.ws.sRow) != h+1 {
		return &InternalError{fmt.Errorf("pass: internal: virtual block at (%d, %d) read without its plan", x0, y0)}
	}
	need := s.markNeed(w, h)
	if s.bf == nil {
		s.v.field.Fill(x0, y0, w, h, need, buf[:w*h])
		return nil
	}
	lo, hi := s.lo[:w*h], s.hi[:w*h]
	neg := false
	if nb, ok := s.bf.(negBounder); ok {
		// The bounds of minus the values: exactExtremes negates them as
		// it reads them.
		nb.Bracket(x0, y0, w, h, need, s.bins, lo, hi)
		neg = true
	} else {
		s.bf.Bounds(x0, y0, w, h, need, s.bins, lo, hi)
	}
	// The block's values are the midpoints of the cells' own bounds but
	// at the cells exactExtremes computes (listed in s.moved with their
	// midpoints, for shownValues: see there), NaN outside the segments;
	// exactExtremes writes them all into buf.
	buf = buf[:w*h]
	s.last, s.moved = buf, s.moved[:0]
	s.exactExtremes(x0, y0, w, h, neg, lo, hi, buf)
	return nil
}

// rowExtremes are the smallest and largest lower and upper bounds of the
// cells of a run (NaN cells left out; infinite when there is none).
type rowExtremes struct{ minHi, maxLo, minLo, maxHi float64 }

// midRun sets mid[i] to the midpoint of cell i's bounds of a run, lo[i]
// <= value <= hi[i] (or, when neg, 0 - hi[i] <= value <= 0 - lo[i]: the
// bounds of minus the values, as Bracket gives them), the bound itself
// where the two are equal, and returns the run's extremes of the bounds.
func midRun(neg bool, lo, hi, mid []float64) rowExtremes {
	e := rowExtremes{minHi: math.Inf(1), maxLo: math.Inf(-1), minLo: math.Inf(1), maxHi: math.Inf(-1)}
	hi, mid = hi[:len(lo)], mid[:len(lo)]
	for i, l := range lo {
		u := hi[i]
		if neg {
			l, u = 0-u, 0-l
		}
		m := l
		if m != u {
			m = (m + u) / 2
		}
		mid[i] = m
		// NaN compares false: cells with no value are left out.
		if u < e.minHi {
			e.minHi = u
		}
		if l > e.maxLo {
			e.maxLo = l
		}
		if l < e.minLo {
			e.minLo = l
		}
		if u > e.maxHi {
			e.maxHi = u
		}
	}
	return e
}

// fillNaN sets every value of vals to NaN.
func fillNaN(vals []float64) {
	nan := math.NaN()
	for i := range vals {
		vals[i] = nan
	}
}

// movedCell is a cell of a block that exactExtremes computed: its index
// in the block and the midpoint of its bounds it replaced.
type movedCell struct {
	i   int
	mid float64
}

// shownValues returns the values of the last block for Options.Rows and
// the preview, nil when they are the block's values: the midpoints of the
// cells' own bounds, not the values exactExtremes computed, since which
// cells it computes depends on the block and on the family around the
// cell (a shard's blocks are cut at its rows, and its family is clipped
// only in its rows), the bounds on the cell alone. They are the block's
// values with those cells' midpoints put back, made only when asked for
// (the pass asks only when it has a preview or a row hook).
func (s *virtualSource) shownValues(n int) []float64 {
	if s.bf == nil || len(s.moved) == 0 {
		return nil
	}
	if cap(s.shown) < n {
		s.shown = make([]float64, VirtualBlock*VirtualBlock)
	}
	shown := s.shown[:n]
	copy(shown, s.last[:n])
	for _, c := range s.moved {
		shown[c.i] = c.mid
	}
	return shown
}

// markNeed returns the need words of the block of w x h cells whose plan
// s.ws holds: need[y*w+x] set for every cell of a segment (the cells
// that lie in some member), or nil when the segments cover every row
// whole (the inside of large extents; nil means every cell to Fill and
// Bounds, and saves their test per cell).
func (s *virtualSource) markNeed(w, h int) []uint64 {
	segs, sRow := s.ws.segs, s.ws.sRow
	full := true
	for y := 0; y < h && full; y++ {
		x := int32(0)
		for _, sg := range segs[sRow[y]:sRow[y+1]] {
			if sg.x0 != x {
				break
			}
			x = sg.x1
		}
		full = x == int32(w)
	}
	if full {
		return nil
	}
	need := s.need[:w*h]
	clear(need)
	for y := range h {
		for _, sg := range segs[sRow[y]:sRow[y+1]] {
			for x := y*w + int(sg.x0); x < y*w+int(sg.x1); x++ {
				need[x] = 1
			}
		}
	}
	return need
}

// exactExtremes writes the block's values into buf, the midpoints of the
// cells' bounds (lo and hi as ReadBlock has them: see midRun for neg)
// and NaN outside the block's segments, and computes exactly (buf =
// Fill's value) every cell of the block that may hold the smallest or
// the largest value of a member it is added to (see Virtual): those
// members are its segment's signature. A first walk of the block's
// segments sets their midpoints and finds each segment's extremes of the
// bounds (midRun), folded into each signature's and then each member's
// smallest upper and largest lower bound in the block; a cell may then
// hold a member's extreme when lo <= that member's smallest upper bound
// or hi >= its largest lower bound for some member of its signature,
// that is lo <= the largest of those smallest upper bounds or hi >= the
// smallest of those largest lower bounds (sigMn, sigMx). The second walk
// visits only the segments whose extremes reach them. Comparisons and
// minima alone: the cells computed do not depend on the order of the
// walk, and are those of a walk of each member's ring. The sorting-bias
// tally adds each segment's midpoints to its signature's members in the
// first walk, right after they are set.
func (s *virtualSource) exactExtremes(x0, y0, w, h int, neg bool, lo, hi, buf []float64) {
	ws := s.ws
	segs, sRow := ws.segs, ws.sRow
	for k := range s.minHi {
		s.minHi[k], s.maxLo[k] = math.Inf(1), math.Inf(-1)
	}
	nsig := len(ws.sigCells)
	if cap(s.sigMn) < nsig {
		s.sigMn, s.sigMx = make([]float64, nsig), make([]float64, nsig)
	}
	sigMn, sigMx := s.sigMn[:nsig], s.sigMx[:nsig]
	for i := range sigMn {
		sigMn[i], sigMx[i] = math.Inf(1), math.Inf(-1)
	}
	if cap(s.segLo) < len(segs) {
		s.segLo, s.segHi = make([]float64, len(segs)), make([]float64, len(segs))
	}
	segLo, segHi := s.segLo[:len(segs)], s.segHi[:len(segs)]
	tl := s.tally
	for y := range h {
		row := buf[y*w : (y+1)*w]
		if tl != nil {
			tl.begin(ws, y0+y, x0, row)
		}
		x := 0
		for j := sRow[y]; j < sRow[y+1]; j++ {
			sg := segs[j]
			a, b := y*w+int(sg.x0), y*w+int(sg.x1)
			fillNaN(row[x:sg.x0])
			e := midRun(neg, lo[a:b], hi[a:b], buf[a:b])
			x = int(sg.x1)
			if tl != nil {
				tl.add(ws.members(sg.sig), int(sg.x0), int(sg.x1))
			}
			sigMn[sg.sig], sigMx[sg.sig] = min(sigMn[sg.sig], e.minHi), max(sigMx[sg.sig], e.maxLo)
			segLo[j], segHi[j] = e.minLo, e.maxHi
		}
		fillNaN(row[x:])
	}
	if tl != nil {
		tl.end()
	}
	// Each member's extremes from its signatures', then each signature's
	// thresholds from its members'.
	for id, c := range ws.sigCells {
		if c == 0 {
			continue
		}
		for _, k := range ws.members(int32(id)) {
			s.minHi[k], s.maxLo[k] = min(s.minHi[k], sigMn[id]), max(s.maxLo[k], sigMx[id])
		}
	}
	for id, c := range ws.sigCells {
		if c == 0 {
			continue
		}
		mn, mx := math.Inf(-1), math.Inf(1)
		for _, k := range ws.members(int32(id)) {
			mn, mx = max(mn, s.minHi[k]), min(mx, s.maxLo[k])
		}
		sigMn[id], sigMx[id] = mn, mx
	}
	for y := range h {
		for j := sRow[y]; j < sRow[y+1]; j++ {
			sg := segs[j]
			mn, mx := sigMn[sg.sig], sigMx[sg.sig]
			if !(segLo[j] <= mn || segHi[j] >= mx) {
				continue
			}
			for i := y*w + int(sg.x0); i < y*w+int(sg.x1); i++ {
				l, u := lo[i], hi[i]
				if neg {
					l, u = 0-u, 0-l
				}
				if l != u && (l <= mn || u >= mx) {
					s.v.field.Fill(x0+i%w, y0+i/w, 1, 1, nil, s.one[:])
					s.moved = append(s.moved, movedCell{i, buf[i]})
					buf[i] = s.one[0]
				}
			}
		}
	}
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
	bf, _ := v.field.(BoundedField)
	if _, floored := layout.HistFloor(); !floored {
		bf = nil // histogram edges unknown before the pass: compute every cell
	}
	if v.bg != nil && bf == nil {
		// No bounds, so no walk of the extremes: the tally as a row hook.
		tally, rows := NullTally(fam, v.bg), opt.Rows
		opt.Rows = tally
		if rows != nil {
			opt.Rows = func(row, c0 int, vals []float64, w []int64) {
				rows(row, c0, vals, w)
				tally(row, c0, vals, w)
			}
		}
	}
	var fb floorBinner
	if bf != nil {
		fb = newFloorBinner(layout)
	}
	open := func() (Source, error) {
		src := &virtualSource{v: v, need: make([]uint64, VirtualBlock*VirtualBlock)}
		if bf != nil {
			src.bf, src.bins = bf, fb
			src.lo, src.hi = make([]float64, VirtualBlock*VirtualBlock), make([]float64, VirtualBlock*VirtualBlock)
			src.minHi, src.maxLo = make([]float64, len(fam.Members)), make([]float64, len(fam.Members))
			if v.bg != nil {
				src.tally = &rowTally{g: g, bg: v.bg}
			}
		}
		return src, nil
	}
	p := plan{width: g.Width, height: g.Height, blockW: VirtualBlock, blockH: VirtualBlock, open: open, decode: func([]float64) error { return nil }, midpoints: bf != nil}
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
		// Converted in place, as Grid.RowLonLat does: no allocation.
		lons, lats = lons[:c1-c0], lats[:c1-c0]
		for c := c0; c < c1; c++ {
			lons[c-c0], lats[c-c0] = g.Centre(c, row)
		}
		g.ToLonLat(lons, lats, lons, lats)
	}
}

// CellPoints returns a function that fills lons and lats with the WGS84
// coordinates of the centres of cells (cols[k], rows[k]) of g, in one
// transformation: for each cell the numbers of CellCentres (the same
// transformation of the same grid coordinates, point by point).
func CellPoints(g *extent.Grid) func(cols, rows []int, lons, lats []float64) {
	return func(cols, rows []int, lons, lats []float64) {
		lons, lats = lons[:len(cols)], lats[:len(cols)]
		for k, c := range cols {
			lons[k], lats[k] = g.Centre(c, rows[k])
		}
		g.ToLonLat(lons, lats, lons, lats)
	}
}

// DistanceNull returns the distance-only null's field on g for the sites of
// ix: on a latitude-longitude grid the one of nullmodel.NewLonLat,
// otherwise nullmodel.NewPoints on the cell centres transformed to WGS84
// (CellCentres and CellPoints: PROJ; its bounds transform a lattice of
// about 8 cells in 256 and interpolate the others, see
// nullmodel.Field.Bracket). The bounds of both let a pass compute few
// cells exactly (on BenchmarkNullVsRaster's study 1.3% on an EPSG:3035
// grid), and both give the same values.
func DistanceNull(g *extent.Grid, ix *geodesy.Index) *nullmodel.Field {
	if g.Geographic {
		gt := g.GeoTransform
		return nullmodel.NewLonLat(ix, gt[0], gt[1], gt[3], gt[5])
	}
	return nullmodel.NewPoints(ix, CellCentres(g), CellPoints(g))
}

// farthestStep is the tile side (cells) of the one-query-per-tile bound on
// the null's largest distance (nullmodel.Field.FarthestBound).
const farthestStep = 64

// DistanceNullFloor returns the histogram floor exponent of the
// distance-only null's layout (metrics.WithHistFloor): that of the power
// of two at or below far/histBins, far an upper bound on the null's
// largest distance on g (FarthestBound, at least 1 m). Its histograms are
// then never finer than bins of far/(2*histBins), and a cell's bounds need
// only avoid the multiples of 2^floor (about histBins to 2*histBins edges
// over [-far, 0]) to be scored without computing it (see floorBinner). The
// floor depends on the training sites and the grid alone, so every shard
// of a run finds the same one.
func DistanceNullFloor(f *nullmodel.Field, g *extent.Grid, histBins int) int {
	far := math.Max(f.FarthestBound(g.Width, g.Height, farthestStep), 1)
	return metrics.FloorExp(far / float64(histBins))
}
