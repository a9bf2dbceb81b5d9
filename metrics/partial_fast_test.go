package metrics

import (
	"math"
	"math/bits"
	"math/rand/v2"
	"slices"
	"testing"
)

// partialAreaReference is partialArea as it was written before the
// crossing was found from the end (one walk over every group from the
// start); partialArea must give the same bits. It computes the partial ROC areas of the curve formed by the
// presences with counts[g] presences at group g (descending value order,
// r presences in all). When the crossing falls strictly inside the
// segment of a value shared by two or more distinct test presences of the
// full set (p.count, not counts: a resample that draws one presence twice
// makes no tie), how is crossTie and the areas are left at 0.
func (p *presences) partialAreaReference(counts []int, r int, e float64) partialResult {
	rf := float64(r)
	tau := snapCount((1 - e) * rf)
	ya := 0
	crossed := false
	prevX, prevY := 0.0, 0
	var res partialResult
	var model float64
	for g, c := range counts {
		if c == 0 {
			continue
		}
		yb := ya + c
		xa, xb := p.xgt[g], p.xge[g]
		switch {
		case crossed:
			model += (xa - prevX) * float64(prevY)  // horizontal B->A
			model += (xb - xa) * float64(ya+yb) / 2 // diagonal or vertical A->B
		case float64(yb) >= tau:
			s := (tau - float64(ya)) / float64(c)
			if s >= 1 {
				res.xE = xb
			} else {
				res.xE = xa + s*(xb-xa)
				if p.count[g] >= 2 && s > 0 {
					res.how, res.tied, res.tieGroup = crossTie, c, g
				}
			}
			model += (xb - res.xE) * (tau + float64(yb)) / 2
			crossed = true
		}
		prevX, prevY = xb, yb
		ya = yb
	}
	model += (1 - prevX) * rf // last B -> (1,1)
	res.model = model / rf
	res.null = (1 - res.xE*res.xE) / 2
	if !(res.null > 0) {
		res.model, res.null, res.how = 0, 0, crossNull
	}
	return res
}

// TestPartialAreaFromCrossing: partialArea, which finds the crossing from
// the end, and partialAreas, several E at once, give bit for bit what the
// walk from the start gives, on
// random counts (zero groups, ties of the full set, crossings on a tie, on
// a vertical step, at x = 1) for E from 0 to 1 (Settings allows 0 < E
// < 1; E = 1 crosses at the first group drawn), and on r = 0.
func TestPartialAreaFromCrossing(t *testing.T) {
	r := rand.New(rand.NewPCG(21, 22))
	same := func(a, b partialResult) bool {
		eq := func(x, y float64) bool { return math.Float64bits(x) == math.Float64bits(y) }
		return eq(a.model, b.model) && eq(a.null, b.null) && eq(a.xE, b.xE) && a.how == b.how && a.tied == b.tied && a.tieGroup == b.tieGroup
	}
	kinds := map[crossing]int{}
	var sc areaScratch
	for trial := 0; trial < 3000; trial++ {
		m := 1 + r.IntN(60)
		p := &presences{count: make([]int, m), xgt: make([]float64, m), xge: make([]float64, m)}
		x := 0.0
		for g := range m {
			p.count[g] = 1 + r.IntN(3)*r.IntN(2)
			p.xgt[g] = x
			if r.IntN(4) > 0 {
				x += r.Float64() / float64(m)
			}
			if g == m-1 && trial%7 == 0 {
				x = 1 // the last value holds the rest of the area
			}
			p.xge[g] = math.Min(x, 1)
			x = p.xge[g]
		}
		counts := make([]int, m)
		n := 0
		for g := range counts {
			if r.IntN(3) > 0 {
				counts[g] = r.IntN(4)
			}
			n += counts[g]
		}
		all := []float64{0, 0.01, 0.05, 0.1, 0.2, 0.5, 0.99, 1}
		for _, e := range all {
			got, want := p.partialArea(counts, n, e), p.partialAreaReference(counts, n, e)
			if !same(got, want) {
				t.Fatalf("trial %d, E %g, counts %v: %+v, want %+v", trial, e, counts, got, want)
			}
			kinds[want.how]++
		}
		// Several E at once (one walk for two), in either order, equal
		// values included (one crossing), with scratch left from other
		// trials.
		for _, es := range [][]float64{
			{all[r.IntN(len(all))], all[r.IntN(len(all))]},
			{0.05, 0.1}, {0.1, 0.05}, {0.05, 0.05},
			{all[r.IntN(len(all))], all[r.IntN(len(all))], all[r.IntN(len(all))]},
		} {
			got := make([]partialResult, len(es))
			p.partialAreas(counts, n, es, got, &sc)
			for i, e := range es {
				if want := p.partialAreaReference(counts, n, e); !same(got[i], want) {
					t.Fatalf("trial %d, E %v (E %g), counts %v: %+v, want %+v", trial, es, e, counts, got[i], want)
				}
			}
		}
	}
	for _, k := range []crossing{crossFormed, crossNull, crossTie} {
		if kinds[k] == 0 {
			t.Errorf("no case ended %v: the test does not cover it", k)
		}
	}
	p := &presences{count: []int{1}, xgt: []float64{0}, xge: []float64{0.5}}
	if got, want := p.partialArea([]int{0}, 0, 0.05), p.partialAreaReference([]int{0}, 0, 0.05); !same(got, want) {
		t.Errorf("r = 0: %+v, want %+v", got, want)
	}
}

