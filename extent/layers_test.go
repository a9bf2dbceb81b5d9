package extent

import (
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"github.com/airbusgeo/godal"
)

// TestRegionIn3DOrCurved: polygons with Z or M coordinates (a KML with
// altitudes, a PolygonZ shapefile) and curved types (CurvePolygon,
// MultiSurface, as ArcGIS exports write them) are read as their plane,
// linear equivalent: the same cells as the plain 2D polygon, and for a
// true arc a disc of about the right number of cells.
func TestRegionIn3DOrCurved(t *testing.T) {
	Register()
	dir := t.TempDir()
	g, _ := geoGrid(t, 0, 4, 0.1, 40, 40)
	cells := func(t *testing.T, path string) int {
		t.Helper()
		s, _, err := ReadShape(path, g)
		if err != nil {
			t.Fatal(err)
		}
		n := 0
		Fill(g, s.Grid, func(row, c0, c1 int) { n += c1 - c0 })
		return n
	}
	gpkg := func(name string, wkts ...string) string {
		p := filepath.Join(dir, name)
		ds, err := godal.CreateVector(godal.GeoPackage, p)
		if err != nil {
			t.Fatal(err)
		}
		sr, _ := godal.NewSpatialRefFromEPSG(4326)
		l, err := ds.CreateLayer("region", sr, godal.GTUnknown)
		if err != nil {
			t.Fatal(err)
		}
		for _, w := range wkts {
			geom, err := godal.NewGeometryFromWKT(w, sr)
			if err != nil {
				t.Fatal(err)
			}
			if _, err := l.NewFeature(geom); err != nil {
				t.Fatal(err)
			}
		}
		if err := ds.Close(); err != nil {
			t.Fatal(err)
		}
		return p
	}
	square := "0.55 0.55, 3.05 0.55, 3.05 2.95, 0.55 2.95, 0.55 0.55"
	plain := filepath.Join(dir, "plain.geojson")
	os.WriteFile(plain, []byte(`{"type":"FeatureCollection","features":[{"type":"Feature","properties":{},"geometry":{"type":"Polygon","coordinates":[[[0.55,0.55],[3.05,0.55],[3.05,2.95],[0.55,2.95],[0.55,0.55]]]}}]}`), 0o644)
	want := cells(t, plain)
	z := filepath.Join(dir, "z.geojson")
	os.WriteFile(z, []byte(`{"type":"FeatureCollection","features":[{"type":"Feature","properties":{},"geometry":{"type":"Polygon","coordinates":[[[0.55,0.55,120],[3.05,0.55,80],[3.05,2.95,0],[0.55,2.95,5],[0.55,0.55,120]]]}}]}`), 0o644)
	for name, path := range map[string]string{
		"GeoJSON with heights":  z,
		"PolygonZ":              gpkg("z.gpkg", "POLYGON Z (("+"0.55 0.55 1, 3.05 0.55 2, 3.05 2.95 3, 0.55 2.95 4, 0.55 0.55 1"+"))"),
		"PolygonM":              gpkg("m.gpkg", "POLYGON M (("+"0.55 0.55 1, 3.05 0.55 2, 3.05 2.95 3, 0.55 2.95 4, 0.55 0.55 1"+"))"),
		"MultiSurface":          gpkg("ms.gpkg", "MULTISURFACE ((("+square+")))"),
		"CurvePolygon of lines": gpkg("cp.gpkg", "CURVEPOLYGON (("+square+"))"),
	} {
		t.Run(name, func(t *testing.T) {
			if got := cells(t, path); got != want {
				t.Errorf("%d cells, want %d as for the 2D polygon", got, want)
			}
		})
	}
	t.Run("CurvePolygon of arcs", func(t *testing.T) {
		// A circle of radius 1.5 degrees about (2, 2): pi r^2 / 0.01 =
		// 707 cells of 0.1 degree; the edge cells decide within a few
		// per cent.
		n := cells(t, gpkg("arc.gpkg", "CURVEPOLYGON (CIRCULARSTRING (0.5 2, 3.5 2, 0.5 2))"))
		if want := math.Pi * 1.5 * 1.5 / 0.01; math.Abs(float64(n)-want) > 0.03*want {
			t.Errorf("%d cells, want about %.0f", n, want)
		}
	})
}

