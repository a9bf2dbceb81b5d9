package pass

import (
	"sync/atomic"
	"testing"

	"areasweep/extent"
	"areasweep/metrics"
)

// TestScoreWorkersAtMostBlocks checks that a pass starts no more workers
// (each opens its own source and holds a block's buffer) than it has
// blocks to score: a raster stored as one strip of 8000 x 6400 Float32
// cells is one block, and a second worker held a second buffer of 390 MB
// for nothing (peak 1.88 GB instead of 1.74 GB). The expected counts are
// the blocks of each case, counted by hand: the grid of 70 x 50 cells in
// blocks of 70 x 50 is one, in blocks of 70 x 20 three, of which rows
// 25 to 34 meet one.
func TestScoreWorkersAtMostBlocks(t *testing.T) {
	w, h := 70, 50
	g, err := extent.NewGrid(w, h, [6]float64{-20, 0.05, 0, 70, 0, -0.05}, "EPSG:4326")
	if err != nil {
		t.Fatal(err)
	}
	defer g.Close()
	vals := make([]float32, w*h)
	for i := range vals {
		vals[i] = float32(i%97) / 97
	}
	layout, err := metrics.NewLayout([]float64{0.1, 0.5, 0.9}, 64)
	if err != nil {
		t.Fatal(err)
	}
	raster := &Raster{nodata: -9999, hasNodata: true, scale: 1}
	fam := benchFamilies(g)["full8"]
	for _, tc := range []struct {
		name    string
		blockH  int
		rows    *RowRange
		workers int
		want    int32
	}{
		{"one block, 4 workers", 50, nil, 4, 1},
		{"three blocks, 8 workers", 20, nil, 8, 3},
		{"three blocks, 2 workers", 20, nil, 2, 2},
		{"rows meeting one block of three, 8 workers", 20, &RowRange{First: 25, End: 35}, 8, 1},
	} {
		t.Run(tc.name, func(t *testing.T) {
			var opened atomic.Int32
			p := plan{width: w, height: h, blockW: w, blockH: tc.blockH, decode: raster.decode,
				open: func() (Source, error) { opened.Add(1); return memSource{w: w, vals: vals}, nil }}
			valid := extent.NewValid(g.Width, g.Height)
			if _, _, err := score(p, g, fam, fam.Groups(), layout, Options{Workers: tc.workers, RowRange: tc.rows, Valid: valid}); err != nil {
				t.Fatal(err)
			}
			if got := opened.Load(); got != tc.want {
				t.Errorf("%d workers opened a source, want %d", got, tc.want)
			}
		})
	}
}
