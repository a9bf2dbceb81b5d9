package extent

import (
	"fmt"
	"math"
	"os"
	"path/filepath"
	"reflect"
	"strings"
	"testing"

	"areasweep/extent/geodesy"
	"areasweep/extent/vocab"
)

// geoGrid makes a latitude-longitude grid with every cell valid.
func geoGrid(t *testing.T, west, north, step float64, w, h int) (*Grid, *Valid) {
	t.Helper()
	g, err := NewGrid(w, h, [6]float64{west, step, 0, north, 0, -step}, "EPSG:4326")
	if err != nil {
		t.Fatal(err)
	}
	return g, NewValidFunc(w, h, func(int) bool { return true })
}

// writeGeoJSON writes polygons (lon/lat rings) as a GeoJSON file with an
// "id" property per feature.
func writeGeoJSON(t *testing.T, dir, name string, ids []string, rings [][][2]float64) string {
	t.Helper()
	var feats []string
	for i, r := range rings {
		var pts []string
		for _, p := range r {
			pts = append(pts, fmt.Sprintf("[%g,%g]", p[0], p[1]))
		}
		feats = append(feats, fmt.Sprintf(`{"type":"Feature","properties":{"id":"%s"},"geometry":{"type":"Polygon","coordinates":[[%s]]}}`, ids[i], strings.Join(pts, ",")))
	}
	path := filepath.Join(dir, name)
	body := `{"type":"FeatureCollection","features":[` + strings.Join(feats, ",") + `]}`
	if err := os.WriteFile(path, []byte(body), 0o644); err != nil {
		t.Fatal(err)
	}
	return path
}

func memberIdx(t *testing.T, f *Family, id string) int {
	t.Helper()
	for k, m := range f.Members {
		if m.ID == id {
			return k
		}
	}
	t.Fatalf("no member %q", id)
	return -1
}

// densifyRing returns points along a ring's edges, taken as straight lines
// in longitude/latitude (how a GIS draws and fills an EPSG:4326 polygon),
// at most about step metres apart.
func densifyRing(ring [][2]float64, step float64) (lats, lons []float64) {
	for i := 1; i < len(ring); i++ {
		a, b := ring[i-1], ring[i]
		n := int(math.Ceil(geodesy.Distance(a[1], a[0], b[1], b[0]) / step))
		for k := 0; k <= n; k++ {
			f := float64(k) / float64(n)
			lons = append(lons, a[0]+f*(b[0]-a[0]))
			lats = append(lats, a[1]+f*(b[1]-a[1]))
		}
	}
	return lats, lons
}

// bruteBoundaryKm is the geodesic distance (PROJ's geod_inverse, Karney
// 2013) from a point to the densified boundary, by trying every boundary
// point: the reference the buffer membership is checked against.
func bruteBoundaryKm(lon, lat float64, lats, lons []float64) float64 {
	best := math.Inf(1)
	for k := range lats {
		best = math.Min(best, geodesy.Distance(lat, lon, lats[k], lons[k]))
	}
	return best / 1000
}

// TestRegionBufferMembership checks grown and shrunk region members against
// the geodesic distance (PROJ's geod_inverse, Karney 2013) from every
// other cell centre to the region's boundary, its edges straight in
// longitude and latitude (the raster's CRS): each cell whose distance lies
// farther than bufferTol (1 m, our choice, see bufferStep) from the
// buffer's must be classified correctly. The reference distance is the
// smallest over points every 2 km along the edges, refined by a golden-
// section search on each piece whose ends are within 1 km of that
// smallest (the nearest point of the boundary lies on one of them), to
// 1 mm. The region's boundary was once sampled every cell side (22 km
// here), which overestimated distances by up to hundreds of metres: the
// test counts the cells checked within half a cell diagonal of a buffer's
// edge, those that rule left unchecked.
func TestRegionBufferMembership(t *testing.T) {
	dir := t.TempDir()
	// A non-convex region at mid-latitude, where a degree of longitude is
	// ~71 km and of latitude ~111 km, so planar buffers in degrees would fail.
	ring := [][2]float64{{4, 44}, {10, 44}, {10, 48}, {7, 46.5}, {4, 48}, {4, 44}}
	region := writeGeoJSON(t, dir, "region.geojson", []string{"r"}, [][][2]float64{ring})
	g, v := geoGrid(t, 0, 52, 0.2, 70, 60)
	f, err := Build(g, v, Spec{Region: region, RegionBuffersKm: []float64{-40, 60, 150}}, nil, nil)
	if err != nil {
		t.Fatal(err)
	}
	base := memberIdx(t, f, "base")
	type bufCase struct {
		id string
		d  float64
	}
	cases := []bufCase{{"region_minus40km", -40}, {"region_60km", 60}, {"region_150km", 150}}
	// Half a cell diagonal at this latitude (upper bound over the grid).
	halfDiag := 0.5 * math.Hypot(0.2*111.3, 0.2*111.3*math.Cos(44*math.Pi/180))
	// The margin: bufferTol and the reference's own millimetre, in km.
	margin := (bufferTol + 1e-3) / 1000
	blats, blons := densifyRing(ring, 2000)
	checked, close := 0, 0
	for row := 0; row < g.Height; row++ {
		for col := row % 2; col < g.Width; col += 2 {
			i := row*g.Width + col
			lon, lat := g.Centre(col, row)
			inside := f.Has(base, i)
			dist := bruteBoundaryKm(lon, lat, blats, blons)
			if dist < 200 {
				dist = refinedBoundaryKm(lon, lat, dist, blats, blons)
			}
			for _, c := range cases {
				k := memberIdx(t, f, c.id)
				got := f.Has(k, i)
				var edge float64 // signed distance of the centre from the buffer edge
				var want bool
				if c.d > 0 {
					want = inside || dist <= c.d
					edge = dist - c.d
					if inside {
						edge = -math.Inf(1)
					}
				} else {
					want = inside && dist > -c.d
					edge = dist + c.d
					if !inside {
						edge = math.Inf(1)
					}
				}
				if math.Abs(edge) <= margin {
					continue
				}
				checked++
				if math.Abs(edge) <= halfDiag {
					close++
				}
				if got != want {
					t.Fatalf("%s: cell (%d,%d) at lon %.2f lat %.2f, %.4f km from the boundary (inside %v): member %v, want %v", c.id, col, row, lon, lat, dist, inside, got, want)
				}
			}
		}
	}
	if checked < 2500 || close < 200 {
		t.Errorf("only %d cell checks, %d of them within half a cell diagonal of an edge", checked, close)
	}
	if got := f.Chain("region"); len(got) != 5 {
		t.Errorf("region chain %v, want 5 members (minus40, base, 60, 150, whole)", got)
	}
}

