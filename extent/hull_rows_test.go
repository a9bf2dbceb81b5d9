package extent

import (
	"fmt"
	"math"
	"math/rand/v2"
	"slices"
	"testing"
)

// TestHullRowRuns: the row-by-row hull test (crossings of the bounding
// great circles, exact tests near them) gives exactly the cells of the
// per-cell test, on random hulls, across the antimeridian, around a pole
// and on grids of 0-360 longitudes (brute force over every cell).
func TestHullRowRuns(t *testing.T) {
	rng := rand.New(rand.NewPCG(8, 13))
	type tc struct {
		west, north, step float64
		w, h              int
		lon, lat, spread  float64
	}
	cases := []tc{
		{-20, 60, 0.25, 240, 160, 0, 45, 15},
		{150, 20, 0.2, 300, 200, 180, 0, 12},   // antimeridian inside the grid
		{0, 10, 0.5, 720, 100, 350, -5, 10},    // 0-360 longitudes
		{-180, 90, 1, 360, 60, 0, 80, 8},       // around the pole
		{-180, 90, 0.7, 514, 257, 30, -20, 40}, // a continent-wide hull
	}
	for n, c := range cases {
		t.Run(fmt.Sprint(n), func(t *testing.T) {
			g, err := NewGrid(c.w, c.h, [6]float64{c.west, c.step, 0, c.north, 0, -c.step}, "EPSG:4326")
			if err != nil {
				t.Fatal(err)
			}
			var pts []LonLat
			for i := 0; i < 40; i++ {
				pts = append(pts, LonLat{Lon: c.lon + c.spread*(2*rng.Float64()-1), Lat: math.Max(-89, math.Min(89, c.lat+c.spread*(2*rng.Float64()-1)))})
			}
			h, err := newSphericalHull(pts)
			if err != nil {
				t.Fatal(err)
			}
			box := reachBox{south: -90, north: 90, lonH: 360}
			if n%2 == 0 {
				box = reachBox{south: c.lat - c.spread, north: c.lat + c.spread, lonC: c.lon, lonH: c.spread * 0.8}
			}
			lons := make([]float64, g.Width)
			lats := make([]float64, g.Width)
			fast := 0
			for row := 0; row < g.Height; row++ {
				g.RowLonLat(row, lons, lats)
				inside := func(c int) bool { return box.has(lons[c], lats[c]) && h.contains(lons[c], lats[c]) }
				var want rowRuns
				for c := 0; c < g.Width; c++ {
					if inside(c) {
						want = appendRun(want, int32(c), int32(c+1))
					}
				}
				lat, ok := alongParallel(lons, lats)
				if !ok {
					continue
				}
				if len(want) > 0 {
					fast++
				}
				if got := h.rowRuns(lat, lons, box, inside); !slices.Equal(got, want) {
					t.Fatalf("row %d (lat %v): %v, want %v", row, lat, got, want)
				}
			}
			if fast == 0 {
				t.Fatal("no row with hull cells took the row-by-row path")
			}
		})
	}
}
