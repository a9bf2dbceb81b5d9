package pass

import (
	"bytes"
	"errors"
	"fmt"
	"math"
	"math/rand/v2"
	"path/filepath"
	"strings"
	"sync"
	"sync/atomic"
	"testing"

	"github.com/airbusgeo/godal"

	"areasweep/extent"
	"areasweep/extent/geodesy"
	"areasweep/extent/nullmodel"
	"areasweep/extent/vocab"
	"areasweep/metrics"
)

// nullSetup makes a 300 x 200 grid of 0.01-degree cells (the pass test
// raster's), a distance-only null on it from five training sites, and a
// two-member family: every cell but 1 in 97 (as if clipped to valid cells)
// and its western half.
func nullSetup(t *testing.T) (*extent.Grid, *Virtual, *nullmodel.Field, *extent.Family) {
	t.Helper()
	g, r := openTestRaster(t, 300, 200)
	r.Close()
	ix, err := geodesy.NewIndex([]float64{49.5, 49.1, 48.4, 48.45, 49.9}, []float64{0.3, 1.7, 2.9, 0.05, 1.0})
	if err != nil {
		t.Fatal(err)
	}
	return nullOn(g, ix)
}

// nullOn returns the distance-only null of the sites of ix on g with
// nullSetup's two-member family: every cell but 1 in 97 and its western
// half.
func nullOn(g *extent.Grid, ix *geodesy.Index) (*extent.Grid, *Virtual, *nullmodel.Field, *extent.Family) {
	f := DistanceNull(g, ix)
	mask := make([]uint64, g.Cells())
	for i := range mask {
		if i%97 != 0 {
			mask[i] = 1
			if i%g.Width < g.Width/2 {
				mask[i] |= 2
			}
		}
	}
	fam := maskFamily(g, []extent.Member{{ID: "all", Status: vocab.StatusOK}, {ID: "west", Status: vocab.StatusOK}}, mask)
	return g, NewVirtual(g, f), f, fam
}

// nullSetupProjected is nullSetup on a projected grid: 300 x 200 cells of
// 2 km in EPSG:3035 (Lambert azimuthal equal-area Europe, around 13 E, 48
// N), five training sites inside it, the same two-member family.
func nullSetupProjected(t *testing.T) (*extent.Grid, *Virtual, *nullmodel.Field, *extent.Family) {
	return nullSetupOn(t, "EPSG:3035", 4.5e6, 2.9e6, 2000)
}

// nullSetupOn is nullSetupProjected on a grid of 300 x 200 cells of side
// cell (m) in crs with top-left corner (x0, y0), the five sites at the
// same places relative to the corner.
func nullSetupOn(t *testing.T, crs string, x0, y0, cell float64) (*extent.Grid, *Virtual, *nullmodel.Field, *extent.Family) {
	t.Helper()
	g, err := extent.NewGrid(300, 200, [6]float64{x0, cell, 0, y0, 0, -cell}, crs)
	if err != nil {
		t.Fatal(err)
	}
	t.Cleanup(g.Close)
	xs := []float64{0.05e6, 0.12e6, 0.25e6, 0.4e6, 0.52e6}
	ys := []float64{-0.05e6, -0.3e6, -0.15e6, -0.35e6, -0.08e6}
	lons, lats := make([]float64, 5), make([]float64, 5)
	for i := range xs {
		xs[i], ys[i] = x0+xs[i]*cell/2000, y0+ys[i]*cell/2000
	}
	g.ToLonLat(xs, ys, lons, lats)
	ix, err := geodesy.NewIndex(lats, lons)
	if err != nil {
		t.Fatal(err)
	}
	return nullOn(g, ix)
}

// maskFamily makes a family on g from per-cell membership words (bit k:
// member k), as row runs.
func maskFamily(g *extent.Grid, members []extent.Member, mask []uint64) *extent.Family {
	return extent.NewFamilyFromRuns(g, members, func(k, row int) []int32 {
		var runs []int32
		for c := 0; c < g.Width; c++ {
			if mask[row*g.Width+c]>>uint(k)&1 != 0 {
				runs = append(runs, int32(c), int32(c+1))
			}
		}
		return runs
	})
}

