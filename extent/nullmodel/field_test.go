package nullmodel

import (
	"fmt"
	"math"
	"math/rand/v2"
	"runtime"
	"testing"

	"areasweep/extent/geodesy"
)

// lonLatGrid returns Centres for a north-up latitude-longitude grid with
// top-left corner (west, north) and square cells of side deg degrees.
func lonLatGrid(west, north, deg float64) Centres {
	return func(row, c0, c1 int, lons, lats []float64) {
		for c := c0; c < c1; c++ {
			lons[c-c0] = west + (float64(c)+0.5)*deg
			lats[c-c0] = north - (float64(row)+0.5)*deg
		}
	}
}

// clusteredSites draws n sites in a few clusters inside the box (fixed seed).
func clusteredSites(n int, west, south, east, north float64, seed uint64) (lats, lons []float64) {
	r := rand.New(rand.NewPCG(seed, 1))
	for i := range n {
		cx := west + (east-west)*float64(i%5+1)/6
		cy := south + (north-south)*float64((i/5)%3+1)/4
		lons = append(lons, cx+(east-west)*0.08*r.NormFloat64())
		lats = append(lats, math.Max(-89, math.Min(89, cy+(north-south)*0.08*r.NormFloat64())))
	}
	return lats, lons
}

// TestDistancesMatchNearest checks every cell's distance against an
// independent query of geodesy.Index.Nearest at the cell's centre, bit for
// bit, for several ways of cutting the grid into blocks, with and without a
// need mask, and on a grid that crosses the antimeridian.
func TestDistancesMatchNearest(t *testing.T) {
	cases := []struct {
		name             string
		west, north, deg float64
		w, h             int
		sites            int
		south, east      float64
	}{
		{"europe-30-sites", -10, 60, 0.1, 130, 90, 30, 51, 3},
		{"one-site", 5, 45, 0.05, 70, 50, 1, 42.5, 8.5},
		{"antimeridian", 175, -10, 0.1, 100, 60, 12, -16, 185},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			lats, lons := clusteredSites(tc.sites, tc.west, tc.south, tc.east, tc.north, 7)
			ix, err := geodesy.NewIndex(lats, lons)
			if err != nil {
				t.Fatal(err)
			}
			cen := lonLatGrid(tc.west, tc.north, tc.deg)
			f := New(ix, cen)
			want := make([]float64, tc.w*tc.h)
			lo, la := make([]float64, tc.w), make([]float64, tc.w)
			for r := range tc.h {
				cen(r, 0, tc.w, lo, la)
				for c := range tc.w {
					_, want[r*tc.w+c] = ix.Nearest(la[c], lo[c], 0)
				}
			}
			need := make([]uint64, tc.w*tc.h)
			for i := range need {
				if i%7 != 3 {
					need[i] = 1 << uint(i%3)
				}
			}
			for _, bs := range [][2]int{{tc.w, tc.h}, {37, 23}, {16, 16}, {1, 1}} {
				for _, masked := range []bool{false, true} {
					got := make([]float64, tc.w*tc.h)
					var mask []uint64
					if masked {
						mask = need
					}
					walkTiles(tc.w, tc.h, bs[0], bs[1], mask, [][]float64{got}, func(x0, y0, w, h int, n []uint64, bufs [][]float64) {
						f.Distances(x0, y0, w, h, n, bufs[0])
					})
					bad := 0
					for i := range got {
						exp := want[i]
						if masked && need[i] == 0 {
							exp = math.NaN()
						}
						if !(got[i] == exp || math.IsNaN(got[i]) && math.IsNaN(exp)) {
							if bad < 5 {
								t.Errorf("blocks %v masked %v: cell %d distance %v, Nearest gives %v", bs, masked, i, got[i], exp)
							}
							bad++
						}
					}
					if bad > 0 {
						t.Errorf("blocks %v masked %v: %d of %d cells differ", bs, masked, bad, len(got))
					}
				}
			}
		})
	}
}

