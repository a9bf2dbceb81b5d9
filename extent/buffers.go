package extent

import (
	"fmt"
	"math"
	"slices"
	"sort"

	"github.com/paulmach/orb"

	"areasweep/extent/geodesy"
	"areasweep/extent/vocab"
)

// regionBuffers adds the base (read from path) grown or shrunk by each
// distance. A cell belongs to a grown member when its centre is inside
// the base or within d of the base boundary, and to a shrunk member when
// its centre is inside and farther than |d| from the boundary; distances
// are geodesic on WGS84 to the boundary cut at bufferStep of the
// distances on the ground (boundaryLonLat), so that a distance at a
// buffer's |d| is overestimated by at most bufferTol.
func (b *builder) regionBuffers(path string, base Shape, baseK int, ds []float64) error {
	if len(ds) == 0 {
		b.f.Chains[chainRegion] = []int{0}
		return nil
	}
	ds = sortedUnique(ds)
	dm := make([]float64, len(ds))
	for i, d := range ds {
		dm[i] = math.Abs(d) * 1000
	}
	pts, err := boundaryLonLat(b.g, base, bufferStep(dm))
	if err != nil {
		return fmt.Errorf("extent: %s: %w", path, err)
	}
	lats, lons := pts.lats, pts.lons
	type buf struct {
		k   int
		d   float64 // metres, signed
		cut int     // index of |d| in cuts
	}
	var bufs []buf
	var chain []int
	maxD := 0.0
	for _, d := range ds {
		if d == 0 {
			continue
		}
		k, err := b.add(Member{ID: "region_" + kmID(d), Kind: vocab.KindRegionBuffer, Params: fmt.Sprintf("d_km=%g", d), DistanceKm: d, Chain: chainRegion})
		if err != nil {
			return err
		}
		bufs = append(bufs, buf{k: k, d: d * 1000})
		maxD = math.Max(maxD, math.Abs(d)*1000)
	}
	// Chain order: shrunk (most negative first), base, grown.
	for _, bf := range bufs {
		if bf.d < 0 {
			chain = append(chain, bf.k)
		}
	}
	chain = append(chain, baseK)
	b.f.Members[baseK].Chain = chainRegion
	for _, bf := range bufs {
		if bf.d > 0 {
			chain = append(chain, bf.k)
		}
	}
	b.f.Chains[chainRegion] = chain
	baseRows := b.f.cells[baseK].rows
	if len(lats) == 0 {
		// A region with no boundary off the antimeridian and the poles
		// (the whole globe): nothing lies beyond it to grow into, and no
		// cell is near a boundary to shrink from, so every buffer is the
		// base itself (and is marked its duplicate).
		for _, bf := range bufs {
			for row, r := range baseRows {
				b.f.cells[bf.k].rows[row] = append(rowRuns(nil), r...)
			}
		}
		b.f.Warnings = append(b.f.Warnings, "the base region covers the whole globe (no boundary off the antimeridian and the poles): each region buffer equals it")
		return nil
	}
	ix, err := geodesy.NewIndex(lats, lons)
	if err != nil {
		return fmt.Errorf("extent: base region boundary: %w", err)
	}
	fs := oneSites(ix)
	if len(pts.clats) > 0 && !math.IsInf(pts.half, 1) {
		// Bounds from the points cut every cell side, exact distances
		// from all (see fieldSites).
		if fs.ix, err = geodesy.NewIndex(pts.clats, pts.clons); err != nil {
			return fmt.Errorf("extent: base region boundary: %w", err)
		}
		// A margin on the sampling bound, our choice: 1% and 1 m.
		fs.half = pts.half*1.01 + 1
	}
	reach := newReach(lats, lons, maxD)
	var abs []float64
	for _, bf := range bufs {
		abs = append(abs, math.Abs(bf.d))
	}
	cuts := sortedUnique(abs)
	for i := range bufs {
		bufs[i].cut = sort.SearchFloat64s(cuts, math.Abs(bufs[i].d))
	}
	b.distanceField(fs, reach, maxD, cuts, func(row int, near []rowRuns) {
		// A grown member is the base or within d of its boundary; a shrunk
		// one is the base minus the cells within |d|.
		for _, bf := range bufs {
			var r rowRuns
			if bf.d > 0 {
				r = union(nil, baseRows[row], near[bf.cut])
			} else {
				r = minus(nil, baseRows[row], near[bf.cut])
			}
			b.f.cells[bf.k].rows[row] = r
		}
	})
	return nil
}

