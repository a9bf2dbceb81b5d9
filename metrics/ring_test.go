package metrics

import (
	"math"
	"math/rand/v2"
	"testing"
)

// TestDecomposeRing builds nested random extents A inside B from cells
// written here and checks the decomposition against a brute-force pairwise
// count of each AUC (Hanley & McNeil 1982, ties half), the areas, and the
// identity AUC_B = (W_A AUC_A' + W_R AUC_R) / (W_A + W_R) stated on Ring.
func TestDecomposeRing(t *testing.T) {
	rng := rand.New(rand.NewPCG(3, 5))
	type cell struct {
		v     float64
		w     int64
		inner bool
	}
	brute := func(test []float64, cells []cell, keep func(cell) bool) float64 {
		num, den := 0.0, 0.0
		for _, p := range test {
			for _, c := range cells {
				if !keep(c) {
					continue
				}
				switch {
				case c.v < p:
					num += float64(c.w)
				case c.v == p:
					num += float64(c.w) / 2
				}
				den += float64(c.w)
			}
		}
		return num / den
	}
	for k := 0; k < 30; k++ {
		test := make([]float64, 1+rng.IntN(15))
		for i := range test {
			test[i] = float64(rng.IntN(12)) / 4
		}
		lay, err := NewLayout(test, 32)
		if err != nil {
			t.Fatal(err)
		}
		in, out := lay.NewAccumulator(), lay.NewAccumulator()
		var cells []cell
		var wIn, wRing int64
		for j := 0; j < 150; j++ {
			c := cell{float64(rng.IntN(13)) / 4, 1 + rng.Int64N(1<<30), rng.IntN(3) == 0}
			cells = append(cells, c)
			out.Add(c.v, c.w)
			if c.inner {
				in.Add(c.v, c.w)
				wIn += c.w
			} else {
				wRing += c.w
			}
		}
		r, err := DecomposeRing(in, out, test)
		if err != nil || !r.Defined {
			t.Fatalf("case %d: %v %+v", k, err, r)
		}
		wantIn := brute(test, cells, func(c cell) bool { return c.inner })
		wantRing := brute(test, cells, func(c cell) bool { return !c.inner })
		wantOut := brute(test, cells, func(cell) bool { return true })
		for _, c := range []struct {
			name      string
			got, want float64
		}{{"inner", r.AUCInner, wantIn}, {"ring", r.AUCRing, wantRing}, {"outer", r.AUCOuter, wantOut}} {
			if math.Abs(c.got-c.want) > 1e-12 {
				t.Errorf("case %d %s AUC: %v, brute force %v", k, c.name, c.got, c.want)
			}
		}
		if r.InnerArea != wIn || r.RingArea != wRing {
			t.Errorf("case %d: areas %d %d, want %d %d", k, r.InnerArea, r.RingArea, wIn, wRing)
		}
		mix := (float64(wIn)*r.AUCInner + float64(wRing)*r.AUCRing) / float64(wIn+wRing)
		if math.Abs(mix-r.AUCOuter) > 1e-12 {
			t.Errorf("case %d: mix %v, outer %v", k, mix, r.AUCOuter)
		}
	}
	lay, err := NewLayout([]float64{1}, 32)
	if err != nil {
		t.Fatal(err)
	}
	if r, err := DecomposeRing(lay.NewAccumulator(), lay.NewAccumulator(), []float64{1}); err != nil || r.Defined {
		t.Errorf("empty extents: %+v %v, want undefined", r, err)
	}
}

// TestThresholdRulesMatchScore: ThresholdRules gives the rules and values
// Score tests, in its order, whatever the extent (random training values
// with ties, fixed thresholds), and Omitted lists exactly the test values
// below each (the count Score's Omission uses).
func TestThresholdRulesMatchScore(t *testing.T) {
	rng := rand.New(rand.NewPCG(9, 1))
	for k := 0; k < 20; k++ {
		train := make([]float64, rng.IntN(25))
		test := make([]float64, 1+rng.IntN(20))
		for i := range train {
			train[i] = float64(rng.IntN(10)) / 8
		}
		for i := range test {
			test[i] = float64(rng.IntN(10)) / 8
		}
		fixed := []float64{0.3, 0.7}
		lay, err := NewLayout(append(append(append([]float64{}, train...), test...), fixed...), 32)
		if err != nil {
			t.Fatal(err)
		}
		acc := lay.NewAccumulator()
		for j := 0; j < 50; j++ {
			acc.Add(float64(rng.IntN(17))/8, 1+rng.Int64N(100))
		}
		sc, err := Score(acc, train, test, Settings{E: []float64{0.05}, Iterations: 10, Fraction: 0.5, FixedThresholds: fixed, ThresholdTrain: train, Seed: 1})
		if err != nil {
			t.Fatal(err)
		}
		rules := ThresholdRules(train, fixed)
		if len(rules) != len(sc.Thresholds) {
			t.Fatalf("case %d: %d rules, Score tested %d", k, len(rules), len(sc.Thresholds))
		}
		for i, r := range rules {
			s := sc.Thresholds[i]
			if r.Name != s.Name || r.Value != s.Value {
				t.Errorf("case %d rule %d: %s %v, Score %s %v", k, i, r.Name, r.Value, s.Name, s.Value)
			}
			om := Omitted(r.Value, test)
			if want := float64(len(om)) / float64(len(test)); want != s.Omission {
				t.Errorf("case %d rule %s: %d omitted of %d, Score's omission %v", k, r.Name, len(om), len(test), s.Omission)
			}
			for _, i := range om {
				if !(test[i] < r.Value) {
					t.Errorf("case %d: test value %v listed below %v", k, test[i], r.Value)
				}
			}
		}
	}
}
