package metrics

import (
	"math/rand/v2"
	"reflect"
	"testing"
)

// TestCompareBoyceUnresampled: with CompareOptions.BoyceUnresampled and
// PartialROCUnresampled the Boyce index's and the partial ROC ratios'
// differences are the two scores on the common presences and their
// difference, with no SD, interval or resamples, and every other score of
// the comparison (the omission rates) is bit for bit what
// CompareThresholds gives; an evaluator whose memo was made without the
// index recomputes it when a later comparison asks for the index, and
// gives what a fresh evaluator gives. Both a side scored from its memo
// (all its presences common) and a side scored on the common presences'
// counts are exercised.
func TestCompareBoyceUnresampled(t *testing.T) {
	r := rand.New(rand.NewPCG(41, 42))
	c := randomCase(r, 600, 80, 30, 500)
	s := Settings{E: []float64{0.2, 0.4}, BoyceSteps: 30}
	_, a := build(t, c, nil, 256)
	// The inner extent's background: the cells of value 100 or more.
	ci := testCase{test: c.test, train: c.train}
	for i, v := range c.bgV {
		if v >= 100 {
			ci.bgV, ci.bgW = append(ci.bgV, v), append(ci.bgW, c.bgW[i])
		}
	}
	_, ai := build(t, ci, nil, 256)
	ths := []float64{c.test[0], c.test[1]}
	all := make([]int, len(c.test))
	for i := range all {
		all[i] = i
	}
	// The inner extent holds every other presence but the first ten.
	var inner []int
	var innerTest []float64
	for i := 10; i < len(c.test); i++ {
		if i%3 != 0 {
			inner, innerTest = append(inner, i), append(innerTest, c.test[i])
		}
	}
	evals := func() (*Evaluator, *Evaluator) {
		outer, err := NewEvaluator(a, c.test, all, ths, s)
		if err != nil {
			t.Fatal(err)
		}
		in, err := NewEvaluator(ai, innerTest, inner, ths, s)
		if err != nil {
			t.Fatal(err)
		}
		return outer, in
	}
	d := Draws{N: len(all), B: 200, Seed: 9}
	om := [][2]int{{0, 0}, {1, 1}}

	outer, in := evals()
	point, err := CompareWith(outer, in, d, om, CompareOptions{BoyceUnresampled: true, PartialROCUnresampled: true})
	if err != nil {
		t.Fatal(err)
	}
	// The same evaluators, asked for the index now: their memos lack it.
	full, err := CompareThresholds(outer, in, d, om)
	if err != nil {
		t.Fatal(err)
	}
	fo, fi := evals()
	fresh, err := CompareThresholds(fo, fi, d, om)
	if err != nil {
		t.Fatal(err)
	}
	if !reflect.DeepEqual(full, fresh) {
		t.Errorf("a memo made without the Boyce index gave another comparison once the index was asked for:\n%+v\nfresh evaluators:\n%+v", full, fresh)
	}
	if !full.Boyce.Defined || full.Boyce.SD == 0 || full.Boyce.Resamples != d.B {
		t.Fatalf("the resampled Boyce difference should be defined with a spread on this case: %+v", full.Boyce)
	}
	want := Resampled{Defined: true, Scored: true, A: full.Boyce.A, B: full.Boyce.B, Diff: full.Boyce.A - full.Boyce.B}
	if point.Boyce != want {
		t.Errorf("unresampled Boyce difference %+v, want %+v (the resampled comparison's values, no spread)", point.Boyce, want)
	}
	for i, x := range full.PartialROC {
		if !x.Defined || x.SD == 0 {
			t.Fatalf("the resampled ratio difference at E = %v should be defined with a spread on this case: %+v", s.E[i], x)
		}
		want := Resampled{Defined: true, Scored: true, A: x.A, B: x.B, Diff: x.A - x.B}
		if point.PartialROC[i] != want {
			t.Errorf("unresampled ratio difference at E = %v: %+v, want %+v", s.E[i], point.PartialROC[i], want)
		}
	}
	point.Boyce, full.Boyce = Resampled{}, Resampled{}
	point.PartialROC, full.PartialROC = nil, nil
	if !reflect.DeepEqual(point, full) {
		t.Errorf("leaving the Boyce index and the ratios out of the resamples changed another score:\n%+v\nwith them:\n%+v", point, full)
	}
}
