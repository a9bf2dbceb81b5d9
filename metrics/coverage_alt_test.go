package metrics

import (
	"fmt"
	"math"
	"math/rand/v2"
	"os"
	"slices"
	"strings"
	"testing"

	"gonum.org/v1/gonum/stat/distuv"
)

// An exploratory comparison of 95% interval methods for the partial ROC
// ratio's paired difference (E = 0.05), inside the coverage check's
// harness (runCoverageAlt, coverage_test.go): every method is computed on
// the same draws of test points and, but for m out of n, from the same B
// paired resamples as Compare's percentile interval, so one run compares
// them. It asserts only that its own percentile interval is Compare's
// (the tallies agree), and is skipped unless AREASWEEP_COVERAGE_ALT=1:
//
//	AREASWEEP_COVERAGE_ALT=1 go test -count=1 -run TestCoverageAlt -v -timeout 60m ./metrics/
//
// AREASWEEP_COVERAGE_ALT_R sets the repetitions per n (default 1000),
// AREASWEEP_COVERAGE_ALT_N the n (comma-separated; default 10,30,100,500)
// and AREASWEEP_COVERAGE_SWEEP_ONLY the landscapes of covVariants
// (default base). Measured (README, "How often the 95% intervals cover"):
// between nested extents no method reaches 93% (our band) at 30 points
// or more on every landscape, so areasweep describes the ratio's
// differences between extents instead of judging them (report's
// PartialROCCoverageClause).
//
// With d the full-sample difference, d*_b the B resampled differences,
// q(p) their p-quantile (Quantile, type 7), Phi the standard normal CDF
// and z_p = Phi^-1(p):
//
//   - percentile: q(0.025) .. q(0.975) (Efron & Tibshirani 1993, An
//     Introduction to the Bootstrap, ch. 13), Compare's.
//   - basic: 2d - q(0.975) .. 2d - q(0.025) (Davison & Hinkley 1997,
//     Bootstrap Methods and their Application, eq. 5.6).
//   - normal: d -+ 1.96 SD(d*) (Efron & Tibshirani 1993, ch. 13).
//   - BC: q(Phi(2 z0 + z_0.025)) .. q(Phi(2 z0 + z_0.975)), z0 =
//     Phi^-1(share of d* below d, ties half, kept within 0.5/B of 0 and
//     1) (Efron 1987, JASA 82:171-185, with a = 0).
//   - BCa: q(Phi(z0 + w/(1 - a w))) with w = z0 + z_p, p = 0.025, 0.975,
//     and the acceleration a = sum (m - t_i)^3 / (6 (sum (m - t_i)^2)^1.5)
//     from the n leave-one-out differences t_i (those the tie rule
//     forms; m their mean) (Efron 1987). n more evaluations per side,
//     against B = 1000: at most half the cost again at n = 500.
//   - m out of n: B resamples of m = max(10, ceil(n^(2/3))) of the n
//     points (our choice; Bickel, Goetze & van Zwet 1997, Statistica
//     Sinica 7:1-31), their differences d*_m with quantiles q_m, read as
//     the distribution of sqrt(n)(d - truth) scaled from sqrt(m)(d*_m -
//     d): "m/n basic" d - f (q_m(0.975) - d) .. d - f (q_m(0.025) - d)
//     with f = sqrt(m/n); "m/n pct" d + f (q_m(0.025) - d) .. d + f
//     (q_m(0.975) - d); "m/n rate-n" the basic form with f = m/n (the
//     rate n of an extreme order statistic). At n = 10, m = n, and
//     they fall back on the basic and percentile intervals. These draw
//     B more resamples (not the run's Draws) and cost as much again.

// covAltMethods are the interval methods tallied for the partial ROC
// ratio's paired difference beside Compare's own (covAltIntervals).
var covAltMethods = []string{"percentile", "basic", "normal", "BC", "BCa", "m/n basic", "m/n pct", "m/n rate-n"}

// covDiag sums, per comparison kind and n, what the partial ROC ratio's
// resampled differences look like against the full-sample difference d
// and the truth: sums over the judged repetitions of d - truth, d and d^2
// (for the Monte Carlo SD of d), mean(d*) - d, median(d*) - d, SD(d*),
// z0 and the acceleration, and the leave-one-out differences the tie
// rule left undefined.
type covDiag struct {
	reps                             int
	dMinusTruth, bootMeanMinusD      float64
	bootMedMinusD, bootSD, dSq, dSum float64
	z0Sum, accSum                    float64
	jackUndef                        int
}

