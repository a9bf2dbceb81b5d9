package metrics

import (
	"math"
	"sort"
	"strconv"
	"testing"
)

// TestHanleyMcNeil checks the five-category rating example of Hanley &
// McNeil (1982, Radiology 143:29-36): normals 33/6/6/11/2 as background,
// abnormals 3/2/2/11/33 as test presences, ratings 1..5.
func TestHanleyMcNeil(t *testing.T) {
	c := loadCases(t)["hanley_mcneil_1982"]
	g := loadGolden(t).AUC["hanley_mcneil_1982"]
	_, a := build(t, c, nil, 64)
	sc, err := Score(a, c.train, c.test, quick(0.05))
	if err != nil {
		t.Fatal(err)
	}
	// Source: Hanley & McNeil (1982), AUC about 0.893 (from memory).
	if math.Abs(sc.AUC-0.893) > 0.0005 {
		t.Errorf("AUC = %.6f, Hanley & McNeil (1982) give about 0.893 (from memory)", sc.AUC)
	}
	// Source: sklearn.metrics.roc_auc_score (sklearn_golden.json), which
	// gives 0.89317..., confirming the recalled value.
	if !near(sc.AUC, g.AUC, 1e-12) {
		t.Errorf("AUC = %.15f, sklearn roc_auc_score = %.15f", sc.AUC, g.AUC)
	}
	// Source: hand computation from the published table:
	// sum_p [N(<r) + N(=r)/2] / (51*58) = 2642/2958.
	if !near(sc.AUC, 2642.0/2958.0, 1e-14) {
		t.Errorf("AUC = %.15f, want 2642/2958 = %.15f", sc.AUC, 2642.0/2958.0)
	}
}

// TestAUCGolden compares the three AUCs with sklearn.metrics.roc_auc_score
// (positives weight 1, negatives weight = cell area; see golden.py).
func TestAUCGolden(t *testing.T) {
	cases := loadCases(t)
	g := loadGolden(t)
	for name, want := range g.AUC {
		t.Run(name, func(t *testing.T) {
			c, ok := cases[name]
			if !ok {
				t.Fatalf("case %s missing from cases.csv", name)
			}
			_, a := build(t, c, nil, 256)
			sc, err := Score(a, c.train, c.test, quick(0.05))
			if err != nil {
				t.Fatal(err)
			}
			if !sc.Scored {
				t.Fatalf("not scored: %s", sc.NotScored)
			}
			// Source: sklearn roc_auc_score, sample_weight = area.
			if !near(sc.AUC, want.AUC, 1e-12) {
				t.Errorf("AUC = %.15f, sklearn %.15f", sc.AUC, want.AUC)
			}
			// Source: sklearn roc_auc_score, every cell weight 1.
			if !near(sc.AUCUnweighted, want.AUCUnweighted, 1e-12) {
				t.Errorf("AUCUnweighted = %.15f, sklearn %.15f", sc.AUCUnweighted, want.AUCUnweighted)
			}
			// Source: sklearn roc_auc_score on the training presences.
			if !near(sc.AUCTrain, want.AUCTrain, 1e-12) {
				t.Errorf("AUCTrain = %.15f, sklearn %.15f", sc.AUCTrain, want.AUCTrain)
			}
		})
	}
}

