package extent

import (
	"strings"
	"testing"

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
