package extent

import (
	"fmt"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"github.com/paulmach/orb/planar"
)

// TestOpenRingNamed: a polygon ring that does not end at its first point
// stops the read naming the feature and the ring, in every format it was
// tried in. Before, GDAL refused a GeoJSON, GeoJSONSeq or ArcGIS JSON file
// with such a ring as a whole ("a polygon's ring does not end at its first
// point", no feature named), and a KML or GeoPackage one, which GDAL reads
// without a word, stopped with "invalid geometry (e.g. a self-intersection)
// that GDAL could not repair (GEOS gave no geometry)"; both advised
// ogr2ogr -makevalid, which fails on such a ring (GDAL 3.6, tried by hand).
func TestOpenRingNamed(t *testing.T) {
	Register()
	dir := t.TempDir()
	g, _ := geoGrid(t, 0, 4, 0.1, 40, 40)
	closed := `[[0.5,0.5],[3,0.5],[3,3],[0.5,3],[0.5,0.5]]`
	write := func(name, body string) string {
		p := filepath.Join(dir, name)
		if err := os.WriteFile(p, []byte(body), 0o644); err != nil {
			t.Fatal(err)
		}
		return p
	}
	gpkg := filepath.Join(dir, "open.gpkg")
	writePolygonGPKG(t, gpkg, 4326, [][2]float64{{0.5, 0.5}, {3, 0.5}, {3, 3}, {0.6, 3}})
	for _, tc := range []struct {
		name, path, want string
	}{
		{"GeoJSON, the second feature's hole", write("hole.geojson", `{"type":"FeatureCollection","features":[`+
			`{"type":"Feature","properties":{},"geometry":{"type":"Polygon","coordinates":[`+closed+`]}},`+
			`{"type":"Feature","properties":{},"geometry":{"type":"Polygon","coordinates":[`+closed+`,[[1,1],[2,1],[2,2],[1,2]]]}}]}`),
			"hole.geojson feature 2: ring 2 of its Polygon ends at (1, 2), not at its first point (1, 1)"},
		{"GeoJSONSeq, a MultiPolygon's second polygon", write("multi.geojsonl",
			`{"type":"Feature","properties":{},"geometry":{"type":"Polygon","coordinates":[`+closed+`]}}`+"\n"+
				`{"type":"Feature","properties":{},"geometry":{"type":"MultiPolygon","coordinates":[[`+closed+`],[[[1,1],[2,1],[2,2]]]]}}`+"\n"),
			"multi.geojsonl feature 2: ring 1 of polygon 2 of its MultiPolygon ends at (2, 2), not at its first point (1, 1)"},
		{"ArcGIS JSON", write("esri.json", `{"geometryType":"esriGeometryPolygon","spatialReference":{"wkid":4326},"fields":[],"features":[`+
			`{"attributes":{},"geometry":{"rings":[[[0.5,0.5],[3,0.5],[3,3],[0.5,3.5]]]}}]}`),
			`esri.json feature 1: ring 1 of its "rings" ends at (0.5, 3.5), not at its first point (0.5, 0.5)`},
		{"KML", write("open.kml", `<?xml version="1.0" encoding="UTF-8"?>`+"\n"+`<kml xmlns="http://www.opengis.net/kml/2.2"><Document><Placemark><name>a</name><Polygon><outerBoundaryIs><LinearRing><coordinates>0.5,0.5 3,0.5 3,3 0.5,3</coordinates></LinearRing></outerBoundaryIs></Polygon></Placemark></Document></kml>`),
			"open.kml feature 1: ring 1 of its polygon ends at (0.5, 3), not at its first point (0.5, 0.5)"},
		{"GeoPackage", gpkg, "open.gpkg feature 1: ring 1 of its polygon ends at (0.6, 3), not at its first point (0.5, 0.5)"},
	} {
		t.Run(tc.name, func(t *testing.T) {
			_, _, err := ReadShape(tc.path, g)
			if err == nil {
				t.Fatal("read without an error")
			}
			for _, w := range []string{tc.want, "close the ring (repeat its first point at its end)", "even with -makevalid, does not close a ring"} {
				if !strings.Contains(err.Error(), w) {
					t.Errorf("%q lacks %q", err, w)
				}
			}
			if strings.Contains(err.Error(), "self-intersection") || strings.Contains(err.Error(), "GEOS") {
				t.Errorf("%q blames something else", err)
			}
		})
	}
	// Closed rings are read.
	ok := write("closed.geojson", `{"type":"FeatureCollection","features":[{"type":"Feature","properties":{},"geometry":{"type":"Polygon","coordinates":[`+closed+`]}}]}`)
	if _, _, err := ReadShape(ok, g); err != nil {
		t.Errorf("closed ring: %v", err)
	}
}

// TestLongEdgeAdvice: a ring edge spanning more than 180 degrees of
// longitude is refused (it may be the short way across 180 degrees), with
// both readings named and what to do for each; before, the message said
// the edge "crosses the antimeridian" even for a box drawn the long way
// round from -160 to 160, whose fix is to add vertices along the edge.
// The same box with a vertex every 10 degrees is read.
func TestLongEdgeAdvice(t *testing.T) {
	Register()
	dir := t.TempDir()
	g, _ := geoGrid(t, -180, 80, 1, 360, 160)
	box := filepath.Join(dir, "box.geojson")
	if err := os.WriteFile(box, []byte(`{"type":"FeatureCollection","features":[{"type":"Feature","properties":{},"geometry":{"type":"Polygon","coordinates":[[[-160,-50],[160,-50],[160,70],[-160,70],[-160,-50]]]}}]}`), 0o644); err != nil {
		t.Fatal(err)
	}
	_, _, err := ReadShape(box, g)
	if err == nil {
		t.Fatal("read a box with an edge of 320 degrees")
	}
	for _, w := range []string{"box.geojson feature 1", "spans 320 degrees of longitude (from lon -160.0000 to 160.0000", "split it there", "ogr2ogr -segmentize 10"} {
		if !strings.Contains(err.Error(), w) {
			t.Errorf("%q lacks %q", err, w)
		}
	}
	var south, north []string
	for lon := -160; lon <= 160; lon += 10 {
		south = append(south, fmt.Sprintf("[%d,-50]", lon))
		north = append([]string{fmt.Sprintf("[%d,70]", lon)}, north...)
	}
	ring := strings.Join(append(append(south, north...), "[-160,-50]"), ",")
	long := filepath.Join(dir, "long.geojson")
	if err := os.WriteFile(long, []byte(`{"type":"FeatureCollection","features":[{"type":"Feature","properties":{},"geometry":{"type":"Polygon","coordinates":[[`+ring+`]]}}]}`), 0o644); err != nil {
		t.Fatal(err)
	}
	s, _, err := ReadShape(long, g)
	if err != nil {
		t.Fatalf("the box with a vertex every 10 degrees: %v", err)
	}
	// Worked by hand: 320 by 120 degrees, in the grid's coordinates.
	if a := planar.Area(s.Grid); math.Abs(a-320*120) > 1e-6 {
		t.Errorf("area %g square degrees, want %d", a, 320*120)
	}
}
