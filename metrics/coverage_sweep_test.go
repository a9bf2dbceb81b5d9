package metrics

import (
	"fmt"
	"math"
	"math/rand/v2"
	"os"
	"slices"
	"strings"
	"testing"
)

// An exploratory sweep of the coverage check (coverage_test.go) over
// other landscapes: does what TestPairedIntervalCoverage found on its one
// landscape hold elsewhere? It asserts nothing about the coverage (it
// measures), so it is skipped unless AREASWEEP_COVERAGE_SWEEP=1:
//
//	AREASWEEP_COVERAGE_SWEEP=1 go test -count=1 -run TestCoverageSweep -v -timeout 60m ./metrics/
//
// AREASWEEP_COVERAGE_SWEEP_R sets the repetitions per n (default 500),
// AREASWEEP_COVERAGE_SWEEP_ONLY a comma-separated list of variant names,
// AREASWEEP_COVERAGE_SWEEP_N the numbers of test points (default 10, 30,
// 100, 150, 500) and AREASWEEP_COVERAGE_SWEEP_E the E of the partial ROC
// ratio (default covE), both comma-separated.
//
// Each variant is newCovLandscape's construction with other parameters
// (covVariant); "base" reproduces newCovLandscape exactly (checked). For
// each it prints the true scores, the table of covTable and the coverage
// of the AUC's paired interval at n = 10 and 30 rebuilt from Compare's
// Diff and SE with the Student t quantile with n - 1 degrees of freedom
// that Compare uses (covT975) and with the normal quantile 1.96 it used
// before (Abramowitz & Stegun 1964, table 26.1), to show the difference.

// covVariant describes one landscape of the sweep.
type covVariant struct {
	name, desc     string
	cols, rows     int
	r0, r1, c0, c1 int     // the small extent: rows r0..r1-1, columns c0..c1-1
	envSpan        float64 // environment gradient: envSpan c / cols
	presPow        float64 // presence weight: area * suit^presPow / 10
	noiseA         float64 // A = shapeA(suit) + noiseA N(0,1)
	shapeA         func(s float64) float64
	scaleB, noiseB float64 // B = scaleB suit + noiseB N(0,1)
	// belowOutside: every cell outside the small extent gets, for each
	// model, a value below every value of the small extent.
	belowOutside bool
	// levelsA > 0: A rounded to multiples of 1/levelsA (tied values; the
	// true partial ROC ratio is then undefined by the tie rule and the
	// ratio is not tallied).
	levelsA int
	// copyOutside > 0: the cells outside the small extent (twice as many)
	// copy its cells in turn, area and values, each value plus copyOutside
	// N(0,1).
	copyOutside float64
	// e: the E of the partial ROC ratio (nil: covE).
	e []float64
}

func covBaseVariant() covVariant {
	return covVariant{name: "base", desc: "TestPairedIntervalCoverage's landscape",
		cols: covCols, rows: covRows, r0: 10, r1: 50, c0: 20, c1: 60,
		envSpan: 0.8, presPow: 2, noiseA: 0.1, scaleB: 0.5, noiseB: 0.3}
}

// covVariants are the landscapes of the sweep (their parameters tuned by
// looking at the true scores they print).
func covVariants() []covVariant {
	base := covBaseVariant()
	v := []covVariant{base}
	add := func(name, desc string, f func(*covVariant)) {
		x := base
		x.name, x.desc = name, desc
		f(&x)
		v = append(v, x)
	}
	add("midboyce", "A peaks at suit 0.6 and falls beyond (min(s, 1.2 - s) + 0.05 N): population Boyce indices mid-range", func(x *covVariant) {
		x.shapeA = func(s float64) float64 { return math.Min(s, 1.2-s) }
		x.noiseA = 0.05
	})
	add("weak", "weak separation: presences follow suit^0.3, noisier models (AUC near 0.6)", func(x *covVariant) {
		x.presPow = 0.3
		x.noiseA, x.noiseB = 0.3, 0.5
	})
	add("strong", "strong separation: presences follow suit^40, A nearly exact (AUC near 0.95)", func(x *covVariant) {
		x.presPow = 40
		x.noiseA, x.noiseB = 0.02, 0.1
	})
	add("bigextent", "the large extent 160 x 120 cells (the small one the same 40 x 40 block): a larger partial ROC ratio difference", func(x *covVariant) {
		x.cols, x.rows, x.envSpan = 160, 120, 1.6 // the same gradient, continued
	})
	add("below", "outside the small extent every cell lies below every value of the small extent", func(x *covVariant) {
		x.belowOutside = true
	})
	add("copies", "outside the small extent two copies of its cells (area and values, values + 0.03 N): extent differences near 0", func(x *covVariant) {
		x.copyOutside = 0.03
	})
	add("coarse", "A rounded to multiples of 0.1 (a dozen or so distinct values, ties, like the demo's coarse model)", func(x *covVariant) {
		x.levelsA = 10
	})
	return v
}

