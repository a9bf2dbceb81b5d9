package extent

import (
	"fmt"
	"math"
	"runtime"
	"slices"
	"sort"
	"sync"
	"sync/atomic"

	"areasweep/extent/geodesy"
	"areasweep/extent/vocab"
)

// gnomonic is the gnomonic (central) projection of the unit sphere about a
// centre direction c: a point with unit vector p maps to
//
//	(p.e1 / p.c, p.e2 / p.c)
//
// for p.c > 0. It maps great circles to straight lines, so the planar
// convex hull of projected points is the projection of their spherical
// convex hull: a hull that stays sane across a continent, unlike a hull of
// raw degrees (Snyder 1987, Map Projections: A Working Manual, USGS PP 1395,
// p. 164).
type gnomonic struct{ c, e1, e2 [3]float64 }

func unitVector(lon, lat float64) [3]float64 {
	lo, la := lon*math.Pi/180, lat*math.Pi/180
	return [3]float64{math.Cos(la) * math.Cos(lo), math.Cos(la) * math.Sin(lo), math.Sin(la)}
}

func dot(a, b [3]float64) float64 { return a[0]*b[0] + a[1]*b[1] + a[2]*b[2] }

func cross(a, b [3]float64) [3]float64 {
	return [3]float64{a[1]*b[2] - a[2]*b[1], a[2]*b[0] - a[0]*b[2], a[0]*b[1] - a[1]*b[0]}
}

func normalize(a [3]float64) [3]float64 {
	n := math.Sqrt(dot(a, a))
	return [3]float64{a[0] / n, a[1] / n, a[2] / n}
}

func newGnomonic(c [3]float64) gnomonic {
	c = normalize(c)
	ref := [3]float64{0, 0, 1}
	if math.Abs(c[2]) > 0.9 {
		ref = [3]float64{1, 0, 0}
	}
	e1 := normalize(cross(ref, c))
	e2 := cross(c, e1)
	return gnomonic{c, e1, e2}
}

// project returns the plane coordinates of p, ok false on the far hemisphere.
func (g gnomonic) project(p [3]float64) (x, y float64, ok bool) {
	d := dot(p, g.c)
	if d <= 1e-12 {
		return 0, 0, false
	}
	return dot(p, g.e1) / d, dot(p, g.e2) / d, true
}

// inverse returns longitude and latitude of plane point (x,y).
func (g gnomonic) inverse(x, y float64) (lon, lat float64) {
	v := normalize([3]float64{
		g.c[0] + x*g.e1[0] + y*g.e2[0],
		g.c[1] + x*g.e1[1] + y*g.e2[1],
		g.c[2] + x*g.e1[2] + y*g.e2[2],
	})
	return math.Atan2(v[1], v[0]) * 180 / math.Pi, math.Asin(v[2]) * 180 / math.Pi
}

// maxHullAngle is the largest angle (degrees) between the points' mean
// direction and any point for which the hull is built; beyond it the
// gnomonic projection stretches without bound.
const maxHullAngle = 80.0

// planarHull returns the convex hull of pts counter-clockwise, without
// repeating the first point (Andrew's monotone chain, Andrew 1979,
// Information Processing Letters 9:216-219).
func planarHull(pts [][2]float64) [][2]float64 {
	p := append([][2]float64(nil), pts...)
	sort.Slice(p, func(i, j int) bool {
		if p[i][0] != p[j][0] {
			return p[i][0] < p[j][0]
		}
		return p[i][1] < p[j][1]
	})
	if len(p) < 3 {
		return p
	}
	turn := func(o, a, b [2]float64) float64 {
		return (a[0]-o[0])*(b[1]-o[1]) - (a[1]-o[1])*(b[0]-o[0])
	}
	h := make([][2]float64, 0, 2*len(p))
	for _, q := range p {
		for len(h) >= 2 && turn(h[len(h)-2], h[len(h)-1], q) <= 0 {
			h = h[:len(h)-1]
		}
		h = append(h, q)
	}
	lower := len(h) + 1
	for i := len(p) - 2; i >= 0; i-- {
		q := p[i]
		for len(h) >= lower && turn(h[len(h)-2], h[len(h)-1], q) <= 0 {
			h = h[:len(h)-1]
		}
		h = append(h, q)
	}
	return h[:len(h)-1]
}

