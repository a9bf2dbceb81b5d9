package extent

import (
	"math/rand/v2"
	"slices"
	"testing"
)

// TestValid: Has, Row and AddRow against the cells they were given, cell
// by cell (brute force, by construction), on rows of every density, so
// that both ways of holding a row (runs and bitset) are met.
func TestValid(t *testing.T) {
	rng := rand.New(rand.NewPCG(3, 5))
	for _, w := range []int{1, 63, 64, 65, 200} {
		const h = 40
		in := make([]bool, w*h)
		for row := 0; row < h; row++ {
			// Row density from none to every cell, in long runs or
			// scattered cells.
			p, scattered := float64(row%10)/9, row%2 == 1
			c := 0
			for c < w {
				n := 1
				if !scattered {
					n = 1 + rng.IntN(20)
				}
				on := rng.Float64() < p
				for ; n > 0 && c < w; n, c = n-1, c+1 {
					in[row*w+c] = on
				}
			}
		}
		v := NewValidFunc(w, h, func(i int) bool { return in[i] })
		kinds := map[bool]int{}
		for row := 0; row < h; row++ {
			kinds[v.rows[row].bits != nil]++
			var want []int32
			for c := 0; c < w; c++ {
				if in[row*w+c] {
					want = appendRun(want, int32(c), int32(c+1))
				}
				if v.Has(row*w+c) != in[row*w+c] {
					t.Fatalf("w=%d: Has(row %d, column %d) = %v", w, row, c, !in[row*w+c])
				}
			}
			if got := v.Row(row, nil); !slices.Equal(got, want) {
				t.Fatalf("w=%d: Row(%d) = %v, want %v", w, row, got, want)
			}
		}
		if w == 200 && (kinds[true] == 0 || kinds[false] == 0) {
			t.Fatalf("w=%d: rows held as bitsets %d, as runs %d: both ways must be met", w, kinds[true], kinds[false])
		}
		if v.Bytes() > MaxValidBytes(w, h) {
			t.Fatalf("w=%d: %d bytes, more than the bound %d", w, v.Bytes(), MaxValidBytes(w, h))
		}

		// AddRow: two halves of each row's cells, split at a column,
		// give the row; a cell added twice is refused.
		u := NewValid(w, h)
		for row := 0; row < h; row++ {
			all := v.Row(row, nil)
			cut := int32(rng.IntN(w + 1))
			left := intersect(nil, all, rowRuns{0, cut})
			right := minus(nil, all, rowRuns{0, cut})
			for _, half := range []rowRuns{right, left} {
				if err := u.AddRow(row, half); err != nil {
					t.Fatalf("w=%d row %d: %v", w, row, err)
				}
			}
			if got := u.Row(row, nil); !slices.Equal(got, all) {
				t.Fatalf("w=%d: AddRow halves of row %d give %v, want %v", w, row, got, all)
			}
			if len(all) > 0 {
				if err := u.AddRow(row, all[:2]); err == nil {
					t.Fatalf("w=%d row %d: a cell added twice was not refused", w, row)
				}
			}
		}
	}
}

// TestValidMemoryFollowsBoundaries: a grid whose cells with data form a
// few large shapes (land and sea) holds runs, not a bitset: its memory
// grows with the rows and the shapes' edges, so a grid with 16 times the
// cells (4 times the rows) takes about 4 times the memory, while a
// whole-grid bitset takes 16 times.
func TestValidMemoryFollowsBoundaries(t *testing.T) {
	land := func(side int) *Valid {
		return NewValidFunc(side, side, func(i int) bool {
			// Two discs and the southern fifth.
			x, y := float64(i%side)/float64(side), float64(i/side)/float64(side)
			d1 := (x-0.3)*(x-0.3) + (y-0.3)*(y-0.3)
			d2 := (x-0.7)*(x-0.7) + (y-0.5)*(y-0.5)
			return d1 < 0.04 || d2 < 0.02 || y > 0.8
		})
	}
	small, big := land(1000).Bytes(), land(4000).Bytes()
	if big > 5*small {
		t.Fatalf("4000 x 4000 grid takes %d bytes, 1000 x 1000 %d: more than 5 times", big, small)
	}
	if bits := MaxValidBytes(4000, 4000); big*10 > bits {
		t.Fatalf("4000 x 4000 grid takes %d bytes, not a tenth of a bitset's %d", big, bits)
	}
}
