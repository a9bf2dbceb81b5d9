package extent

import (
	"math"
	"testing"
)

// TestEqualAreaUnitsHB checks the cell area of equal-area grids whose CRS
// is not in metres: before the fix the planar area was taken in the CRS's
// unit squared as if it were square metres, so a Lambert azimuthal grid in
// kilometres reported 5 km cells as 2.5e-5 km2 and an Albers grid in US
// survey feet reported 10,000 ft cells as 100 km2 (10.76 times their
// area). The expected areas are the cells' true WGS84 areas computed
// independently with pyproj (Geod.polygon_area_perimeter of the outline
// densified 64 points per side after pyproj's inverse projection;
// testdata/geodesy/equal_area_units.py).
func TestEqualAreaUnitsHB(t *testing.T) {
	for _, tc := range []struct {
		name string
		crs  string
		gt   [6]float64
		want float64 // km2 of cell (col 3, row 2)
	}{
		{"metres", "+proj=laea +lat_0=52 +lon_0=10 +x_0=4321000 +y_0=3210000 +ellps=GRS80 +units=m +no_defs +type=crs",
			[6]float64{4000000, 5000, 0, 3200000, 0, -5000}, 25.0000000072},
		{"kilometres", "+proj=laea +lat_0=52 +lon_0=10 +x_0=4321000 +y_0=3210000 +ellps=GRS80 +units=km +no_defs +type=crs",
			[6]float64{4000, 5, 0, 3200, 0, -5}, 25.0000000072},
		{"US survey feet", "+proj=aea +lat_0=23 +lon_0=-96 +lat_1=29.5 +lat_2=45.5 +x_0=0 +y_0=0 +datum=NAD83 +units=us-ft +no_defs +type=crs",
			[6]float64{-500000, 10000, 0, 1500000, 0, -10000}, 9.29034116158},
	} {
		t.Run(tc.name, func(t *testing.T) {
			g, err := NewGrid(10, 10, tc.gt, tc.crs)
			if err != nil {
				t.Fatal(err)
			}
			defer g.Close()
			if !g.EqualArea {
				t.Fatalf("grid not taken as equal-area (%s)", g.AreaMethod)
			}
			got := g.RowAreas(2, nil)[3]
			if math.Abs(got/tc.want-1) > 1e-8 {
				t.Errorf("cell area %.12g km2, want %.12g (true WGS84 area)", got, tc.want)
			}
		})
	}
}
