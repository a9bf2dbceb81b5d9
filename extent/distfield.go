package extent

import (
	"math"
	"runtime"
	"sort"
	"sync"

	"areasweep/extent/geodesy"
)

// tileSide is the side, in cells, of the tiles distanceField classifies
// with one query when no cut passes through them.
const tileSide = 16

// walkSide is the side of the tiles that walkTile classifies cell by
// cell when one query does not settle them.
const walkSide = 8

// fieldWindow is the number of columns of a band a distance-field worker
// classifies at a time (a multiple of tileSide): its buffers hold one
// window and the column on each side of it, tileSide rows deep, so that
// its memory is bounded whatever the grid's width (about 1 MB a worker on
// a latitude-longitude grid, 2 MB on a projected one, against 420 bytes
// per column of the whole grid when a worker held whole bands: 170 MB a
// worker on a grid 400,000 cells wide). Grids up to this width are
// classified in one window a band, as before; on wider ones the windows
// of a band are classified left to right by one worker, each starting
// from the classes and rooms of the previous window's last column, so the
// queries, and the classes, are those of a whole band (only memory and
// the clearing of it change).
const fieldWindow = 4096

// distanceField calls rowDone(row, near) once for every row of the grid,
// from several goroutines (never twice for a row): near[j] holds the runs
// of the row's cells whose geodesic distance from the cell centre to the
// nearest site of ix is at most cuts[j]. cuts are metres, ascending,
// unique and all <= maxD (at most MaxMembers of them, so that a class
// fits 16 bits); the slices in near are the callee's to keep.
//
// Only the class of each cell matters: which of the cut distances the
// distance lies below. Each worker holds the distances of one window of a
// band of tileSide rows at a time (fieldWindow columns, as classes, 2
// bytes a cell), never the whole grid nor a whole row. The distance
// function is 1-Lipschitz, which saves most queries:
//
//   - a tile of tileSide x tileSide cells gets one query at its centre cell,
//     D, and rho, the largest distance from that centre to a corner cell
//     (times a small safety factor); when every cut is farther than rho
//     from D, or D - rho > maxD, every cell of the tile is in D's class and
//     receives D's class; otherwise the tile is split in four and each
//     quarter tried the same way, down to tiles of walkSide cells a side.
//     D comes from the index's bounds [lo, hi] (geodesy's TightBoundsAt:
//     a few metres wide at hundreds of kilometres) when they settle the
//     tile; the exact distance is measured only when it could (some value
//     of [lo, hi] would settle it), which is rare: the bounds are far
//     narrower than rho;
//   - a tile that is split lists the few sites that may be nearest to
//     some cell of it (geodesy.Near: within hi + 2 rho of its centre);
//     when they are at most maxNear, its quarters are bounded against
//     them (Near.QuickBounds: the smallest chords, no tree search);
//   - a tile of walkSide cells or fewer a side that one query does not
//     settle is walked cell by cell (walkTile): a cell takes the class of a
//     neighbour already classified while the neighbour's room (its gap to
//     the nearest cut) exceeds the step between them, and is queried
//     otherwise, against the listed sites when they are few
//     (Near.StraightBounds: the smallest straight distance). Rooms pass
//     across tile edges (and window edges): a tile settled whole gives its
//     cells the room its centre's gap leaves beyond rho.
//
// The cost so stays near the buffers' edges instead of over their area,
// and all cuts share one field: a cell is measured exactly only when its
// bounds straddle one of them. Queries go through prepared points
// (bandPoints), each tree query starting from the previous one's
// chord-nearest site.
func (b *builder) distanceField(fs fieldSites, reach reachBox, maxD float64, cuts []float64, rowDone func(row int, near []rowRuns)) {
	g := b.g
	bands := make(chan int)
	var wg sync.WaitGroup
	for w := 0; w < runtime.GOMAXPROCS(0); w++ {
		wg.Add(1)
		go func() {
			defer wg.Done()
			fw := b.newFieldWorker(&fs, reach, maxD, cuts)
			for r0 := range bands {
				fw.band(r0, rowDone)
			}
		}()
	}
	for r0 := 0; r0 < g.Height; r0 += tileSide {
		bands <- r0
	}
	close(bands)
	wg.Wait()
}

// fieldSites are the sites a distance field measures to. Bounds, and the
// lists of sites near a tile, come from ix; exact distances from exact.
// Most often the two are one. For a region's boundary (boundaryLonLat)
// ix holds the points cut every cell side, exact those and the points
// cut between them down to bufferStep: every point of ix is one of
// exact's, so the distance D' to exact's is at most the distance D to
// ix's, and a boundary whose pieces between ix's points are at most
// 2 half long on the ground is, by the sampling bound of bufferStep, at
// least sqrt(D^2 - half^2) away, and exact's points lie on it. So a
// bound [lo, hi] on D gives [lower(lo), hi] on D', and D' <= d whenever
// D <= reach(d). The field queries ix where cells are settled from their
// bounds and exact only where a cut lies between them: with 29 cuts on
// a 27-million-cell grid, exact's 2.5 times more points near every
// queried cell had made the family 40% slower to build.
type fieldSites struct {
	ix, exact *geodesy.Index
	half      float64
}

// oneSites returns the fieldSites of one index.
func oneSites(ix *geodesy.Index) fieldSites { return fieldSites{ix: ix, exact: ix} }

// lower returns a lower bound on the distance to exact's sites from one,
// lo, on the distance to ix's: lo itself when they are one.
func (fs *fieldSites) lower(lo float64) float64 {
	if fs.half == 0 {
		return lo
	}
	if l2 := lo*lo - fs.half*fs.half; l2 > 0 {
		return math.Sqrt(l2) * (1 - 1e-9)
	}
	return 0
}

