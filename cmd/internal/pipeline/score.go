package pipeline

import (
	"encoding/binary"
	"fmt"
	"hash/fnv"
	"math"
	"sync"
	"sync/atomic"
	"time"

	"areasweep/cmd/internal/pass"
	"areasweep/extent/geodesy"
	"areasweep/extent/nullmodel"
	"areasweep/extent/vocab"
	"areasweep/metrics"
	"areasweep/report"
)

// modelPoints are one model's values at the scored points where it has
// data, by role, with the test points' ids in the same order.
type modelPoints struct {
	train, test []float64
	testIDs     []int
}

// split sorts the model's values at the points (vals, valid from Sample)
// into training and test values of the scored points it has data at.
func (s *Study) split(vals []float64, valid []bool) modelPoints {
	var mp modelPoints
	for j, p := range s.points {
		if p.Status != vocab.PointScored || !valid[j] {
			continue
		}
		if p.Role == vocab.RoleTrain {
			mp.train = append(mp.train, vals[j])
		} else {
			mp.test = append(mp.test, vals[j])
			mp.testIDs = append(mp.testIDs, p.ID)
		}
	}
	return mp
}

// Score computes every metric of the pass p on every extent from its sums
// (per member) and records them: the model's value range, the preview
// (first pass), the scores, curves and paired evaluators per extent, the
// rings of each chain and the omission lists; for the distance-only null
// also each extent's sorting bias. The family must be final (clipped).
func (s *Study) Score(p *Plan, sums *Sums) error {
	t0 := time.Now()
	m := s.recordModel(p.Model, sums)
	// The distance-only null's sorting bias (one goroutine, most of it
	// adding up the pass's distance histograms) is computed beside the
	// scoring of the extents, and recorded after it.
	type sortingBias struct {
		sbs []*nullmodel.SortingBias
		d   time.Duration
		err error
	}
	var sbDone chan sortingBias
	if p.null != nil {
		sbDone = make(chan sortingBias, 1)
		go func() {
			var r sortingBias
			t := time.Now()
			r.err = recovered("the sorting bias", func() error {
				r.sbs = s.sortingBiases(p.null.ix, &p.null.bg)
				return nil
			})
			r.d = time.Since(t)
			sbDone <- r
		}()
	}
	// wait returns err once the sorting bias is done (so that nothing
	// runs past Score), or the sorting bias's error.
	wait := func(err error) error {
		if sbDone == nil {
			return err
		}
		r := <-sbDone
		sbDone = nil
		if err != nil {
			return err
		}
		if r.err != nil {
			return r.err
		}
		s.res.Settings.DistanceNull = true
		s.recordSortingBias(r.sbs, r.d)
		return nil
	}
	// Training-presence thresholds come from all of the model's scored
	// training points, so they are the same on every extent (as the
	// omission lists are); AUCTrain uses the training points inside each.
	mp := s.split(p.vals, p.valid)
	// The model's smallest values and the values of its long runs, with
	// their areas over the whole raster, are where a point mass may sit
	// that the area-random p must know (metrics.Settings.ModelLowest).
	set := metrics.Settings{E: s.o.E, Iterations: s.o.Iterations, Fraction: s.o.Fraction, FixedThresholds: s.o.Thresholds,
		ThresholdTrain: append([]float64{}, mp.train...), ModelMin: sums.Stats.Min, ModelMinArea: sums.Stats.FloorArea,
		ModelLowest: sums.Stats.Lowest, ModelRuns: sums.Stats.Runs, ModelArea: sums.Stats.Area}
	in := pointsIn{s: s, vals: p.vals, valid: p.valid, global: s.globalTest()}
	// The extents are scored at once on the workers (each extent's
	// bootstrap has its own seed, deriveSeed, so nothing depends on the
	// schedule) and recorded in member order.
	n := len(s.fam.Members)
	scores := make([]extentScore, n)
	errs := make([]error, n)
	workers := s.o.workers()
	sem := make(chan struct{}, max(1, workers))
	var wg sync.WaitGroup
	for k := range n {
		wg.Add(1)
		sem <- struct{}{}
		go func() {
			defer func() { <-sem; wg.Done() }()
			scores[k], errs[k] = s.scoreExtent(m.Name, k, sums.Accs[k], in, len(mp.test), set)
		}()
	}
	wg.Wait()
	for k := range n {
		if errs[k] != nil {
			return wait(errs[k])
		}
		s.recordExtent(m.Name, scores[k])
	}
	s.logf("%s: scores on %s (bootstraps included) in %.2f s", m.Name, scoredCount(scores), time.Since(t0).Seconds())
	if err := s.rings(m.Name, sums.Accs, in.values); err != nil {
		return wait(err)
	}
	s.omissions(m.Name, mp)
	return wait(nil)
}

