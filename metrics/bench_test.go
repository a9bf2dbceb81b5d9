package metrics

import (
	"fmt"
	"math/bits"
	"math/rand/v2"
	"testing"
)

// benchCells is the number of distinct cell values cycled through by the
// pass benchmarks (a 256x256 tile; values uniform, the worst case for cache
// locality since real rasters are spatially autocorrelated).
const benchCells = 1 << 16

func benchLayout(b *testing.B, presences int) (*Layout, []float64) {
	r := rand.New(rand.NewPCG(1, 1))
	vals := make([]float64, presences)
	for i := range vals {
		vals[i] = r.Float64()
	}
	l, err := NewLayout(vals, 0, 1, 1024)
	if err != nil {
		b.Fatal(err)
	}
	cells := make([]float64, benchCells)
	for i := range cells {
		cells[i] = r.Float64()
		if i%16 == 0 { // some cells exactly at presence values
			cells[i] = vals[r.IntN(len(vals))]
		}
	}
	return l, cells
}

// BenchmarkPass measures the raster pass: per cell Locate once, then
// AddLocated into every extent whose bit is set in the cell's uint64 mask
// (all bits set). updates/s counts cell-extent updates.
func BenchmarkPass(b *testing.B) {
	for _, presences := range []int{100, 1000, 10000} {
		for _, extents := range []int{1, 8, 64} {
			b.Run(fmt.Sprintf("presences=%d/extents=%d", presences, extents), func(b *testing.B) {
				l, cells := benchLayout(b, presences)
				accs := make([]*Accumulator, extents)
				for i := range accs {
					accs[i] = l.NewAccumulator()
				}
				mask := ^uint64(0) >> (64 - extents)
				b.ReportAllocs()
				b.ResetTimer()
				for i := 0; i < b.N; i++ {
					v := cells[i&(benchCells-1)]
					w := int64(1000 + i&7)
					bin, hist := l.Locate(v)
					for m := mask; m != 0; m &= m - 1 {
						accs[bits.TrailingZeros64(m)].AddLocated(bin, hist, v, w)
					}
				}
				b.ReportMetric(float64(b.N)*float64(extents)/b.Elapsed().Seconds(), "updates/s")
			})
		}
	}
}

// BenchmarkLocate measures Locate alone.
func BenchmarkLocate(b *testing.B) {
	for _, presences := range []int{100, 1000, 10000} {
		b.Run(fmt.Sprintf("presences=%d", presences), func(b *testing.B) {
			l, cells := benchLayout(b, presences)
			b.ReportAllocs()
			b.ResetTimer()
			var s int
			for i := 0; i < b.N; i++ {
				bin, hist := l.Locate(cells[i&(benchCells-1)])
				s += bin + hist
			}
			if s == 42 {
				b.Log(s)
			}
		})
	}
}

// BenchmarkScore measures Score with B = 1000 bootstrap iterations and
// three E values, for 100 and 1000 test presences, on backgrounds of 10^4
// and 10^6 cells: the cost must not depend on the number of cells.
func BenchmarkScore(b *testing.B) {
	for _, n := range []int{100, 1000} {
		for _, cells := range []int{10_000, 1_000_000} {
			b.Run(fmt.Sprintf("presences=%d/cells=%d", n, cells), func(b *testing.B) {
				r := rand.New(rand.NewPCG(2, 2))
				test := make([]float64, n)
				for i := range test {
					test[i] = 1 - r.Float64()*r.Float64()
				}
				train := test[:n/2]
				l, err := NewLayout(test, 0, 1, 1024)
				if err != nil {
					b.Fatal(err)
				}
				a := l.NewAccumulator()
				for i := 0; i < cells; i++ {
					a.Add(r.Float64(), int64(1+r.IntN(100)))
				}
				s := Settings{E: []float64{0.05, 0.1, 0.2}, Iterations: 1000, Seed: 9}
				b.ReportAllocs()
				b.ResetTimer()
				for i := 0; i < b.N; i++ {
					if _, err := Score(a, train, test, s); err != nil {
						b.Fatal(err)
					}
				}
			})
		}
	}
}
