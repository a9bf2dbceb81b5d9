package pass

import (
	"bytes"
	"fmt"
	"math"
	"reflect"
	"sync"
	"testing"

	"areasweep/extent"
	"areasweep/metrics"
)

// scoredShare is what a pass over some rows yields, for comparison.
type scoredShare struct {
	accs  []*metrics.Accumulator
	stats Stats
	valid *extent.Valid
	pv    *Preview
	rows  []int     // cells seen by Options.Rows, per row
	vals  []float64 // the value Options.Rows saw per cell (NaN: not seen)
}

// scoreRows runs one pass over rows rr (nil: every row) of src.
func scoreRows(t *testing.T, g *extent.Grid, fam *extent.Family, layout *metrics.Layout, workers int, rr *RowRange,
	score func(*extent.Grid, *extent.Family, *metrics.Layout, Options) ([]*metrics.Accumulator, Stats, error)) scoredShare {
	t.Helper()
	sh := scoredShare{valid: extent.NewValid(g.Width, g.Height), pv: NewPreview(g, 37), rows: make([]int, g.Height), vals: make([]float64, g.Cells())}
	for i := range sh.vals {
		sh.vals[i] = math.NaN()
	}
	var mu sync.Mutex
	opt := Options{Workers: workers, Valid: sh.valid, Preview: sh.pv, RowRange: rr, Rows: func(row, c0 int, vals []float64, w []int64) {
		mu.Lock()
		sh.rows[row] += len(vals)
		copy(sh.vals[row*g.Width+c0:], vals)
		mu.Unlock()
	}}
	var err error
	if sh.accs, sh.stats, err = score(g, fam, layout, opt); err != nil {
		t.Fatal(err)
	}
	return sh
}

// TestRowRangesAddUp: passes over row ranges that split the grid (cut
// inside raster blocks and inside the virtual's blocks) add up to the
// whole pass exactly: every accumulator's encoding, the statistics, the
// valid bits, the preview and the rows seen with their values bit for bit
// (the null's bounded values: a range's blocks must pick the same cells
// to compute exactly as the whole pass's, for the sorting-bias tally), for a raster (256 x 256
// tiles) and the virtual null (on a layout without and with a histogram
// floor, and on a projected grid), with 1 and 2 workers. An empty range scores
// nothing, and a range past the grid is cut to it.
func TestRowRangesAddUp(t *testing.T) {
	g, v, _, fam := nullSetup(t)
	_, r := openTestRaster(t, 300, 200)
	defer r.Close()
	rasterLayout, err := metrics.NewLayout([]float64{0.2, 0.5, 0.7, 0.9}, 256)
	if err != nil {
		t.Fatal(err)
	}
	nullLayout, err := metrics.NewLayout([]float64{-1e4, -5e4}, 64)
	if err != nil {
		t.Fatal(err)
	}
	// With a histogram floor: the bounded path (midpoints, cells computed
	// exactly per block), on this grid and on a projected one; bins of 64
	// m (floored at 4e5/4096), narrow enough that on the projected grid
	// some chord brackets fail and go to their tile's anchor.
	flooredLayout, err := metrics.NewLayout([]float64{-1e4, -5e4}, 4096, metrics.WithHistFloor(metrics.FloorExp(4e5/4096)))
	if err != nil {
		t.Fatal(err)
	}
	pg, pv, _, pfam := nullSetupProjected(t)
	sources := []struct {
		name   string
		g      *extent.Grid
		fam    *extent.Family
		layout *metrics.Layout
		score  func(*extent.Grid, *extent.Family, *metrics.Layout, Options) ([]*metrics.Accumulator, Stats, error)
	}{
		{"raster", g, fam, rasterLayout, r.Score}, {"virtual", g, fam, nullLayout, v.Score},
		{"virtual-floored", g, fam, flooredLayout, v.Score}, {"virtual-laea-floored", pg, pfam, flooredLayout, pv.Score},
	}
	cuts := [][]RowRange{
		{{0, 37}, {37, 111}, {111, 200}},
		{{150, 400}, {0, 1}, {1, 150}, {60, 60}},
	}
	for _, src := range sources {
		g, fam := src.g, src.fam
		whole := scoreRows(t, g, fam, src.layout, 2, nil, src.score)
		for ci, ranges := range cuts {
			for _, workers := range []int{1, 2} {
				name := fmt.Sprintf("%s/cut%d/workers=%d", src.name, ci, workers)
				var sum scoredShare
				for i, rr := range ranges {
					sh := scoreRows(t, g, fam, src.layout, workers, &rr, src.score)
					for row, n := range sh.rows {
						if n > 0 && (row < rr.First || row >= rr.End) {
							t.Fatalf("%s: range %v: row %d seen outside the range", name, rr, row)
						}
					}
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
					for j, x := range sh.pv.Values {
						if !math.IsNaN(x) {
							if !math.IsNaN(sum.pv.Values[j]) {
								t.Fatalf("%s: preview cell %d set by two ranges", name, j)
							}
							sum.pv.Values[j] = x
						}
					}
					for row, n := range sh.rows {
						sum.rows[row] += n
						if n > 0 {
							copy(sum.vals[row*g.Width:(row+1)*g.Width], sh.vals[row*g.Width:(row+1)*g.Width])
						}
					}
				}
				for k := range whole.accs {
					if string(metrics.EncodeAccumulator(sum.accs[k])) != string(metrics.EncodeAccumulator(whole.accs[k])) {
						t.Errorf("%s: member %d: merged accumulator differs from the whole pass", name, k)
					}
				}
				if !reflect.DeepEqual(sum.stats, whole.stats) {
					t.Errorf("%s: stats %+v, whole pass %+v", name, sum.stats, whole.stats)
				}
				if !bytes.Equal(bitsOf(sum.valid), bitsOf(whole.valid)) {
					t.Errorf("%s: valid bits differ from the whole pass", name)
				}
				if fmt.Sprint(sum.pv.Values) != fmt.Sprint(whole.pv.Values) {
					t.Errorf("%s: preview differs from the whole pass", name)
				}
				if fmt.Sprint(sum.rows) != fmt.Sprint(whole.rows) {
					t.Errorf("%s: rows seen differ from the whole pass", name)
				}
				diff := 0
				for i, x := range whole.vals {
					if y := sum.vals[i]; math.Float64bits(x) != math.Float64bits(y) && !(math.IsNaN(x) && math.IsNaN(y)) {
						diff++
					}
				}
				if diff > 0 {
					t.Errorf("%s: the rows hook saw %d values that differ from the whole pass", name, diff)
				}
			}
		}
	}
	empty := scoreRows(t, g, fam, rasterLayout, 2, &RowRange{60, 60}, r.Score)
	if empty.accs[0].Cells() != 0 || empty.stats.Area != 0 {
		t.Errorf("empty range scored %d cells", empty.accs[0].Cells())
	}
}
