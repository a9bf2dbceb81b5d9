package extent

import (
	"math"
	"math/rand/v2"
	"strings"
	"testing"

	"github.com/paulmach/orb"

	"areasweep/extent/geodesy"
)

// TestBufferStep: the hull's boundary is cut at sqrt(8 d_min x 1 m) for the
// smallest positive hull buffer d_min (worked by hand: 894.43 m at 100
// km), at hullBoxStep without one, whatever the grid.
func TestBufferStep(t *testing.T) {
	for _, tc := range []struct {
		name string
		dm   []float64
		want float64
	}{
		{"hull and 100 km", []float64{0, 100e3}, math.Sqrt(8e5)},
		{"smallest buffer decides", []float64{250e3, 10e3, 0}, math.Sqrt(8e4)},
		{"hull only", []float64{0}, hullBoxStep},
	} {
		if got := bufferStep(tc.dm); math.Abs(got-tc.want) > 1e-9 {
			t.Errorf("%s: step %g m, want %g", tc.name, got, tc.want)
		}
	}
}

// TestBufferStepBound: a point at geodesic distance d from an ellipsoidal
// geodesic edge (reached by going d at right angles from a point on the
// edge) lies within d + bufferTol of the points the edge is cut into
// at bufferStep for buffers of d, and no nearer than d (less a millimetre
// of rounding, our tolerance): the bound bufferStep's comment derives, on
// edges of 20 to 3000 km anywhere between 80 S and 80 N, d from 1 to
// 1000 km (PROJ's geodesics, Karney 2013).
func TestBufferStepBound(t *testing.T) {
	// Our choice of seed: fixed cases.
	rng := rand.New(rand.NewPCG(3, 5))
	worst := 0.0
	for i := 0; i < 60; i++ {
		lat1, lon1 := rng.Float64()*160-80, rng.Float64()*360-180
		length := 20e3 + rng.Float64()*2980e3
		lat2, lon2 := geodesy.Direct(lat1, lon1, rng.Float64()*360-180, length)
		if math.Abs(lat2) > 80 {
			continue
		}
		d := math.Pow(10, 3+3*rng.Float64())
		step := bufferStep([]float64{0, d})
		lats, lons := geodesy.Densify(lat1, lon1, lat2, lon2, step)
		// A foot strictly between two cut points, then d at right angles.
		s, azi, _ := geodesy.Inverse(lat1, lon1, lat2, lon2)
		if len(lats) < 3 {
			continue
		}
		k := 1 + rng.IntN(len(lats)-2)
		at := (float64(k) - 0.5) / float64(len(lats)-1) * s
		flat, flon, fazi := geodesy.DirectAzimuth(lat1, lon1, azi, at)
		side := 90.0
		if rng.IntN(2) == 0 {
			side = -90
		}
		plat, plon := geodesy.Direct(flat, flon, fazi+side, d)
		near := math.Inf(1)
		for j := range lats {
			near = math.Min(near, geodesy.Distance(plat, plon, lats[j], lons[j]))
		}
		if near > d+bufferTol || near < d-1e-3 {
			t.Errorf("edge (%.3f, %.3f)-(%.3f, %.3f), d %.0f m, step %.1f m: nearest cut point %.4f m away, want within [d, d + %g m]", lat1, lon1, lat2, lon2, d, step, near, bufferTol)
		}
		worst = math.Max(worst, near-d)
	}
	t.Logf("largest overestimate %.4f m (bound %g m)", worst, bufferTol)
}

// TestBoundarySpacing: the region's boundary is cut so that no two
// neighbouring points lie farther apart on the ground than the step
// (PROJ's geodesic between them, Karney 2013), on grids whose cells are
// larger than the step and where the projection stretches lengths (a
// Mollweide map's sheared flank, polar stereographic far from the pole),
// and not cut much finer than that: at most 5% more points than the
// boundary's length over the step needs, plus the points of the first
// cut every cell side (our bound: each piece a cell long is cut into
// ceil(length / step) parts). A vertex on the 180th meridian, which
// lands on a Mollweide map's outline (where PROJ's inverse fails for it by
// a rounding error) is kept, and so are the pieces beside it: they were
// left out, a cell side each way (the boundary began and ended 50 km from
// it), so that a cell 148 km from such a vertex on a 100 km grid measured
// over 200 km and was left out of region_200km.
func TestBoundarySpacing(t *testing.T) {
	rect := func(x0, y0, x1, y1 float64) Shape {
		return Shape{Grid: orb.MultiPolygon{{{{x0, y0}, {x1, y0}, {x1, y1}, {x0, y1}, {x0, y0}}}}}
	}
	const step = 566.0 // bufferStep for a smallest buffer of 40 km
	for _, tc := range []struct {
		grid  gridCase
		shape Shape
		ll    [][2]float64 // when set, the shape is this ring of lon/lat vertices, projected
	}{
		{gridCase{"lat-lon 0.5 degree", "EPSG:4326", [6]float64{0, 0.5, 0, 55, 0, -0.5}, 40, 40}, rect(2, 40, 14, 52), nil},
		{gridCase{"lat-lon 0.01 degree", "EPSG:4326", [6]float64{4, 0.01, 0, 46, 0, -0.01}, 140, 220}, rect(4.1, 44.1, 5.3, 45.9), nil},
		{gridCase{"lat-lon 1 degree 70N", "EPSG:4326", [6]float64{-40, 1, 0, 80, 0, -1}, 90, 20}, rect(-30, 62, 40, 78), nil},
		{gridCase{"UTM 33N 10 km", "EPSG:32633", [6]float64{200e3, 10e3, 0, 5700e3, 0, -10e3}, 60, 80}, rect(300e3, 5000e3, 700e3, 5600e3), nil},
		{gridCase{"Mollweide flank", "ESRI:54009", [6]float64{8000e3, 50e3, 0, 8000e3, 0, -50e3}, 80, 80}, rect(9000e3, 5000e3, 11000e3, 7000e3), nil},
		{gridCase{"polar stereographic", "EPSG:3413", [6]float64{-2000e3, 25e3, 0, 0, 0, -25e3}, 120, 100}, rect(-1500e3, -1500e3, 500e3, -600e3), nil},
		{gridCase{"Mollweide vertex on the flank", "ESRI:54009", [6]float64{13000e3, 50e3, 0, 5000e3, 0, -50e3}, 110, 60}, Shape{}, [][2]float64{{180, 30}, {170, 28}, {172, 40}, {180, 30}}},
	} {
		forGrids(t, []gridCase{tc.grid}, func(t *testing.T, g *Grid) {
			s := tc.shape
			if tc.ll != nil {
				s = projectedRing(g, tc.ll)
			}
			checkBoundarySpacing(t, g, s, step)
		})
	}
}

