package extent

import (
	"fmt"
	"strings"
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

// writePolygonGPKG writes a GeoPackage holding one polygon feature with
// the rings rings (coordinates in the CRS EPSG:epsg).
func writePolygonGPKG(t *testing.T, path string, epsg int, rings ...[][2]float64) {
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
	layer, err := ds.CreateLayer("region", sr, godal.GTPolygon)
	if err != nil {
		t.Fatal(err)
	}
	var rs []string
	for _, r := range rings {
		var pts []string
		for _, p := range r {
			pts = append(pts, fmt.Sprintf("%.10g %.10g", p[0], p[1]))
		}
		rs = append(rs, "("+strings.Join(pts, ", ")+")")
	}
	geom, err := godal.NewGeometryFromWKT("POLYGON ("+strings.Join(rs, ", ")+")", sr)
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

// wgs84SR returns EPSG:4326 as a spatial reference, closed when the test
// ends.
func wgs84SR(t testing.TB) *godal.SpatialRef {
	t.Helper()
	sr, err := godal.NewSpatialRefFromEPSG(4326)
	if err != nil {
		t.Fatal(err)
	}
	t.Cleanup(sr.Close)
	return sr
}
