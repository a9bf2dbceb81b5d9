package nullmodel

import (
	"math"
	"sync"

	"areasweep/extent/geodesy"
)

// Centres fills lons and lats (length c1-c0) with the WGS84 longitude and
// latitude (degrees) of the centres of cells c0 <= c < c1 of row. A centre
// with no geographic position gets NaN. It must be safe for concurrent use
// and give the same coordinates for a cell whatever the range asked.
type Centres func(row, c0, c1 int, lons, lats []float64)

// Points fills lons and lats (the length of cols) with the WGS84
// longitude and latitude (degrees) of the centres of the cells (cols[k],
// rows[k]), NaN where a centre has no geographic position: for each cell
// the numbers Centres gives, bit for bit, whatever the other cells asked.
// It must be safe for concurrent use. Cells may lie outside the grid.
type Points func(cols, rows []int, lons, lats []float64)

// Field is the distance field of a set of sites (the training points) on a
// grid whose cell centres Centres gives. It is read-only and safe for
// concurrent use.
type Field struct {
	ix      *geodesy.Index
	centres Centres
	points  Points  // nil: from centres, one cell per call
	ll      *lonLat // set by NewLonLat: the fast path of Bracket
	// exactCentres makes Bracket take every centre from Centres, as
	// before interpolated centres (tests compare both).
	exactCentres bool
	// projOnce fills projPts, the projECEF position of each site, for
	// the projected path's chords.
	projOnce sync.Once
	projPts  [][3]float64
	// measureAll makes the projected path's anchors measure every
	// candidate site (no prunable), as before it (tests compare both).
	measureAll bool
}

// New returns the distance field of the sites of ix on the grid described by
// centres.
func New(ix *geodesy.Index, centres Centres) *Field {
	return &Field{ix: ix, centres: centres}
}

// NewPoints is New with points, which gives the same centres as centres
// for scattered cells in one call: Bracket transforms its lattice points
// and the cells it computes exactly through it (see bracketProjected).
func NewPoints(ix *geodesy.Index, centres Centres, points Points) *Field {
	return &Field{ix: ix, centres: centres, points: points}
}

// at fills lons and lats with the centres of cells (cols[k], rows[k]):
// Points, or Centres one cell at a time.
func (f *Field) at(cols, rows []int, lons, lats []float64) {
	if f.points != nil {
		f.points(cols, rows, lons, lats)
		return
	}
	for k := range cols {
		f.centres(rows[k], cols[k], cols[k]+1, lons[k:k+1], lats[k:k+1])
	}
}

// tileSide is the side, in cells, of the tiles Distances resolves with one
// nearest-site query.
const tileSide = 16

// maxCandidates is the largest number of candidate sites a tile is measured
// against (see measure); a tile with more is split in four.
const maxCandidates = 16

// scratch holds one call's coordinate and candidate buffers.
type scratch struct {
	lons, lats []float64
	cands      []int
	lb         []float64
	pending    []bool
	clo, chi   []float64 // Bracket's chord brackets
	left       []leftCell
	rowA, rowZ []float64 // Bracket's ECEF rows and columns
	colC, colS []float64
	cover      geodesy.Cover // Bracket's sites around a row of super-tiles
	// farPrune's geodesics between sites, and each candidate's bracket.
	fans         siteFans
	farLo, farHi []float64
	// Bracket's macro-tile lists of one call, by macro-tile (macroCands;
	// nil: none).
	macros map[[2]int][]int
	macroT map[int]float64 // by row of macro-tiles: T_M (NaN: none)
}

var scratchPool = sync.Pool{New: func() any { return new(scratch) }}

