package metrics

import (
	"slices"

	"gonum.org/v1/gonum/mathext"
)

// ThresholdRule names how a threshold is chosen. Its values are the names
// written to results.json, scores.csv and the omission layers; every
// package uses these constants rather than the strings.
type ThresholdRule string

// The threshold rules.
const (
	ThresholdMTP   ThresholdRule = "minimum_training_presence"
	ThresholdP10   ThresholdRule = "p10_training_presence"
	ThresholdFixed ThresholdRule = "fixed"
)

// Threshold is a threshold-based omission test after Anderson, Lew &
// Peterson (2003). For a threshold t and n test presences:
//
//	Omission     = #{test values < t} / n
//	AreaFraction = W(>= t) / W_total          (exact: t is a layout value)
//	Successes    = #{test values >= t}
//	PBinomial    = P(X >= Successes),  X ~ Binomial(n, AreaFraction)
//	             = I_p(Successes, n - Successes + 1)   for Successes >= 1
//
// with I the regularized incomplete beta function (gonum mathext), which
// keeps small tail probabilities accurate where summing terms would not.
// PBinomial is 1 when Successes == 0.
//
// Thresholds: the minimum training presence value (MTP); the
// 10th-percentile training presence value (P10): sort the n training values
// ascending and take v_(floor(n/10)+1) (1-based), so at most 10% of training
// presences fall strictly below it (for n < 10 it equals MTP); and the fixed
// user thresholds.
//
// Anderson, R.P., Lew, D. & Peterson, A.T. (2003) Evaluating predictive
// models of species' distributions: criteria for selecting optimal models.
// Ecological Modelling 162:211-232.
type Threshold struct {
	Name         ThresholdRule
	Value        float64
	Omission     float64
	AreaFraction float64
	Successes    int
	N            int
	PBinomial    float64
}

// BinomialTail returns P(X >= k) for X ~ Binomial(n, p), computed through
// the regularized incomplete beta function:
//
//	P(X >= k) = I_p(k, n-k+1)   (1 <= k <= n)
//
// It returns 1 for k <= 0 and 0 for k > n; p is clamped to [0,1].
func BinomialTail(n, k int, p float64) float64 {
	switch {
	case k <= 0:
		return 1
	case k > n:
		return 0
	case !(p > 0):
		return 0
	case p >= 1:
		return 1
	}
	return mathext.RegIncBeta(float64(k), float64(n-k+1), p)
}

// P10Index returns the 0-based index, in ascending order, of the
// 10th-percentile training presence among n values: floor(n/10).
func P10Index(n int) int { return n / 10 }

func thresholds(c *cumulative, tp *presences, train []float64, trainIdx []int, fixed []float64, fixedIdx []int) []Threshold {
	var out []Threshold
	add := func(name ThresholdRule, v float64, j int) {
		succ := 0
		for g, jj := range tp.j {
			if jj >= j {
				succ += tp.count[g]
			}
		}
		af := float64(c.geArea(j)) / c.totalAreaF
		out = append(out, Threshold{
			Name:         name,
			Value:        v,
			Omission:     float64(tp.n-succ) / float64(tp.n),
			AreaFraction: af,
			Successes:    succ,
			N:            tp.n,
			PBinomial:    BinomialTail(tp.n, succ, af),
		})
	}
	if len(train) > 0 {
		order := make([]int, len(train))
		for i := range order {
			order[i] = i
		}
		slices.SortStableFunc(order, func(a, b int) int { return trainIdx[a] - trainIdx[b] })
		lo := order[0]
		add(ThresholdMTP, c.values[trainIdx[lo]], trainIdx[lo])
		p := order[P10Index(len(train))]
		add(ThresholdP10, c.values[trainIdx[p]], trainIdx[p])
	}
	for i, v := range fixed {
		add(ThresholdFixed, v, fixedIdx[i])
	}
	return out
}
