package extent

import (
	"math"
	"path/filepath"
	"strings"
	"testing"

	"github.com/airbusgeo/godal"

	"areasweep/extent/geodesy"
)

// TestRegionSeamOnProjectedGrid: latitude-longitude regions cut at 180
// degrees on projected grids, shrunk by 100 km. A region split at 180
// degrees (170 E - 170 W, 48 - 72 N, as two polygons) on world maps centred
// on Greenwich, where its halves lie on the map's opposite edges: on
// Mollweide the run was refused (vertices on the 180th meridian, projected
// to the map's edge, failed PROJ's inverse by a rounding error: "a vertex
// (1.39389e+07, 5.72608e+06) cannot be transformed to WGS84"); on Equal
// Earth the cut was taken as a boundary and region_minus100km lost the
// cells within 100 km of 180 degrees. A cap north of 65 N written with
// vertices every 5 degrees along all its edges on a polar stereographic
// grid (EPSG:3413): its cut along 180 degrees up to the pole was a
// boundary (a slit), with the same loss. Membership is checked against
// brute-force geodesic distance to the true outline (170 E to 190 E; the
// 65 N parallel, along the meridian), leaving out cells within half a
// cell diagonal of the buffer's edge, widened by the 5 km the outline's
// points at every 10 km may add (the acceptance rule of
// TestRegionBufferMembership).
func TestRegionSeamOnProjectedGrid(t *testing.T) {
	dir := t.TempDir()
	east := [][2]float64{{170, 48}, {180, 48}, {180, 72}, {170, 72}, {170, 48}}
	west := [][2]float64{{-180, 48}, {-170, 48}, {-170, 72}, {-180, 72}, {-180, 48}}
	split := writeGeoJSON(t, dir, "split.geojson", []string{"e", "w"}, [][][2]float64{east, west})
	outline := [][2]float64{{170, 48}, {190, 48}, {190, 72}, {170, 72}, {170, 48}}
	blats, blons := densifyRing(outline, 10000)
	splitDist := func(lon, lat float64) float64 { return bruteBoundaryKm(lon, lat, blats, blons) }
	var capRing [][2]float64
	for lon := -180.0; lon < 180; lon += 5 {
		capRing = append(capRing, [2]float64{lon, 65})
	}
	for lat := 65.0; lat < 90; lat += 5 {
		capRing = append(capRing, [2]float64{180, lat})
	}
	for lon := 180.0; lon > -180; lon -= 5 {
		capRing = append(capRing, [2]float64{lon, 90})
	}
	for lat := 90.0; lat >= 65; lat -= 5 {
		capRing = append(capRing, [2]float64{-180, lat})
	}
	cap := writeGeoJSON(t, dir, "cap.geojson", []string{"c"}, [][][2]float64{capRing})
	capDist := func(lon, lat float64) float64 { return geodesy.Distance(lat, lon, 65, lon) / 1000 }
	for _, c := range []struct {
		name, crs, region string
		west, north, step float64
		w, h              int
		dist              func(lon, lat float64) float64
	}{
		{"Mollweide", "ESRI:54009", split, -18100000, 9100000, 100000, 362, 182, splitDist},
		{"Equal Earth", "EPSG:8857", split, -17300000, 8500000, 100000, 346, 170, splitDist},
		{"polar cap", "EPSG:3413", cap, -3000000, 3000000, 50000, 120, 120, capDist},
	} {
		t.Run(c.name, func(t *testing.T) {
			g, err := NewGrid(c.w, c.h, [6]float64{c.west, c.step, 0, c.north, 0, -c.step}, c.crs)
			if err != nil {
				t.Fatal(err)
			}
			defer g.Close()
			f, err := Build(g, nil, Spec{Region: c.region, RegionBuffersKm: []float64{-100}}, nil, nil)
			if err != nil {
				t.Fatal(err)
			}
			base, k := memberIdx(t, f, "base"), memberIdx(t, f, "region_minus100km")
			margin := 0.5*math.Sqrt2*c.step/1000*1.2 + 5 // 1.2: cells are not squares on the Earth (our margin)
			checked, nearSeam := 0, 0
			for row := 0; row < g.Height; row++ {
				for col := 0; col < g.Width; col++ {
					i := row*g.Width + col
					if !f.Has(base, i) {
						continue
					}
					x, y := g.Centre(col, row)
					lon, lat := make([]float64, 1), make([]float64, 1)
					g.ToLonLat([]float64{x}, []float64{y}, lon, lat)
					dist := c.dist(lon[0], lat[0])
					if math.Abs(dist-100) <= margin {
						continue
					}
					checked++
					if math.Abs(math.Abs(lon[0])-180) < 3 {
						nearSeam++
					}
					if got, want := f.Has(k, i), dist > 100; got != want {
						t.Fatalf("cell lon %.3f lat %.3f, %.1f km from the outline: in region_minus100km %v, want %v", lon[0], lat[0], dist, got, want)
					}
				}
			}
			if checked < 50 || nearSeam < 5 {
				t.Fatalf("checked %d cells, %d within 3 degrees of 180: too few to test the seam", checked, nearSeam)
			}
		})
	}
}

