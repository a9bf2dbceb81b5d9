package report

import (
	"errors"
	"fmt"
	"math"
	"strconv"

	"areasweep/extent/vocab"
)

// Analyze computes the sensitivity analysis from r's scores and stores it
// in r.Sensitivity. Deterministic. Unscored scores and extents whose status
// is not "ok" are left out of every statistic and listed instead.
func Analyze(r *Results) error {
	if r == nil {
		return errors.New("report: Analyze: nil results")
	}
	if err := checkFinite(r); err != nil {
		return err
	}
	a := newAnalysis(r)
	s := &Sensitivity{
		Metrics:        a.metrics,
		ModelNames:     a.models,
		SkippedExtents: []SkippedExtent{},
		Unscored:       []UnscoredScore{},
		Spreads:        []Spread{},
		ModelVerdicts:  []ModelVerdict{},
		Verdicts:       []Verdict{},
		Rankings:       []ModelRanking{},
		AboveNull:      []AboveNull{},
		Decompositions: []Decomposition{},
		Chains:         []ChainSummary{},
		Truncation:     []TruncationCheck{},
		OmittedPoints:  []OmittedPoints{},
		Warnings:       append([]string{}, a.warnings...),
	}
	s.ScoredExtents, s.SkippedExtents, s.Unscored = a.extentUse()
	s.BaseExtent = BaseExtent(s.ScoredExtents)
	a.base = s.BaseExtent
	s.TestPoints, s.TestPointsVary = a.testPointCounts(s.ScoredExtents)
	for _, m := range a.metrics {
		for _, model := range a.models {
			s.Spreads = append(s.Spreads, a.spread(m, model))
		}
	}
	for _, m := range a.metrics {
		var mv []ModelVerdict
		for _, model := range a.models {
			mv = append(mv, a.modelVerdict(m, model))
		}
		s.ModelVerdicts = append(s.ModelVerdicts, mv...)
		s.Verdicts = append(s.Verdicts, verdictFor(m, mv))
	}
	if len(a.models) >= 2 {
		for _, m := range a.metrics {
			s.Rankings = append(s.Rankings, a.rankings(m)...)
			s.Decompositions = append(s.Decompositions, a.decompose(m))
		}
	}
	s.AboveNull = a.aboveNull(s.ScoredExtents)
	chains, w := a.chains()
	s.Chains = chains
	s.Warnings = append(s.Warnings, w...)
	s.Truncation = a.truncation()
	s.Independence = a.independence()
	if s.Independence.Warn {
		s.Warnings = append(s.Warnings, s.Independence.Sentence)
	}
	for _, t := range s.Truncation {
		if t.Flag {
			s.Warnings = append(s.Warnings, t.Sentence)
		}
	}
	s.OmittedPoints = a.omitted()
	s.Headline = headline(a, s)
	r.Sensitivity = s
	return nil
}

// analysis holds the indexes Analyze works from.
type analysis struct {
	r        *Results
	models   []string
	metrics  []MetricInfo
	extents  []Extent // status "ok", family order
	extIndex map[string]int
	scores   map[[2]string]*Score // (model, extent) -> first score
	paired   map[pairedKey]int    // -> index of the first such record in r.Paired
	warnings []string
	base     string // Sensitivity.BaseExtent
}

func newAnalysis(r *Results) *analysis {
	a := &analysis{r: r, extIndex: map[string]int{}, scores: map[[2]string]*Score{}}
	seenModel := map[string]bool{}
	// Nulls are references, not models: they never enter the analysis.
	for _, m := range r.Models {
		if m.IsNull() {
			seenModel[m.Name] = true
		}
	}
	for _, m := range r.Models {
		if !seenModel[m.Name] {
			seenModel[m.Name] = true
			a.models = append(a.models, m.Name)
		}
	}
	allExt := map[string]bool{}
	for i, e := range r.Extents {
		allExt[e.ID] = true
		if e.Status == vocab.StatusOK {
			a.extIndex[e.ID] = i
			a.extents = append(a.extents, e)
		}
	}
	for i := range r.Scores {
		sc := &r.Scores[i]
		if isNull(r, sc.Model) {
			continue
		}
		if !allExt[sc.Extent] {
			a.warnings = append(a.warnings, fmt.Sprintf("score of model %s names extent %q, which is not in the extent family: ignored", sc.Model, sc.Extent))
			continue
		}
		if !seenModel[sc.Model] {
			seenModel[sc.Model] = true
			a.models = append(a.models, sc.Model)
		}
		k := [2]string{sc.Model, sc.Extent}
		if _, dup := a.scores[k]; dup {
			a.warnings = append(a.warnings, fmt.Sprintf("model %s has two scores on extent %s: the first is used", sc.Model, sc.Extent))
			continue
		}
		a.scores[k] = sc
	}
	a.metrics = buildMetrics(r)
	// pairedFor is asked once per metric, model and extent pair: an
	// index, not a scan of r.Paired each time (quadratic in the records,
	// most of a large run's re-render).
	a.paired = make(map[pairedKey]int, len(r.Paired))
	for i := range r.Paired {
		p := &r.Paired[i]
		k := pairedKey{p.Metric, p.Kind, p.Model, p.Extent, p.OtherModel, p.OtherExtent}
		if _, dup := a.paired[k]; !dup {
			a.paired[k] = i
		}
	}
	return a
}

// pairedKey is what pairedFor looks a Paired record up by.
type pairedKey struct {
	metric                         string
	kind                           PairKind
	model, ext, other, otherExtent string
}

