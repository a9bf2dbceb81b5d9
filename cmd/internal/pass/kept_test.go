package pass

import (
	"bytes"
	"fmt"
	"math"
	"os"
	"path/filepath"
	"reflect"
	"strconv"
	"strings"
	"testing"

	"github.com/airbusgeo/godal"

	"areasweep/extent"
	"areasweep/metrics"
)

// keptCells are cells spread over some of a 300 x 200 grid's 64 x 64
// blocks: 12 blocks of 20 (5 x 4), some holding several cells, one on the
// last partial column and row of blocks. The rows are a 7-step walk down
// the grid, the columns a 53-step walk along it.
func keptCells(g *extent.Grid) []int {
	var cells []int
	for k := 0; k < 40; k++ {
		row := (k * 7) % g.Height
		col := (k*53 + 11) % g.Width
		cells = append(cells, row*g.Width+col)
	}
	return append(cells, -1, g.Cells()-1) // one outside the raster, the last cell
}

// blocksOf counts the distinct blocks (bw x bh) of cells >= 0 whose rows
// meet rr.
func blocksOf(g *extent.Grid, cells []int, bw, bh int, rr RowRange) int {
	seen := map[int]bool{}
	for _, c := range cells {
		if c < 0 {
			continue
		}
		by := c / g.Width / bh
		if by*bh >= rr.End || by*bh+bh <= rr.First {
			continue
		}
		seen[by*1000+c%g.Width/bw] = true
	}
	return len(seen)
}

// TestKeptBlocksSameSums: a pass that takes the blocks Sample kept gives
// exactly what a pass that reads every block gives (every accumulator's
// encoding, the statistics, the valid bits, the preview, the values
// Options.Rows sees), and Sample gives the same values either way; for a
// Float32 band (blocks kept as float32), a Float64 band whose values are
// not float32s (kept as float64) and an Int16 band with a scale and
// offset; with 1 and 3 workers; over every row and over a row range cut
// inside a block row. The pass takes every block with a point (meeting the
// range) and no other; a second pass takes none (they were released).
func TestKeptBlocksSameSums(t *testing.T) {
	dir := t.TempDir()
	type raster struct {
		name string
		typ  godal.DataType
		val  func(r, c int) float64
		ops  []string
	}
	ramp := func(r, c int) float64 {
		return math.Round(1000*(0.5+0.5*math.Sin(float64(c)/37)*math.Cos(float64(r)/53))) / 1000
	}
	for _, rs := range []raster{
		{"float32", godal.Float32, ramp, nil},
		{"float64", godal.Float64, func(r, c int) float64 { return ramp(r, c) + 1e-12*float64(c) }, nil},
		{"int16 scaled", godal.Int16, func(r, c int) float64 { return float64((r*31 + c*17) % 2000) }, []string{"scale"}},
	} {
		path := filepath.Join(dir, strings.ReplaceAll(rs.name, " ", "_")+".tif")
		writeTypedRaster(t, path, 300, 200, rs.typ, rs.val, len(rs.ops) > 0)
		g, r := openPath(t, path)
		if r.narrow != (rs.typ != godal.Float64) {
			t.Fatalf("%s: narrow %v", rs.name, r.narrow)
		}
		cells := keptCells(g)
		fam := nestedFamily(g, 4, true)
		layout, err := metrics.NewLayout([]float64{0.2, 0.5, 0.7, 0.9, 500, 1500}, 256)
		if err != nil {
			t.Fatal(err)
		}
		for _, rr := range []*RowRange{nil, {First: 70, End: 150}} {
			for _, workers := range []int{1, 3} {
				name := fmt.Sprintf("%s rows %v workers %d", rs.name, rr, workers)
				// Without keeping.
				r.KeepBlocks(0, nil)
				wantVals, wantOK, err := r.Sample(g, cells)
				if err != nil {
					t.Fatal(err)
				}
				want := scoreRows(t, g, fam, layout, workers, rr, r.Score)
				if r.Reused() != 0 {
					t.Fatalf("%s: %d blocks reused without keeping", name, r.Reused())
				}
				// Keeping.
				r.KeepBlocks(64<<20, rr)
				vals, ok, err := r.Sample(g, cells)
				if err != nil {
					t.Fatal(err)
				}
				if fmt.Sprint(vals, ok) != fmt.Sprint(wantVals, wantOK) {
					t.Errorf("%s: Sample gives %v %v keeping blocks, %v %v not", name, vals, ok, wantVals, wantOK)
				}
				got := scoreRows(t, g, fam, layout, workers, rr, r.Score)
				all := RowRange{0, g.Height}
				if rr != nil {
					all = *rr
				}
				if n := blocksOf(g, cells, 64, 64, all); r.Reused() != n || n < 3 {
					t.Errorf("%s: the pass took %d kept blocks, want the %d holding points", name, r.Reused(), n)
				}
				sameShare(t, name, got, want)
				// The pass released them: the next one reads every block.
				again := scoreRows(t, g, fam, layout, workers, rr, r.Score)
				if r.Reused() != 0 {
					t.Errorf("%s: a second pass took %d kept blocks", name, r.Reused())
				}
				sameShare(t, name+" (second pass)", again, want)
			}
		}
		r.Close()
		g.Close()
	}
}