// parallel calls f(0), ..., f(n-1) on the run's workers and returns when
// all have returned. f must only write what belongs to its index, so that
// nothing depends on the schedule.
func (s *Study) parallel(n int, f func(i int)) {
	workers := s.o.workers()
	workers = min(workers, n)
	if workers <= 1 {
		for i := range n {
			f(i)
		}
		return
	}
	var next atomic.Int64
	var wg sync.WaitGroup
	for range workers {
		wg.Add(1)
		go func() {
			defer wg.Done()
			for i := int(next.Add(1) - 1); i < n; i = int(next.Add(1) - 1) {
				f(i)
			}
		}()
	}
	wg.Wait()
}

// recordModel records model m with its pass's value range and floor share,
// and the preview when the pass made one.
func (s *Study) recordModel(m report.Model, sums *Sums) report.Model {
	st := sums.Stats
	floor := 0.0
	if st.Area > 0 {
		floor = float64(st.FloorArea) / float64(st.Area)
	}
	m.ValueMin, m.ValueMax, m.FloorShare = st.Min, st.Max, floor
	s.res.Models = append(s.res.Models, m)
	if sums.Preview != nil {
		s.res.Preview = s.preview(sums.Preview, st)
	}
	return m
}

// pointsIn picks a pass's values at the scored points that lie inside an
// extent.
type pointsIn struct {
	s      *Study
	vals   []float64 // per point
	valid  []bool    // per point: the model has data there
	global []int     // per point: its index among the run's test points
}

// inside reports whether point j is scored, of role, with data, in member k.
func (q pointsIn) inside(j, k int, role vocab.Role) bool {
	p := q.s.points[j]
	return p.Status == vocab.PointScored && p.Role == role && q.valid[j] && q.s.fam.Has(k, q.s.cell[j])
}

// values returns the values of the points of role inside member k.
func (q pointsIn) values(k int, role vocab.Role) []float64 {
	var out []float64
	for j := range q.s.points {
		if q.inside(j, k, role) {
			out = append(out, q.vals[j])
		}
	}
	return out
}

// testIDs returns the run-wide indices and the ids of the test points
// inside member k.
func (q pointsIn) testIDs(k int) (global, ids []int) {
	for j, p := range q.s.points {
		if q.inside(j, k, vocab.RoleTest) {
			global, ids = append(global, q.global[j]), append(ids, p.ID)
		}
	}
	return global, ids
}

// extentScore is one model's score on one member, computed by
// scoreExtent and recorded by recordExtent.
type extentScore struct {
	sc    report.Score
	ev    *metrics.Evaluator // nil when not scored
	curve report.Curve
}

// scoredCount says for run.log on how many of the members a model was
// scored: "12 extents", or "10 of 12 extents" when some were not (a
// duplicate of another extent, no valid cell, too few test points: the
// Extents table of the report says which and why).
func scoredCount(scores []extentScore) string {
	n := 0
	for _, e := range scores {
		if e.sc.Scored {
			n++
		}
	}
	if n == len(scores) {
		return fmt.Sprintf("%d extent%s", n, report.Plural(n))
	}
	return fmt.Sprintf("%d of %d extent%s", n, len(scores), report.Plural(len(scores)))
}