// TestPartialROCAgainstPROC checks the identity
//
//	model area = (1 - x_E)(1 - E) + A_band
//
// where A_band is pROC's partial AUC (sensitivity focus, uncorrected,
// partial.auc = c(1, 1-E)) written by golden.R, and the definitions
// NullArea = (1-x_E^2)/2, Ratio = ModelArea/NullArea. pROC has no weights:
// golden.R replicates background rows by weight, which matches our area
// weights exactly. It also compares pROC's full AUC.
func TestPartialROCAgainstPROC(t *testing.T) {
	cases := loadCases(t)
	proc := loadProc(t)
	compared, ties := 0, 0
	defer func() {
		if compared < 15 || ties < 3 {
			t.Errorf("compared %d partial ROC areas with pROC and met %d tie crossings; want at least 15 and 3", compared, ties)
		}
	}()
	for name, rows := range proc {
		t.Run(name, func(t *testing.T) {
			c, ok := cases[name]
			if !ok {
				t.Fatalf("case %s missing from cases.csv", name)
			}
			_, a := build(t, c, nil, 256)
			sc, err := Score(a, c.train, c.test, quick(0.05, 0.10, 0.20))
			if err != nil {
				t.Fatal(err)
			}
			checked := 0
			for _, r := range rows {
				switch r.quantity {
				case "auc":
					// Source: pROC auc() on replicated rows.
					if !near(sc.AUC, r.value, 1e-12) {
						t.Errorf("AUC = %.15f, pROC %.15f", sc.AUC, r.value)
					}
					checked++
				case "pauc_band":
					var p *PartialROC
					for i := range sc.PartialROC {
						if math.Abs(sc.PartialROC[i].E-r.e) < 1e-12 {
							p = &sc.PartialROC[i]
						}
					}
					if p == nil {
						t.Fatalf("no partial ROC for E=%v", r.e)
					}
					if !p.Formed && p.Reason == ReasonPartialTie {
						// Our rule (see PartialROC): a crossing among tied
						// test presences has no defined ratio; pROC
						// interpolates, so there is nothing to compare.
						if p.TiedAtCrossing < 2 || p.Ratio != 0 {
							t.Errorf("E=%v: tie crossing with %d tied presences, ratio %v", r.e, p.TiedAtCrossing, p.Ratio)
						}
						ties++
						checked++
						continue
					}
					if !p.Formed {
						// Source: pROC. A curve that reaches 1-E only at
						// x = 1 leaves no area right of it in the band.
						if p.XE != 1 || r.value != 0 {
							t.Errorf("E=%v: not formed with XE=%v, pROC band area %v", r.e, p.XE, r.value)
						}
						checked++
						continue
					}
					// Source: pROC partial AUC via the identity above.
					want := (1-p.XE)*(1-r.e) + r.value
					if !near(p.ModelArea, want, 1e-10) {
						t.Errorf("E=%v: model area %.15f, (1-xE)(1-E)+A_band(pROC) = %.15f", r.e, p.ModelArea, want)
					}
					if !near(p.NullArea, (1-p.XE*p.XE)/2, 1e-15) || !near(p.Ratio, p.ModelArea/p.NullArea, 1e-15) {
						t.Errorf("E=%v: inconsistent ratio %v = %v / %v", r.e, p.Ratio, p.ModelArea, p.NullArea)
					}
					checked++
					compared++
				}
			}
			if checked != 4 {
				t.Errorf("checked %d quantities, want 4", checked)
			}
		})
	}
}

// TestHanleyMcNeilPartialByHand checks E = 0.05 on the Hanley & McNeil data
// by hand: the crossing lies on the last segment from (25/58, 48/51) to
// (1,1) at s = (48.45-48)/3, so x_E = (25 + 0.15*33)/58. That segment holds
// the 3 abnormal cases rated 1, so the ratio is undefined (tie rule), and
// the discrete reading (threshold "rating >= 1") keeps the whole area.
func TestHanleyMcNeilPartialByHand(t *testing.T) {
	c := loadCases(t)["hanley_mcneil_1982"]
	_, a := build(t, c, nil, 64)
	sc, err := Score(a, c.train, c.test, quick(0.05))
	if err != nil {
		t.Fatal(err)
	}
	xE := (25 + 0.15*33) / 58
	p := sc.PartialROC[0]
	// Source: hand computation from the published table.
	if !near(p.XE, xE, 1e-14) || p.Formed || p.Reason != ReasonPartialTie || p.TiedAtCrossing != 3 || p.TieValue != 1 ||
		p.DiscreteFormed || p.DiscreteXE != 1 || p.Ratio != 0 {
		t.Errorf("got %+v, want XE=%v, undefined by the tie rule with 3 tied at rating 1 and discrete x_E = 1", p, xE)
	}
}

// TestThresholdsGolden compares threshold statistics with golden.py's
// numpy/scipy rendering of Anderson, Lew & Peterson (2003) (binomial tail
// from scipy.stats.binom.sf).
func TestThresholdsGolden(t *testing.T) {
	cases := loadCases(t)
	g := loadGolden(t)
	for name, want := range g.Thresholds {
		t.Run(name, func(t *testing.T) {
			c := cases[name]
			_, a := build(t, c, nil, 64)
			sc, err := Score(a, c.train, c.test, quick(0.05))
			if err != nil {
				t.Fatal(err)
			}
			if len(sc.Thresholds) != len(want) {
				t.Fatalf("%d thresholds, golden has %d", len(sc.Thresholds), len(want))
			}
			for i, w := range want {
				got := sc.Thresholds[i]
				if string(got.Name) != w.Name || got.Value != w.Value || got.Successes != w.Successes || got.N != w.N ||
					!near(got.Omission, w.Omission, 1e-15) || !near(got.AreaFraction, w.AreaFraction, 1e-15) {
					t.Errorf("threshold %d = %+v, golden.py %+v", i, got, w)
				}
				if !(math.Abs(got.PBinomial-w.PBinomial) <= 1e-10*w.PBinomial+1e-300) {
					t.Errorf("%s PBinomial = %.17g, scipy binom.sf %.17g", w.Name, got.PBinomial, w.PBinomial)
				}
			}
		})
	}
}