// insideConvex reports whether (x,y) is inside or on the counter-clockwise
// convex polygon h.
func insideConvex(h [][2]float64, x, y float64) bool {
	if len(h) < 3 {
		return false
	}
	for i := range h {
		a, b := h[i], h[(i+1)%len(h)]
		if (b[0]-a[0])*(y-a[1])-(b[1]-a[1])*(x-a[0]) < 0 {
			return false
		}
	}
	return true
}

// bufferTol (m) is our choice of the largest error allowed in a hull or
// region buffer's distance where it decides membership: at the buffer's
// distance d from the hull's or the region's boundary.
const bufferTol = 1.0

// hullBoxStep (m) is our choice of the step at which the boundary is cut
// when it only bounds the box of cells tested against the hull (no
// positive hull buffer): the part of the hull a 1 km chord leaves out is
// under 2 cm wide.
const hullBoxStep = 1000.0

// bufferStep returns the step (m) at which the hull's or the region's
// boundary is cut into the points its buffers' distances are measured
// to, for buffer distances dm (m; 0 is the hull or the region itself). A
// cell centre at distance D from an edge lies at most sqrt(D^2 + (s/2)^2) from the nearest point cut every s
// along it (in the plane; less on a surface curved like the ellipsoid),
// so its distance is overestimated by at most s^2 / (8 D) at D = d, where
// membership is decided: s = sqrt(8 d_min bufferTol) keeps that
// within bufferTol for every buffer, whatever the grid. (The hull's step
// was the grid's shortest cell side: 13.5 m on a 5-arc-minute grid reaching a
// pole, 0.13 m on a 30-arc-second one, where a hull some 10,000 km round
// took 10^8 points; and 6.9 km on the demo's grid, where a distance at
// 100 km was over by up to 60 m. The region's boundary was cut every
// cell side too, over by up to s^2 / (8 d): 500 m at 20 km on a 5-arc-
// minute grid.)
func bufferStep(dm []float64) float64 {
	dMin := math.Inf(1)
	for _, d := range dm {
		if d > 0 {
			dMin = math.Min(dMin, d)
		}
	}
	if math.IsInf(dMin, 1) {
		return hullBoxStep
	}
	return math.Sqrt(8 * dMin * bufferTol)
}

// sphericalHull is the convex hull of points on the sphere.
type sphericalHull struct {
	proj gnomonic
	poly [][2]float64 // in the gnomonic plane, counter-clockwise
}

func newSphericalHull(pts []LonLat) (*sphericalHull, error) {
	if len(pts) < 3 {
		return nil, fmt.Errorf("extent: a convex hull needs 3 or more training points, have %d", len(pts))
	}
	if n := distinctPlaces(pts); n < 3 {
		return nil, fmt.Errorf("extent: a convex hull needs training points at 3 or more places, have %d points at %d", len(pts), n)
	}
	var c [3]float64
	vs := make([][3]float64, len(pts))
	for i, p := range pts {
		vs[i] = unitVector(p.Lon, p.Lat)
		for k := range c {
			c[k] += vs[i][k]
		}
	}
	if math.Sqrt(dot(c, c)) < 1e-9*float64(len(pts)) {
		return nil, fmt.Errorf("extent: training points are spread around the globe; a convex hull is not defined, use point buffers")
	}
	g := newGnomonic(c)
	plane := make([][2]float64, len(vs))
	for i, v := range vs {
		if dot(v, g.c) < math.Cos(maxHullAngle*math.Pi/180) {
			return nil, fmt.Errorf("extent: training point (lon %.4f, lat %.4f) is more than %g degrees from the points' centre; a convex hull over that span is refused, use point buffers", pts[i].Lon, pts[i].Lat, maxHullAngle)
		}
		x, y, _ := g.project(v)
		plane[i] = [2]float64{x, y}
	}
	h := planarHull(plane)
	if len(h) < 3 || hullWidth(h) < minHullWidth {
		return nil, fmt.Errorf("extent: training points are collinear (on one great circle); the convex hull has no area")
	}
	return &sphericalHull{proj: g, poly: h}, nil
}

