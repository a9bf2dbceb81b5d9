package extent

import (
	"os"
	"path/filepath"
	"slices"
	"testing"

	"github.com/airbusgeo/godal"
)

// TestDatasetFiles: GDAL lists a virtual raster's source beside the VRT
// itself, a shapefile's .shx and .dbf, a GeoTIFF alone; a file GDAL cannot
// open is an error naming it.
func TestDatasetFiles(t *testing.T) {
	Register()
	dir := t.TempDir()
	tif := filepath.Join(dir, "src.tif")
	ds, err := godal.Create(godal.GTiff, tif, 1, godal.Float32, 4, 3)
	if err != nil {
		t.Fatal(err)
	}
	ds.Close()
	vrt := filepath.Join(dir, "model.vrt")
	os.WriteFile(vrt, []byte(`<VRTDataset rasterXSize="4" rasterYSize="3">
  <VRTRasterBand dataType="Float32" band="1">
    <SimpleSource>
      <SourceFilename relativeToVRT="1">src.tif</SourceFilename>
      <SourceBand>1</SourceBand>
    </SimpleSource>
  </VRTRasterBand>
</VRTDataset>
`), 0o644)
	shp := filepath.Join(dir, "region.shp")
	if _, err := godalCreateShapefile(shp); err != nil {
		t.Fatal(err)
	}
	cases := []struct {
		name   string
		path   string
		vector bool
		want   []string
	}{
		{"GeoTIFF", tif, false, []string{tif}},
		{"VRT", vrt, false, []string{vrt, tif}},
		{"shapefile", shp, true, []string{shp, filepath.Join(dir, "region.shx"), filepath.Join(dir, "region.dbf")}},
	}
	for _, c := range cases {
		got, err := DatasetFiles(c.path, c.vector)
		if err != nil {
			t.Fatalf("%s: %v", c.name, err)
		}
		if !slices.Equal(got, c.want) {
			t.Errorf("%s: got %q, want %q", c.name, got, c.want)
		}
	}
	missing := filepath.Join(dir, "none.tif")
	if _, err := DatasetFiles(missing, false); err == nil {
		t.Errorf("no error for %s", missing)
	}
}

// BenchmarkDatasetFiles is the cost of listing a tiled GeoTIFF's files
// (one open and close by GDAL), what the input checksums add per raster.
func BenchmarkDatasetFiles(b *testing.B) {
	Register()
	tif := filepath.Join(b.TempDir(), "m.tif")
	ds, err := godal.Create(godal.GTiff, tif, 1, godal.Float32, 512, 512, godal.CreationOption("TILED=YES"))
	if err != nil {
		b.Fatal(err)
	}
	ds.Close()
	b.ReportAllocs()
	for b.Loop() {
		if _, err := DatasetFiles(tif, false); err != nil {
			b.Fatal(err)
		}
	}
}
