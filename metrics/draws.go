package metrics

import (
	"math/bits"
	"runtime"
	"sync"
	"weak"
)

// Draws is one set of B full-size resamples, with replacement, of the N test
// presences of a run (indexed 0..N-1). Resample b draws N indices with
// math/rand/v2 PCG seeded with (Seed, b): it depends only on the seed, N
// and b, so every model and extent sees the same index sets.
type Draws struct {
	N, B int
	Seed uint64
}

// fill sets counts[g] to the number of times test presence g is drawn in
// resample b. counts must have length N.
func (d Draws) fill(b int, counts []int32) {
	clear(counts)
	// rand.New(rand.NewPCG(d.Seed, b)).IntN(d.N), N times.
	addDraws(pcgState{d.Seed, uint64(b)}, d.N, d.N, nil, counts)
}

// MaxDrawTableBytes is the largest table of resample counts kept for one
// Draws (see DrawTableBytes): B x N bytes. Draws above it are drawn again
// wherever they are used. Our choice: 128 MiB holds 1,000 resamples of up
// to 134,000 test points; at 32 MiB, 50,000 test points (50 MB) were drawn
// again for every comparison, and a run of 100,000 occurrences on 13
// extents spent 10.0 s in its paired analysis instead of 4.2.
const MaxDrawTableBytes = 128 << 20

// DrawTableBytes returns the bytes of the table of resample counts that
// the comparisons and BootSD keep for d (one byte per resample and test
// presence, B x N), or 0 when d is not tabled (above MaxDrawTableBytes).
// A run holds one at most: it lives while some evaluator that used it
// does.
func DrawTableBytes(d Draws) int64 {
	n := int64(max(d.N, 0)) * int64(max(d.B, 0))
	if n > MaxDrawTableBytes {
		return 0
	}
	return n
}

// useDrawTable is false only in the tests that check the table against
// drawing every resample again.
var useDrawTable = true

// drawTable holds the counts of every resample of one Draws:
// counts[b*N+g] is the number of times test presence g is drawn in
// resample b.
type drawTable struct {
	n      int
	counts []uint8
}

// row returns the counts of resample b.
func (t *drawTable) row(b int) []uint8 { return t.counts[b*t.n : (b+1)*t.n] }

// drawTables holds the table of each Draws in use, weakly: a table lives
// while an evaluator (or a Compare under way) holds it, so a run's table
// goes with the run's evaluators. untabled marks a Draws with a count
// above 255 (impossible for N < 256; for larger N, within the table's
// size, a chance of about 1e-500 per resample: the Poisson(1) tail),
// drawn again wherever it is used.
var drawTables struct {
	sync.Mutex
	m map[Draws]tableEntry
}

type tableEntry struct {
	tab      weak.Pointer[drawTable]
	untabled bool
}

// table returns the table of d's counts, building it on first use (the
// same counts fill gives, drawn once), or nil when d is not tabled
// (DrawTableBytes 0, or a count above 255). Safe for concurrent use; the
// caller keeps the table alive by holding it.
func (d Draws) table() *drawTable {
	if d.N <= 0 || d.B <= 0 || DrawTableBytes(d) == 0 || !useDrawTable {
		return nil
	}
	drawTables.Lock()
	defer drawTables.Unlock()
	if en := drawTables.m[d]; en.untabled {
		return nil
	} else if t := en.tab.Value(); t != nil {
		return t
	}
	if drawTables.m == nil {
		drawTables.m = map[Draws]tableEntry{}
	}
	t := &drawTable{n: d.N, counts: make([]uint8, d.N*d.B)}
	global := make([]int32, d.N)
	for b := 0; b < d.B; b++ {
		d.fill(b, global)
		row := t.row(b)
		for g, c := range global {
			if c > 255 {
				drawTables.m[d] = tableEntry{untabled: true}
				return nil
			}
			row[g] = uint8(c)
		}
	}
	drawTables.m[d] = tableEntry{tab: weak.Make(t)}
	runtime.AddCleanup(t, func(d Draws) {
		drawTables.Lock()
		defer drawTables.Unlock()
		if en, ok := drawTables.m[d]; ok && !en.untabled && en.tab.Value() == nil {
			delete(drawTables.m, d)
		}
	}, d)
	return t
}

// resampler gives the counts of the resamples of one Draws at chosen
// test presences, from its table when it has one, else drawing each
// resample again (once for any number of calls on it in a row).
type resampler struct {
	d      Draws
	tab    *drawTable
	global []int32 // the counts of resample filled, without a table
	filled int
}

func newResampler(d Draws) *resampler {
	rs := &resampler{d: d, tab: d.table(), filled: -1}
	if rs.tab == nil {
		rs.global = make([]int32, d.N)
	}
	return rs
}

// draw fills rs.global with the counts of resample b, unless it holds
// them already.
func (rs *resampler) draw(b int) {
	if rs.filled != b {
		rs.d.fill(b, rs.global)
		rs.filled = b
	}
}

// gather sets dst[k] to the number of times test presence ids[k] is drawn
// in resample b.
func (rs *resampler) gather(b int, ids []int, dst []int32) {
	if rs.tab != nil {
		row := rs.tab.row(b)
		for k, id := range ids {
			dst[k] = int32(row[id])
		}
		return
	}
	rs.draw(b)
	for k, id := range ids {
		dst[k] = rs.global[id]
	}
}

// pcgState is the state of a math/rand/v2 PCG (rand.NewPCG(seed1, seed2)
// starts at hi = seed1, lo = seed2), held by value: addDraws keeps it in
// registers through its loop, where drawing through a *rand.PCG (intN,
// now the reference in the tests) took its state through memory for each
// draw (a store and a load on the chain of multiplications that each draw
// waits for).
type pcgState struct{ hi, lo uint64 }

// addDraws draws r numbers i = rand.New(p).IntN(n) (n > 0) from p, in
// order, adding 1 to counts[member[i]] for each (to
// counts[i] when member is nil), and returns the state after them. The
// operations are PCG.Uint64's (math/rand/v2: a 128-bit LCG step, then the
// DXSM output) and rand.Rand.IntN's (uint64n: Lemire's multiply-shift
// with rejection, which its 32-bit path reproduces exactly), the same numbers in the same order (TestAddDrawsSameAsRand).
func addDraws[C int | int32](p pcgState, r, n int, member []int, counts []C) pcgState {
	const (
		mulHi    = 2549297995355413924
		mulLo    = 4865540595714422341
		incHi    = 6364136223846793005
		incLo    = 1442695040888963407
		cheapMul = 0xda942042e4dd58b5
	)
	hi, lo := p.hi, p.lo
	next := func() uint64 {
		h, l := bits.Mul64(lo, mulLo)
		h += hi*mulLo + lo*mulHi
		l, c := bits.Add64(l, incLo, 0)
		h, _ = bits.Add64(h, incHi, c)
		hi, lo = h, l
		h ^= h >> 32
		h *= cheapMul
		h ^= h >> 48
		h *= l | 1
		return h
	}
	u := uint64(n)
	// draw is rand.Rand.IntN(n) on the state in hi and lo.
	draw := func() uint64 {
		if u&(u-1) == 0 { // a power of two: mask
			return next() & (u - 1)
		}
		h, l := bits.Mul64(next(), u)
		if l < u {
			thresh := -u % u
			for l < thresh {
				h, l = bits.Mul64(next(), u)
			}
		}
		return h
	}
	if member == nil {
		for range r {
			counts[draw()]++
		}
	} else {
		member = member[:n]
		for range r {
			counts[member[draw()]]++
		}
	}
	return pcgState{hi, lo}
}
