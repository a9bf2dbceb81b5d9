package pass

import (
	"bytes"
	"math"
	"path/filepath"
	"testing"

	"areasweep/metrics"
)

// writeLayout writes the same w x h pixels (a skewed ramp with a few
// extreme cells that a block sample can miss) as a GeoTIFF with the given
// creation options, and builds overviews when asked.
func writeLayout(tb testing.TB, path string, w, h int, overviews bool, opts ...string) {
	writeGridRaster(tb, path, w, h, overviews, func(r, c int) float32 {
		switch {
		case r == h-3 && c == w-7:
			return 5 // a lone high cell
		case r == 2 && c == 3:
			return -2 // a lone low cell
		case (r*w+c)%89 == 0:
			return -9999
		}
		v := math.Pow(float64(c)/float64(w), 3) * (0.3 + 0.7*float64(r)/float64(h))
		return float32(math.Round(1e4*v) / 1e4)
	}, opts...)
}

// TestExactRangeLayouts writes the same pixels tiled, striped and tiled
// with overviews: the exact range, the accumulator of one pass (byte for
// byte, fine histogram included) and the Boyce index must be identical
// (GDAL's approximate statistics differ between such files because they
// sample blocks or read overviews; neither the pass nor the layout uses
// them, nor any range read before the pass).
func TestExactRangeLayouts(t *testing.T) {
	const w, h = 600, 500
	dir := t.TempDir()
	layouts := []struct {
		name      string
		overviews bool
		opts      []string
	}{
		{"tiled", false, []string{"TILED=YES", "BLOCKXSIZE=128", "BLOCKYSIZE=128"}},
		{"striped", false, []string{"TILED=NO", "BLOCKYSIZE=1"}},
		{"tiled_overviews", true, []string{"TILED=YES", "BLOCKXSIZE=256", "BLOCKYSIZE=256"}},
	}
	type result struct {
		lo, hi float64
		boyce  metrics.Boyce
		acc    []byte
	}
	var got []result
	for _, l := range layouts {
		path := filepath.Join(dir, l.name+".tif")
		writeLayout(t, path, w, h, l.overviews, l.opts...)
		g, r := openPath(t, path)
		lo, hi := exactRange(t, r)
		// Source: the pixels written above; the lone cells are the extremes.
		if lo != -2 || hi != 5 {
			t.Errorf("%s: exact range %v..%v, want -2..5", l.name, lo, hi)
		}
		cells := []int{10*w + 300, 250*w + 500, 400*w + 590, 100*w + 50, 480*w + 599}
		vals, valid, err := r.Sample(g, cells)
		if err != nil {
			t.Fatal(err)
		}
		var test []float64
		for i, v := range vals {
			if valid[i] {
				test = append(test, v)
			}
		}
		layout, err := metrics.NewLayout(test, 4096)
		if err != nil {
			t.Fatal(err)
		}
		fam := fullFamily(g, 1)
		accs, _, err := r.Score(g, fam, layout, Options{Workers: 2})
		if err != nil {
			t.Fatal(err)
		}
		sc, err := metrics.Score(accs[0], nil, test, metrics.Settings{Iterations: 1})
		if err != nil {
			t.Fatal(err)
		}
		got = append(got, result{lo, hi, sc.Boyce, metrics.EncodeAccumulator(accs[0])})
		r.Close()
		g.Close()
	}
	for i := 1; i < len(got); i++ {
		a, b := got[0], got[i]
		if !bytes.Equal(a.acc, b.acc) {
			t.Errorf("%s: accumulator differs from %s's", layouts[i].name, layouts[0].name)
		}
		if a.lo != b.lo || a.hi != b.hi || a.boyce.Index != b.boyce.Index || !a.boyce.Defined || a.boyce.Defined != b.boyce.Defined || len(a.boyce.Ratio) != len(b.boyce.Ratio) {
			t.Errorf("%s differs from %s: %+v vs %+v", layouts[i].name, layouts[0].name, b, a)
			continue
		}
		for k := range a.boyce.Ratio {
			if a.boyce.Ratio[k] != b.boyce.Ratio[k] {
				t.Errorf("%s: P/E ratio %d = %v, %s %v", layouts[i].name, k, b.boyce.Ratio[k], layouts[0].name, a.boyce.Ratio[k])
			}
		}
	}
}

// exactRange returns the smallest and largest valid value of r's band,
// read from every block at full resolution (GDAL's statistics may sample
// blocks or read overviews).
func exactRange(tb testing.TB, r *Raster) (lo, hi float64) {
	tb.Helper()
	lo, hi = math.Inf(1), math.Inf(-1)
	st := r.band.Structure()
	for b, more := st.FirstBlock(), true; more; b, more = b.Next() {
		buf := make([]float64, b.W*b.H)
		if err := r.band.Read(b.X0, b.Y0, buf, b.W, b.H); err != nil {
			tb.Fatal(err)
		}
		r.decode(buf)
		for _, v := range buf {
			if r.valid(v) {
				lo, hi = math.Min(lo, v), math.Max(hi, v)
			}
		}
	}
	return lo, hi
}

// TestRasterHasData: a run that cannot start read the whole raster to tell a
// raster of no data from points that miss its data (an adversarial input
// of 6.5e10 cells, sparse, had not answered after 120 s). HasData stops
// at the first block with a value and reads at most maxCells cells.
// Rasters of 400 x 300 cells in blocks of 64 x 64 (35 blocks), no data
// (-9999) but for the cells named.
func TestRasterHasData(t *testing.T) {
	const w, h = 400, 300
	cases := []struct {
		name      string
		data      [][2]int // (row, column) of the cells with data
		maxCells  int
		any, know bool
	}{
		{"no data, read whole", nil, w * h, false, true},
		{"no data, more allowed", nil, 10 * w * h, false, true},
		{"no data, cut short", nil, 20 * 64 * 64, false, false},
		{"one cell in the last block", [][2]int{{h - 1, w - 1}}, w * h, true, true},
		// Every block but the last (16 x 44 cells): the last is not read.
		{"one cell in the last block, cut short", [][2]int{{h - 1, w - 1}}, w*h - (w%64)*(h%64), false, false},
		{"one cell in the first block", [][2]int{{0, 0}}, 1, true, true},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			path := filepath.Join(t.TempDir(), "m.tif")
			writeGridRaster(t, path, w, h, false, func(r, col int) float32 {
				for _, d := range c.data {
					if d == [2]int{r, col} {
						return 0.5
					}
				}
				return -9999
			}, "TILED=YES", "BLOCKXSIZE=64", "BLOCKYSIZE=64")
			g, r := openPath(t, path)
			defer g.Close()
			defer r.Close()
			any, known, err := r.HasData(c.maxCells)
			if err != nil {
				t.Fatal(err)
			}
			if any != c.any || known != c.know {
				t.Errorf("HasData(%d) = %v, known %v; want %v, known %v", c.maxCells, any, known, c.any, c.know)
			}
		})
	}
}
