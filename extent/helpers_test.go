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
