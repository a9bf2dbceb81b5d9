package extent

import (
	"path/filepath"
	"strings"
	"testing"
)

// TestAntipodeRegionOnProjectedGrid: a latitude-longitude polygon around
// the point opposite LAEA Europe's centre (10E 52N, so 170W 52S; from
// memory: the antipode of (lon, lat) is (lon-180, -lat)) turns inside out
// projected to EPSG:3035: read as a region, an extra layer or an
// ecoregion unit, it covered every cell of a raster in Europe. It is
// refused, naming the unit; a polygon in Australia, far from the raster
// but not around that point, is still read (and covers no cell).
func TestAntipodeRegionOnProjectedGrid(t *testing.T) {
	dir := t.TempDir()
	g := europeGrid(t)
	anti := filepath.Join(dir, "anti.gpkg")
	writePolygonGPKG(t, anti, 4326, [][2]float64{{-175, -55}, {-165, -55}, {-165, -45}, {-175, -45}, {-175, -55}})
	if _, _, err := ReadShape(anti, g); err == nil || !strings.Contains(err.Error(), "lies away from the raster's centre cell in its own CRS but holds it once projected") {
		t.Errorf("polygon around the antipode: %v", err)
	}
	aus := filepath.Join(dir, "aus.gpkg")
	writePolygonGPKG(t, aus, 4326, [][2]float64{{120, -30}, {150, -30}, {150, -15}, {120, -15}, {120, -30}})
	s, _, err := ReadShape(aus, g)
	if err != nil {
		t.Fatalf("Australia: %v", err)
	}
	n := 0
	Fill(g, s.Grid, func(row, c0, c1 int) { n += c1 - c0 })
	if n != 0 {
		t.Errorf("Australia covers %d cells of a raster in Europe, want 0", n)
	}
}

// TestAntipodeUnitLeftOut: in a layer of units (ecoregions, read with an
// id field) a unit around the point opposite the raster's projection
// centre is left out with a warning naming it, not refused: a world layer
// of units on a regional grid holds such units as a matter of course (an
// Antarctic unit on a north polar grid). The other units are read as
// before.
func TestAntipodeUnitLeftOut(t *testing.T) {
	dir := t.TempDir()
	g := europeGrid(t)
	path := writeGeoJSON(t, dir, "units.geojson", []string{"far", "europe"}, [][][2]float64{
		{{-175, -55}, {-165, -55}, {-165, -45}, {-175, -45}, {-175, -55}},
		{{5, 48}, {15, 48}, {15, 56}, {5, 56}, {5, 48}},
	})
	units, warns, err := ReadUnits(path, "id", g)
	if err != nil {
		t.Fatal(err)
	}
	if len(units) != 1 || units[0].ID != "europe" {
		t.Fatalf("units %v, want europe only", units)
	}
	if len(warns) != 1 || !strings.Contains(warns[0], `unit "far" lies on the far side of the globe from the raster`) || !strings.Contains(warns[0], "it is left out") {
		t.Errorf("warnings %q", warns)
	}
	n := 0
	Fill(g, units[0].Shape.Grid, func(row, c0, c1 int) { n += c1 - c0 })
	if n == 0 || n == 100*100 {
		t.Errorf("europe covers %d of the raster's 10000 cells: want some, not all", n)
	}
}

// europeGrid is a 100 x 100 grid of 10 km cells in EPSG:3035 (LAEA
// Europe) around the projection's centre, 10E 52N.
func europeGrid(t *testing.T) *Grid {
	t.Helper()
	g, err := NewGrid(100, 100, [6]float64{3821000, 10000, 0, 3710000, 0, -10000}, "EPSG:3035")
	if err != nil {
		t.Fatal(err)
	}
	t.Cleanup(g.Close)
	return g
}
