package pass

import (
	"math"
	"math/rand/v2"
	"testing"

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
		rows, lows := make([][]float64, h), make([]float64, h)
		for r := range rows {
			rows[r] = make([]float64, w)
			lows[r] = math.Inf(1)
			for x := range rows[r] {
				v := math.Exp(-float64(x)/w) + 1e-3*rng.Float64() - c.drop*float64(r)
				rows[r][x] = v
				lows[r] = math.Min(lows[r], v)
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
				if len(lw.Masses) < metrics.LowestValues || lows[r] <= lw.Masses[len(lw.Masses)-1].Value {
					addLowest(&lw, bins, rows[r], weights)
				}
				addRuns(&rn, bins, rows[r], weights)
			}
			b.ReportMetric(float64(b.Elapsed().Nanoseconds())/float64(b.N*w), "ns/cell")
		})
	}
}
