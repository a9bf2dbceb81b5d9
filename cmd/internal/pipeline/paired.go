package pipeline

import (
	"fmt"
	"slices"
	"sync"

	"areasweep/extent/vocab"
	"areasweep/metrics"
	"areasweep/report"
)

// globalTest returns, per point, its index among the run's scored test
// points (the index the paired resamples draw), or -1.
func (s *Study) globalTest() []int {
	g := make([]int, len(s.points))
	n := 0
	for j, p := range s.points {
		g[j] = -1
		if p.Status == vocab.PointScored && p.Role == vocab.RoleTest {
			g[j] = n
			n++
		}
	}
	return g
}

// draws is the run's one set of full-size paired resamples of the test
// points: B = --iterations, seeded by the run seed alone, so that every
// model and extent sees the same index sets.
func (s *Study) draws() metrics.Draws {
	return metrics.Draws{N: s.res.PointCounts.Test, B: s.o.Iterations, Seed: s.o.Seed}
}

// paired fills Results.Paired: for every model and null, each scored
// extent minus the base extent; for every extent, each pair of models
// (earlier minus later in model order, nulls left out: they are never
// ranked) and each model minus each null ("null" records: how far the model
// stands above the null on the same test points). Models are taken from
// Results.Models, so the distance-only null, scored outside s.models, takes
// part.
func (s *Study) paired() error {
	s.res.Paired = []report.Paired{}
	if b := s.o.Iterations; b < report.MinPercentileResamples {
		s.warn(fmt.Sprintf("--iterations %d: the 95%% intervals of the paired differences of the partial ROC ratio, the omission rates and the Boyce index, and the published partial ROC bootstrap's interval and P, come from %d resample%s; with fewer than %d a 2.5th and a 97.5th percentile do not lie inside the resampled values (our cut-off), so those differences are reported but not judged (no verdict, model comparison or reading against a null is taken from them; results.json gives not_judged_reason) and the bootstrap's interval and P are not given in the report or scores.csv (results.json keeps them): use --iterations 1000 (the default) for inference (the AUC's intervals come from the placements and do not depend on it)",
			b, b, report.Plural(b), report.MinPercentileResamples))
	}
	jobs := s.pairJobs()
	// Each comparison is deterministic on its own; run them on the workers
	// and keep the results in job order.
	out := make([][]report.Paired, len(jobs))
	errs := make([]error, len(jobs))
	workers := s.o.workers()
	var wg sync.WaitGroup
	next := make(chan int)
	for w := 0; w < min(workers, max(1, len(jobs))); w++ {
		wg.Add(1)
		go func() {
			defer wg.Done()
			for i := range next {
				j := jobs[i]
				out[i], errs[i] = s.comparePair(j.Kind, j.Model, j.Extent, j.OtherModel, j.Other)
			}
		}()
	}
	for i := range jobs {
		next <- i
	}
	close(next)
	wg.Wait()
	for i := range jobs {
		if errs[i] != nil {
			return errs[i]
		}
		s.res.Paired = append(s.res.Paired, out[i]...)
	}
	return nil
}

// pairJobs lists the comparisons in the order results.json keeps them
// (report.PairJobs, on the family's extents in family order).
func (s *Study) pairJobs() []report.PairJob {
	ids := make([]string, len(s.fam.Members))
	for i, m := range s.fam.Members {
		ids[i] = m.ID
	}
	return report.PairJobs(s.res.Models, ids, s.res.Scores)
}

// comparePair compares model ma on extent ea with model mb on extent eb on
// their common test points (pairedRecords).
func (s *Study) comparePair(kind report.PairKind, ma, ea, mb, eb string) ([]report.Paired, error) {
	a, b := s.evals[[2]string{ma, ea}], s.evals[[2]string{mb, eb}]
	if a == nil || b == nil {
		return nil, fmt.Errorf("paired %s: no evaluator for %s/%s or %s/%s", kind, ma, ea, mb, eb)
	}
	return pairedRecords(kind, ma, ea, mb, eb, a, b, s.draws(), s.o.E, s.thresholdKeys(ma), s.thresholdKeys(mb))
}

// thresholdKeys returns the omission metric keys of model's thresholds, in
// the order of its scores' Thresholds.
func (s *Study) thresholdKeys(model string) []string {
	for _, sc := range s.res.Scores {
		if sc.Model == model && sc.Scored {
			keys := make([]string, len(sc.Thresholds))
			for i, t := range sc.Thresholds {
				keys[i] = report.MetricKeyOmission(t.Name, t.Value)
			}
			return keys
		}
	}
	return nil
}

