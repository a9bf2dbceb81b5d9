package metrics

import (
	"math"
	"slices"
)

// These are the package's small descriptive statistics, shared with
// report. gonum's stat package is not used for them because it does not
// give the same numbers bit for bit, and every number here reaches
// results.json: stat.Mean sums with floats.Sum (unrolled, SIMD on amd64),
// so its last bit differs from a left-to-right sum on most inputs (1467
// of 2000 random slices of 2 to 301 values in our check); stat.StdDev
// adds a compensation term (524 of 2000 differ); stat.Quantile offers
// Hyndman & Fan types 1 and 4 (Empirical, LinInterp), not type 7. gonum
// has no average-rank function.

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
	rx, _ := Ranks(x)
	ry, _ := Ranks(y)
	mx, my := Mean(rx), Mean(ry)
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

// Ranks returns the 1-based ranks of v in ascending order, tied values
// receiving the average of the ranks they span (mid-ranks), and the tie
// term
//
//	T = sum over groups of t tied values of (t^3 - t)
//
// (0 without ties) used by tie corrections such as Kendall's W. Ranks in
// descending order are len(v)+1 minus these, exactly (the ranks are
// multiples of 1/2).
func Ranks(v []float64) (ranks []float64, ties float64) {
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
	ranks = make([]float64, len(v))
	for i := 0; i < len(order); {
		j := i
		for j+1 < len(order) && v[order[j+1]] == v[order[i]] {
			j++
		}
		avg := float64(i+j)/2 + 1
		for k := i; k <= j; k++ {
			ranks[order[k]] = avg
		}
		t := float64(j - i + 1)
		ties += t*t*t - t
		i = j + 1
	}
	return ranks, ties
}

// Mean returns the arithmetic mean of v, summed left to right, or 0 for an
// empty v.
func Mean(v []float64) float64 {
	if len(v) == 0 {
		return 0
	}
	var s float64
	for _, x := range v {
		s += x
	}
	return s / float64(len(v))
}

// MeanSD returns the mean of v and its sample standard deviation
//
//	sd = sqrt( sum_i (v_i - mean)^2 / (n - 1) )
//
// with sd 0 for fewer than 2 values (and both 0 for an empty v).
func MeanSD(v []float64) (m, sd float64) {
	m = Mean(v)
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
// 50:361-365), the default of R and numpy. It returns 0 for an empty v;
// v is not modified.
func Quantile(v []float64, p float64) float64 {
	if len(v) == 0 {
		return 0
	}
	s := slices.Clone(v)
	slices.Sort(s)
	return QuantileSorted(s, p)
}

// quantileSelect returns QuantileSorted of v sorted ascending (v not
// empty), finding the two order statistics it reads by selection
// (selectKth) rather than sorting v: O(len(v)) expected instead of
// O(len(v) log len(v)). It reorders v. The order statistics are values, the
// same whatever the algorithm that finds them, so the result is the same
// bits; -0 and +0 compare equal, and the interpolation gives the same
// result for either (a - b is exact when either is zero, and x + 0 is x
// for x != 0, +0 for x = ±0 unless both terms are -0, which would need a
// negative difference of zeros). With a NaN in v it sorts v instead (NaNs
// go first, as slices.Sort puts them).
func quantileSelect(v []float64, p float64) float64 {
	for _, x := range v {
		if x != x {
			slices.Sort(v)
			return QuantileSorted(v, p)
		}
	}
	h := float64(len(v)-1) * p
	lo := int(math.Floor(h))
	if lo >= len(v)-1 {
		selectKth(v, len(v)-1)
		return v[len(v)-1]
	}
	if lo < 0 {
		selectKth(v, 0)
		return v[0]
	}
	selectKth(v, lo)
	next := slices.Min(v[lo+1:]) // v[lo+1:] holds the values >= v[lo]
	return v[lo] + (h-float64(lo))*(next-v[lo])
}

// selectKth reorders v (no NaN) so that v[k] is the k-th smallest value
// (0-based), no value before it is larger and none after it smaller
// (quickselect with a median-of-three pivot and a three-way partition,
// Hoare 1961, Communications of the ACM 4:321-322; after 64 rounds the
// rest is sorted, so the worst case is O(n log n)).
func selectKth(v []float64, k int) {
	lo, hi := 0, len(v) // the k-th smallest lies in v[lo:hi]
	for round := 0; hi-lo > 16; round++ {
		if round == 64 {
			slices.Sort(v[lo:hi])
			return
		}
		a, b, c := v[lo], v[lo+(hi-lo)/2], v[hi-1]
		pivot := max(min(a, b), min(max(a, b), c))
		// v[lo:lt] < pivot, v[lt:i] == pivot, v[gt:hi] > pivot.
		lt, i, gt := lo, lo, hi
		for i < gt {
			switch x := v[i]; {
			case x < pivot:
				v[lt], v[i] = x, v[lt]
				lt++
				i++
			case x > pivot:
				gt--
				v[gt], v[i] = x, v[gt]
			default:
				i++
			}
		}
		switch {
		case k < lt:
			hi = lt
		case k >= gt:
			lo = gt
		default:
			return
		}
	}
	slices.Sort(v[lo:hi])
}

// QuantileSorted is Quantile for s already sorted ascending and not empty.
func QuantileSorted(s []float64, p float64) float64 {
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