// TestPolygonLayerAfterOthers: of a GeoPackage whose first layer holds
// points, the first polygon layer is read (with a warning naming it),
// its invalid feature repaired in that layer, not in the first.
func TestPolygonLayerAfterOthers(t *testing.T) {
	Register()
	p := filepath.Join(t.TempDir(), "study.gpkg")
	ds, err := godal.CreateVector(godal.GeoPackage, p)
	if err != nil {
		t.Fatal(err)
	}
	sr, _ := godal.NewSpatialRefFromEPSG(4326)
	for _, l := range []struct {
		name string
		typ  godal.GeometryType
		wkt  string
	}{
		{"a_points", godal.GTPoint, "POINT (1 1)"},
		{"b_lines", godal.GTLineString, "LINESTRING (1 1, 2 2)"},
		// A bow-tie: invalid, repaired into two triangles.
		{"c_region", godal.GTPolygon, "POLYGON ((0.55 0.55, 3.05 2.95, 3.05 0.55, 0.55 2.95, 0.55 0.55))"},
	} {
		lay, err := ds.CreateLayer(l.name, sr, l.typ)
		if err != nil {
			t.Fatal(err)
		}
		g, _ := godal.NewGeometryFromWKT(l.wkt, sr)
		if _, err := lay.NewFeature(g); err != nil {
			t.Fatal(err)
		}
	}
	if err := ds.Close(); err != nil {
		t.Fatal(err)
	}
	g, _ := geoGrid(t, 0, 4, 0.1, 40, 40)
	s, warns, err := ReadShape(p, g)
	if err != nil {
		t.Fatal(err)
	}
	n := 0
	Fill(g, s.Grid, func(row, c0, c1 int) { n += c1 - c0 })
	if n == 0 {
		t.Error("the region holds no cell")
	}
	named := false
	for _, w := range warns {
		named = named || strings.Contains(w, `"c_region"`) && strings.Contains(w, "a_points, b_lines, c_region")
	}
	if !named {
		t.Errorf("no warning names the layer read and the others: %q", warns)
	}
}

// TestUnitFieldIgnoresCase: the ecoregion id field is found whatever its
// case when only one field has that name ignoring case (a shapefile's DBF
// holds ID, typed id), and refused with the list of fields otherwise.
func TestUnitFieldIgnoresCase(t *testing.T) {
	dir := t.TempDir()
	g, _ := geoGrid(t, 0, 4, 0.1, 40, 40)
	path := writeGeoJSON(t, dir, "units.geojson", []string{"a", "b"}, [][][2]float64{
		{{0.5, 0.5}, {1.5, 0.5}, {1.5, 1.5}, {0.5, 1.5}, {0.5, 0.5}},
		{{2.5, 2.5}, {3.5, 2.5}, {3.5, 3.5}, {2.5, 3.5}, {2.5, 2.5}},
	})
	units, _, err := ReadUnits(path, "ID", g)
	if err != nil {
		t.Fatal(err)
	}
	if len(units) != 2 || units[0].ID != "a" || units[1].ID != "b" {
		t.Errorf("units %v, want a and b", units)
	}
	if _, _, err := ReadUnits(path, "name", g); err == nil || !strings.Contains(err.Error(), `no field "name"`) {
		t.Errorf("a field no name matches: %v", err)
	}
}