// writeFloat64 writes vals (row-major, NaN as no data) as a Float64 GeoTIFF
// on g's grid, tiled in 64 x 64 blocks.
func writeFloat64(t *testing.T, g *extent.Grid, path string, vals []float64) {
	t.Helper()
	ds, err := godal.Create(godal.GTiff, path, 1, godal.Float64, g.Width, g.Height, godal.CreationOption("TILED=YES", "BLOCKXSIZE=64", "BLOCKYSIZE=64"))
	if err != nil {
		t.Fatal(err)
	}
	ds.SetGeoTransform(g.GeoTransform)
	ds.SetSpatialRef(g.SpatialRef())
	b := ds.Bands()[0]
	b.SetNoData(-1e300)
	out := make([]float64, len(vals))
	for i, v := range vals {
		out[i] = v
		if math.IsNaN(v) {
			out[i] = -1e300
		}
	}
	if err := b.Write(0, 0, out, g.Width, g.Height); err != nil {
		t.Fatal(err)
	}
	if err := ds.Close(); err != nil {
		t.Fatal(err)
	}
}

// TestVirtualEqualsRaster is the property the null model rests on: a
// GeoTIFF holding the null's exact values (Fill) scores exactly what the
// virtual null scores from its bounds and midpoints (values at the points
// bit for bit, and every accumulator: area at each layout value, range,
// cells, area, and all metrics, the Boyce index included), for 1 and 2
// workers, although the GeoTIFF's blocks (64 x 64) differ from the
// virtual's (240 x 240); on a latitude-longitude grid (nullSetup) and on
// projected ones (nullSetupOn, whose bounds interpolate most cell
// centres): EPSG:3035, EPSG:3413 around the north pole, EPSG:3832 across
// the antimeridian, UTM zone 33N and EPSG:3857 at 60 N.
func TestVirtualEqualsRaster(t *testing.T) {
	on := func(crs string, x0, y0, cell float64) func(*testing.T) (*extent.Grid, *Virtual, *nullmodel.Field, *extent.Family) {
		return func(t *testing.T) (*extent.Grid, *Virtual, *nullmodel.Field, *extent.Family) {
			return nullSetupOn(t, crs, x0, y0, cell)
		}
	}
	for name, setup := range map[string]func(*testing.T) (*extent.Grid, *Virtual, *nullmodel.Field, *extent.Family){
		"lonlat": nullSetup, "laea": nullSetupProjected,
		"polar":        on("EPSG:3413", -300e3, 200e3, 2000),
		"antimeridian": on("EPSG:3832", 3.0e6, 1.0e6, 2000),
		"utm":          on("EPSG:32633", 200e3, 5.6e6, 1000),
		"webmercator":  on("EPSG:3857", 1.0e6, 8.6e6, 4000),
	} {
		t.Run(name, func(t *testing.T) { virtualEqualsRaster(t, setup) })
	}
}

