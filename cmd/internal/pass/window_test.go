package pass

import (
	"bytes"
	"fmt"
	"math"
	"path/filepath"
	"testing"

	"github.com/airbusgeo/godal"

	"areasweep/extent"
	"areasweep/metrics"
)

// TestReadWindows: which bands are read in windows, and how tall these
// are, by readWindows' rule (strips of the whole width holding more than
// MaxReadCells cells; windows of MaxReadCells / width rows, one at least,
// no taller than the strip), for layouts GDAL writes: tiles, strips of
// one row (GDAL's default for wide rasters), a one-strip file, strips
// of 2,000 rows, and a grid wider than MaxReadCells.
func TestReadWindows(t *testing.T) {
	for _, tc := range []struct {
		name                string
		width, fileW, fileH int
		wantW, wantH        int
		wantWindowed        bool
	}{
		{"256 x 256 tiles", 43200, 256, 256, 256, 256, false},
		{"4096 x 4096 tiles (narrower than the grid)", 43200, 4096, 4096, 4096, 4096, false},
		{"strips of one row", 43200, 43200, 1, 43200, 1, false},
		{"strips of 97 rows, exactly MaxReadCells", 1 << 22 / 97, 1 << 22 / 97, 97, 1 << 22 / 97, 97, false},
		{"one strip of 8165 rows", 12248, 12248, 8165, 12248, 1 << 22 / 12248, true},
		{"strips of 2,000 rows", 6365, 6365, 2000, 6365, 1 << 22 / 6365, true},
		{"one strip of 3 rows wider than MaxReadCells", 5 << 20, 5 << 20, 3, 5 << 20, 1, true},
	} {
		w, h, windowed := readWindows(tc.width, tc.fileW, tc.fileH)
		if w != tc.wantW || h != tc.wantH || windowed != tc.wantWindowed {
			t.Errorf("%s: got %d x %d windowed %v, want %d x %d windowed %v", tc.name, w, h, windowed, tc.wantW, tc.wantH, tc.wantWindowed)
		}
	}
}

