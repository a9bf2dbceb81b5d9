package extent

import (
	"math"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"testing"
)

// equalAreaCell is one line of testdata/geodesy/equal_area_cells.txt: a
// grid, one of its cells and that cell's true WGS84 area, computed
// independently with pyproj (Geod.polygon_area_perimeter of the outline
// densified 4096 points per side after pyproj's inverse projection;
// equal_area_cells.py beside it, rerun by CI), with its planar area.
type equalAreaCell struct {
	crs          string
	gt           [6]float64
	w, h, c, r   int
	want, planar float64 // km2
}

// equalAreaCellSet is the golden file's cases by name.
type equalAreaCellSet map[string]equalAreaCell

// grid returns the case called name and its grid.
func (cells equalAreaCellSet) grid(t *testing.T, name string) (equalAreaCell, *Grid) {
	t.Helper()
	tc, ok := cells[name]
	if !ok {
		t.Fatalf("no golden case %q", name)
	}
	g, err := NewGrid(tc.w, tc.h, tc.gt, tc.crs)
	if err != nil {
		t.Fatal(err)
	}
	return tc, g
}

// equalAreaCells reads the golden file, by case name.
func equalAreaCells(t *testing.T) equalAreaCellSet {
	t.Helper()
	return readCellGolden(t, "equal_area_cells.txt")
}

// readCellGolden reads a golden file of testdata/geodesy in the format of
// equal_area_cells.txt, by case name.
func readCellGolden(t *testing.T, file string) equalAreaCellSet {
	t.Helper()
	b, err := os.ReadFile(filepath.Join("..", "testdata", "geodesy", file))
	if err != nil {
		t.Fatal(err)
	}
	cells := equalAreaCellSet{}
	for _, line := range strings.Split(strings.TrimSpace(string(b)), "\n") {
		if strings.HasPrefix(line, "#") {
			continue
		}
		f := strings.Split(line, " | ")
		if len(f) != 6 {
			t.Fatalf("%s: bad line %q", file, line)
		}
		var c equalAreaCell
		c.crs = f[1]
		nums := func(s string) []float64 {
			var v []float64
			for _, x := range strings.Fields(s) {
				n, err := strconv.ParseFloat(x, 64)
				if err != nil {
					t.Fatalf("%s: %q: %v", file, line, err)
				}
				v = append(v, n)
			}
			return v
		}
		copy(c.gt[:], nums(f[2]))
		whcr := nums(f[3])
		c.w, c.h, c.c, c.r = int(whcr[0]), int(whcr[1]), int(whcr[2]), int(whcr[3])
		c.want, c.planar = nums(f[4])[0], nums(f[5])[0]
		cells[f[0]] = c
	}
	return cells
}

// TestEqualAreaUnits checks the cell area of equal-area grids whose CRS
// is not in metres: before the fix the planar area was taken in the CRS's
// unit squared as if it were square metres, so a Lambert azimuthal grid in
// kilometres reported 5 km cells as 2.5e-5 km2 and an Albers grid in US
// survey feet reported 10,000 ft cells as 100 km2 (10.76 times their
// area). The expected areas are the cells' true WGS84 areas from pyproj
// (equalAreaCells), to 1e-8 relative (our tolerance).
func TestEqualAreaUnits(t *testing.T) {
	cells := equalAreaCells(t)
	for _, name := range []string{"metres", "kilometres", "US survey feet"} {
		t.Run(name, func(t *testing.T) {
			tc, g := cells.grid(t, name)
			defer g.Close()
			if !g.EqualArea {
				t.Fatalf("grid not taken as equal-area (%s)", g.AreaMethod)
			}
			got := g.RowAreas(tc.r, nil)[tc.c]
			if math.Abs(got/tc.want-1) > 1e-8 {
				t.Errorf("cell area %.12g km2, want %.12g (true WGS84 area)", got, tc.want)
			}
		})
	}
}

