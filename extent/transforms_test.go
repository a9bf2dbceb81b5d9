package extent

import (
	"math"
	"sync"
	"testing"
)

// TestTransformsConcurrent converts every row of projected grids (Lambert
// azimuthal equal-area over Europe, EPSG:3035, and a polar stereographic
// grid, EPSG:3413) from 8 goroutines at once, each asking for its own
// transformation (Grid.transforms), and requires the coordinates of a
// conversion one row at a time on one goroutine, bit for bit, both ways.
// Run it with -race for the Go side; a shared PROJ object would show as
// wrong or NaN coordinates.
func TestTransformsConcurrent(t *testing.T) {
	for _, tc := range []struct {
		crs string
		gt  [6]float64
	}{
		{"EPSG:3035", [6]float64{2500000, 10000, 0, 5500000, 0, -10000}},
		{"EPSG:3413", [6]float64{-3000000, 25000, 0, 3000000, 0, -25000}},
	} {
		g, err := NewGrid(300, 240, tc.gt, tc.crs)
		if err != nil {
			t.Fatal(err)
		}
		want := make([][4][]float64, g.Height)
		for r := range want {
			lons, lats := make([]float64, g.Width), make([]float64, g.Width)
			g.RowLonLat(r, lons, lats)
			xs, ys := make([]float64, g.Width), make([]float64, g.Width)
			g.FromLonLat(lons, lats, xs, ys)
			want[r] = [4][]float64{lons, lats, xs, ys}
		}
		got := make([][4][]float64, g.Height)
		var wg sync.WaitGroup
		for w := range 8 {
			wg.Add(1)
			go func() {
				defer wg.Done()
				for range 3 {
					for r := w; r < g.Height; r += 8 {
						lons, lats := make([]float64, g.Width), make([]float64, g.Width)
						g.RowLonLat(r, lons, lats)
						xs, ys := make([]float64, g.Width), make([]float64, g.Width)
						g.FromLonLat(lons, lats, xs, ys)
						got[r] = [4][]float64{lons, lats, xs, ys}
					}
				}
			}()
		}
		wg.Wait()
		for r := range want {
			for k := range 4 {
				for c := range want[r][k] {
					a, b := got[r][k][c], want[r][k][c]
					if math.Float64bits(a) != math.Float64bits(b) {
						t.Fatalf("%s row %d column %d coordinate %d: %v concurrently, %v alone", tc.crs, r, c, k, a, b)
					}
				}
			}
		}
		if n := len(g.toLL.all); n < 2 {
			t.Errorf("%s: %d transformations made for 8 concurrent callers; they took turns on one", tc.crs, n)
		}
		g.Close()
	}
}

// TestToLonLatPointByPoint converts rows of projected grids whole, cell by
// cell and in runs of 1 to 7 cells, and requires the same coordinates bit
// for bit (NaN where the whole row gives NaN): the distance fields of the
// buffers (bandPoints) and the distance-only null transform a cell alone or
// with its neighbours as they need it, and rely on a cell's coordinates
// not depending on the points converted with it. Grids: Lambert azimuthal
// equal-area over Europe (EPSG:3035, whose CRS PROJ relates to WGS84 by
// more than one operation), polar stereographic over the North Pole
// (EPSG:3413, the pole a cell corner), a Mercator centred on 150°E across
// the antimeridian (EPSG:3832), UTM zone 33N reaching 25° east of its
// central meridian (EPSG:32633) and ED50 / UTM 31N (EPSG:23031, a datum
// shift to WGS84); and a LAEA grid reaching beyond the projection's
// disc, whose outer cells have no coordinates.
func TestToLonLatPointByPoint(t *testing.T) {
	nanAll, wrapAll := 0, 0
	for _, tc := range []struct {
		crs string
		gt  [6]float64
	}{
		{"EPSG:3035", [6]float64{-2e6, 60000, 0, 9e6, 0, -60000}},
		{"EPSG:3035", [6]float64{4.321e6 - 1.5e7, 250000, 0, 3.21e6 + 1.5e7, 0, -250000}},
		{"EPSG:3413", [6]float64{-1.5e6, 25000, 0, 1.5e6, 0, -25000}},
		{"EPSG:3832", [6]float64{2.5e6, 40000, 0, 1e6, 0, -40000}},
		{"EPSG:32633", [6]float64{-2e6, 50000, 0, 9e6, 0, -50000}},
		{"EPSG:23031", [6]float64{-5e5, 30000, 0, 6.5e6, 0, -30000}},
	} {
		g, err := NewGrid(120, 120, tc.gt, tc.crs)
		if err != nil {
			t.Fatal(err)
		}
		lons, lats := make([]float64, g.Width), make([]float64, g.Width)
		one := func(c, r int) (float64, float64) {
			x, y := g.Centre(c, r)
			xs, ys := []float64{x}, []float64{y}
			g.ToLonLat(xs, ys, xs, ys)
			return xs[0], ys[0]
		}
		nan, lonWrap := 0, 0
		for r := 0; r < g.Height; r += 7 {
			g.RowLonLat(r, lons, lats)
			rl, rt := make([]float64, g.Width), make([]float64, g.Width)
			for c := 0; c < g.Width; {
				n := min(1+(c+r)%7, g.Width-c)
				for j := c; j < c+n; j++ {
					rl[j], rt[j] = g.Centre(j, r)
				}
				g.ToLonLat(rl[c:c+n], rt[c:c+n], rl[c:c+n], rt[c:c+n])
				c += n
			}
			for c := range lons {
				lo, la := one(c, r)
				for _, got := range [][2]float64{{lo, la}, {rl[c], rt[c]}} {
					if math.Float64bits(got[0]) != math.Float64bits(lons[c]) || math.Float64bits(got[1]) != math.Float64bits(lats[c]) {
						t.Fatalf("%s row %d column %d: %v, %v converted alone or in a short run, %v, %v with its row", tc.crs, r, c, got[0], got[1], lons[c], lats[c])
					}
				}
				if math.IsNaN(lats[c]) {
					nan++
				} else if c > 0 && math.Abs(lons[c]-lons[c-1]) > 180 {
					lonWrap++
				}
			}
		}
		t.Logf("%s: %d cells without coordinates, %d longitude wraps", tc.crs, nan, lonWrap)
		nanAll, wrapAll = nanAll+nan, wrapAll+lonWrap
		g.Close()
	}
	if nanAll == 0 || wrapAll == 0 {
		t.Errorf("%d cells without coordinates and %d longitude wraps: the grids do not probe both", nanAll, wrapAll)
	}
}
