package extent

import (
	"fmt"
	"math"
	"math/rand/v2"
	"runtime"
	"sort"
	"sync"
	"testing"

	"areasweep/extent/geodesy"
)

// TestDistanceFieldExact: the runs distanceField gives for each cut are,
// cell for cell, those of the exact distances (geodesy.Index.Nearest at
// every cell centre, compared with each cut), with many close cuts so that
// most cells lie near one, on a latitude-longitude grid (where rows share
// prepared points and steps) and on a projected one (where each cell is
// prepared and measured on its own), with sites scattered (point buffers)
// and dense along a line (a region's boundary).
func TestDistanceFieldExact(t *testing.T) {
	rng := rand.New(rand.NewPCG(7, 13))
	scattered := func(n int) (lats, lons []float64) {
		for range n {
			lats = append(lats, 44+6*rng.Float64())
			lons = append(lons, 4+10*rng.Float64())
		}
		return lats, lons
	}
	line := func() (lats, lons []float64) {
		for i := range 400 {
			f := float64(i) / 400
			lats = append(lats, 45+4*f+0.3*math.Sin(20*f))
			lons = append(lons, 6+5*f)
		}
		return lats, lons
	}
	cuts := func(step, n float64) []float64 {
		var c []float64
		for d := step; d <= n*step; d += step {
			c = append(c, d)
		}
		return c
	}
	lonlat, err := NewGrid(150, 110, [6]float64{2, 0.09, 0, 52, 0, -0.09}, "EPSG:4326")
	if err != nil {
		t.Fatal(err)
	}
	// ETRS89 LAEA Europe, 8 km cells over the same area.
	laea, err := NewGrid(110, 100, [6]float64{3.8e6, 8000, 0, 2.9e6, 0, -8000}, "EPSG:3035")
	if err != nil {
		t.Fatal(err)
	}
	// Pole to pole in 0.05-degree cells, over the sites' longitudes: most
	// bands lie beyond every cut (band's reach test).
	world, err := NewGrid(240, 3600, [6]float64{3, 0.05, 0, 90, 0, -0.05}, "EPSG:4326")
	if err != nil {
		t.Fatal(err)
	}
	for _, gc := range []struct {
		name string
		g    *Grid
	}{{"lonlat", lonlat}, {"laea", laea}, {"world", world}} {
		for _, sc := range []struct {
			name       string
			lats, lons []float64
			cuts       []float64
		}{
			{"scattered", nil, nil, cuts(12e3, 25)},
			{"line", nil, nil, cuts(9e3, 30)},
		} {
			if sc.name == "scattered" {
				sc.lats, sc.lons = scattered(60)
			} else {
				sc.lats, sc.lons = line()
			}
			t.Run(fmt.Sprintf("%s/%s", gc.name, sc.name), func(t *testing.T) {
				checkDistanceField(t, gc.g, sc.lats, sc.lons, sc.cuts)
			})
		}
	}
}

// TestDistanceFieldExactProjected is TestDistanceFieldExact on projected
// grids where a cell's coordinates are transformed only when the field
// reads them (bandPoints): polar stereographic cells of 25 km around the
// North Pole (EPSG:3413), a Mercator centred on 150°E whose cells cross
// the antimeridian (EPSG:3832), and UTM zone 33N cells of 20 km from 10°
// to 30° east of its central meridian (EPSG:32633), with scattered sites
// and many close cuts.
func TestDistanceFieldExactProjected(t *testing.T) {
	rng := rand.New(rand.NewPCG(3, 31))
	for _, tc := range []struct {
		name, crs   string
		gt          [6]float64
		w, h        int
		lat0, lat1  float64
		lon0, lon1  float64
		step, ncuts float64
	}{
		{"polar", "EPSG:3413", [6]float64{-1e6, 25000, 0, 1e6, 0, -25000}, 80, 80, 81, 89.5, -180, 180, 15e3, 20},
		{"antimeridian", "EPSG:3832", [6]float64{2.3e6, 25000, 0, 2.2e6, 0, -25000}, 90, 80, 2, 18, 172, 188, 15e3, 20},
		{"utm-far", "EPSG:32633", [6]float64{1.2e6, 20000, 0, 5.6e6, 0, -20000}, 80, 60, 40, 50, 25, 42, 12e3, 20},
	} {
		t.Run(tc.name, func(t *testing.T) {
			g, err := NewGrid(tc.w, tc.h, tc.gt, tc.crs)
			if err != nil {
				t.Fatal(err)
			}
			defer g.Close()
			var lats, lons []float64
			for range 40 {
				lats = append(lats, tc.lat0+(tc.lat1-tc.lat0)*rng.Float64())
				lons = append(lons, math.Remainder(tc.lon0+(tc.lon1-tc.lon0)*rng.Float64(), 360))
			}
			var cuts []float64
			for d := tc.step; d <= tc.ncuts*tc.step; d += tc.step {
				cuts = append(cuts, d)
			}
			checkDistanceField(t, g, lats, lons, cuts)
		})
	}
}

