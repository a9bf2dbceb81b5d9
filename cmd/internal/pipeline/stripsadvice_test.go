package pipeline

import (
	"path/filepath"
	"strings"
	"testing"

	"github.com/airbusgeo/godal"

	"areasweep/cmd/internal/settings"
	"areasweep/extent"
)

// TestStripsAdvice: a batch study too large for its budget names, as a
// run refused for memory does, the model stored in strips of the whole
// width and the tiled copy that avoids holding them. A one-strip Float32
// raster of 2100 x 2000 cells (4.2 million, above pass.MaxReadCells) read
// by 1 worker holds, worked by hand from pass.Raster.ReadBytes' parts: a
// window of 4194304 / 2100 = 1997 rows as float64 (2100 x 1997 x 8 =
// 33,549,600 bytes), the strip cached (2100 x 2000 x 4 = 16,800,000) and
// its compressed bytes (taken as large, 16,800,000): 67,149,600 bytes,
// "64 MiB". Its tiled copy gets no advice.
func TestStripsAdvice(t *testing.T) {
	extent.Register()
	dir := t.TempDir()
	write := func(name string, opts ...string) string {
		p := filepath.Join(dir, name)
		ds, err := godal.Create(godal.GTiff, p, 1, godal.Float32, 2100, 2000, godal.CreationOption(opts...))
		if err != nil {
			t.Fatal(err)
		}
		ds.SetGeoTransform([6]float64{0, 0.01, 0, 20, 0, -0.01})
		sr, _ := godal.NewSpatialRefFromEPSG(4326)
		ds.SetSpatialRef(sr)
		if err := ds.Close(); err != nil {
			t.Fatal(err)
		}
		return p
	}
	strip := write("strip.tif", "BLOCKYSIZE=2000", "COMPRESS=DEFLATE")
	tiled := write("tiled.tif", "TILED=YES", "COMPRESS=DEFLATE")
	got := StripsAdvice(Options{Values: settings.Values{Models: []string{"a=" + tiled, "b=" + strip}, Workers: 1}})
	for _, w := range []string{"reading " + strip + ", stored in strips of the whole width", "holds 64 MiB", "gdal_translate -co TILED=YES -co COMPRESS=DEFLATE " + strip + " TILED.tif"} {
		if !strings.Contains(got, w) {
			t.Errorf("advice %q lacks %q", got, w)
		}
	}
	if got := StripsAdvice(Options{Values: settings.Values{Models: []string{"a=" + tiled}, Workers: 1}}); got != "" {
		t.Errorf("a tiled model got advice %q", got)
	}
}
