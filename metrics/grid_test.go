package metrics

import (
	"bytes"
	"encoding/binary"
	"errors"
	"fmt"
	"math"
	"math/big"
	"math/rand/v2"
	"reflect"
	"slices"
	"testing"
)

// refGridBin is floor(v / 2^e) in exact big-float arithmetic.
func refGridBin(v float64, e int) int64 {
	x := new(big.Float).SetPrec(2000).SetFloat64(v)
	x.SetMantExp(x, -e)
	i, acc := x.Int(nil)  // truncates toward zero
	if acc == big.Above { // x negative and not an integer
		i.Sub(i, big.NewInt(1))
	}
	return i.Int64()
}

// TestGridBin checks g_e(v) against exact arithmetic, including values
// whose scaling underflows (tiny negatives at coarse exponents must land in
// bin -1, not in the bin of zero) and bin edges.
func TestGridBin(t *testing.T) {
	r := rand.New(rand.NewPCG(5, 6))
	vals := []float64{0, 5e-324, -5e-324, 1e-300, -1e-300, 1, -1, 0.5, -0.5, 1e300, -1e300, math.MaxFloat64, -math.MaxFloat64}
	for i := 0; i < 300; i++ {
		vals = append(vals, (r.Float64()-0.5)*math.Pow(2, float64(r.IntN(200)-100)))
	}
	for _, e := range []int{minGridExp, -600, -60, -12, -1, 0, 1, 12, 60, 600, 1000} {
		for _, v := range vals {
			// Only pairs inside the allowed range: |v*2^-e| < 2^gridBits.
			if e < gridFloor(v, v) {
				continue
			}
			if got, want := gridBin(v, e), refGridBin(v, e); got != want {
				t.Errorf("g_%d(%v) = %d, want %d", e, v, got, want)
			}
			g := gridBin(v, e)
			if lo, hi := gridEdge(g, e), gridEdge(g+1, e); !(lo <= v && v < hi) {
				t.Errorf("g_%d(%v) = %d, whose interval [%v, %v) misses the value", e, v, g, lo, hi)
			}
		}
	}
}

// histOf returns the histogram of a as a map from grid bin to sums, with
// its exponent.
func histOf(a *Accumulator) (int, map[int64]sum) {
	m := map[int64]sum{}
	for i, s := range a.hist {
		if s.n != 0 {
			m[a.hbase+int64(i)] = s
		}
	}
	return a.he, m
}

// gridCase is a set of cells for the histogram tests.
type gridCase struct {
	name string
	v    []float64
}

func gridCases(r *rand.Rand) []gridCase {
	n := 3000
	uniform := make([]float64, n)
	ramp := make([]float64, n)
	wide := make([]float64, n)
	tiny := make([]float64, n)
	zeros := make([]float64, n)
	for i := range n {
		uniform[i] = r.Float64()
		ramp[i] = float64(i) / float64(n)
		wide[i] = (r.Float64() - 0.5) * math.Pow(10, float64(r.IntN(40)-20))
		tiny[i] = -math.Pow(2, -float64(r.IntN(60))) * r.Float64()
		if i%3 == 0 {
			zeros[i] = r.Float64()
		}
	}
	tiny = append(tiny, 1e300) // coarse grid: tiny negatives underflow
	return []gridCase{
		{"uniform", uniform},
		{"increasing", ramp},
		{"decreasing", reversed(ramp)},
		{"wide signed", wide},
		{"tiny negatives", tiny},
		{"mostly zeros", zeros},
		{"one value", []float64{0.3, 0.3, 0.3}},
		{"extremes", []float64{-math.MaxFloat64, 0, math.MaxFloat64, 1}},
	}
}