// TestLatin1UnitIDs: a shapefile whose DBF text is Latin-1 and which has
// no .cpg (older shapefiles) gives its unit ids as the Latin-1 letters,
// so that Zoë and Zoé are two readable ids in every output.
func TestLatin1UnitIDs(t *testing.T) {
	Register()
	dir := t.TempDir()
	g, _ := geoGrid(t, 0, 4, 0.1, 40, 40)
	src := writeGeoJSON(t, dir, "units.geojson", []string{"Zoë", "Zoé"}, [][][2]float64{
		{{0.5, 0.5}, {1.5, 0.5}, {1.5, 1.5}, {0.5, 1.5}, {0.5, 0.5}},
		{{2.5, 2.5}, {3.5, 2.5}, {3.5, 3.5}, {2.5, 3.5}, {2.5, 2.5}},
	})
	ds, err := godal.Open(src, godal.VectorOnly())
	if err != nil {
		t.Fatal(err)
	}
	shp := filepath.Join(dir, "units.shp")
	out, err := ds.VectorTranslate(shp, []string{"-f", "ESRI Shapefile", "-lco", "ENCODING=ISO-8859-1"})
	ds.Close()
	if err != nil {
		t.Fatal(err)
	}
	out.Close()
	os.Remove(filepath.Join(dir, "units.cpg"))
	units, _, err := ReadUnits(shp, "id", g)
	if err != nil {
		t.Fatal(err)
	}
	if len(units) != 2 || units[0].ID != "Zoë" || units[1].ID != "Zoé" {
		var ids []string
		for _, u := range units {
			ids = append(ids, u.ID)
		}
		t.Errorf("ids %q, want Zoë and Zoé", ids)
	}
}

// TestUnreadablePolygonFileAdvice: a polygon file GDAL cannot open is
// refused with what to do; GDAL's advice for an open ring (an option to
// accept it, with its name missing) and its own wording of a file in no
// format it knows are not passed on.
func TestUnreadablePolygonFileAdvice(t *testing.T) {
	Register()
	dir := t.TempDir()
	g, _ := geoGrid(t, 0, 4, 0.1, 40, 40)
	garbage := filepath.Join(dir, "region.gpkg")
	os.WriteFile(garbage, []byte("garbage\x00\x01 not a vector"), 0o644)
	open := filepath.Join(dir, "open.geojson")
	os.WriteFile(open, []byte(`{"type":"FeatureCollection","features":[{"type":"Feature","properties":{},"geometry":{"type":"Polygon","coordinates":[[[0.5,0.5],[3,0.5],[3,3],[0.5,3]]]}}]}`), 0o644)
	for _, tc := range []struct {
		path    string
		want    []string
		notWant []string
	}{
		{garbage, []string{"region.gpkg is not a vector file GDAL can read (no format GDAL knows matches its content)", "give a GeoPackage, shapefile", "opens in a GIS"},
			[]string{"not recognized", "`"}},
		{open, []string{"open.geojson feature 1: ring 1 of its Polygon ends at (0.5, 3), not at its first point (0.5, 0.5)", "close the ring"},
			[]string{"configuration option", "Non closed", "-makevalid closes"}},
	} {
		_, _, err := ReadShape(tc.path, g)
		if err == nil {
			t.Fatalf("%s: read", tc.path)
		}
		for _, w := range tc.want {
			if !strings.Contains(err.Error(), w) {
				t.Errorf("%s: %q lacks %q", filepath.Base(tc.path), err, w)
			}
		}
		for _, w := range tc.notWant {
			if strings.Contains(err.Error(), w) {
				t.Errorf("%s: %q has %q", filepath.Base(tc.path), err, w)
			}
		}
	}
}