// scoreExtent scores model on member k from its accumulator acc: nothing
// for an empty or duplicate member, else metrics.Score on the points
// inside, the paired evaluator and the ROC curve. nTest is the number of
// the model's scored test points (for those outside the extent). It only
// reads the study, so several extents may be scored at once.
func (s *Study) scoreExtent(model string, k int, acc *metrics.Accumulator, in pointsIn, nTest int, set metrics.Settings) (extentScore, error) {
	mem := s.fam.Members[k]
	sc := report.Score{Model: model, Extent: mem.ID, PartialROC: []report.PartialROC{}, Thresholds: []report.Threshold{}}
	switch mem.Status {
	case vocab.StatusEmpty:
		sc.NotScored = "extent covers no valid cell"
		return extentScore{sc: sc}, nil
	case vocab.StatusDuplicate:
		sc.NotScored = "same cells as " + mem.DuplicateOf
		return extentScore{sc: sc}, nil
	}
	train, test := in.values(k, vocab.RoleTrain), in.values(k, vocab.RoleTest)
	sc.TestOutside, sc.TrainOutside = nTest-len(test), len(set.ThresholdTrain)-len(train)
	set.Seed = deriveSeed(s.o.Seed, mem.ID)
	// The scores, and the evaluator of the paired comparisons (on the
	// values of the scores' thresholds) from what the scoring computed.
	global, ids := in.testIDs(k)
	out, ev, err := metrics.ScoreEvaluator(acc, train, test, global, set)
	if err != nil {
		return extentScore{}, fmt.Errorf("model %s extent %s: %w", model, mem.ID, err)
	}
	sc.SetScores(out, pass.AreaUnits(s.grid))
	if !sc.Scored {
		return extentScore{sc: sc}, nil
	}
	sc.TestPointIDs = ids
	sc.AUCBootSD, _ = ev.BootSD(s.draws())
	return extentScore{sc: sc, ev: ev, curve: report.NewCurve(model, mem.ID, out.Curve)}, nil
}

// recordExtent records one scoreExtent result: the score, and for a scored
// extent its curve, its paired evaluator and a log line.
func (s *Study) recordExtent(model string, r extentScore) {
	sc := r.sc
	if r.ev != nil {
		if s.evals == nil {
			s.evals = map[[2]string]*metrics.Evaluator{}
		}
		s.evals[[2]string{model, sc.Extent}] = r.ev
		s.res.Curves = append(s.res.Curves, r.curve)
	}
	s.res.Scores = append(s.res.Scores, sc)
	if r.ev != nil {
		s.logf("%s on %s: AUC %.4f  partial ROC(E=%g) %s", report.ModelLabel(s.res, model), sc.Extent, sc.AUC, s.o.E[0], firstRatio(sc))
	}
}

func firstRatio(sc report.Score) string {
	if len(sc.PartialROC) == 0 || !sc.PartialROC[0].Defined {
		return "undefined"
	}
	return fmt.Sprintf("%.4f", sc.PartialROC[0].Ratio)
}

// rings decomposes each nested chain (metrics.DecomposeRing): for
// consecutive members A inside B, the ring R = B minus A is scored against
// the test presences of B; ShareOfChange is each ring's share of the
// chain's change of AUC from its innermost to its outermost member.
func (s *Study) rings(model string, accs []*metrics.Accumulator, presence func(int, vocab.Role) []float64) error {
	// Every ring of every chain at once on the workers, then recorded in
	// chain order.
	type step struct {
		name string
		a, b int
		r    metrics.Ring
		err  error
	}
	var steps []step
	for _, name := range s.fam.ChainNames() {
		chain := s.fam.Chain(name)
		for i := 1; i < len(chain); i++ {
			steps = append(steps, step{name: name, a: chain[i-1], b: chain[i]})
		}
	}
	s.parallel(len(steps), func(i int) {
		st := &steps[i]
		st.r, st.err = metrics.DecomposeRing(accs[st.a], accs[st.b], presence(st.b, vocab.RoleTest))
	})
	for _, name := range s.fam.ChainNames() {
		var rs []report.Ring
		for _, st := range steps {
			if st.name != name {
				continue
			}
			a, b, r := st.a, st.b, st.r
			if st.err != nil {
				return fmt.Errorf("ring %s-%s: %w", s.fam.Members[b].ID, s.fam.Members[a].ID, st.err)
			}
			if r.Defined {
				rs = append(rs, report.NewRing(name, model, s.fam.Members[a].ID, s.fam.Members[b].ID, r, pass.AreaUnits(s.grid)))
			}
		}
		if len(rs) == 0 {
			continue
		}
		total := rs[len(rs)-1].AUCOuter - rs[0].AUCInner
		for i := range rs {
			if total != 0 {
				rs[i].ShareOfChange = (rs[i].AUCOuter - rs[i].AUCInner) / total
			}
		}
		s.res.Rings = append(s.res.Rings, rs...)
	}
	return nil
}