// distinctPlaces counts the distinct positions among pts, up to 3 (all
// a hull needs): points repeated at one place (kept by --no-thin) were
// called collinear.
func distinctPlaces(pts []LonLat) int {
	var seen []LonLat
	for _, p := range pts {
		if !slices.Contains(seen, p) {
			if seen = append(seen, p); len(seen) == 3 {
				break
			}
		}
	}
	return len(seen)
}

// minHullWidth (radians in the gnomonic plane, about 6.4 m on the ground
// or less) is our choice of the width under which a hull is a line: points
// on one great circle keep, after rounding in the gnomonic projection or in
// a CSV's decimals (0.11 m at 6), a sliver of a hull that held no cell but
// was buffered as a segment, while the same points on the equator, exactly
// in line, had no hull. No grid in use has cells that narrow.
const minHullWidth = 1e-6

// hullWidth estimates the width of the convex polygon h (counter-clockwise,
// in the plane) as its area over the diagonal of its bounding box: between
// a third and all of its smallest width, as a convex set's area lies
// between half and all of its width times its diameter.
func hullWidth(h [][2]float64) float64 {
	area := 0.0
	minX, minY, maxX, maxY := math.Inf(1), math.Inf(1), math.Inf(-1), math.Inf(-1)
	for i, a := range h {
		b := h[(i+1)%len(h)]
		area += a[0]*b[1] - b[0]*a[1]
		minX, maxX = math.Min(minX, a[0]), math.Max(maxX, a[0])
		minY, maxY = math.Min(minY, a[1]), math.Max(maxY, a[1])
	}
	diag := math.Hypot(maxX-minX, maxY-minY)
	if diag == 0 {
		return 0
	}
	return math.Abs(area) / 2 / diag
}

func (s *sphericalHull) contains(lon, lat float64) bool {
	x, y, ok := s.proj.project(unitVector(lon, lat))
	return ok && insideConvex(s.poly, x, y)
}

// boundary returns the hull's vertices as longitude/latitude, closed.
func (s *sphericalHull) boundary() []LonLat {
	out := make([]LonLat, 0, len(s.poly)+1)
	for i := 0; i <= len(s.poly); i++ {
		p := s.poly[i%len(s.poly)]
		lon, lat := s.proj.inverse(p[0], p[1])
		out = append(out, LonLat{lon, lat})
	}
	return out
}

