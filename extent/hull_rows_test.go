package extent

import (
	"fmt"
	"math"
	"math/rand/v2"
	"runtime"
	"slices"
	"strings"
	"sync"
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
				lon := func(c int) float64 { return lons[c] }
				lat := lats[0]
				if !alongParallel(g.Width, lon, lat) {
					continue
				}
				if len(want) > 0 {
					fast++
				}
				if got := h.rowRuns(lat, g.Width, lon, box, inside); !slices.Equal(got, want) {
					t.Fatalf("row %d (lat %v): %v, want %v", row, lat, got, want)
				}
			}
			if fast == 0 {
				t.Fatal("no row with hull cells took the row-by-row path")
			}
		})
	}
}

// TestHullProjectedRows: the tiled hull test of a projected grid
// (projectedRows: tiles settled from their centre and corner cells, the
// others tested cell by cell) gives exactly the cells of the per-cell test
// at every cell's WGS84 centre (brute force over every cell), on polar
// stereographic grids with the hull around the North Pole (EPSG:3413) and
// off it, a Mercator grid across the antimeridian (EPSG:3832), UTM cells
// 10° to 30° east of their central meridian (EPSG:32633) and Lambert
// azimuthal equal-area over Europe (EPSG:3035) reaching beyond the
// projection's disc, with a tight box (n odd) and the whole globe; and
// it requires tiles settled both inside and outside.
func TestHullProjectedRows(t *testing.T) {
	rng := rand.New(rand.NewPCG(5, 21))
	type tc struct {
		crs              string
		gt               [6]float64
		w, h             int
		lon, lat, spread float64
	}
	cases := []tc{
		{"EPSG:3413", [6]float64{-1.5e6, 25000, 0, 1.5e6, 0, -25000}, 120, 120, 0, 85, 6},
		{"EPSG:3413", [6]float64{-3e6, 33000, 0, 1e6, 0, -33000}, 120, 90, -60, 72, 8},
		{"EPSG:3832", [6]float64{2.3e6, 22000, 0, 2.2e6, 0, -22000}, 120, 100, 180, 8, 7},
		{"EPSG:32633", [6]float64{1.2e6, 15000, 0, 5.6e6, 0, -15000}, 120, 80, 35, 46, 5},
		{"EPSG:3035", [6]float64{4.321e6 - 1.4e7, 100000, 0, 3.21e6 + 1.4e7, 0, -100000}, 280, 280, 10, 50, 30},
	}
	settled := [2]int{}
	for n, c := range cases {
		t.Run(fmt.Sprintf("%d-%s", n, c.crs), func(t *testing.T) {
			g, err := NewGrid(c.w, c.h, c.gt, c.crs)
			if err != nil {
				t.Fatal(err)
			}
			defer g.Close()
			var pts []LonLat
			for range 40 {
				pts = append(pts, LonLat{Lon: c.lon + 2*c.spread*(2*rng.Float64()-1), Lat: math.Max(-89, math.Min(89, c.lat+c.spread*(2*rng.Float64()-1)))})
			}
			h, err := newSphericalHull(pts)
			if err != nil {
				t.Fatal(err)
			}
			box := reachBox{south: -90, north: 90, lonH: 360}
			if n%2 == 1 {
				box = reachBox{south: c.lat - c.spread*0.8, north: c.lat + c.spread*0.8, lonC: c.lon, lonH: c.spread * 1.5}
			}
			got := make([]rowRuns, g.Height)
			calls := make([]int, g.Height)
			var mu sync.Mutex
			h.projectedRows(g, box, func(row int, in rowRuns) {
				mu.Lock()
				got[row] = in
				calls[row]++
				mu.Unlock()
			})
			lons := make([]float64, g.Width)
			lats := make([]float64, g.Width)
			cells := 0
			for row := 0; row < g.Height; row++ {
				if calls[row] != 1 {
					t.Fatalf("row %d given %d times", row, calls[row])
				}
				g.RowLonLat(row, lons, lats)
				var want rowRuns
				for c := 0; c < g.Width; c++ {
					if !math.IsNaN(lats[c]) && box.has(lons[c], lats[c]) && h.contains(lons[c], lats[c]) {
						want = appendRun(want, int32(c), int32(c+1))
						cells++
					}
				}
				if !slices.Equal(got[row], want) {
					t.Fatalf("row %d: %v, per-cell test %v", row, got[row], want)
				}
			}
			if cells == 0 {
				t.Fatal("no cell inside: the case does not probe the hull")
			}
			// The tiles hullCap settles, inside and outside.
			hc := h.newHullCap(box)
			bp := newBandPoints(box)
			for r0 := 0; r0 < g.Height; r0 += tileSide {
				hb := min(tileSide, g.Height-r0)
				bp.window(g, 0, g.Width, g.Width)
				for k := range hb {
					bp.prepareRow(g, r0+k, k)
				}
				for c0 := 0; c0 < g.Width; c0 += tileSide {
					switch hc.side(bp, 0, hb, c0, min(c0+tileSide, g.Width)) {
					case 1:
						settled[0]++
					case -1:
						settled[1]++
					}
				}
			}
		})
	}
	if settled[0] == 0 || settled[1] == 0 {
		t.Errorf("%d tiles settled inside and %d outside: the cases do not probe both", settled[0], settled[1])
	}
	t.Logf("%d tiles settled inside, %d outside", settled[0], settled[1])
}