// TestFillSign checks that Fill is minus Distances, with +0 (not -0) on a
// cell whose centre is a site.
func TestFillSign(t *testing.T) {
	ix, err := geodesy.NewIndex([]float64{44.95}, []float64{10.05})
	if err != nil {
		t.Fatal(err)
	}
	f := New(ix, lonLatGrid(10, 45, 0.1))
	v := make([]float64, 4)
	f.Fill(0, 0, 2, 2, nil, v)
	if v[0] != 0 || math.Signbit(v[0]) {
		t.Errorf("value on the site's cell is %v, want +0", v[0])
	}
	d := make([]float64, 4)
	f.Distances(0, 0, 2, 2, nil, d)
	for i := 1; i < 4; i++ {
		if v[i] != -d[i] || !(d[i] > 0) {
			t.Errorf("cell %d: value %v, distance %v", i, v[i], d[i])
		}
	}
}

// benchIndex is the site index of the field benchmarks: sites training
// points in clusters (and their coordinates) over a side x side grid of 0.01-degree cells whose
// south-west corner is (0, 40).
func benchIndex(b *testing.B, sites, side int) (lats, lons []float64, ix *geodesy.Index) {
	lats, lons = clusteredSites(sites, 0, 40, 0.01*float64(side), 40+0.01*float64(side), 5)
	ix, err := geodesy.NewIndex(lats, lons)
	if err != nil {
		b.Fatal(err)
	}
	return lats, lons, ix
}

// BenchmarkDistances measures the distance field on a latitude-longitude
// grid of 0.01-degree cells (about 1 km) with training points in clusters,
// per block of 256 x 256 cells: the cost of the null model's values in a
// pass, per cell.
func BenchmarkDistances(b *testing.B) {
	for _, sites := range []int{100, 1000} {
		for _, side := range []int{1024, 2048} {
			_, _, ix := benchIndex(b, sites, side)
			f := New(ix, lonLatGrid(0, 40+0.01*float64(side), 0.01))
			buf := make([]float64, 256*256)
			b.Run(fmt.Sprintf("sites=%d/cells=%d", sites, side*side), func(b *testing.B) {
				b.ReportAllocs()
				c0 := cpuNanos(b)
				for b.Loop() {
					for y0 := 0; y0 < side; y0 += 256 {
						for x0 := 0; x0 < side; x0 += 256 {
							f.Distances(x0, y0, 256, 256, nil, buf)
						}
					}
				}
				b.ReportMetric(float64(cpuNanos(b)-c0)/float64(b.N)/float64(side*side), "cpu-ns/cell")
				b.ReportMetric(b.Elapsed().Seconds()*1e9/float64(b.N)/float64(side*side), "ns/cell")
			})
		}
	}
}

// TestPathBound checks that pathBound is an upper bound on the geodesic
// distance (PROJ's geod_inverse) on random pairs up to a few hundred km
// apart, at every latitude and across the antimeridian, and that it is not
// loose for neighbouring cells (within 30% for steps along a parallel or a
// meridian).
func TestPathBound(t *testing.T) {
	r := rand.New(rand.NewPCG(8, 9))
	for i := range 20000 {
		lat1, lon1 := -89+178*r.Float64(), -180+360*r.Float64()
		scale := math.Pow(10, -3+3*r.Float64()) // 0.001 to 1 degree
		lat2 := math.Max(-89.9, math.Min(89.9, lat1+scale*r.NormFloat64()))
		lon2 := lon1 + scale*r.NormFloat64()
		if i%7 == 0 {
			lon2 = lon1 + 360 - 1e-3 // across the antimeridian
		}
		d := geodesy.Distance(lat1, lon1, lat2, lon2)
		if b := pathBound(lat1, lon1, lat2, lon2); b < d {
			t.Fatalf("pair %d (%v,%v)-(%v,%v): bound %.9f m below the geodesic %.9f m", i, lat1, lon1, lat2, lon2, b, d)
		}
	}
	for _, lat := range []float64{0, 30, 60, 80} {
		for _, step := range [][2]float64{{0, 0.01}, {0.01, 0}} {
			d := geodesy.Distance(lat, 10, lat+step[0], 10+step[1])
			if b := pathBound(lat, 10, lat+step[0], 10+step[1]); b > 1.3*d {
				t.Errorf("latitude %v step %v: bound %.3f m, geodesic %.3f m", lat, step, b, d)
			}
		}
	}
}