func checkDistanceField(t *testing.T, g *Grid, lats, lons, cuts []float64) {
	ix, err := geodesy.NewIndex(lats, lons)
	if err != nil {
		t.Fatal(err)
	}
	maxD := cuts[len(cuts)-1]
	got := fieldRuns(g, 0, ix, newReach(lats, lons, maxD), maxD, cuts)
	// Windows narrower than the grid (down to one tile) give the runs of
	// one window a band: the classes and rooms carried from window to
	// window are those of the whole band.
	for _, cols := range []int{tileSide, 3 * tileSide, 4 * tileSide} {
		if w := fieldRuns(g, cols, ix, newReach(lats, lons, maxD), maxD, cuts); fmt.Sprint(w) != fmt.Sprint(got) {
			t.Fatalf("windows of %d columns: runs differ from one window a band", cols)
		}
	}
	lo, la := make([]float64, g.Width), make([]float64, g.Width)
	near, exact := 0, 0
	for row := 0; row < g.Height; row++ {
		g.RowLonLat(row, lo, la)
		dist := make([]float64, g.Width)
		for c := range dist {
			dist[c] = math.Inf(1)
			if !math.IsNaN(la[c]) {
				_, dist[c] = ix.Nearest(la[c], lo[c], 0)
			}
			// Cells within a kilometre of a cut: the ones the field
			// must measure exactly.
			if j := sort.SearchFloat64s(cuts, dist[c]-1000); j < len(cuts) && cuts[j] <= dist[c]+1000 {
				near++
			}
		}
		for j, cut := range cuts {
			var want rowRuns
			for c := 0; c < g.Width; c++ {
				if dist[c] <= cut {
					want = append(want, int32(c), int32(c+1))
				}
			}
			want = canonical(want)
			if fmt.Sprint(got[row][j]) != fmt.Sprint(want) {
				t.Fatalf("row %d, cut %g m: runs %v, exact distances give %v", row, cut, got[row][j], want)
			}
			exact++
		}
	}
	if near < 100 {
		t.Errorf("only %d cells within 1 km of a cut: the test does not probe the edges", near)
	}
}

// fieldRuns returns the runs distanceField gives each row, with windows
// of cols columns (0: fieldWindow).
func fieldRuns(g *Grid, cols int, ix *geodesy.Index, reach reachBox, maxD float64, cuts []float64) [][]rowRuns {
	got := make([][]rowRuns, g.Height)
	var mu sync.Mutex
	b := &builder{g: g, windowCols: cols}
	b.distanceField(oneSites(ix), reach, maxD, cuts, func(row int, near []rowRuns) {
		mu.Lock()
		got[row] = near
		mu.Unlock()
	})
	return got
}