// TestHistogramCanonical: whatever the order of the cells and however they
// are split into partial accumulators and merged, the histogram ends on
// the canonical exponent of its range with, in every grid bin, exactly the
// cells whose value the bin's interval holds, and the encoding is the same
// bytes. It also checks the resolution: the range spans at least (H-1)/2
// bins unless the exponent is at its floor.
func TestHistogramCanonical(t *testing.T) {
	r := rand.New(rand.NewPCG(7, 8))
	for _, tc := range gridCases(r) {
		for _, bins := range []int{16, 1000, 4096} {
			t.Run(fmt.Sprintf("%s/bins=%d", tc.name, bins), func(t *testing.T) {
				l, err := NewLayout([]float64{0.5}, bins)
				if err != nil {
					t.Fatal(err)
				}
				w := make([]int64, len(tc.v))
				for i := range w {
					w[i] = int64(1 + i%7)
				}
				// In order, one accumulator.
				ref := l.NewAccumulator()
				for i, v := range tc.v {
					ref.Add(v, w[i])
				}
				lo, hi := slices.Min(tc.v), slices.Max(tc.v)
				e := gridExp(lo, hi, bins)
				if ref.he != e {
					t.Fatalf("exponent %d, want canonical %d", ref.he, e)
				}
				if e > gridFloor(lo, hi) {
					if span := float64(gridBin(hi, e)-gridBin(lo, e)) + 1; hi > lo && span < float64(bins-1)/2 {
						t.Errorf("range [%v, %v] spans %v bins of %d", lo, hi, span, bins)
					}
				}
				want := map[int64]sum{}
				for i, v := range tc.v {
					g := refGridBin(v, e)
					s := want[g]
					s.area += w[i]
					s.n++
					want[g] = s
				}
				if _, got := histOf(ref); !mapsEqual(got, want) {
					t.Fatalf("histogram differs from the brute-force count of values per bin")
				}
				enc := EncodeAccumulator(ref)
				for trial := 0; trial < 5; trial++ {
					perm := r.Perm(len(tc.v))
					parts := make([]*Accumulator, 1+r.IntN(6))
					for i := range parts {
						parts[i] = l.NewAccumulator()
					}
					for _, i := range perm {
						parts[r.IntN(len(parts))].Add(tc.v[i], w[i])
					}
					for len(parts) > 1 { // merge random pairs
						i, j := r.IntN(len(parts)), r.IntN(len(parts)-1)
						if j >= i {
							j++
						}
						if err := parts[i].Merge(parts[j]); err != nil {
							t.Fatal(err)
						}
						parts = append(parts[:j], parts[j+1:]...)
					}
					if got := EncodeAccumulator(parts[0]); !bytes.Equal(got, enc) {
						t.Fatalf("trial %d: order and merges changed the accumulator", trial)
					}
					back, err := DecodeAccumulator(enc, l)
					if err != nil {
						t.Fatal(err)
					}
					if !bytes.Equal(EncodeAccumulator(back), enc) {
						t.Fatal("decoding changed the accumulator")
					}
				}
			})
		}
	}
}

func reversed(v []float64) []float64 {
	o := slices.Clone(v)
	slices.Reverse(o)
	return o
}

func mapsEqual(a, b map[int64]sum) bool {
	if len(a) != len(b) {
		return false
	}
	for k, v := range a {
		if b[k] != v {
			return false
		}
	}
	return true
}

// TestRingHistogram: the ring outer.Sub(inner) holds, on the outer grid,
// exactly the histogram of the cells in outer but not in inner, and its
// range bounds hold every ring cell.
func TestRingHistogram(t *testing.T) {
	r := rand.New(rand.NewPCG(9, 10))
	l, _ := NewLayout([]float64{0.2, 0.9}, 64)
	outer, inner, direct := l.NewAccumulator(), l.NewAccumulator(), l.NewAccumulator()
	var ring []float64
	for i := 0; i < 5000; i++ {
		v := r.Float64() * 3
		outer.Add(v, 2)
		if v > 1 && v < 1.2 && i%2 == 0 { // the inner extent: a narrow range, finer grid
			inner.Add(v, 2)
		} else {
			direct.Add(v, 2)
			ring = append(ring, v)
		}
	}
	if inner.he >= outer.he {
		t.Fatalf("inner exponent %d not finer than outer %d: the test needs a finer inner grid", inner.he, outer.he)
	}
	got, err := outer.Sub(inner)
	if err != nil {
		t.Fatal(err)
	}
	if got.he != outer.he || got.Min() > slices.Min(ring) || got.Max() < slices.Max(ring) {
		t.Errorf("ring exponent %d (outer %d), range [%v, %v], ring cells [%v, %v]", got.he, outer.he, got.Min(), got.Max(), slices.Min(ring), slices.Max(ring))
	}
	direct.regrid(outer.he, direct.min, direct.max)
	_, g := histOf(got)
	_, d := histOf(direct)
	if !mapsEqual(g, d) {
		t.Error("ring histogram differs from the ring's cells binned on the outer grid")
	}
	// A larger inner set than the outer one is refused.
	if _, err := inner.Sub(outer); err == nil {
		t.Error("Sub accepted an inner accumulator reaching outside the outer one")
	}
}