// omissions lists, per threshold metrics tests (metrics.ThresholdRules),
// the test points the model omits (metrics.Omitted). The thresholds come
// from the training presences and fixed values only, so the lists do not
// depend on the extent.
func (s *Study) omissions(model string, mp modelPoints) {
	for _, t := range metrics.ThresholdRules(mp.train, s.o.Thresholds) {
		om := report.Omission{Model: model, Threshold: t.Name, Value: t.Value, Omitted: []int{}}
		for _, i := range metrics.Omitted(t.Value, mp.test) {
			om.Omitted = append(om.Omitted, mp.testIDs[i])
		}
		s.res.Omissions = append(s.res.Omissions, om)
	}
}

// preview packs the pass's coarse copy and the extents' masks
// (report.NewPreview), values scaled over the pass's value range.
func (s *Study) preview(pv *pass.Preview, st pass.Stats) *report.Preview {
	g, fam := s.grid, s.fam
	masks := make([][]bool, len(fam.Members))
	s.parallel(len(fam.Members), func(k int) {
		masks[k] = make([]bool, len(pv.Values))
		for i := range pv.Values {
			masks[k][i] = fam.Has(k, pv.SourceCell(g, i))
		}
	})
	return report.NewPreview(pv.Width, pv.Height, g.Bounds(), pv.Values, st.Min, st.Max, masks)
}

// analyse adds distances between test and training points and the
// sensitivity analysis.
func (s *Study) analyse() error {
	train, _, _ := s.scoredPoints(vocab.RoleTrain)
	if len(train) > 0 {
		lats := make([]float64, len(train))
		lons := make([]float64, len(train))
		for i, p := range train {
			lats[i], lons[i] = p.Lat, p.Lon
		}
		ix, err := geodesy.NewIndex(lats, lons)
		if err != nil {
			return err
		}
		for i := range s.points {
			p := &s.points[i]
			if p.Status == vocab.PointScored && p.Role == vocab.RoleTest {
				_, d := ix.Nearest(s.lonlat[i].Lat, s.lonlat[i].Lon, 0)
				p.NearestTrainKm = math.Round(d) / 1000
			}
		}
	}
	s.res.Points = s.points
	if s.res.Rings == nil {
		s.res.Rings = []report.Ring{}
	}
	if s.res.Omissions == nil {
		s.res.Omissions = []report.Omission{}
	}
	if s.res.Curves == nil {
		s.res.Curves = []report.Curve{}
	}
	if err := s.paired(); err != nil {
		return err
	}
	return report.Analyze(s.res)
}

// deriveSeed gives each extent its own stream for the published
// half-size bootstrap and the area-random draws of a model's own scores,
// fixed by the run seed and the extent's name alone (not by order, core
// count or shard split). The model's name is not part of it: two models
// of identical predictions (a raster and its copy, a model and a null
// written as a raster) get identical draws, so identical p-values and
// intervals; seeded by the name they read "not above random on the one
// extent where it was tested" and "above on 0 of the 2". Nothing claims
// the models' draws independent of one another: the models of a run
// share their test points, the paired resamples (Draws) and, on nearly
// continuous extents, the area-random draws of their number of test
// points already, and each model's p and interval is read on its own.
// Every E of one model shares the stream, as before.
func deriveSeed(seed uint64, ext string) uint64 {
	h := fnv.New64a()
	var b [8]byte
	binary.LittleEndian.PutUint64(b[:], seed)
	h.Write(b[:])
	h.Write([]byte(ext))
	return h.Sum64()
}