// covAltIntervals returns the 95% intervals of the partial ROC ratio's
// (E index 0) paired difference a - b by each of covAltMethods, from the
// same resamples of d Compare used (full is Compare's Resampled), or nil
// when the difference is not judged.
func covAltIntervals(a, b *Evaluator, d Draws, full Resampled, rng *rand.Rand, dg *covDiag) map[string][2]float64 {
	pa, pb := commonPresences(a, b)
	nE := len(a.es)
	diffs := make([][]float64, nE+2)
	resampleDiffs(a, b, d, [][2]int{{0, 0}}, pa, pb, diffs, CompareOptions{})
	ds := slices.Clone(diffs[0])
	slices.Sort(ds)
	d0 := full.Diff
	n := len(pa)
	out := map[string][2]float64{}
	lo, hi := QuantileSorted(ds, 0.025), QuantileSorted(ds, 0.975)
	out["percentile"] = [2]float64{lo, hi}
	out["basic"] = [2]float64{2*d0 - hi, 2*d0 - lo}
	m, sd := MeanSD(ds)
	out["normal"] = [2]float64{d0 - 1.959963984540054*sd, d0 + 1.959963984540054*sd}
	// Bias correction z0 = Phi^-1(share of resampled differences below d,
	// ties half).
	var below float64
	for _, x := range ds {
		switch {
		case x < d0:
			below++
		case x == d0:
			below += 0.5
		}
	}
	p0 := below / float64(len(ds))
	p0 = math.Min(math.Max(p0, 0.5/float64(len(ds))), 1-0.5/float64(len(ds)))
	N := distuv.UnitNormal
	z0 := N.Quantile(p0)
	zl, zh := N.Quantile(0.025), N.Quantile(0.975)
	out["BC"] = [2]float64{QuantileSorted(ds, N.CDF(2*z0+zl)), QuantileSorted(ds, N.CDF(2*z0+zh))}
	// Acceleration from the jackknife of the difference.
	var th []float64
	ca, cb := a.ones(nil), b.ones(nil)
	for k := range pa {
		ca[pa[k]], cb[pb[k]] = 0, 0
		va, vb := a.eval(ca), b.eval(cb)
		ca[pa[k]], cb[pb[k]] = 1, 1
		if va.RatioOK[0] && vb.RatioOK[0] {
			th = append(th, va.Ratio[0]-vb.Ratio[0])
		} else {
			dg.jackUndef++
		}
	}
	acc := 0.0
	if len(th) > 2 {
		tm := Mean(th)
		var s2, s3 float64
		for _, x := range th {
			u := tm - x
			s2 += u * u
			s3 += u * u * u
		}
		if s2 > 0 {
			acc = s3 / (6 * math.Pow(s2, 1.5))
		}
	}
	bca := func(z float64) float64 {
		w := z0 + z
		return N.CDF(z0 + w/(1-acc*w))
	}
	out["BCa"] = [2]float64{QuantileSorted(ds, bca(zl)), QuantileSorted(ds, bca(zh))}
	// m out of n: resamples of m = ceil(n^(2/3)), at least 10 (our
	// choice), the sqrt(n) rate assumed.
	mm := max(10, int(math.Ceil(math.Pow(float64(n), 2.0/3))))
	if mm < n {
		var dm []float64
		cnt := make([]int32, n)
		for r := 0; r < d.B; r++ {
			clear(cnt)
			for range mm {
				cnt[rng.IntN(n)]++
			}
			ca2, cb2 := make([]int32, len(a.ids)), make([]int32, len(b.ids))
			for k := range pa {
				ca2[pa[k]], cb2[pb[k]] = cnt[k], cnt[k]
			}
			va, vb := a.eval(ca2), b.eval(cb2)
			if va.RatioOK[0] && vb.RatioOK[0] {
				dm = append(dm, va.Ratio[0]-vb.Ratio[0])
			}
		}
		if len(dm) >= 40 {
			slices.Sort(dm)
			f := math.Sqrt(float64(mm) / float64(n))
			ql, qh := QuantileSorted(dm, 0.025), QuantileSorted(dm, 0.975)
			out["m/n basic"] = [2]float64{d0 - f*(qh-d0), d0 - f*(ql-d0)}
			out["m/n pct"] = [2]float64{d0 + f*(ql-d0), d0 + f*(qh-d0)}
			g := float64(mm) / float64(n)
			out["m/n rate-n"] = [2]float64{d0 - g*(qh-d0), d0 - g*(ql-d0)}
		}
	}
	if _, ok := out["m/n basic"]; !ok {
		out["m/n basic"], out["m/n pct"], out["m/n rate-n"] = out["basic"], out["percentile"], out["basic"]
	}
	dg.reps++
	dg.dSum += d0
	dg.dSq += d0 * d0
	dg.bootMeanMinusD += m - d0
	dg.bootMedMinusD += QuantileSorted(ds, 0.5) - d0
	dg.bootSD += sd
	dg.z0Sum += z0
	dg.accSum += acc
	return out
}