// MaxBoundaryPoints caps the points of the base region's boundary
// cut for the region buffers (boundaryLonLat): 2^25
// points, 1 GiB of coordinates (in the CRS and in WGS84). A region drawn
// around the raster has about its length over bufferStep, or as many as
// there are cells along its boundary where they are smaller; more come
// only from a
// region reaching where the raster's CRS stretches without bound (the
// opposite pole of a polar stereographic grid lies at 1e23 m), whose
// boundary could never be sampled.
const MaxBoundaryPoints = 1 << 25

// edgeSteps is the number of pieces of at most step into which
// boundaryLonLat cuts the edge a-b: ceil(|b-a| / step), at least 1 (and 1
// for an edge with a coordinate that is not finite).
func edgeSteps(a, b orb.Point, step float64) float64 {
	n := math.Ceil(math.Hypot(b[0]-a[0], b[1]-a[1]) / step)
	if !(n >= 1) || math.IsInf(n, 0) {
		return 1
	}
	return n
}

// boundaryLonLat returns points along the boundary of s, as WGS84
// latitude and longitude, no two neighbours on an edge farther apart on
// the ground than step (m; see bufferStep). Edges are cut as straight
// lines in the grid's CRS, the same edges Fill uses to decide which
// cells are inside, so distances are measured to the boundary that
// defines the region on the grid. They are cut every cell side first,
// then each piece whose ground length may exceed step (geodesy.ChordUpper
// of its ends: an upper bound on the geodesic, so on the ground length
// of a piece shorter than a cell) is cut again into equal parts in the
// CRS, and so on until none may (refineBoundary): the spacing holds
// wherever the projection stretches lengths (the sheared edges of a
// Mollweide map), and at latitude-longitude cells of any size. Seam
// edges (see seamEdge) are left out. A boundary that would take more
// than MaxBoundaryPoints points is an error.
func boundaryLonLat(g *Grid, s Shape, step float64) (pts boundarySites, err error) {
	side := math.Min(g.GeoTransform[1], -g.GeoTransform[5])
	total, longest := 0.0, 0.0
	boundaryEdges(g, s, func(a, b orb.Point) {
		n := edgeSteps(a, b, side)
		total += n + 1
		longest = math.Max(longest, n*side)
	})
	tooMany := func(total float64) error {
		return fmt.Errorf("region buffers: the base region's boundary would take %.3g points, more than %d: it is cut every cell side (%g in the raster's CRS) and, so that a distance at the smallest buffer is right to 1 m, at least every %.3g m on the ground. Either the region reaches far outside the raster (its longest edge runs about %.3g units of the raster's CRS; perhaps where that CRS stretches without bound, such as the opposite pole of a polar projection): clip the region to the area around the raster (e.g. ogr2ogr -clipdst XMIN YMIN XMAX YMAX, in the region's coordinates); or its boundary is too long for a buffer that small: give larger --region-buffers; or give no --region-buffers", total, MaxBoundaryPoints, side, step, longest)
	}
	if total > MaxBoundaryPoints {
		return boundarySites{}, tooMany(total)
	}
	pl := boundaryPoints{xs: make([]float64, 0, int(total)), ys: make([]float64, 0, int(total))}
	boundaryEdges(g, s, func(a, b orb.Point) {
		n := int(edgeSteps(a, b, side))
		pl.first = append(pl.first, len(pl.xs))
		for k := 0; k < n; k++ {
			f := float64(k) / float64(n)
			pl.xs = append(pl.xs, a[0]+f*(b[0]-a[0]))
			pl.ys = append(pl.ys, a[1]+f*(b[1]-a[1]))
		}
		pl.xs, pl.ys = append(pl.xs, b[0]), append(pl.ys, b[1])
	})
	pl.lons, pl.lats = make([]float64, len(pl.xs)), make([]float64, len(pl.ys))
	boundaryToLonLat(g, pl.xs, pl.ys, pl.lons, pl.lats)
	pts.clats, pts.clons = onEarth(slices.Clone(pl.lats), slices.Clone(pl.lons))
	for round := 0; round < maxRefineRounds; round++ {
		more, n, widest := pl.refine(g, step)
		if n > MaxBoundaryPoints {
			return boundarySites{}, tooMany(float64(n))
		}
		if round == 0 {
			pts.half = widest / 2
		}
		if !more {
			break
		}
	}
	pts.lats, pts.lons = onEarth(pl.lats, pl.lons)
	if len(pts.lats) == len(pts.clats) {
		// Nothing was cut finer: one set.
		pts.clats, pts.clons, pts.half = nil, nil, 0
	}
	return pts, nil
}