// refinedBoundaryKm is the geodesic distance (km) from a point to the
// boundary whose points every 2 km along edges straight in longitude and
// latitude are lats, lons (densifyRing), given the smallest distance to
// those points, near: the nearest point of the boundary lies on a piece
// with an end within near + 1 km (half a piece), and on each such piece a
// golden-section search on the fraction along it (the distance to a
// piece 2 km long is unimodal along it seen from beyond a few metres)
// finds it to 1 mm.
func refinedBoundaryKm(lon, lat, near float64, lats, lons []float64) float64 {
	best := near * 1000
	reach := best + 1000 + 1
	dist := func(k int, f float64) float64 {
		return geodesy.Distance(lat, lon, lats[k-1]+f*(lats[k]-lats[k-1]), lons[k-1]+f*(lons[k]-lons[k-1]))
	}
	phi := (math.Sqrt(5) - 1) / 2
	for k := 1; k < len(lats); k++ {
		if geodesy.Distance(lat, lon, lats[k-1], lons[k-1]) > reach && geodesy.Distance(lat, lon, lats[k], lons[k]) > reach {
			continue
		}
		a, b := 0.0, 1.0
		for b-a > 1e-7 { // 0.2 mm of a 2 km piece
			c, d := b-phi*(b-a), a+phi*(b-a)
			if dist(k, c) < dist(k, d) {
				b = d
			} else {
				a = c
			}
		}
		best = math.Min(best, dist(k, (a+b)/2))
	}
	return best / 1000
}

// TestPointBuffers checks disc unions against brute-force geodesic
// distance to the nearest point, across the antimeridian (the grid runs
// from 170 E to 170 W).
func TestPointBuffers(t *testing.T) {
	dir := t.TempDir()
	region := writeGeoJSON(t, dir, "r.geojson", []string{"r"}, [][][2]float64{{{175, -40}, {185, -40}, {185, -35}, {175, -35}, {175, -40}}})
	g, v := geoGrid(t, 170, -30, 0.25, 80, 60)
	pts := []LonLat{{178.5, -37}, {-178.8, -38.2}, {179.9, -42}}
	f, err := Build(g, v, Spec{Region: region, Train: pts, PointBuffersKm: []float64{75, 150}}, nil, nil)
	if err != nil {
		t.Fatal(err)
	}
	halfDiag := 0.5 * math.Hypot(0.25*111.3, 0.25*111.3)
	for _, d := range []float64{75, 150} {
		k := memberIdx(t, f, fmt.Sprintf("points_%gkm", d))
		for row := 0; row < g.Height; row++ {
			for col := 0; col < g.Width; col++ {
				lon, lat := g.Centre(col, row)
				best := math.Inf(1)
				for _, p := range pts {
					best = math.Min(best, geodesy.Distance(lat, lon, p.Lat, p.Lon)/1000)
				}
				if math.Abs(best-d) <= halfDiag {
					continue
				}
				got := f.Has(k, row*g.Width+col)
				if got != (best <= d) {
					t.Fatalf("points_%gkm: cell lon %.3f lat %.3f at %.1f km: member %v", d, lon, lat, best, got)
				}
			}
		}
	}
}

// TestHullAcrossAntimeridian: a hull of points on both sides of 180 degrees
// must be the narrow hull across the antimeridian, not one spanning 356
// degrees of raw longitude.
func TestHullAcrossAntimeridian(t *testing.T) {
	dir := t.TempDir()
	region := writeGeoJSON(t, dir, "r.geojson", []string{"r"}, [][][2]float64{{{175, -40}, {185, -40}, {185, -35}, {175, -35}, {175, -40}}})
	g, v := geoGrid(t, 170, -30, 0.25, 80, 60)
	// A square of side 4 degrees centred on 180 E, 38 S, plus interior points.
	pts := []LonLat{{178, -36}, {-178, -36}, {-178, -40}, {178, -40}, {179, -38}, {-179.5, -37}}
	f, err := Build(g, v, Spec{Region: region, Train: pts, HullBuffersKm: []float64{0, 100}}, nil, nil)
	if err != nil {
		t.Fatal(err)
	}
	k := memberIdx(t, f, "hull")
	for row := 0; row < g.Height; row++ {
		for col := 0; col < g.Width; col++ {
			lon, lat := g.Centre(col, row)
			// Great-circle edges bow from the parallels by well under 0.1
			// degree here; test only cells at least 0.3 degree from an edge.
			dl := math.Min(math.Abs(lon-178), math.Abs(lon-182))
			dp := math.Min(math.Abs(lat+36), math.Abs(lat+40))
			if dl < 0.3 || dp < 0.3 {
				continue
			}
			want := lon > 178 && lon < 182 && lat < -36 && lat > -40
			if got := f.Has(k, row*g.Width+col); got != want {
				t.Fatalf("hull: cell lon %.3f lat %.3f member %v want %v", lon, lat, got, want)
			}
		}
	}
	hb := memberIdx(t, f, "hull_100km")
	if f.Members[hb].Cells <= f.Members[k].Cells {
		t.Errorf("hull_100km has %d cells, hull %d", f.Members[hb].Cells, f.Members[k].Cells)
	}
}

