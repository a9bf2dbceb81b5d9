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

// distanceField calls rowDone(row, near) once for every row of the grid,
// from several goroutines (never twice for a row): near[j] holds the runs
// of the row's cells whose geodesic distance from the cell centre to the
// nearest site of ix is at most cuts[j]. cuts are metres, ascending,
// unique and all <= maxD; the slices in near are the callee's to keep.
//
// Only the class of each cell matters: which of the cut distances the
// distance lies below. Each worker holds the distances of one band of
// tileSide rows at a time, never the whole grid. The distance
// function is 1-Lipschitz, which saves most queries:
//
//   - a tile of tileSide x tileSide cells gets one query at its centre cell,
//     D, and rho, the largest distance from that centre to a corner cell
//     (times a small safety factor); when every cut is farther than rho
//     from D, or D - rho > maxD, every cell of the tile is in D's class and
//     receives D; otherwise the tile is split in four and each quarter tried
//     the same way. D comes from the index's chord bounds [lo, hi] when they
//     settle the tile; the exact distance is measured only when it could
//     (some value of [lo, hi] would settle it), which is rare: the bounds
//     are within 0.17% of D, far narrower than rho;
//   - tiles of two cells or fewer a side have their rows walked: after an
//     exact query at distance D, the following cells whose summed
//     centre-to-centre steps stay below the gap between D and the nearest
//     cut receive D.
//
// The cost so stays near the buffers' edges instead of over their area.
// Queries go through prepared points (bandPoints), each bounds query
// starting from the previous one's chord-nearest site.
func (b *builder) distanceField(ix *geodesy.Index, reach reachBox, maxD float64, cuts []float64, rowDone func(row int, near []rowRuns)) {
	g := b.g
	gap := func(lo, hi float64) float64 { return intervalGap(cuts, lo, hi) }
	bands := make(chan int)
	var wg sync.WaitGroup
	for w := 0; w < runtime.GOMAXPROCS(0); w++ {
		wg.Add(1)
		go func() {
			defer wg.Done()
			lons := make([][]float64, tileSide)
			lats := make([][]float64, tileSide)
			steps := make([]float64, tileSide)
			for k := range lons {
				lons[k] = make([]float64, g.Width)
				lats[k] = make([]float64, g.Width)
			}
			dist := make([]float64, tileSide*g.Width)
			open := make([]int32, len(cuts))
			rhos := map[[3]int]float64{}
			pts := &bandPoints{lons: lons, lats: lats, rows: make([]geodesy.Parallel, tileSide), hint: -1}
			for r0 := range bands {
				clear(rhos)
				off := r0 * g.Width
				set := func(i int, d float64) { dist[i-off] = d }
				r1 := min(r0+tileSide, g.Height)
				for r := r0; r < r1; r++ {
					k := r - r0
					g.RowLonLat(r, lons[k], lats[k])
					pts.prepareRow(g, k)
					// On latitude-longitude grids the step between
					// neighbouring centres is the same along the row.
					steps[k] = -1
					if g.Geographic && g.Width > 1 {
						steps[k] = geodesy.Distance(lats[k][0], lons[k][0], lats[k][1], lons[k][1])
					}
				}
				var classify func(t0, t1, c0, c1 int)
				classify = func(t0, t1, c0, c1 int) {
					if t1-t0 > 2 && c1-c0 > 2 {
						if b.wholeTile(ix, maxD, gap, set, pts, r0, t0, t1, c0, c1, rhos) {
							return
						}
						tm, cm := (t0+t1)/2, (c0+c1)/2
						classify(t0, tm, c0, cm)
						classify(t0, tm, cm, c1)
						classify(tm, t1, c0, cm)
						classify(tm, t1, cm, c1)
						return
					}
					for r := t0; r < t1; r++ {
						k := r - r0
						walkRow(ix, reach, maxD, gap, set, pts, k, steps[k], r*g.Width, c0, c1)
					}
				}
				for c0 := 0; c0 < g.Width; c0 += tileSide {
					classify(r0, r1, c0, min(c0+tileSide, g.Width))
				}
				for r := r0; r < r1; r++ {
					k := r - r0
					rowDone(r, cutRuns(dist[k*g.Width:(k+1)*g.Width], cuts, open))
				}
			}
		}()
	}
	for r0 := 0; r0 < g.Height; r0 += tileSide {
		bands <- r0
	}
	close(bands)
	wg.Wait()
}