// TestWindowedReadsAgree: a raster stored as one compressed strip, or in
// compressed strips that the windows straddle, read in windows (the cap
// lowered to windows of 300 x 16 cells), gives exactly what the same
// values stored in 64 x 64 tiles give: Sample's values, every
// accumulator's encoding and the statistics of a pass with 1 and 3
// workers, the valid cells (a pass's, and ReadValid's, which are those
// written) and HasData. GDAL's
// block cache holds the strips from the sampling to the end of the pass
// (the raise is held, and what it holds includes a strip), and is back to
// its own size afterwards.
func TestWindowedReadsAgree(t *testing.T) {
	defer func(n int) { readCells = n }(readCells)
	readCells = 300 * 16
	dir := t.TempDir()
	w, h := 300, 200
	value := func(r, c int) float32 {
		if (r*w+c)%97 == 0 {
			return -9999
		}
		return float32(math.Round(1000*(0.5+0.5*math.Sin(float64(c)/37)*math.Cos(float64(r)/53))) / 1000)
	}
	ref := filepath.Join(dir, "tiled.tif")
	writeGridRaster(t, ref, w, h, false, value, "TILED=YES", "BLOCKXSIZE=64", "BLOCKYSIZE=64", "COMPRESS=DEFLATE")
	layout, err := metrics.NewLayout([]float64{0.2, 0.5, 0.7, 0.9}, 256)
	if err != nil {
		t.Fatal(err)
	}
	g, _ := openPath(t, ref)
	defer g.Close()
	fam := nestedFamily(g, 4, true)
	cells := keptCells(g)
	type result struct {
		vals      string
		enc       [2][]byte
		stats     [2]string
		valid     [2][]byte
		readValid []byte
		hasData   bool
	}
	base := extent.BlockCacheSize()
	read := func(path string, windowed bool) result {
		_, r := openPath(t, path)
		defer r.Close()
		if r.windowed != windowed {
			t.Fatalf("%s: windowed %v, want %v", path, r.windowed, windowed)
		}
		var res result
		vals, ok, err := r.Sample(g, cells)
		if err != nil {
			t.Fatal(err)
		}
		res.vals = fmt.Sprint(vals, ok)
		if windowed {
			if got := extent.BlockCacheSize(); got < base+r.storedBytes() {
				t.Errorf("%s: after the sampling GDAL's cache is %d bytes, want at least %d + a strip of %d", path, got, base, r.storedBytes())
			}
			if used := extent.BlockCacheUsed(); used < r.storedBytes() {
				t.Errorf("%s: after the sampling GDAL's cache holds %d bytes, less than a strip (%d)", path, used, r.storedBytes())
			}
		}
		for i, workers := range []int{1, 3} {
			valid := extent.NewValid(g.Width, g.Height)
			accs, st, err := r.Score(g, fam, layout, Options{Workers: workers, Valid: valid})
			if err != nil {
				t.Fatal(err)
			}
			for _, a := range accs {
				res.enc[i] = append(res.enc[i], metrics.EncodeAccumulator(a)...)
			}
			res.stats[i] = fmt.Sprint(st)
			res.valid[i] = validRows(valid)
			if got := extent.BlockCacheSize(); got != base {
				t.Errorf("%s: after a pass GDAL's cache is %d bytes, want its own %d", path, got, base)
			}
		}
		v, err := r.ReadValid(g, nil)
		if err != nil {
			t.Fatal(err)
		}
		res.readValid = validRows(v)
		for i := 0; i < g.Cells(); i++ {
			if v.Has(i) != (i%97 != 0) {
				t.Fatalf("%s: ReadValid says cell %d has data %v; the raster was written with no data on every 97th cell", path, i, v.Has(i))
			}
		}
		any, known, err := r.HasData(g.Cells())
		if err != nil || !known {
			t.Fatalf("%s: HasData: known %v, %v", path, known, err)
		}
		res.hasData = any
		if got := extent.BlockCacheSize(); got != base {
			t.Errorf("%s: after ReadValid and HasData GDAL's cache is %d bytes, want its own %d", path, got, base)
		}
		return res
	}
	want := read(ref, false)
	for _, strip := range []int{200, 70} {
		path := filepath.Join(dir, fmt.Sprintf("strips%d.tif", strip))
		writeGridRaster(t, path, w, h, false, value, fmt.Sprintf("BLOCKYSIZE=%d", strip), "COMPRESS=DEFLATE")
		got := read(path, true)
		if got.vals != want.vals {
			t.Errorf("strips of %d rows: sampled values differ from the tiled raster's", strip)
		}
		for i := range got.enc {
			if !bytes.Equal(got.enc[i], want.enc[i]) || got.stats[i] != want.stats[i] || !bytes.Equal(got.valid[i], want.valid[i]) {
				t.Errorf("strips of %d rows, pass %d: accumulators, statistics or valid cells differ from the tiled raster's", strip, i)
			}
		}
		if !bytes.Equal(got.readValid, want.readValid) || got.hasData != want.hasData {
			t.Errorf("strips of %d rows: ReadValid or HasData differ from the tiled raster's", strip)
		}
	}
}

// validRows returns v's cells with data, row by row, as text.
func validRows(v *extent.Valid) []byte {
	var b []byte
	for row := 0; row < v.Height(); row++ {
		b = fmt.Appendln(b, v.Row(row, nil))
	}
	return b
}

