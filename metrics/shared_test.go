package metrics

import (
	"bytes"
	"math"
	"math/rand/v2"
	"testing"
)

// TestAddRowMatchesAdd: AddRow (one widening per run), AddRowTo (one
// range per run for several accumulators) and Shared (cells added once,
// drained into several accumulators whose grids differ, some empty) leave every accumulator byte for byte as Add does cell by cell,
// over rows whose ranges grow, shrink and jump (negative values, values
// near zero, -0, both signs of tiny values, a range far from the others),
// with floored and unfloored layouts.
func TestAddRowMatchesAdd(t *testing.T) {
	r := rand.New(rand.NewPCG(11, 12))
	const row = 40
	draw := func(kind int) float64 {
		switch kind {
		case 0:
			return r.Float64()
		case 1:
			return r.NormFloat64() * 3
		case 2:
			return (r.Float64() - 0.5) * 1e-300 // underflows on coarse grids
		case 3:
			return math.Copysign(0, -1)
		default:
			return 1e30 * r.Float64() // a coarse grid: tiny values underflow on it
		}
	}
	for _, floored := range []bool{false, true} {
		var opts []LayoutOption
		if floored {
			opts = append(opts, WithHistFloor(-8))
		}
		var lv []float64
		for i := 0; i < 50; i++ {
			lv = append(lv, math.Round(r.NormFloat64()*100)/100)
		}
		l, err := NewLayout(append(lv, 0, 0.5), 32, opts...)
		if err != nil {
			t.Fatal(err)
		}
		const members = 4
		ref := make([]*Accumulator, members)  // Add, cell by cell
		rows := make([]*Accumulator, members) // AddRow
		shared := make([]*Accumulator, members)
		to := make([]*Accumulator, members) // AddRowTo
		for k := range ref {
			ref[k], rows[k], shared[k], to[k] = l.NewAccumulator(), l.NewAccumulator(), l.NewAccumulator(), l.NewAccumulator()
		}
		sh := l.NewShared()
		vals, weights, bins := make([]float64, row), make([]int64, row), make([]int32, row)
		for it := 0; it < 300; it++ {
			kind := r.IntN(5)
			if it < 100 {
				kind = it % 2 // first ranges that grow slowly
			}
			for i := range vals {
				vals[i] = draw(kind)
				if r.IntN(10) == 0 {
					vals[i] = draw(r.IntN(5))
				}
				if r.IntN(7) == 0 {
					vals[i] = lv[r.IntN(len(lv))] // ties at layout values
				}
				weights[i] = int64(r.IntN(1000))
			}
			l.LocateRow(vals, bins)
			for i := range bins {
				if r.IntN(9) == 0 {
					bins[i] = -1 // not scored
				}
			}
			// Each member takes some of the rows; member k then gets the
			// same cells through Add, AddRow and Shared.
			var dst, dstTo []*Accumulator
			for k := 0; k < members; k++ {
				if (it+k)%(k+1) != 0 {
					continue
				}
				for i, v := range vals {
					if bins[i] >= 0 {
						ref[k].Add(v, weights[i])
					}
				}
				rows[k].AddRow(bins, vals, weights)
				dst = append(dst, shared[k])
				dstTo = append(dstTo, to[k])
			}
			AddRowTo(dstTo, bins, vals, weights)
			sh.Begin(dst)
			sh.AddRow(bins[:row/2], vals, weights)
			sh.AddRow(bins[row/2:], vals[row/2:], weights[row/2:])
			if err := sh.Drain(); err != nil {
				t.Fatal(err)
			}
			for k := range ref {
				want := EncodeAccumulator(ref[k])
				if got := EncodeAccumulator(rows[k]); !bytes.Equal(got, want) {
					t.Fatalf("floored %v, row %d, member %d: AddRow differs from Add", floored, it, k)
				}
				if got := EncodeAccumulator(shared[k]); !bytes.Equal(got, want) {
					t.Fatalf("floored %v, row %d, member %d: Shared differs from Add", floored, it, k)
				}
				if got := EncodeAccumulator(to[k]); !bytes.Equal(got, want) {
					t.Fatalf("floored %v, row %d, member %d: AddRowTo differs from Add", floored, it, k)
				}
			}
		}
	}
}

// TestSharedGridAfterEmptyDrain: a Begin whose targets got no cell, then
// a Begin with an empty target, gives that target the grid of its own
// cells, as Add does. The first Begin's grid (its finest target's) was
// left behind by the early return of Drain and taken by the empty target,
// so a pass's result depended on which blocks a worker had scored before:
// a study's Boyce window areas differed in 2 of 10 runs (found on a
// global 2.5-arc-minute grid; the sequence is reproduced here by hand).
func TestSharedGridAfterEmptyDrain(t *testing.T) {
	l, err := NewLayout([]float64{0.3, 0.5}, 32)
	if err != nil {
		t.Fatal(err)
	}
	row := func(lo, hi float64, scored bool) ([]int32, []float64, []int64) {
		const n = 64
		vals, weights, bins := make([]float64, n), make([]int64, n), make([]int32, n)
		for i := range vals {
			vals[i] = lo + (hi-lo)*float64(i)/float64(n-1)
			weights[i] = int64(10 + i)
		}
		l.LocateRow(vals, bins)
		if !scored {
			for i := range bins {
				bins[i] = -1
			}
		}
		return bins, vals, weights
	}
	coarse := l.NewAccumulator()
	coarse.AddRow(row(0, 1000, true))
	sh := l.NewShared()
	sh.Begin([]*Accumulator{coarse})
	sh.AddRow(row(0.45, 0.46, false)) // no cell
	if err := sh.Drain(); err != nil {
		t.Fatal(err)
	}
	empty, ref := l.NewAccumulator(), l.NewAccumulator()
	sh.Begin([]*Accumulator{empty})
	sh.AddRow(row(0.45, 0.46, true))
	if err := sh.Drain(); err != nil {
		t.Fatal(err)
	}
	ref.AddRow(row(0.45, 0.46, true))
	if empty.he != ref.he || !bytes.Equal(EncodeAccumulator(empty), EncodeAccumulator(ref)) {
		t.Errorf("the empty target's histogram has exponent %d, Add's %d: it took the grid of an earlier Begin", empty.he, ref.he)
	}
}