// cutRuns returns, for each cut j (ascending), the runs of the cells of a
// row whose distance is at most cuts[j]. Cut runs nest, so one scan
// tracking each cell's class (the first cut at or above its distance)
// opens and closes them; open is scratch of len(cuts).
func cutRuns(dist []float64, cuts []float64, open []int32) []rowRuns {
	m := len(cuts)
	near := make([]rowRuns, m)
	prev, lastD := m, math.NaN()
	for c, d := range dist {
		if d == lastD {
			continue
		}
		lastD = d
		cls := sort.SearchFloat64s(cuts, d)
		if cls == prev {
			continue
		}
		if cls < prev {
			for j := cls; j < prev; j++ {
				open[j] = int32(c)
			}
		} else {
			for j := prev; j < cls; j++ {
				near[j] = append(near[j], open[j], int32(c))
			}
		}
		prev = cls
	}
	for j := prev; j < m; j++ {
		near[j] = append(near[j], open[j], int32(len(dist)))
	}
	return near
}

// intervalGap is how far the interval [lo, hi] lies from the nearest cut:
// min over cuts c of lo - c (c < lo) or c - hi (c >= hi), and 0 when a cut
// lies in [lo, hi). For lo = hi = d it is min |d - c|. A distance within
// the gap of the interval is in the same class as every point of it.
func intervalGap(cuts []float64, lo, hi float64) float64 {
	// cuts are ascending: the first at or above lo, and the one before it.
	i := sort.SearchFloat64s(cuts, lo)
	m := math.Inf(1)
	if i < len(cuts) {
		if cuts[i] < hi {
			return 0
		}
		m = cuts[i] - hi
	}
	if i > 0 {
		m = math.Min(m, lo-cuts[i-1])
	}
	return m
}

