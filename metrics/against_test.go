package metrics

import (
	"math"
	"math/rand/v2"
	"testing"
)

// TestAUCAgainst checks the exact AUC of presences against an
// accumulator's background against a brute-force pairwise count written
// here (Hanley & McNeil 1982: the probability that a presence outscores a
// background cell, ties counting half), and that a perfect separation of
// presences far outweighing the background gives exactly 1, never 1 + ulp.
func TestAUCAgainst(t *testing.T) {
	rng := rand.New(rand.NewPCG(7, 11))
	for c := 0; c < 40; c++ {
		n := 1 + rng.IntN(30)
		pres := make([]float64, n)
		for i := range pres {
			pres[i] = float64(rng.IntN(20)) / 4
		}
		lay, err := NewLayout(pres, 0, 5, 64)
		if err != nil {
			t.Fatal(err)
		}
		acc := lay.NewAccumulator()
		type cell struct {
			v float64
			w int64
		}
		var cells []cell
		for k := 0; k < 200; k++ {
			cl := cell{float64(rng.IntN(21)) / 4, 1 + rng.Int64N(1<<40)}
			cells = append(cells, cl)
			acc.Add(cl.v, cl.w)
		}
		got, ok := acc.AUCAgainst(pres)
		if !ok {
			t.Fatalf("case %d: not ok", c)
		}
		num, den := 0.0, 0.0
		for _, p := range pres {
			for _, cl := range cells {
				switch {
				case cl.v < p:
					num += float64(cl.w)
				case cl.v == p:
					num += float64(cl.w) / 2
				}
				den += float64(cl.w)
			}
		}
		if want := num / den; math.Abs(got-want) > 1e-12 {
			t.Errorf("case %d: AUCAgainst %v, brute force %v", c, got, want)
		}
	}

	// Perfect separation with areas whose float conversions round: exactly 1.
	pres := []float64{3, 3, 3}
	lay, err := NewLayout(pres, 0, 5, 16)
	if err != nil {
		t.Fatal(err)
	}
	acc := lay.NewAccumulator()
	for _, w := range []int64{1<<53 + 1, 3, 1<<52 + 7} {
		acc.Add(1, w)
	}
	if got, ok := acc.AUCAgainst(pres); !ok || got != 1 {
		t.Errorf("perfect separation: %v %v, want exactly 1", got, ok)
	}
	if _, ok := acc.AUCAgainst([]float64{2.5}); ok {
		t.Error("a value that is not a layout value must not be ok")
	}
	if _, ok := lay.NewAccumulator().AUCAgainst(pres); ok {
		t.Error("an empty background must not be ok")
	}
}
