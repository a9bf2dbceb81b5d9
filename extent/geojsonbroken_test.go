package extent

import (
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"github.com/airbusgeo/godal"
)

// TestBrokenGeoJSONGeometryRefused: a GeoJSON feature whose geometry GDAL
// cannot decode (it hands it over as none, as it does a null geometry)
// is refused naming the file, the feature and what is wrong; a null or
// absent geometry, or an empty one, is still skipped with the warning.
// Before, every one of these was "feature 2 has no geometry; skipped".
// So is one GDAL reads without a part it cannot decode (before, read
// without that part, silently). Each case is run in a FeatureCollection
// and in the two GeoJSONSeq forms, features one a line (.geojsonl) and
// each line begun by the record separator 0x1E (.geojsons), which GDAL
// reads with the same decoder; before, GeoJSONSeq files were not read
// by us at all: each case skipped the feature with the no-geometry
// warning, left the part out without a word, or (the two GDAL refuses
// the file for) stopped with GDAL's own message naming no feature.
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
		second := `{"type":"Feature","properties":{"u":"b"},"geometry":` + c.geom + `}`
		if c.geom == "" {
			second = `{"type":"Feature","properties":{"u":"b"}}`
		}
		first := `{"type":"Feature","properties":{"u":"a"},"geometry":` + good + `}`
		for _, form := range []struct{ name, body string }{
			{"units.geojson", `{"type":"FeatureCollection","features":[` + first + `,` + second + `]}`},
			{"units.geojsonl", first + "\n" + second + "\n"},
			{"units.geojsons", "\x1e" + first + "\n\x1e" + second + "\n"},
		} {
			t.Run(c.name+"/"+form.name, func(t *testing.T) {
				refusedOrSkipped(t, filepath.Join(t.TempDir(), form.name), form.body, "u", c.want)
			})
		}
	}
}