// BenchmarkGridWiden measures the worst order for the histogram's grid: a
// range that grows with every cell (a ramp read in order), per cell added.
func BenchmarkGridWiden(b *testing.B) {
	l, _ := NewLayout([]float64{0.5}, 4096)
	a := l.NewAccumulator()
	b.ReportAllocs()
	for i := 0; i < b.N; i++ {
		if i&(1<<20-1) == 0 {
			a.Reset()
		}
		v := float64(i&(1<<20-1)) * 1e-6
		a.AddLocated(l.Locate(v), v, 1)
	}
}

// TestHugeRangeFinite: a background spanning the whole float64 range (a
// width that overflows) still gives finite scores and an undefined Boyce
// index, with no panic: the histogram's grid reaches it, the windows
// cannot be formed.
func TestHugeRangeFinite(t *testing.T) {
	test := []float64{-1e300, 0.5, 1e300}
	l, err := NewLayout(test, 4096)
	if err != nil {
		t.Fatal(err)
	}
	a := l.NewAccumulator()
	for i, v := range []float64{-math.MaxFloat64, -1e300, -1, 0, 0.5, 2, 1e300, math.MaxFloat64} {
		a.Add(v, int64(1+i))
	}
	sc, err := Score(a, nil, test, Settings{E: []float64{0.05}, Iterations: 10, Seed: 1})
	if err != nil {
		t.Fatal(err)
	}
	checkFinite(t, reflect.ValueOf(sc), "Scores")
	if sc.Boyce.Defined {
		t.Errorf("Boyce %+v defined on an infinite-width range", sc.Boyce)
	}
}

// TestFloorExp checks FloorExp on powers of two and values between them
// (expected exponents by the definition 2^e <= x < 2^(e+1)).
func TestFloorExp(t *testing.T) {
	for _, c := range []struct {
		x    float64
		want int
	}{{1, 0}, {3, 1}, {4, 2}, {0.75, -1}, {0.5, -1}, {2.5e6 / 4096, 9}, {math.MaxFloat64, 1023}, {0x1p-1022, -1022}} {
		if got := FloorExp(c.x); got != c.want {
			t.Errorf("FloorExp(%v) = %d, want %d", c.x, got, c.want)
		}
	}
}

