package report

import (
	"fmt"
	"math"
	"slices"
	"strings"

	"areasweep/extent/vocab"
)

// findSpread returns the spread of metric key for model, or nil.
func (s *Sensitivity) findSpread(key, model string) *Spread {
	for i := range s.Spreads {
		if s.Spreads[i].Metric == key && s.Spreads[i].Model == model {
			return &s.Spreads[i]
		}
	}
	return nil
}

// findDecomposition returns the decomposition of metric key, or nil.
func (s *Sensitivity) findDecomposition(key string) *Decomposition {
	for i := range s.Decompositions {
		if s.Decompositions[i].Metric == key {
			return &s.Decompositions[i]
		}
	}
	return nil
}

// areaRange formats "from A to B km²", in thousands when B >= 10,000 and
// in millions when B >= 10 million,
// each area rounded to three significant digits as fmtArea rounds it, so
// that an area reads the same here and in the extent lists and tables
// (3,251,635 km² is "3,250 thousand" here and "3,250,000" there).
func areaRange(lo, hi float64) string {
	if hi >= 1e7 {
		// Global extents: "from 117 to 128 million km²", not "from
		// 117,000 to 128,000 thousand km²".
		millions := func(v float64) string { return trimFloat(roundSig(v, 3)/1e6, 3) }
		return fmt.Sprintf("from %s to %s million km²", millions(lo), millions(hi))
	}
	if hi >= 1e4 {
		thousands := func(v float64) string {
			t := roundSig(v, 3) / 1000
			if t >= 1000 {
				return groupThousands(int64(math.Round(t)))
			}
			return trimFloat(t, 3)
		}
		return fmt.Sprintf("from %s to %s thousand km²", thousands(lo), thousands(hi))
	}
	return fmt.Sprintf("from %s to %s km²", fmtArea(lo), fmtArea(hi))
}

// roundSig rounds v to sig significant digits.
func roundSig(v float64, sig int) float64 {
	if v == 0 || math.IsNaN(v) || math.IsInf(v, 0) {
		return v
	}
	mag := math.Pow(10, math.Floor(math.Log10(math.Abs(v)))-float64(sig-1))
	return math.Round(v/mag) * mag
}

// findModelVerdict returns the verdict of metric key for model, or nil.
func (s *Sensitivity) findModelVerdict(key, model string) *ModelVerdict {
	for i := range s.ModelVerdicts {
		if s.ModelVerdicts[i].Metric == key && s.ModelVerdicts[i].Model == model {
			return &s.ModelVerdicts[i]
		}
	}
	return nil
}

