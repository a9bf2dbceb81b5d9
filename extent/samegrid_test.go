package extent

import (
	"math"
	"testing"
)

// TestSameGridDigitsOfAHeader: a model written as an ESRI ASCII grid is on
// the grid of the GeoTIFF it was made from while its header's rounded
// numbers put no cell more than SameGridTolerance (0.01) of a cell from
// the GeoTIFF's, and another grid past that. The geotransforms of the
// ASCII grids are those GDAL 3.6 reports for their headers:
//   - gdal_translate -of AAIGrid (12 decimals) of a 2.5 arcminute grid of
//     300 x 1000 cells: its top edge, yllcorner + nrows x cellsize, lies
//     3.3e-10 degrees (8e-9 of a cell) from the GeoTIFF's;
//   - headers with 6 decimals (xllcorner -10.000000, yllcorner 46.666667
//     or 49.166667, cellsize 0.008333) of 30 arcsecond grids from 10 W,
//     50 N: the cells drift by 1/120 - 0.008333 = 3.33e-7 degree
//     (4.0e-5 of a cell) a cell, so that the far corner of a 200 x 100
//     grid lies 200 x 4.0e-5 = 0.008 of a cell off (one grid) and that of
//     a 600 x 400 grid 0.024 (another grid), by hand.
//
// Grids apart by half a cell or a fiftieth of one stay refused.
func TestSameGridDigitsOfAHeader(t *testing.T) {
	tif := [6]float64{20.291666666666668, 0.041666666666666664, 0, -40.208333333333336, 0, -0.041666666666666664}
	asc := [6]float64{20.291666666667, 0.041666666667, 0, -40.208333333, 0, -0.041666666667}
	half := tif
	half[0] += tif[1] / 2
	tiny := tif
	tiny[3] += 1e-4 * tif[1]
	fiftieth := tif
	fiftieth[3] += 0.02 * tif[1]
	sixDigits := tif // cellsize written 0.041667: the cells drift 0.008 of a cell over 1000 rows
	sixDigits[1], sixDigits[5] = 0.041667, -0.041667
	arcsec := [6]float64{-10, 1.0 / 120, 0, 50, 0, -1.0 / 120}
	cases := []struct {
		name  string
		w, h  int
		a, b  [6]float64
		same  bool
		shift float64 // by hand, 0 when not checked
	}{
		{"GeoTIFF and GDAL's ASCII grid of it", 300, 1000, tif, asc, true, 0},
		{"half a cell east", 300, 1000, tif, half, false, 0.5},
		{"a ten-thousandth of a cell north", 300, 1000, tif, tiny, true, 1e-4},
		{"a fiftieth of a cell north", 300, 1000, tif, fiftieth, false, 0.02},
		{"cell size 0.041667 over 1000 rows", 300, 1000, tif, sixDigits, true, 1000 * (0.041667 - 1.0/24) * 24},
		{"6-decimal header of a 200 x 100 grid of 30 arcseconds", 200, 100, arcsec, [6]float64{-10, 0.008333, 0, 49.999967, 0, -0.008333}, true, 200 * (1.0/120 - 0.008333) * 120},
		{"6-decimal header of a 600 x 400 grid of 30 arcseconds", 600, 400, arcsec, [6]float64{-10, 0.008333, 0, 49.999866999999995, 0, -0.008333}, false, 600 * (1.0/120 - 0.008333) * 120},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			a, err := NewGrid(c.w, c.h, c.a, "EPSG:4326")
			if err != nil {
				t.Fatal(err)
			}
			defer a.Close()
			b, err := NewGrid(c.w, c.h, c.b, "EPSG:4326")
			if err != nil {
				t.Fatal(err)
			}
			defer b.Close()
			if d := a.SameAs(b); (d == "") != c.same {
				t.Errorf("SameAs = %q, want same = %v", d, c.same)
			}
			if s := a.GridShift(b); c.shift > 0 && math.Abs(s-c.shift) > 1e-6 {
				t.Errorf("GridShift = %g, by hand %g", s, c.shift)
			}
		})
	}
}
