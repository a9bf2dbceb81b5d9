package extent

import (
	"math"
	"testing"
)

// FuzzNewGrid feeds arbitrary sizes and geotransforms to NewGrid. A grid
// must either be refused with an error or satisfy the invariants the rest
// of areasweep relies on: every cell centre maps back to its own cell,
// cell areas are finite and positive, and WGS84 round trips stay on the
// grid. It must never panic or hang.
func FuzzNewGrid(f *testing.F) {
	f.Add(48, 32, 10.0, 0.25, 0.0, 48.0, 0.0, -0.25, uint8(0))
	f.Add(360, 180, -180.0, 1.0, 0.0, 90.0, 0.0, -1.0, uint8(0))
	f.Add(10, 10, 170.0, 1.0, 0.0, 10.0, 0.0, -1.0, uint8(0))
	f.Add(20, 30, 4321000.0, 1000.0, 0.0, 3210000.0, 0.0, -1000.0, uint8(1))
	f.Add(16, 16, -1e6, 5000.0, 0.0, 6e6, 0.0, -5000.0, uint8(2))
	f.Add(1, 1, math.Inf(1), 1.0, 0.0, 0.0, 0.0, -1.0, uint8(0))
	f.Add(4, 4, 1e17, 1e-3, 0.0, 0.0, 0.0, -1e-3, uint8(1))
	crs := []string{"EPSG:4326", "EPSG:3035", "EPSG:3857"}
	f.Fuzz(func(t *testing.T, w, h int, g0, g1, g2, g3, g4, g5 float64, c uint8) {
		// Keep the fuzzed grids small enough to derive quickly; the size
		// limits themselves are checked separately below.
		if w > 64 || h > 64 {
			if err := CheckGeoTransform(w, h, [6]float64{g0, g1, g2, g3, g4, g5}); err == nil && int64(w)*int64(h) > MaxGridCells {
				t.Fatalf("%dx%d accepted beyond MaxGridCells", w, h)
			}
			return
		}
		gt := [6]float64{g0, g1, g2, g3, g4, g5}
		g, err := NewGrid(w, h, gt, crs[int(c)%len(crs)])
		if err != nil {
			return
		}
		defer g.Close()
		for _, rc := range [][2]int{{0, 0}, {w - 1, h - 1}, {w / 2, h / 2}} {
			x, y := g.Centre(rc[0], rc[1])
			col, row, ok := g.CellOf(x, y)
			if !ok || col != rc[0] || row != rc[1] {
				t.Fatalf("grid %dx%d %v: centre of cell %v maps to (%d,%d,%v)", w, h, gt, rc, col, row, ok)
			}
			areas := g.RowAreas(rc[1], nil)
			for _, a := range areas {
				if !(a > 0) || math.IsInf(a, 0) {
					t.Fatalf("grid %dx%d %v %s: row %d cell area %v", w, h, gt, g.CRS, rc[1], a)
				}
			}
			if g.Geographic {
				xs, ys := []float64{0}, []float64{0}
				g.FromLonLat([]float64{x}, []float64{y}, xs, ys)
				if c2, r2, ok := g.CellOf(xs[0], ys[0]); !ok || c2 != rc[0] || r2 != rc[1] {
					t.Fatalf("grid %v: lon/lat of centre %v maps to (%d,%d,%v)", gt, rc, c2, r2, ok)
				}
			}
		}
	})
}
