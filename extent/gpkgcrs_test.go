package extent

import (
	"path/filepath"
	"strings"
	"testing"

	"github.com/airbusgeo/godal"
	"github.com/paulmach/orb"
	"github.com/paulmach/orb/encoding/wkb"
)

// TestWriteLayerCRSWithoutWKT1 writes a layer in CRSs that GDAL 3.6's
// GeoPackage driver cannot export as WKT1 (Equal Earth, EPSG:8857: "PROJ:
// proj_as_wkt: Unsupported conversion method: Equal Earth") and stores
// otherwise (as WKT2): GDAL raises the message and creates the layer, and
// godal took the message for a failure, so a run on an Equal Earth raster
// scored everything and then failed writing extents.gpkg (exit 1). The
// layer must be written and read back in its CRS; EPSG:4326 is the
// control.
func TestWriteLayerCRSWithoutWKT1(t *testing.T) {
	Register()
	for _, tc := range []struct {
		epsg int
		name string // in the CRS name read back
	}{{8857, "Equal Earth"}, {4326, "WGS 84"}} {
		t.Run(tc.name, func(t *testing.T) {
			srs, err := godal.NewSpatialRefFromEPSG(tc.epsg)
			if err != nil {
				t.Fatal(err)
			}
			defer srs.Close()
			g, err := wkb.Marshal(orb.Polygon{{{0, 0}, {1000, 0}, {1000, 1000}, {0, 1000}, {0, 0}}})
			if err != nil {
				t.Fatal(err)
			}
			path := filepath.Join(t.TempDir(), "x.gpkg")
			if err := WriteLayer(path, "x", srs, godal.GTPolygon, []LayerField{{Name: "id", Type: godal.FTString}}, []Feature{{WKB: g, Values: []any{"a"}}}); err != nil {
				t.Fatalf("WriteLayer: %v", err)
			}
			ds, err := godal.Open(path, godal.VectorOnly())
			if err != nil {
				t.Fatal(err)
			}
			defer ds.Close()
			l := ds.Layers()
			if len(l) != 1 {
				t.Fatalf("%d layers", len(l))
			}
			if n, err := l[0].FeatureCount(); err != nil || n != 1 {
				t.Fatalf("%d features (%v)", n, err)
			}
			wkt, _ := l[0].SpatialRef().WKT()
			if !strings.Contains(wkt, tc.name) {
				t.Errorf("layer CRS %q, want %s", wkt, tc.name)
			}
		})
	}
}

// TestGeoTIFFHoldsCRS: a GeoTIFF keeps the CRS of a latitude-longitude
// grid and of an EPSG:3035 one, and not Equal Earth's (EPSG:8857) with the
// GDAL 3.6 that Debian ships (GDAL puts it in an .aux.xml, which
// areasweep never writes); the run warns then that extents.tif has none.
func TestGeoTIFFHoldsCRS(t *testing.T) {
	for _, c := range []struct {
		crs  string
		gt   [6]float64
		want bool
	}{
		{"EPSG:4326", [6]float64{10, 0.1, 0, 50, 0, -0.1}, true},
		{"EPSG:3035", [6]float64{4000000, 5000, 0, 3200000, 0, -5000}, true},
		{"EPSG:8857", [6]float64{1000000, 10000, 0, 6000000, 0, -10000}, false},
	} {
		g, err := NewGrid(10, 10, c.gt, c.crs)
		if err != nil {
			t.Fatal(err)
		}
		if got := g.GeoTIFFHoldsCRS(); got != c.want {
			t.Errorf("%s: GeoTIFFHoldsCRS %v, want %v (GDAL %d.%d)", c.crs, got, c.want, godal.Version().Major(), godal.Version().Minor())
		}
		g.Close()
	}
}
