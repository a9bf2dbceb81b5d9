package metrics_test

import (
	"math"
	"testing"

	"areasweep/metrics"
)

// TestBoyceScaleInvariant: a positive scale changes no rank and no window
// of the Boyce index (windows are fractions of the value range), so a model
// scaled by 1e300 gets the index the model gets unscaled, within the
// histogram's interpolation (0.01, our tolerance). With 1e11 area units a
// cell, the area times a bin's width overflowed float64 at that scale: a
// window's share became +Inf and the index 0.026 (found by helper hD's
// hunt; a 40 x 40 Gaussian model gave 0.718 against 0.903 from numpy).
func TestBoyceScaleInvariant(t *testing.T) {
	boyce := func(scale float64) float64 {
		var grid, train, test []float64
		for r := range 40 {
			for c := range 40 {
				v := math.Exp(-float64((r-20)*(r-20)+(c-20)*(c-20))/200) * scale
				grid = append(grid, v)
				if (r*7+c*3)%53 == 0 && len(train) < 30 {
					train = append(train, v)
				} else if (r*5+c*11)%41 == 0 && len(test) < 40 {
					test = append(test, v)
				}
			}
		}
		l, err := metrics.NewLayout(append(append([]float64{}, train...), test...), 4096)
		if err != nil {
			t.Fatal(err)
		}
		a := l.NewAccumulator()
		for _, v := range grid {
			a.AddLocated(l.Locate(v), v, 100000000000)
		}
		s, err := metrics.Score(a, train, test, metrics.Settings{E: []float64{0.05}, Iterations: 10, Seed: 1})
		if err != nil {
			t.Fatal(err)
		}
		return s.Boyce.Index
	}
	b1 := boyce(1)
	for _, scale := range []float64{1e-300, 1e280, 1e300, 1e307} {
		if b := boyce(scale); math.Abs(b-b1) > 0.01 {
			t.Errorf("Boyce index %v scaled by %g, %v unscaled", b, scale, b1)
		}
	}
}