// sameShare fails unless got and want are the same pass's results bit for
// bit.
func sameShare(t *testing.T, name string, got, want scoredShare) {
	t.Helper()
	for k := range want.accs {
		if !bytes.Equal(metrics.EncodeAccumulator(got.accs[k]), metrics.EncodeAccumulator(want.accs[k])) {
			t.Errorf("%s: member %d's accumulator differs", name, k)
		}
	}
	if !reflect.DeepEqual(got.stats, want.stats) {
		t.Errorf("%s: stats %+v, want %+v", name, got.stats, want.stats)
	}
	if !bytes.Equal(bitsOf(got.valid), bitsOf(want.valid)) {
		t.Errorf("%s: valid cells differ", name)
	}
	if fmt.Sprint(got.pv.Values) != fmt.Sprint(want.pv.Values) {
		t.Errorf("%s: previews differ", name)
	}
	if fmt.Sprint(got.rows, got.vals) != fmt.Sprint(want.rows, want.vals) {
		t.Errorf("%s: the rows seen differ", name)
	}
}

// bitsOf renders the cells of v as bytes (1: valid), for comparison.
func bitsOf(v *extent.Valid) []byte {
	var b []byte
	for i := range v.Width() * v.Height() {
		if v.Has(i) {
			b = append(b, 1)
		} else {
			b = append(b, 0)
		}
	}
	return b
}

// TestKeptBlocksBudget: a budget of 0 keeps nothing; a budget of one
// Float32 block (64 x 64 x 4 bytes) keeps exactly one block, a byte less
// keeps none (cells in whole blocks only), and the last, partial block
// (44 x 8 cells of the 300 x 200 grid) needs only its own 1408 bytes;
// blocks are kept only for the rows given.
func TestKeptBlocksBudget(t *testing.T) {
	g, r := openTestRasterBlocks(t, 300, 200, 64)
	defer r.Close()
	var whole []int // the cells of keptCells in whole 64 x 64 blocks
	for _, c := range keptCells(g) {
		if c >= 0 && c%g.Width < 256 && c/g.Width < 192 {
			whole = append(whole, c)
		}
	}
	last := []int{g.Cells() - 1}
	fam := fullFamily(g, 2)
	layout, _ := metrics.NewLayout([]float64{0.5}, 64)
	for _, tc := range []struct {
		cells  []int
		budget int64
		rows   *RowRange
		want   int
	}{
		{whole, 0, nil, 0},
		{whole, -1, nil, 0},
		{whole, 64 * 64 * 4, nil, 1},
		{whole, 64*64*4 - 1, nil, 0},
		{last, 44 * 8 * 4, nil, 1},
		{last, 44*8*4 - 1, nil, 0},
		{whole, 1 << 30, nil, blocksOf(g, whole, 64, 64, RowRange{0, g.Height})},
		{whole, 1 << 30, &RowRange{0, 64}, blocksOf(g, whole, 64, 64, RowRange{0, 64})},
	} {
		r.KeepBlocks(tc.budget, tc.rows)
		if _, _, err := r.Sample(g, tc.cells); err != nil {
			t.Fatal(err)
		}
		if _, _, err := r.Score(g, fam, layout, Options{Workers: 2}); err != nil {
			t.Fatal(err)
		}
		if r.Reused() != tc.want {
			t.Errorf("%d cells, budget %d, rows %v: the pass took %d kept blocks, want %d", len(tc.cells), tc.budget, tc.rows, r.Reused(), tc.want)
		}
	}
	if n := blocksOf(g, whole, 64, 64, RowRange{0, 64}); n < 2 || n >= blocksOf(g, whole, 64, 64, RowRange{0, g.Height}) {
		t.Fatalf("the cells meet %d blocks in the first block row: not a test of the rows", n)
	}
	// Score alone, without a Sample before it, reads every block.
	r.KeepBlocks(1<<30, nil)
	if _, _, err := r.Score(g, fam, layout, Options{Workers: 2}); err != nil || r.Reused() != 0 {
		t.Errorf("a pass without a Sample took %d kept blocks (%v)", r.Reused(), err)
	}
}