// reach returns a distance to ix's sites beyond which the distance to
// exact's exceeds d: d itself when they are one.
func (fs *fieldSites) reach(d float64) float64 {
	if fs.half == 0 || math.IsInf(d, 1) {
		return d
	}
	return math.Sqrt(d*d+fs.half*fs.half)*(1+1e-9) + 1e-3
}

// fieldWorker is one distanceField worker and its buffers, reused from
// band to band and window to window.
type fieldWorker struct {
	b     *builder
	fs    *fieldSites
	cols  int // the window's width: fieldWindow, or b.windowCols when set
	fl    *field
	pts   *bandPoints
	steps *bandSteps
	rhos  *tileRadii
	runs  [tileSide]rowCuts
	// The previous window's last column, carried into the next.
	carryCls  [tileSide]uint16
	carryRoom [tileSide]float64
}

func (b *builder) newFieldWorker(fs *fieldSites, reach reachBox, maxD float64, cuts []float64) *fieldWorker {
	cols := fieldWindow
	if b.windowCols > 0 {
		cols = b.windowCols
	}
	return &fieldWorker{
		b: b, fs: fs, cols: cols,
		fl:    &field{cuts: cuts, maxD: maxD, w: b.g.Width},
		pts:   newBandPoints(reach),
		steps: newBandSteps(),
		rhos:  &tileRadii{},
	}
}

// band classifies the rows [r0, r0+tileSide) of the grid, window by
// window from west to east, and hands each row's runs to rowDone.
func (fw *fieldWorker) band(r0 int, rowDone func(row int, near []rowRuns)) {
	g, fl := fw.b.g, fw.fl
	fw.rhos.n = 0
	fl.band = r0
	r1 := min(r0+tileSide, g.Height)
	for k := range r1 - r0 {
		fw.runs[k].start(len(fl.cuts))
	}
	if g.Geographic && !fw.pts.reach.anyRow(g, r0, r1) {
		// Every cell of the band lies beyond maxD (the reach box's
		// promise): in no cut's runs. Most of a global grid, for a
		// species of one region.
		for k := range r1 - r0 {
			rowDone(r0+k, fw.runs[k].finish(g.Width))
		}
		return
	}
	fw.steps.measure(g, r0, r1-r0)
	for a := 0; a < g.Width; a += fw.cols {
		e := min(a+fw.cols, g.Width)
		fw.window(r0, r1, a, e)
		for k := range r1 - r0 {
			fw.runs[k].add(fl.row(k, a, e), a)
		}
	}
	for k := range r1 - r0 {
		rowDone(r0+k, fw.runs[k].finish(g.Width))
	}
}

// window classifies the cells of band rows [r0, r1), columns [a, e): the
// field and the points then hold columns [a-1, e+1) (within the grid),
// the column west of the window with the classes and rooms the previous
// window left there (walkTile passes rooms from it), the one east of it
// unclassified (room 0), as in a whole band.
func (fw *fieldWorker) window(r0, r1, a, e int) {
	g, fl, pts := fw.b.g, fw.fl, fw.pts
	n := r1 - r0
	if a > 0 {
		for k := range n {
			fw.carryCls[k], fw.carryRoom[k] = fl.cell(k, a-1)
		}
	}
	// Every window of the grid fits the buffers of the first.
	lo, hi, most := max(a-1, 0), min(e+1, g.Width), min(fw.cols+2, g.Width)
	fl.window(lo, hi, most)
	if a > 0 {
		for k := range n {
			fl.set(k, a-1, fw.carryCls[k], fw.carryRoom[k])
		}
	}
	pts.window(g, lo, hi, most)
	for k := range n {
		pts.prepareRow(g, r0+k, k)
	}
	if !g.Geographic && n > 2 {
		// Every tile of the window is probed at its centre and corners
		// (wholeTile): all in one call.
		ks, cs := pts.probeKs[:0], pts.probeCs[:0]
		for c0 := a; c0 < e && c0+2 < g.Width; c0 += tileSide {
			c1 := min(c0+tileSide, g.Width)
			kc, k1 := (r0+r1)/2-r0, r1-1-r0
			ks = append(ks, kc, 0, 0, k1, k1)
			cs = append(cs, (c0+c1)/2, c0, c1-1, c0, c1-1)
		}
		pts.makeCells(ks, cs)
		pts.probeKs, pts.probeCs = ks, cs
	}
	for c0 := a; c0 < e; c0 += tileSide {
		fw.classify(r0, r1, c0, min(c0+tileSide, g.Width), nil)
	}
}

// classify classifies the tile of rows [t0, t1), columns [c0, c1): whole
// when one query settles it, else in quarters down to walkSide, else
// cell by cell (see distanceField).
func (fw *fieldWorker) classify(t0, t1, c0, c1 int, near *geodesy.Near) {
	fs, fl, steps := fw.fs, fw.fl, fw.steps
	hi, rho := math.Inf(1), 0.0
	if t1-t0 > 2 && c1-c0 > 2 {
		var ok bool
		ok, hi, rho = fw.b.wholeTile(fs, fl, fw.pts, near, t0, t1, c0, c1, fw.rhos)
		if ok {
			return
		}
		if t1-t0 > walkSide && c1-c0 > walkSide {
			if near == nil && !math.IsInf(hi, 1) {
				// The sites that may be nearest to some cell of the
				// tile serve its quarters.
				near = &steps.none
				if fs.ix.NearSitesUpTo(&fl.centre, hi+2*rho, maxNear, &steps.outer) {
					near = &steps.outer
				}
			}
			tm, cm := (t0+t1)/2, (c0+c1)/2
			fw.classify(t0, tm, c0, cm, near)
			fw.classify(t0, tm, cm, c1, near)
			fw.classify(tm, t1, c0, cm, near)
			fw.classify(tm, t1, cm, c1, near)
			return
		}
	}
	walkTile(fs, fl, fw.pts, steps, near, t0, t1, c0, c1, hi, rho)
}

