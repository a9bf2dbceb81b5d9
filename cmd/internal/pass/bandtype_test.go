package pass

import (
	"path/filepath"
	"strings"
	"testing"

	"github.com/airbusgeo/godal"
)

// TestBandTypes: a model of 64-bit integers (GDAL 3.5's UInt64 and
// Int64, numbers 12 and 13 of GDALDataType) is refused by Open with the
// conversion to make; the GDAL binding knows no size for them and
// stopped the run with an internal error (exit 3, found by helper hB).
// Every real type areasweep reads opens.
func TestBandTypes(t *testing.T) {
	for _, tc := range []struct {
		typ  godal.DataType
		want string // "" when it opens
	}{
		{godal.Byte, ""},
		{godal.UInt16, ""},
		{godal.Int16, ""},
		{godal.UInt32, ""},
		{godal.Int32, ""},
		{godal.Float32, ""},
		{godal.Float64, ""},
		{godal.DataType(12), "holds values of type UInt64, which areasweep does not read"},
		{godal.DataType(13), "holds values of type Int64, which areasweep does not read"},
	} {
		path := filepath.Join(t.TempDir(), "m.tif")
		ds, b := createGridRaster(t, path, 3, 2, tc.typ)
		if err := b.Write(0, 0, []float64{1, 2, 3, 4, 5, 6}, 3, 2); err != nil {
			t.Fatal(err)
		}
		if err := ds.Close(); err != nil {
			t.Fatal(err)
		}
		r, err := Open(path)
		switch {
		case tc.want == "" && err != nil:
			t.Errorf("%s: %v", tc.typ, err)
		case tc.want != "" && (err == nil || !strings.Contains(err.Error(), tc.want) || !strings.Contains(err.Error(), "gdal_translate -ot Float64")):
			t.Errorf("type %d: %v, want %q", tc.typ, err, tc.want)
		}
		if err == nil {
			r.Close()
		}
	}
}
