package extent

import (
	"fmt"
	"path/filepath"
	"reflect"
	"testing"

	"github.com/airbusgeo/godal"
)

// TestRealUnitIDs: an ecoregion id field of type real (a GeoPackage REAL
// column) groups features by value: features are one unit when their ids
// are equal numbers, and two when they differ, however far after the
// decimal point. Expected units: the distinct values of the column as
// Python's set() of the same floats finds them ({1.0000001, 1.0000004,
// 0.0, 123456789.25}; -0.0 == 0.0), each named by its shortest decimal
// text. godal formats a real with "%f", six decimals, which made
// 1.0000001 and 1.0000004 one unit "1.000000" (found by hV's audit).
func TestRealUnitIDs(t *testing.T) {
	g, _ := geoGrid(t, 0, 10, 0.1, 100, 100)
	sr := wgs84SR(t)
	square := func(x0, y0 float64) []byte {
		geom, err := godal.NewGeometryFromWKT(fmt.Sprintf("POLYGON((%g %g,%g %g,%g %g,%g %g,%g %g))",
			x0, y0, x0+2, y0, x0+2, y0+2, x0, y0+2, x0, y0), sr)
		if err != nil {
			t.Fatal(err)
		}
		defer geom.Close()
		b, err := geom.WKB()
		if err != nil {
			t.Fatal(err)
		}
		return b
	}
	path := filepath.Join(t.TempDir(), "units.gpkg")
	feats := []Feature{
		{square(1.03, 1.03), []any{1.0000001}},
		{square(3.03, 1.03), []any{1.0000004}},
		{square(1.03, 5.03), []any{0.0}}, // -0, set below
		{square(3.03, 5.03), []any{0.0}},
		{square(6.03, 6.03), []any{123456789.25}},
		{square(6.03, 1.03), []any{1.0000001}},
	}
	feats[2].Values[0] = negZero()
	if err := WriteLayer(path, "units", sr, godal.GTPolygon, []LayerField{{"rid", godal.FTReal}}, feats); err != nil {
		t.Fatal(err)
	}
	units, _, err := ReadUnits(path, "rid", g)
	if err != nil {
		t.Fatal(err)
	}
	var ids []string
	for _, u := range units {
		ids = append(ids, u.ID)
	}
	if want := []string{"1.0000001", "1.0000004", "0", "123456789.25"}; !reflect.DeepEqual(ids, want) {
		t.Errorf("units %q, want %q", ids, want)
	}
}

// negZero returns -0.0 (a constant expression would give +0).
func negZero() float64 {
	z := 0.0
	return -z
}
