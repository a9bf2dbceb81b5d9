package pass

import (
	"fmt"
	"math"
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