func virtualEqualsRaster(t *testing.T, setup func(*testing.T) (*extent.Grid, *Virtual, *nullmodel.Field, *extent.Family)) {
	g, v, f, fam := setup(t)
	all := make([]float64, g.Cells())
	f.Fill(0, 0, g.Width, g.Height, nil, all)
	path := filepath.Join(t.TempDir(), "null.tif")
	writeFloat64(t, g, path, all)
	r, err := Open(path)
	if err != nil {
		t.Fatal(err)
	}
	defer r.Close()
	cells := []int{0, 155, 20 * 300, 50*300 + 40, 99*300 + 250, 150*300 + 7, 199*300 + 299}
	vv, vok, _ := v.Sample(g, cells)
	rv, rok, err := r.Sample(g, cells)
	if err != nil {
		t.Fatal(err)
	}
	for i := range cells {
		if vv[i] != rv[i] || !vok[i] || !rok[i] || vv[i] != all[cells[i]] {
			t.Errorf("cell %d: virtual %v (%v), raster %v (%v), field %v", cells[i], vv[i], vok[i], rv[i], rok[i], all[cells[i]])
		}
	}
	// The floor of bins about 4e5/256 m wide (the largest distance is below
	// 4e5 m): the histogram edges the bounds must avoid.
	for i, x := range all {
		if !(x > -4e5) {
			t.Fatalf("cell %d: null %v, want above -4e5 (finite)", i, x)
		}
	}
	layout, err := metrics.NewLayout(append(append([]float64{}, vv...), -5e4), 256, metrics.WithHistFloor(metrics.FloorExp(4e5/256)))
	if err != nil {
		t.Fatal(err)
	}
	// Most cells must take the bounded path (midpoints), or this test
	// would not test it.
	lo, hi := make([]float64, g.Cells()), make([]float64, g.Cells())
	f.Bounds(0, 0, g.Width, g.Height, nil, newFloorBinner(layout), lo, hi)
	bounded := 0
	for i := range lo {
		if lo[i] != hi[i] {
			bounded++
		}
	}
	if bounded < g.Cells()/2 {
		t.Errorf("%d of %d cells bounded, want most", bounded, g.Cells())
	}
	describe := func(accs []*metrics.Accumulator, st Stats) string {
		// The virtual null's blocks hold midpoints of bounds, so its pass
		// lists no smallest values or runs; its copy's does.
		st.Lowest, st.Runs = metrics.MassList{}, metrics.MassList{}
		s := fmt.Sprint(st)
		for k, a := range accs {
			s += fmt.Sprint(a.Cells(), a.Area(), a.Min(), a.Max())
			for _, x := range layout.Values() {
				b, e, ab, ok := a.AreaAt(x)
				s += fmt.Sprint(b, e, ab, ok)
			}
			sc, err := metrics.Score(a, vv[:3], vv[3:], metrics.Settings{Iterations: 20, Seed: uint64(k)})
			if err != nil {
				t.Fatal(err)
			}
			s += fmt.Sprint(sc)
		}
		return s
	}
	var want string
	for _, workers := range []int{1, 2} {
		accs, st, err := r.Score(g, fam, layout, Options{Workers: workers})
		if err != nil {
			t.Fatal(err)
		}
		raster := describe(accs, st)
		accs, st, err = v.Score(g, fam, layout, Options{Workers: workers})
		if err != nil {
			t.Fatal(err)
		}
		virtual := describe(accs, st)
		if raster != virtual {
			t.Errorf("workers=%d: the virtual null and its GeoTIFF copy score differently", workers)
		}
		if want == "" {
			want = virtual
		} else if virtual != want {
			t.Errorf("workers=%d: virtual scores differ from 1 worker", workers)
		}
		if accs[0].Cells() != int64(g.Cells()-(g.Cells()+96)/97) {
			t.Errorf("workers=%d: %d cells scored", workers, accs[0].Cells())
		}
	}
}

// TestRowsHook checks that Options.Rows sees every row of the grid once with
// the values and weights the pass uses: summing weight over each member's
// valid cells (Family.Has) gives each accumulator's area. The run's tally
// (NullTally: ring cells, added up when read; members with the same runs
// in a row added together) encodes byte for byte as the brute-force one,
// on nullSetup's family with the west half declared a chain inside the
// whole (one nested group), and on one whose first two members are the
// same cells (one walk for both).
func TestRowsHook(t *testing.T) {
	g, v, _, chained := nullSetup(t)
	twins := hookFamilies(g, chained)
	if gr := chained.Groups(); len(gr) != 1 || len(gr[0]) != 2 {
		t.Fatalf("groups %v, want one sequence of two nested members", gr)
	}
	layout, err := metrics.NewLayout([]float64{-1e4}, 64, metrics.WithHistFloor(metrics.FloorExp(4e5/64)))
	if err != nil {
		t.Fatal(err)
	}
	for name, fam := range map[string]*extent.Family{"chained": chained, "twins": twins} {
		var bg, rings nullmodel.Background
		seen := make([]int, g.Height)
		var mu sync.Mutex
		tally, ringTally := bruteTally(g, fam, &bg), NullTally(fam, &rings)
		opt := Options{Workers: 2, Rows: func(row, c0 int, vals []float64, w []int64) {
			tally(row, c0, vals, w)
			ringTally(row, c0, vals, w)
			mu.Lock()
			seen[row] += len(vals)
			mu.Unlock()
		}}
		accs, _, err := v.Score(g, fam, layout, opt)
		if err != nil {
			t.Fatal(err)
		}
		for r, n := range seen {
			if n != g.Width {
				t.Fatalf("%s: row %d: %d cells seen, want %d", name, r, n, g.Width)
			}
		}
		for k := range accs {
			if bg.Area(k) != accs[k].Area() || bg.Area(k) == 0 {
				t.Errorf("%s: extent %d: rows hook area %d, accumulator %d", name, k, bg.Area(k), accs[k].Area())
			}
		}
		if !bytes.Equal(nullmodel.EncodeBackground(&rings), nullmodel.EncodeBackground(&bg)) {
			t.Errorf("%s: the run's tally differs from the brute-force tally", name)
		}
	}
}