// TestBinomialTailGolden compares BinomialTail with scipy.stats.binom.sf(k-1, n, p).
func TestBinomialTailGolden(t *testing.T) {
	for _, b := range loadGolden(t).Binomial {
		got := BinomialTail(b.N, b.K, b.P)
		// Source: scipy.stats.binom.sf; relative tolerance 1e-10.
		if !(math.Abs(got-b.Tail) <= 1e-10*b.Tail) {
			t.Errorf("BinomialTail(%d, %d, %v) = %.17g, scipy %.17g", b.N, b.K, b.P, got, b.Tail)
		}
	}
}

// TestSpearmanGolden compares Spearman with scipy.stats.spearmanr.
func TestSpearmanGolden(t *testing.T) {
	for _, s := range loadGolden(t).Spearman {
		t.Run(s.Name, func(t *testing.T) {
			got, ok := Spearman(s.X, s.Y)
			// Source: scipy.stats.spearmanr.
			if !ok || !near(got, s.Rho, 1e-12) {
				t.Errorf("Spearman = %.15f (ok=%v), scipy %.15f", got, ok, s.Rho)
			}
		})
	}
}

// TestQuantileGolden compares the percentile convention with
// numpy.percentile's default (linear) method.
func TestQuantileGolden(t *testing.T) {
	for _, q := range loadGolden(t).Quantile {
		t.Run(q.Name, func(t *testing.T) {
			lo, hi := Quantile(q.V, 0.025), Quantile(q.V, 0.975)
			// Source: numpy.percentile(v, [2.5, 97.5]).
			if !near(lo, q.P025, 1e-13) || !near(hi, q.P975, 1e-13) {
				t.Errorf("quantiles %v %v, numpy %v %v", lo, hi, q.P025, q.P975)
			}
		})
	}
}

// TestT975AgainstR compares the t quantile of the paired AUC intervals
// with R's qt(0.975, df) (t975_golden.csv, written by golden.R), to a
// relative 1e-10 (our tolerance: gonum's quantile differs from R's by
// 1.7e-11 relative at df = 100000 and by less than 1e-13 up to df = 1000),
// and with the closed forms at 1 and 2 degrees of freedom (recalled from
// memory: t with 1 df is the standard Cauchy distribution, quantile
// tan(pi (p - 1/2)); with 2 df the quantile is (2p - 1) / sqrt(2p(1 - p))).
// SciPy 1.10's scipy.stats.t.ppf is not used: it differs from both by up
// to 1e-9 relative.
func TestT975AgainstR(t *testing.T) {
	rows := readGoldenCSV(t, "t975_golden.csv")
	if len(rows) < 11 || rows[0][0] != "df" || rows[0][1] != "q" {
		t.Fatalf("t975_golden.csv: %d rows, header %v; want df,q and at least 10 rows", len(rows), rows[0])
	}
	for _, r := range rows[1:] {
		df, err1 := strconv.Atoi(r[0])
		q, err2 := strconv.ParseFloat(r[1], 64)
		if err1 != nil || err2 != nil {
			t.Fatalf("t975_golden.csv row %v", r)
		}
		if got := T975(df); !(math.Abs(got-q) <= 1e-10*q) {
			t.Errorf("T975(%d) = %.17g, R %.17g", df, got, q)
		}
	}
	p := 0.975
	for _, c := range []struct {
		df   int
		want float64
	}{{1, math.Tan(math.Pi * (p - 0.5))}, {2, (2*p - 1) / math.Sqrt(2*p*(1-p))}} {
		if got := T975(c.df); !(math.Abs(got-c.want) <= 1e-13*c.want) {
			t.Errorf("T975(%d) = %.17g, closed form %.17g", c.df, got, c.want)
		}
	}
}

// TestGoldenCoverage makes sure the golden files hold every case, so that a
// truncated regeneration fails instead of silently testing less.
func TestGoldenCoverage(t *testing.T) {
	cases := loadCases(t)
	g := loadGolden(t)
	proc := loadProc(t)
	var names []string
	for n := range cases {
		names = append(names, n)
		if _, ok := g.AUC[n]; !ok {
			t.Errorf("case %s has no sklearn AUC", n)
		}
		if _, ok := proc[n]; !ok {
			t.Errorf("case %s has no pROC rows", n)
		}
	}
	sort.Strings(names)
	if len(names) < 7 {
		t.Errorf("only %d cases: %v", len(names), names)
	}
	if c := cases["large"]; len(c.bgV) < 5000 {
		t.Errorf("large case has %d cells, want 5000", len(c.bgV))
	}
}
