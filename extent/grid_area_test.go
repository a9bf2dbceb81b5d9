package extent

import (
	"math"
	"math/rand/v2"
	"runtime"
	"slices"
	"strings"
	"testing"

	"areasweep/extent/geodesy"
)

// cellTrueAreaKm2 is the true area of cell (c, r) of a projected grid: the
// WGS84 area (geodesy.PolygonArea, PROJ's geodesic polygon area, Karney
// 2013) of its outline densified 16 points per side and transformed to
// longitude/latitude.
func cellTrueAreaKm2(g *Grid, c, r int) float64 {
	gt := g.GeoTransform
	const k = 16
	x0, x1 := gt[0]+float64(c)*gt[1], gt[0]+float64(c+1)*gt[1]
	y0, y1 := gt[3]+float64(r)*gt[5], gt[3]+float64(r+1)*gt[5]
	var xs, ys []float64
	for i := 0; i < 4*k; i++ {
		f := float64(i%k) / k
		switch i / k {
		case 0:
			xs, ys = append(xs, x0+f*(x1-x0)), append(ys, y1)
		case 1:
			xs, ys = append(xs, x1), append(ys, y1+f*(y0-y1))
		case 2:
			xs, ys = append(xs, x1-f*(x1-x0)), append(ys, y0)
		default:
			xs, ys = append(xs, x0), append(ys, y0-f*(y0-y1))
		}
	}
	lons := make([]float64, len(xs))
	lats := make([]float64, len(xs))
	g.ToLonLat(xs, ys, lons, lats)
	a, _ := geodesy.PolygonArea(lats, lons)
	return math.Abs(a) / 1e6
}

// TestBlockAreas checks the cell areas of a Web Mercator grid too large
// for one area ratio per cell (1200 x 1200 cells of 30 km, to 84 degrees
// of latitude: blocks of 2 x 2 cells) against each cell's true area, and
// that a cell's area does not depend on the range of cells asked for. With
// one ratio per block the worst of 3,000 random cells was 0.47% off (the
// ratio changes by about 2% across a block at high latitudes); with the
// ratio interpolated between block centres, 0.0045%.
func TestBlockAreas(t *testing.T) {
	g, err := NewGrid(1200, 1200, [6]float64{-18000000, 30000, 0, 18000000, 0, -30000}, "EPSG:3857")
	if err != nil {
		t.Fatal(err)
	}
	defer g.Close()
	if g.factorStep != 2 {
		t.Fatalf("block side %d cells, want 2", g.factorStep)
	}
	r := rand.New(rand.NewPCG(1, 2))
	worst := 0.0
	for i := 0; i < 3000; i++ {
		c, row := r.IntN(g.Width), r.IntN(g.Height)
		got := g.RowAreasRange(row, c, c+1, nil)[0]
		want := cellTrueAreaKm2(g, c, row)
		worst = math.Max(worst, math.Abs(got-want)/want)
	}
	if worst > 1e-4 {
		t.Errorf("worst cell area %.3g relative off its true area, want at most 1e-4", worst)
	}
	full := make([]float64, g.Width)
	for k := 0; k < 300; k++ {
		row := r.IntN(g.Height)
		full = g.RowAreasRange(row, 0, g.Width, full)
		c0 := r.IntN(g.Width)
		c1 := c0 + 1 + r.IntN(g.Width-c0)
		for i, v := range g.RowAreasRange(row, c0, c1, nil) {
			if v != full[c0+i] {
				t.Fatalf("row %d cell %d: %v asked in [%d,%d), %v in the whole row", row, c0+i, v, c0, c1, full[c0+i])
			}
		}
	}
}