// rowCuts gathers the runs of one row for each of m cuts (ascending) from
// each cell's class (the first cut at or above its distance; m beyond
// every cut), window by window from west to east. Cut runs nest, so one
// scan tracking the class opens and closes them.
type rowCuts struct {
	near []rowRuns
	open []int32 // where each open run began
	prev int     // the class of the last cell added
}

// start begins a row.
func (r *rowCuts) start(m int) {
	r.near = make([]rowRuns, m)
	if cap(r.open) < m {
		r.open = make([]int32, m)
	}
	r.open = r.open[:m]
	r.prev = m
}

// add takes the classes of the row's next cells, from column c0 on.
func (r *rowCuts) add(classes []uint16, c0 int) {
	prev := r.prev
	for i, k := range classes {
		cls := int(k)
		if cls == prev {
			continue
		}
		c := int32(c0 + i)
		if cls < prev {
			for j := cls; j < prev; j++ {
				r.open[j] = c
			}
		} else {
			for j := prev; j < cls; j++ {
				r.near[j] = append(r.near[j], r.open[j], c)
			}
		}
		prev = cls
	}
	r.prev = prev
}

// finish closes the runs still open at the row's end, width, and returns
// the row's runs for each cut.
func (r *rowCuts) finish(width int) []rowRuns {
	for j := r.prev; j < len(r.near); j++ {
		r.near[j] = append(r.near[j], r.open[j], int32(width))
	}
	near := r.near
	r.near = nil
	return near
}

// field is one worker's window of a band of a distance field: the class
// of each cell of the band's rows in the window's columns (see rowCuts),
// with the cuts.
type field struct {
	cuts []float64
	maxD float64
	w    int // grid width
	band int // the band's first grid row
	// The columns held, [off, off+stride): band row k, column c at
	// k*stride + c - off.
	off, stride int
	cls         []uint16
	// room of each classified cell of the window (same layout): d(x) lies
	// in an interval I with every value within room of I in the cell's
	// class; 0 where unknown (cells not yet classified, cells classified
	// by exact distances on a cut, cells beyond every cut without a
	// bound).
	room []float64
	// centre is the point of the last tile centre wholeTile bounded.
	centre geodesy.Point
}

// window makes the field hold columns [lo, hi) of the band's rows, every
// cell unclassified (room 0); buffers it allocates hold most columns.
func (f *field) window(lo, hi, most int) {
	f.off, f.stride = lo, hi-lo
	n := tileSide * f.stride
	f.cls, f.room = resize(f.cls, n, tileSide*most), resize(f.room, n, tileSide*most)
	clear(f.room)
}

// row returns the classes of band row k, columns [c0, c1).
func (f *field) row(k, c0, c1 int) []uint16 {
	i := k*f.stride - f.off
	return f.cls[i+c0 : i+c1]
}

// cell returns the class and room of band row k, column c.
func (f *field) cell(k, c int) (uint16, float64) {
	i := k*f.stride + c - f.off
	return f.cls[i], f.room[i]
}

// set gives band row k, column c class cls and room room.
func (f *field) set(k, c int, cls uint16, room float64) {
	i := k*f.stride + c - f.off
	f.cls[i], f.room[i] = cls, room
}

// gap is classGap for the field's cuts.
func (f *field) gap(lo, hi float64) (room float64, cls int) {
	return classGap(f.cuts, lo, hi)
}

// fill gives class cls and room room to the cells of grid rows [r0, r1),
// columns [c0, c1).
func (f *field) fill(r0, r1, c0, c1 int, cls int, room float64) {
	k := uint16(cls)
	for r := r0; r < r1; r++ {
		i := (r-f.band)*f.stride - f.off
		row, rm := f.cls[i+c0:i+c1], f.room[i+c0:i+c1]
		for c := range row {
			row[c] = k
			rm[c] = room
		}
	}
}

// classGap returns how far the interval [lo, hi] lies from the nearest
// cut: min over cuts c of lo - c (c < lo) or c - hi (c >= hi), and 0 when a
// cut lies in [lo, hi). For lo = hi = d it is min |d - c|. A distance
// within the gap of the interval is in the same class as every point of
// it. cls is the index of the first cut at or above lo (len(cuts) when
// none): the class of every value of [lo, hi] when the gap is positive.
func classGap(cuts []float64, lo, hi float64) (gap float64, cls int) {
	// cuts are ascending: the first at or above lo, and the one before it.
	i := sort.SearchFloat64s(cuts, lo)
	m := math.Inf(1)
	if i < len(cuts) {
		if cuts[i] < hi {
			return 0, i
		}
		m = cuts[i] - hi
	}
	if i > 0 {
		m = math.Min(m, lo-cuts[i-1])
	}
	return m, i
}

