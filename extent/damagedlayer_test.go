package extent

import (
	"bytes"
	"encoding/binary"
	"fmt"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"github.com/airbusgeo/godal"
)

// TestDamagedGeoPackageLayer: a GeoPackage with one damaged page among
// its features' pages (its page type byte overwritten, as a bad copy
// leaves it) is refused as a region and as ecoregions, saying that only
// the features before it could be read. GDAL ends the reading there as at
// the layer's end, logging only "database disk image is malformed", and
// the features after it were left out of the region or the units without
// a word (22 of 40 ecoregions in helper hB's run); as ecoregions it was
// refused as having "-1 feature(s) with no value (NULL)".
func TestDamagedGeoPackageLayer(t *testing.T) {
	g, _ := geoGrid(t, 0, 10, 0.1, 100, 100)
	sr := wgs84SR(t)
	var feats []Feature
	for i := 0; i < 400; i++ {
		x, y := 0.05+float64(i%40)*0.25, 0.05+float64(i/40)*0.5
		geom, err := godal.NewGeometryFromWKT(fmt.Sprintf("POLYGON((%g %g,%g %g,%g %g,%g %g,%g %g))", x, y, x+0.2, y, x+0.2, y+0.4, x, y+0.4, x, y), sr)
		if err != nil {
			t.Fatal(err)
		}
		b, err := geom.WKB()
		geom.Close()
		if err != nil {
			t.Fatal(err)
		}
		feats = append(feats, Feature{b, []any{fmt.Sprintf("unit %d", i%7)}})
	}
	path := filepath.Join(t.TempDir(), "units.gpkg")
	if err := WriteLayer(path, "units", sr, godal.GTPolygon, []LayerField{{"unit", godal.FTString}}, feats); err != nil {
		t.Fatal(err)
	}
	if _, _, err := ReadUnits(path, "unit", g); err != nil {
		t.Fatalf("whole file: %v", err)
	}
	// SQLite's page size is bytes 16-17 of the file (1 for 65536); a leaf
	// page of a table has type 0x0D in its first byte, and a GeoPackage
	// geometry starts with "GP" (SQLite file format; GeoPackage 1.3).
	data, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	size := int(binary.BigEndian.Uint16(data[16:18]))
	if size == 1 {
		size = 65536
	}
	last := -1
	for p := size; p+size <= len(data); p += size {
		if data[p] == 0x0D && bytes.Count(data[p:p+size], []byte("GP")) > 10 {
			last = p
		}
	}
	if last < 0 {
		t.Fatal("no page of features found")
	}
	data[last] = 0x99
	if err := os.WriteFile(path, data, 0o644); err != nil {
		t.Fatal(err)
	}
	_, _, uerr := ReadUnits(path, "unit", g)
	_, _, serr := ReadShape(path, g)
	for _, err := range []error{uerr, serr} {
		if err == nil || !strings.Contains(err.Error(), path+` layer "units" is damaged: only `) || !strings.Contains(err.Error(), "export it again") {
			t.Errorf("damaged page: %v", err)
		}
	}
	if serr != nil && !strings.Contains(serr.Error(), "of its 400 features could be read") {
		t.Errorf("region: %v, want the count of 400", serr)
	}
}
