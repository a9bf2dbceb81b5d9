package extent

import (
	"fmt"
	"math"
	"math/rand/v2"
	"slices"
	"testing"

	"areasweep/extent/vocab"
)

// cellsOf expands runs into a per-column membership of a row of width w.
func cellsOf(r []int32, w int) []bool {
	out := make([]bool, w)
	for i := 0; i < len(r); i += 2 {
		for c := r[i]; c < r[i+1]; c++ {
			out[c] = true
		}
	}
	return out
}

// runsOf is the canonical runs of a per-column membership, built cell by
// cell (independently of appendRun).
func runsOf(in []bool) rowRuns {
	var r rowRuns
	for c := 0; c < len(in); c++ {
		if in[c] && (c == 0 || !in[c-1]) {
			r = append(r, int32(c))
		}
		if in[c] && (c == len(in)-1 || !in[c+1]) {
			r = append(r, int32(c+1))
		}
	}
	return r
}

// randomRuns returns unsorted, possibly overlapping and touching runs in
// a row of width w, and their union cell by cell.
func randomRuns(rng *rand.Rand, w int) ([]int32, []bool) {
	var r []int32
	in := make([]bool, w)
	for n := rng.IntN(6); n > 0; n-- {
		c0 := rng.IntN(w)
		c1 := c0 + rng.IntN(w-c0+1)
		r = append(r, int32(c0), int32(c1))
		for c := c0; c < c1; c++ {
			in[c] = true
		}
	}
	return r, in
}

// TestRunOps checks canonical, union, intersect, minus, subset, has,
// Valid.clip and Span against the same operations done cell by cell on
// random rows (brute force, by construction).
func TestRunOps(t *testing.T) {
	rng := rand.New(rand.NewPCG(7, 11))
	const w = 150
	for trial := 0; trial < 2000; trial++ {
		ra, ina := randomRuns(rng, w)
		rb, inb := randomRuns(rng, w)
		a := canonical(append(rowRuns(nil), ra...))
		b := canonical(append(rowRuns(nil), rb...))
		if !slices.Equal(a, runsOf(ina)) {
			t.Fatalf("canonical(%v) = %v, want %v", ra, a, runsOf(ina))
		}
		and, or, sub := make([]bool, w), make([]bool, w), make([]bool, w)
		sup := true
		for c := 0; c < w; c++ {
			and[c], or[c], sub[c] = ina[c] && inb[c], ina[c] || inb[c], ina[c] && !inb[c]
			if ina[c] && !inb[c] {
				sup = false
			}
			if a.has(c) != ina[c] {
				t.Fatalf("%v has %d = %v", a, c, a.has(c))
			}
		}
		for _, tc := range []struct {
			name string
			got  rowRuns
			want []bool
		}{
			{"union", union(nil, a, b), or},
			{"intersect", intersect(nil, a, b), and},
			{"minus", minus(nil, a, b), sub},
		} {
			if !slices.Equal(tc.got, runsOf(tc.want)) {
				t.Fatalf("%s(%v, %v) = %v, want %v", tc.name, a, b, tc.got, runsOf(tc.want))
			}
		}
		if subset(a, b) != sup {
			t.Fatalf("subset(%v, %v) = %v, want %v", a, b, subset(a, b), sup)
		}
		// Valid.clip on a row held as runs (sparse) and on one held as
		// a bitset (ragged), against the same cell by cell.
		for _, dense := range []bool{false, true} {
			want := make([]bool, w)
			valid := NewValidFunc(w, 2, func(i int) bool {
				c := i % w
				in := c > 70 && c < 140
				if dense {
					in = in || rng.IntN(3) > 0
				}
				if in && i >= w {
					want[c] = ina[c]
				}
				return in
			})
			if isBits := valid.rows[1].bits != nil; isBits != dense {
				t.Fatalf("dense=%v: row held as a bitset = %v", dense, isBits)
			}
			if got := valid.clip(nil, a, 1); !slices.Equal(got, runsOf(want)) {
				t.Fatalf("dense=%v: clip(%v) = %v, want %v", dense, a, got, runsOf(want))
			}
		}
	}
}

// TestSpan: Family.Span returns a member's cells in a column window minus
// an inner member's, checked cell by cell (brute force, by construction).
func TestSpan(t *testing.T) {
	g, err := NewGrid(97, 3, [6]float64{0, 1, 0, 3, 0, -1}, "EPSG:4326")
	if err != nil {
		t.Fatal(err)
	}
	rng := rand.New(rand.NewPCG(3, 5))
	var rows [2][3][]int32
	var in [2][3][]bool
	for k := 0; k < 2; k++ {
		for r := 0; r < 3; r++ {
			rows[k][r], in[k][r] = randomRuns(rng, g.Width)
		}
	}
	f := NewFamilyFromRuns(g, []Member{{ID: "a"}, {ID: "b"}}, func(k, row int) []int32 { return rows[k][row] })
	var s SpanScratch
	for r := 0; r < 3; r++ {
		for _, win := range [][2]int{{0, 97}, {10, 40}, {64, 97}, {5, 6}} {
			for _, inner := range []int{-1, 1} {
				t.Run(fmt.Sprintf("row%d/%d-%d/inner%d", r, win[0], win[1], inner), func(t *testing.T) {
					got := cellsOf(f.Span(0, inner, r, win[0], win[1], &s), g.Width)
					for c := 0; c < g.Width; c++ {
						want := c >= win[0] && c < win[1] && in[0][r][c] && (inner < 0 || !in[1][r][c])
						if got[c] != want {
							t.Fatalf("column %d: %v, want %v", c, got[c], want)
						}
						if f.Has(0, r*g.Width+c) != in[0][r][c] {
							t.Fatalf("Has column %d wrong", c)
						}
					}
				})
			}
		}
	}
}