// intN returns rand.New(src).IntN(n) for n > 0, the same number from the
// same draws of src (math/rand/v2's uint64n: Lemire's multiply-shift with
// rejection, which its 32-bit path reproduces exactly), without the
// interface call per draw. The bootstraps drew with it until addDraws,
// which makes the same draws with the PCG's state in registers; it is the
// reference of TestAddDrawsSameAsRand and BenchmarkAddDraws.
func intN(src *rand.PCG, n int) int {
	u := uint64(n)
	if u&(u-1) == 0 { // a power of two: mask
		return int(src.Uint64() & (u - 1))
	}
	hi, lo := bits.Mul64(src.Uint64(), u)
	if lo < u {
		thresh := -u % u
		for lo < thresh {
			hi, lo = bits.Mul64(src.Uint64(), u)
		}
	}
	return int(hi)
}

// TestAddDrawsSameAsRand: addDraws adds up the draws of rand.Rand.IntN
// from the same PCG (the counts of drawing IntN r times, by member or by
// number), and returns the state the PCG is left in (the next call goes
// on with the same numbers): for powers of two, small and large n, r = 0
// to 3n, counts of both types. (Its rejection loop is intN's, checked by
// TestIntNSameAsRand on the n near 2^63 where rejections happen; counts of
// that size cannot be made.)
func TestAddDrawsSameAsRand(t *testing.T) {
	for _, n := range []int{1, 2, 3, 7, 64, 100, 250, 499, 500, 4096, 1<<20 + 3} {
		for seed := uint64(0); seed < 3; seed++ {
			groups := max(1, n/3)
			member := make([]int, n)
			for i := range member {
				member[i] = (i * 7) % groups
			}
			ref := rand.New(rand.NewPCG(seed, seed^pcgStream))
			// pm draws by member into int counts, pn by number into int32
			// counts: each goes on from where its last call left it.
			pm, pn := pcgState{seed, seed ^ pcgStream}, pcgState{seed, seed ^ pcgStream}
			for _, r := range []int{0, 1, n/2 + 1, 3 * n} {
				if n > 4096 && r > n {
					continue
				}
				wantM, wantN := make([]int, groups), make([]int32, n)
				for range r {
					d := ref.IntN(n)
					wantM[member[d]]++
					wantN[d]++
				}
				gotM, gotN := make([]int, groups), make([]int32, n)
				pm = addDraws(pm, r, n, member, gotM)
				pn = addDraws(pn, r, n, nil, gotN)
				if !slices.Equal(gotM, wantM) {
					t.Fatalf("n=%d seed=%d r=%d: counts by member differ from IntN's", n, seed, r)
				}
				if !slices.Equal(gotN, wantN) {
					t.Fatalf("n=%d seed=%d r=%d: counts by number differ from IntN's", n, seed, r)
				}
			}
		}
	}
}

// BenchmarkAddDraws times the draws of one bootstrap of the published
// partial ROC (B = 1000 resamples of 250 of 500 test presences, as a
// model x extent of the 27M-cell study makes): addDraws, and intN on a
// *rand.PCG as before it (the same numbers).
func BenchmarkAddDraws(b *testing.B) {
	const n, r, iters = 500, 250, 1000
	member := make([]int, n)
	for i := range member {
		member[i] = i
	}
	counts := make([]int, n)
	for _, how := range []string{"addDraws", "intN"} {
		b.Run(how, func(b *testing.B) {
			stop := startCPU(b)
			for i := 0; i < b.N; i++ {
				if how == "addDraws" {
					p := pcgState{9, 9 ^ pcgStream}
					for range iters {
						clear(counts)
						p = addDraws(p, r, n, member, counts)
					}
				} else {
					src := rand.NewPCG(9, 9^pcgStream)
					for range iters {
						clear(counts)
						for range r {
							counts[member[intN(src, n)]]++
						}
					}
				}
			}
			stop()
		})
	}
}

// TestIntNSameAsRand: intN gives rand.Rand.IntN's numbers from the same
// PCG, for powers of two, small and large n (rejections included).
func TestIntNSameAsRand(t *testing.T) {
	for _, n := range []int{1, 2, 3, 7, 64, 100, 250, 499, 500, 1 << 20, math.MaxInt/3 + 7, math.MaxInt} {
		for seed := uint64(0); seed < 4; seed++ {
			a, b := rand.NewPCG(seed, seed^pcgStream), rand.NewPCG(seed, seed^pcgStream)
			r := rand.New(b)
			for i := 0; i < 20000; i++ {
				if got, want := intN(a, n), r.IntN(n); got != want {
					t.Fatalf("n=%d seed=%d draw %d: intN %d, IntN %d", n, seed, i, got, want)
				}
			}
		}
	}
}

// TestDrawsFillSameAsRand: a paired resample's counts (Draws.fill, drawn
// with intN) are those of drawing rand.Rand.IntN from the same PCG, so the
// resamples, and every paired interval, are those of before.
func TestDrawsFillSameAsRand(t *testing.T) {
	for _, n := range []int{1, 2, 5, 64, 499, 4096, 50000} {
		d := Draws{N: n, B: 3, Seed: 11}
		got, want := make([]int32, n), make([]int32, n)
		for b := range d.B {
			d.fill(b, got)
			clear(want)
			r := rand.New(rand.NewPCG(d.Seed, uint64(b)))
			for range n {
				want[r.IntN(n)]++
			}
			if !slices.Equal(got, want) {
				t.Fatalf("N=%d resample %d: counts differ", n, b)
			}
		}
	}
}