// TestRegionOffTheMap: a region drawn in the raster's own CRS (Mollweide,
// ESRI:54009) with a vertex beyond the map's outline (x = 17,000 km at y =
// 6,000 km, where the map's edge is at about 13,000 km) has no longitude
// and latitude there. It is refused with the vertex, the reason and what to
// do; the message used to say only that the vertex "cannot be transformed
// to WGS84".
func TestRegionOffTheMap(t *testing.T) {
	dir := t.TempDir()
	g, err := NewGrid(362, 182, [6]float64{-18100000, 100000, 0, 9100000, 0, -100000}, "ESRI:54009")
	if err != nil {
		t.Fatal(err)
	}
	defer g.Close()
	path := filepath.Join(dir, "beyond.gpkg")
	writePolygonWKT(t, path, g, "POLYGON ((12000000 4000000, 17000000 6000000, 12000000 6000000, 12000000 4000000))")
	_, _, err = ReadShape(path, g)
	if err == nil {
		t.Fatal("a region off the map was read")
	}
	for _, want := range []string{path, "(1.7e+07, 6e+06)", "off the Earth", "clip the layer", "-18100000 -9100000 18100000 9100000", "longitude/latitude"} {
		if !strings.Contains(err.Error(), want) {
			t.Errorf("message lacks %q: %v", want, err)
		}
	}
}

// writePolygonWKT writes a GeoPackage holding one polygon feature, wkt,
// in grid g's CRS.
func writePolygonWKT(t *testing.T, path string, g *Grid, wkt string) {
	t.Helper()
	Register()
	ds, err := godal.CreateVector(godal.GeoPackage, path)
	if err != nil {
		t.Fatal(err)
	}
	layer, err := ds.CreateLayer("region", g.SpatialRef(), godal.GTPolygon)
	if err != nil {
		t.Fatal(err)
	}
	geom, err := godal.NewGeometryFromWKT(wkt, g.SpatialRef())
	if err != nil {
		t.Fatal(err)
	}
	if _, err := layer.NewFeature(geom); err != nil {
		t.Fatal(err)
	}
	if err := ds.Close(); err != nil {
		t.Fatal(err)
	}
}

// TestRegionBufferFlankVertex: a latitude-longitude region split at 180
// degrees on a whole-world Mollweide grid (ESRI:54009, 100 km cells),
// whose halves meet at vertices on the 180th meridian, 20 N and 30 N.
// Projected, such a vertex lies on the map's outline, where PROJ's
// inverse fails for it by a rounding error; the boundary cut for the
// buffers dropped it with the pieces beside it, a cell side each way, so
// a cell 148 km from the vertex (179.88 W, 31.3 N) measured over 200 km
// and was left out of region_200km. Membership is checked against
// brute-force geodesic distance (PROJ's geod_inverse, Karney 2013) to the
// true outline (its edges straight in longitude and latitude, 170 E to
// 172 W), points every 2 km (over by at most 2^2 / (8 d) km, 10 m at 50
// km), refined to 1 mm within 5 km of a buffer's distance
// (refinedBoundaryKm), for the cells within 15 degrees of 180 and 5 to
// 45 N. Cells within 2 km of
// a buffer's edge are left out (our margin: the layer's edges are kept
// within 0.01 of a cell side, 1 km, of the true ones, and 1 km of the
// map is at most 1.6 km on the ground there, PROJ's Tissot factors).
func TestRegionBufferFlankVertex(t *testing.T) {
	dir := t.TempDir()
	east := [][2]float64{{170, 20}, {180, 20}, {180, 30}, {172, 28}, {170, 20}}
	west := [][2]float64{{-180, 20}, {-172, 22}, {-180, 30}, {-180, 20}}
	region := writeGeoJSON(t, dir, "split.geojson", []string{"e", "w"}, [][][2]float64{east, west})
	outline := [][2]float64{{170, 20}, {180, 20}, {188, 22}, {180, 30}, {172, 28}, {170, 20}}
	blats, blons := densifyRing(outline, 2000)
	g, err := NewGrid(362, 182, [6]float64{-18100000, 100000, 0, 9100000, 0, -100000}, "ESRI:54009")
	if err != nil {
		t.Fatal(err)
	}
	defer g.Close()
	f, err := Build(g, nil, Spec{Region: region, RegionBuffersKm: []float64{-50, 200}}, nil, nil)
	if err != nil {
		t.Fatal(err)
	}
	base := memberIdx(t, f, "base")
	const margin = 2.0
	checked := map[string]int{}
	for row := 0; row < g.Height; row++ {
		for col := 0; col < g.Width; col++ {
			x, y := g.Centre(col, row)
			lon, lat := make([]float64, 1), make([]float64, 1)
			g.ToLonLat([]float64{x}, []float64{y}, lon, lat)
			if math.IsNaN(lon[0]) || math.Abs(math.Abs(lon[0])-180) > 15 || lat[0] < 5 || lat[0] > 45 {
				continue
			}
			i := row*g.Width + col
			inside := f.Has(base, i)
			dist := bruteBoundaryKm(lon[0], lat[0], blats, blons)
			if math.Abs(dist-50) < 5 || math.Abs(dist-200) < 5 {
				dist = refinedBoundaryKm(lon[0], lat[0], dist, blats, blons)
			}
			for _, c := range []struct {
				id string
				d  float64
			}{{"region_minus50km", -50}, {"region_200km", 200}} {
				if math.Abs(dist-math.Abs(c.d)) <= margin {
					continue
				}
				want := inside && dist > -c.d
				if c.d > 0 {
					want = inside || dist <= c.d
				}
				checked[c.id]++
				if got := f.Has(memberIdx(t, f, c.id), i); got != want {
					t.Errorf("%s: cell lon %.3f lat %.3f (%.1f km from the outline, inside %v): member %v, want %v", c.id, lon[0], lat[0], dist, inside, got, want)
				}
			}
		}
	}
	if checked["region_200km"] < 200 || checked["region_minus50km"] < 200 {
		t.Errorf("checked %v cells: too few", checked)
	}
}
