package metrics

import (
	"fmt"
	"math"
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
	l, err := NewLayout(vals, 1024)
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

// runPass runs the pass loop over cells for b.N cells and reports
// updates/s (wall clock) and, where the OS tells thread CPU time,
// updates/cpu-s (immune to time-slicing by other processes). As the raster
// pass does, it locates the cells of a 256-cell row once and then adds the
// row to every extent (AddRow).
func runPass(b *testing.B, l *Layout, cells []float64, extents int) {
	const row = 256
	accs := make([]*Accumulator, extents)
	for i := range accs {
		accs[i] = l.NewAccumulator()
	}
	bins := make([]int32, row)
	weights := make([]int64, row)
	for i := range weights {
		weights[i] = int64(1000 + i&7)
	}
	lockThread()
	defer unlockThread()
	b.ReportAllocs()
	b.ResetTimer()
	cpu0 := threadCPU()
	done := 0
	for done < b.N {
		off := done & (benchCells - 1)
		n := min(row, b.N-done)
		vals := cells[off : off+n]
		l.LocateRow(vals, bins)
		for _, a := range accs {
			a.AddRow(bins[:n], vals, weights)
		}
		done += n
	}
	cpu := threadCPU() - cpu0
	b.StopTimer()
	updates := float64(b.N) * float64(extents)
	b.ReportMetric(updates/b.Elapsed().Seconds(), "updates/s")
	if cpu > 0 {
		b.ReportMetric(updates/cpu.Seconds(), "updates/cpu-s")
	}
	if accs[0].Cells() != int64(b.N) {
		b.Fatalf("accumulated %d cells, want %d", accs[0].Cells(), b.N)
	}
}

// BenchmarkPass measures the raster pass: per cell Locate once, then
// AddRow into every extent. updates/s counts cell-extent updates.
func BenchmarkPass(b *testing.B) {
	for _, presences := range []int{100, 1000, 10000} {
		for _, extents := range []int{1, 8, 64} {
			b.Run(fmt.Sprintf("presences=%d/extents=%d", presences, extents), func(b *testing.B) {
				l, cells := benchLayout(b, presences)
				runPass(b, l, cells, extents)
			})
		}
	}
}

// smoothTile returns a spatially smooth 256x256 tile of values in [0, 1]
// (neighbouring cells have close values, as in real suitability rasters).
func smoothTile() []float64 {
	cells := make([]float64, benchCells)
	r := rand.New(rand.NewPCG(3, 3))
	for y := 0; y < 256; y++ {
		for x := 0; x < 256; x++ {
			v := 0.5 + 0.25*math.Sin(float64(x)/19) + 0.2*math.Cos(float64(y)/23) + 0.02*r.Float64()
			cells[y*256+x] = math.Max(0, math.Min(1, v))
		}
	}
	return cells
}

// BenchmarkPassSmooth is BenchmarkPass on a spatially smooth 256x256 tile
// (neighbouring cells have close values, as in real suitability rasters),
// read row by row, with 1000 presence values.
func BenchmarkPassSmooth(b *testing.B) {
	l, _ := benchLayout(b, 1000)
	cells := smoothTile()
	for _, extents := range []int{1, 8, 64} {
		b.Run(fmt.Sprintf("presences=1000/extents=%d", extents), func(b *testing.B) {
			runPass(b, l, cells, extents)
		})
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
				s += l.Locate(cells[i&(benchCells-1)])
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
				l, err := NewLayout(test, 1024)
				if err != nil {
					b.Fatal(err)
				}
				a := l.NewAccumulator()
				for i := 0; i < cells; i++ {
					a.Add(r.Float64(), int64(1+r.IntN(100)))
				}
				s := Settings{E: []float64{0.05, 0.1, 0.2}, Iterations: 1000, Seed: 9}
				b.ReportAllocs()
				stop := startCPU(b)
				for i := 0; i < b.N; i++ {
					if _, err := Score(a, train, test, s); err != nil {
						b.Fatal(err)
					}
				}
				stop()
			})
		}
	}
}

// BenchmarkDecomposeRing times one ring decomposition (the ring's
// accumulator and three AUCs against it, its inner and its outer extent)
// with 500 test presences on a layout of 1,000 values, as the scoring
// phase makes for each pair of consecutive extents of a nested chain and
// model.
func BenchmarkDecomposeRing(b *testing.B) {
	r := rand.New(rand.NewPCG(4, 4))
	vals := make([]float64, 1000)
	for i := range vals {
		vals[i] = 1 - r.Float64()*r.Float64()
	}
	l, err := NewLayout(vals, 1024)
	if err != nil {
		b.Fatal(err)
	}
	inner, outer := l.NewAccumulator(), l.NewAccumulator()
	for i := 0; i < 200_000; i++ {
		v, w := r.Float64(), int64(1+r.IntN(100))
		outer.Add(v, w)
		if i%3 != 0 {
			inner.Add(v, w)
		}
	}
	test := vals[:500]
	b.ReportAllocs()
	stop := startCPU(b)
	for i := 0; i < b.N; i++ {
		if _, err := DecomposeRing(inner, outer, test); err != nil {
			b.Fatal(err)
		}
	}
	stop()
}