// TestProjectedCellAreas checks the area of one cell of grids in
// projections that are not equal-area (one area ratio per cell) against
// its true WGS84 area from pyproj (testdata/geodesy/projected_cells.py:
// Geod.polygon_area_perimeter of the outline densified 4096 points per
// side), to 1e-9 relative (our tolerance). Before the fix the ratio came
// from the outline densified 4 points per side alone, whose geodesic edges
// differ from the grid's straight ones: 3.5e-7 off on a 40 km Web Mercator
// cell, 2e-7 on polar stereographic ones, 1.3e-8 on a 10 km UTM cell,
// which moved a whole-raster AUC by 1.4e-8.
func TestProjectedCellAreas(t *testing.T) {
	cells := readCellGolden(t, "projected_cells.txt")
	for _, name := range []string{"Web Mercator 40 km, 58 N", "Web Mercator 40 km, 72 N",
		"polar stereographic north, pole at a corner", "polar stereographic north, 2000 km from the pole",
		"polar stereographic south, pole inside", "UTM 33N 10 km", "UTM 33N 2 km", "US survey feet (EPSG:2227)"} {
		t.Run(name, func(t *testing.T) {
			tc, g := cells.grid(t, name)
			defer g.Close()
			if g.EqualArea || g.factorStep != 1 {
				t.Fatalf("want one area ratio per cell, got equal-area %v, blocks of %d (%s)", g.EqualArea, g.factorStep, g.AreaMethod)
			}
			got := g.RowAreas(tc.r, nil)[tc.c]
			if math.Abs(got/tc.want-1) > 1e-9 {
				t.Errorf("cell area %.15g km2, want %.15g (true WGS84 area), %.3g relative off", got, tc.want, got/tc.want-1)
			}
		})
	}
}

// TestWorldMapCornersAdvice: a world grid in Robinson (ESRI:54030), as
// gdalwarp writes one, has corner cells outside the map that PROJ cannot
// invert. Its cells' true areas cannot be computed there, so it is
// refused; before the fix the message said only that the CRS "covers more
// than PROJ can invert", with nothing to do. It now names the CRS and
// says to warp the raster to an equal-area CRS or clip it: the advised
// gdalwarp -t_srs ESRI:54009 of such a raster (a GeoTIFF, which holds
// Mollweide, where GDAL 3.6 writes Equal Earth into an .aux.xml) then
// runs (checked by hand, exit 0).
func TestWorldMapCornersAdvice(t *testing.T) {
	_, err := NewGrid(180, 90, [6]float64{-17005833.33, 188953.7, 0, 8625154.47, 0, -191670.1}, "ESRI:54030")
	if err == nil {
		t.Fatal("world Robinson grid with corners off the map opened; want a refusal")
	}
	for _, want := range []string{"column 0 row 0", "Robinson", "outside the map", "gdalwarp -t_srs ESRI:54009", "gdalwarp -te"} {
		if !strings.Contains(err.Error(), want) {
			t.Errorf("message %q lacks %q", err, want)
		}
	}
}

// TestBlockFactorsShared: grids of one geometry compute their block
// factors once (the second shares the first's, as the memory estimate's,
// the study's and each model's grid of a run do: before, each computed
// them, about 6 s apiece on a UTM grid of 2000 x 2000 cells), another
// geometry gets its own, the cache keeps at most geometryCacheSize
// geometries, and the factors are the same computed on one worker as on
// several.
func TestBlockFactorsShared(t *testing.T) {
	gt := [6]float64{300000, 2000, 0, 5600000, 0, -2000}
	open := func(gt [6]float64) *Grid {
		g, err := NewGrid(300, 200, gt, "EPSG:32633")
		if err != nil {
			t.Fatal(err)
		}
		t.Cleanup(g.Close)
		if g.EqualArea || len(g.blockFactor) == 0 || g.FactorTime <= 0 {
			t.Fatalf("want block factors and their time, got equal-area %v, %d factors, %v", g.EqualArea, len(g.blockFactor), g.FactorTime)
		}
		return g
	}
	g1, g2 := open(gt), open(gt)
	if &g1.blockFactor[0] != &g2.blockFactor[0] || g1.FactorTime != g2.FactorTime {
		t.Errorf("a second grid of the same geometry computed its factors again")
	}
	moved := gt
	moved[3] += 2000
	if g3 := open(moved); &g3.blockFactor[0] == &g1.blockFactor[0] {
		t.Errorf("a grid one row to the north shares the factors of the first")
	}
	for k := 0; k < geometryCacheSize+2; k++ {
		other := gt
		other[0] += float64(k+2) * 2000
		open(other)
	}
	if n := len(factorCache.keys); n > geometryCacheSize || n != len(factorCache.entries) {
		t.Errorf("cache holds %d keys and %d entries, want at most %d", n, len(factorCache.entries), geometryCacheSize)
	}
	prev := runtime.GOMAXPROCS(1)
	one := g1.makeFactors()
	runtime.GOMAXPROCS(4)
	many := g1.makeFactors()
	runtime.GOMAXPROCS(prev)
	if one.err != nil || many.err != nil {
		t.Fatal(one.err, many.err)
	}
	if !slices.Equal(one.factor, many.factor) || !slices.Equal(one.factor, g1.blockFactor) {
		t.Errorf("factors differ between 1 and 4 workers")
	}
}