// hull adds the training points' convex hull and its geodesic buffers.
// Hull edges are great-circle arcs; the buffer distance is measured on the
// WGS84 ellipsoid to the edges densified as ellipsoidal geodesics at the
// smallest cell side (the two edge curves differ by far less than a cell at
// continental scale).
//
// thinned is the number of training records thinning left out (see
// Spec.ThinnedTrain): a hull refused for too few points says so, since
// its count is after thinning.
func (b *builder) hull(train []LonLat, ds []float64, thinned int) error {
	h, err := newSphericalHull(train)
	if err != nil {
		msg := err.Error()
		if thinned == 1 {
			msg += " (counted after thinning, which left out 1 training record sharing a cell with another)"
		} else if thinned > 1 {
			msg += fmt.Sprintf(" (counted after thinning, which left out %d training records sharing a cell with another)", thinned)
		}
		b.f.Warnings = append(b.f.Warnings, msg+"; no hull extents")
		return nil
	}
	ds = sortedUnique(ds)
	var members []int
	var dm []float64
	maxD := 0.0
	for _, d := range ds {
		if d < 0 {
			return fmt.Errorf("extent: hull buffer distance %g km must be 0 (the hull) or positive", d)
		}
		id, params := "hull", "convex hull of training points"
		if d > 0 {
			id, params = "hull_"+kmID(d), fmt.Sprintf("convex hull of training points; d_km=%g", d)
		}
		k, err := b.add(Member{ID: id, Kind: vocab.KindHull, Params: params, DistanceKm: d, Chain: chainHull})
		if err != nil {
			return err
		}
		b.f.Chains[chainHull] = append(b.f.Chains[chainHull], k)
		members = append(members, k)
		dm = append(dm, d*1000)
		maxD = math.Max(maxD, d*1000)
	}
	ring := h.boundary()
	step := bufferStep(dm)
	var lats, lons []float64
	for i := 1; i < len(ring); i++ {
		la, lo := geodesy.Densify(ring[i-1].Lat, ring[i-1].Lon, ring[i].Lat, ring[i].Lon, step)
		lats = append(lats, la...)
		lons = append(lons, lo...)
	}
	ix, err := geodesy.NewIndex(lats, lons)
	if err != nil {
		return fmt.Errorf("extent: hull boundary: %w", err)
	}
	g := b.g
	// Cells within d of the hull's boundary (d > 0); ds is sorted and
	// unique, so the positive distances are the cut list.
	near := make([][]rowRuns, g.Height)
	if maxD > 0 {
		var cuts []float64
		for _, d := range dm {
			if d > 0 {
				cuts = append(cuts, d)
			}
		}
		reach := newReach(lats, lons, maxD)
		b.distanceField(oneSites(ix), reach, maxD, cuts, func(row int, n []rowRuns) { near[row] = n })
	}
	// The box around the densified boundary holds the hull (its edges'
	// poleward bulge included, being sampled; a pole inside the hull widens
	// it to the pole), so only cells in it are tested.
	box := newReach(lats, lons, 0)
	if h.contains(0, 90) {
		box.north, box.lonH = 90, 360
	}
	if h.contains(0, -90) {
		box.south, box.lonH = -90, 360
	}
	// Cells inside the hull belong to every member (all buffers contain
	// the hull). Rows are tested in parallel, each writing only its own.
	done := func(row int, in rowRuns) {
		j := 0
		for i, k := range members {
			if dm[i] == 0 {
				b.f.cells[k].rows[row] = in
				continue
			}
			b.f.cells[k].rows[row] = union(nil, in, near[row][j])
			j++
		}
		near[row] = nil
	}
	if !g.Geographic {
		h.projectedRows(g, box, done)
		return nil
	}
	// A latitude-longitude grid's centres are its geotransform's (Grid.RowLonLat's
	// coordinates), computed as needed: no row of the grid's width is held.
	// A centre's longitude does not depend on its row (north-up grids), so
	// whether they increase along a row is found once, not per row (a walk
	// over every cell of the grid: 2 s of CPU on a global 30 arc-second
	// grid).
	increasing := alongParallel(g.Width, func(c int) float64 { x, _ := g.Centre(c, 0); return x }, 0)
	parallelRows(g.Height, func() func(row int) {
		return func(row int) {
			lon := func(c int) float64 { x, _ := g.Centre(c, row); return x }
			_, lat := g.Centre(0, row)
			inside := func(c int) bool {
				l := lon(c)
				return !math.IsNaN(lat) && box.has(l, lat) && h.contains(l, lat)
			}
			var in rowRuns
			if increasing && !math.IsNaN(lat) {
				in = h.rowRuns(lat, g.Width, lon, box, inside)
			} else {
				for c := 0; c < g.Width; c++ {
					if inside(c) {
						in = appendRun(in, int32(c), int32(c+1))
					}
				}
			}
			done(row, in)
		}
	})
	return nil
}

// capMargin is the margin (radians, or its sine) by which projectedRows
// keeps a tile's cap clear of the hull's great circles and of the box's
// edges: far above the rounding of the planar test (about 1e-15 of the
// coordinates), far below a cell.
const capMargin = 1e-9

