package metrics

import (
	"math"
	"slices"
)

// Spearman returns the Spearman rank correlation of x and y: the Pearson
// correlation of their ranks, tied values receiving the average of the ranks
// they span. ok is false when the lengths differ, fewer than 2 pairs are
// given, or either variable has no variation.
//
// Spearman, C. (1904) The proof and measurement of association between two
// things. American Journal of Psychology 15:72-101.
func Spearman(x, y []float64) (rho float64, ok bool) {
	if len(x) != len(y) || len(x) < 2 {
		return 0, false
	}
	rx, ry := averageRanks(x), averageRanks(y)
	mx, my := mean(rx), mean(ry)
	var sxy, sxx, syy float64
	for i := range rx {
		dx, dy := rx[i]-mx, ry[i]-my
		sxy += dx * dy
		sxx += dx * dx
		syy += dy * dy
	}
	if !(sxx > 0) || !(syy > 0) {
		return 0, false
	}
	rho = sxy / math.Sqrt(sxx*syy)
	return math.Max(-1, math.Min(1, rho)), true
}

// averageRanks returns 1-based ranks with ties given their average rank.
func averageRanks(v []float64) []float64 {
	order := make([]int, len(v))
	for i := range order {
		order[i] = i
	}
	slices.SortStableFunc(order, func(a, b int) int {
		switch {
		case v[a] < v[b]:
			return -1
		case v[a] > v[b]:
			return 1
		}
		return 0
	})
	r := make([]float64, len(v))
	for i := 0; i < len(order); {
		j := i
		for j+1 < len(order) && v[order[j+1]] == v[order[i]] {
			j++
		}
		avg := float64(i+j)/2 + 1
		for k := i; k <= j; k++ {
			r[order[k]] = avg
		}
		i = j + 1
	}
	return r
}

func mean(v []float64) float64 {
	var s float64
	for _, x := range v {
		s += x
	}
	return s / float64(len(v))
}

// meanSD returns the mean and the sample standard deviation (denominator
// len-1; 0 for fewer than 2 values) of v, which must not be empty.
func meanSD(v []float64) (m, sd float64) {
	m = mean(v)
	if len(v) < 2 {
		return m, 0
	}
	var ss float64
	for _, x := range v {
		ss += (x - m) * (x - m)
	}
	return m, math.Sqrt(ss / float64(len(v)-1))
}

// Quantile returns the p-quantile (0 <= p <= 1) of v by linear interpolation
// between order statistics: with v sorted ascending as v_0..v_{k-1} and
// h = (k-1)p, it is v_floor(h) + (h - floor(h)) (v_floor(h)+1 - v_floor(h)).
// This is type 7 of Hyndman & Fan (1996, The American Statistician
// 50:361-365). It returns 0 for an empty v.
func Quantile(v []float64, p float64) float64 {
	if len(v) == 0 {
		return 0
	}
	s := slices.Clone(v)
	slices.Sort(s)
	return quantileSorted(s, p)
}

func quantileSorted(s []float64, p float64) float64 {
	h := float64(len(s)-1) * p
	lo := int(math.Floor(h))
	if lo >= len(s)-1 {
		return s[len(s)-1]
	}
	if lo < 0 {
		return s[0]
	}
	return s[lo] + (h-float64(lo))*(s[lo+1]-s[lo])
}