// verdictPhrase is "extent-sensitive (largest +0.078 on X, 95% interval
// ...)" for a model verdict.
func verdictPhrase(mv *ModelVerdict) string {
	if mv.Largest < 0 {
		// With no difference formed, a verdict word misleads: a score
		// that is described, never judged, "was undetermined", and one
		// with no second extent was "undetermined" for want of anything
		// to compare (sentence audit of 2026-12-05).
		word := string(mv.Verdict)
		switch {
		case NotCalibrated(mv.Metric, PairedKindExtent):
			word = "not described"
		case len(mv.Diffs) == 0 && mv.baseScored:
			word = "not compared across extents"
		}
		switch {
		case len(mv.Diffs) == 0 && !mv.BaseDefined && mv.baseScored:
			// Scored there, but this metric is undefined on it.
			return word + " (undefined on " + mv.Base + ", its only scored extent)"
		case len(mv.Diffs) == 0 && !mv.BaseDefined:
			return word + " (not scored on " + mv.Base + ")"
		case len(mv.Diffs) == 0:
			return word + " (scored on " + mv.Base + " only)"
		case !mv.BaseDefined:
			return word + " (undefined on " + mv.Base + ")"
		}
		if n, ok := mv.fewCommon(); ok {
			return fmt.Sprintf("%s (no difference could be formed: %s shares at most %d test point%s with any other extent)", mv.Verdict, mv.Base, n, Plural(n))
		}
		return string(mv.Verdict) + " (no difference could be formed)"
	}
	d := mv.Diffs[mv.Largest]
	tol := mv.Tolerance
	if NotCalibrated(mv.Metric, PairedKindExtent) {
		// Described, not judged (the Boyce index, a partial ROC ratio):
		// how many differences lie beyond the tolerance, and the largest.
		defined, beyond := beyondCount(mv, tol)
		kind := MetricBoyce
		if isPartialROCKey(mv.Metric) {
			kind = MetricPartialROC
		}
		return fmt.Sprintf("described, not judged (%d of %d difference%s from %s beyond ±%s, the largest %s on %s; %s)", beyond, defined, Plural(defined), mv.Base, fmtG(tol),
			signedSmall(d.Diff), d.Extent, notCalibratedCoverage(MetricInfo{Key: mv.Metric, Kind: kind}))
	}
	if d.Method == "exact" {
		return fmt.Sprintf("%s (largest difference from %s %s on %s)", mv.Verdict, mv.Base, signedSmall(d.Diff, tol, -tol), d.Extent)
	}
	if d.notJudged() {
		// A description: no interval is quoted for a difference not judged.
		return fmt.Sprintf("%s (largest difference from %s %s on %s, not judged, %s)", mv.Verdict, mv.Base, signedSmall(d.Diff), d.Extent, d.why())
	}
	if mv.Verdict == JudgementRobust && d.Diff == 0 {
		// The largest difference is 0, so every one is: naming one
		// extent as "the largest" would pick it arbitrarily (as judge
		// says "every one is 0").
		return fmt.Sprintf("%s (every difference from %s is 0)", mv.Verdict, mv.Base)
	}
	if k := largestDefined(mv.Diffs); k >= 0 && mv.Diffs[k].notJudged() && math.Abs(mv.Diffs[k].Diff) > math.Abs(d.Diff) {
		// The verdict rests on the judged differences, but a larger one
		// on too few test points exists: "largest difference" alone would
		// misstate it (the reply's range reaches that extent).
		big := mv.Diffs[k]
		lo, hi, _ := d.Interval()
		return fmt.Sprintf("%s (largest judged difference from %s %s on %s, 95%% interval %s to %s; a larger one, %s on %s, is not judged, %s)", mv.Verdict, mv.Base, signedSmall(d.Diff), d.Extent,
			signedSmall(lo, tol, -tol), signedSmall(hi, tol, -tol), signedSmall(big.Diff), big.Extent, big.why())
	}
	lo, hi, _ := d.Interval() // judged: it has one
	return fmt.Sprintf("%s (largest difference from %s %s on %s, 95%% interval %s to %s%s)", mv.Verdict, mv.Base, signedSmall(d.Diff), d.Extent,
		signedSmall(lo, tol, -tol), signedSmall(hi, tol, -tol), undeterminedWhy(mv, d))
}

// largestDefined is the index in ds of the defined difference of largest
// |Diff|, judged or not, or -1 when none is defined.
func largestDefined(ds []ExtentDifference) int {
	k := -1
	for i, d := range ds {
		if d.Defined && (k < 0 || math.Abs(d.Diff) > math.Abs(ds[k].Diff)) {
			k = i
		}
	}
	return k
}

// undeterminedWhy says, after the largest difference d of an undetermined
// verdict mv, what leaves it undetermined when d's own interval lies
// within the tolerance (quoted alone, that interval reads as "robust"):
// an interval on another extent that straddles it, an extent where no
// difference could be formed, or differences not judged. "" otherwise.
func undeterminedWhy(mv *ModelVerdict, d ExtentDifference) string {
	if mv.Verdict != JudgementUndetermined || d.Position != "inside" {
		return ""
	}
	if s := straddleText(mv.Diffs, d, mv.Tolerance); s != "" {
		return s
	}
	if len(mv.Undefined) > 0 {
		return "; no difference could be formed on " + joinList(mv.Undefined)
	}
	if p, r := notJudgedCounts(mv.Diffs); p+r > 0 {
		return fmt.Sprintf("; not judged on %d extent%s: %s", p+r, Plural(p+r), notJudgedWhy(mv.Diffs))
	}
	return ""
}

// maxHeadlinePairs is the most pairs (of two models, or of a model and a
// null) the headline names one by one (our choice: four models, or six
// models against one null); past it, it counts them and the Analysis
// names each. Eight models and three nulls made a headline of 28
// comparisons and 24 null clauses, some 3,000 words above the figures.
const maxHeadlinePairs = 6

