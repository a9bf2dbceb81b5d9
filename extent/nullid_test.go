package extent

import (
	"fmt"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"github.com/airbusgeo/godal"
)

// TestNullIDNamesFeatures: an ecoregion layer whose id is NULL in some
// features is refused with a message naming them (README: the message
// names the file and the feature, 1-based), in a GeoJSON (FIDs from 0), a
// GeoPackage (FIDs from 1) and a shapefile (FIDs from 0) made from it.
// Expected: features 2, 5 and 6, the positions (from 1) at which Python's
// osgeo.ogr iteration of each file finds the field None (6 has no "id"
// property at all). The message gave only their count before.
func TestNullIDNamesFeatures(t *testing.T) {
	Register()
	dir := t.TempDir()
	g, _ := geoGrid(t, 0, 10, 0.1, 100, 100)
	var feats []string
	for i, id := range []string{`"id":"a"`, `"id":null`, `"id":"b"`, `"id":"c"`, `"id":null`, ``} {
		a, b := float64(i)+1.05, float64(i)+1.95
		feats = append(feats, fmt.Sprintf(`{"type":"Feature","properties":{%s},"geometry":{"type":"Polygon","coordinates":[[[%g,1],[%g,1],[%g,2],[%g,2],[%g,1]]]}}`, id, a, b, b, a, a))
	}
	gj := filepath.Join(dir, "units.geojson")
	if err := os.WriteFile(gj, []byte(`{"type":"FeatureCollection","features":[`+strings.Join(feats, ",")+`]}`), 0o644); err != nil {
		t.Fatal(err)
	}
	src, err := godal.Open(gj, godal.VectorOnly())
	if err != nil {
		t.Fatal(err)
	}
	defer src.Close()
	paths := []string{gj}
	for _, c := range []struct{ name, driver string }{{"units.gpkg", "GPKG"}, {"units.shp", "ESRI Shapefile"}} {
		p := filepath.Join(dir, c.name)
		out, err := src.VectorTranslate(p, []string{"-f", c.driver})
		if err != nil {
			t.Fatal(err)
		}
		out.Close()
		paths = append(paths, p)
	}
	for _, p := range paths {
		t.Run(filepath.Base(p), func(t *testing.T) {
			_, _, err := ReadUnits(p, "id", g)
			if err == nil {
				t.Fatal("NULL ids accepted")
			}
			if !strings.Contains(err.Error(), "3 feature(s) with no value (NULL)") || !strings.Contains(err.Error(), "(feature(s) 2, 5, 6, numbered from 1") {
				t.Errorf("message %q does not name features 2, 5 and 6", err)
			}
		})
	}
}