// wholeTile classifies the tile of rows [r0,r1) and columns [c0,c1) with
// one query when it can, and reports whether it did. pts holds the rows
// of the field's band. When it did not, hi bounds the centre
// cell's distance from above and rho the distance from the centre cell to
// any cell of the tile (hi is +Inf when either is unknown).
func (b *builder) wholeTile(fs *fieldSites, fl *field, pts *bandPoints, near *geodesy.Near, r0, r1, c0, c1 int, rhos *tileRadii) (settled bool, hi, rho float64) {
	g := b.g
	band, maxD := fl.band, fl.maxD
	kc, cc := (r0+r1)/2-band, (c0+c1)/2
	// The centre and the corners, in one transformation on a projected
	// grid.
	k0, k1 := r0-band, r1-1-band
	pts.makeCells([]int{kc, k0, k0, k1, k1}, []int{cc, c0, c1 - 1, c0, c1 - 1})
	clat, clon := pts.ll(kc, cc)
	if math.IsNaN(clat) {
		return false, math.Inf(1), 0
	}
	// On latitude-longitude grids, tiles of one shape in one band have the
	// same radius (to rounding far inside the margin below): it is
	// computed once per band and shape.
	key := [3]int{r0 - band, r1 - band, c1 - c0}
	rho, known := rhos.get(key)
	if !known {
		for _, k := range []int{r0 - band, r1 - 1 - band} {
			for _, c := range []int{c0, c1 - 1} {
				lat, lon := pts.ll(k, c)
				if math.IsNaN(lat) {
					return false, math.Inf(1), 0
				}
				rho = math.Max(rho, sphereDistance(clat, clon, lat, lon))
			}
		}
		// Corner cells are the farthest from the centre cell on these
		// small, convex tiles. The great-circle distance on a sphere of the
		// equatorial radius is within 0.35% of the geodesic (the
		// ellipsoid's radii of curvature lie between b^2/a and a^2/b); the
		// factor covers that and the curvature of the tile's edges.
		rho = rho*1.02 + 1
		if g.Geographic {
			rhos.put(key, rho)
		}
	}
	// Bounds from the chord stage settle most tiles without a geodesic;
	// any value in [lo, hi] is then in the class of every cell.
	// A cell x of the tile has d(x) within rho of the centre's interval:
	// its room is the interval's gap less rho (0 when unknown).
	cls, cellRoom := len(fl.cuts), 0.0
	pt := pts.at(kc, cc)
	fl.centre = pt
	lo, hi, ok := 0.0, 0.0, false
	if near != nil {
		lo, hi, ok = near.QuickBounds(&pt)
	}
	if !ok {
		lo, hi = pts.bounds(fs.ix, &pt, fs.reach(maxD+rho))
	}
	lo = fs.lower(lo)
	if !math.IsInf(hi, 1) {
		// (lo - rho > maxD gives a gap above rho: every cut is below.)
		if room, k := fl.gap(lo, hi); room > rho {
			cls, cellRoom = k, room-rho
		} else if room+(hi-lo) <= rho && hi-rho <= maxD {
			// The exact distance lies in [lo, hi], so its gap from the
			// cuts is at most room + (hi - lo), and it is at most hi: it
			// would not settle the tile either.
			return false, hi, rho
		} else {
			_, d := fs.exact.NearestAt(&pt, maxD+rho)
			room, k := fl.gap(d, d)
			if !(d-rho > maxD) && !(room > rho) {
				return false, fs.reach(d), rho
			}
			if !(d-rho > maxD) {
				cls, cellRoom = k, room-rho
			}
		}
	}
	fl.fill(r0, r1, c0, c1, cls, cellRoom)
	return true, hi, rho
}

// tileRadii holds the radius of each tile shape of a band (wholeTile):
// the few shapes a band has (tiles of tileSide and their quarters, and
// the narrower ones at the grid's east edge) in a short list, looked up
// in order.
type tileRadii struct {
	keys [16][3]int
	rho  [16]float64
	n    int
}

func (t *tileRadii) get(key [3]int) (float64, bool) {
	for i := 0; i < t.n; i++ {
		if t.keys[i] == key {
			return t.rho[i], true
		}
	}
	return 0, false
}

// put records a radius; beyond the list's room it is not kept (and is
// measured again when asked).
func (t *tileRadii) put(key [3]int, rho float64) {
	if t.n < len(t.keys) {
		t.keys[t.n], t.rho[t.n] = key, rho
		t.n++
	}
}

// sphereDistance is the great-circle distance in metres between two points
// on a sphere of WGS84's equatorial radius (haversine formula; Sinnott
// 1984, Sky & Telescope 68:159). It bounds tile radii cheaply, with no call
// into PROJ.
func sphereDistance(lat1, lon1, lat2, lon2 float64) float64 {
	const rad = math.Pi / 180
	dlat, dlon := (lat2-lat1)*rad, (lon2-lon1)*rad
	h := math.Sin(dlat/2)*math.Sin(dlat/2) + math.Cos(lat1*rad)*math.Cos(lat2*rad)*math.Sin(dlon/2)*math.Sin(dlon/2)
	return 2 * geodesy.SemiMajor * math.Asin(math.Min(1, math.Sqrt(h)))
}