// TestBlockFactorsSharedEdges: the block factors, made from edges shared
// between neighbouring blocks (geodesy.EdgeAreas), agree with each
// block's own outline measured by geodesy.PolygonArea (PROJ's
// geod_polygonarea, the way they were made before) to 1e-10 relative (our
// tolerance; the sums differ only in rounding), on grids that take the
// shared edges everywhere (UTM, US survey feet, Web Mercator) and on grids
// where some blocks cross the prime meridian or the antimeridian or hold
// a pole and take PolygonArea (UTM 31N, Pacific Mercator, polar
// stereographic with the pole inside a cell), with partial blocks at the
// right and bottom edges (blocks of 2 cells on odd sizes).
func TestBlockFactorsSharedEdges(t *testing.T) {
	for _, tc := range []struct {
		name string
		w, h int
		gt   [6]float64
		crs  string
	}{
		{"UTM 33N", 301, 201, [6]float64{300000, 2000, 0, 5600000, 0, -2000}, "EPSG:32633"},
		{"UTM 31N across the prime meridian", 151, 101, [6]float64{200000, 3000, 0, 5700000, 0, -3000}, "EPSG:32631"},
		{"US survey feet", 121, 91, [6]float64{6000000, 5000, 0, 2200000, 0, -5000}, "EPSG:2227"},
		{"Web Mercator to 80 N", 1201, 1201, [6]float64{-18000000, 30000, 0, 16000000, 0, -30000}, "EPSG:3857"},
		{"Pacific Mercator across the antimeridian", 201, 151, [6]float64{2500000, 10000, 0, 1000000, 0, -10000}, "EPSG:3832"},
		{"polar stereographic, pole inside a cell", 81, 81, [6]float64{-405000, 10000, 0, 405000, 0, -10000}, "EPSG:3413"},
	} {
		t.Run(tc.name, func(t *testing.T) {
			g, err := NewGrid(tc.w, tc.h, tc.gt, tc.crs)
			if err != nil {
				t.Fatal(err)
			}
			defer g.Close()
			if len(g.blockFactor) == 0 {
				t.Fatalf("no block factors (%s)", g.AreaMethod)
			}
			step, gt := g.factorStep, g.GeoTransform
			worst := 0.0
			for br := 0; br*step < g.Height; br++ {
				for bc := 0; bc < g.factorW; bc++ {
					c0, r0 := bc*step, br*step
					c1, r1 := min(c0+step, g.Width), min(r0+step, g.Height)
					x0, x1 := gt[0]+float64(c0)*gt[1], gt[0]+float64(c1)*gt[1]
					y0, y1 := gt[3]+float64(r0)*gt[5], gt[3]+float64(r1)*gt[5]
					xm, ym := x0+0.5*(x1-x0), y1+0.5*(y0-y1)
					xs := []float64{x0, xm, x1, x1, x1, xm, x0, x0}
					ys := []float64{y1, y1, y1, ym, y0, y0, y0, ym}
					lons, lats := make([]float64, 8), make([]float64, 8)
					g.ToLonLat(xs, ys, lons, lats)
					area, _ := geodesy.PolygonArea(lats, lons)
					area1, _ := geodesy.PolygonArea([]float64{lats[0], lats[2], lats[4], lats[6]}, []float64{lons[0], lons[2], lons[4], lons[6]})
					if math.Abs(area-area1) < 0.01*math.Abs(area) {
						area += (area - area1) / 3
					}
					want := math.Abs(area) / ((x1 - x0) * (y0 - y1))
					worst = math.Max(worst, math.Abs(g.blockFactor[br*g.factorW+bc]/want-1))
				}
			}
			if worst > 1e-10 {
				t.Errorf("worst block factor %.3g relative off its outline's PolygonArea, want at most 1e-10", worst)
			}
		})
	}
}
