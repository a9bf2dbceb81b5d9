package extent

import (
	"fmt"
	"math"
	"sort"

	"github.com/paulmach/orb"

	"areasweep/extent/geodesy"
	"areasweep/extent/vocab"
)

// regionBuffers adds the base grown or shrunk by each distance. A cell
// belongs to a grown member when its centre is inside the base or within d
// of the base boundary, and to a shrunk member when its centre is inside
// and farther than |d| from the boundary; distances are geodesic on WGS84
// to the boundary densified every cell side (boundaryLonLat).
func (b *builder) regionBuffers(base Shape, baseK int, ds []float64) error {
	if len(ds) == 0 {
		b.f.Chains[chainRegion] = []int{0}
		return nil
	}
	ds = sortedUnique(ds)
	lats, lons, err := boundaryLonLat(b.g, base)
	if err != nil {
		return err
	}
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
	reach := newReach(lats, lons, maxD)
	var abs []float64
	for _, bf := range bufs {
		abs = append(abs, math.Abs(bf.d))
	}
	cuts := sortedUnique(abs)
	for i := range bufs {
		bufs[i].cut = sort.SearchFloat64s(cuts, math.Abs(bufs[i].d))
	}
	b.distanceField(ix, reach, maxD, cuts, func(row int, near []rowRuns) {
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
// densified every cell side for the region buffers (boundaryLonLat): 2^25
// points, 1 GiB of coordinates. A region drawn around the raster has about
// as many as there are cells along its boundary; more come only from a
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

// boundaryLonLat returns points along the boundary of s every cell side,
// as WGS84 latitude and longitude. Edges are densified as straight
// lines in the grid's CRS, the same edges Fill uses to decide which cells
// are inside, so distances are measured to the boundary that defines the
// region on the grid. Seam edges (see seamEdge) are left out. A boundary
// that would take more than MaxBoundaryPoints points is an error.
func boundaryLonLat(g *Grid, s Shape) (lats, lons []float64, err error) {
	// One cell side: the nearest sample is then within half a side of the
	// nearest boundary point, so a distance is overestimated by less than
	// half a cell diagonal, the margin within which a cell may fall either
	// side of a buffer edge.
	step := math.Min(g.GeoTransform[1], -g.GeoTransform[5])
	total, longest := 0.0, 0.0
	boundaryEdges(g, s, func(a, b orb.Point) {
		n := edgeSteps(a, b, step)
		total += n + 1
		longest = math.Max(longest, n*step)
	})
	if total > MaxBoundaryPoints {
		return nil, nil, fmt.Errorf("extent: region buffers: the base region's boundary would take %.3g points at one every cell side (%g), more than %d: an edge of it runs about %.3g units of the raster's CRS, so the region reaches far outside the raster (perhaps where that CRS stretches without bound, such as the opposite pole of a polar projection); clip the region to the area around the raster (e.g. ogr2ogr -clipdst XMIN YMIN XMAX YMAX, in the region's coordinates), or give no --region-buffers", total, step, MaxBoundaryPoints, longest)
	}
	xs, ys := make([]float64, 0, int(total)), make([]float64, 0, int(total))
	boundaryEdges(g, s, func(a, b orb.Point) {
		n := int(edgeSteps(a, b, step))
		for k := 0; k < n; k++ {
			f := float64(k) / float64(n)
			xs = append(xs, a[0]+f*(b[0]-a[0]))
			ys = append(ys, a[1]+f*(b[1]-a[1]))
		}
		xs, ys = append(xs, b[0]), append(ys, b[1])
	})
	lons = make([]float64, len(xs))
	lats = make([]float64, len(ys))
	g.ToLonLat(xs, ys, lons, lats)
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
	return lats[:k], lons[:k], nil
}

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
	b.distanceField(ix, reach, maxD, dm, func(row int, near []rowRuns) {
		for j, k := range members {
			b.f.cells[k].rows[row] = near[j]
		}
	})
	return nil
}