// hookFamilies makes chained (nullSetup's family) a chain, west inside all,
// and returns the twins family of the row-hook tests: all, a copy of all
// and west, each without every 97th cell.
func hookFamilies(g *extent.Grid, chained *extent.Family) *extent.Family {
	chained.Chains = map[string][]int{"west-in-all": {1, 0}}
	mask := make([]uint64, g.Cells())
	for i := range mask {
		if i%97 != 0 {
			mask[i] = 3
			if i%g.Width < g.Width/3 {
				mask[i] |= 4
			}
		}
	}
	return maskFamily(g, []extent.Member{{ID: "all", Status: vocab.StatusOK}, {ID: "all-again", Status: vocab.StatusOK}, {ID: "west", Status: vocab.StatusOK}}, mask)
}

// TestVirtualTally checks that a Virtual's own tally (Virtual.Tally: the
// rows added by each worker's source in its walk of the block's rings)
// encodes byte for byte as NullTally's row hook, on TestRowsHook's
// families, with 1 and 3 workers, over the whole grid and over row ranges
// that cut blocks (the sums of the ranges added up), and on a layout
// without a floor (every cell computed; the tally then goes through the
// hook).
func TestVirtualTally(t *testing.T) {
	g, v, _, chained := nullSetup(t)
	twins := hookFamilies(g, chained)
	floored, err := metrics.NewLayout([]float64{-1e4}, 64, metrics.WithHistFloor(metrics.FloorExp(4e5/64)))
	if err != nil {
		t.Fatal(err)
	}
	plain, err := metrics.NewLayout([]float64{-1e4}, 64)
	if err != nil {
		t.Fatal(err)
	}
	cut := g.Height/3 + 5 // inside a block row
	for name, fam := range map[string]*extent.Family{"chained": chained, "twins": twins} {
		for lname, layout := range map[string]*metrics.Layout{"floored": floored, "plain": plain} {
			var want nullmodel.Background
			if _, _, err := v.Score(g, fam, layout, Options{Workers: 2, Rows: NullTally(fam, &want)}); err != nil {
				t.Fatal(err)
			}
			for _, workers := range []int{1, 3} {
				for _, ranges := range [][]RowRange{{{0, g.Height}}, {{0, cut}, {cut, g.Height}}} {
					var parts []*nullmodel.Background
					for _, rr := range ranges {
						var bg nullmodel.Background
						own := NewVirtual(g, v.field)
						own.Tally(fam, &bg)
						if _, _, err := own.Score(g, fam, layout, Options{Workers: workers, RowRange: &rr}); err != nil {
							t.Fatal(err)
						}
						parts = append(parts, &bg)
					}
					got := parts[0]
					if len(parts) > 1 {
						got = new(nullmodel.Background)
						for _, p := range parts {
							if err := got.Merge(p); err != nil {
								t.Fatal(err)
							}
						}
					}
					if !bytes.Equal(nullmodel.EncodeBackground(got), nullmodel.EncodeBackground(&want)) {
						t.Errorf("%s, %s layout, %d workers, ranges %v: the source's tally differs from the row hook's", name, lname, workers, ranges)
					}
				}
			}
		}
	}
}