// newCovVariant builds the landscape of v as newCovLandscape builds its
// own (the same seed and order of draws).
func newCovVariant(t testing.TB, v covVariant) *covLandscape {
	t.Helper()
	rng := rand.New(rand.NewPCG(20261203, 1))
	es := v.e
	if es == nil {
		es = covE
	}
	L := &covLandscape{s: Settings{E: es}, noRatio: v.levelsA > 0}
	nc := v.cols * v.rows
	L.area = make([]int64, nc)
	L.inSmall = make([]bool, nc)
	env := make([]float64, nc)
	for r := 0; r < v.rows; r++ {
		w := int64(math.Round(1000 * math.Cos(float64(r)/float64(v.rows)*1.2)))
		for c := 0; c < v.cols; c++ {
			i := r*v.cols + c
			L.area[i] = w
			env[i] = v.envSpan*float64(c)/float64(v.cols) + 0.4*math.Sin(float64(r)/9) + 0.15*rng.NormFloat64()
			L.inSmall[i] = r >= v.r0 && r < v.r1 && c >= v.c0 && c < v.c1
		}
	}
	suit := make([]float64, nc)
	for i, e := range env {
		suit[i] = math.Exp(-(e - 0.7) * (e - 0.7) / 0.08)
	}
	L.m[0], L.m[1] = make([]float64, nc), make([]float64, nc)
	for i, s := range suit {
		a := s
		if v.shapeA != nil {
			a = v.shapeA(s)
		}
		L.m[0][i] = a + v.noiseA*rng.NormFloat64()
		L.m[1][i] = v.scaleB*s + v.noiseB*rng.NormFloat64()
		if v.levelsA > 0 {
			L.m[0][i] = math.Round(L.m[0][i]*float64(v.levelsA)) / float64(v.levelsA)
		}
	}
	if v.belowOutside {
		for k := 0; k < 2; k++ {
			lo := math.Inf(1)
			for i, x := range L.m[k] {
				if L.inSmall[i] {
					lo = math.Min(lo, x)
				}
			}
			for i := range L.m[k] {
				if !L.inSmall[i] {
					L.m[k][i] = lo - 0.1 - 0.1*rng.Float64()
				}
			}
		}
	}
	if v.copyOutside > 0 {
		var in []int
		for i := range suit {
			if L.inSmall[i] {
				in = append(in, i)
			}
		}
		j := 0
		for i := range suit {
			if L.inSmall[i] {
				continue
			}
			src := in[j%len(in)]
			j++
			L.area[i] = L.area[src]
			for k := 0; k < 2; k++ {
				L.m[k][i] = L.m[k][src] + v.copyOutside*rng.NormFloat64()
			}
		}
	}
	for i := range suit {
		if !L.inSmall[i] {
			continue
		}
		L.small = append(L.small, i)
		L.q = append(L.q, int64(math.Round(float64(L.area[i])*math.Pow(suit[i], v.presPow)/10)))
	}
	covFinish(t, L, false) // the coarse variant's model has ties
	return L
}

// covTCount counts the AUC intervals of one kind, metric and n rebuilt
// from Compare's Diff and SE with a normal (z) and a Student t quantile.
type covTCount struct{ judged, zCovered, tCovered, zSign, tSign int }