// pairedRecords compares evaluator a (model ma on extent ea) with b (mb on
// eb) and returns one report.Paired per score: both AUCs from the
// placements, the partial ROC ratio per E, the omission rate per threshold
// (keysA and keysB name a's and b's) and the Boyce index from the paired
// resamples d. The omission rates are compared at the thresholds both
// sides have, in a's order: two models need not have the same ones (one
// with no data on any training point has no training-presence
// threshold).
func pairedRecords(kind report.PairKind, ma, ea, mb, eb string, a, b *metrics.Evaluator, d metrics.Draws, es []float64, keysA, keysB []string) ([]report.Paired, error) {
	var keys []string
	var om [][2]int
	for i, k := range keysA {
		if j := slices.Index(keysB, k); j >= 0 {
			keys, om = append(keys, k), append(om, [2]int{i, j})
		}
	}
	// The differences described, never judged (report.NotCalibrated: the
	// Boyce index's, the partial ROC ratio's between extents) get no
	// interval: their resamples are left out.
	o := metrics.CompareOptions{BoyceUnresampled: report.NotCalibrated(report.MetricKeyBoyce, kind)}
	if len(es) > 0 {
		o.PartialROCUnresampled = report.NotCalibrated(report.MetricKeyPartialROC(es[0]), kind)
	}
	cmp, err := metrics.CompareWith(a, b, d, om, o)
	if err != nil {
		return nil, err
	}
	fa, fb := a.Full(), b.Full()
	// shift is how much the change of test points moved the score; it is
	// exactly 0 when both sides hold the same points.
	same := cmp.Common == a.N() && cmp.Common == b.N()
	shift := func(ownA, ownB, diff float64) float64 {
		if same {
			return 0
		}
		return (ownA - ownB) - diff
	}
	rec := func(metric string) report.Paired {
		return report.Paired{Metric: metric, Kind: kind, Model: ma, Extent: ea, OtherModel: mb, OtherExtent: eb, CommonPoints: cmp.Common}
	}
	var out []report.Paired
	place := func(metric string, iv metrics.Interval, ownA, ownB, comA, comB float64) {
		p := rec(metric)
		p.Method, p.Defined = "placements", iv.Defined
		if iv.Defined {
			p.A, p.B, p.Diff, p.SE, p.Low, p.High = comA, comB, iv.Diff, report.Float(iv.SE), report.Float(iv.Low), report.Float(iv.High)
			p.TestSetShift = shift(ownA, ownB, iv.Diff)
		}
		p.NotJudged = p.NotJudgedReason()
		out = append(out, p)
	}
	place("auc", cmp.AUC, fa.AUC, fb.AUC, cmp.AUCOn[0], cmp.AUCOn[1])
	place("auc_unweighted", cmp.AUCUnweighted, fa.AUCUnweighted, fb.AUCUnweighted, cmp.AUCUnweightedOn[0], cmp.AUCUnweightedOn[1])
	res := func(metric string, r metrics.Resampled, ownA, ownB float64, ownOK bool) {
		p := rec(metric)
		if report.NotCalibrated(metric, kind) {
			// Described, not judged: the two scores on the common
			// points and their difference, no interval (report.Paired).
			p.Method, p.Defined = "point_difference", r.Scored
			if p.Defined {
				p.A, p.B, p.Diff = r.A, r.B, r.A-r.B
				if ownOK {
					p.TestSetShift = shift(ownA, ownB, p.Diff)
				}
			}
		} else {
			p.Method, p.Defined = "paired_resamples", r.Defined
			p.Resamples, p.NotFormed = r.Resamples, r.NotFormed
			if r.Defined {
				p.A, p.B, p.Diff, p.SE, p.Low, p.High = r.A, r.B, r.Diff, report.Float(r.SD), report.Float(r.Low), report.Float(r.High)
				if ownOK {
					p.TestSetShift = shift(ownA, ownB, r.Diff)
				}
			}
		}
		p.NotJudged = p.NotJudgedReason()
		out = append(out, p)
	}
	for i, e := range es {
		if i < len(cmp.PartialROC) {
			res(report.MetricKeyPartialROC(e), cmp.PartialROC[i], fa.Ratio[i], fb.Ratio[i], fa.RatioOK[i] && fb.RatioOK[i])
		}
	}
	for t, key := range keys {
		res(key, cmp.Omission[t], fa.Omission[om[t][0]], fb.Omission[om[t][1]], true)
	}
	res("boyce", cmp.Boyce, fa.Boyce, fb.Boyce, fa.BoyceOK && fb.BoyceOK)
	return out, nil
}