// BenchmarkCompare times one paired comparison of two extents (B = 200
// full-size resamples, two E values, two thresholds, the Boyce index) by
// the number of test presences.
func BenchmarkCompare(b *testing.B) {
	for _, n := range []int{100, 1000} {
		b.Run(fmt.Sprintf("presences=%d/resamples=200", n), func(b *testing.B) {
			l, cells := benchLayout(b, n)
			outer, inner := l.NewAccumulator(), l.NewAccumulator()
			for i, v := range cells {
				outer.Add(v, 1000)
				if i%2 == 0 {
					inner.Add(v, 1000)
				}
			}
			test := l.Values()
			ids := make([]int, len(test))
			for i := range ids {
				ids[i] = i
			}
			s := Settings{E: []float64{0.05, 0.1}}
			ths := []float64{test[len(test)/10], test[len(test)/2]}
			ea, err := NewEvaluator(outer, test, ids, ths, s)
			if err != nil {
				b.Fatal(err)
			}
			eb, err := NewEvaluator(inner, test, ids, ths, s)
			if err != nil {
				b.Fatal(err)
			}
			d := Draws{N: len(ids), B: 200, Seed: 1}
			b.ReportAllocs()
			stop := startCPU(b)
			for i := 0; i < b.N; i++ {
				if _, err := Compare(ea, eb, d); err != nil {
					b.Fatal(err)
				}
			}
			stop()
		})
	}
}

// BenchmarkLocateRow measures LocateRow on rows of 256 cells of a smooth
// tile (as BenchmarkPassSmooth), with 1000 layout values: ns per cell.
func BenchmarkLocateRow(b *testing.B) {
	l, _ := benchLayout(b, 1000)
	cells := smoothTile()
	bins := make([]int32, 256)
	b.ReportAllocs()
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		off := (i * 256) & (benchCells - 1)
		l.LocateRow(cells[off:off+256], bins)
	}
	b.ReportMetric(float64(b.Elapsed().Nanoseconds())/(float64(b.N)*256), "ns/cell")
}

// pairedRun is a run's paired analysis in miniature: models x extents
// evaluators on nested extents of one set of test presences, with the
// comparisons the pipeline makes (every extent minus the base extent per
// model, the two models per extent, each model minus the last, "null",
// model per extent).
type pairedRun struct {
	evals [][]*Evaluator // [model][extent]
	base  int
	d     Draws
	// opt is what a run passes to a comparison of two models on one
	// extent, extentOpt to one of two extents of one model.
	opt, extentOpt CompareOptions
}

// newPairedRun builds the evaluators of models x extents: extent k holds
// the presences and cells whose uniform tag lies below its share (from
// 0.25 to 1), the base extent is the one nearest 0.7. The presences'
// values are rounded to 1/2000 (some ties), or left as drawn when
// continuous (no ties, as on a Float32 raster).
func newPairedRun(b *testing.B, models, extents, presences int, continuous bool) *pairedRun {
	r := rand.New(rand.NewPCG(7, 7))
	ptag := make([]float64, presences)
	for i := range ptag {
		ptag[i] = r.Float64()
	}
	const cells = 1 << 15
	ctag := make([]float64, cells)
	for i := range ctag {
		ctag[i] = r.Float64()
	}
	pr := &pairedRun{d: Draws{N: presences, B: 1000, Seed: 3}}
	best := 2.0
	for m := 0; m < models; m++ {
		test := make([]float64, presences)
		for i := range test {
			test[i] = 1 - r.Float64()*r.Float64()
			if !continuous {
				test[i] = math.Round(test[i]*2000) / 2000 // some ties
			}
		}
		l, err := NewLayout(test, 1024)
		if err != nil {
			b.Fatal(err)
		}
		cv := make([]float64, cells)
		for i := range cv {
			cv[i] = r.Float64()
		}
		var row []*Evaluator
		for k := 0; k < extents; k++ {
			share := 0.25 + 0.75*float64(k)/float64(max(1, extents-1))
			if m == 0 && math.Abs(share-0.7) < best {
				best, pr.base = math.Abs(share-0.7), k
			}
			a := l.NewAccumulator()
			for i, v := range cv {
				if ctag[i] < share {
					a.Add(v, int64(1000+i%7))
				}
			}
			var tv []float64
			var ids []int
			for i, v := range test {
				if ptag[i] < share {
					tv, ids = append(tv, v), append(ids, i)
				}
			}
			ev, err := NewEvaluator(a, tv, ids, []float64{tv[len(tv)/10], tv[len(tv)/2]}, Settings{E: []float64{0.05, 0.1}})
			if err != nil {
				b.Fatal(err)
			}
			row = append(row, ev)
		}
		pr.evals = append(pr.evals, row)
	}
	return pr
}