// walkTile classifies the cells of grid rows [t0,t1) and columns [c0,c1)
// of the field's band, row after row, querying only where needed. A query
// at cell y gives the class of d(y) with a room g: every value within g
// of d(y) is in that class (g = gap(lo, hi) from the bounds, or gap(d, d)
// from the exact distance).
// The distance is 1-Lipschitz, so a neighbour x at geodesic step s from y
// is in D's class with room g - s while that stays positive; each cell
// takes the largest room offered by its left, upper-left, upper and
// upper-right neighbours (on latitude-longitude grids, where those steps
// are the same along a row; elsewhere only the left one, measured) and is
// queried when none is left. The neighbours may lie in tiles of the band
// classified before (walked, or settled whole with the room of wholeTile),
// so rooms pass across tile edges; cells not classified yet have room 0.
// Near a cut the rooms are small and every cell is queried; a little way
// off, one query settles a cone of cells below and to the right. tileHi
// and tileRho are wholeTile's for this tile, or +Inf and 0 (see
// nearSites; near, the enclosing tile's list, serves when it is not
// empty); the tile's sites are listed at its first query, and a
// cell's bounds then come from the smallest straight distance to them
// (Near.StraightBounds: a lower bound a few metres short at hundreds of
// kilometres, which costs a cell an exact query only in the rare case
// that a cut lies in those metres). Cells
// outside the reach box (pts.in) are farther than maxD.
func walkTile(fs *fieldSites, fl *field, pts *bandPoints, st *bandSteps, near *geodesy.Near, t0, t1, c0, c1 int, tileHi, tileRho float64) {
	band, maxD, m, w := fl.band, fl.maxD, len(fl.cuts), fl.w
	// The field holds columns [o, o+s): column c of a row is at c - o.
	o, s := fl.off, fl.stride
	// An empty list (steps.none: the enclosing tile's was too long) is
	// tried again for this smaller tile, with the longer limit.
	listed := near != nil && near.Len() > 0
	if !pts.perRow {
		// Every cell of the tile's rows and their left neighbours, in
		// one call (the rows' make below finds them made).
		pts.makeRect(t0-band, t1-band, max(c0-1, 0), c1)
	}
	for r := t0; r < t1; r++ {
		k := r - band
		if !pts.perRow {
			// Every cell of the walked row is read (pts.in), and its left
			// neighbour for the first step: made in one call.
			pts.make(k, max(c0-1, 0), c1)
		}
		hs := st.h[k]
		up := k > 0 && st.v[k-1] >= 0
		vs, ds := 0.0, 0.0
		var prevCls []uint16
		var prevRoom []float64
		if up {
			vs, ds = st.v[k-1], st.diag[k-1]
			prevCls, prevRoom = fl.cls[(k-1)*s:k*s], fl.room[(k-1)*s:k*s]
		}
		row, rooms := fl.cls[k*s:(k+1)*s], fl.room[k*s:(k+1)*s]
		for c := c0; c < c1; c++ {
			x := c - o
			rooms[x] = 0
			if !pts.in(k, c) {
				row[x] = uint16(m)
				continue
			}
			// The largest room a neighbour passes on.
			room, d := 0.0, uint16(0)
			if c > 0 && rooms[x-1] > 0 {
				step := hs
				if step < 0 {
					step = pts.stepUpper(k, c)
				}
				if g := rooms[x-1] - step; g > room {
					room, d = g, row[x-1]
				}
			}
			if up {
				if g := prevRoom[x] - vs; g > room {
					room, d = g, prevCls[x]
				}
				if c > 0 {
					if g := prevRoom[x-1] - ds; g > room {
						room, d = g, prevCls[x-1]
					}
				}
				if c+1 < w {
					if g := prevRoom[x+1] - ds; g > room {
						room, d = g, prevCls[x+1]
					}
				}
			}
			if room <= 0 {
				// Bounds first; the exact distance only when a cut lies
				// between them. Any value in [lo, hi] is then in the
				// cell's class.
				if !listed {
					near, listed = st.nearSites(fs, maxD, pts, band, t0, t1, c0, c1, tileHi, tileRho), true
				}
				pt := pts.at(k, c)
				lo, hi, ok := 0.0, 0.0, false
				if near != nil {
					lo, hi, ok = near.StraightBounds(&pt)
				}
				if !ok {
					lo, hi = pts.bounds(fs.ix, &pt, fs.reach(maxD))
				}
				lo = fs.lower(lo)
				if math.IsInf(hi, 1) {
					row[x] = uint16(m)
					continue
				}
				var k int
				room, k = fl.gap(lo, hi)
				if !(room > 0) {
					_, dist := fs.exact.NearestAt(&pt, maxD)
					if math.IsInf(dist, 1) {
						row[x] = uint16(m)
						continue
					}
					room, k = fl.gap(dist, dist)
				}
				d = uint16(k)
				// The query's room reaches back too: the cells of the row
				// to its left (same class, classified before) get the
				// larger room, which the next row takes from above.
				if hs >= 0 {
					for j, g := x-1, room-hs; j >= c0-o && g > rooms[j] && row[j] == d; j, g = j-1, g-hs {
						rooms[j] = g
					}
				}
			}
			row[x] = d
			rooms[x] = room
		}
	}
}

// bandSteps holds the geodesic steps between neighbouring cell centres of
// a band on a latitude-longitude grid (the same all along a row; -1
// elsewhere, where walkTile measures the horizontal steps it needs and
// passes no room between rows), and walkTile's scratch.
type bandSteps struct {
	h       []float64 // band row k: between horizontal neighbours
	v, diag []float64 // between band rows k and k+1: vertical, diagonal neighbours
	near    geodesy.Near
	outer   geodesy.Near // the sites of a tile whose quarters are classified
	none    geodesy.Near // empty: the tile had too many
}

// maxNear is the longest list of sites a split tile's quarters are
// bounded against (Near.QuickBounds, two squared chords a site); with
// more, they are bounded from the index's tree and their walked tiles
// list their own sites.
const maxNear = 32

