package extent

import (
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