// TestEcoregionSelection uses four unit squares in a row, A B C D, with two
// training points in A and one in C: a constructed layer with known answers.
func TestEcoregionSelection(t *testing.T) {
	dir := t.TempDir()
	sq := func(x0 float64) [][2]float64 {
		return [][2]float64{{x0, 10}, {x0 + 2, 10}, {x0 + 2, 12}, {x0, 12}, {x0, 10}}
	}
	units := writeGeoJSON(t, dir, "units.geojson", []string{"A", "B", "C", "D"}, [][][2]float64{sq(0), sq(2), sq(4), sq(6)})
	region := writeGeoJSON(t, dir, "r.geojson", []string{"r"}, [][][2]float64{{{0.5, 10.5}, {4.5, 10.5}, {4.5, 11.5}, {0.5, 11.5}, {0.5, 10.5}}})
	g, v := geoGrid(t, 0, 12, 0.1, 80, 20)
	train := []LonLat{{0.5, 11}, {1.5, 11.2}, {5.1, 10.9}}
	cases := []struct {
		k                int
		selected, plus   string // unit letters
		cells, plusCells int64
	}{
		{1, "AC", "ABCD", 800, 1600},
		{2, "A", "AB", 400, 800},
	}
	for _, c := range cases {
		t.Run(fmt.Sprintf("k=%d", c.k), func(t *testing.T) {
			f, err := Build(g, v, Spec{Region: region, Train: train, Ecoregions: units, EcoregionField: "id", EcoregionMinPoints: c.k, EcoregionClip: true}, nil, nil)
			if err != nil {
				t.Fatal(err)
			}
			sel := f.Members[memberIdx(t, f, fmt.Sprintf("ecoregions_k%d", c.k))]
			plus := f.Members[memberIdx(t, f, fmt.Sprintf("ecoregions_k%d_touching", c.k))]
			if sel.Cells != c.cells || plus.Cells != c.plusCells {
				t.Errorf("cells %d and %d, want %d (%s) and %d (%s)", sel.Cells, plus.Cells, c.cells, c.selected, c.plusCells, c.plus)
			}
			clip := f.Members[memberIdx(t, f, fmt.Sprintf("ecoregions_k%d_clipped", c.k))]
			base := f.Members[memberIdx(t, f, "base")]
			if clip.Cells > base.Cells || clip.Cells == 0 {
				t.Errorf("clipped member has %d cells, base %d", clip.Cells, base.Cells)
			}
		})
	}
}

// sameAndOffFamily builds, on a 0.1-degree grid of 40 x 40 cells, the
// family of the square 1..3 degrees as region with two extra layers: the
// same square ("same", a duplicate of the base) and one off the grid
// ("off", empty).
func sameAndOffFamily(t *testing.T, dir string) *Family {
	t.Helper()
	ring := [][][2]float64{{{1, 1}, {3, 1}, {3, 3}, {1, 3}, {1, 1}}}
	region := writeGeoJSON(t, dir, "r.geojson", []string{"r"}, ring)
	same := writeGeoJSON(t, dir, "same.geojson", []string{"s"}, ring)
	off := writeGeoJSON(t, dir, "off.geojson", []string{"o"}, [][][2]float64{{{50, 50}, {51, 50}, {51, 51}, {50, 51}, {50, 50}}})
	g, v := geoGrid(t, 0, 4, 0.1, 40, 40)
	f, err := Build(g, v, Spec{Region: region, Extra: []Named{{"same", same}, {"off", off}}}, nil, nil)
	if err != nil {
		t.Fatal(err)
	}
	return f
}

// TestEmptyAndDuplicateMembers: a user polygon equal to the base is a
// duplicate and one off the grid is empty; both are reported, not dropped.
func TestEmptyAndDuplicateMembers(t *testing.T) {
	f := sameAndOffFamily(t, t.TempDir())
	if m := f.Members[memberIdx(t, f, "user_same")]; m.Status != vocab.StatusDuplicate || m.DuplicateOf != "base" {
		t.Errorf("user_same: status %s of %q", m.Status, m.DuplicateOf)
	}
	if m := f.Members[memberIdx(t, f, "user_off")]; m.Status != vocab.StatusEmpty {
		t.Errorf("user_off: status %s", m.Status)
	}
	if n := f.Members[memberIdx(t, f, "base")].Cells; n != 400 {
		t.Errorf("base has %d cells, want 400 (20 x 20 cells of 0.1 degree)", n)
	}
}