// maxWalkNear is the longest list of sites walkTile bounds its cells
// against (Near.StraightBounds, one squared chord a site); with more, each
// cell's bounds come from the index's tree. A tree query on a long region
// boundary (sites every cell side) costs far more than its hundred-odd
// chords: on the 27-million-cell benchmark study's 60-extent family (region
// buffers every 20 km to 300 km), 128 sent 368,000 of the region field's
// 604,000 walked queries to the tree and the field took 0.64 s of CPU;
// 256 sends 14,000 and it takes 0.54 s (192 to 512 alike; the point
// buffers' field, whose walked tiles use their enclosing tile's short list,
// and the 13-extent family are unchanged). Only which bound a cell gets
// changes, never its class.
const maxWalkNear = 256

// nearSites returns the sites that may be nearest to some cell of the tile
// of band rows [t0,t1) and columns [c0,c1): with c its centre cell, rho a
// bound on the distance from c to any cell of the tile and hi a bound on
// c's nearest distance (both wholeTile's when hi is finite, else measured
// as wholeTile does), every site within hi + 2 rho of c, since a cell x has d(x) <= d(c) + rho and its nearest site lies within
// rho + d(x) of c. The list is empty (so unused) when it would be longer
// than maxWalkNear, when a coordinate is missing, or when no site lies within
// maxD + rho of c (then no cell has one within maxD): nearSites then
// returns nil.
func (st *bandSteps) nearSites(fs *fieldSites, maxD float64, pts *bandPoints, band, t0, t1, c0, c1 int, hi, rho float64) *geodesy.Near {
	kc, cc := (t0+t1)/2-band, (c0+c1)/2
	pt := pts.at(kc, cc)
	if !math.IsInf(hi, 1) {
		return st.listNear(fs.ix, &pt, hi+2*rho)
	}
	clat, clon := pts.ll(kc, cc)
	if math.IsNaN(clat) {
		return nil
	}
	for _, k := range []int{t0 - band, t1 - 1 - band} {
		for _, c := range []int{c0, c1 - 1} {
			lat, lon := pts.ll(k, c)
			if math.IsNaN(lat) {
				return nil
			}
			rho = math.Max(rho, sphereDistance(clat, clon, lat, lon))
		}
	}
	rho = rho*1.02 + 1
	_, hi = pts.bounds(fs.ix, &pt, fs.reach(maxD+rho))
	if math.IsInf(hi, 1) || math.IsNaN(hi) {
		return nil
	}
	return st.listNear(fs.ix, &pt, hi+2*rho)
}

// listNear lists the sites within radius of pt, or returns nil when they
// are more than maxWalkNear.
func (st *bandSteps) listNear(ix *geodesy.Index, pt *geodesy.Point, radius float64) *geodesy.Near {
	if !ix.NearSitesUpTo(pt, radius, maxWalkNear, &st.near) {
		return nil
	}
	return &st.near
}

func newBandSteps() *bandSteps {
	st := &bandSteps{h: make([]float64, tileSide), v: make([]float64, tileSide), diag: make([]float64, tileSide)}
	return st
}

// measure fills the steps of the band's rows [r0, r0+n): those between
// the cells of columns 0 and 1, the same all along each row.
func (st *bandSteps) measure(g *Grid, r0, n int) {
	for k := 0; k < tileSide; k++ {
		st.h[k], st.v[k], st.diag[k] = -1, -1, -1
	}
	if !g.Geographic || g.Width < 2 {
		return
	}
	// Each step is rounded up far beyond PROJ's error, so that a room is
	// never overstated.
	up := func(s float64) float64 { return s*(1+1e-9) + 1e-6 }
	for k := 0; k < n; k++ {
		// The coordinates bandPoints gives these cells (ll).
		lon0, lat := g.Centre(0, r0+k)
		lon1, _ := g.Centre(1, r0+k)
		st.h[k] = up(geodesy.Distance(lat, lon0, lat, lon1))
		if k+1 < n {
			_, next := g.Centre(0, r0+k+1)
			st.v[k] = up(geodesy.Distance(lat, lon0, next, lon0))
			// Both diagonals have this length: the grid is symmetric
			// about every meridian through a cell centre.
			st.diag[k] = up(geodesy.Distance(lat, lon0, next, lon1))
		}
	}
}

// reachBox is a conservative longitude/latitude box around sites expanded
// by a distance: cells outside it are certainly farther than the distance.
type reachBox struct {
	south, north float64
	lonC, lonH   float64 // centre and half-width of the longitude span; lonH >= 180 means all
}

func newReach(lats, lons []float64, maxD float64) reachBox {
	south, north := 90.0, -90.0
	for _, la := range lats {
		south = math.Min(south, la)
		north = math.Max(north, la)
	}
	// 1 degree of latitude is at least 110.57 km on WGS84 (at the equator).
	dlat := maxD/110000 + 1e-9
	rb := reachBox{south: south - dlat, north: north + dlat}
	polar := math.Max(math.Abs(rb.south), math.Abs(rb.north))
	if polar >= 89 {
		rb.lonH = 360
		return rb
	}
	// Smallest longitude arc holding all sites: sort and find the largest gap.
	ls := append([]float64(nil), lons...)
	for i := range ls {
		ls[i] = math.Mod(math.Mod(ls[i], 360)+360, 360)
	}
	sort.Float64s(ls)
	gap, at := 360-ls[len(ls)-1]+ls[0], len(ls)-1
	for i := 1; i < len(ls); i++ {
		if d := ls[i] - ls[i-1]; d > gap {
			gap, at = d, i-1
		}
	}
	start := ls[(at+1)%len(ls)]
	span := 360 - gap
	// One degree of longitude at latitude phi is at least
	// 111.0 km * cos(phi) on WGS84 (the prime-vertical radius exceeds the
	// equatorial-sphere value times 0.9966 only near the poles, which are
	// excluded above).
	dlon := maxD/(110000*math.Cos(polar*math.Pi/180)) + 1e-9
	rb.lonC = start + span/2
	rb.lonH = span/2 + dlon
	return rb
}