func TestCoverageSweep(t *testing.T) {
	if os.Getenv("AREASWEEP_COVERAGE_SWEEP") != "1" {
		t.Skip("exploratory sweep: set AREASWEEP_COVERAGE_SWEEP=1 to run it")
	}
	R := 500
	if s := os.Getenv("AREASWEEP_COVERAGE_SWEEP_R"); s != "" {
		if _, err := fmt.Sscan(s, &R); err != nil || R < 1 {
			t.Fatalf("AREASWEEP_COVERAGE_SWEEP_R=%q: want a positive integer", s)
		}
	}
	var only []string
	if s := os.Getenv("AREASWEEP_COVERAGE_SWEEP_ONLY"); s != "" {
		only = strings.Split(s, ",")
	}
	var ns []int
	var es []float64
	for _, l := range []struct {
		name string
		set  func(v float64)
	}{{"AREASWEEP_COVERAGE_SWEEP_N", func(v float64) {
		if v != math.Trunc(v) || v < 2 {
			t.Fatalf("AREASWEEP_COVERAGE_SWEEP_N: %v is not a whole number of test points of 2 or more", v)
		}
		ns = append(ns, int(v))
	}}, {"AREASWEEP_COVERAGE_SWEEP_E", func(v float64) {
		if !(v > 0 && v < 1) {
			t.Fatalf("AREASWEEP_COVERAGE_SWEEP_E: %v is not in (0, 1)", v)
		}
		es = append(es, v)
	}}} {
		s := os.Getenv(l.name)
		if s == "" {
			continue
		}
		for _, f := range strings.Split(s, ",") {
			var v float64
			if _, err := fmt.Sscan(f, &v); err != nil {
				t.Fatalf("%s=%q: want comma-separated numbers", l.name, s)
			}
			l.set(v)
		}
	}
	if ns == nil {
		ns = covNs
	}
	// The builder reproduces newCovLandscape for the base variant.
	{
		a, b := newCovLandscape(t), newCovVariant(t, covBaseVariant())
		if !slices.Equal(a.area, b.area) || !slices.Equal(a.m[0], b.m[0]) || !slices.Equal(a.m[1], b.m[1]) ||
			!slices.Equal(a.q, b.q) || !slices.Equal(a.small, b.small) || a.th != b.th {
			t.Fatal("newCovVariant(base) differs from newCovLandscape")
		}
	}
	for _, v := range covVariants() {
		if only != nil && !slices.Contains(only, v.name) {
			continue
		}
		v.e = es
		t.Run(v.name, func(t *testing.T) {
			L := newCovVariant(t, v)
			var tru [2][2]covTruth
			for k := 0; k < 2; k++ {
				for ext := 0; ext < 2; ext++ {
					tru[k][ext] = covTrue(t, L, k, ext)
				}
			}
			pres := 0
			for _, q := range L.q {
				if q > 0 {
					pres++
				}
			}
			var distinct [2]int
			for k := 0; k < 2; k++ {
				vals := make([]float64, len(L.small))
				for j, i := range L.small {
					vals[j] = L.m[k][i]
				}
				slices.Sort(vals)
				distinct[k] = len(slices.Compact(vals))
			}
			var b strings.Builder
			fmt.Fprintf(&b, "%s: %s\n%d cells, small extent %d cells (%d with presence weight > 0; distinct values A %d, B %d)\n",
				v.name, v.desc, len(L.area), len(L.small), pres, distinct[0], distinct[1])
			if L.noRatio {
				fmt.Fprintf(&b, "  A's true partial ROC ratio is undefined (its 1-E crossing lies on a tied value): the ratio is not tallied\n")
			}
			for _, me := range [][2]int{{0, 0}, {0, 1}, {1, 0}} {
				x := tru[me[0]][me[1]]
				fmt.Fprintf(&b, "  model %c on %-5s: AUC %.4f (cells %.4f), partial ROC ratio %.4f at E = %g, omission %.4f, Boyce %.4f\n",
					"AB"[me[0]], []string{"small", "large"}[me[1]], x.auc, x.aucU, x.ratio, L.s.E, x.omission, x.boyce)
			}
			tc := map[covKey]*covTCount{}
			hook := func(kind string, n int, cmp Comparison, truths map[covKey]float64) {
				tq, ok := covT975[n]
				if !ok || n > 30 {
					return
				}
				for _, iv := range []struct {
					metric string
					iv     Interval
				}{{"AUC", cmp.AUC}, {"AUC unweighted", cmp.AUCUnweighted}} {
					if !iv.iv.Defined {
						continue
					}
					k := covKey{kind, iv.metric, n}
					truth := truths[k]
					x := tc[k]
					if x == nil {
						x = &covTCount{}
						tc[k] = x
					}
					x.judged++
					for _, q := range []struct {
						q            float64
						covered, sgn *int
					}{{1.959963984540054, &x.zCovered, &x.zSign}, {tq, &x.tCovered, &x.tSign}} {
						lo, hi := iv.iv.Diff-q.q*iv.iv.SE, iv.iv.Diff+q.q*iv.iv.SE
						if lo <= truth && truth <= hi {
							*q.covered++
						}
						if (truth > 0 && hi < 0) || (truth < 0 && lo > 0) {
							*q.sgn++
						}
					}
				}
			}
			tallies, truths := runCoverageHook(t, L, ns, R, 1000, hook)
			fmt.Fprintf(&b, "R = %d repetitions per n, B = 1000 (columns as TestPairedIntervalCoverage's)\n%s", R, covTable(tallies, truths))
			keys := slices.SortedFunc(func(yield func(covKey) bool) {
				for k := range tc {
					if !yield(k) {
						return
					}
				}
			}, func(a, b covKey) int {
				return strings.Compare(fmt.Sprintf("%s %s %04d", a.kind, a.metric, a.n), fmt.Sprintf("%s %s %04d", b.kind, b.metric, b.n))
			})
			fmt.Fprintf(&b, "AUC interval Diff -+ q SE: q = 1.96 (z) or t_{0.975, n-1}\n%-7s %-15s %4s %5s %7s %7s %6s %6s\n", "kind", "metric", "n", "R", "cover z", "cover t", "sign z", "sign t")
			for _, k := range keys {
				x := tc[k]
				j := float64(x.judged)
				fmt.Fprintf(&b, "%-7s %-15s %4d %5d %7.3f %7.3f %6d %6d\n", k.kind, k.metric, k.n, x.judged,
					float64(x.zCovered)/j, float64(x.tCovered)/j, x.zSign, x.tSign)
				// The t interval rebuilt from Diff and SE is Compare's own.
				if c := tallies[k]; c == nil || c.covered != x.tCovered {
					t.Errorf("%v: t interval from Diff and SE covers %d, Compare's %v", k, x.tCovered, c)
				}
			}
			t.Log("\n" + b.String())
		})
	}
}