// TestHistogramFloor checks WithHistFloor: whatever the cells' range, order
// and merges, every accumulator's exponent is the canonical one raised to
// the floor, each cell lies in the histogram bin FloorBin(v) >> (e-floor)
// (so values with one floor bin share the bin of every accumulator), the
// encoding is the same bytes, and the floor is part of the layout's
// fingerprint and encoding.
func TestHistogramFloor(t *testing.T) {
	r := rand.New(rand.NewPCG(11, 12))
	const bins = 64
	floor := FloorExp(1e6 / bins) // distances up to 1e6, as the null's
	l, err := NewLayout([]float64{-5e4, -100}, bins, WithHistFloor(floor))
	if err != nil {
		t.Fatal(err)
	}
	if e, ok := l.HistFloor(); !ok || e != floor {
		t.Fatalf("HistFloor() = %d, %v, want %d, true", e, ok, floor)
	}
	plain, _ := NewLayout([]float64{-5e4, -100}, bins)
	if _, ok := plain.HistFloor(); ok || plain.Fingerprint() == l.Fingerprint() {
		t.Fatal("a layout without floor reports one or has the floored layout's fingerprint")
	}
	for _, span := range []float64{0, 1, 300, 5e3, 2e5, 1e6} {
		vals := make([]float64, 500)
		w := make([]int64, len(vals))
		base := -1e6 + r.Float64()*(1e6-span)
		for i := range vals {
			vals[i], w[i] = base+span*r.Float64(), int64(1+i%5)
		}
		vals[0], vals[1] = base, base+span // both ends; 0 for the widest span
		ref := l.NewAccumulator()
		for i, v := range vals {
			ref.Add(v, w[i])
		}
		lo, hi := slices.Min(vals), slices.Max(vals)
		want := max(floor, gridExp(lo, hi, bins))
		if ref.he != want {
			t.Fatalf("span %v: exponent %d, want max(floor %d, canonical %d)", span, ref.he, floor, gridExp(lo, hi, bins))
		}
		counts := map[int64]sum{}
		for i, v := range vals {
			g := l.FloorBin(v) >> uint(ref.he-floor)
			if g != refGridBin(v, ref.he) {
				t.Fatalf("span %v: FloorBin(%v) >> %d = %d, the bin is %d", span, v, ref.he-floor, g, refGridBin(v, ref.he))
			}
			s := counts[g]
			s.area += w[i]
			s.n++
			counts[g] = s
		}
		if _, got := histOf(ref); !mapsEqual(got, counts) {
			t.Fatalf("span %v: histogram differs from the floor-bin count", span)
		}
		enc := EncodeAccumulator(ref)
		for trial := 0; trial < 4; trial++ {
			parts := []*Accumulator{l.NewAccumulator(), l.NewAccumulator(), l.NewAccumulator()}
			for _, i := range r.Perm(len(vals)) {
				parts[r.IntN(3)].Add(vals[i], w[i])
			}
			if err := parts[2].Merge(parts[0]); err != nil {
				t.Fatal(err)
			}
			if err := parts[1].Merge(parts[2]); err != nil {
				t.Fatal(err)
			}
			if !bytes.Equal(EncodeAccumulator(parts[1]), enc) {
				t.Fatalf("span %v trial %d: order and merges changed the accumulator", span, trial)
			}
		}
		if back, err := DecodeAccumulator(enc, l); err != nil || !bytes.Equal(EncodeAccumulator(back), enc) {
			t.Fatalf("span %v: decoding: %v", span, err)
		}
		if _, err := DecodeAccumulator(enc, plain); !errors.Is(err, ErrLayoutMismatch) {
			t.Errorf("span %v: decoded onto the layout without floor: %v", span, err)
		}
		// An exponent below the floor is refused even with a valid checksum.
		if span == 300 {
			bad := bytes.Clone(enc)
			at := headLen + sumLen + 16 + 16*l.Bins()
			binary.LittleEndian.PutUint64(bad[at:], uint64(int64(floor-1)))
			binary.LittleEndian.PutUint64(bad[at+8:], uint64(gridBin(lo, floor-1)))
			if _, err := DecodeAccumulator(reseal(bad), l); !errors.Is(err, ErrCorrupt) {
				t.Errorf("exponent below the floor decoded: %v", err)
			}
		}
	}
	back, err := DecodeLayout(EncodeLayout(l))
	if err != nil || back.Fingerprint() != l.Fingerprint() {
		t.Fatalf("layout round trip: %v", err)
	}
	if e, ok := back.HistFloor(); !ok || e != floor {
		t.Errorf("decoded layout's floor %d, %v, want %d", e, ok, floor)
	}
	if _, err := NewLayout(nil, bins, WithHistFloor(minGridExp-1)); err == nil {
		t.Error("a floor below the smallest grid exponent was accepted")
	}
}
