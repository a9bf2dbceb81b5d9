package pipeline

import (
	"os"
	"path/filepath"
	"testing"

	"github.com/airbusgeo/godal"
)

// TestAuxProblemFloat32NoData: a Float32 GeoTIFF's own nodata value
// -9999.99 is held as a float32 (-9999.990234375); an .aux.xml that repeats
// it as the user wrote it (as desktop GIS tools write the file) only
// repeats the raster's own value, compared as the cells are: no problem.
// Another value is still named.
func TestAuxProblemFloat32NoData(t *testing.T) {
	for _, tc := range []struct {
		aux  string
		want string
	}{
		{"-9999.99", ""},
		{"-9999.990234375", ""},
		{"-9999.98", "the nodata value -9999.98"},
	} {
		t.Run(tc.aux, func(t *testing.T) {
			dir := t.TempDir()
			p := tinyRaster(t, dir, "m.tif", true, false)
			ds, err := godal.Open(p, godal.Update())
			if err != nil {
				t.Fatal(err)
			}
			if err := ds.Bands()[0].SetNoData(-9999.99); err != nil {
				t.Fatal(err)
			}
			ds.Close()
			aux := `<PAMDataset><PAMRasterBand band="1"><NoDataValue>` + tc.aux + `</NoDataValue></PAMRasterBand></PAMDataset>`
			if err := os.WriteFile(filepath.Join(dir, "m.tif.aux.xml"), []byte(aux), 0o644); err != nil {
				t.Fatal(err)
			}
			if got := auxFile(p).what; got != tc.want {
				t.Errorf("auxProblem = %q, want %q", got, tc.want)
			}
		})
	}
}