// TestGlobalGridArea: the exact cell areas of a global 1-degree grid sum to
// the area of the WGS84 ellipsoid, 2 pi a^2 (1 + (1-e^2)/e atanh e)
// (closed form for an oblate ellipsoid of revolution, e.g. Snyder 1987),
// to 1e-9 relative.
func TestGlobalGridArea(t *testing.T) {
	g, _ := geoGrid(t, -180, 90, 1, 360, 180)
	sum := 0.0
	row := make([]float64, g.Width)
	for r := 0; r < g.Height; r++ {
		for _, a := range g.RowAreas(r, row) {
			sum += a
		}
	}
	a := 6378.137
	f := 1 / 298.257223563
	e2 := f * (2 - f)
	e := math.Sqrt(e2)
	want := 2 * math.Pi * a * a * (1 + (1-e2)/e*math.Atanh(e))
	if math.Abs(sum-want)/want > 1e-9 {
		t.Errorf("sum of cell areas %.3f km2, ellipsoid %.3f km2", sum, want)
	}
}

// TestWebMercatorCellArea: a cell of an EPSG:3857 grid is a latitude-
// longitude quadrangle (lat = atan(sinh(y/a)), lon = x/a, the inverse of
// the spherical Mercator formulas EPSG:3857 defines), so its true area is
// the ellipsoidal quadrangle area. The grid's block-factor method must
// agree to 0.1% (TestProjectedCellAreas checks such cells to 1e-9).
func TestWebMercatorCellArea(t *testing.T) {
	const a = 6378137.0
	size := 20000.0
	y0 := 5.5e6 // ~ 44 degrees N
	g, err := NewGrid(10, 10, [6]float64{0, size, 0, y0, 0, -size}, "EPSG:3857")
	if err != nil {
		t.Fatal(err)
	}
	if g.EqualArea {
		t.Fatal("EPSG:3857 is not equal-area")
	}
	row := g.RowAreas(3, nil)
	top, bot := y0-3*size, y0-4*size
	lat := func(y float64) float64 { return math.Atan(math.Sinh(y/a)) * 180 / math.Pi }
	want := geodesy.CellArea(lat(bot), lat(top), size/a*180/math.Pi) / 1e6
	if math.Abs(row[0]-want)/want > 1e-3 {
		t.Errorf("cell area %.6f km2, quadrangle %.6f km2", row[0], want)
	}
	planar := size * size / 1e6
	if row[0] > planar*0.6 {
		t.Errorf("cell area %.3f km2 is close to the planar %.3f km2: scale factor not applied", row[0], planar)
	}
}

// TestFillMatchesContains: scanline filling and the point test agree on
// every cell centre of a polygon with a hole (same half-open rule).
func TestFillMatchesContains(t *testing.T) {
	dir := t.TempDir()
	path := filepath.Join(dir, "hole.geojson")
	os.WriteFile(path, []byte(`{"type":"FeatureCollection","features":[{"type":"Feature","properties":{},"geometry":{"type":"Polygon","coordinates":[[[0.05,0.05],[3.95,0.3],[3.6,3.9],[0.2,3.7],[0.05,0.05]],[[1,1],[2,1],[2,2],[1,2],[1,1]]]}}]}`), 0o644)
	g, _ := geoGrid(t, 0, 4, 0.1, 40, 40)
	s, _, err := ReadShape(path, g)
	if err != nil {
		t.Fatal(err)
	}
	filled := make([]bool, g.Cells())
	Fill(g, s.Grid, func(row, c0, c1 int) {
		for c := c0; c < c1; c++ {
			filled[row*g.Width+c] = true
		}
	})
	n := 0
	for row := 0; row < g.Height; row++ {
		for col := 0; col < g.Width; col++ {
			x, y := g.Centre(col, row)
			if Contains(g, s.Grid, x, y) != filled[row*g.Width+col] {
				t.Fatalf("cell (%d,%d): Fill and Contains disagree", col, row)
			}
			if filled[row*g.Width+col] {
				n++
			}
		}
	}
	// The 10 x 10 cells of the hole are out; the hole's centre cell is out.
	if x, y := g.Centre(15, 25); Contains(g, s.Grid, x, y) {
		t.Error("cell in the hole is inside")
	}
	if n == 0 || n > 1500 {
		t.Errorf("%d cells filled", n)
	}
}

// TestBadGeometry: invalid features are repaired with a warning naming the
// file and feature; empty layers, missing CRS and antimeridian-jumping
// rings are refused with a message naming the file.
func TestBadGeometry(t *testing.T) {
	dir := t.TempDir()
	g, _ := geoGrid(t, 0, 4, 0.1, 40, 40)
	// A bow-tie: self-intersecting at (2,2).
	bow := writeGeoJSON(t, dir, "bow.geojson", []string{"b"}, [][][2]float64{{{1, 1}, {3, 3}, {3, 1}, {1, 3}, {1, 1}}})
	s, warns, err := ReadShape(bow, g)
	if err != nil {
		t.Fatalf("bow-tie should be repaired, got %v", err)
	}
	if len(warns) != 1 || !strings.Contains(warns[0], "bow.geojson feature 1") || !strings.Contains(warns[0], "repaired") {
		t.Errorf("warnings %q", warns)
	}
	n := 0
	Fill(g, s.Grid, func(row, c0, c1 int) { n += c1 - c0 })
	// The repaired bow-tie is two triangles of 1 square degree each: about
	// 200 cells of 0.01 square degree (by construction).
	if n < 180 || n > 220 {
		t.Errorf("repaired bow-tie covers %d cells, want about 200", n)
	}

	empty := filepath.Join(dir, "empty.geojson")
	os.WriteFile(empty, []byte(`{"type":"FeatureCollection","features":[]}`), 0o644)
	if _, _, err := ReadShape(empty, g); err == nil || !strings.Contains(err.Error(), "empty.geojson") || !strings.Contains(err.Error(), "holds no features at all") {
		t.Errorf("empty layer: %v", err)
	}

	// A Shapefile without .prj has no CRS.
	shp := filepath.Join(dir, "nocrs.shp")
	{
		ds, err := godalCreateShapefile(shp)
		if err != nil {
			t.Fatal(err)
		}
		_ = ds
	}
	if _, _, err := ReadShape(shp, g); err == nil || !strings.Contains(err.Error(), "no CRS") {
		t.Errorf("shapefile without CRS: %v", err)
	}

	// An edge from 179 E to 179 W drawn the long way round, in the
	// second feature: the message names it.
	am := writeGeoJSON(t, dir, "am.geojson", []string{"a", "b"}, [][][2]float64{{{1, 1}, {2, 1}, {2, 2}, {1, 1}}, {{179, 1}, {-179, 1}, {-179, 3}, {179, 3}, {179, 1}}})
	if _, _, err := ReadShape(am, g); err == nil || !strings.Contains(err.Error(), "antimeridian") || !strings.Contains(err.Error(), "feature 2:") {
		t.Errorf("antimeridian ring: %v", err)
	}
}

