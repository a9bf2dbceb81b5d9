package pass

import (
	"fmt"
	"math"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"testing"

	"github.com/airbusgeo/godal"

	"areasweep/extent"
)

// TestNoDataAsGDAL checks the cells decode takes for no data against
// GDAL's own nodata mask (GDALNoDataMaskBand, read through the band's
// mask), on in-memory bands of each float type and an integer type, with
// values at and around the nodata value on both sides of GDAL's tolerance
// (relative 4.77e-7 in float64), one nodata value given as text no
// float32 holds (-9999.99 on a Float32 band), and nodata values so large
// that a cell plus the nodata value overflows (which makes GDAL's test
// hold). Infinite cells are left out: they are no data to areasweep
// whatever the nodata value.
func TestNoDataAsGDAL(t *testing.T) {
	extent.Register()
	for _, tc := range []struct {
		dt     godal.DataType
		nodata float64
	}{
		{godal.Float64, -9999.99}, {godal.Float64, 0.5}, {godal.Float64, -3.4028235e38}, {godal.Float64, 0},
		{godal.Float32, -9999.99}, {godal.Float32, 1e-3}, {godal.Float32, -3.4028234663852886e38}, {godal.Float32, 3e38},
		{godal.Float64, -1.7976931348623157e308},
		{godal.Int32, 20000000},
	} {
		t.Run(fmt.Sprintf("%s %g", tc.dt, tc.nodata), func(t *testing.T) {
			var vals []float64
			for _, r := range []float64{0, 1e-9, 1e-7, 2e-7, 4e-7, 4.7e-7, 4.76e-7, 4.8e-7, 5e-7, 1e-6, 1e-3} {
				vals = append(vals, tc.nodata*(1+r), tc.nodata*(1-r))
			}
			vals = append(vals, float64(float32(tc.nodata)), tc.nodata+1, tc.nodata-1, 0, 1)
			for i, v := range vals { // as the band stores them
				switch tc.dt {
				case godal.Float32:
					vals[i] = float64(float32(v))
				case godal.Int32:
					vals[i] = math.Round(v)
				}
			}
			ds, err := godal.Create(godal.Memory, "", 1, tc.dt, len(vals), 1)
			if err != nil {
				t.Fatal(err)
			}
			defer ds.Close()
			b := ds.Bands()[0]
			if err := b.SetNoData(tc.nodata); err != nil {
				t.Fatal(err)
			}
			if err := b.Write(0, 0, vals, len(vals), 1); err != nil {
				t.Fatal(err)
			}
			mask := make([]byte, len(vals))
			if err := b.MaskBand().Read(0, 0, mask, len(vals), 1); err != nil {
				t.Fatal(err)
			}
			nd, _ := NoData(b)
			r := &Raster{nodata: nd, hasNodata: true, near: newNoDataNear(tc.dt, nd), scale: 1}
			got := append([]float64(nil), vals...)
			r.decode(got)
			for i, v := range vals {
				if math.IsInf(v, 0) {
					continue // no data to areasweep whatever the nodata value
				}
				if gdal, ours := mask[i] == 0, math.IsNaN(got[i]); gdal != ours {
					t.Errorf("cell %.17g (nodata %.17g): GDAL's mask says no data %v, decode %v", v, tc.nodata, gdal, ours)
				}
			}
		})
	}
}

// TestNoDataBeyondFloat32: a Float32 GeoTIFF whose nodata value is 1e40,
// beyond the float32 range, written by GDAL's Python bindings (the
// osgeo.gdal of Debian's python3-gdal), and a VRT over it declaring the
// same 1e40 as text. GDAL holds the GeoTIFF's as +inf and the VRT's as
// 1e+40: messages give each in words (NoDataWords), never as Go's
// "+Inf", and the cells are taken as GDAL's own mask takes them (the
// +inf cells, written as float32(1e40), are no data either way: areasweep
// takes infinite cells for no data), the lowest and highest float32 and
// ordinary values for data.
func TestNoDataBeyondFloat32(t *testing.T) {
	if _, err := os.Stat("/usr/bin/python3"); err != nil {
		t.Skip("/usr/bin/python3 not found")
	}
	dir := t.TempDir()
	tif, vrt := filepath.Join(dir, "nd1e40.tif"), filepath.Join(dir, "nd1e40.vrt")
	script := `import sys
import numpy as np
from osgeo import gdal
gdal.UseExceptions()
tif, vrt = sys.argv[1], sys.argv[2]
d = gdal.GetDriverByName('GTiff').Create(tif, 6, 1, 1, gdal.GDT_Float32)
d.SetGeoTransform([10, 0.1, 0, 45, 0, -0.1])
d.GetRasterBand(1).WriteArray(np.array([[np.float32(1e40), -3.4028235e38, 3.4028235e38, 0.5, 0, -9999]], np.float32))
d.GetRasterBand(1).SetNoDataValue(1e40)
d = None
gdal.Translate(vrt, tif, format='VRT')
s = open(vrt).read().replace('<NoDataValue>inf</NoDataValue>', '<NoDataValue>1e40</NoDataValue>')
assert '1e40' in s
open(vrt, 'w').write(s)
`
	if out, err := exec.Command("/usr/bin/python3", "-c", script, tif, vrt).CombinedOutput(); err != nil {
		if os.Getenv("CI") == "true" {
			t.Fatalf("python3 osgeo: %v: %s", err, out)
		}
		t.Skipf("python3 with osgeo (Debian's python3-gdal) cannot write the GeoTIFF: %v: %s", err, out)
	}
	extent.Register()
	for _, tc := range []struct {
		path, held string
		words      []string
	}{
		{tif, "+Inf", []string{"inf (as GDAL holds it", "beyond the range of the Float32 band", "1e40"}},
		{vrt, "1e+40", []string{"1e+40, beyond the range of the Float32 band"}},
	} {
		t.Run(filepath.Base(tc.path), func(t *testing.T) {
			ds, err := godal.Open(tc.path)
			if err != nil {
				t.Fatal(err)
			}
			defer ds.Close()
			b := ds.Bands()[0]
			nd, ok := NoData(b)
			if !ok || fmt.Sprint(nd) != tc.held {
				t.Fatalf("nodata %v (%v), GDAL holds %s", nd, ok, tc.held)
			}
			words := NoDataWords(b.Structure().DataType, nd)
			for _, w := range tc.words {
				if !strings.Contains(words, w) {
					t.Errorf("nodata in words %q does not say %q", words, w)
				}
			}
			if strings.Contains(words, "Inf") {
				t.Errorf("nodata in words %q prints Go's Inf", words)
			}
			vals := make([]float64, 6)
			if err := b.Read(0, 0, vals, 6, 1); err != nil {
				t.Fatal(err)
			}
			mask := make([]byte, 6)
			if err := b.MaskBand().Read(0, 0, mask, 6, 1); err != nil {
				t.Fatal(err)
			}
			r := &Raster{nodata: nd, hasNodata: true, near: newNoDataNear(godal.Float32, nd), scale: 1, dtype: godal.Float32}
			got := append([]float64(nil), vals...)
			r.decode(got)
			for i, v := range vals {
				noData := math.IsNaN(got[i])
				if math.IsInf(v, 0) {
					if !noData {
						t.Errorf("infinite cell %g taken for data", v)
					}
					continue
				}
				if gdal := mask[i] == 0; gdal != noData {
					t.Errorf("cell %g: GDAL's mask says no data %v, decode %v", v, gdal, noData)
				}
				if noData {
					t.Errorf("finite cell %g taken for no data", v)
				}
			}
		})
	}
}