// TestWrongKindOfFileAdvice: a table without geometry given as polygons
// is named as a table (it had been refused for lacking a CRS, which
// defining one would not fix); an ecoregion field asked of a layer with no
// fields says so instead of listing nothing; a file that is no raster
// says what to give.
func TestWrongKindOfFileAdvice(t *testing.T) {
	Register()
	dir := t.TempDir()
	g, _ := geoGrid(t, 0, 4, 0.1, 40, 40)
	table := filepath.Join(dir, "points.csv")
	os.WriteFile(table, []byte("lon,lat\n1,2\n2,3\n"), 0o644)
	bare := filepath.Join(dir, "bare.geojson")
	os.WriteFile(bare, []byte(`{"type":"FeatureCollection","features":[{"type":"Feature","properties":{},"geometry":{"type":"Polygon","coordinates":[[[0.5,0.5],[3,0.5],[3,3],[0.5,3],[0.5,0.5]]]}}]}`), 0o644)
	notRaster := filepath.Join(dir, "model.tif")
	os.WriteFile(notRaster, []byte("not a raster"), 0o644)
	check := func(what string, err error, want, notWant string) {
		t.Helper()
		if err == nil {
			t.Fatalf("%s: no error", what)
		}
		if !strings.Contains(err.Error(), want) {
			t.Errorf("%s: %q lacks %q", what, err, want)
		}
		if notWant != "" && strings.Contains(err.Error(), notWant) {
			t.Errorf("%s: %q has %q", what, err, notWant)
		}
	}
	_, _, err := ReadShape(table, g)
	check("table", err, "has no geometry (a table, not polygons)", "no CRS")
	_, _, err = ReadUnits(bare, "ECO", g)
	check("no fields", err, `has no field "ECO": its features have no attribute fields at all`, "fields are:")
	_, err = OpenGrid(notRaster)
	check("not a raster", err, "give a GeoTIFF", "")
	// A GeoPackage's fid names the features' id column, no field: OGR
	// SQL read it as NULL on every feature, and the refusal said 40
	// features had no value in it (helper probe of 2026-12-05).
	units := filepath.Join(dir, "units.gpkg")
	src, err := godal.Open(bare, godal.VectorOnly())
	if err != nil {
		t.Fatal(err)
	}
	dst, err := src.VectorTranslate(units, []string{"-f", "GPKG", "-sql", "SELECT 'a' AS unit_id, * FROM bare"})
	src.Close()
	if err != nil {
		t.Fatal(err)
	}
	dst.Close()
	// A table's WKT that does not parse (cut short) read as no geometry,
	// and the feature was skipped with the warning "has no geometry"
	// (helper probe of 2026-12-05).
	wktTable := filepath.Join(dir, "wkt.csv")
	os.WriteFile(wktTable, []byte("WKT,id\n\"POLYGON((0.5 0.5,3 0.5,3 3,0.5 3,0.5 0.5))\",1\n\"POLYGON((0.5 0.5,3 0.5\",2\n"), 0o644)
	os.WriteFile(filepath.Join(dir, "wkt.prj"), []byte(`GEOGCS["WGS 84",DATUM["WGS_1984",SPHEROID["WGS 84",6378137,298.257223563]],PRIMEM["Greenwich",0],UNIT["degree",0.0174532925199433]]`), 0o644)
	_, _, err = ReadShape(wktTable, g)
	check("broken WKT", err, `wkt.csv feature 2: its WKT text cannot be read as a geometry ("POLYGON((0.5 0.5,3 0.5")`, "")
	// A projected layer reaching past the edge of its CRS's world (an
	// easting of 1e8 m in EPSG:3857, about 900 degrees of longitude):
	// as a base region its buffers stopped on "NewIndex: site 0:
	// longitude -1258 outside [-360, 360]", as an extra layer it came
	// out empty (helper probe of 2026-12-05).
	far := filepath.Join(dir, "far3857.geojson")
	os.WriteFile(far, []byte(`{"type":"FeatureCollection","crs":{"type":"name","properties":{"name":"EPSG:3857"}},"features":[{"type":"Feature","properties":{},"geometry":{"type":"Polygon","coordinates":[[[0,0],[100000000,0],[100000000,400000],[0,400000],[0,0]]]}}]}`), 0o644)
	_, _, err = ReadShape(far, g)
	check("past the world's edge", err, "projected to the raster's longitudes and latitudes it has a vertex at longitude", "NewIndex")
	check("past the world's edge", err, "past the edge of the world of the layer's CRS", "")
	for _, field := range []string{"fid", "FID"} {
		_, _, err = ReadUnits(units, field, g)
		check("fid", err, `has no field "`+field+`" (`+field+` names the features' id column`, "no value (NULL)")
		check("fid", err, "fields are: unit_id", "")
	}
}