// projectedRing is the shape of one ring through the lon/lat vertices ll
// (closed), projected to g's CRS.
func projectedRing(g *Grid, ll [][2]float64) Shape {
	lons, lats := make([]float64, len(ll)), make([]float64, len(ll))
	for i, p := range ll {
		lons[i], lats[i] = p[0], p[1]
	}
	xs, ys := make([]float64, len(ll)), make([]float64, len(ll))
	g.FromLonLat(lons, lats, xs, ys)
	r := make(orb.Ring, len(ll))
	for i := range r {
		r[i] = orb.Point{xs[i], ys[i]}
	}
	return Shape{Grid: orb.MultiPolygon{{r}}}
}

// checkBoundarySpacing is TestBoundarySpacing on one grid and shape (one
// ring, no seam edge: its last point is its first).
func checkBoundarySpacing(t *testing.T, g *Grid, s Shape, step float64) {
	pts, err := boundaryLonLat(g, s, step)
	if err != nil {
		t.Fatal(err)
	}
	lats, lons := pts.lats, pts.lons
	if len(lats) < 4 {
		t.Fatalf("%d boundary points", len(lats))
	}
	// The points of the first cut (the field's bounds, fieldSites) are
	// among the final ones, and no two neighbours lie farther apart than
	// 2 half.
	if pts.clats != nil {
		all := map[[2]float64]bool{}
		for i := range lats {
			all[[2]float64{lats[i], lons[i]}] = true
		}
		for i := range pts.clats {
			if !all[[2]float64{pts.clats[i], pts.clons[i]}] {
				t.Fatalf("first-cut point (%v, %v) is not among the boundary's points", pts.clats[i], pts.clons[i])
			}
			if i > 0 {
				if d := geodesy.Distance(pts.clats[i-1], pts.clons[i-1], pts.clats[i], pts.clons[i]); d > 2*pts.half {
					t.Fatalf("first-cut points %.1f m apart, half is %.1f m", d, pts.half)
				}
			}
		}
	} else if pts.half != 0 {
		t.Fatalf("half %g with no first cut", pts.half)
	}
	first := 0.0
	side := math.Min(g.GeoTransform[1], -g.GeoTransform[5])
	boundaryEdges(g, s, func(a, b orb.Point) { first += edgeSteps(a, b, side) + 1 })
	widest, length := 0.0, 0.0
	for i := 1; i < len(lats); i++ {
		d := geodesy.Distance(lats[i-1], lons[i-1], lats[i], lons[i])
		widest = math.Max(widest, d)
		length += d
	}
	if widest > step {
		t.Errorf("neighbouring boundary points %.1f m apart, want at most %g", widest, step)
	}
	if d := geodesy.Distance(lats[0], lons[0], lats[len(lats)-1], lons[len(lats)-1]); d > step {
		t.Errorf("the boundary begins (%.5f, %.5f) and ends (%.5f, %.5f) %.1f m apart, want one ring closed within %g m", lats[0], lons[0], lats[len(lats)-1], lons[len(lats)-1], d, step)
	}
	if limit := 1.05*length/step + first; float64(len(lats)) > limit {
		t.Errorf("%d boundary points for %.0f m of boundary, want at most %.0f", len(lats), length, limit)
	}
	t.Logf("%d points, %.1f km, widest gap %.1f m", len(lats), length/1000, widest)
}

// TestBoundaryTooManyPoints: a buffer so small that a 1 m bound would cut
// the region's boundary into more than MaxBoundaryPoints points (0.1 mm:
// a cut every 2.8 cm along some 4,000 km) is refused before the points
// are made, naming the region's file and the two ways out.
func TestBoundaryTooManyPoints(t *testing.T) {
	dir := t.TempDir()
	region := writeGeoJSON(t, dir, "region.geojson", []string{"r"}, [][][2]float64{{{4, 40}, {14, 40}, {14, 50}, {4, 50}, {4, 40}}})
	g, v := geoGrid(t, 0, 55, 0.5, 40, 40)
	_, err := Build(g, v, Spec{Region: region, RegionBuffersKm: []float64{1e-7}}, nil, nil)
	if err == nil {
		t.Fatal("a 0.1 mm region buffer on a 4,000 km boundary was accepted")
	}
	for _, want := range []string{region, "more than 33554432", "give larger --region-buffers", "clip the region"} {
		if !strings.Contains(err.Error(), want) {
			t.Errorf("message %q does not say %q", err, want)
		}
	}
}
