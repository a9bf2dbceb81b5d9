package pass

import (
	"fmt"
	"path/filepath"
	"testing"

	"areasweep/metrics"
)

// TestBlocksInCountsTheBlocksRead: BlocksIn, which run.log gives for a
// pass ("block by block (N blocks)", "in N windows of ..."), is the
// number of blocks the pass itself reports having scored (its progress:
// the last done and its total), for every row range of a shard and for
// none, on a tiled raster, a raster read in windows of its one strip (the
// cap lowered to windows of 300 x 16 cells) and a Virtual. A shard's
// run.log gave the whole raster's count (7 windows for the 4 that shard 1
// of 2 of a one-strip model read).
func TestBlocksInCountsTheBlocksRead(t *testing.T) {
	defer func(n int) { readCells = n }(readCells)
	readCells = 300 * 16
	dir := t.TempDir()
	w, h := 300, 500
	value := func(r, c int) float32 { return float32((r*7+c*3)%100) / 100 }
	tiled := filepath.Join(dir, "tiled.tif")
	strip := filepath.Join(dir, "strip.tif")
	writeGridRaster(t, tiled, w, h, false, value, "TILED=YES", "BLOCKXSIZE=64", "BLOCKYSIZE=64")
	writeGridRaster(t, strip, w, h, false, value, "BLOCKYSIZE=500", "COMPRESS=DEFLATE")
	layout, err := metrics.NewLayout([]float64{0.5}, 64)
	if err != nil {
		t.Fatal(err)
	}
	g, rt := openPath(t, tiled)
	defer g.Close()
	defer rt.Close()
	_, rs := openPath(t, strip)
	defer rs.Close()
	if rt.windowed || !rs.windowed {
		t.Fatalf("windowed: tiled %v, strip %v; want false, true", rt.windowed, rs.windowed)
	}
	fam := fullFamily(g, 2)
	vals := make([]float64, w*h)
	for i := range vals {
		vals[i] = float64(value(i/w, i%w))
	}
	v := NewVirtual(g, cellField{width: w, vals: vals})
	for _, rows := range []*RowRange{nil, {0, 250}, {250, 500}, {0, 1}, {63, 65}, {100, 101}, {499, 500}, {17, 400}} {
		for name, src := range map[string]interface {
			BlocksIn(*RowRange) int
		}{"tiled": rt, "strip": rs, "virtual": v} {
			var done, total int
			opt := Options{Workers: 2, RowRange: rows, Progress: func(d, n int) { done, total = d, n }}
			switch s := src.(type) {
			case *Raster:
				_, _, err = s.Score(g, fam, layout, opt)
			case *Virtual:
				_, _, err = s.Score(g, fam, layout, opt)
			}
			if err != nil {
				t.Fatal(err)
			}
			if got := src.BlocksIn(rows); got != done || got != total {
				t.Errorf("%s, rows %v: BlocksIn %d, the pass scored %d of %d blocks", name, rows, got, done, total)
			}
		}
	}
	if rt.BlocksIn(nil) != rt.Blocks() || rs.BlocksIn(nil) != rs.Blocks() || v.BlocksIn(nil) != v.Blocks() {
		t.Errorf("BlocksIn(nil) %d %d %d, want Blocks %d %d %d", rt.BlocksIn(nil), rs.BlocksIn(nil), v.BlocksIn(nil), rt.Blocks(), rs.Blocks(), v.Blocks())
	}
}

// TestStripsWording: run.log's words for a windowed raster (the cap
// lowered to 300 x 16 cells, windows of 16 rows), the expected counts
// worked by hand from the layouts: a one-strip 300 x 500 raster is read
// in 32 windows (500 / 16 rounded up) inside 1 strip; a shard of rows 0
// to 9 meets 1 window ("1 windows" before); strips of 200 rows are 3
// strips (500 / 200 rounded up); a 512 x 512 tile on a 300 x 500 grid is
// a block of 512 x 512 cells, not "a strip of 512 rows" on a grid of 500.
func TestStripsWording(t *testing.T) {
	defer func(n int) { readCells = n }(readCells)
	readCells = 300 * 16
	dir := t.TempDir()
	value := func(r, c int) float32 { return float32((r*7+c*3)%100) / 100 }
	for _, tc := range []struct {
		name string
		opts []string
		rows *RowRange
		want string
	}{
		{"one strip", []string{"BLOCKYSIZE=500", "COMPRESS=DEFLATE"}, nil,
			"in 32 windows of 16 rows inside its 1 strip of 500 rows, each strip decoded once (1 MB)"},
		{"one strip, a shard of 10 rows", []string{"BLOCKYSIZE=500", "COMPRESS=DEFLATE"}, &RowRange{0, 10},
			"in 1 window of 16 rows inside its 1 strip of 500 rows, each strip decoded once (1 MB)"},
		{"strips of 200 rows", []string{"BLOCKYSIZE=200", "COMPRESS=DEFLATE"}, nil,
			"in 32 windows of 16 rows inside its 3 strips of 200 rows, each strip decoded once (0 MB)"},
		{"a tile larger than the grid", []string{"TILED=YES", "BLOCKXSIZE=512", "BLOCKYSIZE=512", "COMPRESS=DEFLATE"}, nil,
			"in 32 windows of 16 rows inside its 1 block of 512 x 512 cells, each block decoded once (1 MB)"},
	} {
		path := filepath.Join(dir, fmt.Sprintf("r%d.tif", len(tc.name)))
		writeGridRaster(t, path, 300, 500, false, value, tc.opts...)
		g, r := openPath(t, path)
		if got := r.Strips(tc.rows); got != tc.want {
			t.Errorf("%s: got %q, want %q", tc.name, got, tc.want)
		}
		r.Close()
		g.Close()
	}
}