// BenchmarkNullPass measures a whole pass of the distance-only null (the
// field's bounds computed on the workers, then the same scoring as a
// raster, and a sorting-bias tally on the rows as the run keeps) on the
// study of the whole-sweep benchmark (cmd/sweepbench): a 60 x 40 degree
// latitude-longitude window in 4 million cells (27 million in
// BenchmarkNullVsRaster), 500 training and 500 test
// points drawn from a bump of suitability, 8 extents, the layout of the
// points' values and 4096-bin histograms floored at DistanceNullFloor. Set
// beside BenchmarkScorePass (a raster of the same size, 8 extents, same
// worker count): ns per cell.
func BenchmarkNullPass(b *testing.B) {
	for _, cells := range []float64{4e6} {
		g, v, layout, fam := nullBenchStudy(b, cells)
		for _, workers := range []int{1, 2} {
			b.Run(fmt.Sprintf("cells=%d,extents=8,workers=%d", g.Cells(), workers), func(b *testing.B) {
				b.ReportAllocs()
				for b.Loop() {
					var bg nullmodel.Background
					vt := NewVirtual(g, v.field)
					vt.Tally(fam, &bg)
					if _, _, err := vt.Score(g, fam, layout, Options{Workers: workers}); err != nil {
						b.Fatal(err)
					}
				}
				b.ReportMetric(b.Elapsed().Seconds()*1e9/float64(b.N)/float64(g.Cells()), "ns/cell")
			})
		}
		g.Close()
	}
}

// nullBenchStudy returns the null of the whole-sweep benchmark's study in
// about cells cells (see BenchmarkNullPass): the grid (to be closed), the
// virtual null, its layout and a family of 8 extents covering the grid.
func nullBenchStudy(b *testing.B, cells float64) (*extent.Grid, *Virtual, *metrics.Layout, *extent.Family) {
	return nullBenchStudyOn(b, cells, "EPSG:4326")
}

// nullBenchStudyOn is nullBenchStudy on a grid in crs: EPSG:4326 (the 60 x
// 40 degree window), or EPSG:3035 (Lambert azimuthal equal-area Europe): a
// window of 6000 x 4000 km centred near 10 E, 50 N (x from 1320 to 7320 km,
// y from 990 to 4990 km), the same shape in cells, with the same training
// points (those outside the window are left out of the layout).
func nullBenchStudyOn(b *testing.B, cells float64, crs string) (*extent.Grid, *Virtual, *metrics.Layout, *extent.Family) {
	h := int(math.Round(math.Sqrt(cells / 1.5)))
	w := int(math.Round(float64(h) * 1.5))
	gt := [6]float64{-20, 60.0 / float64(w), 0, 70, 0, -40.0 / float64(h)}
	if crs == "EPSG:3035" {
		gt = [6]float64{1.32e6, 6e6 / float64(w), 0, 4.99e6, 0, -4e6 / float64(h)}
	}
	g, err := extent.NewGrid(w, h, gt, crs)
	if err != nil {
		b.Fatal(err)
	}
	r := rand.New(rand.NewPCG(7, 8))
	var plats, plons []float64
	for len(plats) < 1000 {
		lon, lat := -20+60*r.Float64(), 30+40*r.Float64()
		d2 := ((lon-10)*(lon-10) + (lat-50)*(lat-50)) / 128
		if s := math.Exp(-d2); r.Float64() > s*s {
			continue
		}
		plats, plons = append(plats, lat), append(plons, lon)
	}
	ix, err := geodesy.NewIndex(plats[:500], plons[:500])
	if err != nil {
		b.Fatal(err)
	}
	f := DistanceNull(g, ix)
	v := NewVirtual(g, f)
	var pc []int
	xs, ys := make([]float64, len(plats)), make([]float64, len(plats))
	g.FromLonLat(plons, plats, xs, ys)
	for i := range plats {
		if c, row, ok := g.CellOf(xs[i], ys[i]); ok {
			pc = append(pc, row*w+c)
		}
	}
	vals, _, _ := v.Sample(g, pc)
	layout, err := metrics.NewLayout(vals, 4096, metrics.WithHistFloor(DistanceNullFloor(f, g, 4096)))
	if err != nil {
		b.Fatal(err)
	}
	return g, v, layout, fullFamily(g, 8)
}