// TestRegionSplitAtAntimeridian: a region given as two polygons cut at 180
// degrees (the usual way to store it in -180..180) is buffered as the one
// rectangle 175 E - 175 W it is: the cut is not a boundary, so shrinking
// keeps the cells along 180 and the whole family agrees with brute-force
// distance to the true outline.
func TestRegionSplitAtAntimeridian(t *testing.T) {
	dir := t.TempDir()
	east := [][2]float64{{175, -50}, {180, -50}, {180, -40}, {175, -40}, {175, -50}}
	west := [][2]float64{{-180, -50}, {-175, -50}, {-175, -40}, {-180, -40}, {-180, -50}}
	region := writeGeoJSON(t, dir, "split.geojson", []string{"e", "w"}, [][][2]float64{east, west})
	g, v := geoGrid(t, 170, -35, 0.25, 80, 80)
	f, err := Build(g, v, Spec{Region: region, RegionBuffersKm: []float64{-100, 100}}, nil, nil)
	if err != nil {
		t.Fatal(err)
	}
	outline := [][2]float64{{175, -50}, {185, -50}, {185, -40}, {175, -40}, {175, -50}}
	blats, blons := densifyRing(outline, 4000)
	base := memberIdx(t, f, "base")
	if n := f.Members[base].Cells; n != 40*40 {
		t.Fatalf("base has %d cells, want 1600 (10 x 10 degrees of 0.25-degree cells)", n)
	}
	halfDiag := 0.5 * math.Hypot(0.25*111.3, 0.25*111.3)
	for _, c := range []struct {
		id string
		d  float64
	}{{"region_minus100km", -100}, {"region_100km", 100}} {
		k := memberIdx(t, f, c.id)
		for row := 0; row < g.Height; row += 3 {
			for col := row % 3; col < g.Width; col += 3 {
				i := row*g.Width + col
				lon, lat := g.Centre(col, row)
				inside := f.Has(base, i)
				dist := bruteBoundaryKm(lon, lat, blats, blons)
				if math.Abs(dist-math.Abs(c.d)) <= halfDiag {
					continue
				}
				want := inside && dist > -c.d
				if c.d > 0 {
					want = inside || dist <= c.d
				}
				if got := f.Has(k, i); got != want {
					t.Fatalf("%s: cell lon %.3f lat %.3f (%.1f km from the outline, inside %v): member %v, want %v", c.id, lon, lat, dist, inside, got, want)
				}
			}
		}
	}
}

// TestPolarCap: a cap north of 80 N, stored as two half-caps that run along
// the antimeridian, the prime meridian and the pole line, touches the pole.
// Only the parallel at 80 N is its boundary, so a cell is in the 200 km
// growth exactly when its centre is within 200 km of that parallel: the
// meridian arc from the centre's latitude to 80 N (geodesic distance along
// a meridian, PROJ), and likewise for shrinking by 100 km.
func TestPolarCap(t *testing.T) {
	dir := t.TempDir()
	half1 := [][2]float64{{-180, 80}, {0, 80}, {0, 90}, {-180, 90}, {-180, 80}}
	half2 := [][2]float64{{0, 80}, {180, 80}, {180, 90}, {0, 90}, {0, 80}}
	region := writeGeoJSON(t, dir, "cap.geojson", []string{"a", "b"}, [][][2]float64{half1, half2})
	g, v := geoGrid(t, -180, 90, 1, 360, 30)
	f, err := Build(g, v, Spec{Region: region, RegionBuffersKm: []float64{-100, 200}}, nil, nil)
	if err != nil {
		t.Fatal(err)
	}
	grow, shrink := memberIdx(t, f, "region_200km"), memberIdx(t, f, "region_minus100km")
	for row := 0; row < g.Height; row++ {
		lat := 90 - float64(row) - 0.5
		d := geodesy.Distance(lat, 10, 80, 10) / 1000
		for col := 0; col < g.Width; col += 7 {
			i := row*g.Width + col
			if math.Abs(d-200) > 60 {
				if got, want := f.Has(grow, i), lat > 80 || d <= 200; got != want {
					t.Fatalf("region_200km at lat %.1f lon col %d (%.0f km from 80 N): %v, want %v", lat, col, d, got, want)
				}
			}
			if math.Abs(d-100) > 60 {
				if got, want := f.Has(shrink, i), lat > 80 && d > 100; got != want {
					t.Fatalf("region_minus100km at lat %.1f col %d (%.0f km from 80 N): %v, want %v", lat, col, d, got, want)
				}
			}
		}
	}
}

