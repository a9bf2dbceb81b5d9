package extent

import (
	"strings"
	"testing"
)

// TestEmptyMemberWarnings: the warning for an empty member says what its
// emptiness means for its kind. Before, each said only "covers no valid
// cell": a region shrunk by more than half its width, a layer off the
// raster and point buffers narrower than a cell read alike. The 2° square
// (about 222 km wide, 1° about 111 km from memory) shrunk by 500 km; an
// extra square at 50°, off the 4° grid; discs of 1 m around points between
// cell centres 0.1° apart.
func TestEmptyMemberWarnings(t *testing.T) {
	dir := t.TempDir()
	f := sameAndOffFamily(t, dir)
	region := writeGeoJSON(t, dir, "r2.geojson", []string{"r"}, [][][2]float64{{{1, 1}, {3, 1}, {3, 3}, {1, 3}, {1, 1}}})
	g, v := geoGrid(t, 0, 4, 0.1, 40, 40)
	f2, err := Build(g, v, Spec{Region: region, RegionBuffersKm: []float64{-500}, Train: []LonLat{{Lon: 2.0, Lat: 2.0}}, PointBuffersKm: []float64{0.001}}, nil, nil)
	if err != nil {
		t.Fatal(err)
	}
	warnings := strings.Join(append(f.Warnings, f2.Warnings...), "\n")
	cases := []struct{ id, words string }{
		{"region_minus500km", "extent region_minus500km covers no valid cell: no cell with data in the base region lies more than 500 km inside its edge (the region is nowhere wider than about 1000 km"},
		{"user_off", "extent user_off covers no valid cell: its polygons hold no centre of a cell with data (they lie off the raster, in another area or CRS"},
		{"points_0.001km", "extent points_0.001km covers no valid cell: no centre of a cell with data lies within 0.001 km of a point"},
	}
	for _, c := range cases {
		t.Run(c.id, func(t *testing.T) {
			if !strings.Contains(warnings, c.words) {
				t.Errorf("no warning %q in:\n%s", c.words, warnings)
			}
		})
	}
}