// Distances sets dist[y*w+x] (w*h values, row-major) to the geodesic
// distance in metres from the centre of cell (x0+x, y0+y) to the nearest
// site, for every cell whose need word is not zero (need nil: every cell);
// other cells, and cells whose centre has no geographic position, get NaN.
//
// Each distance equals ix.Nearest at the cell's centre bit for bit, however
// the block is cut: the block is walked in tiles of 16 x 16 cells. For a
// tile with centre cell c, nearest site s_1 at distance d_1 = s(c, s_1), and
// rho >= s(c, p) for every cell centre p of the tile, the triangle
// inequality gives, for the site s* nearest to p,
//
//	s(c, s*) <= s(c, p) + s(p, s*) <= rho + s(p, s_1) <= d_1 + 2 rho,
//
// so the sites the index lists within d_1 + 2 rho of c (geodesy.Index.Within)
// hold every cell's nearest site. With at most 16 of them the tile's cells
// are measured against those only (see measure: usually one geodesic per
// cell); otherwise the tile is split in four, down to single cells, which
// get a nearest-site query of their own.
// rho is the largest geodesic distance from c to a corner cell, times 1.02,
// plus 1 m: corner cells are the farthest on these small convex tiles, and
// the factor covers the curvature of the tiles' edges in the grid's CRS.
func (f *Field) Distances(x0, y0, w, h int, need []uint64, dist []float64) {
	sc := scratchPool.Get().(*scratch)
	defer scratchPool.Put(sc)
	n := w * h
	if cap(sc.lons) < n {
		sc.lons, sc.lats = make([]float64, n), make([]float64, n)
	}
	lons, lats := sc.lons[:n], sc.lats[:n]
	for y := range h {
		f.centres(y0+y, x0, x0+w, lons[y*w:(y+1)*w], lats[y*w:(y+1)*w])
	}
	t := tiler{f: f, w: w, need: need, lons: lons, lats: lats, dist: dist, sc: sc}
	for r0 := 0; r0 < h; r0 += tileSide {
		for c0 := 0; c0 < w; c0 += tileSide {
			t.tile(r0, min(r0+tileSide, h), c0, min(c0+tileSide, w))
		}
	}
}

// Fill sets dst to the null model's values on the block: minus the distance
// of Distances (written 0 - d so that a distance of 0 gives +0), NaN where
// Distances gives NaN.
func (f *Field) Fill(x0, y0, w, h int, need []uint64, dst []float64) {
	f.Distances(x0, y0, w, h, need, dst)
	for i, d := range dst[:w*h] {
		dst[i] = 0 - d
	}
}

// tiler is the state of one Distances call.
type tiler struct {
	f          *Field
	w          int
	need       []uint64
	lons, lats []float64
	dist       []float64
	sc         *scratch
}

func (t *tiler) needed(i int) bool { return t.need == nil || t.need[i] != 0 }

// tile resolves rows [r0,r1) and columns [c0,c1) of the block.
func (t *tiler) tile(r0, r1, c0, c1 int) {
	any := false
	for r := r0; r < r1; r++ {
		for c := c0; c < c1; c++ {
			i := r*t.w + c
			t.dist[i] = math.NaN()
			any = any || t.needed(i) && !math.IsNaN(t.lats[i])
		}
	}
	if !any {
		return
	}
	ix := t.f.ix
	if r1-r0 == 1 && c1-c0 == 1 {
		i := r0*t.w + c0
		_, t.dist[i] = ix.Nearest(t.lats[i], t.lons[i], 0)
		return
	}
	ci := (r0+r1)/2*t.w + (c0+c1)/2
	rho, ok := t.radius(ci, r0, r1, c0, c1)
	if ok {
		_, d1 := ix.Nearest(t.lats[ci], t.lons[ci], 0)
		t.sc.cands = ix.Within(t.lats[ci], t.lons[ci], d1+2*rho, t.sc.cands[:0])
		if n := len(t.sc.cands); n > 0 && n <= maxCandidates {
			t.measure(r0, r1, c0, c1, t.sc.cands)
			return
		}
	}
	quarters(r0, r1, c0, c1, t.tile)
}

// quarters calls tile on each non-empty quarter of rows [r0,r1) and
// columns [c0,c1) (a side of one cell is not split), in reading order.
func quarters(r0, r1, c0, c1 int, tile func(r0, r1, c0, c1 int)) {
	rm, cm := (r0+r1+1)/2, (c0+c1+1)/2
	if rm == r1 {
		rm = r0
	}
	if cm == c1 {
		cm = c0
	}
	for _, q := range [4][4]int{{r0, rm, c0, cm}, {r0, rm, cm, c1}, {rm, r1, c0, cm}, {rm, r1, cm, c1}} {
		if q[0] < q[1] && q[2] < q[3] {
			tile(q[0], q[1], q[2], q[3])
		}
	}
}

