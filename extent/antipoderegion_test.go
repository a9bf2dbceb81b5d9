package extent

import (
	"fmt"
	"path/filepath"
	"strings"
	"testing"

	"github.com/airbusgeo/godal"
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

// TestPolarSquareAroundPole: a square drawn in a polar stereographic CRS
// (EPSG:3995 and EPSG:3413, one centred on the pole and one off it) round
// the north pole, on a world grid of 1 degree: its ring, projected to
// longitudes and latitudes, winds once round the pole and is closed
// along it. It was refused as "a polygon edge spans 360 degrees of
// longitude (from lon -45 to -45, lat 90 to 90)" (helper probe of
// 2026-12-05). The cells it holds are those whose centres, transformed
// to the square's CRS by GDAL, lie inside it (counted here cell by cell).
func TestPolarSquareAroundPole(t *testing.T) {
	dir := t.TempDir()
	g, _ := geoGrid(t, -180, 90, 1, 360, 180)
	for _, c := range []struct {
		epsg                   int
		xmin, ymin, xmax, ymax float64
	}{
		{3995, -2e6, -2e6, 2e6, 2e6},
		{3413, -1.5e6, -1.7e6, 2.1e6, 1.9e6},
	} {
		p := filepath.Join(dir, fmt.Sprintf("pole%d.gpkg", c.epsg))
		writePolygonGPKG(t, p, c.epsg, [][2]float64{{c.xmin, c.ymin}, {c.xmax, c.ymin}, {c.xmax, c.ymax}, {c.xmin, c.ymax}, {c.xmin, c.ymin}})
		s, _, err := ReadShape(p, g)
		if err != nil {
			t.Fatalf("EPSG:%d: %v", c.epsg, err)
		}
		got := 0
		Fill(g, s.Grid, func(row, c0, c1 int) { got += c1 - c0 })
		wgs, err := godal.NewSpatialRefFromEPSG(4326)
		if err != nil {
			t.Fatal(err)
		}
		dst, err := godal.NewSpatialRefFromEPSG(c.epsg)
		if err != nil {
			t.Fatal(err)
		}
		tr, err := godal.NewTransform(wgs, dst)
		if err != nil {
			t.Fatal(err)
		}
		want := 0
		for row := 0; row < 90; row++ { // the northern hemisphere
			xs, ys := make([]float64, 360), make([]float64, 360)
			for col := range xs {
				xs[col], ys[col] = -179.5+float64(col), 89.5-float64(row)
			}
			if err := tr.TransformEx(xs, ys, nil, nil); err != nil {
				t.Fatal(err)
			}
			for col := range xs {
				if xs[col] >= c.xmin && xs[col] <= c.xmax && ys[col] >= c.ymin && ys[col] <= c.ymax {
					want++
				}
			}
		}
		tr.Close()
		wgs.Close()
		dst.Close()
		if got != want || want == 0 {
			t.Errorf("EPSG:%d: the square holds %d cells, want %d (its cells' centres inside it)", c.epsg, got, want)
		}
	}
}