// anyRow reports whether a row of [r0, r1) of a latitude-longitude grid
// g has its latitude in the box.
func (r reachBox) anyRow(g *Grid, r0, r1 int) bool {
	for row := r0; row < r1; row++ {
		if _, lat := g.Centre(0, row); r.hasLat(lat) {
			return true
		}
	}
	return false
}

// hasLat reports whether latitude lat is in the box's range.
func (r reachBox) hasLat(lat float64) bool { return lat >= r.south && lat <= r.north }

func (r reachBox) has(lon, lat float64) bool {
	if lat < r.south || lat > r.north {
		return false
	}
	if r.lonH >= 180 {
		return true
	}
	d := math.Mod(math.Abs(lon-r.lonC), 360)
	if d > 180 {
		d = 360 - d
	}
	return d <= r.lonH
}

// bandPoints prepares the cells of a window of a band of rows (columns
// [off, end) of tileSide rows, set by window) for index queries: on a
// latitude-longitude grid every row is one parallel and every column one
// meridian, so a cell's point costs a few multiplications from its row's
// geodesy.Parallel and its column's sine and cosine (computed once per
// window); elsewhere each queried cell is prepared on its own, and its
// coordinates are transformed to WGS84 only when the field first reads
// them (ll, make): a tile settled whole reads its centre and corner cells
// alone, so most cells are never transformed (one PROJ transform, about
// 0.3 µs, was most of the field's cost on a projected grid). A cell's
// coordinates are the same numbers whether it is transformed alone or
// with its row (Grid.ToLonLat converts each point on its own), and
// whatever the window. It also keeps the last chord-nearest site as the
// hint of the next bounds query: cells queried one after another are
// neighbours, with the same nearest site or one close to it. Columns are
// the grid's throughout; the slices hold column c at c - off.
type bandPoints struct {
	off, end       int         // the columns held
	lons, lats     [][]float64 // the band's rows (projected grids)
	rows           []geodesy.Parallel
	perRow         bool // rows are parallels and columns meridians
	rowLat         [tileSide]float64
	colLon         []float64 // each column's longitude (perRow)
	colSin, colCos []float64 // sine and cosine of each column's longitude
	colIn          []bool    // whether the column's longitude is in the reach box
	colOff         int       // the first column of colLon; -1 before the first window
	rowIn          [tileSide]bool
	reach          reachBox
	hint           int
	// Projected grids: the grid, each band row's grid row, and whether
	// each cell's coordinates are made yet.
	g     *Grid
	rowOf [tileSide]int
	have  [][]bool
	// stepUpper's last cell, when stepOK: band row stepK, column stepC,
	// and its ECEF position.
	stepOK       bool
	stepK, stepC int
	stepP        [3]float64
	// makeCells' scratch: the coordinates it transforms and their cells;
	// the band's probe cells (distanceField) and a walked tile's
	// (makeRect).
	gx, gy           []float64
	gk, gc           []int
	probeKs, probeCs []int
	rectKs, rectCs   []int
}

// newBandPoints returns points with no window yet; reach is the box
// outside which cells are certainly beyond the field's distances (in).
func newBandPoints(reach reachBox) *bandPoints {
	return &bandPoints{
		lons: make([][]float64, tileSide), lats: make([][]float64, tileSide),
		have: make([][]bool, tileSide), rows: make([]geodesy.Parallel, tileSide),
		colOff: -1, hint: -1, reach: reach,
	}
}

// window makes columns [lo, hi) of the grid the ones the band's rows
// hold; prepareRow then prepares each row. On a latitude-longitude grid
// the columns' longitudes are computed when the window moves. Buffers it
// allocates hold most columns.
func (p *bandPoints) window(g *Grid, lo, hi, most int) {
	p.off, p.end = lo, hi
	n := hi - lo
	p.perRow = g.Geographic
	p.stepOK = false
	if p.perRow {
		if p.colOff == lo && len(p.colLon) == n {
			return
		}
		p.colOff = lo
		p.colLon, p.colSin, p.colCos = resize(p.colLon, n, most), resize(p.colSin, n, most), resize(p.colCos, n, most)
		p.colIn = resize(p.colIn, n, most)
		for i := range n {
			// Grid.RowLonLat's longitude of the column: its centre's.
			lon, _ := g.Centre(lo+i, 0)
			p.colLon[i] = lon
			p.colSin[i], p.colCos[i] = math.Sincos(lon * math.Pi / 180)
			// has is separable on such grids: the latitude test in
			// prepareRow, the longitude test here.
			p.colIn[i] = p.reach.has(lon, p.reach.south)
		}
		return
	}
	p.g = g
	for k := range tileSide {
		p.lons[k], p.lats[k], p.have[k] = resize(p.lons[k], n, most), resize(p.lats[k], n, most), resize(p.have[k], n, most)
	}
}

// resize returns s with length n, reallocated (with capacity for most
// elements, or n when more) only when its capacity is short; its contents
// are then not kept.
func resize[T any](s []T, n, most int) []T {
	if cap(s) < n {
		return make([]T, n, max(n, most))
	}
	return s[:n]
}

