package extent

import (
	"fmt"
	"testing"

	"github.com/airbusgeo/godal"
)

// godalCreateShapefile writes a one-square Shapefile with no .prj file.
func godalCreateShapefile(path string) (bool, error) {
	Register()
	ds, err := godal.CreateVector(godal.Shapefile, path)
	if err != nil {
		return false, err
	}
	layer, err := ds.CreateLayer("nocrs", nil, godal.GTPolygon)
	if err != nil {
		return false, err
	}
	geom, err := godal.NewGeometryFromWKT("POLYGON ((1 1, 2 1, 2 2, 1 2, 1 1))", nil)
	if err != nil {
		return false, err
	}
	if _, err := layer.NewFeature(geom); err != nil {
		return false, err
	}
	return true, ds.Close()
}

// sameMembership reports whether two families on one grid give every
// member the same cells, comparing cell by cell.
func sameMembership(a, b *Family) bool {
	if len(a.Members) != len(b.Members) {
		return false
	}
	for k := range a.Members {
		for i := 0; i < a.Grid.Cells(); i++ {
			if a.Has(k, i) != b.Has(k, i) {
				return false
			}
		}
	}
	return true
}

// writeSquareGPKG writes a GeoPackage holding one square of half side
// half (metres) centred on the origin of the CRS EPSG:epsg.
func writeSquareGPKG(t *testing.T, path string, epsg int, half float64) {
	t.Helper()
	Register()
	sr, err := godal.NewSpatialRefFromEPSG(epsg)
	if err != nil {
		t.Fatal(err)
	}
	defer sr.Close()
	ds, err := godal.CreateVector(godal.GeoPackage, path)
	if err != nil {
		t.Fatal(err)
	}
	layer, err := ds.CreateLayer("square", sr, godal.GTPolygon)
	if err != nil {
		t.Fatal(err)
	}
	wkt := fmt.Sprintf("POLYGON ((%[1]g %[1]g, %[2]g %[1]g, %[2]g %[2]g, %[1]g %[2]g, %[1]g %[1]g))", -half, half)
	geom, err := godal.NewGeometryFromWKT(wkt, sr)
	if err != nil {
		t.Fatal(err)
	}
	if _, err := layer.NewFeature(geom); err != nil {
		t.Fatal(err)
	}
	if err := ds.Close(); err != nil {
		t.Fatal(err)
	}
}