// TestPolarCapOnePiece: a cap north of 60 N written as one ring from -180
// to 180 (edges along the 60 N parallel across the whole map, along the
// antimeridian and along the pole line), with a hole, gives every member
// the cells of the same cap written as two halves split at 0 and 180
// degrees (the form TestPolarCap checks against PROJ): on a grid running
// -180..180 and on one running 0..360, whose columns are the same cells
// half a turn apart. Before, the whole-turn edge was refused as an
// antimeridian crossing.
func TestPolarCapOnePiece(t *testing.T) {
	dir := t.TempDir()
	hole := `[[100,70],[100,75],[120,75],[120,70],[100,70]]`
	whole := `[[[-180,60],[180,60],[180,90],[-180,90],[-180,60]],` + hole + `]`
	west := `[[[-180,60],[0,60],[0,90],[-180,90],[-180,60]]]`
	east := `[[[0,60],[180,60],[180,90],[0,90],[0,60]],` + hole + `]`
	write := func(name string, polys ...string) string {
		var feats []string
		for i, p := range polys {
			feats = append(feats, fmt.Sprintf(`{"type":"Feature","properties":{"id":"%d"},"geometry":{"type":"Polygon","coordinates":%s}}`, i, p))
		}
		path := filepath.Join(dir, name)
		if err := os.WriteFile(path, []byte(`{"type":"FeatureCollection","features":[`+strings.Join(feats, ",")+`]}`), 0o644); err != nil {
			t.Fatal(err)
		}
		return path
	}
	onePiece, halves := write("one.geojson", whole), write("halves.geojson", west, east)
	spec := func(region string) Spec {
		return Spec{Region: region, RegionBuffersKm: []float64{-150, 300}}
	}
	build := func(region string, w0 float64) *Family {
		g, v := geoGrid(t, w0, 90, 2, 180, 45)
		f, err := Build(g, v, spec(region), nil, nil)
		if err != nil {
			t.Fatalf("%s on a grid from %g: %v", filepath.Base(region), w0, err)
		}
		return f
	}
	ref := build(halves, -180)
	for _, c := range []struct {
		region string
		west   float64
	}{{onePiece, -180}, {onePiece, 0}, {halves, 0}} {
		f := build(c.region, c.west)
		shift := int(math.Round((c.west + 180) / 2)) // columns of the reference grid
		sameMembers(t, fmt.Sprintf("%s on a grid from %g", filepath.Base(c.region), c.west), f, ref,
			[]string{"base", "region_minus150km", "region_300km"}, func(i int) int { return i/180*180 + (i%180+shift)%180 })
	}
	// The hole is out of the base region and the cap is in it.
	kb := memberIdx(t, ref, "base")
	if ref.Has(kb, 9*180+145) || !ref.Has(kb, 2*180+10) {
		t.Fatal("the hole (lat 71, lon 111) is in the base region, or the cap (lat 85, lon -159) is not")
	}
}

// TestPolarCapProjected: the cap north of 70 N written in one piece in
// longitude/latitude (as TestPolarCapOnePiece) and a square in the
// raster's own CRS, on a polar stereographic raster (EPSG:3413, 20 km
// cells, the pole at its centre). The cap's base is the cells whose centre
// lies north of 70 N, and its 100 km shrink the cells more than 100 km
// from the 70 N parallel (the meridian arc, PROJ): the edges that cut the
// ring at the antimeridian and the pole are not its boundary. Cells within
// 30 km of either boundary (a cell's half diagonal is 14 km) are not
// checked. The square, whose corners' longitudes run round the pole, is
// no antimeridian crossing: it builds. Before, the cap covered no cell and
// the square was refused.
func TestPolarCapProjected(t *testing.T) {
	dir := t.TempDir()
	cap := writeGeoJSON(t, dir, "cap.geojson", []string{"c"}, [][][2]float64{{{-180, 70}, {180, 70}, {180, 90}, {-180, 90}, {-180, 70}}})
	const side, cell = 200, 20000.0
	g, err := NewGrid(side, side, [6]float64{-side / 2 * cell, cell, 0, side / 2 * cell, 0, -cell}, "EPSG:3413")
	if err != nil {
		t.Fatal(err)
	}
	v := NewValidFunc(side, side, func(int) bool { return true })
	f, err := Build(g, v, Spec{Region: cap, RegionBuffersKm: []float64{-100}}, nil, nil)
	if err != nil {
		t.Fatal(err)
	}
	base, shrink := memberIdx(t, f, "base"), memberIdx(t, f, "region_minus100km")
	lons, lats := make([]float64, side), make([]float64, side)
	checked := [2]int{}
	for row := range side {
		g.RowLonLat(row, lons, lats)
		for col := range side {
			i := row*side + col
			d := geodesy.Distance(lats[col], lons[col], 70, lons[col]) / 1000
			if d > 30 {
				checked[0]++
				if got, want := f.Has(base, i), lats[col] > 70; got != want {
					t.Fatalf("base at lat %.2f lon %.2f (%.0f km from 70 N): %v, want %v", lats[col], lons[col], d, got, want)
				}
			}
			if math.Abs(d-100) > 30 {
				checked[1]++
				if got, want := f.Has(shrink, i), lats[col] > 70 && d > 100; got != want {
					t.Fatalf("region_minus100km at lat %.2f lon %.2f (%.0f km from 70 N): %v, want %v", lats[col], lons[col], d, got, want)
				}
			}
		}
	}
	if checked[0] < side*side/2 || checked[1] < side*side/2 {
		t.Fatalf("only %v cells checked", checked)
	}
	sq := filepath.Join(dir, "square.gpkg")
	writePolygonGPKG(t, sq, 3413, [][2]float64{{-1.5e6, -1.5e6}, {1.5e6, -1.5e6}, {1.5e6, 1.5e6}, {-1.5e6, 1.5e6}, {-1.5e6, -1.5e6}})
	if _, err := Build(g, v, Spec{Region: sq, RegionBuffersKm: []float64{-100}}, nil, nil); err != nil {
		t.Fatalf("a square round the pole in the raster's CRS: %v", err)
	}
}