// TestLongPathGeoPackage: a GeoPackage whose path is longer than SQLite
// opens was refused as "not a vector file GDAL can read (failed: unable
// to open database file); check that the file opens in a GIS, or export
// it again", though the file is fine (a region of 615 bytes' path). It is
// now named with its length and what to do. The file is written at a
// short path and moved (SQLite cannot write it there either).
func TestLongPathGeoPackage(t *testing.T) {
	dir := t.TempDir()
	g, _ := geoGrid(t, 0, 4, 0.1, 40, 40)
	short := filepath.Join(dir, "region.gpkg")
	writePolygonGPKG(t, short, 4326, [][2]float64{{0.5, 0.5}, {3, 0.5}, {3, 3}, {0.5, 3}, {0.5, 0.5}})
	long := dir
	for len(long) <= MaxSQLitePath {
		long = filepath.Join(long, strings.Repeat("d", 100))
	}
	if err := os.MkdirAll(long, 0o755); err != nil {
		t.Fatal(err)
	}
	long = filepath.Join(long, "region.gpkg")
	if err := os.Rename(short, long); err != nil {
		t.Fatal(err)
	}
	_, _, err := ReadShape(long, g)
	if err == nil {
		t.Fatal("read")
	}
	for _, w := range []string{"its path is", "move it to a folder with a shorter path"} {
		if !strings.Contains(err.Error(), w) {
			t.Errorf("%q lacks %q", err, w)
		}
	}
	if strings.Contains(err.Error(), "export it again") {
		t.Errorf("%q blames the file", err)
	}
}

// TestKMLFoldersPinThenArea: a KML as Google Earth saves it, a folder of
// pins before the folder holding the area (GDAL reads each folder as a
// layer whose geometry type is unknown), is read from the folder holding
// polygons: the cells of the same square given alone in a GeoJSON file,
// with a warning naming the folders. The pin's folder was read, and the
// run refused "feature 1 is a point" without naming the other folder.
func TestKMLFoldersPinThenArea(t *testing.T) {
	Register()
	dir := t.TempDir()
	g, _ := geoGrid(t, 0, 4, 0.1, 40, 40)
	kml := filepath.Join(dir, "study.kml")
	os.WriteFile(kml, []byte(`<?xml version="1.0" encoding="UTF-8"?>
<kml xmlns="http://www.opengis.net/kml/2.2"><Document><name>Study</name>
<Folder><name>Pins</name><Placemark><name>Field station</name><Point><coordinates>1.5,1.5,0</coordinates></Point></Placemark></Folder>
<Folder><name>Area</name><Placemark><name>M</name><Polygon><outerBoundaryIs><LinearRing><coordinates>0.55,0.55,0 3.05,0.55,0 3.05,2.95,0 0.55,2.95,0 0.55,0.55,0</coordinates></LinearRing></outerBoundaryIs></Polygon></Placemark></Folder>
</Document></kml>`), 0o644)
	plain := filepath.Join(dir, "plain.geojson")
	os.WriteFile(plain, []byte(`{"type":"FeatureCollection","features":[{"type":"Feature","properties":{},"geometry":{"type":"Polygon","coordinates":[[[0.55,0.55],[3.05,0.55],[3.05,2.95],[0.55,2.95],[0.55,0.55]]]}}]}`), 0o644)
	cells := func(path string) (int, []string) {
		t.Helper()
		s, warns, err := ReadShape(path, g)
		if err != nil {
			t.Fatal(err)
		}
		n := 0
		Fill(g, s.Grid, func(row, c0, c1 int) { n += c1 - c0 })
		return n, warns
	}
	want, _ := cells(plain)
	got, warns := cells(kml)
	if got != want || want == 0 {
		t.Errorf("cells %d, want %d (the square alone)", got, want)
	}
	named := false
	for _, w := range warns {
		named = named || strings.Contains(w, `the first holding polygons, "Area"`) && strings.Contains(w, "(Pins, Area)")
	}
	if !named {
		t.Errorf("no warning names the folder read and the others: %q", warns)
	}
}
