package extent

import (
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
