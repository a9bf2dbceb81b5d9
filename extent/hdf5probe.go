package extent

import (
	"bytes"
	"errors"
	"io"
	"os"

	"github.com/airbusgeo/godal"
)

// hdf5Signature begins every HDF5 file (HDF5 File Format Specification,
// "Format Signature"), netCDF-4 files included.
var hdf5Signature = []byte("\x89HDF\r\n\x1a\n")

// ErrDamagedHDF5 is CheckHDF5's error for an HDF5 file no driver opens.
var ErrDamagedHDF5 = errors.New("it begins as an HDF5 file (as netCDF-4 files do), but no GDAL driver reads it: the file is cut short or damaged, or holds no raster or layer GDAL knows")

// CheckHDF5 opens a file that begins with the HDF5 signature once, with
// every driver (raster ones when raster, vector ones otherwise), while
// the process's standard error is sent elsewhere, and returns
// ErrDamagedHDF5 when none opens it; any other file, and a sound HDF5
// file, give nil. GDAL's netCDF driver, tried on every HDF5 file, lets
// the HDF5 library print its error stack for a damaged one straight to
// standard error, past GDAL's error handler, so that no message capture
// sees it. A sound file opens quietly, so the opens that follow need no
// such care. Call it where nothing else writes to standard error (a run
// checks its inputs this way before any other work starts).
func CheckHDF5(path string, raster bool) error {
	f, err := os.Open(path)
	if err != nil {
		return nil
	}
	head := make([]byte, len(hdf5Signature))
	_, err = io.ReadFull(f, head)
	f.Close()
	if err != nil || !bytes.Equal(head, hdf5Signature) {
		return nil
	}
	Register()
	opt := godal.OpenOption(godal.VectorOnly())
	if raster {
		opt = godal.RasterOnly()
	}
	var ds *godal.Dataset
	withoutStderr(func() { ds, err = godal.Open(path, opt, godal.SiblingFiles()) })
	if err != nil {
		return ErrDamagedHDF5
	}
	ds.Close()
	return nil
}
