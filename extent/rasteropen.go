package extent

import "github.com/airbusgeo/godal"

// OpenRaster opens the raster at path the way every reader of a model
// must, so that the grid, the scoring passes and the checks see one
// dataset: raster drivers only, and GDAL's own search for sidecar files
// (godal's default is to offer GDAL none), which formats that keep their
// header, georeferencing or mask beside the data need: an ESRI .bil or
// ENVI file's .hdr, a TIFF's .tfw world file, a .msk mask.
func OpenRaster(path string) (*godal.Dataset, error) {
	Register()
	return godal.Open(path, godal.RasterOnly(), godal.SiblingFiles())
}