// TestKeptShardsMerge: passes over row ranges that split the grid, each
// taking the blocks its own Sample kept for its rows, add up to the whole
// pass that reads every block, bit for bit.
func TestKeptShardsMerge(t *testing.T) {
	g, r := openTestRasterBlocks(t, 300, 200, 64)
	defer r.Close()
	cells := keptCells(g)
	fam := nestedFamily(g, 4, true)
	layout, _ := metrics.NewLayout([]float64{0.2, 0.5, 0.7}, 256)
	r.KeepBlocks(0, nil)
	whole := scoreRows(t, g, fam, layout, 2, nil, r.Score)
	var sum scoredShare
	reused := 0
	for i, rr := range []RowRange{{0, 70}, {70, 131}, {131, 200}} {
		r.KeepBlocks(1<<30, &rr)
		if _, _, err := r.Sample(g, cells); err != nil {
			t.Fatal(err)
		}
		sh := scoreRows(t, g, fam, layout, 2, &rr, r.Score)
		reused += r.Reused()
		if i == 0 {
			sum = sh
			continue
		}
		for k := range sum.accs {
			if err := sum.accs[k].Merge(sh.accs[k]); err != nil {
				t.Fatal(err)
			}
		}
		sum.stats.Merge(sh.stats)
		addValid(t, sum.valid, sh.valid)
		for c := 0; c < g.Cells(); c++ {
			if !math.IsNaN(sh.vals[c]) {
				sum.vals[c] = sh.vals[c]
			}
		}
		for row := range sum.rows {
			sum.rows[row] += sh.rows[row]
		}
		for p, v := range sh.pv.Values {
			if !math.IsNaN(v) {
				sum.pv.Values[p] = v
			}
		}
	}
	// A block row cut by a range's edge is kept for both ranges.
	if want := blocksOf(g, cells, 64, 64, RowRange{0, 70}) + blocksOf(g, cells, 64, 64, RowRange{70, 131}) + blocksOf(g, cells, 64, 64, RowRange{131, 200}); reused != want {
		t.Errorf("the shards took %d kept blocks, want %d", reused, want)
	}
	sameShare(t, "shards", sum, whole)
}

// TestKeptDamagedBlock: a block that cannot be decoded is reported with
// the file and the block's column and row, whether Sample meets it (a
// point in it) or the pass does (no point in it), keeping blocks or not.
func TestKeptDamagedBlock(t *testing.T) {
	dir := t.TempDir()
	path := filepath.Join(dir, "damaged.tif")
	writeGridRaster(t, path, 300, 200, false, func(r, c int) float32 { return float32(r*300+c) / 6e4 },
		"TILED=YES", "BLOCKXSIZE=64", "BLOCKYSIZE=64", "COMPRESS=DEFLATE")
	damageBlock(t, path, 2, 1) // the block at column 128, row 64
	g, r := openPath(t, path)
	defer r.Close()
	fam := fullFamily(g, 1)
	layout, _ := metrics.NewLayout([]float64{0.5}, 64)
	want := fmt.Sprintf("%s: the block at column 128 row 64 cannot be read", path)
	for _, keep := range []int64{0, 1 << 30} {
		r.KeepBlocks(keep, nil)
		_, _, err := r.Sample(g, []int{5, 100*300 + 150})
		if err == nil || !strings.Contains(err.Error(), want) {
			t.Errorf("keep %d: Sample over the damaged block: %v, want %q", keep, err, want)
		}
		if _, _, err := r.Sample(g, []int{5, 10*300 + 299}); err != nil {
			t.Fatalf("keep %d: Sample away from the damaged block: %v", keep, err)
		}
		_, _, err = r.Score(g, fam, layout, Options{Workers: 2})
		if err == nil || !strings.Contains(err.Error(), want) {
			t.Errorf("keep %d: the pass: %v, want %q", keep, err, want)
		}
	}
}

