package extent

import (
	"os"
	"path/filepath"
	"strings"
	"testing"
	"time"

	"github.com/paulmach/orb"
)

// TestRegionBeyondTheRaster: a base region that reaches beyond the raster
// was clipped to it without a word, so "base", "the study region as
// given", was half the region on a model covering half of it (found by
// running the demo's region on the western 112 of its 300 columns). A
// region reaching more than half a cell beyond an edge is now warned
// about, naming the edges; one inside, or beyond by less than half a cell
// (a region drawn to the raster's bounds), is not; a grid spanning the
// globe has no east or west edge.
func TestRegionBeyondTheRaster(t *testing.T) {
	box := func(w, s, e, n float64) orb.MultiPolygon {
		return orb.MultiPolygon{{{{w, s}, {e, s}, {e, n}, {w, n}, {w, s}}}}
	}
	for _, c := range []struct {
		name   string
		w, h   int
		gt     [6]float64
		crs    string
		region orb.MultiPolygon
		want   []string // edges named; none for no warning
	}{
		{"inside", 300, 240, [6]float64{-150, 0.1, 0, -28, 0, -0.1}, "EPSG:4326", box(-145, -50, -125, -30), nil},
		{"on the raster's bounds", 300, 240, [6]float64{-150, 0.1, 0, -28, 0, -0.1}, "EPSG:4326", box(-150, -52, -120, -28), nil},
		{"less than half a cell beyond", 300, 240, [6]float64{-150, 0.1, 0, -28, 0, -0.1}, "EPSG:4326", box(-150.04, -52.04, -119.96, -27.96), nil},
		{"beyond the east edge", 112, 240, [6]float64{-150, 0.1, 0, -28, 0, -0.1}, "EPSG:4326", box(-145, -50, -131, -30), []string{"east (to -131, the raster's edge is at -138.8)"}},
		{"beyond every edge", 300, 240, [6]float64{-150, 0.1, 0, -28, 0, -0.1}, "EPSG:4326", box(-160, -60, -110, -20), []string{"west", "east", "south", "north"}},
		{"global grid", 360, 170, [6]float64{-180, 1, 0, 85, 0, -1}, "EPSG:4326", box(-200, -10, 200, 10), nil},
		{"global grid, beyond its north edge", 360, 170, [6]float64{-180, 1, 0, 85, 0, -1}, "EPSG:4326", box(-200, -10, 200, 88), []string{"north (to 88,"}},
		{"projected grid", 20, 30, [6]float64{4321000, 1000, 0, 3210000, 0, -1000}, "EPSG:3035", box(4300000, 3170000, 4330000, 3200000), []string{"west (to 4300000, the raster's edge is at 4321000)", "south (to 3170000, the raster's edge is at 3180000)"}},
	} {
		t.Run(c.name, func(t *testing.T) {
			g, err := NewGrid(c.w, c.h, c.gt, c.crs)
			if err != nil {
				t.Fatal(err)
			}
			defer g.Close()
			got := beyondRaster(g, c.region, "region.gpkg")
			if len(c.want) == 0 {
				if got != "" {
					t.Errorf("warned: %s", got)
				}
				return
			}
			if !strings.Contains(got, "the base region (region.gpkg) reaches beyond the raster") || !strings.Contains(got, "ogr2ogr -clipdst") {
				t.Errorf("warning %q", got)
			}
			for _, w := range c.want {
				if !strings.Contains(got, w) {
					t.Errorf("warning %q does not name %q", got, w)
				}
			}
		})
	}
}

// TestProjectedRegionFarVertex: a region in EPSG:3857 with one vertex at
// an easting of 1e20 metres (a typo) kept the run reprojecting it onto a
// latitude-longitude raster for more than 2 minutes (PROJ takes time in
// proportion to the coordinate). A vertex of a projected layer more than
// 1e12 units from its CRS's origin is refused like a latitude beyond a
// pole, naming the feature; the same region without it is read.
func TestProjectedRegionFarVertex(t *testing.T) {
	Register()
	g, err := NewGrid(300, 240, [6]float64{-150, 0.1, 0, -28, 0, -0.1}, "EPSG:4326")
	if err != nil {
		t.Fatal(err)
	}
	defer g.Close()
	dir := t.TempDir()
	write := func(name, far string) string {
		p := filepath.Join(dir, name)
		os.WriteFile(p, []byte(`{"type":"FeatureCollection","crs":{"type":"name","properties":{"name":"urn:ogc:def:crs:EPSG::3857"}},"features":[{"type":"Feature","properties":{},"geometry":{"type":"Polygon","coordinates":[[[-15500000,-4500000],[-15000000,-4500000],[`+far+`,-5000000],[-15500000,-5000000],[-15500000,-4500000]]]}}]}`), 0o644)
		return p
	}
	if _, _, err := ReadShape(write("near.geojson", "-15000000"), g); err != nil {
		t.Fatalf("a region without the far vertex: %v", err)
	}
	done := make(chan error, 1)
	go func() { _, _, err := ReadShape(write("far.geojson", "1e20"), g); done <- err }()
	select {
	case err := <-done:
		if err == nil || !strings.Contains(err.Error(), "feature 1 has a vertex at 1e+20, more than 1e+12 units from the origin of the layer's CRS") {
			t.Errorf("a vertex at 1e20: %v", err)
		}
	case <-time.After(time.Minute):
		t.Fatal("a vertex at 1e20: not refused within a minute")
	}
}

// TestProjectedGridFarCorner: a raster in EPSG:3857 whose corners lie at
// 1e20 (a broken georeferencing) kept the run computing its cell areas
// for more than a minute. Such a grid is refused at once; one reaching
// 2e7 m (the whole Mercator map) is made.
func TestProjectedGridFarCorner(t *testing.T) {
	g, err := NewGrid(300, 240, [6]float64{-2e7, 2e7 / 150, 0, 2e7, 0, -2e7 / 120}, "EPSG:3857")
	if err != nil {
		t.Fatalf("the whole Mercator map: %v", err)
	}
	g.Close()
	done := make(chan error, 1)
	go func() {
		g, err := NewGrid(300, 240, [6]float64{1e20, 2e20 / 300, 0, 1e20, 0, -2e20 / 240}, "EPSG:3857")
		if err == nil {
			g.RowAreas(0, nil)
			g.Close()
		}
		done <- err
	}()
	select {
	case err := <-done:
		if err == nil || !strings.Contains(err.Error(), "the raster reaches 3e+20 units from the origin of its CRS, more than 1e+12") {
			t.Errorf("corners at 1e20: %v", err)
		}
	case <-time.After(time.Minute):
		t.Fatal("corners at 1e20: not refused within a minute")
	}
}
