package metrics

import (
	"math"
	"math/rand/v2"
	"testing"
)

// boyceWindowsReference is boyceWindows as it was written before the
// terms of bins a window holds whole were computed once per bin: every
// bin's term computed again for each window.
func boyceWindowsReference(a *Accumulator, width float64, steps int) []boyceWindow {
	mn, mx := a.min, a.max
	span := mx - mn
	if math.IsInf(span, 0) || math.IsNaN(span) {
		return nil
	}
	w := width * span
	i0, i1 := a.occupied()
	nb := i1 - i0 + 1
	e0 := make([]float64, nb)
	e1 := make([]float64, nb)
	for k := range nb {
		lo, hi := a.histEdges(i0 + k)
		lo, hi = math.Max(lo, mn), math.Min(hi, mx)
		if hi < lo {
			hi = lo
		}
		e0[k], e1[k] = lo, hi
	}
	total := float64(a.area)
	areaIn := func(lo, hi float64) float64 {
		var s float64
		k0 := max(0, int(gridBin(lo, a.he)-a.hbase)-i0-1)
		k1 := min(nb-1, int(gridBin(hi, a.he)-a.hbase)-i0+1)
		for k := k0; k <= k1; k++ {
			ar := a.hist[i0+k].area
			if ar == 0 {
				continue
			}
			if e1[k] > e0[k] {
				ov := math.Min(e1[k], hi) - math.Max(e0[k], lo)
				if ov > 0 {
					s += float64(ar) * ov / (e1[k] - e0[k])
				}
			} else if e0[k] >= lo && e0[k] <= hi {
				s += float64(ar)
			}
		}
		return s
	}
	var step float64
	if steps > 1 {
		step = (span - w) / float64(steps-1)
	}
	var out []boyceWindow
	for i := 0; i < steps; i++ {
		lo := mn + float64(i)*step
		hi := lo + w
		if i == steps-1 && steps > 1 {
			hi = mx
		}
		e := areaIn(lo, hi) / total
		if !(e > minBoyceShare) {
			continue
		}
		out = append(out, boyceWindow{lo: lo, hi: hi, mid: lo + w/2, share: e})
	}
	return out
}

// TestBoyceWindowsSameAsReference: the windows and their area shares are
// the same bits as the former computation's, on backgrounds with
// uneven areas, ties, negative values, few and many bins, and windows
// from one to many.
func TestBoyceWindowsSameAsReference(t *testing.T) {
	rng := rand.New(rand.NewPCG(3, 9))
	for c := 0; c < 300; c++ {
		pres := []float64{0.5}
		lay, err := NewLayout(pres, []int{16, 64, 1024}[c%3])
		if err != nil {
			t.Fatal(err)
		}
		acc := lay.NewAccumulator()
		scale := math.Ldexp(1, rng.IntN(40)-20)
		off := (rng.Float64() - 0.5) * 4 * scale
		cells := 1 + rng.IntN(3000)
		for k := 0; k < cells; k++ {
			v := off + scale*rng.NormFloat64()
			if rng.IntN(5) == 0 {
				v = off + scale*float64(rng.IntN(7))
			}
			acc.Add(v, 1+rng.Int64N(1<<uint(1+rng.IntN(50))))
		}
		width := []float64{0.1, 0.05, 0.3, 1}[rng.IntN(4)]
		steps := []int{1, 2, 10, 100, 333}[rng.IntN(5)]
		got, want := boyceWindows(acc, width, steps), boyceWindowsReference(acc, width, steps)
		if len(got) != len(want) {
			t.Fatalf("case %d: %d windows, reference %d", c, len(got), len(want))
		}
		for i := range got {
			if math.Float64bits(got[i].share) != math.Float64bits(want[i].share) || got[i] != want[i] {
				t.Fatalf("case %d window %d: %+v, reference %+v", c, i, got[i], want[i])
			}
		}
	}
}