// radius returns rho for the tile with centre cell ci (see Distances), and
// false when a corner or the centre has no geographic position.
func (t *tiler) radius(ci, r0, r1, c0, c1 int) (float64, bool) {
	lat, lon := t.lats[ci], t.lons[ci]
	if math.IsNaN(lat) {
		return 0, false
	}
	rho := 0.0
	for _, r := range [2]int{r0, r1 - 1} {
		for _, c := range [2]int{c0, c1 - 1} {
			k := r*t.w + c
			if math.IsNaN(t.lats[k]) {
				return 0, false
			}
			rho = math.Max(rho, geodesy.Distance(lat, lon, t.lats[k], t.lons[k]))
		}
	}
	return rho*1.02 + 1, true
}

// measure sets the distance of every needed cell of the tile to its
// smallest distance to the candidate sites. It walks the tile row by row in
// alternating directions, so that consecutive cells are neighbours, and
// keeps an anchor cell p0 with, for every candidate k, a lower bound lb_k on
// s(p0, k) (exact for the nearest, b). At the next cell p, with
// L >= s(p0, p) (pathBound), the triangle inequality gives
//
//	s(p, b) <= lb_b + L,    s(p, k) >= lb_k - L,
//
// so while lb_k - lb_b > 2 L for every other k, b stays strictly nearest
// and p costs one geodesic. Otherwise p becomes the anchor: b and every k
// that the bound cannot exclude are measured exactly at p, and the others
// keep lb_k - L. The first cell measures every candidate. With one
// candidate every cell costs one geodesic.
func (t *tiler) measure(r0, r1, c0, c1 int, cands []int) {
	ix := t.f.ix
	n := len(cands)
	lb := t.sc.lb[:0]
	for range n {
		lb = append(lb, math.Inf(-1)) // unknown: measured at the first cell
	}
	t.sc.lb = lb
	have := false
	var p0lat, p0lon, gap float64
	b := 0 // index in cands of the nearest at the anchor
	for r := r0; r < r1; r++ {
		for j := c0; j < c1; j++ {
			c := j
			if (r-r0)%2 == 1 {
				c = c1 - 1 - (j - c0)
			}
			i := r*t.w + c
			lat, lon := t.lats[i], t.lons[i]
			if !t.needed(i) || math.IsNaN(lat) {
				continue
			}
			slat, slon := ix.Site(cands[b])
			if n == 1 && have {
				t.dist[i] = geodesy.Distance(lat, lon, slat, slon)
				continue
			}
			var l float64
			if have {
				l = pathBound(p0lat, p0lon, lat, lon)
				if gap > 2*l {
					t.dist[i] = geodesy.Distance(lat, lon, slat, slon)
					continue
				}
			}
			// New anchor at p: measure what the bounds cannot exclude.
			db := lb[b] + l // upper bound on s(p, b)
			for k := range n {
				if k == b && have || !have || lb[k]-l <= db {
					klat, klon := ix.Site(cands[k])
					lb[k] = geodesy.Distance(lat, lon, klat, klon)
				} else {
					lb[k] -= l
				}
			}
			b = 0
			for k := 1; k < n; k++ {
				if lb[k] < lb[b] {
					b = k
				}
			}
			gap = math.Inf(1)
			for k := range n {
				if k != b {
					gap = math.Min(gap, lb[k]-lb[b])
				}
			}
			t.dist[i] = lb[b]
			have, p0lat, p0lon = true, lat, lon
		}
	}
}