// projectRing returns the ring of longitude/latitude points lonlat in
// the CRS EPSG:epsg (PROJ, through a grid in that CRS).
func projectRing(t *testing.T, epsg int, lonlat [][2]float64) [][2]float64 {
	t.Helper()
	g, err := NewGrid(1, 1, [6]float64{0, 1, 0, 0, 0, -1}, fmt.Sprintf("EPSG:%d", epsg))
	if err != nil {
		t.Fatal(err)
	}
	lons, lats := make([]float64, len(lonlat)), make([]float64, len(lonlat))
	for i, p := range lonlat {
		lons[i], lats[i] = p[0], p[1]
	}
	xs, ys := make([]float64, len(lonlat)), make([]float64, len(lonlat))
	g.FromLonLat(lons, lats, xs, ys)
	out := make([][2]float64, len(lonlat))
	for i := range out {
		out[i] = [2]float64{xs[i], ys[i]}
	}
	return out
}

// TestProjectedRegionAcrossAntimeridian: a region stored in a projected
// CRS that runs across 180 degrees, on a latitude-longitude raster
// running -180..180. A rectangle in the Pacific-centred Mercator
// (EPSG:3832, its edges parallels and meridians) from 175 E to 175 W gives
// every member the cells of the same rectangle written in
// longitude/latitude as two polygons split at 180 (TestRegionSplitAt-
// Antimeridian's form). A circle of latitude 70 S stored in the Antarctic
// polar stereographic CRS (EPSG:3031, a vertex every half degree) covers
// the cells south of 70 S, and its 200 km growth those within 200 km of
// that parallel (the meridian arc, PROJ; cells within 30 km of either
// line not checked). Before, both were refused as crossing the
// antimeridian.
func TestProjectedRegionAcrossAntimeridian(t *testing.T) {
	dir := t.TempDir()
	g, v := geoGrid(t, -180, 0, 0.5, 720, 180)
	build := func(region string) *Family {
		f, err := Build(g, v, Spec{Region: region, RegionBuffersKm: []float64{-100, 200}}, nil, nil)
		if err != nil {
			t.Fatalf("%s: %v", filepath.Base(region), err)
		}
		return f
	}
	rect := projectRing(t, 3832, [][2]float64{{175, -30}, {185, -30}, {185, -10}, {175, -10}, {175, -30}})
	merc := filepath.Join(dir, "pacific.gpkg")
	writePolygonGPKG(t, merc, 3832, rect)
	split := writeGeoJSON(t, dir, "split.geojson", []string{"w", "e"}, [][][2]float64{
		{{175, -30}, {180, -30}, {180, -10}, {175, -10}, {175, -30}},
		{{-180, -30}, {-175, -30}, {-175, -10}, {-180, -10}, {-180, -30}},
	})
	sameMembers(t, "EPSG:3832 against the split rectangle", build(merc), build(split),
		[]string{"base", "region_minus100km", "region_200km"}, func(i int) int { return i })
	var circle [][2]float64
	for k := 0; k <= 720; k++ {
		circle = append(circle, [2]float64{-180 + float64(k%720)*0.5, -70})
	}
	ant := filepath.Join(dir, "antarctic.gpkg")
	writePolygonGPKG(t, ant, 3031, projectRing(t, 3031, circle))
	f := build(ant)
	base, grow := memberIdx(t, f, "base"), memberIdx(t, f, "region_200km")
	checked := 0
	for row := range 180 {
		lat := -float64(row)*0.5 - 0.25
		d := geodesy.Distance(lat, 0, -70, 0) / 1000
		for col := 0; col < 720; col += 3 {
			i := row*720 + col
			if d > 30 {
				if got, want := f.Has(base, i), lat < -70; got != want {
					t.Fatalf("base at lat %.2f col %d (%.0f km from 70 S): %v, want %v", lat, col, d, got, want)
				}
			}
			if math.Abs(d-200) > 30 && d > 30 {
				checked++
				if got, want := f.Has(grow, i), lat < -70 || d <= 200; got != want {
					t.Fatalf("region_200km at lat %.2f col %d (%.0f km from 70 S): %v, want %v", lat, col, d, got, want)
				}
			}
		}
	}
	if checked < 10000 {
		t.Fatalf("only %d cells checked", checked)
	}
}

// TestRegionWestOfGridAcrossAntimeridian: on a grid running 170..190, a
// region of two apart polygons, one partly on the grid west of 180
// (165..176) and one wholly west of the grid (160..169.5, but within its
// buffers' reach), gives the cells that a grid running 150..190, which holds both,
// gives its same cells: the polygons stay where they are instead of being
// moved a turn east, where the first lost its cells and the second made
// the run fail with a longitude of 520.
func TestRegionWestOfGridAcrossAntimeridian(t *testing.T) {
	dir := t.TempDir()
	region := writeGeoJSON(t, dir, "r.geojson", []string{"a", "b"}, [][][2]float64{
		{{160, -20}, {169.5, -20}, {169.5, -12}, {160, -12}, {160, -20}},
		{{165, -28}, {176, -28}, {176, -22}, {165, -22}, {165, -28}},
	})
	spec := Spec{Region: region, RegionBuffersKm: []float64{-20, 100, 300}}
	narrow, nv := geoGrid(t, 170, -10, 0.1, 200, 200)
	wide, wv := geoGrid(t, 150, -10, 0.1, 400, 200)
	fn, err := Build(narrow, nv, spec, nil, nil)
	if err != nil {
		t.Fatal(err)
	}
	fw, err := Build(wide, wv, spec, nil, nil)
	if err != nil {
		t.Fatal(err)
	}
	sameMembers(t, "the 170..190 grid against the 150..190 one", fn, fw,
		[]string{"base", "region_minus20km", "region_100km", "region_300km"}, func(i int) int { return i/200*400 + i%200 + 200 })
}