// TestReadBytes: the memory ReadBytes counts for 2 workers on a 300 x 200
// Float32 raster (the cap lowered to windows of 300 x 16 cells), worked
// by hand from its rule: tiles of 64 x 64, a buffer of 64 x 64 float64
// values and a tile as stored a worker, 2 x 4096 x (8 + 4) = 98,304; one
// strip, 2 windows of 300 x 16 float64 values (76,800), the strip as
// stored (300 x 200 x 4 = 240,000) and its compressed bytes counted as
// much: 556,800; strips of 70 rows, 5 windows a strip, so 2 windows in
// flight meet at most 2 strips of 84,000 bytes, and a third for the
// compressed bytes: 76,800 + 252,000 = 328,800.
func TestReadBytes(t *testing.T) {
	defer func(n int) { readCells = n }(readCells)
	readCells = 300 * 16
	dir := t.TempDir()
	value := func(r, c int) float32 { return float32(r + c) }
	for _, tc := range []struct {
		name string
		opts []string
		want int64
	}{
		{"tiles", []string{"TILED=YES", "BLOCKXSIZE=64", "BLOCKYSIZE=64"}, 98304},
		{"one strip", []string{"BLOCKYSIZE=200", "COMPRESS=DEFLATE"}, 556800},
		{"strips of 70 rows", []string{"BLOCKYSIZE=70", "COMPRESS=DEFLATE"}, 328800},
	} {
		path := filepath.Join(dir, fmt.Sprintf("%d.tif", len(tc.opts)+len(tc.name)))
		writeGridRaster(t, path, 300, 200, false, value, tc.opts...)
		if got, _ := ReadBytes(path, 2); got != tc.want {
			t.Errorf("%s: ReadBytes %d, want %d", tc.name, got, tc.want)
		}
	}
	// Three bands in one strip: interleaved by pixel, a strip holds all
	// three, 720,000 bytes, held decoded and counted again compressed:
	// 76,800 + 2 x 720,000; interleaved by band, only band 1's strip is
	// read, as for one band: 556,800.
	for _, tc := range []struct {
		interleave string
		want       int64
	}{{"PIXEL", 1516800}, {"BAND", 556800}} {
		path := filepath.Join(dir, "bands_"+tc.interleave+".tif")
		ds, err := godal.Create(godal.GTiff, path, 3, godal.Float32, 300, 200,
			godal.CreationOption("BLOCKYSIZE=200", "COMPRESS=DEFLATE", "INTERLEAVE="+tc.interleave))
		if err != nil {
			t.Fatal(err)
		}
		ds.SetGeoTransform([6]float64{0, 0.01, 0, 50, 0, -0.01})
		sr, _ := godal.NewSpatialRefFromEPSG(4326)
		ds.SetSpatialRef(sr)
		if err := ds.Close(); err != nil {
			t.Fatal(err)
		}
		if got, windowed := ReadBytes(path, 2); got != tc.want || !windowed {
			t.Errorf("3 bands interleaved by %s: ReadBytes %d windowed %v, want %d windowed", tc.interleave, got, windowed, tc.want)
		}
	}
}

// BenchmarkScoreStrips times a pass (2 workers, the 5 nested members of
// nestedFamily) over a 3000 x 2000 Float32 raster stored three ways: in
// 256 x 256 deflate tiles, as one deflate strip (6 million cells, so read
// in windows of 1,398 rows through one handle, the strip decoded once),
// and in deflate strips of 16 rows (read whole, a handle per worker).
// The sampling at 42 points comes first, as in a run, and holds the
// strip for the pass.
func BenchmarkScoreStrips(b *testing.B) {
	dir := b.TempDir()
	w, h := 3000, 2000
	value := func(r, c int) float32 {
		return float32(math.Round(1000*(0.5+0.5*math.Sin(float64(c)/37)*math.Cos(float64(r)/53))) / 1000)
	}
	layout, err := metrics.NewLayout([]float64{0.2, 0.5, 0.7, 0.9}, 4096)
	if err != nil {
		b.Fatal(err)
	}
	for _, tc := range []struct {
		name string
		opts []string
	}{
		{"tiles", []string{"TILED=YES", "COMPRESS=DEFLATE"}},
		{"one strip", []string{"BLOCKYSIZE=2000", "COMPRESS=DEFLATE"}},
		{"strips of 16 rows", []string{"BLOCKYSIZE=16", "COMPRESS=DEFLATE"}},
	} {
		path := filepath.Join(dir, fmt.Sprintf("%d.tif", len(tc.name)))
		writeGridRaster(b, path, w, h, false, value, tc.opts...)
		g, r := openPath(b, path)
		fam := nestedFamily(g, 4, true)
		cells := keptCells(g)
		b.Run(tc.name, func(b *testing.B) {
			for b.Loop() {
				if _, _, err := r.Sample(g, cells); err != nil {
					b.Fatal(err)
				}
				if _, _, err := r.Score(g, fam, layout, Options{Workers: 2}); err != nil {
					b.Fatal(err)
				}
			}
		})
		r.Close()
		g.Close()
	}
}