// TestHullMemoryWidth: building the hull on a latitude-longitude grid
// allocates no more on a grid 262,144 cells wide than on one 8,192 wide
// (16 rows of 0.001 degrees, the hull of 30 points in the first 8
// degrees, so both grids have the same hull cells): under twice as much
// (our cut-off). Each worker held a row's longitudes and latitudes, and
// each row a mark per cell, when the rows were tested from arrays of the
// grid's width (14.8 MB here against 2.6 MB; now 2.3 MB both).
func TestHullMemoryWidth(t *testing.T) {
	rng := rand.New(rand.NewPCG(4, 9))
	var pts []LonLat
	for range 30 {
		pts = append(pts, LonLat{Lon: 1 + 6*rng.Float64(), Lat: 44.988 + 0.013*rng.Float64()})
	}
	build := func(w int) (uint64, [][]int32) {
		g, err := NewGrid(w, tileSide, [6]float64{0, 0.001, 0, 45.003, 0, -0.001}, "EPSG:4326")
		if err != nil {
			t.Fatal(err)
		}
		defer g.Close()
		b := &builder{g: g, f: &Family{Grid: g, Chains: map[string][]int{}}}
		runtime.GC()
		var before, after runtime.MemStats
		runtime.ReadMemStats(&before)
		if err := b.hull(pts, []float64{0}, 0); err != nil {
			t.Fatal(err)
		}
		runtime.ReadMemStats(&after)
		var rows [][]int32
		for r := range g.Height {
			rows = append(rows, b.f.Runs(0, r))
		}
		return after.TotalAlloc - before.TotalAlloc, rows
	}
	narrowB, narrow := build(8192)
	wideB, wide := build(262144)
	t.Logf("allocated %d bytes 8,192 cells wide, %d bytes 262,144 wide", narrowB, wideB)
	if fmt.Sprint(narrow) != fmt.Sprint(wide) {
		t.Fatalf("hull cells differ: %v narrow, %v wide", narrow, wide)
	}
	cells := 0
	for _, r := range narrow {
		for i := 0; i < len(r); i += 2 {
			cells += int(r[i+1] - r[i])
		}
	}
	if cells == 0 {
		t.Fatal("no cell in the hull: the case does not probe the rows")
	}
	if wideB > 2*narrowB {
		t.Errorf("the hull allocated %d bytes on a grid 262,144 cells wide, %d on one 8,192 wide: memory grows with the width", wideB, narrowB)
	}
}

// TestHullTooFewSaysThinned: a hull refused for too few training points
// says its count is after thinning when thinning left records out (a user
// with five records in two cells read "have 2" and saw five), and not
// otherwise.
func TestHullTooFewSaysThinned(t *testing.T) {
	g, err := NewGrid(10, 10, [6]float64{0, 0.1, 0, 1, 0, -0.1}, "EPSG:4326")
	if err != nil {
		t.Fatal(err)
	}
	defer g.Close()
	pts := []LonLat{{Lon: 0.15, Lat: 0.55}, {Lon: 0.75, Lat: 0.35}}
	for _, c := range []struct {
		thinned int
		want    string
	}{
		{0, "a convex hull needs 3 or more training points, have 2; no hull extents"},
		{1, "have 2 (counted after thinning, which left out 1 training record sharing a cell with another); no hull extents"},
		{3, "have 2 (counted after thinning, which left out 3 training records sharing a cell with another); no hull extents"},
	} {
		b := &builder{g: g, f: &Family{Grid: g, Chains: map[string][]int{}}}
		if err := b.hull(pts, []float64{0}, c.thinned); err != nil {
			t.Fatal(err)
		}
		if len(b.f.Warnings) != 1 || !strings.HasSuffix(b.f.Warnings[0], c.want) || (c.thinned == 0 && strings.Contains(b.f.Warnings[0], "thinning")) {
			t.Errorf("%d thinned: warnings %q, want one ending %q", c.thinned, b.f.Warnings, c.want)
		}
	}
}