// boundarySites are the points boundaryLonLat cuts a boundary into
// (lats, lons) and, when it cut any piece finer than a cell side, the
// points of the first cut every cell side (clats, clons) and half the
// largest ground length of a piece between two of them (an upper bound:
// geodesy.ChordUpper), for the field's bounds (fieldSites).
type boundarySites struct {
	lats, lons   []float64
	clats, clons []float64
	half         float64
}

// pieces calls f with each piece between two neighbours of an edge: the
// index of its second point and the ECEF positions of its ends (NaN off
// the Earth).
func (pl *boundaryPoints) pieces(f func(i int, pa, pb *[3]float64)) {
	for j, a := range pl.first {
		b := len(pl.xs)
		if j+1 < len(pl.first) {
			b = pl.first[j+1]
		}
		pa := geodesy.ECEF(pl.lats[a], pl.lons[a])
		for i := a + 1; i < b; i++ {
			pb := geodesy.ECEF(pl.lats[i], pl.lons[i])
			f(i, &pa, &pb)
			pa = pb
		}
	}
}

// onEarth drops the points with no position (NaN) from lats, lons, in
// place, and brings longitudes beyond a turn back one.
func onEarth(lats, lons []float64) ([]float64, []float64) {
	k := 0
	for i := range lats {
		if !math.IsNaN(lats[i]) {
			lats[k], lons[k] = lats[i], lons[i]
			// The copy of a one-piece polar polygon a turn east of -180..180
			// (see shapeOf) reaches 540: the same meridians a turn back.
			if lons[k] > 360 {
				lons[k] -= 360
			} else if lons[k] < -360 {
				lons[k] += 360
			}
			k++
		}
	}
	return lats[:k], lons[:k]
}

// boundaryToLonLat is g.ToLonLat for points of a region's boundary, with
// each point whose transformation failed given the longitude and latitude
// of edgeVertexLonLat, as shapeOf gives a vertex: a vertex on the 180th
// meridian lands on a world map's outline (Mollweide's ellipse) a rounding
// error outside it for about half of the latitudes. Left without
// coordinates, such a vertex was dropped from the boundary with the
// pieces beside it (refine leaves a piece with an end off the Earth
// whole), a cell side each way, so the distances near it were
// overestimated by up to that much (a cell 148 km from such a vertex on a
// 100 km Mollweide grid measured over 200 km). Points that are off the
// Earth stay NaN.
func boundaryToLonLat(g *Grid, xs, ys, lons, lats []float64) {
	g.ToLonLat(xs, ys, lons, lats)
	if g.Geographic {
		return
	}
	for i := range lons {
		if math.IsNaN(lons[i]) || math.IsNaN(lats[i]) {
			if lon, lat, ok := g.edgeVertexLonLat(xs[i], ys[i]); ok {
				lons[i], lats[i] = lon, lat
			}
		}
	}
}

// maxRefineRounds caps the rounds of boundaryPoints.refine. One round
// nearly always suffices (a piece is cut where its own ends say, and the
// projection's scale barely changes along a cell); a second catches the
// pieces of a cell that a fast-changing scale left long.
const maxRefineRounds = 8

