package pass

import (
	"math"
	"path/filepath"
	"testing"

	"github.com/airbusgeo/godal"
)

// TestSignedByte checks that a GeoTIFF whose Byte band declares its
// bytes signed (PIXELTYPE=SIGNEDBYTE, TIFF SampleFormat 2, as GDAL before
// 3.7 writes and opens an Int8 raster) is scored on its signed values with
// its nodata value -128: GDAL 3.6 hands over the bytes as 0..255 and its
// own mask never matches -128, so before the fix -100 was read as 156 and
// the nodata cells were scored as 128. The expected values are the bytes'
// two's-complement reading, as numpy gives it:
// np.array([156, 0, 100, 128, 255, 127, 1], np.uint8).view(np.int8)
// = [-100, 0, 100, -128, -1, 127, 1], with -128 (the nodata value) no data.
// A plain Byte band with the same bytes keeps 0..255.
func TestSignedByte(t *testing.T) {
	stored := []float64{156, 0, 100, 128, 255, 127, 1}
	nan := math.NaN()
	for _, tc := range []struct {
		name string
		opts []string
		want []float64
	}{
		{"signed byte", []string{"PIXELTYPE=SIGNEDBYTE"}, []float64{-100, 0, 100, nan, -1, 127, 1}},
		{"plain byte", nil, []float64{156, 0, 100, 128, 255, 127, 1}},
	} {
		t.Run(tc.name, func(t *testing.T) {
			path := filepath.Join(t.TempDir(), "m.tif")
			ds, b := createGridRaster(t, path, len(stored), 1, godal.Byte, tc.opts...)
			if err := b.SetNoData(-128); err != nil {
				t.Fatal(err)
			}
			if err := b.Write(0, 0, stored, len(stored), 1); err != nil {
				t.Fatal(err)
			}
			if err := ds.Close(); err != nil {
				t.Fatal(err)
			}
			g, r := openPath(t, path)
			defer r.Close()
			cells := make([]int, len(stored))
			for i := range cells {
				cells[i] = i
			}
			vals, ok, err := r.Sample(g, cells)
			if err != nil {
				t.Fatal(err)
			}
			for i, w := range tc.want {
				if math.IsNaN(w) {
					if ok[i] {
						t.Errorf("byte %g: read %g, want no data", stored[i], vals[i])
					}
					continue
				}
				if !ok[i] || vals[i] != w {
					t.Errorf("byte %g: read %g (valid %v), want %g", stored[i], vals[i], ok[i], w)
				}
			}
		})
	}
}