// rankingCounts counts, for the headline, the AUC model comparisons rks by
// how many of their extents differ beyond noise: every one compared,
// some, none.
func rankingCounts(rks []ModelRanking) string {
	var every, some, none int
	for _, rk := range rks {
		switch d := rk.Better + rk.Worse; {
		case d == 0:
			none++
		case d == rk.Extents:
			every++
		default:
			some++
		}
	}
	verb := map[bool]string{true: "differs", false: "differ"}[every == 1]
	return fmt.Sprintf("of the %d pairs of models, %d %s beyond noise on every extent compared, %d on some and %d on none (each pair under Analysis, Models compared extent by extent)",
		len(rks), every, verb, some, none)
}

// rankingClause says one AUC model comparison in the headline, the model
// that is better beyond noise on more extents first: "A is better than B
// beyond noise on 13 of 13 extents", with "and worse on k" when the other
// way round holds somewhere, or "A and B differ beyond noise on none of
// n extents".
func rankingClause(rk ModelRanking) string {
	lead := rk.leaderFirst()
	a, b, better, worse := lead.Model, lead.Other, lead.Better, lead.Worse
	n := rk.Extents
	if rk.identical() {
		return fmt.Sprintf("%s and %s score the same on %s", rk.Model, rk.Other, allExtents(n))
	}
	if better == 0 {
		return fmt.Sprintf("%s and %s %s", a, b, differOnNone(n, rk.extentsWord()))
	}
	out := fmt.Sprintf("%s is better than %s beyond noise on %d of %d %s", a, b, better, n, rk.extentsWord())
	if worse > 0 {
		out += fmt.Sprintf(" and worse on %d", worse)
	}
	return out
}

// unlikeCells returns the extents where models m and o are both scored
// but on different numbers of cells: one has no data where the other has
// (a model masked to part of the grid), so their AUCs rest on different
// backgrounds and test points, and their paired differences compare
// unlike with unlike, as the run's warning says.
func unlikeCells(r *Results, m, o string) []string {
	cells := map[string]int64{}
	for _, sc := range r.Scores {
		if sc.Model == m && sc.Scored {
			cells[sc.Extent] = sc.Cells
		}
	}
	var out []string
	for _, sc := range r.Scores {
		if c, ok := cells[sc.Extent]; ok && sc.Model == o && sc.Scored && sc.Cells != c {
			out = append(out, sc.Extent)
		}
	}
	return out
}

// unlikeCellsWords is the caution a comparison of models m and o takes
// where they are scored on different cells (unlikeCells), or "".
func unlikeCellsWords(r *Results, m, o string) string {
	ex := unlikeCells(r, m, o)
	if len(ex) == 0 {
		return ""
	}
	return fmt.Sprintf(" (on %d of them the two are scored on different cells, one having no data where the other has: not like with like)", len(ex))
}

// differOnNone says that two models differ beyond noise on none of the n
// extents counted, word naming them after the count ("extents",
// "extents compared"): "differ beyond noise on none of 9 extents", "on
// neither of the 2 extents", and "do not differ beyond noise on the 1
// extent" ("differ beyond noise on none of 1 extent" was written).
func differOnNone(n int, word string) string {
	switch n {
	case 1:
		return "do not differ beyond noise on the 1 " + word
	case 2:
		return "differ beyond noise on neither of the 2 " + word
	}
	return fmt.Sprintf("differ beyond noise on none of %d %s", n, word)
}

// extentsWord is "extents" (or "extent" for one) after the count of
// extents rk compared, with " compared" when some extents both models
// are scored on were left out of the count (on too few common test
// points, say): "on 3 of 9 extents" beside "Across 10 evaluation extents"
// reads as a miscount.
func (rk ModelRanking) extentsWord() string {
	w := "extent" + Plural(rk.Extents)
	if len(rk.Diffs) > rk.Extents {
		w += " compared"
	}
	return w
}