// damageBlock overwrites the compressed bytes of block (bx, by) of the
// tiled GeoTIFF at path with bytes that do not inflate.
func damageBlock(t *testing.T, path string, bx, by int) {
	t.Helper()
	ds, err := godal.Open(path)
	if err != nil {
		t.Fatal(err)
	}
	b := ds.Bands()[0]
	off, err1 := strconv.ParseInt(b.Metadata(fmt.Sprintf("BLOCK_OFFSET_%d_%d", bx, by), godal.Domain("TIFF")), 10, 64)
	size, err2 := strconv.ParseInt(b.Metadata(fmt.Sprintf("BLOCK_SIZE_%d_%d", bx, by), godal.Domain("TIFF")), 10, 64)
	ds.Close()
	if err1 != nil || err2 != nil || size < 16 {
		t.Fatalf("block offset %d (%v), size %d (%v)", off, err1, size, err2)
	}
	f, err := os.OpenFile(path, os.O_RDWR, 0)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	if _, err := f.WriteAt(bytes.Repeat([]byte{0xff}, int(size)), off); err != nil {
		t.Fatal(err)
	}
}

// openTestRasterBlocks writes the test raster (writeTestRaster's values)
// in bs x bs tiles and opens it.
func openTestRasterBlocks(t *testing.T, w, h, bs int) (*extent.Grid, *Raster) {
	t.Helper()
	path := filepath.Join(t.TempDir(), "m.tif")
	writeGridRaster(t, path, w, h, false, func(r, c int) float32 {
		if (r*w+c)%97 == 0 {
			return -9999
		}
		return float32(math.Round(1000*(0.5+0.5*math.Sin(float64(c)/37)*math.Cos(float64(r)/53))) / 1000)
	}, "TILED=YES", fmt.Sprintf("BLOCKXSIZE=%d", bs), fmt.Sprintf("BLOCKYSIZE=%d", bs))
	return openPath(t, path)
}

// writeTypedRaster writes a w x h raster of type typ in 64 x 64 tiles
// (EPSG:4326, 0.01-degree cells, nodata -9999 on every 97th cell) with
// value(r, c), and, when scaled, a scale of 0.0005 and offset of 0.1.
func writeTypedRaster(t *testing.T, path string, w, h int, typ godal.DataType, value func(r, c int) float64, scaled bool) {
	t.Helper()
	ds, b := createGridRaster(t, path, w, h, typ, "TILED=YES", "BLOCKXSIZE=64", "BLOCKYSIZE=64")
	if scaled {
		if err := b.SetScaleOffset(0.0005, 0.1); err != nil {
			t.Fatal(err)
		}
	}
	row := make([]float64, w)
	for r := 0; r < h; r++ {
		for c := range row {
			row[c] = value(r, c)
			if (r*w+c)%97 == 0 {
				row[c] = -9999
			}
		}
		if err := b.Write(0, r, row, w, 1); err != nil {
			t.Fatal(err)
		}
	}
	if err := ds.Close(); err != nil {
		t.Fatal(err)
	}
}

// addValid adds the cells of v to sum, row by row; a cell in both fails
// the test.
func addValid(t *testing.T, sum, v *extent.Valid) {
	t.Helper()
	for row := 0; row < v.Height(); row++ {
		if err := sum.AddRow(row, v.Row(row, nil)); err != nil {
			t.Fatal(err)
		}
	}
}
