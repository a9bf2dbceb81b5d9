package extent

import (
	"path/filepath"
	"strings"
	"testing"
)

// TestWorldRegionOnProjectedGrid: a latitude-longitude polygon round the
// whole globe (-180 to 180, -90 to 90) given for a raster in Europe's
// equal-area CRS (EPSG:3035) has no outline there: projected, its edges
// (the antimeridian and the poles) made a sliver, and the run refused the
// region as "smaller or thinner than the cells". It is refused as what it
// is; a region around the raster, and one round the South Pole on a polar
// grid (below), are read.
func TestWorldRegionOnProjectedGrid(t *testing.T) {
	dir := t.TempDir()
	// 1000 x 1000 km around LAEA Europe's centre (10E 52N).
	g, err := NewGrid(100, 100, [6]float64{3821000, 10000, 0, 3710000, 0, -10000}, "EPSG:3035")
	if err != nil {
		t.Fatal(err)
	}
	defer g.Close()
	world := filepath.Join(dir, "world.gpkg")
	writePolygonGPKG(t, world, 4326, [][2]float64{{-180, -90}, {180, -90}, {180, 90}, {-180, 90}, {-180, -90}})
	if _, _, err := ReadShape(world, g); err == nil || !strings.Contains(err.Error(), "covers the raster's centre cell in its own CRS but not once projected") {
		t.Errorf("world region: %v", err)
	}
	europe := filepath.Join(dir, "europe.gpkg")
	writePolygonGPKG(t, europe, 4326, [][2]float64{{-10, 35}, {30, 35}, {30, 70}, {-10, 70}, {-10, 35}})
	if _, _, err := ReadShape(europe, g); err != nil {
		t.Errorf("Europe: %v", err)
	}

	// South polar stereographic, 2000 km round the pole: a polygon from
	// -180 to 180 and -90 to -72 is the cap round the pole there.
	polar, err := NewGrid(200, 200, [6]float64{-2000000, 20000, 0, 2000000, 0, -20000}, "EPSG:3031")
	if err != nil {
		t.Fatal(err)
	}
	defer polar.Close()
	cap := filepath.Join(dir, "cap.gpkg")
	writePolygonGPKG(t, cap, 4326, [][2]float64{{-180, -90}, {180, -90}, {180, -72}, {-180, -72}, {-180, -90}})
	if _, _, err := ReadShape(cap, polar); err != nil {
		t.Errorf("polar cap: %v", err)
	}
}