// TestCoverageAlt measures the alternative intervals (see the top of this
// file) and prints, per kind and n, the tallies of each method and the
// diagnostics of covDiag: the full-sample difference against the truth,
// its Monte Carlo SD against the mean resampled SD, the resampled mean and
// median against d, and the mean z0 and acceleration.
func TestCoverageAlt(t *testing.T) {
	if os.Getenv("AREASWEEP_COVERAGE_ALT") != "1" {
		t.Skip("set AREASWEEP_COVERAGE_ALT=1")
	}
	R := 1000
	if s := os.Getenv("AREASWEEP_COVERAGE_ALT_R"); s != "" {
		fmt.Sscan(s, &R)
	}
	ns := []int{10, 30, 100, 500}
	if s := os.Getenv("AREASWEEP_COVERAGE_ALT_N"); s != "" {
		ns = nil
		for _, f := range strings.Split(s, ",") {
			var n int
			fmt.Sscan(f, &n)
			ns = append(ns, n)
		}
	}
	vs := covVariants()
	only := os.Getenv("AREASWEEP_COVERAGE_SWEEP_ONLY")
	for _, v := range vs {
		if only == "" && v.name != "base" || only != "" && !slices.Contains(strings.Split(only, ","), v.name) {
			continue
		}
		t.Run(v.name, func(t *testing.T) {
			L := newCovVariant(t, v)
			alt := &covAlt{tallies: map[covKey]*covTally{}, diag: map[covKey]*covDiag{}}
			tallies, truths := runCoverageAlt(t, L, ns, R, 1000, nil, alt)
			at := map[covKey]float64{}
			for k := range alt.tallies {
				at[k] = truths[covKey{k.kind, "partial ROC E=0.05", k.n}]
			}
			var b strings.Builder
			// The harness's percentile interval is Compare's, from the
			// same resamples: the same tallies.
			for k, x := range tallies {
				if k.metric != "partial ROC E=0.05" {
					continue
				}
				if p := alt.tallies[covKey{k.kind, "percentile", k.n}]; p == nil || p.covered != x.covered || p.below != x.below || p.above != x.above {
					t.Errorf("%s n=%d: percentile tally %+v, Compare's %+v", k.kind, k.n, p, x)
				}
			}
			for k, x := range tallies {
				if k.metric == "partial ROC E=0.05" {
					fmt.Fprintf(&b, "compare %s n=%d cover %.3f below %d above %d nojdg %d undef %d\n", k.kind, k.n, x.coverage(), x.below, x.above, x.notJudged, x.undefined)
				}
			}
			for k, dg := range alt.diag {
				r := float64(dg.reps)
				mean := dg.dSum / r
				fmt.Fprintf(&b, "diag %s n=%d truth %.5f mean(d)-truth %.5f MC SD(d) %.5f mean boot SD %.5f mean(bootmean-d) %.5f mean(bootmed-d) %.5f mean z0 %.3f mean a %.4f jackundef %d\n",
					k.kind, k.n, truths[covKey{k.kind, "partial ROC E=0.05", k.n}], dg.dMinusTruth/r, math.Sqrt(dg.dSq/r-mean*mean), dg.bootSD/r, dg.bootMeanMinusD/r, dg.bootMedMinusD/r, dg.z0Sum/r, dg.accSum/r, dg.jackUndef)
			}
			t.Log("\n" + b.String() + covTable(alt.tallies, at))
		})
	}
}
