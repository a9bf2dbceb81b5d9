package pass

import (
	"bytes"
	"fmt"
	"path/filepath"
	"testing"

	"areasweep/extent"
	"areasweep/metrics"
)

// TestValidCellsRecorded: the valid cells a pass records (Options.Valid)
// and those ReadValid finds are exactly the cells with a value (by
// construction), on a raster of 32 x 32 tiles, for 1 and 2 workers and a
// range of rows. The pattern has runs that end at a tile's edge and go on
// in the next tile, and a row whose last run ends at the column where the
// next row's first run begins (even rows [0,45), odd rows [45,80), both
// across the tile edges at 32 and 64), which must stay two runs.
func TestValidCellsRecorded(t *testing.T) {
	const w, h = 100, 70
	in := func(r, c int) bool {
		switch {
		case r%10 == 9:
			return (r*w+c)%3 != 0 // ragged: a row held as a bitset
		case r%2 == 0:
			return c < 45
		default:
			return c >= 45 && c < 80
		}
	}
	path := filepath.Join(t.TempDir(), "m.tif")
	writeGridRaster(t, path, w, h, false, func(r, c int) float32 {
		if !in(r, c) {
			return -9999
		}
		return float32(r+c) / 200
	}, "TILED=YES", "BLOCKXSIZE=32", "BLOCKYSIZE=32")
	g, r := openPath(t, path)
	defer r.Close()
	layout, err := metrics.NewLayout([]float64{0.2, 0.5}, 64)
	if err != nil {
		t.Fatal(err)
	}
	fam := fullFamily(g, 2)
	want := func(rows RowRange) []byte {
		return bitsOf(extent.NewValidFunc(w, h, func(i int) bool {
			row := i / w
			return row >= rows.First && row < rows.End && in(row, i%w)
		}))
	}
	for _, workers := range []int{1, 2} {
		for _, rr := range []*RowRange{nil, {First: 20, End: 51}} {
			rows := RowRange{0, h}
			if rr != nil {
				rows = *rr
			}
			name := fmt.Sprintf("workers=%d rows=%v", workers, rows)
			v := extent.NewValid(w, h)
			if _, _, err := r.Score(g, fam, layout, Options{Workers: workers, Valid: v, RowRange: rr}); err != nil {
				t.Fatal(err)
			}
			if !bytes.Equal(bitsOf(v), want(rows)) {
				t.Errorf("%s: recorded valid cells differ from the raster's", name)
			}
			if got := v.Row(rows.First, nil); fmt.Sprint(got) != "[0 45]" {
				t.Errorf("%s: row %d held as %v, want [0 45]", name, rows.First, got)
			}
		}
	}
	v, err := r.ReadValid(g, nil)
	if err != nil {
		t.Fatal(err)
	}
	if !bytes.Equal(bitsOf(v), want(RowRange{0, h})) {
		t.Error("ReadValid: valid cells differ from the raster's")
	}
	if got := v.Row(1, nil); fmt.Sprint(got) != "[45 80]" {
		t.Errorf("ReadValid: row 1 held as %v, want [45 80]", got)
	}
}

// BenchmarkScorePassValid: the first model's pass, which also records the
// valid cells (Options.Valid), against the same pass without, on a 2000 x
// 2000 raster of 256 x 256 tiles with 1 cell in 97 without data, one
// extent: what recording the cells adds to a pass.
func BenchmarkScorePassValid(b *testing.B) {
	g, r := openTestRaster(b, 2000, 2000)
	defer r.Close()
	layout, err := metrics.NewLayout([]float64{0.2, 0.5, 0.7}, 4096)
	if err != nil {
		b.Fatal(err)
	}
	fam := fullFamily(g, 1)
	for _, record := range []bool{false, true} {
		b.Run(fmt.Sprintf("valid=%v", record), func(b *testing.B) {
			b.ReportAllocs()
			for b.Loop() {
				opt := Options{Workers: 2}
				if record {
					opt.Valid = extent.NewValid(g.Width, g.Height)
				}
				if _, _, err := r.Score(g, fam, layout, opt); err != nil {
					b.Fatal(err)
				}
			}
		})
	}
}