// run makes every comparison once, starting with empty memos, and each
// evaluator's BootSD, as a run's scoring and analysis phases do.
func (pr *pairedRun) run(b *testing.B) {
	for _, row := range pr.evals {
		for _, ev := range row {
			ev.own = nil
			ev.BootSD(pr.d)
		}
	}
	om := make([][2]int, len(pr.evals[0][0].cut))
	for t := range om {
		om[t] = [2]int{t, t}
	}
	cmp := func(x, y *Evaluator, o CompareOptions) {
		if _, err := CompareWith(x, y, pr.d, om, o); err != nil {
			b.Fatal(err)
		}
	}
	for _, row := range pr.evals {
		for k, ev := range row {
			if k != pr.base {
				cmp(ev, row[pr.base], pr.extentOpt)
			}
		}
	}
	last := len(pr.evals) - 1
	for k := range pr.evals[0] {
		for m := 0; m < last; m++ {
			for o := m + 1; o < last; o++ {
				cmp(pr.evals[m][k], pr.evals[o][k], pr.opt)
			}
			cmp(pr.evals[m][k], pr.evals[last][k], pr.opt)
		}
	}
}

// BenchmarkPairedRun times a run's paired analysis (every comparison, the
// memos of resampled scores and every BootSD) with 500 test presences, B
// = 1000, three models (the last one standing for the null) by the number
// of extents, with some ties among the presences' values, and at 60
// extents without ties too (continuous), with the Boyce index left out of
// the resamples as a run does (CompareOptions.BoyceUnresampled), and the
// partial ROC ratios out of those of the comparisons between extents
// (PartialROCUnresampled), and, at 60 extents, both resampled
// (boyce-resampled: what a run paid before);
// cpu-ns/op is the thread's CPU time (one goroutine), immune to
// time-slicing by other processes.
func BenchmarkPairedRun(b *testing.B) {
	for _, c := range []struct {
		extents           int
		continuous, boyce bool
	}{{20, false, false}, {60, false, false}, {60, true, false}, {60, false, true}} {
		name := fmt.Sprintf("extents=%d", c.extents)
		if c.continuous {
			name += "/continuous"
		}
		if c.boyce {
			name += "/boyce-resampled"
		}
		b.Run(name, func(b *testing.B) {
			pr := newPairedRun(b, 3, c.extents, 500, c.continuous)
			pr.opt.BoyceUnresampled = !c.boyce
			pr.extentOpt = CompareOptions{BoyceUnresampled: !c.boyce, PartialROCUnresampled: !c.boyce}
			b.ReportAllocs()
			stop := startCPU(b)
			for i := 0; i < b.N; i++ {
				pr.run(b)
			}
			stop()
		})
	}
}

// startCPU locks the goroutine to its OS thread and resets the
// benchmark's timer; the function it returns reports the thread's CPU time
// since then per operation (cpu-ns/op, immune to time-slicing by other
// processes on a shared machine) and unlocks the thread.
func startCPU(b *testing.B) func() {
	lockThread()
	b.ResetTimer()
	cpu0 := threadCPU()
	return func() {
		cpu := threadCPU() - cpu0
		b.StopTimer()
		unlockThread()
		if cpu > 0 {
			b.ReportMetric(float64(cpu.Nanoseconds())/float64(b.N), "cpu-ns/op")
		}
	}
}

// BenchmarkValueSetAddRow times the value set's per-cell cost in the pass
// (ValueSet.AddRow with its cache) on rows of spatially mixed values, the
// worst case (neighbours rarely equal): 256 values (a Byte model), 1,001
// (a model rounded to 0.001) and 4,000 (near MaxSetValues). Reports ns per
// cell.
func BenchmarkValueSetAddRow(b *testing.B) {
	for _, k := range []int{256, 1001, 4000} {
		r := rand.New(rand.NewPCG(1, 2))
		vals := make([]float64, 4096)
		for i := range vals {
			vals[i] = float64(r.IntN(k)) / 1000
		}
		bins := make([]int32, len(vals))
		b.Run(fmt.Sprintf("values%d", k), func(b *testing.B) {
			var s ValueSet
			var c ValueCache
			for i := 0; i < b.N; i++ {
				s.AddRow(vals, bins, &c)
			}
			b.ReportMetric(float64(b.Elapsed().Nanoseconds())/float64(b.N*len(vals)), "ns/cell")
		})
	}
}

// BenchmarkAreaRandom times the draws of the area-random test of the
// partial ROC ratio (drawRatios: B = 1000 sets, E = 0.05 and 0.1) for 100,
// 500 and 1000 test presences of continuous values: what one model and
// extent costs when its atoms are not negligible, and what a run pays
// once per number of test points for all its nearly continuous ones
// (sharedRatios).
func BenchmarkAreaRandom(b *testing.B) {
	for _, n := range []int{100, 500, 1000} {
		b.Run(fmt.Sprintf("presences=%d", n), func(b *testing.B) {
			b.ReportAllocs()
			stop := startCPU(b)
			for i := 0; i < b.N; i++ {
				drawRatios(areaModel{}, n, 1000, uint64(i), []float64{0.05, 0.1})
			}
			stop()
		})
	}
}
