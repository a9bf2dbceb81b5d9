package metrics

import (
	"math"
	"math/bits"
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
		lay, err := NewLayout(pres, 64)
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
		if want := aucAgainstByAreaAt(acc, pres); got != want {
			t.Errorf("case %d: AUCAgainst %v, from AreaAt per value %v: not the same bits", c, got, want)
		}
	}

	// Perfect separation with areas whose float conversions round: exactly 1.
	pres := []float64{3, 3, 3}
	lay, err := NewLayout(pres, 16)
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

// aucAgainstByAreaAt is AUCAgainst as it was written before the areas
// below each bin were summed once: AreaAt per value.
func aucAgainstByAreaAt(a *Accumulator, vals []float64) float64 {
	var hi, lo uint64
	for _, v := range vals {
		below, equal, _, _ := a.AreaAt(v)
		var carry uint64
		lo, carry = bits.Add64(lo, 2*uint64(below)+uint64(equal), 0)
		hi += carry
	}
	num := float64(hi)*0x1p64 + float64(lo)
	return math.Min(1, math.Max(0, num/(2*float64(len(vals))*float64(a.Area()))))
}

// TestSignedZeroOrder checks that -0 and +0 added in either order, or
// merged from two accumulators in either order, give the same Min and Max
// bits (IEEE 754: -0 == +0, so a comparison alone keeps whichever came
// first; the accumulator stores +0).
func TestSignedZeroOrder(t *testing.T) {
	negZero := math.Copysign(0, -1)
	lay, err := NewLayout([]float64{0}, 16)
	if err != nil {
		t.Fatal(err)
	}
	one := func(vals ...float64) *Accumulator {
		a := lay.NewAccumulator()
		for _, v := range vals {
			a.Add(v, 1)
		}
		return a
	}
	for _, a := range []*Accumulator{one(negZero, 0), one(0, negZero), one(negZero)} {
		if math.Signbit(a.Min()) || math.Signbit(a.Max()) {
			t.Errorf("Min %v Max %v: want +0", a.Min(), a.Max())
		}
	}
	x, y := one(negZero), one(0)
	if err := x.Merge(y); err != nil {
		t.Fatal(err)
	}
	y2, x2 := one(0), one(negZero)
	if err := y2.Merge(x2); err != nil {
		t.Fatal(err)
	}
	if math.Signbit(x.Min()) != math.Signbit(y2.Min()) || math.Signbit(x.Max()) != math.Signbit(y2.Max()) {
		t.Errorf("merge order changed the sign of a zero extreme: %v/%v vs %v/%v", x.Min(), x.Max(), y2.Min(), y2.Max())
	}
}