// boundaryPoints are the points a boundary is cut into, in the grid's CRS
// (xs, ys) and in WGS84 (lons, lats; NaN off the Earth), edge after edge:
// first[j] is the index of edge j's first point, and its last point is
// the one before first[j+1] (the last of all for the last edge).
type boundaryPoints struct {
	xs, ys, lons, lats []float64
	first              []int
}

// refine cuts every piece between two neighbours of an edge that may be
// longer on the ground than step into ceil(u / step) equal parts in the
// CRS, u its geodesy.ChordUpper (pieces past 3000 km, where that bound
// gives up, in two), and transforms the new points. It reports whether it
// cut any piece, the number of points it would hold after cutting (when
// over MaxBoundaryPoints, it stops there and cuts nothing) and the largest
// ChordUpper of a piece it was given (+Inf past 3000 km), an upper bound
// on the longest piece's ground length. Pieces with an end off the Earth
// are left whole and not measured.
func (pl *boundaryPoints) refine(g *Grid, step float64) (more bool, total int, widest float64) {
	parts := make([]int32, len(pl.xs))
	total = len(pl.xs)
	pl.pieces(func(i int, pa, pb *[3]float64) {
		if math.IsNaN(pa[0]) || math.IsNaN(pb[0]) {
			return
		}
		u := geodesy.ChordUpper(pa, pb)
		widest = math.Max(widest, u)
		if m := pieceParts(u, step); m > 1 {
			parts[i] = int32(m)
			total += m - 1
		}
	})
	if total == len(pl.xs) || total > MaxBoundaryPoints {
		return false, total, widest
	}
	var nx, ny []float64
	for i, m := range parts {
		for k := 1; k < int(m); k++ {
			f := float64(k) / float64(m)
			nx = append(nx, pl.xs[i-1]+f*(pl.xs[i]-pl.xs[i-1]))
			ny = append(ny, pl.ys[i-1]+f*(pl.ys[i]-pl.ys[i-1]))
		}
	}
	nlon, nlat := make([]float64, len(nx)), make([]float64, len(ny))
	boundaryToLonLat(g, nx, ny, nlon, nlat)
	out := boundaryPoints{
		xs: make([]float64, 0, total), ys: make([]float64, 0, total),
		lons: make([]float64, 0, total), lats: make([]float64, 0, total),
		first: make([]int, 0, len(pl.first)),
	}
	e, q := 0, 0
	for i := range pl.xs {
		if e < len(pl.first) && pl.first[e] == i {
			out.first = append(out.first, len(out.xs))
			e++
		}
		m := int(parts[i])
		if m > 1 {
			out.xs, out.ys = append(out.xs, nx[q:q+m-1]...), append(out.ys, ny[q:q+m-1]...)
			out.lons, out.lats = append(out.lons, nlon[q:q+m-1]...), append(out.lats, nlat[q:q+m-1]...)
			q += m - 1
		}
		out.xs, out.ys = append(out.xs, pl.xs[i]), append(out.ys, pl.ys[i])
		out.lons, out.lats = append(out.lons, pl.lons[i]), append(out.lats, pl.lats[i])
	}
	*pl = out
	return true, total, widest
}

// pieceParts returns the number of equal parts a piece whose
// geodesy.ChordUpper is u is cut into so that none may be longer than
// step on the ground: 1 when u is at most step, 2 when the piece is
// farther than ChordUpper reaches (u infinite), else
// ceil(u (1 + refineMargin) / step).
func pieceParts(u, step float64) int {
	switch {
	case math.IsInf(u, 1):
		return 2
	case u <= step:
		return 1
	}
	return int(math.Ceil(u * (1 + refineMargin) / step))
}

// refineMargin is how much shorter than step refine aims its parts: our
// choice. A projection's scale changes along a piece (across a 50 km cell
// of a Mollweide map's flank by a few per cent), so parts cut equal in
// the CRS are not equal on the ground; without the margin a second round
// cut many of them in two, 15% more points than the step needs.
const refineMargin = 0.02