// sameMembers checks that each member ids of got has, on every cell i of
// got's grid, the membership that the same member of want has on cell
// at(i) of want's grid (the same place on another grid or from another
// region file), and that the comparison shows something: the member
// holds some of got's cells and not all. label names the case.
func sameMembers(t *testing.T, label string, got, want *Family, ids []string, at func(i int) int) {
	t.Helper()
	cells := got.Grid.Cells()
	for _, id := range ids {
		kg, kw := memberIdx(t, got, id), memberIdx(t, want, id)
		n := 0
		for i := range cells {
			g, w := got.Has(kg, i), want.Has(kw, at(i))
			if g != w {
				t.Fatalf("%s: %s at row %d col %d: %v, want %v", label, id, i/got.Grid.Width, i%got.Grid.Width, g, w)
			}
			if g {
				n++
			}
		}
		if n == 0 || n == cells {
			t.Fatalf("%s: %s holds %d of %d cells: the comparison shows nothing", label, id, n, cells)
		}
	}
}

// TestClipEqualsBuildOnValid: building on every cell and clipping to the
// valid cells afterwards gives the family built on the valid cells at once.
func TestClipEqualsBuildOnValid(t *testing.T) {
	dir := t.TempDir()
	region := writeGeoJSON(t, dir, "r.geojson", []string{"r"}, [][][2]float64{{{1, 1}, {3, 1}, {3, 3}, {1, 3}, {1, 1}}})
	same := writeGeoJSON(t, dir, "s.geojson", []string{"s"}, [][][2]float64{{{1, 1}, {3.6, 1}, {3.6, 3}, {1, 3}, {1, 1}}})
	g, _ := geoGrid(t, 0, 4, 0.1, 40, 40)
	valid := NewValidFunc(g.Width, g.Height, func(i int) bool {
		return i%g.Width < 30 // columns east of 3 E have no data
	})
	train := []LonLat{{1.5, 1.5}, {2.5, 2.2}, {1.2, 2.8}}
	trainCells := []int{25*40 + 15, 18*40 + 25, 12*40 + 12}
	spec := Spec{Region: region, RegionBuffersKm: []float64{30}, Train: train, PointBuffersKm: []float64{40}, Extra: []Named{{"wide", same}}}
	direct, err := Build(g, valid, spec, trainCells, nil)
	if err != nil {
		t.Fatal(err)
	}
	later, err := Build(g, nil, spec, trainCells, nil)
	if err != nil {
		t.Fatal(err)
	}
	if later.Members[memberIdx(t, later, "user_wide")].Status != vocab.StatusOK {
		t.Fatal("user_wide differs from base on all cells, so it is not a duplicate before clipping")
	}
	later.Clip(valid, trainCells, nil)
	if !reflect.DeepEqual(direct.Members, later.Members) {
		t.Errorf("members differ:\n%+v\n%+v", direct.Members, later.Members)
	}
	if !sameMembership(direct, later) || !reflect.DeepEqual(direct.Chains, later.Chains) {
		t.Error("masks or chains differ")
	}
	if m := later.Members[memberIdx(t, later, "user_wide")]; m.Status != vocab.StatusDuplicate || m.DuplicateOf != "base" {
		t.Errorf("user_wide after clipping: %s of %q, want duplicate of base", m.Status, m.DuplicateOf)
	}
}

// TestHullAroundPole: training points ringing the north pole at 75 N give
// a hull holding the pole; every cell north of 76 N is inside (the hull's
// great-circle edges between points 30 degrees of longitude apart dip at
// most ~0.9 degree below the points' latitude, so 76 N is clear of them;
// by construction).
func TestHullAroundPole(t *testing.T) {
	dir := t.TempDir()
	region := writeGeoJSON(t, dir, "r.geojson", []string{"r"}, [][][2]float64{{{-10, 70}, {10, 70}, {10, 72}, {-10, 72}, {-10, 70}}})
	g, v := geoGrid(t, -180, 90, 1, 360, 30)
	var pts []LonLat
	for lon := -180.0; lon < 180; lon += 30 {
		pts = append(pts, LonLat{Lon: lon, Lat: 75})
	}
	f, err := Build(g, v, Spec{Region: region, Train: pts, HullBuffersKm: []float64{0}}, nil, nil)
	if err != nil {
		t.Fatal(err)
	}
	k := memberIdx(t, f, "hull")
	for row := 0; row < 14; row++ { // centres 89.5 .. 76.5 N
		for col := 0; col < g.Width; col++ {
			if !f.Has(k, row*g.Width+col) {
				t.Fatalf("cell at lat %.1f lon %d is outside the hull around the pole", 89.5-float64(row), col-180)
			}
		}
	}
	for row := 17; row < g.Height; row++ { // 72.5 N and south
		for col := 0; col < g.Width; col++ {
			if f.Has(k, row*g.Width+col) {
				t.Fatalf("cell at lat %.1f is inside the hull", 89.5-float64(row))
			}
		}
	}
}