// leaderFirst returns rk with its two models and their counts swapped
// when the second is better beyond noise on more extents, so that a
// sentence leads with the model ahead ("b is better than a on 11 of 11
// extents", not "a is better than b on 0 of 11, worse on 11"). For the
// words only: Diffs keep their sign (Model minus Other of rk).
func (rk ModelRanking) leaderFirst() ModelRanking {
	if rk.Worse > rk.Better {
		rk.Model, rk.Other, rk.Better, rk.Worse = rk.Other, rk.Model, rk.Worse, rk.Better
	}
	return rk
}

// verdictsByJudgement says the verdicts of mvs grouped by judgement, in
// the order the judgements first appear: "extent-sensitive for a and b
// and undetermined for c".
func verdictsByJudgement(mvs []ModelVerdict) string {
	var order []Judgement
	models := map[Judgement][]string{}
	for _, mv := range mvs {
		if _, ok := models[mv.Verdict]; !ok {
			order = append(order, mv.Verdict)
		}
		models[mv.Verdict] = append(models[mv.Verdict], mv.Model)
	}
	var parts []string
	several := false
	for _, j := range order {
		parts = append(parts, fmt.Sprintf("%s for %s", j, joinList(models[j])))
		several = several || len(models[j]) > 1
	}
	if several && len(parts) > 1 {
		return strings.Join(parts, "; ")
	}
	return joinList(parts)
}

// testPointText says how many test points the extents hold.
func testPointText(s *Sensitivity) string {
	if len(s.TestPoints) == 0 {
		return ""
	}
	lo, hi := s.TestPoints[0], s.TestPoints[0]
	for _, n := range s.TestPoints {
		lo, hi = min(lo, n), max(hi, n)
	}
	if !s.TestPointsVary {
		return fmt.Sprintf("%d test point%s on each", lo, Plural(lo))
	}
	return fmt.Sprintf("%d to %d test points per extent", lo, hi)
}

// fewerPointsText says, for each model scored on fewer test points than
// an extent holds on some scored extent (it has no value at the others'
// cells), how many it scores: "; patchy scores 61 to 70 of them, having
// no value at the others". Without it the headline's count read as every
// model's (helper audit of 2026-12-05). "" when every model scores every
// test point of every scored extent.
func fewerPointsText(a *analysis, s *Sensitivity) string {
	var parts []string
	for _, m := range a.models {
		lo, hi, fewer := -1, -1, false
		for _, id := range s.ScoredExtents {
			sc := a.score(m, id)
			i, ok := a.extIndex[id]
			if sc == nil || !sc.Scored || !ok {
				continue
			}
			n := sc.TestPoints
			if n < a.r.Extents[i].TestPoints {
				fewer = true
			}
			if lo < 0 {
				lo, hi = n, n
			}
			lo, hi = min(lo, n), max(hi, n)
		}
		if !fewer {
			continue
		}
		if lo == hi {
			parts = append(parts, fmt.Sprintf("%s scores %d of them", m, lo))
		} else {
			parts = append(parts, fmt.Sprintf("%s scores %d to %d of them", m, lo, hi))
		}
	}
	if len(parts) == 0 {
		return ""
	}
	return "; " + joinList(parts) + ", having no value at the others"
}

// scoredNowhere lists the models scored on none of the scored extents
// (a constant model, for one): they have no verdict to give, only
// "undetermined" for want of any score.
func (s *Sensitivity) scoredNowhere() []string {
	if len(s.ScoredExtents) == 0 {
		return nil
	}
	n := map[string]int{}
	for _, u := range s.Unscored {
		if slices.Contains(s.ScoredExtents, u.Extent) {
			n[u.Model]++
		}
	}
	var out []string
	for _, m := range s.ModelNames {
		if n[m] == len(s.ScoredExtents) {
			out = append(out, m)
		}
	}
	return out
}

