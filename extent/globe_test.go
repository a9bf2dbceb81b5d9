package extent

import (
	"strconv"
	"strings"
	"testing"
)

// TestCellOfPoles: on a grid that reaches a pole, a point at that pole is
// in the grid's first or last row; on one that does not, it is outside.
func TestCellOfPoles(t *testing.T) {
	for _, c := range []struct {
		name    string
		gt      [6]float64
		h       int
		lon     float64
		lat     float64
		row     int
		outside bool
	}{
		{"south pole, 1 degree", [6]float64{-180, 1, 0, 90, 0, -1}, 180, 5, -90, 179, false},
		{"south pole, 0.1 degree", [6]float64{-180, 0.1, 0, 90, 0, -0.1}, 1800, 5, -90, 1799, false},
		{"north pole", [6]float64{-180, 1, 0, 90, 0, -1}, 180, 5, 90, 0, false},
		{"south pole off a grid ending at -60", [6]float64{-180, 1, 0, 90, 0, -1}, 150, 5, -90, 0, true},
		{"bottom edge away from the pole", [6]float64{-180, 1, 0, 90, 0, -1}, 150, 5, -60, 0, true},
	} {
		t.Run(c.name, func(t *testing.T) {
			g, err := NewGrid(int(360/c.gt[1]), c.h, c.gt, "EPSG:4326")
			if err != nil {
				t.Fatal(err)
			}
			defer g.Close()
			_, row, ok := g.CellOf(c.lon, c.lat)
			if ok == c.outside || (ok && row != c.row) {
				t.Errorf("CellOf(%g, %g) = row %d, inside %v; want row %d, inside %v", c.lon, c.lat, row, ok, c.row, !c.outside)
			}
		})
	}
}

// TestRegionBuffersOfTheWholeGlobe: a region whose only edges run along
// the antimeridian and the poles (the whole globe) has no boundary to
// measure from, so every region buffer holds exactly the base's cells
// (and is marked its duplicate), with a warning, instead of stopping the
// run.
func TestRegionBuffersOfTheWholeGlobe(t *testing.T) {
	region := writeGeoJSON(t, t.TempDir(), "world.geojson", []string{"w"}, [][][2]float64{
		{{-180, -90}, {180, -90}, {180, 90}, {-180, 90}, {-180, -90}},
	})
	g, v := geoGrid(t, -180, 90, 2, 180, 90)
	f, err := Build(g, v, Spec{Region: region, RegionBuffersKm: []float64{-50, 100}}, nil, nil)
	if err != nil {
		t.Fatal(err)
	}
	base := f.Members[memberIdx(t, f, "base")]
	if base.Cells != int64(g.Cells()) {
		t.Fatalf("the base holds %d of %d cells", base.Cells, g.Cells())
	}
	// A duplicate holds no cells of its own once found; its count and
	// the comparison that found it (cell by cell) are what remain.
	for _, id := range []string{"region_minus50km", "region_100km"} {
		m := f.Members[memberIdx(t, f, id)]
		if m.DuplicateOf != "base" || m.Cells != base.Cells {
			t.Errorf("%s is not a duplicate of the base: %+v", id, m)
		}
	}
	warned := false
	for _, w := range f.Warnings {
		warned = warned || strings.Contains(w, "whole globe")
	}
	if !warned {
		t.Errorf("no warning about the whole globe: %q", f.Warnings)
	}
}

// TestCellOfDecimalEdges: a point written in decimals exactly on a cell
// edge belongs to the cell whose west or north edge it is, as the README
// says, on grids whose cell size has no exact binary form (0.1 and 0.05
// degrees). The expected cells are the decimal positions' whole numbers
// of cells, (x - x0) / dx, computed here with integers (tenths and
// twentieths of a degree), not in floating point. A plain floor of the
// floating-point division put 120 of the 300 column edges of the 0.1
// degree grid into the cell west of the edge.
func TestCellOfDecimalEdges(t *testing.T) {
	for _, c := range []struct {
		name  string
		w, h  int
		gt    [6]float64
		steps int // cells per degree
		x0    int // origin in degrees
		y0    int
	}{
		{"0.1 degree", 300, 240, [6]float64{-150, 0.1, 0, -28, 0, -0.1}, 10, -150, -28},
		{"0.05 degree", 720, 360, [6]float64{-180, 0.05, 0, 90, 0, -0.05}, 20, -180, 90},
	} {
		t.Run(c.name, func(t *testing.T) {
			g, err := NewGrid(c.w, c.h, c.gt, "EPSG:4326")
			if err != nil {
				t.Fatal(err)
			}
			defer g.Close()
			// The point (x0 + k/steps, y0 - k/steps) as a CSV writes it:
			// its decimal text, parsed.
			deg := func(origin, k, sign int) float64 {
				v, err := strconv.ParseFloat(strconv.FormatFloat(float64(origin*c.steps+sign*k)/float64(c.steps), 'f', 2, 64), 64)
				if err != nil {
					t.Fatal(err)
				}
				return v
			}
			wrongCol, wrongRow := 0, 0
			for k := 0; k < c.w; k++ {
				if col, _, ok := g.CellOf(deg(c.x0, k, 1), deg(c.y0, 0, -1)); !ok || col != k {
					wrongCol++
				}
			}
			for k := 0; k < c.h; k++ {
				if _, row, ok := g.CellOf(deg(c.x0, 0, 1), deg(c.y0, k, -1)); !ok || row != k {
					wrongRow++
				}
			}
			if wrongCol > 0 || wrongRow > 0 {
				t.Errorf("%d points on a column edge and %d on a row edge went to the neighbouring cell", wrongCol, wrongRow)
			}
			// The outer east and south edges are outside.
			if _, _, ok := g.CellOf(deg(c.x0, c.w, 1), deg(c.y0, 0, -1)); ok {
				t.Error("a point on the east edge is inside the grid")
			}
			if c.y0-c.h/c.steps > -90 {
				if _, _, ok := g.CellOf(deg(c.x0, 0, 1), deg(c.y0, c.h, -1)); ok {
					t.Error("a point on the south edge is inside the grid")
				}
			}
		})
	}
}