// mustLayout returns a layout of 1000 values evenly spread over [lo, hi]
// with 4096 histogram bins.
func mustLayout(b *testing.B, lo, hi float64) *metrics.Layout {
	vals := make([]float64, 1000)
	for i := range vals {
		vals[i] = lo + (hi-lo)*float64(i)/1000
	}
	l, err := metrics.NewLayout(vals, 4096)
	if err != nil {
		b.Fatal(err)
	}
	return l
}

// TestVirtualProjectedMatchesNearest checks the null's values cell by cell
// against geodesy.Index.Nearest at each cell centre (transformed to WGS84
// the same way), bit for bit, on projected grids where the tiles are not
// latitude-longitude rectangles: Lambert azimuthal equal-area over Europe
// with 2 km and 50 km cells, and a polar stereographic grid with 25 km cells
// whose scale changes across a tile, and grids of 1 to 4 km cells in
// EPSG:3413 around the pole, EPSG:3832 across the antimeridian, UTM zone
// 33N and EPSG:3857; and the pass's bounds of the null (Field.Bounds, on
// the field DistanceNull makes: NewPoints with CellCentres and
// CellPoints) against those distances. On the grids of fine cells most
// centres must be interpolated: the bounds ask PROJ for at most maxAsked
// of the cells in blocks of 64 (our own cut-off, with room from the
// design's about 8 lattice points in 256 cells).
func TestVirtualProjectedMatchesNearest(t *testing.T) {
	cases := []struct {
		name string
		crs  string
		gt   [6]float64
		w, h int
		// sites in lat/lon
		lat0, lon0, spread float64
		maxAsked           float64 // share of cells
	}{
		{"laea-2km", "EPSG:3035", [6]float64{3.9e6, 2000, 0, 3.1e6, 0, -2000}, 180, 140, 48.5, 8, 1.5, 0.15},
		{"laea-50km", "EPSG:3035", [6]float64{2.5e6, 50000, 0, 5.0e6, 0, -50000}, 90, 70, 50, 10, 12, 2},
		{"polar-25km", "EPSG:3413", [6]float64{-2.0e6, 25000, 0, 2.0e6, 0, -25000}, 160, 160, 80, -40, 6, 2},
		{"polar-2km", "EPSG:3413", [6]float64{-160e3, 2000, 0, 140e3, 0, -2000}, 160, 140, 88.5, 0, 1, 0.15},
		{"antimeridian-2km", "EPSG:3832", [6]float64{3.2e6, 2000, 0, 1.0e6, 0, -2000}, 180, 140, 8.5, 180, 1, 0.15},
		{"utm-1km", "EPSG:32633", [6]float64{300e3, 1000, 0, 5.6e6, 0, -1000}, 180, 140, 50, 14, 0.5, 0.15},
		{"webmercator-4km", "EPSG:3857", [6]float64{1.0e6, 4000, 0, 8.6e6, 0, -4000}, 180, 140, 59, 11, 1, 0.15},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			g, err := extent.NewGrid(tc.w, tc.h, tc.gt, tc.crs)
			if err != nil {
				t.Fatal(err)
			}
			defer g.Close()
			var lats, lons []float64
			for i := range 15 {
				lats = append(lats, math.Max(-89.9, math.Min(89.9, tc.lat0+tc.spread*math.Sin(float64(i)*2.1))))
				lons = append(lons, tc.lon0+tc.spread*1.5*math.Cos(float64(i)*1.3))
			}
			ix, err := geodesy.NewIndex(lats, lons)
			if err != nil {
				t.Fatal(err)
			}
			cen := CellCentres(g)
			pts := CellPoints(g)
			var asked atomic.Int64
			f := nullmodel.NewPoints(ix, func(row, c0, c1 int, lons, lats []float64) {
				asked.Add(int64(c1 - c0))
				cen(row, c0, c1, lons, lats)
			}, func(cols, rows []int, lons, lats []float64) {
				asked.Add(int64(len(cols)))
				pts(cols, rows, lons, lats)
			})
			got := make([]float64, g.Cells())
			buf := make([]float64, 64*64)
			for y0 := 0; y0 < g.Height; y0 += 64 {
				for x0 := 0; x0 < g.Width; x0 += 64 {
					w, h := min(64, g.Width-x0), min(64, g.Height-y0)
					f.Distances(x0, y0, w, h, nil, buf)
					for y := range h {
						copy(got[(y0+y)*g.Width+x0:], buf[y*w:(y+1)*w])
					}
				}
			}
			lo, la := make([]float64, g.Width), make([]float64, g.Width)
			bad := 0
			for r := range g.Height {
				cen(r, 0, g.Width, lo, la)
				for c := range g.Width {
					_, want := ix.Nearest(la[c], lo[c], 0)
					if v := got[r*g.Width+c]; v != want && !(math.IsNaN(v) && math.IsNaN(want)) {
						if bad < 5 {
							t.Errorf("cell %d,%d: %v, Nearest %v", c, r, v, want)
						}
						bad++
					}
				}
			}
			if bad > 0 {
				t.Errorf("%d of %d cells differ", bad, g.Cells())
			}
			// The bounds of the pass (Field.Bounds on the null's layout):
			// each holds minus Nearest's distance, shares its bins at both
			// ends, is Nearest's value bit for bit where degenerate, and is
			// the same for blocks cut in two ways.
			var vals []float64
			for i := 0; i < len(got); i += 37 {
				vals = append(vals, 0-got[i])
			}
			layout, err := metrics.NewLayout(vals, 4096, metrics.WithHistFloor(DistanceNullFloor(f, g, 4096)))
			if err != nil {
				t.Fatal(err)
			}
			fb := newFloorBinner(layout)
			var ref []float64
			for _, bs := range [][2]int{{64, 64}, {45, 30}} {
				asked.Store(0)
				lo, hi := make([]float64, g.Cells()), make([]float64, g.Cells())
				blo, bhi := make([]float64, bs[0]*bs[1]), make([]float64, bs[0]*bs[1])
				for y0 := 0; y0 < g.Height; y0 += bs[1] {
					for x0 := 0; x0 < g.Width; x0 += bs[0] {
						w, h := min(bs[0], g.Width-x0), min(bs[1], g.Height-y0)
						f.Bounds(x0, y0, w, h, nil, fb, blo, bhi)
						for y := range h {
							copy(lo[(y0+y)*g.Width+x0:], blo[y*w:(y+1)*w])
							copy(hi[(y0+y)*g.Width+x0:], bhi[y*w:(y+1)*w])
						}
					}
				}
				exact := 0
				for i, d := range got {
					v := 0 - d
					ok := lo[i] <= v && v <= hi[i] && layout.Locate(lo[i]) == layout.Locate(hi[i]) && layout.FloorBin(lo[i]) == layout.FloorBin(hi[i])
					if lo[i] == hi[i] {
						ok = lo[i] == v
						exact++
					}
					if math.IsNaN(d) {
						ok = math.IsNaN(lo[i]) && math.IsNaN(hi[i])
					}
					if !ok {
						t.Fatalf("blocks %v cell %d: bounds [%.9f, %.9f], value %.9f", bs, i, lo[i], hi[i], v)
					}
				}
				t.Logf("blocks %v: %d of %d cells exact, %d centres asked for", bs, exact, g.Cells(), asked.Load())
				if got := float64(asked.Load()) / float64(g.Cells()); bs[0] == 64 && got > tc.maxAsked {
					t.Errorf("blocks %v: centres of %.1f%% of the cells asked for, want at most %.0f%%", bs, 100*got, 100*tc.maxAsked)
				}
				// Coarse cells (25 and 50 km) put the anchors' cells far
				// apart, so fewer are bounded; a fifth must be.
				if exact > g.Cells()*4/5 {
					t.Errorf("blocks %v: %d of %d cells exact, want a fifth bounded", bs, exact, g.Cells())
				}
				key := append(lo, hi...)
				if ref == nil {
					ref = key
					continue
				}
				for i := range key {
					if key[i] != ref[i] && !(math.IsNaN(key[i]) && math.IsNaN(ref[i])) {
						t.Fatalf("blocks %v: bounds of cell %d differ from blocks of 64", bs, i%g.Cells())
					}
				}
			}
		})
	}
}

