package extent

import (
	"os"
	"path/filepath"
	"strings"
	"testing"

	"github.com/airbusgeo/godal"
)

// TestCheckHDF5: a damaged HDF5 file (the signature, then zeros) is
// refused with ErrDamagedHDF5, as a raster and as a layer; a sound
// netCDF-4 raster (an HDF5 file GDAL's netCDF driver opens) and a file
// that is no HDF5 file pass.
func TestCheckHDF5(t *testing.T) {
	Register()
	dir := t.TempDir()
	damaged := filepath.Join(dir, "cut.h5")
	if err := os.WriteFile(damaged, append(append([]byte{}, hdf5Signature...), make([]byte, 600)...), 0o644); err != nil {
		t.Fatal(err)
	}
	other := filepath.Join(dir, "text.tif")
	if err := os.WriteFile(other, []byte("not a raster"), 0o644); err != nil {
		t.Fatal(err)
	}
	g, _ := geoGrid(t, 0, 4, 0.1, 40, 40)
	src, err := godal.Create(godal.GTiff, filepath.Join(dir, "src.tif"), 1, godal.Float32, 40, 40)
	if err != nil {
		t.Fatal(err)
	}
	if err := src.SetGeoTransform(g.GeoTransform); err != nil {
		t.Fatal(err)
	}
	nc := filepath.Join(dir, "sound.nc")
	ds, err := src.Translate(nc, []string{"-of", "netCDF", "-co", "FORMAT=NC4"})
	if err != nil {
		t.Fatal(err)
	}
	ds.Close()
	src.Close()
	if head, _ := os.ReadFile(nc); !strings.HasPrefix(string(head), string(hdf5Signature)) {
		t.Fatal("the netCDF-4 file does not begin with the HDF5 signature")
	}
	for _, c := range []struct {
		path   string
		raster bool
		want   error
	}{{damaged, true, ErrDamagedHDF5}, {damaged, false, ErrDamagedHDF5}, {nc, true, nil}, {other, true, nil}} {
		if err := CheckHDF5(c.path, c.raster); err != c.want {
			t.Errorf("CheckHDF5(%s, raster %v) = %v, want %v", filepath.Base(c.path), c.raster, err, c.want)
		}
	}
}