// TestFarthestBoundRows: FarthestBound, which keeps three rows of cell
// centres (in windows of columns), gives the value of a direct
// computation with fresh centres for every tile (the maximum over tiles
// of d + 1.02 rho + 1), bit for bit, on grids whose last tile row or
// column is short, of one row, with a step of 1, and wider than
// farthestWindow (taken in windows of columns), on a grid whose first
// column's centres have no position (NaN: its tiles are skipped).
func TestFarthestBoundRows(t *testing.T) {
	r := rand.New(rand.NewPCG(3, 4))
	var lats, lons []float64
	for range 40 {
		lats, lons = append(lats, 30+40*r.Float64()), append(lons, -20+60*r.Float64())
	}
	ix, err := geodesy.NewIndex(lats, lons)
	if err != nil {
		t.Fatal(err)
	}
	const deg = 0.5
	centres := func(row, c0, c1 int, lons, lats []float64) {
		lonLatGrid(-25, 75, deg)(row, c0, c1, lons, lats)
		for i := range lats[:c1-c0] {
			if lons[i] < -24.5 {
				lats[i], lons[i] = math.NaN(), math.NaN()
			}
		}
	}
	f := New(ix, centres)
	at := func(row, col int) (lat, lon float64) {
		lo, la := make([]float64, 1), make([]float64, 1)
		centres(row, col, col+1, lo, la)
		return la[0], lo[0]
	}
	for _, tc := range []struct{ w, h, step int }{{130, 97, 16}, {130, 97, 1}, {37, 1, 8}, {20, 30, 16}, {64, 64, 32}, {9001, 20, 64}, {4100, 3, 1}} {
		want := 0.0
		for r0 := 0; r0 < tc.h; r0 += tc.step {
			r1 := min(r0+tc.step, tc.h)
			for c0 := 0; c0 < tc.w; c0 += tc.step {
				c1 := min(c0+tc.step, tc.w)
				lat, lon := at((r0+r1)/2, (c0+c1)/2)
				if math.IsNaN(lat) {
					continue
				}
				rho, ok := 0.0, true
				for _, rc := range [4][2]int{{r0, c0}, {r0, c1 - 1}, {r1 - 1, c0}, {r1 - 1, c1 - 1}} {
					plat, plon := at(rc[0], rc[1])
					if math.IsNaN(plat) {
						ok = false
						break
					}
					rho = math.Max(rho, geodesy.Distance(lat, lon, plat, plon))
				}
				if !ok {
					continue
				}
				_, d := ix.Nearest(lat, lon, 0)
				want = math.Max(want, d+rho*1.02+1)
			}
		}
		if got := f.FarthestBound(tc.w, tc.h, tc.step); got != want || want == 0 {
			t.Errorf("%d x %d, step %d: %v, want %v", tc.w, tc.h, tc.step, got, want)
		}
	}
}

// TestFarthestBoundMemoryWidth: FarthestBound allocates no more for a grid
// 262,144 cells wide than for one 8,192 wide (4 rows of 0.001 degrees,
// tiles of 64): under twice as much (our cut-off). It held three rows of
// centres of the grid's width (12.6 MB here against 0.4 MB; now 0.2 MB
// both).
func TestFarthestBoundMemoryWidth(t *testing.T) {
	if raceEnabled {
		// The nearest-site queries take their buffers from a sync.Pool,
		// which the race detector empties at random: the counts then grow
		// with the number of tiles (measured: 0.24 MB against 1.27 MB).
		// The test runs in the suite without -race.
		t.Skip("allocation counts are not meaningful under the race detector")
	}
	ix, err := geodesy.NewIndex([]float64{45, 44.99}, []float64{3, 5})
	if err != nil {
		t.Fatal(err)
	}
	f := New(ix, lonLatGrid(0, 45.002, 0.001))
	alloc := func(w int) uint64 {
		runtime.GC()
		var before, after runtime.MemStats
		runtime.ReadMemStats(&before)
		if f.FarthestBound(w, 4, 64) == 0 {
			t.Fatal("no tile measured")
		}
		runtime.ReadMemStats(&after)
		return after.TotalAlloc - before.TotalAlloc
	}
	narrow, wide := alloc(8192), alloc(262144)
	t.Logf("allocated %d bytes 8,192 cells wide, %d bytes 262,144 wide", narrow, wide)
	if wide > 2*narrow {
		t.Errorf("FarthestBound allocated %d bytes for a grid 262,144 cells wide, %d for one 8,192 wide: memory grows with the width", wide, narrow)
	}
}