// pathBound returns an upper bound (m) on the geodesic distance between two
// points (degrees): the length of the path along the parallel of the first
// point to the second's meridian, N(phi1) cos(phi1) |dlambda|, then along
// that meridian, at most M_max |dphi| with M_max the largest meridian radius
// of curvature between the two latitudes (M grows with |phi|), plus 1e-6 of
// the total and 1 mm for rounding. Any path is at least as long as the
// geodesic.
func pathBound(lat1, lon1, lat2, lon2 float64) float64 {
	const rad = math.Pi / 180
	e2 := geodesy.Flattening * (2 - geodesy.Flattening)
	dlon := math.Abs(math.Remainder(lon2-lon1, 360)) * rad
	s1 := math.Sin(lat1 * rad)
	w1 := 1 - e2*s1*s1
	n1 := geodesy.SemiMajor / math.Sqrt(w1)
	sm := math.Sin(math.Max(math.Abs(lat1), math.Abs(lat2)) * rad)
	wm := 1 - e2*sm*sm
	mMax := geodesy.SemiMajor * (1 - e2) / (wm * math.Sqrt(wm))
	l := n1*math.Cos(lat1*rad)*dlon + mMax*math.Abs(lat2-lat1)*rad
	return l*(1+1e-6) + 1e-3
}

// farthestWindow is the most columns of a row FarthestBound holds at a
// time (rounded down to a multiple of its step), so that its memory does
// not grow with the grid's width.
const farthestWindow = 4096

// FarthestBound returns an upper bound on the distance (m) from the centre of
// any cell of a width x height grid to the nearest site: the largest d + rho
// over tiles of step x step cells (d at the tile's centre cell, rho as in
// Distances). It makes one nearest-site query per tile, so it costs about
// width*height/step^2 queries; tiles with no geographic position at their
// centre or a corner are skipped, so the bound covers the cells of the
// other tiles. It returns 0 when no tile can be measured. The tiles are
// taken a window of at most farthestWindow columns at a time.
func (f *Field) FarthestBound(width, height, step int) float64 {
	step = max(step, 1)
	win := max(step, farthestWindow/step*step)
	// The centres of a tile row's middle, top and bottom rows in the
	// window's columns, each computed into buffers kept from one window
	// to the next (fresh ones cost page faults); a row met twice in a
	// tile row is taken from the earlier slot.
	type slot struct {
		r, c0    int
		lon, lat []float64
	}
	var slots [3]slot
	for i := range slots {
		n := min(win, width)
		slots[i] = slot{r: -1, lon: make([]float64, n), lat: make([]float64, n)}
	}
	row := func(i, r, c0, c1 int) ([]float64, []float64) {
		for _, s := range slots[:i] {
			if s.r == r && s.c0 == c0 {
				return s.lon[:c1-c0], s.lat[:c1-c0]
			}
		}
		s := &slots[i]
		s.r, s.c0 = r, c0
		f.centres(r, c0, c1, s.lon[:c1-c0], s.lat[:c1-c0])
		return s.lon[:c1-c0], s.lat[:c1-c0]
	}
	far := 0.0
	for r0 := 0; r0 < height; r0 += step {
		r1 := min(r0+step, height)
		for a := 0; a < width; a += win {
			e := min(a+win, width)
			far = math.Max(far, f.farthestIn(row, r0, r1, a, e, step))
		}
	}
	return far
}

// farthestIn is FarthestBound's largest d + rho over the tiles of rows
// [r0, r1) and columns [a, e), the centres of row r in columns [a, e)
// given by row(slot, r, a, e) (indexed from a).
func (f *Field) farthestIn(row func(i, r, c0, c1 int) ([]float64, []float64), r0, r1, a, e, step int) float64 {
	mlon, mlat := row(0, (r0+r1)/2, a, e)
	tlon, tlat := row(1, r0, a, e)
	blon, blat := row(2, r1-1, a, e)
	far := 0.0
	for c0 := a; c0 < e; c0 += step {
		c1 := min(c0+step, e)
		i0, i1, ic := c0-a, c1-1-a, (c0+c1)/2-a
		lat, lon := mlat[ic], mlon[ic]
		if math.IsNaN(lat) {
			continue
		}
		rho, ok := 0.0, true
		for _, p := range [4][2]float64{{tlat[i0], tlon[i0]}, {tlat[i1], tlon[i1]}, {blat[i0], blon[i0]}, {blat[i1], blon[i1]}} {
			if math.IsNaN(p[0]) {
				ok = false
				break
			}
			rho = math.Max(rho, geodesy.Distance(lat, lon, p[0], p[1]))
		}
		if !ok {
			continue
		}
		_, d := f.ix.Nearest(lat, lon, 0)
		far = math.Max(far, d+rho*1.02+1)
	}
	return far
}