// projectedRows calls done(row, runs) for every row of a projected grid
// g, from several goroutines (never twice for a row), with the runs of
// its cells inside the hull and the box: the cells for which the test of
// a latitude-longitude grid's rows (box.has and contains at the cell's
// centre) holds, the same cells. The grid is walked in tiles of tileSide
// x tileSide cells, and only the centre and corner cells of a tile are
// transformed to WGS84 when they settle it (bandPoints makes the
// coordinates it reads): with u_c the unit vector of the centre cell
// (unitVector of its geodetic latitude and longitude) and alpha =
// 1.02 theta + 1/a, theta the largest angle from u_c to a corner cell's
// (the same rule as the distance fields' tile radius: corner cells are the
// farthest on these small tiles, 2% for the curvature of the tile's edges,
// 1 m), every cell's unit vector lies in the cap of angular radius alpha
// around u_c. In the gnomonic plane of the hull, P = (u.e1, u.e2)/(u.c),
// edge A -> B keeps u when
//
//	(B - A) x (P - A) >= 0  <=>  u.m >= 0,  m = (bx - ax)(e2 - ay c) - (by - ay)(e1 - ax c)
//
// (multiplied by u.c > 0), a hemisphere, and the cap lies in the
// hemisphere u.m >= 0 when u_c.m/|m| >= sin alpha, in u.m < 0 when
// u_c.m/|m| <= -sin alpha. So when u_c.m/|m| >= sin alpha + capMargin
// for every edge, and u_c.c as well (every cell projects), and the cap's
// latitudes and longitudes lie in the box by capMargin degrees, every
// cell is inside; when some edge (or the projection's hemisphere) has
// u_c.m/|m| <= -(sin alpha + capMargin), every cell is outside. A tile
// whose centre or a corner has no coordinates, or that neither settles,
// is tested cell by cell, as on a latitude-longitude grid. Like the
// distance fields' tiles, a tile whose centre and corners have
// coordinates is taken to have them at every cell (where a projection
// inverts is convex at the scale of a tile).
func (s *sphericalHull) projectedRows(g *Grid, box reachBox, done func(row int, in rowRuns)) {
	hc := s.newHullCap(box)
	bands := make(chan int)
	var wg sync.WaitGroup
	for range runtime.GOMAXPROCS(0) {
		wg.Add(1)
		go func() {
			defer wg.Done()
			pts := newBandPoints(box)
			var in [tileSide]rowRuns
			for r0 := range bands {
				h := min(tileSide, g.Height-r0)
				for k := range h {
					in[k] = nil
				}
				// A window of fieldWindow columns at a time: memory
				// bounded whatever the grid's width.
				for a := 0; a < g.Width; a += fieldWindow {
					pts.window(g, a, min(a+fieldWindow, g.Width), min(fieldWindow, g.Width))
					for k := range h {
						pts.prepareRow(g, r0+k, k)
					}
					s.windowRuns(hc, pts, box, h, &in)
				}
				for k := range h {
					done(r0+k, in[k])
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

// windowRuns appends to in[k] the runs of the cells of band row k (of
// h) inside the hull and the box, in the columns of pts' window, tile by
// tile (see projectedRows).
func (s *sphericalHull) windowRuns(hc hullCap, pts *bandPoints, box reachBox, h int, in *[tileSide]rowRuns) {
	w := pts.g.Width
	for c0 := pts.off; c0 < pts.end; c0 += tileSide {
		c1 := min(c0+tileSide, w)
		switch hc.side(pts, 0, h, c0, c1) {
		case 1:
			for k := range h {
				in[k] = appendRun(in[k], int32(c0), int32(c1))
			}
		case 0:
			for k := range h {
				pts.make(k, c0, c1)
				for c := c0; c < c1; c++ {
					if lat, lon := pts.ll(k, c); !math.IsNaN(lat) && box.has(lon, lat) && s.contains(lon, lat) {
						in[k] = appendRun(in[k], int32(c), int32(c+1))
					}
				}
			}
		}
	}
}

// parallelRows calls the function made by newWorker for every row in
// [0, height), on GOMAXPROCS goroutines; each worker makes its own
// function (and scratch) once.
func parallelRows(height int, newWorker func() func(row int)) {
	var next atomic.Int64
	var wg sync.WaitGroup
	for w := 0; w < runtime.GOMAXPROCS(0); w++ {
		fn := newWorker()
		wg.Add(1)
		go func() {
			defer wg.Done()
			for {
				r := int(next.Add(1) - 1)
				if r >= height {
					return
				}
				fn(r)
			}
		}()
	}
	wg.Wait()
}

// alongParallel reports whether the w cell centres of a row at latitude
// lat (on a latitude-longitude grid whose coordinates reach WGS84
// unchanged, every centre of a row has its latitude) lie at strictly
// increasing longitudes lon(c).
func alongParallel(w int, lon func(c int) float64, lat float64) bool {
	if math.IsNaN(lat) {
		return false
	}
	prev := lon(0)
	for c := 1; c < w; c++ {
		l := lon(c)
		if !(l > prev) {
			return false
		}
		prev = l
	}
	return true
}

// hullMargin is how many cells on each side of a computed boundary
// crossing are tested exactly: the crossings are computed to far better
// than a cell, and the test decides.
const hullMargin = 2

// rowRuns returns the runs of a row's cells inside the hull and the box,
// where the row's w centres lie on the parallel lat at increasing
// longitudes lon(c) and inside(c) is the exact test of cell c. Membership
// can change along the parallel only where it crosses one of the great
// circles that bound the hull (its edges, and the edge of the
// projection's hemisphere) or a meridian bounding the box. Cells within
// hullMargin of a crossing are tested one by one; each longer stretch
// between them is tested at its first cell, which decides the whole
// stretch. The result is the same as testing every cell. It holds the
// crossings, never a row of the grid's width.
func (s *sphericalHull) rowRuns(lat float64, w int, lon func(c int) float64, box reachBox, inside func(c int) bool) rowRuns {
	var at []float64
	// Great circle with normal n meets the parallel where
	// n0 cos(phi) cos(lambda) + n1 cos(phi) sin(lambda) = -n2 sin(phi).
	circle := func(n [3]float64) {
		phi := lat * math.Pi / 180
		a, b, c := n[0]*math.Cos(phi), n[1]*math.Cos(phi), -n[2]*math.Sin(phi)
		r := math.Hypot(a, b)
		if r == 0 {
			return
		}
		q := c / r
		if math.Abs(q) > 1+1e-9 {
			return
		}
		d := math.Acos(math.Max(-1, math.Min(1, q)))
		l0 := math.Atan2(b, a)
		at = append(at, (l0+d)*180/math.Pi, (l0-d)*180/math.Pi)
	}
	plane := func(x, y float64) [3]float64 {
		g := s.proj
		return [3]float64{g.c[0] + x*g.e1[0] + y*g.e2[0], g.c[1] + x*g.e1[1] + y*g.e2[1], g.c[2] + x*g.e1[2] + y*g.e2[2]}
	}
	for i := range s.poly {
		a, b := s.poly[i], s.poly[(i+1)%len(s.poly)]
		circle(cross(plane(a[0], a[1]), plane(b[0], b[1])))
	}
	circle(s.proj.c)
	if box.lonH < 180 {
		at = append(at, box.lonC-box.lonH, box.lonC+box.lonH)
	}
	// The cells near each crossing, at every turn of 360 degrees from
	// just below the row's first longitude to beyond its last: spans of
	// columns [a, b], in order of a.
	first, last := lon(0), lon(w-1)
	var near [][2]int
	for _, l := range at {
		l = first - 360 + math.Mod(math.Mod(l-first, 360)+360, 360)
		for ; l <= last+360; l += 360 {
			i := sort.Search(w, func(c int) bool { return lon(c) >= l })
			near = append(near, [2]int{max(0, i-hullMargin-1), min(w-1, i+hullMargin)})
		}
	}
	slices.SortFunc(near, func(x, y [2]int) int { return x[0] - y[0] })
	var out rowRuns
	c := 0 // the first cell not yet decided
	for _, sp := range near {
		if sp[1] < c {
			continue
		}
		a := max(sp[0], c)
		if c < a && inside(c) {
			// The stretch before the span, decided by its first cell.
			out = appendRun(out, int32(c), int32(a))
		}
		for x := a; x <= sp[1]; x++ {
			if inside(x) {
				out = appendRun(out, int32(x), int32(x+1))
			}
		}
		c = sp[1] + 1
	}
	if c < w && inside(c) {
		out = appendRun(out, int32(c), int32(w))
	}
	return out
}

// hullCap settles tiles of a projected grid against a hull and a box
// (see projectedRows): the unit normals of the great circles that bound
// the hull in the gnomonic plane, oriented inwards, and the projection's
// centre last.
type hullCap struct {
	ms  [][3]float64
	box reachBox
}

func (s *sphericalHull) newHullCap(box reachBox) hullCap {
	n := len(s.poly)
	ms := make([][3]float64, n+1)
	for i := range n {
		a, b := s.poly[i], s.poly[(i+1)%n]
		dx, dy := b[0]-a[0], b[1]-a[1]
		var m [3]float64
		for k := range m {
			m[k] = dx*(s.proj.e2[k]-a[1]*s.proj.c[k]) - dy*(s.proj.e1[k]-a[0]*s.proj.c[k])
		}
		ms[i] = normalize(m)
	}
	ms[n] = s.proj.c // u.c > 0: the cell projects
	return hullCap{ms: ms, box: box}
}

// side returns 1 when every cell of band rows [k0,k1) and columns
// [c0,c1) of pts is inside the hull and the box, -1 when none is, and 0
// when the tile's centre and corner cells do not tell (see
// projectedRows).
func (hc hullCap) side(pts *bandPoints, k0, k1, c0, c1 int) int {
	const deg = 180 / math.Pi
	box := hc.box
	kc, cc := (k0+k1)/2, (c0+c1)/2
	// The centre and the corners, in one transformation (makeCells).
	pts.makeCells([]int{kc, k0, k0, k1 - 1, k1 - 1}, []int{cc, c0, c1 - 1, c0, c1 - 1})
	clat, clon := pts.ll(kc, cc)
	if math.IsNaN(clat) {
		return 0
	}
	theta := 0.0
	for _, k := range [2]int{k0, k1 - 1} {
		for _, c := range [2]int{c0, c1 - 1} {
			lat, lon := pts.ll(k, c)
			if math.IsNaN(lat) {
				return 0
			}
			theta = math.Max(theta, sphereDistance(clat, clon, lat, lon)/geodesy.SemiMajor)
		}
	}
	alpha := theta*1.02 + 1/geodesy.SemiMajor
	if alpha > 0.1 {
		return 0
	}
	sa := math.Sin(alpha) + capMargin
	uc := unitVector(clon, clat)
	in := true
	for _, m := range hc.ms {
		d := dot(uc, m)
		if d <= -sa {
			return -1
		}
		in = in && d >= sa
	}
	if !in {
		return 0
	}
	// The cap's latitudes are within alpha of the centre's, and its
	// longitudes within asin(sin alpha / cos lat) when it holds no pole.
	ad := alpha*deg + capMargin
	if clat-ad < box.south || clat+ad > box.north {
		return 0
	}
	if box.lonH < 180 {
		cl := math.Cos((math.Abs(clat) + ad) / deg)
		if !(cl > math.Sin(alpha)) {
			return 0
		}
		dl := math.Mod(math.Abs(clon-box.lonC), 360)
		if dl > 180 {
			dl = 360 - dl
		}
		if dl+math.Asin(math.Sin(alpha)/cl)*deg+capMargin > box.lonH {
			return 0
		}
	}
	return 1
}