// boundaryEdges calls f with each edge a-b of the rings of s in order,
// leaving out the seam edges: on a latitude-longitude grid those of
// seamEdge, on a projected grid those of projectedSeam (from s.LonLat). On
// a world map centred on Greenwich (Mollweide, Equal Earth, EASE-Grid) a
// region split at 180 degrees is two polygons on the map's opposite
// edges, and on a polar grid a cap with vertices along its cut to the
// pole has a slit there: taken as a boundary, the cut made each shrunk
// region lose a strip along 180 degrees.
func boundaryEdges(g *Grid, s Shape, f func(a, b orb.Point)) {
	for i, p := range s.Grid {
		for j, r := range p {
			var ll orb.Ring
			if !g.Geographic && i < len(s.LonLat) && j < len(s.LonLat[i]) && len(s.LonLat[i][j]) == len(r) {
				ll = s.LonLat[i][j]
			}
			for k := 1; k < len(r); k++ {
				a, b := r[k-1], r[k]
				if g.Geographic && seamEdge(a, b) || ll != nil && projectedSeam(ll[k-1], ll[k]) {
					continue
				}
				f(a, b)
			}
		}
	}
}

// antimeridianTol is how far (degrees) a vertex transformed from a
// projected grid may lie from 180 degrees of longitude, or from a pole,
// and count as on it: our
// choice, about 0.1 m, above PROJ's rounding and edgeVertexLonLat's move.
const antimeridianTol = 1e-6

// projectedSeam reports whether the edge a-b, in longitude and latitude
// transformed from a projected grid, runs along the antimeridian or a
// pole line (seamEdge, within antimeridianTol). A pole, transformed, takes
// any longitude: an edge from it to a point on the antimeridian runs along
// the antimeridian.
func projectedSeam(a, b orb.Point) bool {
	atPole := func(lat float64) bool { return math.Abs(lat) >= 90-antimeridianTol }
	pa, pb := atPole(a[1]), atPole(b[1])
	if pa && pb {
		return a[1]*b[1] > 0
	}
	return (pa || nearAntimeridian(a[0])) && (pb || nearAntimeridian(b[0]))
}

// nearAntimeridian reports whether longitude lon lies within
// antimeridianTol of 180 degrees east or west of Greenwich, in any turn.
func nearAntimeridian(lon float64) bool {
	return math.Abs(math.Mod(math.Abs(lon), 360)-180) <= antimeridianTol
}

// seamEdge reports whether the edge a-b runs along the antimeridian or a
// pole line. Such edges are where a region was cut to fit longitude and
// latitude ranges, not its boundary on the Earth, so buffer distances are
// not measured to them: a region split in two at 180 degrees is buffered as
// the one region it is. An edge from -180 to 180 runs along a parallel
// across the whole map (a polygon around a pole written in one piece): it
// is a boundary unless that parallel is a pole line.
func seamEdge(a, b orb.Point) bool {
	return onAntimeridian(a[0]) && a[0] == b[0] || math.Abs(a[1]) == 90 && a[1] == b[1]
}

// pointBuffers adds, for each radius, the union of geodesic discs around pts.
func (b *builder) pointBuffers(pts []LonLat, which string, ds []float64) error {
	ds = sortedUnique(ds)
	lats, lons := splitLL(pts)
	ix, err := geodesy.NewIndex(lats, lons)
	if err != nil {
		return fmt.Errorf("extent: point buffers: %w", err)
	}
	var members []int
	var dm []float64
	maxD := 0.0
	for _, d := range ds {
		if d <= 0 {
			return fmt.Errorf("extent: point buffer distance %g km must be positive", d)
		}
		k, err := b.add(Member{ID: "points_" + kmID(d), Kind: vocab.KindPointBuffer, Params: fmt.Sprintf("d_km=%g; around=%s", d, which), DistanceKm: d, Chain: chainPoints})
		if err != nil {
			return err
		}
		b.f.Chains[chainPoints] = append(b.f.Chains[chainPoints], k)
		members = append(members, k)
		dm = append(dm, d*1000)
		maxD = math.Max(maxD, d*1000)
	}
	reach := newReach(lats, lons, maxD)
	// ds is sorted and unique, so dm is the cut list itself.
	b.distanceField(oneSites(ix), reach, maxD, dm, func(row int, near []rowRuns) {
		for j, k := range members {
			b.f.cells[k].rows[row] = near[j]
		}
	})
	return nil
}