// score returns the usable score of model on extent (ok extent, scored).
func (a *analysis) score(model, extent string) *Score {
	if _, ok := a.extIndex[extent]; !ok {
		return nil
	}
	sc := a.scores[[2]string{model, extent}]
	if sc == nil || !sc.Scored {
		return nil
	}
	return sc
}

func (a *analysis) extentUse() ([]string, []SkippedExtent, []UnscoredScore) {
	scored := []string{}
	skipped := []SkippedExtent{}
	uns := []UnscoredScore{}
	for _, e := range a.r.Extents {
		switch e.Status {
		case vocab.StatusOK:
		case vocab.StatusEmpty:
			skipped = append(skipped, SkippedExtent{ID: e.ID, Status: e.Status, Reason: "the extent has no valid cells"})
			continue
		case vocab.StatusDuplicate:
			skipped = append(skipped, SkippedExtent{ID: e.ID, Status: e.Status, DuplicateOf: e.DuplicateOf, Reason: "same cells as " + e.DuplicateOf})
			continue
		default:
			skipped = append(skipped, SkippedExtent{ID: e.ID, Status: e.Status, Reason: "status " + strconv.Quote(string(e.Status))})
			continue
		}
		any := false
		for _, m := range a.models {
			if a.score(m, e.ID) != nil {
				any = true
			} else {
				reason := "no score"
				if sc := a.scores[[2]string{m, e.ID}]; sc != nil && sc.NotScored != "" {
					reason = sc.NotScored
				}
				uns = append(uns, UnscoredScore{Model: m, Extent: e.ID, Reason: reason})
			}
		}
		if any {
			scored = append(scored, e.ID)
		} else {
			skipped = append(skipped, SkippedExtent{ID: e.ID, Status: e.Status, Reason: "no model could be scored"})
		}
	}
	return scored, skipped, uns
}

// checkFinite rejects NaN and Inf in the numbers the analysis reads.
func checkFinite(r *Results) error {
	bad := func(v float64) bool { return math.IsNaN(v) || math.IsInf(v, 0) }
	for _, e := range r.Extents {
		if bad(e.AreaKm2) {
			return fmt.Errorf("report: extent %s: area_km2 is not finite", e.ID)
		}
	}
	for _, m := range r.Models {
		if bad(m.FloorShare) || bad(m.ValueMin) || bad(m.ValueMax) {
			return fmt.Errorf("report: model %s: value range or floor share is not finite", m.Name)
		}
	}
	for _, s := range r.Scores {
		where := fmt.Sprintf("report: score %s on %s", s.Model, s.Extent)
		if bad(s.AUC) || bad(s.AUCUnweighted) || bad(s.AUCTrain) || bad(s.AUCBootSD) || bad(s.AUCSE) || bad(s.AUCUnweightedSEDeLong) || bad(s.AreaKm2) {
			return fmt.Errorf("%s: an AUC field is not finite", where)
		}
		for _, v := range append(append([]float64{}, s.Placements...), s.PlacementsUnweighted...) {
			if bad(v) {
				return fmt.Errorf("%s: a placement is not finite", where)
			}
		}
		for _, p := range s.PartialROC {
			if bad(p.E) || bad(p.Ratio) || bad(p.RatioMean) || bad(p.RatioSD) || bad(p.CILow) || bad(p.CIHigh) || bad(p.PValue) ||
				bad(p.XE) || bad(p.DiscreteXE) || bad(p.DiscreteRatio) {
				return fmt.Errorf("%s: partial ROC at E=%g is not finite", where, p.E)
			}
		}
		for _, t := range s.Thresholds {
			if bad(t.Value) || bad(t.Omission) || bad(t.AreaFraction) || bad(t.PBinomial) {
				return fmt.Errorf("%s: threshold %s is not finite", where, t.Name)
			}
		}
		if s.Boyce != nil && bad(s.Boyce.Index) {
			return fmt.Errorf("%s: Boyce index is not finite", where)
		}
	}
	for _, p := range r.Paired {
		se, lo, hi, _ := p.Interval()
		if bad(p.A) || bad(p.B) || bad(p.Diff) || bad(se) || bad(lo) || bad(hi) || bad(p.TestSetShift) {
			return fmt.Errorf("report: paired %s of %s/%s against %s/%s is not finite", p.Metric, p.Model, p.Extent, p.OtherModel, p.OtherExtent)
		}
	}
	for _, g := range r.Rings {
		if bad(g.AUCInner) || bad(g.AUCRing) || bad(g.AUCOuter) || bad(g.InnerAreaKm2) || bad(g.RingAreaKm2) {
			return fmt.Errorf("report: ring %s-%s of model %s is not finite", g.Inner, g.Outer, g.Model)
		}
	}
	for _, c := range r.Curves {
		for i := range c.X {
			if bad(c.X[i]) || (i < len(c.Y) && bad(c.Y[i])) {
				return fmt.Errorf("report: ROC curve of model %s on %s is not finite", c.Model, c.Extent)
			}
		}
	}
	for _, p := range r.Points {
		if bad(p.NearestTrainKm) || bad(p.Lat) || bad(p.Lon) {
			return fmt.Errorf("report: point %d: coordinates or distance not finite", p.ID)
		}
	}
	return nil
}

// isNull reports whether the model named name is a null.
func isNull(r *Results, name string) bool {
	for _, m := range r.Models {
		if m.Name == name {
			return m.IsNull()
		}
	}
	return false
}
