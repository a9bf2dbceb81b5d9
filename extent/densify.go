package extent

import (
	"math"

	"github.com/airbusgeo/godal"
	"github.com/paulmach/orb"
)

// densifyTolerance is how far (in cells of the raster) a reprojected
// polygon edge may stray from the true image of the edge, which is a
// straight line in the layer's own CRS: our choice, a hundredth of a cell,
// so that only a centre within about that of the true edge can fall on the
// other side of it.
const densifyTolerance = 0.01

// densifyMaxDepth caps the halvings of one edge (2^16 pieces at most), so
// that an edge through a point where the transformation is singular (a
// pole of the raster's projection) cannot take unbounded memory.
const densifyMaxDepth = 16

// densifyEdges returns geom (in the layer's CRS lsr) with vertices added
// along every edge, in the layer's CRS, so that once its vertices are
// transformed to the grid's CRS the edges follow the images of the
// straight edges drawn in lsr to within densifyTolerance of a cell: an
// edge is halved while a point a quarter, half or three quarters along it
// lands more than that from the same point of the chord between its
// transformed ends. An edge of a whole turn of longitude is left as it is
// (see densifier). nil when no vertex was added (or the CRSs are one,
// or the transformation cannot be made: Reproject then says why). t is the
// transformation from lsr to the grid's CRS, made once per layer by the
// caller (nil in those two cases).
func densifyEdges(geom *godal.Geometry, lsr *godal.SpatialRef, t *godal.Transform, g *Grid) (*godal.Geometry, error) {
	if t == nil {
		return nil, nil
	}
	gt := g.GeoTransform
	d := &densifier{t: t, sx: 1 / math.Abs(gt[1]), sy: 1 / math.Abs(gt[5]), geographic: g.Geographic, layerGeographic: lsr.Geographic()}
	return mapRings(geom, lsr, func(r orb.Ring) (orb.Ring, bool, error) {
		out := d.ring(r)
		return out, len(out) != len(r), nil
	})
}

type densifier struct {
	t          *godal.Transform
	sx, sy     float64 // cells per unit of the grid's CRS
	geographic bool    // the grid's CRS
	// layerGeographic: the layer's CRS is longitude/latitude, where an
	// edge from -180 to 180 (a whole turn) is left as it is: it is a cut
	// (densifyWholeTurns has drawn its parallel where it is a boundary).
	layerGeographic bool
}

// transform returns the points ps in the grid's CRS and which of them
// could be transformed.
func (d *densifier) transform(ps []orb.Point) (xs, ys []float64, ok []bool) {
	xs, ys = make([]float64, len(ps)), make([]float64, len(ps))
	ok = make([]bool, len(ps))
	if len(ps) == 0 {
		return
	}
	for i, p := range ps {
		xs[i], ys[i] = p[0], p[1]
	}
	_ = d.t.TransformEx(xs, ys, make([]float64, len(ps)), ok) // failures are in ok
	for i := range ok {
		ok[i] = ok[i] && !math.IsNaN(xs[i]) && !math.IsInf(xs[i], 0) && !math.IsNaN(ys[i]) && !math.IsInf(ys[i], 0)
	}
	return
}

// ring returns r densified (see densifyEdges); all edges of one level are
// transformed in one call.
func (d *densifier) ring(r orb.Ring) orb.Ring {
	if len(r) < 2 {
		return r
	}
	pts := append(orb.Ring(nil), r...)
	xs, ys, ok := d.transform(pts)
	open := make([]bool, len(pts)-1) // edge i (pts[i], pts[i+1]) still to test
	for i := range open {
		open[i] = ok[i] && ok[i+1] && pts[i] != pts[i+1] && !(d.layerGeographic && wholeTurn(pts[i], pts[i+1]))
	}
	fracs := [3]float64{0.25, 0.5, 0.75}
	for depth := 0; depth < densifyMaxDepth; depth++ {
		var probe []orb.Point
		var edges []int
		for i, o := range open {
			if !o {
				continue
			}
			// Midpoints of midpoints, the same whichever way the edge
			// runs, so that an edge two units share gets the same vertices
			// in both.
			a, b := pts[i], pts[i+1]
			m := mid(a, b)
			probe = append(probe, mid(a, m), m, mid(m, b))
			edges = append(edges, i)
		}
		if len(edges) == 0 {
			break
		}
		px, py, pok := d.transform(probe)
		split := make(map[int]int, len(edges)) // edge -> index of its midpoint in probe
		for k, i := range edges {
			open[i] = false
			x0, y0, x1, y1 := xs[i], ys[i], xs[i+1], ys[i+1]
			if d.geographic {
				x1 = x0 + math.Remainder(x1-x0, 360)
			}
			far := false
			for j, f := range fracs {
				n := 3*k + j
				if !pok[n] {
					far = false // a point the transformation cannot take: leave the edge to Reproject
					break
				}
				x := px[n]
				if d.geographic {
					x = x0 + math.Remainder(x-x0, 360)
				}
				dx := (x - (x0 + f*(x1-x0))) * d.sx
				dy := (py[n] - (y0 + f*(y1-y0))) * d.sy
				if math.Hypot(dx, dy) > densifyTolerance {
					far = true
				}
			}
			if far {
				split[i] = 3*k + 1
			}
		}
		if len(split) == 0 {
			break
		}
		n := len(pts) + len(split)
		npts, nxs, nys := make(orb.Ring, 0, n), make([]float64, 0, n), make([]float64, 0, n)
		nopen := make([]bool, 0, n-1)
		for i := range pts {
			npts, nxs, nys = append(npts, pts[i]), append(nxs, xs[i]), append(nys, ys[i])
			if i == len(pts)-1 {
				break
			}
			if m, ok := split[i]; ok {
				npts, nxs, nys = append(npts, probe[m]), append(nxs, px[m]), append(nys, py[m])
				nopen = append(nopen, true, true)
			} else {
				nopen = append(nopen, false)
			}
		}
		pts, xs, ys, open = npts, nxs, nys, nopen
	}
	return pts
}

func mid(a, b orb.Point) orb.Point { return orb.Point{(a[0] + b[0]) / 2, (a[1] + b[1]) / 2} }
