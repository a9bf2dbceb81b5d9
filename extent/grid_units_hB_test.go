package extent

import (
	"math"
	"strings"
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

// TestSphereEqualAreaHB checks the cell area of equal-area grids whose
// projection PROJ computes on a sphere while their latitudes are read as
// WGS84's (Mollweide and Eckert IV on the WGS84 datum, Mollweide on a
// sphere): before the fix their planar area was taken as the true area,
// 0.67% too large at the equator and 0.67% too small near the poles, which
// moved the AUC of a study at 50-60 degrees north by 2e-5. On a sphere
// (MODIS's sinusoidal grid, a Lambert azimuthal grid with +R) the
// projections PROJ also computes on an ellipsoid are equal-area on the
// sphere only and are scaled the same way (row by row, or block by block
// for the azimuthal one), while on WGS84 they keep their planar area. A global
// Mollweide grid whose corners lie outside the map must still open (its
// top-row cell spans about 80 to 84 degrees north), and an
// ellipsoidal equal-area grid (EPSG:3035, Equal Earth EPSG:8857) keeps its
// exact planar area. The
// expected areas are the cells' true WGS84 areas computed independently
// with pyproj (Geod.polygon_area_perimeter of the outline densified 4096
// points per side after pyproj's inverse projection;
// testdata/geodesy/sphere_equal_area.py, converged to about 4e-8 between
// 1024 and 4096 points on the top-row cell, 1e-10 on the others).
func TestSphereEqualAreaHB(t *testing.T) {
	regional := [6]float64{1000000, 10000, 0, 6000000, 0, -10000}
	global := [6]float64{-18100000, 100000, 0, 9100000, 0, -100000}
	for _, tc := range []struct {
		name         string
		crs          string
		gt           [6]float64
		w, h, c, r   int
		want, planar float64 // km2
	}{
		{"Mollweide WGS84", "ESRI:54009", regional, 10, 10, 3, 2, 100.138051775, 100},
		{"Eckert IV WGS84", "ESRI:54012", regional, 10, 10, 3, 2, 100.093356226, 100},
		{"Mollweide sphere", "+proj=moll +R=6371007 +no_defs +type=crs", regional, 10, 10, 3, 2, 100.363794944, 100},
		{"global Mollweide equator", "ESRI:54009", global, 362, 182, 181, 91, 9933.06503284, 10000},
		{"global Mollweide top row", "ESRI:54009", global, 362, 182, 181, 1, 10067.1579644, 10000},
		{"EPSG:3035 stays planar", "EPSG:3035", [6]float64{4000000, 5000, 0, 3200000, 0, -5000}, 10, 10, 3, 2, 25.0000000068, 25},
		// GDAL names Equal Earth's method "Equal Earth" (it has no WKT1
		// name): taken as equal-area, with its exact planar area.
		{"Equal Earth planar", "EPSG:8857", regional, 10, 10, 3, 2, 100.000000032, 100},
		// MODIS's sinusoidal grid is on a sphere of 6371007.181 m, whose
		// latitudes are read as WGS84's; a sinusoidal grid on WGS84 is
		// equal-area on the ellipsoid and keeps its planar area.
		{"sinusoidal on a sphere (MODIS)", "+proj=sinu +lon_0=0 +x_0=0 +y_0=0 +R=6371007.181 +units=m +no_defs +type=crs", regional, 10, 10, 3, 2, 100.425201989, 100},
		{"sinusoidal on WGS84 stays planar", "ESRI:54008", regional, 10, 10, 3, 2, 99.9999999999, 100},
		// An azimuthal equal-area grid on a sphere: its ratio to the
		// WGS84 area varies along rows too, so it takes block ratios.
		{"Lambert azimuthal on a sphere", "+proj=laea +lat_0=45 +lon_0=10 +R=6371007 +units=m +no_defs +type=crs", [6]float64{-250000, 5000, 0, 200000, 0, -5000}, 10, 10, 3, 2, 25.0653764497, 25},
	} {
		t.Run(tc.name, func(t *testing.T) {
			g, err := NewGrid(tc.w, tc.h, tc.gt, tc.crs)
			if err != nil {
				t.Fatal(err)
			}
			defer g.Close()
			azimuthal := strings.Contains(tc.crs, "laea")
			if g.EqualArea == azimuthal {
				t.Fatalf("grid taken as equal-area: %v (%s)", g.EqualArea, g.AreaMethod)
			}
			row := g.RowAreas(tc.r, nil)
			if got := row[tc.c]; math.Abs(got/tc.want-1) > 1e-8 {
				t.Errorf("cell area %.12g km2, want %.12g (true WGS84 area; planar %g)", got, tc.want, tc.planar)
			}
			if !azimuthal && row[0] != row[tc.c] {
				t.Errorf("cells of one row differ in area: %.12g and %.12g", row[0], row[tc.c])
			}
			if math.Abs(tc.want-tc.planar) < 1e-6 && row[tc.c] != tc.planar {
				t.Errorf("ellipsoidal equal-area cell %.15g km2, want its planar area %g exactly", row[tc.c], tc.planar)
			}
		})
	}
}
