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
		lo, hi, ok, err := r.ExactRange()
		if err != nil || !ok {
			t.Fatalf("%s: %v %v", l.name, ok, err)
		}
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

// BenchmarkExactRange measures the whole-raster range read (one goroutine)
// on the 2000 x 2000 raster of BenchmarkScorePass: the read a model's
// pass no longer needs before it.
func BenchmarkExactRange(b *testing.B) {
	_, r := openTestRaster(b, 2000, 2000)
	defer r.Close()
	b.ReportAllocs()
	for i := 0; i < b.N; i++ {
		if _, _, ok, err := r.ExactRange(); err != nil || !ok {
			b.Fatal(ok, err)
		}
	}
	b.ReportMetric(float64(2000*2000)*float64(b.N)/b.Elapsed().Seconds(), "cells/s")
}
