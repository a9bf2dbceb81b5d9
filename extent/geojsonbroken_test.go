package extent

import (
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// TestBrokenGeoJSONGeometryRefused: a GeoJSON feature whose geometry GDAL
// cannot decode (it hands it over as none, as it does a null geometry)
// is refused naming the file, the feature and what is wrong; a null or
// absent geometry, or an empty one, is still skipped with the warning.
// Before, every one of these was "feature 2 has no geometry; skipped".
// So is one GDAL reads without a part it cannot decode (before, read
// without that part, silently).
func TestBrokenGeoJSONGeometryRefused(t *testing.T) {
	Register()
	good := `{"type":"Polygon","coordinates":[[[-140,-40],[-139,-40],[-139,-39],[-140,-40]]]}`
	for _, c := range []struct {
		name, geom string // geom "" leaves the member out
		want       string // in the error; "" for the skip warning
	}{
		{"unknown type", `{"type":"Polygn","coordinates":[[[-140,-40],[-139,-40],[-139,-39],[-140,-40]]]}`, `feature 2 has a geometry that cannot be decoded: its geometry type "Polygn" is not a GeoJSON type`},
		{"coordinates a string", `{"type":"Polygon","coordinates":"abc"}`, `feature 2 has a geometry that cannot be decoded: its Polygon's "coordinates" are not numbers nested as an array of rings`},
		{"coordinates not rings", `{"type":"Polygon","coordinates":[1,2,3]}`, `its Polygon's "coordinates" are not numbers nested`},
		// GDAL refuses the whole file for these two as it opens it
		// (before, "is not a vector file GDAL can read (Invalid 'x'
		// coordinate...)", naming no feature).
		{"coordinates strings", `{"type":"Polygon","coordinates":[[["a","b"],[1,2],[3,4],["a","b"]]]}`, `feature 2 has a geometry that cannot be decoded: its Polygon's "coordinates" are not numbers nested`},
		{"a point of one number", `{"type":"Polygon","coordinates":[[[-140],[-139,-40],[-139,-39],[-140]]]}`, `are not numbers nested`},
		{"no coordinates", `{"type":"Polygon"}`, `feature 2 has a geometry that cannot be decoded: its Polygon has no "coordinates"`},
		{"no type", `{"coordinates":[[[-140,-40],[-139,-40],[-139,-39],[-140,-40]]]}`, `its geometry has no "type"`},
		{"geometry a string", `"abc"`, `its "geometry" is a string, not an object`},
		{"bad member of a collection", `{"type":"GeometryCollection","geometries":[{"type":"Polygn","coordinates":[]}]}`, `member 1 of its GeometryCollection: geometry type "Polygn"`},
		// GDAL reads these leaving the broken part out, without a word.
		{"a MultiPolygon's second polygon a string", `{"type":"MultiPolygon","coordinates":[[[[-140,-40],[-139,-40],[-139,-39],[-140,-40]]],"abc"]}`, `feature 2 has a geometry of which a part cannot be decoded (GDAL reads it without that part): its MultiPolygon's "coordinates" are not numbers nested as an array of polygons`},
		{"a hole a string", `{"type":"Polygon","coordinates":[[[-140,-40],[-139,-40],[-139,-39],[-140,-40]],"abc"]}`, `feature 2 has a geometry of which a part cannot be decoded (GDAL reads it without that part): its Polygon's "coordinates" are not numbers nested as an array of rings, each an array of [longitude, latitude] pairs; correct that part`},
		{"a collection's second member of an unknown type", `{"type":"GeometryCollection","geometries":[` + good + `,{"type":"Polygn","coordinates":[]}]}`, `member 2 of its GeometryCollection: geometry type "Polygn"`},
		{"null", `null`, ""},
		{"absent", ``, ""},
		{"empty polygon", `{"type":"Polygon","coordinates":[]}`, ""},
	} {
		t.Run(c.name, func(t *testing.T) {
			second := `{"type":"Feature","properties":{"u":"b"},"geometry":` + c.geom + `}`
			if c.geom == "" {
				second = `{"type":"Feature","properties":{"u":"b"}}`
			}
			body := `{"type":"FeatureCollection","features":[{"type":"Feature","properties":{"u":"a"},"geometry":` + good + `},` + second + `]}`
			p := filepath.Join(t.TempDir(), "units.geojson")
			if err := os.WriteFile(p, []byte(body), 0o644); err != nil {
				t.Fatal(err)
			}
			src, _, err := openPolygons(p, "u")
			if err != nil && c.want != "" && strings.Contains(err.Error(), c.want) {
				return
			}
			if err != nil {
				t.Fatal(err)
			}
			defer src.close()
			var warns []string
			byID, _, err := src.unionByID(&warns)
			if c.want != "" {
				if err == nil || !strings.Contains(err.Error(), c.want) || !strings.Contains(err.Error(), p) {
					t.Fatalf("err = %v, want it to name %s and say %q", err, p, c.want)
				}
				return
			}
			if err != nil {
				t.Fatal(err)
			}
			for _, g := range byID {
				g.Close()
			}
			if len(warns) != 1 || !strings.Contains(warns[0], "feature 2 has no geometry; skipped") {
				t.Fatalf("warnings = %q, want the no-geometry warning", warns)
			}
		})
	}
}

// TestValidGeoJSONNotRefused: the check refuses no valid file.
func TestValidGeoJSONNotRefused(t *testing.T) {
	Register()
	// Valid forms the check must pass: spaces and line breaks inside the
	// coordinates, a hole, a third coordinate, a lower-case type (GDAL
	// reads it), a bbox member, an exponent, a collection.
	body := `{"type":"FeatureCollection","features":[
  {"type":"Feature","properties":{"u":"a"},"bbox":[-140,-40,-139,-39],"geometry":{"type":"Polygon","coordinates":[
    [ [-140, -40] , [-139.0, -40, 12.5], [-139, -39], [-140, -40] ],
    [[-139.8,-39.8],[-139.2,-39.8],[-139.2,-39.2],[-139.8,-39.8]]
  ]}},
  {"type":"Feature","properties":{"u":"b"},"geometry":{"type":"multipolygon","coordinates":[[[[-1.4e2,-41],[-139,-41],[-139,-40.5],[-1.4e2,-41]]]]}},
  {"type":"Feature","properties":{"u":"c"},"geometry":{"type":"GeometryCollection","geometries":[{"type":"Polygon","coordinates":[[[-138,-40],[-137,-40],[-137,-39],[-138,-40]]]}]}}
]}`
	p := filepath.Join(t.TempDir(), "valid.geojson")
	if err := os.WriteFile(p, []byte(body), 0o644); err != nil {
		t.Fatal(err)
	}
	if n, why := brokenGeoJSON(p, 3); n != 0 {
		t.Fatalf("brokenGeoJSON = %d, %q on a valid file", n, why)
	}
	src, _, err := openPolygons(p, "u")
	if err != nil {
		t.Fatal(err)
	}
	defer src.close()
	var warns []string
	byID, order, err := src.unionByID(&warns)
	if err != nil {
		t.Fatal(err)
	}
	for _, g := range byID {
		g.Close()
	}
	if len(order) != 3 || len(warns) != 0 {
		t.Fatalf("ids %q, warnings %q; want 3 ids and no warning", order, warns)
	}
}

// TestBrokenGeoJSONSingleFeature: a file that is one Feature (not a
// collection) with a broken geometry is refused as feature 1.
func TestBrokenGeoJSONSingleFeature(t *testing.T) {
	p := filepath.Join(t.TempDir(), "one.geojson")
	body := `{"type":"Feature","properties":{},"geometry":{"type":"Polygn","coordinates":[]}}`
	if err := os.WriteFile(p, []byte(body), 0o644); err != nil {
		t.Fatal(err)
	}
	if n, why := brokenGeoJSON(p, 1); n != 1 || !strings.Contains(why, `"Polygn"`) {
		t.Fatalf("brokenGeoJSON = %d, %q; want feature 1 with the unknown type", n, why)
	}
	// The same after a UTF-8 byte order mark.
	if err := os.WriteFile(p, []byte("\xef\xbb\xbf"+body), 0o644); err != nil {
		t.Fatal(err)
	}
	if n, _ := brokenGeoJSON(p, 1); n != 1 {
		t.Fatalf("brokenGeoJSON after a byte order mark = %d, want 1", n)
	}
	// Features that do not line up with GDAL's count: no guess.
	if n, _ := brokenGeoJSON(p, 2); n != 0 {
		t.Fatalf("brokenGeoJSON with a count that differs = %d, want 0", n)
	}
}
