package metrics

import (
	"math"
	"math/rand/v2"
	"testing"
)

// TestLayoutCell: Cell(v) holds v, is {v} exactly when v is a layout value,
// and every value strictly inside an open cell (and nothing just outside
// it) shares v's bin, by Locate.
func TestLayoutCell(t *testing.T) {
	r := rand.New(rand.NewPCG(3, 4))
	vals := make([]float64, 200)
	for i := range vals {
		vals[i] = math.Round(r.Float64()*1000) / 10
	}
	l, err := NewLayout(vals, 64)
	if err != nil {
		t.Fatal(err)
	}
	for k := 0; k < 20000; k++ {
		v := r.Float64()*120 - 10
		if k%4 == 0 {
			v = vals[r.IntN(len(vals))]
		}
		lo, hi, closed := l.Cell(v)
		bin := l.Locate(v)
		if closed != (bin%2 == 1) || !(lo <= v && v <= hi) || closed && (lo != v || hi != v) {
			t.Fatalf("Cell(%v) = %v, %v, %v; Locate %d", v, lo, hi, closed, bin)
		}
		if closed {
			continue
		}
		for _, w := range []float64{math.Nextafter(lo, hi), math.Nextafter(hi, lo)} {
			if !math.IsInf(w, 0) && l.Locate(w) != bin {
				t.Fatalf("Cell(%v) = (%v, %v) but %v is in bin %d, not %d", v, lo, hi, w, l.Locate(w), bin)
			}
		}
		for _, w := range []float64{lo, hi} {
			if !math.IsInf(w, 0) && l.Locate(w) == bin {
				t.Fatalf("Cell(%v) = (%v, %v) but its end %v is in the same bin", v, lo, hi, w)
			}
		}
	}
}