// TestRepeatAdd: repeatAdd gives bit for bit the float64 sum of adding a
// value n times in a row, on random starting sums, cell areas (km^2 of
// cells from 30 m to 1 degree), run lengths, and values made to fall on
// exact halves of an ulp (round-half-to-even cases), against the loop.
func TestRepeatAdd(t *testing.T) {
	rng := rand.New(rand.NewPCG(17, 19))
	loop := func(s, a float64, n int) float64 {
		for i := 0; i < n; i++ {
			s += a
		}
		return s
	}
	for trial := 0; trial < 20000; trial++ {
		var s, a float64
		switch trial % 5 {
		case 0: // a running area sum and a cell area
			s = math.Ldexp(rng.Float64(), rng.IntN(40)-10)
			a = math.Ldexp(0.5+rng.Float64(), rng.IntN(16)-12)
		case 1: // from zero
			a = rng.Float64() * 100
		case 2: // exact half ulps of s
			s = math.Ldexp(1+rng.Float64(), rng.IntN(30))
			_, e := math.Frexp(s)
			a = math.Ldexp(float64(2*rng.IntN(50)+1), e-54)
		case 3: // tiny increments, below half an ulp or near it
			s = math.Ldexp(1+rng.Float64(), 30)
			a = math.Ldexp(rng.Float64(), -24+rng.IntN(4))
		case 4: // just below a power of two: the sums cross binades
			e := rng.IntN(20)
			s = math.Ldexp(1, e) - math.Ldexp(float64(rng.IntN(1000)), e-53)
			a = math.Ldexp(float64(rng.IntN(7)+1)+rng.Float64(), e-53)
		}
		n := rng.IntN(3000)
		if trial%50 == 0 {
			n = 200000
		}
		if got, want := repeatAdd(s, a, n), loop(s, a, n); math.Float64bits(got) != math.Float64bits(want) {
			t.Fatalf("repeatAdd(%v, %v, %d) = %v, loop gives %v", s, a, n, got, want)
		}
	}
}

// TestRingsMatchSpan checks Family.Rings against Span(k, previous member)
// for every member of a nested sequence, on random nested members (each
// row's runs of member k+1 hold those of k, with rows where the largest
// member is empty) and random column windows, some inside a run of a
// member, reusing one scratch.
func TestRingsMatchSpan(t *testing.T) {
	g, err := NewGrid(200, 40, [6]float64{0, 0.01, 0, 1, 0, -0.01}, "EPSG:4326")
	if err != nil {
		t.Fatal(err)
	}
	defer g.Close()
	rng := rand.New(rand.NewPCG(3, 4))
	const members = 5
	rows := make([][members][]int32, g.Height)
	for row := range rows {
		if row%7 == 3 {
			continue // no member here
		}
		var prev []int32
		for k := range members {
			// Member k: member k-1's runs widened, plus a few new runs.
			var r []int32
			for i := 0; i < len(prev); i += 2 {
				r = append(r, max(prev[i]-int32(rng.IntN(4)), 0), min(prev[i+1]+int32(rng.IntN(4)), 200))
			}
			for range rng.IntN(3) {
				a := int32(rng.IntN(190))
				r = append(r, a, a+1+int32(rng.IntN(10)))
			}
			rows[row][k] = r
			prev = r
		}
	}
	ms := make([]Member, members)
	seq := make([]int, members)
	for k := range ms {
		ms[k] = Member{ID: fmt.Sprint(k), Status: vocab.StatusOK}
		seq[k] = k
	}
	f := NewFamilyFromRuns(g, ms, func(k, row int) []int32 { return rows[row][k] })
	// The runs were merged: re-check nesting on the family itself.
	for k := 1; k < members; k++ {
		if !f.nested(k-1, k) {
			t.Fatalf("member %d not inside member %d", k-1, k)
		}
	}
	var s, ref SpanScratch
	for row := range g.Height {
		for i := range 30 {
			c0 := rng.IntN(200)
			c1 := c0 + 1 + rng.IntN(200-c0)
			if r := f.Runs(rng.IntN(members), row); i >= 20 && len(r) > 0 {
				// A window inside a run of some member: every larger
				// member holds all of it.
				j := 2 * rng.IntN(len(r)/2)
				c0 = int(r[j]) + rng.IntN(int(r[j+1]-r[j]))
				c1 = c0 + 1 + rng.IntN(int(r[j+1])-c0)
			}
			next := 0
			f.Rings(seq, row, c0, c1, &s, func(k int, runs []int32) {
				if k != seq[next] {
					t.Fatalf("row %d: member %d emitted, want %d", row, k, seq[next])
				}
				inner := -1
				if next > 0 {
					inner = seq[next-1]
				}
				want := f.Span(k, inner, row, c0, c1, &ref)
				if !slices.Equal(runs, want) && !(len(runs) == 0 && len(want) == 0) {
					t.Fatalf("row %d window [%d,%d) member %d: Rings %v, Span %v", row, c0, c1, k, runs, want)
				}
				next++
			})
			if next != members {
				t.Fatalf("row %d: %d members emitted, want %d", row, next, members)
			}
		}
	}
}