// stepUpper returns an upper bound on the geodesic distance between the
// centres of cells (band row k, column c-1) and (k, c) of a projected
// grid, both with coordinates (see in): geodesy.ChordUpper of their ECEF
// positions (under 0.1 mm above the geodesic for cells up to 10 km wide),
// which costs two sines and cosines per cell where the geodesic itself
// costs an inverse problem. A step overstated only shortens the room a
// cell passes on; one understated would overstate it. walkTile asks for
// the steps of a row from left to right, so the left cell's position is
// usually the one the previous call made.
func (p *bandPoints) stepUpper(k, c int) float64 {
	i := c - p.off
	if !p.stepOK || p.stepK != k || p.stepC != c-1 {
		p.stepP = geodesy.ECEF(p.lats[k][i-1], p.lons[k][i-1])
	}
	cur := geodesy.ECEF(p.lats[k][i], p.lons[k][i])
	s := geodesy.ChordUpper(&p.stepP, &cur)
	p.stepOK, p.stepK, p.stepC, p.stepP = true, k, c, cur
	return s
}

// prepareRow makes band row k the window's cells of grid row r. On a
// latitude-longitude grid the row's longitudes are the window's columns'
// (shared by every row) and its latitude is one number; on a projected
// one its cells are made on demand.
func (p *bandPoints) prepareRow(g *Grid, r, k int) {
	if !p.perRow {
		p.rowOf[k] = r
		clear(p.have[k])
		if p.stepK == k {
			p.stepOK = false
		}
		return
	}
	_, lat := g.Centre(0, r)
	p.rowLat[k] = lat
	p.rows[k] = geodesy.NewParallel(lat)
	p.rowIn[k] = p.reach.hasLat(lat)
}

// make transforms the cells of band row k in columns [c0, c1) that have
// no coordinates yet (projected grids), each run of them in one call.
func (p *bandPoints) make(k, c0, c1 int) {
	have, lons, lats, r := p.have[k], p.lons[k], p.lats[k], p.rowOf[k]
	for i, e := c0-p.off, c1-p.off; i < e; {
		if have[i] {
			i++
			continue
		}
		a := i
		for i < e && !have[i] {
			lons[i], lats[i] = p.g.Centre(p.off+i, r)
			have[i] = true
			i++
		}
		p.g.ToLonLat(lons[a:i], lats[a:i], lons[a:i], lats[a:i])
	}
}

// makeCells makes, in one call, the coordinates of the cells (band row
// ks[i], column cs[i]) that have none yet (projected grids; a no-op on
// latitude-longitude ones): the few cells a tile is probed at (its centre
// and corners) would otherwise cost a transformation call each, most of
// the time PROJ takes on such a grid. Each cell gets the coordinates make
// gives it.
func (p *bandPoints) makeCells(ks, cs []int) {
	if p.perRow {
		return
	}
	xs, ys, gk, gc := p.gx[:0], p.gy[:0], p.gk[:0], p.gc[:0]
	for i, k := range ks {
		c := cs[i]
		if p.have[k][c-p.off] {
			continue
		}
		p.have[k][c-p.off] = true // made below; a cell listed twice is made once
		x, y := p.g.Centre(c, p.rowOf[k])
		xs, ys, gk, gc = append(xs, x), append(ys, y), append(gk, k), append(gc, c)
	}
	if len(xs) > 0 {
		p.g.ToLonLat(xs, ys, xs, ys)
		for j, k := range gk {
			p.lons[k][gc[j]-p.off], p.lats[k][gc[j]-p.off] = xs[j], ys[j]
		}
	}
	p.gx, p.gy, p.gk, p.gc = xs, ys, gk, gc
}

// makeRect makes, in one call, the coordinates of the cells of band rows
// [k0, k1), columns [c0, c1) that have none yet (projected grids), as
// makeCells does.
func (p *bandPoints) makeRect(k0, k1, c0, c1 int) {
	ks, cs := p.rectKs[:0], p.rectCs[:0]
	for k := k0; k < k1; k++ {
		for c := c0; c < c1; c++ {
			if !p.have[k][c-p.off] {
				ks, cs = append(ks, k), append(cs, c)
			}
		}
	}
	p.makeCells(ks, cs)
	p.rectKs, p.rectCs = ks, cs
}

// ll returns the latitude and longitude of cell (band row k, column c),
// made first when they are not yet (projected grids).
func (p *bandPoints) ll(k, c int) (lat, lon float64) {
	i := c - p.off
	if p.perRow {
		return p.rowLat[k], p.colLon[i]
	}
	if !p.have[k][i] {
		p.make(k, c, c+1)
	}
	return p.lats[k][i], p.lons[k][i]
}

// in reports whether cell (band row k, column c) has coordinates and lies
// in the reach box.
func (p *bandPoints) in(k, c int) bool {
	if p.perRow {
		return p.rowIn[k] && p.colIn[c-p.off]
	}
	lat, lon := p.ll(k, c)
	return !math.IsNaN(lat) && p.reach.has(lon, lat)
}

// at returns the point of cell (band row k, column c).
func (p *bandPoints) at(k, c int) geodesy.Point {
	if p.perRow {
		i := c - p.off
		return p.rows[k].Point(p.colLon[i], p.colSin[i], p.colCos[i])
	}
	return geodesy.NewPoint(p.ll(k, c))
}

// bounds is ix.TightBoundsAt at pt, started from the hint.
func (p *bandPoints) bounds(ix *geodesy.Index, pt *geodesy.Point, maxDist float64) (lo, hi float64) {
	lo, hi, slot := ix.TightBoundsAt(pt, maxDist, p.hint)
	if slot >= 0 {
		p.hint = slot
	}
	return lo, hi
}