// headline writes the two or three summary sentences: the verdicts only,
// never the sums-of-squares split (a property of the chosen family).
func headline(a *analysis, s *Sensitivity) string {
	if len(s.ScoredExtents) == 0 {
		// "No model", not "no extent": a null may be scored on every
		// extent while no model is (a constant model alone).
		return "No model could be scored on any extent, so the scores cannot be compared across extents."
	}
	lo, hi := scoredAreaRange(a, s)
	var b strings.Builder
	if len(s.ScoredExtents) == 1 {
		oneExtentHeadline(&b, a, s, lo)
	} else if !manyExtentsHeadline(&b, a, s, lo, hi) {
		return b.String()
	}
	var ranks []string
	var aucRanks []ModelRanking
	for _, r := range s.Rankings {
		if r.Metric == "auc" && r.Extents > 0 {
			ranks = append(ranks, rankingClause(r)+unlikeCellsWords(a.r, r.Model, r.Other))
			aucRanks = append(aucRanks, r)
		}
	}
	switch {
	case len(ranks) > maxHeadlinePairs:
		fmt.Fprintf(&b, " By AUC, %s.", rankingCounts(aucRanks))
	case len(ranks) > 0:
		fmt.Fprintf(&b, " By AUC, %s.", strings.Join(ranks, "; "))
	}
	b.WriteString(aboveNullHeadline(s))
	if s.Independence.Warn {
		// Optimistic rather than "inflated" (a lower omission is the
		// optimistic side), and only where test points enter: the
		// predicted area does not use them.
		fmt.Fprintf(&b, " %s of test points lie within %g cells of a training point, so every score computed from the test points is likely optimistic.", pctVs(s.Independence.NearShare, NearShareWarn), NearCells)
	}
	return b.String()
}

// scoredAreaRange returns the smallest and largest area (km²) of the
// scored extents.
func scoredAreaRange(a *analysis, s *Sensitivity) (lo, hi float64) {
	lo, hi = math.Inf(1), math.Inf(-1)
	for _, e := range a.extents {
		for _, id := range s.ScoredExtents {
			if id == e.ID {
				lo, hi = math.Min(lo, e.AreaKm2), math.Max(hi, e.AreaKm2)
			}
		}
	}
	return lo, hi
}

// oneExtentHeadline writes the headline of a study with one scored
// extent (of area lo): there is nothing to compare it with, so no verdict.
func oneExtentHeadline(b *strings.Builder, a *analysis, s *Sensitivity, lo float64) {
	// Why the others are not scored, briefly: "could be scored" read as
	// a failure where the others duplicate it (sentence audit of
	// 2026-12-05).
	others := ""
	if k := len(s.SkippedExtents); k > 0 {
		// Grouped by reason, up to three names each.
		var order []string
		ids := map[string][]string{}
		for _, x := range s.SkippedExtents {
			why := x.Reason
			if x.DuplicateOf != "" {
				why = "the same cells as " + x.DuplicateOf
			}
			if _, ok := ids[why]; !ok {
				order = append(order, why)
			}
			ids[why] = append(ids[why], x.ID)
		}
		var parts []string
		for _, why := range order {
			named := ids[why]
			if len(named) > 3 {
				named = append(slices.Clone(named[:3]), fmt.Sprintf("%d more", len(ids[why])-3))
			}
			parts = append(parts, joinList(named)+": "+why)
		}
		other := "the other extent"
		if k > 1 {
			other = fmt.Sprintf("the other %d extents", k)
		}
		others = fmt.Sprintf(" (%s: %s)", other, strings.Join(parts, "; "))
	}
	fmt.Fprintf(b, "Only one evaluation extent, %s (%s km², %s), could be scored%s, so no score can be compared across extents", s.ScoredExtents[0],
		fmtArea(lo), strings.TrimSuffix(testPointText(s), " on each")+fewerPointsText(a, s), others)
	var parts []string
	for _, m := range a.models {
		if sp := s.findSpread("auc", m); sp != nil && sp.N > 0 {
			parts = append(parts, fmt.Sprintf("%s %s", m, f3(sp.Min)))
		}
	}
	if len(parts) > 0 {
		fmt.Fprintf(b, "; AUC there: %s", strings.Join(parts, ", "))
	}
	// A model scored nowhere (a constant raster) is named, not dropped.
	for _, m := range s.scoredNowhere() {
		for _, u := range s.Unscored {
			if u.Model == m && u.Extent == s.ScoredExtents[0] {
				fmt.Fprintf(b, "; %s is not scored: %s", m, u.Reason)
				break
			}
		}
	}
	b.WriteString(".")
}