// wholeTile classifies the tile of rows [r0,r1) and columns [c0,c1) with
// one query when it can, and reports whether it did. lons and lats hold
// the rows of the band starting at row band.
func (b *builder) wholeTile(ix *geodesy.Index, maxD float64, gap func(lo, hi float64) float64, set func(int, float64),
	pts *bandPoints, band, r0, r1, c0, c1 int, rhos map[[3]int]float64) bool {
	g := b.g
	lons, lats := pts.lons, pts.lats
	kc, cc := (r0+r1)/2-band, (c0+c1)/2
	clat, clon := lats[kc][cc], lons[kc][cc]
	if math.IsNaN(clat) {
		return false
	}
	// On latitude-longitude grids, tiles of one shape in one band have the
	// same radius (to rounding far inside the margin below): it is
	// computed once per band and shape.
	key := [3]int{r0 - band, r1 - band, c1 - c0}
	rho, known := rhos[key]
	if !known {
		for _, k := range []int{r0 - band, r1 - 1 - band} {
			for _, c := range []int{c0, c1 - 1} {
				if math.IsNaN(lats[k][c]) {
					return false
				}
				rho = math.Max(rho, sphereDistance(clat, clon, lats[k][c], lons[k][c]))
			}
		}
		// Corner cells are the farthest from the centre cell on these
		// small, convex tiles. The great-circle distance on a sphere of the
		// equatorial radius is within 0.35% of the geodesic (the
		// ellipsoid's radii of curvature lie between b^2/a and a^2/b); the
		// factor covers that and the curvature of the tile's edges.
		rho = rho*1.02 + 1
		if g.Geographic {
			rhos[key] = rho
		}
	}
	// Bounds from the chord stage settle most tiles without a geodesic;
	// any value in [lo, hi] is then in the class of every cell.
	d := math.Inf(1)
	pt := pts.at(kc, cc)
	if lo, hi := pts.bounds(ix, &pt, maxD+rho); !math.IsInf(hi, 1) && !(lo-rho > maxD) {
		if room := gap(lo, hi); room > rho {
			d = lo
		} else if room+(hi-lo) <= rho && hi-rho <= maxD {
			// The exact distance lies in [lo, hi], so its gap from the
			// cuts is at most room + (hi - lo), and it is at most hi: it
			// would not settle the tile either.
			return false
		} else {
			_, d = ix.NearestAt(&pt, maxD+rho)
			if !(d-rho > maxD) && !(gap(d, d) > rho) {
				return false
			}
		}
	}
	for r := r0; r < r1; r++ {
		base := r * g.Width
		for c := c0; c < c1; c++ {
			set(base+c, d)
		}
	}
	return true
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

// walkRow classifies cells [c0,c1) of one row (cells base+c), querying
// where needed and skipping ahead while the class cannot change.
func walkRow(ix *geodesy.Index, reach reachBox, maxD float64, gap func(lo, hi float64) float64, set func(int, float64),
	pts *bandPoints, k int, rowStep float64, base, c0, c1 int) {
	lons, lats := pts.lons[k], pts.lats[k]
	for c := c0; c < c1; c++ {
		if math.IsNaN(lats[c]) || !reach.has(lons[c], lats[c]) {
			set(base+c, math.Inf(1))
			continue
		}
		// Bounds first; the exact distance only when a cut lies between
		// them. Any value in [lo, hi] is then in the cell's class.
		pt := pts.at(k, c)
		lo, hi := pts.bounds(ix, &pt, maxD)
		if math.IsInf(hi, 1) {
			set(base+c, hi)
			continue
		}
		d, room := lo, gap(lo, hi)
		if !(room > 0) {
			_, d = ix.NearestAt(&pt, maxD)
			if math.IsInf(d, 1) {
				set(base+c, d)
				continue
			}
			room = gap(d, d)
		}
		set(base+c, d)
		for c+1 < c1 && !math.IsNaN(lats[c+1]) {
			if rowStep >= 0 {
				room -= rowStep
			} else {
				room -= geodesy.Distance(lats[c], lons[c], lats[c+1], lons[c+1])
			}
			if room <= 0 || !reach.has(lons[c+1], lats[c+1]) {
				break
			}
			c++
			set(base+c, d)
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

// bandPoints prepares the cells of a band of rows for index queries: on a
// latitude-longitude grid every row is one parallel and every column one
// meridian, so a cell's point costs a few multiplications from its row's
// geodesy.Parallel and its column's sine and cosine (computed once per
// worker); elsewhere each queried cell is prepared on its own. It also
// keeps the last chord-nearest site as the hint of the next bounds query:
// cells queried one after another are neighbours, with the same nearest
// site or one close to it.
type bandPoints struct {
	lons, lats     [][]float64 // the band's rows
	rows           []geodesy.Parallel
	perRow         bool      // rows are parallels and columns meridians
	colSin, colCos []float64 // sine and cosine of each column's longitude
	hint           int
}

// prepareRow prepares band row k once its coordinates are in lons[k] and
// lats[k].
func (p *bandPoints) prepareRow(g *Grid, k int) {
	p.perRow = g.Geographic
	if !p.perRow {
		return
	}
	p.rows[k] = geodesy.NewParallel(p.lats[k][0])
	if p.colSin == nil {
		p.colSin = make([]float64, len(p.lons[k]))
		p.colCos = make([]float64, len(p.lons[k]))
		for c, lon := range p.lons[k] {
			p.colSin[c], p.colCos[c] = math.Sincos(lon * math.Pi / 180)
		}
	}
}

// at returns the point of cell (band row k, column c).
func (p *bandPoints) at(k, c int) geodesy.Point {
	if p.perRow {
		return p.rows[k].Point(p.lons[k][c], p.colSin[c], p.colCos[c])
	}
	return geodesy.NewPoint(p.lats[k][c], p.lons[k][c])
}

// bounds is ix.NearestBounds at pt, started from the hint.
func (p *bandPoints) bounds(ix *geodesy.Index, pt *geodesy.Point, maxDist float64) (lo, hi float64) {
	lo, hi, slot := ix.BoundsAt(pt, maxDist, p.hint)
	if slot >= 0 {
		p.hint = slot
	}
	return lo, hi
}
