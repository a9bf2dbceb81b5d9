package metrics

import (
	"math/rand/v2"
	"testing"
)

// TestCompareThresholds pairs the omission rates of two evaluators with
// different threshold lists: each pair must give exactly what Compare
// gives for that threshold when both evaluators have the same list, the
// other scores must not change, and a pair outside either list is an
// error. Compare itself refuses lists of different lengths.
func TestCompareThresholds(t *testing.T) {
	r := rand.New(rand.NewPCG(31, 32))
	c := randomCase(r, 300, 50, 20, 1000)
	ids := make([]int, len(c.test))
	for i := range ids {
		ids[i] = i
	}
	s := Settings{E: []float64{0.05}, BoyceSteps: 30}
	_, acc := build(t, c, nil, 256)
	ths := []float64{c.test[0], c.test[1], c.test[2]}
	full, err := NewEvaluator(acc, c.test, ids, ths, s)
	if err != nil {
		t.Fatal(err)
	}
	// Fewer test points on the other side, so the comparison resamples
	// the common ones (not only the evaluators' own memos).
	half, err := NewEvaluator(acc, c.test[:30], ids[:30], ths, s)
	if err != nil {
		t.Fatal(err)
	}
	only2, err := NewEvaluator(acc, c.test[:30], ids[:30], ths[2:], s)
	if err != nil {
		t.Fatal(err)
	}
	d := Draws{N: len(ids), B: 40, Seed: 9}
	want, err := Compare(full, half, d)
	if err != nil {
		t.Fatal(err)
	}
	got, err := CompareThresholds(full, only2, d, [][2]int{{2, 0}})
	if err != nil {
		t.Fatal(err)
	}
	if len(got.Omission) != 1 || got.Omission[0] != want.Omission[2] {
		t.Errorf("omission at the paired threshold %+v, with equal lists %+v", got.Omission, want.Omission[2])
	}
	if got.AUC != want.AUC || got.Boyce != want.Boyce || got.PartialROC[0] != want.PartialROC[0] {
		t.Error("pairing the thresholds changed another score")
	}
	if _, err := Compare(full, only2, d); err == nil {
		t.Error("Compare accepted threshold lists of different lengths")
	}
	if _, err := CompareThresholds(full, only2, d, [][2]int{{0, 1}}); err == nil {
		t.Error("CompareThresholds accepted a threshold the second evaluator lacks")
	}
}
