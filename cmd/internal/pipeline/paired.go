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
				out[i], errs[i] = s.comparePair(j.kind, j.ma, j.ea, j.mb, j.eb)
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

// pairJob is one paired comparison: model ma on extent ea minus model mb
// on extent eb.
type pairJob struct {
	kind           report.PairKind
	ma, ea, mb, eb string
}

// pairJobs lists the comparisons in the order results.json keeps them:
// every model and null on every other extent minus itself on the base
// extent, then on each extent every pair of models, then every model
// minus every null; each only where both sides are scored.
func (s *Study) pairJobs() []pairJob {
	var ids []string
	for _, m := range s.fam.Members {
		ids = append(ids, m.ID)
	}
	scored := func(model, ext string) *report.Score {
		for i := range s.res.Scores {
			sc := &s.res.Scores[i]
			if sc.Model == model && sc.Extent == ext && sc.Scored {
				return sc
			}
		}
		return nil
	}
	all := s.res.Models
	var models, nullModels []report.Model
	for _, m := range all {
		if m.IsNull() {
			nullModels = append(nullModels, m)
		} else {
			models = append(models, m)
		}
	}
	// The extents something is scored on, and the reference of the
	// differences between extents: the base extent, or the first extent
	// some model (else some null) is scored on when no model is scored on
	// the base. It is the report's reference (its analysis reads models
	// only): an extent where only a null is scored (every model constant
	// there, or without data) would otherwise be the reference here and
	// not in the report, which then found no difference of the models to
	// judge.
	scoredBy := func(ms []report.Model) []string {
		var out []string
		for _, id := range ids {
			for _, m := range ms {
				if scored(m.Name, id) != nil {
					out = append(out, id)
					break
				}
			}
		}
		return out
	}
	okIDs := scoredBy(all)
	refIDs := scoredBy(models)
	if len(refIDs) == 0 {
		refIDs = okIDs
	}
	base := report.BaseExtent(refIDs)
	var jobs []pairJob
	for _, m := range all {
		if scored(m.Name, base) == nil {
			continue
		}
		for _, id := range okIDs {
			if id != base && scored(m.Name, id) != nil {
				jobs = append(jobs, pairJob{report.PairedKindExtent, m.Name, id, m.Name, base})
			}
		}
	}
	for _, id := range okIDs {
		for i, a := range models {
			for _, b := range models[i+1:] {
				if scored(a.Name, id) != nil && scored(b.Name, id) != nil {
					jobs = append(jobs, pairJob{report.PairedKindModel, a.Name, id, b.Name, id})
				}
			}
		}
	}
	for _, id := range okIDs {
		for _, a := range models {
			for _, n := range nullModels {
				if scored(a.Name, id) != nil && scored(n.Name, id) != nil {
					jobs = append(jobs, pairJob{report.PairedKindNull, a.Name, id, n.Name, id})
				}
			}
		}
	}
	return jobs
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
	cmp, err := metrics.CompareThresholds(a, b, d, om)
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
			p.A, p.B, p.Diff, p.SE, p.Low, p.High = comA, comB, iv.Diff, iv.SE, iv.Low, iv.High
			p.TestSetShift = shift(ownA, ownB, iv.Diff)
		}
		p.NotJudged = p.NotJudgedReason()
		out = append(out, p)
	}
	place("auc", cmp.AUC, fa.AUC, fb.AUC, cmp.AUCOn[0], cmp.AUCOn[1])
	place("auc_unweighted", cmp.AUCUnweighted, fa.AUCUnweighted, fb.AUCUnweighted, cmp.AUCUnweightedOn[0], cmp.AUCUnweightedOn[1])
	res := func(metric string, r metrics.Resampled, ownA, ownB float64, ownOK bool) {
		p := rec(metric)
		p.Method, p.Defined = "paired_resamples", r.Defined
		p.Resamples, p.NotFormed = r.Resamples, r.NotFormed
		if r.Defined {
			p.A, p.B, p.Diff, p.SE, p.Low, p.High = r.A, r.B, r.Diff, r.SD, r.Low, r.High
			if ownOK {
				p.TestSetShift = shift(ownA, ownB, r.Diff)
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
