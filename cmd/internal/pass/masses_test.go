package pass

import (
	"math"
	"math/rand/v2"
	"testing"

	"areasweep/extent"
	"areasweep/metrics"
)

// TestAddRunsMatchesCellByCell: addRuns finds every maximal run of at
// least metrics.RunCells equal valid cells, with its area, as a walk over
// every cell does, on rows of short and long runs, runs that straddle the
// pairs it compares, cells without a bin, and runs at either end.
func TestAddRunsMatchesCellByCell(t *testing.T) {
	rng := rand.New(rand.NewPCG(7, 8))
	for rep := 0; rep < 2000; rep++ {
		n := 1 + rng.IntN(200)
		vals, bins, weights := make([]float64, n), make([]int32, n), make([]int64, n)
		for i := 0; i < n; {
			// A run of 1 to 40 cells of one of 6 values (so that runs of
			// one value meet), a few without a bin (no data).
			l := 1 + rng.IntN(40)
			v := float64(rng.IntN(6))
			bin := int32(0)
			if v == 5 {
				bin = -1
			}
			for k := 0; k < l && i < n; k++ {
				vals[i], bins[i], weights[i] = v, bin, 1+rng.Int64N(3)
				i++
			}
		}
		var got, want metrics.MassList
		addRuns(&got, bins, vals, weights)
		for a := 0; a < n; {
			b := a + 1
			for b < n && vals[b] == vals[a] {
				b++
			}
			if b-a >= metrics.RunCells && bins[a] >= 0 {
				var area int64
				for _, w := range weights[a:b] {
					area += w
				}
				want.Add(vals[a], area, metrics.MaxRunValues)
			}
			a = b
		}
		if len(got.Masses) != len(want.Masses) || got.Cut != want.Cut {
			t.Fatalf("row %v: runs %v, want %v", vals, got, want)
		}
		for i := range got.Masses {
			if got.Masses[i] != want.Masses[i] {
				t.Fatalf("row %v: runs %v, want %v", vals, got, want)
			}
		}
	}
}

// BenchmarkMassCandidates measures what the pass's smallest values and
// runs (addLowest behind its test of a row's minimum, addRuns) add per
// cell, to set beside BenchmarkRasterScore's cpu-ns/cell of a whole pass:
// on rows of a continuous model (no runs; after the first rows few hold
// one of the smallest values), and at worst, on rows whose every minimum
// is a new smallest value (addLowest then walks every cell).
func BenchmarkMassCandidates(b *testing.B) {
	const w, h = 4096, 256
	rng := rand.New(rand.NewPCG(1, 2))
	for _, c := range []struct {
		name string
		drop float64 // each row's values lie this much below the row above's
	}{{"continuous", 0}, {"descending", 1}} {
		rows, lows, highs := make([][]float64, h), make([]float64, h), make([]float64, h)
		for r := range rows {
			rows[r] = make([]float64, w)
			lows[r], highs[r] = math.Inf(1), math.Inf(-1)
			for x := range rows[r] {
				v := math.Exp(-float64(x)/w) + 1e-3*rng.Float64() - c.drop*float64(r)
				rows[r][x] = v
				lows[r], highs[r] = math.Min(lows[r], v), math.Max(highs[r], v)
			}
		}
		bins, weights := make([]int32, w), make([]int64, w)
		for i := range weights {
			weights[i] = 1
		}
		b.Run(c.name, func(b *testing.B) {
			var lw, rn metrics.MassList
			for i := 0; i < b.N; i++ {
				r := i % h
				if r == 0 {
					lw = metrics.MassList{}
				}
				addLowest(&lw, bins, rows[r], weights, lows[r], highs[r])
				addRuns(&rn, bins, rows[r], weights)
			}
			b.ReportMetric(float64(b.Elapsed().Nanoseconds())/float64(b.N*w), "ns/cell")
		})
	}
}

// TestLowestCutWhenSmallestComeFirst: the list of smallest values is cut
// (Cut, so that metrics.MassList.Bound is its largest, not +Inf) whenever
// the cells hold more than metrics.LowestValues distinct values, also when
// the pass meets the smallest first (a model rising from its first row),
// so that the cells above the full list's largest are skipped by its
// bound; and it is not cut with exactly that many. With the list left
// uncut, the area-random test took every value as listed with its exact
// area and skipped the runs' values, missing a plateau, and a run split
// into shards of rows (whose merge cut the list) differed from one run.
func TestLowestCutWhenSmallestComeFirst(t *testing.T) {
	const w, h = 50, 40
	g, err := extent.NewGrid(w, h, [6]float64{0, 0.1, 0, 50, 0, -0.1}, "EPSG:4326")
	if err != nil {
		t.Fatal(err)
	}
	defer g.Close()
	layout, err := metrics.NewLayout([]float64{0.5}, 64)
	if err != nil {
		t.Fatal(err)
	}
	for _, c := range []struct {
		name     string
		distinct int // distinct values: value of cell i is i mod distinct, rising
		cut      bool
	}{{"rising", w * h, true}, {"17 values", metrics.LowestValues + 1, true}, {"16 values", metrics.LowestValues, false}} {
		vals := make([]float32, w*h)
		for i := range vals {
			vals[i] = float32(1 + i%c.distinct)
		}
		raster := &Raster{scale: 1}
		p := plan{width: w, height: h, blockW: 16, blockH: 4, decode: raster.decode,
			open: func() (Source, error) { return memSource{w: w, vals: vals}, nil }}
		for _, rr := range []*RowRange{nil, {First: 0, End: 5}} {
			for _, workers := range []int{1, 2} {
				_, st, err := score(p, g, fullFamily(g, 1), fullFamily(g, 1).Groups(), layout, Options{Workers: workers, RowRange: rr})
				if err != nil {
					t.Fatal(err)
				}
				if st.Lowest.Cut != c.cut || len(st.Lowest.Masses) != metrics.LowestValues || st.Lowest.Masses[0].Value != 1 {
					t.Errorf("%s, rows %v, %d workers: smallest values %v cut %v, want %d values from 1, cut %v", c.name, rr, workers, st.Lowest.Masses, st.Lowest.Cut, metrics.LowestValues, c.cut)
				}
			}
		}
	}
}