// belowRandom lists the extents of sp (an AUC spread) on which the
// model's AUC is below 0.5, the AUC of a random ranking, beyond noise: the
// 95% interval from the test points' placements (aucInterval) lies wholly
// below 0.5. An extent with fewer than MinPairedPoints test points has no
// interval and is not read (our cut-off, as for a paired difference).
func belowRandom(r *Results, sp *Spread) []string {
	var out []string
	for _, id := range sp.Extents {
		sc := findScore(r, sp.Model, id)
		if sc == nil {
			continue
		}
		if _, hi, ok := aucInterval(sc.AUC, sc.AUCSE, sc.TestPoints); ok && hi < 0.5 {
			out = append(out, id)
		}
	}
	return out
}

// chanceBand bounds how far above 0.5 the lowest AUC of a model may lie
// for the headline to say it is within noise of 0.5 everywhere (with its
// intervals), so that a model of AUC 0.75 on 8 test points, whose wide
// intervals take in 0.5, is not called chance-like: our choice.
const chanceBand = 0.05

// nearRandom counts the extents of sp (an AUC spread) whose 95% interval
// from the test points' placements (aucInterval) holds 0.5.
func nearRandom(r *Results, sp *Spread) int {
	n := 0
	for _, id := range sp.Extents {
		sc := findScore(r, sp.Model, id)
		if sc == nil {
			continue
		}
		if lo, hi, ok := aucInterval(sc.AUC, sc.AUCSE, sc.TestPoints); ok && lo <= 0.5 && hi >= 0.5 {
			n++
		}
	}
	return n
}

// beyondNoiseOf says on how many of n extents k are beyond noise:
// ", beyond noise on each", ", beyond noise on 12 of them", ", beyond
// noise on none".
func beyondNoiseOf(k, n int) string {
	switch {
	case k == n && n > 1:
		return ", beyond noise on each"
	case k == n:
		return ", beyond noise"
	case k == 0:
		return ", beyond noise on none"
	}
	return fmt.Sprintf(", beyond noise on %d of them", k)
}

// belowRandomClause says on which extents of sp the AUC is below 0.5
// beyond noise (belowRandom), "" when on none; the caller puts it in
// brackets. A model worse than random
// on some extents only (a model that rates the far background above the
// presences) read "ranged 0.273–0.831" with nothing to say that on the
// largest extents it ranks the background above the test points.
func belowRandomClause(r *Results, sp *Spread) string {
	below := belowRandom(r, sp)
	if len(below) == 0 {
		return ""
	}
	on := fmt.Sprintf("%d of the %d extents", len(below), sp.N)
	switch {
	case len(below) == sp.N && sp.N > 1:
		// "6 of the 6 extents" was written for a model below random on
		// every extent.
		on = allOfNoun(sp.N, "extent")
	case len(below) <= 3:
		on = joinList(below)
	}
	return fmt.Sprintf("below 0.5, the AUC of a random ranking, beyond noise on %s, its 95%% interval from the test points wholly below 0.5", on)
}

