package report

import "areasweep/metrics"

// olsFit is an ordinary least-squares line y = a + b x.
type olsFit struct {
	n         int
	a, b      float64
	r2        float64
	r2Defined bool
}

// ols fits y = a + b x by ordinary least squares (e.g. Draper & Smith 1998,
// Applied Regression Analysis, ch. 1), as a description:
//
//	b = Sxy / Sxx,  a = mean(y) - b mean(x)
//	r^2 = 1 - SSE / Syy,  SSE = sum (y - a - b x)^2
//
// It returns false when n < 2 or all x are equal. r^2 is defined only from
// n = 3 on and when the y are not all equal: through two points the line
// passes exactly, so r^2 = 1 whatever they are, which describes nothing.
func ols(x, y []float64) (olsFit, bool) {
	n := len(x)
	f := olsFit{n: n}
	if n < 2 || len(y) != n {
		return f, false
	}
	mx, my := metrics.Mean(x), metrics.Mean(y)
	var sxx, sxy, syy float64
	for i := range x {
		dx, dy := x[i]-mx, y[i]-my
		sxx += dx * dx
		sxy += dx * dy
		syy += dy * dy
	}
	if sxx <= 0 {
		return f, false
	}
	f.b = sxy / sxx
	f.a = my - f.b*mx
	var sse float64
	for i := range x {
		e := y[i] - f.a - f.b*x[i]
		sse += e * e
	}
	if syy > 0 && n >= 3 {
		f.r2 = 1 - sse/syy
		f.r2Defined = true
	}
	return f, true
}

// ranksBestFirst ranks xs so that rank 1 goes to the best value (largest
// when higherBetter, else smallest); tied values share the mean of the
// ranks they span (the "average" or mid-rank method). It also returns the
// tie term sum over tie groups of (t^3 - t) used by Kendall's W. See
// metrics.Ranks.
func ranksBestFirst(xs []float64, higherBetter bool) ([]float64, float64) {
	ranks, ties := metrics.Ranks(xs)
	if higherBetter {
		n := float64(len(ranks))
		for i, r := range ranks {
			ranks[i] = n + 1 - r
		}
	}
	return ranks, ties
}

// kendallW is Kendall's coefficient of concordance W with the correction
// for ties (Kendall & Babington Smith 1939, Ann. Math. Stat. 10:275;
// Legendre 2005, J. Agric. Biol. Environ. Stat. 10:226, eq. 2):
//
//	R_i = sum_j r_ij   (sum of the ranks of object i over the m judges)
//	S   = sum_i (R_i - mean R)^2
//	W   = 12 S / ( m^2 (n^3 - n) - m sum_j T_j ),  T_j = sum (t^3 - t) over tie groups of judge j
//
// as a description of agreement only: its chi-square test assumes
// independent judges, which nested extents sharing test points are not.
// ranks[j][i] is the rank given by judge j to object i; ties[j] is T_j. It
// returns false when W is undefined (m < 2, n < 2, or every judge ties
// every object).
func kendallW(ranks [][]float64, ties []float64) (w float64, ok bool) {
	m := len(ranks)
	if m < 2 {
		return 0, false
	}
	n := len(ranks[0])
	if n < 2 {
		return 0, false
	}
	R := make([]float64, n)
	for _, row := range ranks {
		for i, r := range row {
			R[i] += r
		}
	}
	mr := metrics.Mean(R)
	var s float64
	for _, v := range R {
		s += (v - mr) * (v - mr)
	}
	var tsum float64
	for _, t := range ties {
		tsum += t
	}
	fm, fn := float64(m), float64(n)
	den := fm*fm*(fn*fn*fn-fn) - fm*tsum
	if den <= 0 {
		return 0, false
	}
	return 12 * s / den, true
}
