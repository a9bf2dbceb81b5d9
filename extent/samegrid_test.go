package extent

import "testing"

// TestSameGridDigitsOfAHeader: a model written as an ESRI ASCII grid by
// GDAL (gdal_translate -of AAIGrid, which writes the header's numbers
// with 12 decimals) is on the grid of the GeoTIFF it was made from. The
// geotransforms are those GDAL 3.6 reports for such a pair, a 2.5
// arcminute grid of 300 x 1000 cells: the ASCII grid's top edge, which
// GDAL computes as yllcorner + nrows x cellsize, lies 3.3e-10 degrees
// (8e-9 of a cell) from the GeoTIFF's, and was refused as another grid.
// Grids apart by half a cell or a ten-thousandth of one stay refused.
func TestSameGridDigitsOfAHeader(t *testing.T) {
	tif := [6]float64{20.291666666666668, 0.041666666666666664, 0, -40.208333333333336, 0, -0.041666666666666664}
	asc := [6]float64{20.291666666667, 0.041666666667, 0, -40.208333333, 0, -0.041666666667}
	half := tif
	half[0] += tif[1] / 2
	tiny := tif
	tiny[3] += 1e-4 * tif[1]
	sixDigits := tif // cellsize written 0.041667: the cells drift 0.0024 of a cell over 300 columns
	sixDigits[1], sixDigits[5] = 0.041667, -0.041667
	cases := []struct {
		name string
		b    [6]float64
		same bool
	}{
		{"GeoTIFF and GDAL's ASCII grid of it", asc, true},
		{"half a cell east", half, false},
		{"a ten-thousandth of a cell north", tiny, false},
		{"cell size in 6 decimals", sixDigits, false},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			a, err := NewGrid(300, 1000, tif, "EPSG:4326")
			if err != nil {
				t.Fatal(err)
			}
			defer a.Close()
			b, err := NewGrid(300, 1000, c.b, "EPSG:4326")
			if err != nil {
				t.Fatal(err)
			}
			defer b.Close()
			if d := a.SameAs(b); (d == "") != c.same {
				t.Errorf("SameAs = %q, want same = %v", d, c.same)
			}
		})
	}
}