// TestSphereEqualArea checks the cell area of equal-area grids whose
// projection PROJ computes on a sphere while their latitudes are read as
// WGS84's (Mollweide and Eckert IV on the WGS84 datum, Mollweide on a
// sphere): before the fix their planar area was taken as the true area,
// 0.67% too large at the equator and 0.67% too small near the poles, which
// moved the AUC of a study at 50-60 degrees north by 2e-5. On a sphere
// (MODIS's sinusoidal grid, a Lambert azimuthal grid with +R) the
// projections PROJ also computes on an ellipsoid are equal-area on the
// sphere only and are scaled the same way (row by row, or block by block
// for the azimuthal one), while on WGS84 they keep their planar area. A
// global Mollweide grid whose corners lie outside the map must still open
// (its top-row cell spans about 80 to 84 degrees north), and an
// ellipsoidal equal-area grid (EPSG:3035, Equal Earth EPSG:8857, whose
// method GDAL names "Equal Earth", with no WKT1 name) keeps its exact
// planar area. The expected areas are the cells' true WGS84 areas from
// pyproj (equalAreaCells), to 1e-8 relative (our tolerance).
func TestSphereEqualArea(t *testing.T) {
	cells := equalAreaCells(t)
	for _, name := range []string{"Mollweide WGS84", "Eckert IV WGS84", "Mollweide sphere", "global Mollweide equator",
		"global Mollweide top row", "EPSG:3035 stays planar", "Equal Earth planar", "sinusoidal on a sphere (MODIS)",
		"sinusoidal on WGS84 stays planar", "Lambert azimuthal on a sphere"} {
		t.Run(name, func(t *testing.T) {
			tc, g := cells.grid(t, name)
			defer g.Close()
			// An azimuthal equal-area grid on a sphere: its ratio to the
			// WGS84 area varies along rows too, so it takes block ratios
			// (and is not taken as equal-area).
			azimuthal := strings.Contains(tc.crs, "laea")
			if g.EqualArea == azimuthal {
				t.Fatalf("grid taken as equal-area: %v (%s)", g.EqualArea, g.AreaMethod)
			}
			row := g.RowAreas(tc.r, nil)
			if got := row[tc.c]; math.Abs(got/tc.want-1) > 1e-8 {
				t.Errorf("cell area %.12g km2, want %.12g (true WGS84 area; planar %g)", got, tc.want, tc.planar)
			}
			// Whole cells of one row have one area (the cells a world
			// map's outline cuts at a row's ends have less: TestMapEdgeCells).
			if mid := g.Width / 2; !azimuthal && row[mid] != row[tc.c] {
				t.Errorf("cells of one row differ in area: %.12g and %.12g", row[mid], row[tc.c])
			}
			if math.Abs(tc.want-tc.planar) < 1e-6 && row[tc.c] != tc.planar {
				t.Errorf("ellipsoidal equal-area cell %.15g km2, want its planar area %g exactly", row[tc.c], tc.planar)
			}
		})
	}
}

// TestGridUnit: the unit a projected grid's CRS names for its coordinates
// and its length in metres, recorded for the maps' axes. The lengths are
// the EPSG registry's definitions (recalled from memory): the metre, the
// kilometre (1000 m) and the US survey foot (1200/3937 m, EPSG:9003).
func TestGridUnit(t *testing.T) {
	gt := [6]float64{4e6, 1000, 0, 3e6, 0, -1000}
	for _, tc := range []struct {
		crs   string
		gt    [6]float64
		unit  string
		unitM float64
	}{
		{"EPSG:3035", gt, "metre", 1},
		{"+proj=laea +lat_0=52 +lon_0=10 +x_0=4321000 +y_0=3210000 +ellps=GRS80 +units=km +no_defs", [6]float64{4000, 1, 0, 3000, 0, -1}, "kilometre", 1000},
		{"EPSG:2227", [6]float64{6e6, 1000, 0, 2e6, 0, -1000}, "US survey foot", 1200.0 / 3937},
		{"EPSG:4326", [6]float64{0, 0.1, 0, 10, 0, -0.1}, "", 0},
	} {
		g, err := NewGrid(10, 10, tc.gt, tc.crs)
		if err != nil {
			t.Fatalf("%s: %v", tc.crs, err)
		}
		if g.Unit != tc.unit || math.Abs(g.UnitM-tc.unitM) > 1e-15 {
			t.Errorf("%s: unit %q, %.17g m; want %q, %.17g m", tc.crs, g.Unit, g.UnitM, tc.unit, tc.unitM)
		}
		g.Close()
	}
}