// manyExtentsHeadline writes the headline's sentences on the models'
// AUC across the scored extents (areas lo to hi) and the partial ROC
// ratio's verdicts; false when no model has an AUC (the headline ends
// there).
func manyExtentsHeadline(b *strings.Builder, a *analysis, s *Sensitivity, lo, hi float64) bool {
	fmt.Fprintf(b, "Across %d evaluation extents %s (%s%s), ", len(s.ScoredExtents), areaRange(lo, hi), testPointText(s), fewerPointsText(a, s))
	var parts []string
	against := ""
	for _, m := range a.models {
		sp := s.findSpread("auc", m)
		mv := s.findModelVerdict("auc", m)
		if sp == nil || sp.N == 0 || mv == nil {
			continue
		}
		against = toleranceText(MetricInfo{Kind: MetricAUC, Tolerance: mv.Tolerance})
		rng := fmt.Sprintf("ranged %s–%s", f3(sp.Min), f3(sp.Max))
		if sp.Max < 0.5 {
			// Worse than a random ranking everywhere (point estimates):
			// the range alone leaves the reader to notice it. How often
			// beyond noise too, as the methods say it (the headline's
			// "on every extent" stood beside the methods' "beyond noise
			// on 12 of the 13": sentence audit of 2026-12-05).
			rng += " (below 0.5, the AUC of a random ranking, on every extent" + beyondNoiseOf(len(belowRandom(a.r, sp)), sp.N) + ")"
		}
		if c := belowRandomClause(a.r, sp); c != "" && sp.Max >= 0.5 {
			rng += " (" + c + ")"
		}
		if n := nearRandom(a.r, sp); n > 0 && n == sp.N && sp.Max >= 0.5 && sp.Min <= 0.5+chanceBand {
			// A model no better than chance was read as any other
			// ("ranged 0.503–0.509 and is robust").
			rng += " (within noise of 0.5, the AUC of a random ranking, on " + pick(n == 1, "its one extent", "every extent") + ")"
		}
		if f3(sp.Min) == f3(sp.Max) {
			// "ranged 1.000–1.000" names a range the numbers do not have.
			below := ""
			if sp.Max < 0.5 {
				below = "; below 0.5, the AUC of a random ranking"
			}
			rng = fmt.Sprintf("was %s on %s (to three decimals%s)", f3(sp.Min), allOfNoun(sp.N, "extent"), below)
		}
		if mv.Verdict == JudgementRobust && sp.Max-sp.Min > mv.Tolerance {
			// A range wider than the tolerance beside "robust" reads as a
			// contradiction: the range compares extents on the test points
			// each holds, the verdict each one's paired difference from the
			// reference on the points both hold.
			rng += fmt.Sprintf(" (wider than the tolerance: the verdict rests on each extent's paired difference from %s, not on this spread)", s.BaseExtent)
		}
		parts = append(parts, fmt.Sprintf("AUC of %s %s and is %s", m, rng, verdictPhrase(mv)))
	}
	if len(parts) == 0 {
		b.WriteString("no model has an AUC.")
		return false
	}
	b.WriteString(strings.Join(parts, "; "))
	fmt.Fprintf(b, ", against %s.", against)
	if s.BaseExtent != vocab.BaseID {
		// The verdicts' differences are taken from another extent:
		// say so here, where a reader may stop.
		fmt.Fprintf(b, " Differences are taken from %s.", referenceText(s, "%s"))
	}
	nowhere := s.scoredNowhere()
	if len(nowhere) > 0 {
		fmt.Fprintf(b, " Model%s %s %s not scored on any extent (Scores table).", Plural(len(nowhere)), joinList(nowhere), map[bool]string{true: "is", false: "are"}[len(nowhere) == 1])
	}
	b.WriteString(partialROCHeadline(a, s, nowhere))
	return true
}

// partialROCHeadline returns the headline's sentence on the partial ROC
// ratio at the first E, the models scored nowhere left out: its
// description (partialROCDescribed), or its verdicts where no model has a
// difference to describe; "" when there is none.
func partialROCHeadline(a *analysis, s *Sensitivity, nowhere []string) string {
	if len(a.r.Settings.E) == 0 || len(a.models) == 0 {
		return ""
	}
	key := MetricKeyPartialROC(a.r.Settings.E[0])
	var mvs []ModelVerdict
	for _, m := range a.models {
		if slices.Contains(nowhere, m) {
			continue
		}
		if mv := s.findModelVerdict(key, m); mv != nil {
			mvs = append(mvs, *mv)
		}
	}
	pr := verdictsByJudgement(mvs)
	if pr == "" {
		return ""
	}
	// Between extents the partial ROC ratio is described, not judged
	// (partialROCExtentCoverage); with no difference to describe, the
	// verdicts say why (undefined, or scored on the base extent only).
	if d := partialROCDescribed(a, mvs, key); d != "" {
		return d
	}
	return fmt.Sprintf(" The partial ROC ratio at E = %s is %s.", fmtG(a.r.Settings.E[0]), pr)
}