// refusedOrSkipped writes body to path, reads it as a layer of units
// with id field and checks that it is refused naming path and saying
// want, or, for want "", that feature 2 is skipped with the no-geometry
// warning.
func refusedOrSkipped(t *testing.T, p, body, field, want string) {
	t.Helper()
	if err := os.WriteFile(p, []byte(body), 0o644); err != nil {
		t.Fatal(err)
	}
	src, _, err := openPolygons(p, field)
	if err == nil {
		defer src.close()
		var warns []string
		var byID map[string]*godal.Geometry
		byID, _, err = src.unionByID(&warns)
		for _, g := range byID {
			g.Close()
		}
		if err == nil && want == "" {
			if len(warns) != 1 || !strings.Contains(warns[0], "feature 2 has no geometry; skipped") {
				t.Fatalf("warnings = %q, want the no-geometry warning", warns)
			}
			return
		}
	}
	if want == "" {
		t.Fatal(err)
	}
	if err == nil || !strings.Contains(err.Error(), want) || !strings.Contains(err.Error(), p) {
		t.Fatalf("err = %v, want it to name %s and say %q", err, p, want)
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
	if n, why := brokenJSON(p, geoJSONDialect, 3); n != 0 {
		t.Fatalf("brokenJSON = %d, %q on a valid file", n, why)
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
	if n, why := brokenJSON(p, geoJSONDialect, 1); n != 1 || !strings.Contains(why, `"Polygn"`) {
		t.Fatalf("brokenJSON = %d, %q; want feature 1 with the unknown type", n, why)
	}
	// The same after a UTF-8 byte order mark.
	if err := os.WriteFile(p, []byte("\xef\xbb\xbf"+body), 0o644); err != nil {
		t.Fatal(err)
	}
	if n, _ := brokenJSON(p, geoJSONDialect, 1); n != 1 {
		t.Fatalf("brokenJSON after a byte order mark = %d, want 1", n)
	}
	// Features that do not line up with GDAL's count: no guess.
	if n, _ := brokenJSON(p, geoJSONDialect, 2); n != 0 {
		t.Fatalf("brokenJSON with a count that differs = %d, want 0", n)
	}
	// Two Features one after the other are a GeoJSONSeq file: the first
	// is feature 1, the second 2.
	good := `{"type":"Feature","properties":{},"geometry":null}`
	if err := os.WriteFile(p, []byte(good+"\n"+body+"\n"), 0o644); err != nil {
		t.Fatal(err)
	}
	if n, _ := brokenJSON(p, geoJSONDialect, -1); n != 2 {
		t.Fatalf("brokenJSON of a sequence = %d, want 2", n)
	}
	// A collection followed by another is no file GDAL opens (it says
	// the JSON is not valid at line 2, which is the message to give): no
	// feature is named. Before, its second feature was named.
	coll := `{"type":"FeatureCollection","features":[` + good + `,` + body + `]}`
	if err := os.WriteFile(p, []byte(coll+"\n"+coll+"\n"), 0o644); err != nil {
		t.Fatal(err)
	}
	if n, why := brokenJSON(p, geoJSONDialect, -1); n != 0 {
		t.Fatalf("brokenJSON of two collections = %d, %q; want 0", n, why)
	}
}

// TestBrokenESRIJSONGeometryRefused: a feature of ArcGIS's JSON (an
// ArcGIS REST query's answer) whose geometry GDAL cannot decode is
// refused naming the file, the feature and what is wrong; a null, absent
// or empty one is still skipped with the warning. GDAL decodes none of
// a geometry with a broken part, so each of these came as none.
func TestBrokenESRIJSONGeometryRefused(t *testing.T) {
	Register()
	good := `{"rings":[[[-140,-40],[-140,-39],[-139,-39],[-139,-40],[-140,-40]]]}`
	shell := `[[-138,-40],[-138,-39],[-137,-39],[-137,-40],[-138,-40]]`
	for _, c := range []struct {
		name, geom string // geom "" leaves the member out
		want       string // in the error; "" for the skip warning
	}{
		// Before, GDAL refused the file as it opened it, and our
		// message named feature 1 ("has no \"type\""), read as GeoJSON.
		{"rings a string", `{"rings":"abc"}`, `feature 2 has a geometry that cannot be decoded: its "rings" are not numbers nested as an array of rings, each an array of [x, y] pairs`},
		{"coordinates strings", `{"rings":[[["a","b"],[-138,-39],[-137,-39],["a","b"]]]}`, `feature 2 has a geometry that cannot be decoded: its "rings" are not numbers`},
		// Before, each of these was "feature 2 has no geometry; skipped".
		{"a point of one number", `{"rings":[[[-138],[-138,-39],[-137,-39],[-138]]]}`, `its "rings" are not numbers nested`},
		{"a hole a string", `{"rings":[` + shell + `,"abc"]}`, `feature 2 has a geometry that cannot be decoded: its "rings" are not numbers nested`},
		{"a second ring of strings", `{"rings":[` + shell + `,[["a","b"],[-136,-39],[-135,-39],["a","b"]]]}`, `its "rings" are not numbers nested`},
		{"an M value null", `{"hasM":true,"rings":[[[-138,-40,null],[-138,-39,null],[-137,-39,null],[-137,-40,null],[-138,-40,null]]]}`, `its "rings" are not numbers nested as an array of rings, each an array of [x, y] pairs (a null among them`},
		{"rings null", `{"rings":null}`, `its "rings" are not numbers nested`},
		{"true curves", `{"curveRings":[[[-138,-40],[-138,-39],{"c":[[-137,-39],[-137.5,-38.9]]},[-137,-40],[-138,-40]]]}`, `its geometry is made of true curves ("curveRings"), which GDAL does not read`},
		{"no rings", `{"ring":[` + shell + `]}`, `feature 2 has a geometry that cannot be decoded: its geometry has no "rings"`},
		{"an empty object", `{}`, `its geometry has no "rings"`},
		{"geometry a string", `"abc"`, `its "geometry" is a string, not an object with "rings"`},
		{"a point's x a string", `{"x":"a","y":-40}`, `its point's "x" and "y" are not both numbers`},
		{"null", `null`, ""},
		{"absent", ``, ""},
		{"no rings in them", `{"rings":[]}`, ""},
	} {
		t.Run(c.name, func(t *testing.T) {
			second := `{"attributes":{"u":"b"},"geometry":` + c.geom + `}`
			if c.geom == "" {
				second = `{"attributes":{"u":"b"}}`
			}
			body := `{"displayFieldName":"u","fieldAliases":{"u":"u"},"geometryType":"esriGeometryPolygon","spatialReference":{"wkid":4326,"latestWkid":4326},` +
				`"fields":[{"name":"u","type":"esriFieldTypeString","alias":"u","length":10}],` +
				`"features":[{"attributes":{"u":"a"},"geometry":` + good + `},` + second + `]}`
			refusedOrSkipped(t, filepath.Join(t.TempDir(), "query.json"), body, "u", c.want)
		})
	}
}

// TestValidJSONDialectsNotRefused: GeoJSONSeq files as GDAL writes them
// (features one a line, with and without the record separator) and an
// ArcGIS JSON file as a REST query returns it (clockwise outer rings, a
// counter-clockwise hole, a unit of two parts, Z values) are read whole:
// no feature refused or skipped, and the hole kept.
func TestValidJSONDialectsNotRefused(t *testing.T) {
	Register()
	dir := t.TempDir()
	src := filepath.Join(dir, "units.geojson")
	body := `{"type":"FeatureCollection","features":[
  {"type":"Feature","properties":{"u":"a"},"geometry":{"type":"Polygon","coordinates":[[[-140,-40],[-139,-40],[-139,-39],[-140,-39],[-140,-40]],[[-139.8,-39.8],[-139.8,-39.2],[-139.2,-39.2],[-139.2,-39.8],[-139.8,-39.8]]]}},
  {"type":"Feature","properties":{"u":"b"},"geometry":{"type":"MultiPolygon","coordinates":[[[[-138,-40],[-137,-40],[-137,-39],[-138,-39],[-138,-40]]],[[[-136,-40],[-135,-40],[-135,-39],[-136,-39],[-136,-40]]]]}},
  {"type":"Feature","properties":{"u":"c"},"geometry":{"type":"Polygon","coordinates":[[[-134,-40,5],[-133,-40,5],[-133,-39,5],[-134,-39,5],[-134,-40,5]]]}}
]}`
	if err := os.WriteFile(src, []byte(body), 0o644); err != nil {
		t.Fatal(err)
	}
	ds, err := godal.Open(src, godal.VectorOnly())
	if err != nil {
		t.Fatal(err)
	}
	defer ds.Close()
	var paths []string
	for _, w := range []struct{ name, rs string }{{"units.geojsonl", "RS=NO"}, {"units.geojsons", "RS=YES"}} {
		p := filepath.Join(dir, w.name)
		out, err := ds.VectorTranslate(p, []string{"-f", "GeoJSONSeq", "-lco", w.rs})
		if err != nil {
			t.Fatal(err)
		}
		out.Close()
		paths = append(paths, p)
	}
	esri := filepath.Join(dir, "query.json")
	if err := os.WriteFile(esri, []byte(`{"displayFieldName":"u","fieldAliases":{"OBJECTID":"OBJECTID","u":"u"},"geometryType":"esriGeometryPolygon","hasZ":true,
"spatialReference":{"wkid":4326,"latestWkid":4326},
"fields":[{"name":"OBJECTID","type":"esriFieldTypeOID","alias":"OBJECTID"},{"name":"u","type":"esriFieldTypeString","alias":"u","length":10}],
"features":[
 {"attributes":{"OBJECTID":1,"u":"a"},"geometry":{"rings":[[[-140,-40],[-140,-39],[-139,-39],[-139,-40],[-140,-40]],[[-139.8,-39.8],[-139.2,-39.8],[-139.2,-39.2],[-139.8,-39.2],[-139.8,-39.8]]]}},
 {"geometry":{"rings":[[[-138,-40],[-138,-39],[-137,-39],[-137,-40],[-138,-40]],[[-136,-40],[-136,-39],[-135,-39],[-135,-40],[-136,-40]]]},"attributes":{"OBJECTID":2,"u":"b"}},
 {"attributes":{"OBJECTID":3,"u":"c"},"geometry":{"hasZ":true,"rings":[[[-134,-40,5],[-134,-39,5],[-133,-39,5],[-133,-40,5],[-134,-40,5]]]}}
]}`), 0o644); err != nil {
		t.Fatal(err)
	}
	paths = append(paths, esri)
	for _, p := range paths {
		t.Run(filepath.Base(p), func(t *testing.T) {
			src, _, err := openPolygons(p, "u")
			if err != nil {
				t.Fatal(err)
			}
			defer src.close()
			if src.dialect == notJSON {
				t.Fatalf("%s opened by %s, which brokenJSON does not read", p, src.ds.Driver().ShortName())
			}
			// Square degrees, worked by hand: a's 1 less its hole's 0.36,
			// b's two parts of 1 each.
			checkUnitAreas(t, src, map[string]float64{"a": 0.64, "b": 2, "c": 1})
		})
	}
}

// topoUnits is a TopoJSON topology of one object "units" of three
// features: a, a square of 1 by 1 degree with a hole of 0.6 by 0.6; b,
// the square east of it, sharing its west edge with a's east edge (arc 0
// reversed, ~0 = -1); c, given by the caller (its "type" and "arcs"),
// whose arcs 3 and 4 are squares of 1 by 1 further east. An object
// "other", a line GDAL reads as the layer "TopoJSON", refers to an arc
// the file does not have: it is not the layer read. arcs replaces
// the arcs when not "" and transform, when not "", is added.
func topoUnits(c, arcs, transform string) string {
	if arcs == "" {
		arcs = `[
 [[-139,-40],[-139,-39]],
 [[-139,-39],[-140,-39],[-140,-40],[-139,-40]],
 [[-139,-40],[-138,-40],[-138,-39],[-139,-39]],
 [[-137,-40],[-136,-40],[-136,-39],[-137,-39],[-137,-40]],
 [[-135,-40],[-134,-40],[-134,-39],[-135,-39],[-135,-40]],
 [[-139.8,-39.8],[-139.8,-39.2],[-139.2,-39.2],[-139.2,-39.8],[-139.8,-39.8]]
]`
	}
	if transform != "" {
		transform = `"transform":` + transform + `,`
	}
	return `{"type":"Topology",` + transform + `"objects":{"other":{"type":"LineString","arcs":[99]},"units":{"type":"GeometryCollection","geometries":[
 {"type":"Polygon","arcs":[[0,1],[5]],"properties":{"u":"a"}},
 {"type":"Polygon","arcs":[[-1,2]],"properties":{"u":"b"}},
 ` + c + `]}},"arcs":` + arcs + `}`
}

// TestBrokenTopoJSONGeometryRefused: GDAL reads no CRS from a TopoJSON
// file, so a TopoJSON layer is refused, with the advice to save it with
// its CRS (as ogr2ogr -a_srs does); but that conversion would leave out
// without a word what GDAL cannot decode, so a feature with a geometry
// GDAL cannot decode is named first. Before, each of these was only
// "has no CRS; give it the one its coordinates are in", and the
// converted file lacked what the comment says.
func TestBrokenTopoJSONGeometryRefused(t *testing.T) {
	Register()
	badArc := `[
 [[-139,-40],[-139,-39]],
 [[-139,-39],[-140,-39],[-140,-40],[-139,-40]],
 [[-139,-40],[-138,-40],[-138,-39],[-139,-39]],
 [["a","b"],[-136,-40],[-136,-39],[-137,-39],["a","b"]],
 [[-135,-40],[-134,-40],[-134,-39],[-135,-39],[-135,-40]],
 [[-139.8,-39.8],[-139.8,-39.2],[-139.2,-39.2],[-139.2,-39.8],[-139.8,-39.8]]
]`
	for _, c := range []struct {
		name, c, arcs string
		want          string // in the error, after "feature 3 has a geometry that cannot be decoded: "; "" for none
	}{
		// Converted, the feature came empty (no geometry).
		{"an arc out of range", `{"type":"Polygon","arcs":[[9]],"properties":{"u":"c"}}`, "", `its Polygon refers to arc 9, but the file's "arcs" hold 6 (numbered from 0)`},
		{"a reversed arc out of range", `{"type":"Polygon","arcs":[[-10]],"properties":{"u":"c"}}`, "", `its Polygon refers to arc -10 (arc 9 reversed), but the file's "arcs" hold 6`},
		{"an arc index a string", `{"type":"Polygon","arcs":[["3"]],"properties":{"u":"c"}}`, "", `its Polygon's "arcs" are not arc indices nested as an array of rings, each an array of arc indices`},
		{"arcs not rings", `{"type":"Polygon","arcs":[3],"properties":{"u":"c"}}`, "", `its Polygon's "arcs" are not arc indices nested`},
		{"an arc a string", `{"type":"Polygon","arcs":[[3]],"properties":{"u":"c"}}`, strings.Replace(badArc, `[["a","b"],[-136,-40],[-136,-39],[-137,-39],["a","b"]]`, `"abc"`, 1), `its Polygon refers to arc 3, whose positions are not numbers`},
		// Converted, the feature was left out of the layer.
		{"no arcs", `{"type":"Polygon","properties":{"u":"c"}}`, "", `its Polygon has no "arcs"`},
		{"arcs a string", `{"type":"Polygon","arcs":"abc","properties":{"u":"c"}}`, "", `its Polygon's "arcs" are not arc indices nested`},
		{"no type", `{"arcs":[[3]],"properties":{"u":"c"}}`, "", `its geometry has no "type"`},
		// Converted, the feature had no geometry.
		{"unknown type", `{"type":"Polygn","arcs":[[3]],"properties":{"u":"c"}}`, "", `its geometry type "Polygn" is not a TopoJSON type`},
		// Converted, the hole or the second polygon was left out.
		{"a hole out of range", `{"type":"Polygon","arcs":[[3],[9]],"properties":{"u":"c"}}`, "", `its Polygon refers to arc 9`},
		{"a hole a string", `{"type":"Polygon","arcs":[[3],"abc"],"properties":{"u":"c"}}`, "", `its Polygon's "arcs" are not arc indices nested`},
		{"a second polygon out of range", `{"type":"MultiPolygon","arcs":[[[3]],[[9]]],"properties":{"u":"c"}}`, "", `its MultiPolygon refers to arc 9`},
		// Converted, the arc's positions that are not numbers were read
		// as 0, 0: the unit reached out to 0° E, 0° N, 87 square degrees
		// instead of 1.
		{"an arc's positions strings", `{"type":"Polygon","arcs":[[3]],"properties":{"u":"c"}}`, badArc, `its Polygon refers to arc 3, whose positions are not numbers nested as an array of [x, y] pairs`},
		// Valid: only the CRS is missing.
		{"valid", `{"type":"Polygon","arcs":[[3]],"properties":{"u":"c"}}`, "", ""},
		{"valid multipolygon", `{"type":"MultiPolygon","arcs":[[[3]],[[4]]],"properties":{"u":"c"}}`, "", ""},
		{"a null geometry", `{"type":null,"properties":{"u":"c"}}`, "", ""},
	} {
		t.Run(c.name, func(t *testing.T) {
			p := filepath.Join(t.TempDir(), "units.topojson")
			if err := os.WriteFile(p, []byte(topoUnits(c.c, c.arcs, "")), 0o644); err != nil {
				t.Fatal(err)
			}
			src, _, err := openPolygons(p, "u")
			if err == nil {
				src.close()
				t.Fatal("a TopoJSON layer was read, although GDAL gives it no CRS")
			}
			msg := err.Error()
			if c.want == "" {
				if !strings.Contains(msg, p+` layer "units" has no CRS: GDAL reads none from a TopoJSON file; save it with the CRS`) || strings.Contains(msg, "cannot be decoded") {
					t.Fatalf("err = %v, want only the missing CRS", err)
				}
				return
			}
			if want := p + ` layer "units" feature 3 has a geometry that cannot be decoded: ` + c.want; !strings.Contains(msg, want) || !strings.Contains(msg, "ogr2ogr -a_srs") {
				t.Fatalf("err = %v\nwant it to say %q and how to give the CRS", err, want)
			}
		})
	}
	// Objects that are one geometry each are the features of GDAL's
	// layer "TopoJSON", in the order of the objects; a collection among
	// them is a layer of its own.
	t.Run("objects of one geometry", func(t *testing.T) {
		p := filepath.Join(t.TempDir(), "units.topojson")
		body := `{"type":"Topology","objects":{"a":{"type":"Polygon","arcs":[[0]]},"rest":{"type":"GeometryCollection","geometries":[{"type":"Polygon","arcs":[[7]]}]},"b":{"type":"Polygon","arcs":[[0],[8]]}},"arcs":[[[-140,-40],[-139,-40],[-139,-39],[-140,-40]]]}`
		if err := os.WriteFile(p, []byte(body), 0o644); err != nil {
			t.Fatal(err)
		}
		if n, why := brokenTopoJSON(p, "TopoJSON"); n != 2 || !strings.Contains(why, "refers to arc 8") {
			t.Fatalf("brokenTopoJSON = %d, %q; want feature 2, arc 8", n, why)
		}
		if n, why := brokenTopoJSON(p, "rest"); n != 1 || !strings.Contains(why, "refers to arc 7") {
			t.Fatalf("brokenTopoJSON of layer rest = %d, %q; want feature 1, arc 7", n, why)
		}
	})
}

// TestValidTopoJSONRead: topologies GDAL reads whole, plain and
// quantized (a "transform", each arc's positions after the first as
// differences), with a hole and an edge shared by two units (one arc,
// reversed for the second), are not refused by brokenTopoJSON, and once
// given a CRS (as the refusal advises) are read with every unit whole.
func TestValidTopoJSONRead(t *testing.T) {
	Register()
	// The arcs of topoUnits on a grid of 0.001 degree from (-141, -41).
	quantized := `[
 [[2000,1000],[0,1000]],
 [[2000,2000],[-1000,0],[0,-1000],[1000,0]],
 [[2000,1000],[1000,0],[0,1000],[-1000,0]],
 [[4000,1000],[1000,0],[0,1000],[-1000,0],[0,-1000]],
 [[6000,1000],[1000,0],[0,1000],[-1000,0],[0,-1000]],
 [[1200,1200],[0,600],[600,0],[0,-600],[-600,0]]
]`
	c := `{"type":"MultiPolygon","arcs":[[[3]],[[4]]],"properties":{"u":"c"}}`
	for _, v := range []struct{ name, body string }{
		{"plain", topoUnits(c, "", "")},
		{"quantized", topoUnits(c, quantized, `{"scale":[0.001,0.001],"translate":[-141,-41]}`)},
	} {
		t.Run(v.name, func(t *testing.T) {
			dir := t.TempDir()
			p := filepath.Join(dir, "units.topojson")
			if err := os.WriteFile(p, []byte(v.body), 0o644); err != nil {
				t.Fatal(err)
			}
			if n, why := brokenTopoJSON(p, "units"); n != 0 {
				t.Fatalf("brokenTopoJSON = %d, %q on a valid file", n, why)
			}
			ds, err := godal.Open(p, godal.VectorOnly())
			if err != nil {
				t.Fatal(err)
			}
			defer ds.Close()
			gpkg := filepath.Join(dir, "units.gpkg")
			out, err := ds.VectorTranslate(gpkg, []string{"-f", "GPKG", "-a_srs", "EPSG:4326", "units"})
			if err != nil {
				t.Fatal(err)
			}
			out.Close()
			src, _, err := openPolygons(gpkg, "u")
			if err != nil {
				t.Fatal(err)
			}
			defer src.close()
			// Square degrees, worked by hand: a's 1 less its hole's 0.36,
			// b's 1, c's two squares of 1.
			checkUnitAreas(t, src, map[string]float64{"a": 0.64, "b": 1, "c": 2})
		})
	}
}

// checkUnitAreas reads the units of src by id and checks that they are
// those of want, read without a warning, each of the area want gives it
// (square degrees; the tolerance of 1e-9 is ours).
func checkUnitAreas(t *testing.T, src *polygonSource, want map[string]float64) {
	t.Helper()
	var warns []string
	byID, order, err := src.unionByID(&warns)
	if err != nil {
		t.Fatal(err)
	}
	defer func() {
		for _, g := range byID {
			g.Close()
		}
	}()
	if len(order) != len(want) || len(warns) != 0 {
		t.Fatalf("ids %q, warnings %q; want %d ids and no warning", order, warns, len(want))
	}
	for id, a := range want {
		g, ok := byID[id]
		if !ok {
			t.Errorf("no unit %s", id)
			continue
		}
		if got := g.Area(); math.Abs(got-a) > 1e-9 {
			t.Errorf("unit %s: area %g square degrees, want %g", id, got, a)
		}
	}
}
