package extent

import (
	"os"
	"path/filepath"
	"strings"
	"testing"

	"github.com/airbusgeo/godal"
)

// TestEmptyLayerAdvice: a polygon layer that holds no features (a GeoJSON
// FeatureCollection whose "features" list is empty, as an export of an
// empty selection writes it, an empty GeoPackage layer or shapefile, a
// KML without a Placemark) is refused saying what the file holds and
// what to do; it said only that the layer "has no polygon features", or
// for the KML that the file "has no layer".
func TestEmptyLayerAdvice(t *testing.T) {
	Register()
	dir := t.TempDir()
	g, _ := geoGrid(t, 0, 4, 0.1, 40, 40)
	write := func(name, body string) string {
		p := filepath.Join(dir, name)
		if err := os.WriteFile(p, []byte(body), 0o644); err != nil {
			t.Fatal(err)
		}
		return p
	}
	emptyLayer := func(drv godal.DriverName, name string) string {
		p := filepath.Join(dir, name)
		ds, err := godal.CreateVector(drv, p)
		if err != nil {
			t.Fatal(err)
		}
		sr, _ := godal.NewSpatialRefFromEPSG(4326)
		if _, err := ds.CreateLayer("region", sr, godal.GTPolygon); err != nil {
			t.Fatal(err)
		}
		if err := ds.Close(); err != nil {
			t.Fatal(err)
		}
		return p
	}
	const todo = "give the file that holds the area's polygons, or export them again from the GIS"
	for _, c := range []struct {
		name, path string
		words      []string
	}{
		{"GeoJSON", write("empty.geojson", `{"type":"FeatureCollection","features":[]}`),
			[]string{`empty.geojson layer "empty" holds no features at all (a FeatureCollection whose "features" list is empty), so no polygons`, todo, "a selection with nothing selected"}},
		{"GeoJSON with a CRS", write("crs.geojson", `{"type":"FeatureCollection","crs":{"type":"name","properties":{"name":"urn:ogc:def:crs:EPSG::3035"}},"features":[]}`),
			[]string{`crs.geojson layer "crs" holds no features at all (a FeatureCollection`, todo}},
		{"GeoPackage", emptyLayer(godal.GeoPackage, "empty.gpkg"), []string{`empty.gpkg layer "region" holds no features at all, so no polygons`, todo}},
		{"shapefile", emptyLayer(godal.Shapefile, "empty.shp"), []string{`empty.shp layer "empty" holds no features at all, so no polygons`, todo}},
		{"KML without a Placemark", write("empty.kml", `<?xml version="1.0" encoding="UTF-8"?>`+"\n"+`<kml xmlns="http://www.opengis.net/kml/2.2"><Document><name>Study</name></Document></kml>`),
			[]string{"empty.kml holds no layer of features at all, so no polygons", todo}},
	} {
		t.Run(c.name, func(t *testing.T) {
			_, _, err := ReadShape(c.path, g)
			if err == nil {
				t.Fatal("read, want a refusal")
			}
			for _, w := range c.words {
				if !strings.Contains(err.Error(), w) {
					t.Errorf("%v\nlacks %q", err, w)
				}
			}
		})
	}
}
