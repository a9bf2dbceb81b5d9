package extent

import (
	"os"
	"path/filepath"
	"testing"

	"github.com/airbusgeo/godal"

	"areasweep/extent/gdalmsg"
)

// TestNoGeometryAsksGDALNothing: a feature whose geometry is null is
// found by noGeometry without calling GDAL on the NULL handle (godal's
// handle is an unsafe.Pointer, which the reflection check once missed:
// each such feature put "library error: the library reported an error",
// GDAL's "Pointer 'hGeom' is NULL in 'OGR_G_IsEmpty'", into run.log; a
// sweep of malformed inputs: an ecoregion GeoPackage with one NULL geometry).
func TestNoGeometryAsksGDALNothing(t *testing.T) {
	Register()
	gdalmsg.Install()
	p := filepath.Join(t.TempDir(), "null.geojson")
	body := `{"type":"FeatureCollection","features":[{"type":"Feature","properties":{"u":"a"},"geometry":null}]}`
	if err := os.WriteFile(p, []byte(body), 0o644); err != nil {
		t.Fatal(err)
	}
	ds, err := godal.Open(p, godal.VectorOnly())
	if err != nil {
		t.Fatal(err)
	}
	defer ds.Close()
	f := ds.Layers()[0].NextFeature()
	if f == nil {
		t.Fatal("no feature")
	}
	defer f.Close()
	gdalmsg.Drain()
	if !noGeometry(f.Geometry()) {
		t.Fatal("noGeometry = false for a null geometry")
	}
	if msgs, n := gdalmsg.Drain(); len(msgs) != 0 || n != 0 {
		t.Fatalf("GDAL raised %v (and %d more)", msgs, n)
	}
}