// TestDistanceFieldMemoryWidth: the memory a distance field allocates
// does not grow with the grid's width. One band (16 rows) of a
// latitude-longitude grid 8,192 and 262,144 cells wide, with the sites
// and their buffers in the west, so the runs (the output) are the same
// on both: the wide field's allocations must stay under twice the narrow
// one's (our cut-off; they were 32 times as large, and 170 MB a worker,
// when each worker held whole rows). The runs of both must also agree
// with the exact distances where they overlap (checked on the narrow
// grid's columns, which hold every run).
func TestDistanceFieldMemoryWidth(t *testing.T) {
	lats := []float64{44.995, 44.996, 44.994}
	lons := []float64{1.5, 2.2, 3.1}
	cuts := []float64{5e3, 20e3, 40e3}
	ix, err := geodesy.NewIndex(lats, lons)
	if err != nil {
		t.Fatal(err)
	}
	maxD := cuts[len(cuts)-1]
	alloc := func(w int) (uint64, [][]rowRuns) {
		g, err := NewGrid(w, tileSide, [6]float64{0, 0.001, 0, 45.003, 0, -0.001}, "EPSG:4326")
		if err != nil {
			t.Fatal(err)
		}
		defer g.Close()
		runtime.GC()
		var before, after runtime.MemStats
		runtime.ReadMemStats(&before)
		got := fieldRuns(g, 0, ix, newReach(lats, lons, maxD), maxD, cuts)
		runtime.ReadMemStats(&after)
		return after.TotalAlloc - before.TotalAlloc, got
	}
	narrowB, narrow := alloc(8192)
	wideB, wide := alloc(262144)
	t.Logf("allocated %d bytes 8,192 cells wide, %d bytes 262,144 wide", narrowB, wideB)
	if fmt.Sprint(narrow) != fmt.Sprint(wide) {
		t.Fatalf("runs differ: %v narrow, %v wide", narrow, wide)
	}
	if wideB > 2*narrowB {
		t.Errorf("the field allocated %d bytes on a grid 262,144 cells wide, %d on one 8,192 wide: memory grows with the width", wideB, narrowB)
	}
	// The runs against the exact distances (the 8,192 columns reach
	// 8.2 degrees east, beyond 3.1 degrees + 40 km).
	g, err := NewGrid(8192, tileSide, [6]float64{0, 0.001, 0, 45.003, 0, -0.001}, "EPSG:4326")
	if err != nil {
		t.Fatal(err)
	}
	defer g.Close()
	lo, la := make([]float64, g.Width), make([]float64, g.Width)
	for row := range g.Height {
		g.RowLonLat(row, lo, la)
		for j, cut := range cuts {
			var want rowRuns
			for c := range g.Width {
				if _, d := ix.Nearest(la[c], lo[c], 0); d <= cut {
					want = append(want, int32(c), int32(c+1))
				}
			}
			if want = canonical(want); fmt.Sprint(narrow[row][j]) != fmt.Sprint(want) || len(want) == 0 {
				t.Fatalf("row %d, cut %g m: runs %v, exact distances give %v", row, cut, narrow[row][j], want)
			}
		}
	}
}

// BenchmarkDistanceFieldWide measures a distance field of three cuts
// around 300 sites on a latitude-longitude grid 400,000 cells wide and 64
// high (cells of 0.00025 degrees, 100 degrees of longitude): the shape on
// which each worker held whole rows (about 170 MB a worker) before the
// field worked in windows of fieldWindow columns. Bytes allocated per
// build are reported (-benchmem).
func BenchmarkDistanceFieldWide(b *testing.B) {
	rng := rand.New(rand.NewPCG(5, 8))
	var lats, lons []float64
	for range 300 {
		lats = append(lats, 5.002+0.012*rng.Float64())
		lons = append(lons, 15+90*rng.Float64())
	}
	ix, err := geodesy.NewIndex(lats, lons)
	if err != nil {
		b.Fatal(err)
	}
	g, err := NewGrid(400000, 64, [6]float64{10, 0.00025, 0, 5.016, 0, -0.00025}, "EPSG:4326")
	if err != nil {
		b.Fatal(err)
	}
	defer g.Close()
	cuts := []float64{1e3, 5e3, 50e3}
	reach := newReach(lats, lons, cuts[2])
	bl := &builder{g: g}
	b.ReportAllocs()
	for b.Loop() {
		bl.distanceField(oneSites(ix), reach, cuts[2], cuts, func(int, []rowRuns) {})
	}
}
