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