// panicField is a Field with a bug: it panics on the second block of a row.
type panicField struct{}

func (panicField) Fill(x0, y0, w, h int, need []uint64, dst []float64) {
	if x0 == VirtualBlock {
		panic("index out of range in a test field")
	}
	for i := range dst[:w*h] {
		dst[i] = float64(i % 7)
	}
}

// TestWorkerPanicIsInternalError checks that a panic on a worker ends the
// pass with an *InternalError naming the panic, for 1 and 2 workers,
// instead of killing the process or hanging the other workers.
func TestWorkerPanicIsInternalError(t *testing.T) {
	g, _, _, fam := nullSetup(t)
	layout, err := metrics.NewLayout([]float64{3}, 64)
	if err != nil {
		t.Fatal(err)
	}
	for _, workers := range []int{1, 2} {
		_, _, err := NewVirtual(g, panicField{}).Score(g, fam, layout, Options{Workers: workers})
		var ie *InternalError
		if !errors.As(err, &ie) || !strings.Contains(err.Error(), "index out of range in a test field") {
			t.Errorf("workers=%d: error %v, want an *InternalError with the panic's text", workers, err)
		}
	}
}

// bruteTally returns a rows hook that adds each row's distances (minus the
// null's values) to bg for every member holding the cell, one cell at a
// time through Family.Has: the plain reference for the run's tally.
func bruteTally(g *extent.Grid, fam *extent.Family, bg *nullmodel.Background) func(int, int, []float64, []int64) {
	return func(row, c0 int, vals []float64, w []int64) {
		for k := range fam.Members {
			var d []float64
			var wk []int64
			for i, x := range vals {
				if fam.Has(k, row*g.Width+c0+i) {
					d, wk = append(d, -x), append(wk, w[i])
				}
			}
			bg.Add(k, d, wk)
		}
	}
}