// partialROCDescribed is the headline's sentence on the partial ROC ratio
// (key, the first E) of the models of mvs: described, not judged
// (partialROCExtentCoverage), by how many differences from the base
// extent lie beyond the tolerance and the largest, per model, naming
// apart the models undefined on the base extent and those with no
// difference for another reason; when no model has a difference, why
// (undefined on the base extent: "is undetermined for coarse" said
// nothing of it); "" when mvs is empty.
func partialROCDescribed(a *analysis, mvs []ModelVerdict, key string) string {
	parts, undefined, none := describedModels(a.base, mvs)
	e := fmtG(a.r.Settings.E[0])
	if len(parts) == 0 {
		if w := noDifferenceWords(a.base, undefined, none); w != "" {
			return fmt.Sprintf(" The partial ROC ratio at E = %s %s.", e, w)
		}
		return ""
	}
	return fmt.Sprintf(" The partial ROC ratio at E = %s is described, not judged, across extents (%s): %s%s.",
		e, notCalibratedCoverage(MetricInfo{Key: key, Kind: MetricPartialROC}), joinList(parts), apartWords(a.base, undefined, none))
}

// apartWords names, after the description of the models with a
// difference, those undefined on base and those with no difference for
// another reason: "; it is undefined on base for coarse, so no difference
// from it is formed; no difference from base could be formed for broad".
func apartWords(base string, undefined, none []string) string {
	out := ""
	if len(undefined) > 0 {
		out += fmt.Sprintf("; it is undefined on %s for %s, so no difference from it is formed", base, joinList(undefined))
	}
	if len(none) > 0 {
		out += fmt.Sprintf("; no difference from %s could be formed for %s", base, joinList(none))
	}
	return out
}

// noDifferenceWords is the predicate of "The partial ROC ratio at E =
// 0.05" when no model has a difference from base: "is undefined on base
// for coarse, so no difference from it is formed", "has no difference
// from base for broad", or both; "" when both lists are empty.
func noDifferenceWords(base string, undefined, none []string) string {
	var why []string
	if len(undefined) > 0 {
		why = append(why, fmt.Sprintf("is undefined on %s for %s, so no difference from it is formed", base, joinList(undefined)))
	}
	if len(none) > 0 {
		why = append(why, fmt.Sprintf("has no difference from %s for %s", base, joinList(none)))
	}
	return joinList(why)
}

// describedModels words the description of a partial ROC ratio across
// extents for each model of mvs with a difference from base: how many of
// its differences lie beyond its tolerance and the largest ("for good 8
// of 12 differences from base lie beyond ±0.05 (the largest +0.192 on
// X)", then "for coarse 3 of 5 (...)"), and lists apart the models
// undefined on base and those with no difference for another reason. The
// headline and the reply to a reviewer say the same.
func describedModels(base string, mvs []ModelVerdict) (parts, undefined, none []string) {
	for _, mv := range mvs {
		if mv.Largest < 0 && mv.baseScored && !mv.BaseDefined {
			undefined = append(undefined, mv.Model)
			continue
		}
		if mv.Largest < 0 {
			none = append(none, mv.Model)
			continue
		}
		tol := mv.Tolerance
		defined, beyond := beyondCount(&mv, tol)
		big := mv.Diffs[mv.Largest]
		largest := fmt.Sprintf("the largest %s on %s", signedSmall(big.Diff), big.Extent)
		if big.Diff == 0 {
			largest = "every one 0"
		}
		// A difference on too few common test points is described like
		// the others but would not be read (the AUC's sentence beside it
		// says "not judged, too few common test points"): say so.
		few := 0
		for _, d := range mv.Diffs {
			if d.Defined && d.Position == positionTooFew {
				few++
			}
		}
		switch {
		case few > 0 && few == defined:
			largest += fmt.Sprintf("; each on too few common test points to be read, %d for the largest, our cut-off %d", big.CommonPoints, big.minPoints)
		case few > 0:
			// "of the N differences", not "of them": after "0 of 7"
			// the "them" named nothing (sentence audit of 2026-12-05).
			largest += fmt.Sprintf("; %d of the %d difference%s on too few common test points to be read", few, defined, Plural(defined))
		}
		if len(parts) == 0 {
			lie := "lie"
			if beyond == 1 {
				lie = "lies"
			}
			parts = append(parts, fmt.Sprintf("for %s %d of %d difference%s from %s %s beyond ±%s (%s)",
				mv.Model, beyond, defined, Plural(defined), base, lie, fmtG(tol), largest))
			continue
		}
		parts = append(parts, fmt.Sprintf("for %s %d of %d (%s)", mv.Model, beyond, defined, largest))
	}
	return parts, undefined, none
}