// TestFloorBinnerCell checks floorBinner against the layout's Locate and
// FloorBin, which define the bins: for values drawn at, next to and
// between the layout's values and the floor grid's edges, v is in its own
// cell, a second value u is in v's cell iff Locate places both in the
// same exact bin, and the floor bins of nullmodel's rule (floor(v * s),
// -1 for a product underflowing to -0) are FloorBin's.
func TestFloorBinnerCell(t *testing.T) {
	layout, err := metrics.NewLayout([]float64{-100, -37.5, -5, 32, 33, 90}, 64, metrics.WithHistFloor(4))
	if err != nil {
		t.Fatal(err)
	}
	b := newFloorBinner(layout)
	if b.FloorScale() != 1.0/16 {
		t.Fatalf("floor scale %v, want 2^-4", b.FloorScale())
	}
	var probes []float64
	for _, x := range []float64{-112, -100, -96, -37.5, -32, -16, -5, 0, 16, 32, 33, 48, 90, 96} {
		probes = append(probes, x, math.Nextafter(x, math.Inf(-1)), math.Nextafter(x, math.Inf(1)), x+0.25, x-3.5)
	}
	probes = append(probes, math.Copysign(0, -1), -1e-310)
	in := func(u, lo, hi float64, closed bool) bool { return lo < u && u < hi || closed && u == lo }
	for _, v := range probes {
		lo, hi, closed := b.Cell(v)
		if !in(v, lo, hi, closed) {
			t.Errorf("%v: not in its own cell (%v, %v) closed %v", v, lo, hi, closed)
		}
		for _, u := range probes {
			if got, same := in(u, lo, hi, closed), layout.Locate(u) == layout.Locate(v); got != same {
				t.Errorf("%v in the cell of %v (%v, %v) closed %v: %v, Locate says %v", u, v, lo, hi, closed, got, same)
			}
		}
		x := math.Floor(v * b.FloorScale())
		if x == 0 && v < 0 {
			x = -1
		}
		if x != float64(layout.FloorBin(v)) {
			t.Errorf("%v: floor bin %v, FloorBin %d", v, x, layout.FloorBin(v))
		}
	}
}
