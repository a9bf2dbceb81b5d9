package report

import (
	"fmt"
	"math"
	"strings"

	"areasweep/extent/vocab"
	"areasweep/metrics"
)

// pairedFor returns the paired record of metric between (model, ext) and
// (other, otherExt), or nil.
func (a *analysis) pairedFor(metric string, kind PairKind, model, ext, other, otherExt string) *Paired {
	if i, ok := a.paired[pairedKey{metric, kind, model, ext, other, otherExt}]; ok {
		return &a.r.Paired[i] // the first such record, as a scan finds it
	}
	return nil
}

// testPointCounts lists the test points of each extent in ids and whether
// they differ.
func (a *analysis) testPointCounts(ids []string) ([]int, bool) {
	out := []int{}
	vary := false
	for _, id := range ids {
		n := 0
		if i, ok := a.extIndex[id]; ok {
			n = a.r.Extents[i].TestPoints
		}
		if len(out) > 0 && n != out[0] {
			vary = true
		}
		out = append(out, n)
	}
	return out, vary
}

// positionTooFew is the position of a difference on fewer common test
// points than its method is judged on (minCommonPoints),
// positionTooFewResamples that of a difference whose percentile interval
// comes from fewer than MinPercentileResamples formed resamples: reported,
// not judged. The
// same words are the readings ReadingTooFew and ReadingTooFewResamples.
// positionNotCalibrated is that of every Boyce index difference from the
// paired resamples (BoyceCoverage) and every partial ROC ratio difference
// between two extents (partialROCExtentCoverage): reported, not judged.
const (
	positionTooFew          = "too_few"
	positionTooFewResamples = "too_few_resamples"
	positionNotCalibrated   = "not_calibrated"
)

// notJudgedPosition tells whether pos (an ExtentDifference position or a
// NullGap reading) marks a difference reported but not judged.
func notJudgedPosition(pos string) bool {
	return pos == positionTooFew || pos == positionTooFewResamples || pos == positionNotCalibrated
}

// notJudged tells whether d is defined but not judged.
func (d ExtentDifference) notJudged() bool { return d.Defined && notJudgedPosition(d.Position) }

// why says why d is not judged: NotJudged, or its words from the
// position when NotJudged is not filled (a difference made by hand).
func (d ExtentDifference) why() string {
	if d.NotJudged != "" || !d.notJudged() {
		return d.NotJudged
	}
	return notJudgedReason(d.Position, d.metric, d.CommonPoints, d.nFormed, d.cut())
}

// cut is the fewest common test points d is judged on: minPoints, or for
// a difference made by hand without it, minCommonPoints of its method.
func (d ExtentDifference) cut() int {
	if d.minPoints > 0 {
		return d.minPoints
	}
	return minCommonPoints(d.Method, PairedKindExtent, "")
}

// position places the interval lo..hi against -tol..+tol.
func position(lo, hi, tol float64) string {
	switch {
	case lo >= -tol && hi <= tol:
		return "inside"
	case lo > tol || hi < -tol:
		return "outside"
	}
	return "overlapping"
}

// difference fills one ExtentDifference from a paired record (or exactly,
// for the predicted area, which no test point moves).
func (a *analysis) difference(m MetricInfo, kind PairKind, model, ext, other, otherExt string) ExtentDifference {
	d := ExtentDifference{Extent: ext, minPoints: m.minCommonPoints(kind), metric: m.Key}
	sc := a.score(model, ext)
	if sc != nil {
		d.TestPoints = sc.TestPoints
		d.Value, _, _, _, _, _ = metricValue(m, sc)
	}
	if m.Kind == MetricAreaFraction {
		osc := a.score(other, otherExt)
		if sc == nil || osc == nil {
			return d
		}
		v, ok1, _, _, _, _ := metricValue(m, sc)
		w, ok2, _, _, _, _ := metricValue(m, osc)
		if ok1 && ok2 {
			d.Defined, d.Method = true, "exact"
			d.Diff, d.Low, d.High = v-w, Float(v-w), Float(v-w)
			d.Position = position(v-w, v-w, m.Tolerance)
		}
		return d
	}
	p := a.pairedFor(m.Key, kind, model, ext, other, otherExt)
	if p == nil {
		return d
	}
	d.CommonPoints, d.Method, d.nFormed, d.minPoints = p.CommonPoints, p.Method, p.Formed(), p.minPoints()
	if !p.Defined {
		return d
	}
	d.Defined = true
	d.Diff, d.TestSetShift = p.Diff, p.TestSetShift
	if _, lo, hi, ok := p.Interval(); ok {
		d.Low, d.High = Float(lo), Float(hi)
		d.Position = position(lo, hi, m.Tolerance)
	}
	if k := p.notJudgedKind(); k != "" {
		d.Position, d.NotJudged = k, p.NotJudgedReason()
	}
	return d
}

// baseWord is "the base extent", or "the reference extent" when base is
// another extent standing in for a base extent that could not be scored.
func baseWord(base string) string {
	if base != vocab.BaseID {
		return "the reference extent"
	}
	return "the base extent"
}

// scoredSomewhere tells whether model is scored on at least one extent.
func (a *analysis) scoredSomewhere(model string) bool {
	for _, e := range a.r.Extents {
		if a.score(model, e.ID) != nil {
			return true
		}
	}
	return false
}

// withinBracket returns label followed by note in brackets, "AUC
// (tolerance ...)", or, when label itself ends with a bracket, note added
// inside it, "AUC (cells unweighted; tolerance ...)", rather than a
// bracket after a bracket.
func withinBracket(label, note string) string {
	if l, ok := strings.CutSuffix(label, ")"); ok && strings.Contains(l, "(") {
		return l + "; " + note + ")"
	}
	return label + " (" + note + ")"
}

// scoreName names metric m of model at a sentence's start: "AUC of
// good", and "Partial ROC ratio of good at E = 0.05" (the label's
// "Partial ROC ratio, E = 0.05 of good" read as a list).
func scoreName(m MetricInfo, model string) string {
	if m.Kind == MetricPartialROC {
		return fmt.Sprintf("Partial ROC ratio of %s at E = %s", model, fmtG(m.E))
	}
	return upperFirst(m.Label) + " of " + model
}

// modelVerdict judges metric m for model by its paired differences from
// the base extent (see ModelVerdict).
func (a *analysis) modelVerdict(m MetricInfo, model string) ModelVerdict {
	mv := ModelVerdict{Metric: m.Key, Label: m.Label, Model: model, Tolerance: m.Tolerance, Base: a.base, Verdict: JudgementUndetermined,
		Diffs: []ExtentDifference{}, Largest: -1, Undefined: []string{}}
	bs := a.score(model, a.base)
	if bs == nil && !a.scoredSomewhere(model) {
		mv.Sentence = scoreName(m, model) + ": not scored on any extent, so no difference can be formed."
		return mv
	}
	if bs == nil {
		mv.Sentence = fmt.Sprintf("%s: not scored on %s %s, so no difference from it can be formed.", scoreName(m, model), baseWord(a.base), a.base)
		return mv
	}
	var baseOK bool
	mv.baseScored = true
	mv.BaseValue, baseOK, _, _, _, _ = metricValue(m, bs)
	mv.BaseDefined = baseOK
	outside := a.diffsFromBase(m, model, &mv)
	a.judge(m, model, &mv, outside, bs, baseOK)
	return mv
}

// diffsFromBase adds to mv model's paired difference of metric m on every
// other extent it is scored on from the base extent, with the extents
// where it is undefined and the largest in size, and returns how many lie
// wholly outside the tolerance.
func (a *analysis) diffsFromBase(m MetricInfo, model string, mv *ModelVerdict) int {
	outside := 0
	for _, e := range a.extents {
		if e.ID == a.base || a.score(model, e.ID) == nil {
			continue
		}
		d := a.difference(m, PairedKindExtent, model, e.ID, model, a.base)
		mv.Diffs = append(mv.Diffs, d)
		if !d.Defined {
			mv.Undefined = append(mv.Undefined, e.ID)
			continue
		}
		if d.Position == "outside" {
			outside++
		}
		if mv.Largest < 0 || math.Abs(d.Diff) > math.Abs(mv.Diffs[mv.Largest].Diff) {
			mv.Largest = len(mv.Diffs) - 1
		}
	}
	return outside
}

// judge sets mv's verdict and sentence from its differences (outside of
// them wholly beyond the tolerance); bs is the score on the base extent,
// baseOK whether m is defined there.
func (a *analysis) judge(m MetricInfo, model string, mv *ModelVerdict, outside int, bs *Score, baseOK bool) {
	name := scoreName(m, model)
	tol := "±" + fmtG(m.Tolerance)
	switch {
	case len(mv.Diffs) == 0:
		// a.base is the base extent, or the extent standing in for it
		// when the base could not be scored: name it, not "the base".
		where := "the base extent " + a.base
		if a.base != vocab.BaseID {
			where = "the reference extent " + a.base
		}
		mv.Sentence = fmt.Sprintf("%s: scored on %s only, so there is nothing to compare.", name, where)
		if !baseOK {
			// The model is scored there, but this metric is undefined:
			// "scored on base only" would suggest a value to read.
			mv.Sentence = fmt.Sprintf("%s: undefined on %s%s, the only extent it is scored on, so there is nothing to compare.", name, where, undefinedWhy(m, bs))
		}
		return
	case mv.Largest < 0:
		why := "no paired difference from " + a.base + " could be formed"
		if n, ok := mv.fewCommon(); ok {
			why += fmt.Sprintf(": it shares at most %d test point%s with any other extent", n, Plural(n))
		}
		if !baseOK {
			why = fmt.Sprintf("it is undefined on %s, %s%s", a.base, baseWord(a.base), undefinedWhy(m, bs))
		}
		mv.Sentence = fmt.Sprintf("%s: undetermined, %s.", name, why)
		return
	}
	if m.Kind == MetricBoyce || m.Kind == MetricPartialROC {
		// Described, not judged (notCalibrated): the Boyce index's
		// differences of any kind, the partial ROC ratio's between
		// extents, which these are.
		mv.Sentence = describedText(name, a.base, mv, m)
		return
	}
	if outside > 0 && mv.Diffs[mv.Largest].notJudged() {
		// An extent-sensitive verdict rests on the judged differences:
		// name the largest of those, not one on too few test points
		// (listed as not judged after it).
		mv.Largest = largestJudged(mv.Diffs)
	}
	big := mv.Diffs[mv.Largest]
	largest := "the largest is " + differenceText(big, m.Tolerance)
	exact := big.Method == "exact"
	if big.Diff == 0 {
		// Every difference is 0: naming one extent as "the largest" would
		// pick it arbitrarily.
		largest = "every one is 0"
		if m.Kind == MetricOmission {
			// Not a finding: on the test points two extents share, a
			// threshold from the training points omits the same ones.
			largest += ", as it must be: " + omissionWhyZero(m)
		}
	}
	notOn := ""
	if len(mv.Undefined) > 0 {
		notOn = " " + upperFirst(a.undefinedText(m, model, *mv)) + "."
	}
	within, largestWithin := "lies within "+tol+" with its 95% interval", largest
	if exact {
		within = "(exact: no test point moves it) lies within " + tol
		if big.Diff != 0 {
			largestWithin = fmt.Sprintf("the largest is %s on %s", signedSmall(big.Diff, m.Tolerance, -m.Tolerance), big.Extent)
		}
	}
	// One other extent: its difference is named as the one there is,
	// not as "every difference" and "the largest" of one.
	one := len(mv.Diffs) == 1
	switch {
	case outside > 0 && one:
		mv.Verdict = JudgementSensitive
		mv.Sentence = fmt.Sprintf("%s is extent-sensitive: its one difference from %s, %s, lies wholly beyond %s.",
			name, a.base, differenceText(big, m.Tolerance), toleranceText(m))
	case outside > 0:
		mv.Verdict = JudgementSensitive
		mv.Sentence = fmt.Sprintf("%s is extent-sensitive: on %d of %d extent%s the difference from %s lies wholly beyond %s; %s.%s%s",
			name, outside, len(mv.Diffs), Plural(len(mv.Diffs)), a.base, toleranceText(m), largest, notOn, tooFewText(mv.Diffs))
	case len(mv.Undefined) == 0 && allInside(mv.Diffs) && one:
		mv.Verdict = JudgementRobust
		mv.Sentence = fmt.Sprintf("%s is robust to the extent: its one difference from %s, %s, lies within %s.%s", name, a.base, differenceText(big, m.Tolerance), tol, judgedFewText(mv.Diffs))
	case len(mv.Undefined) == 0 && allInside(mv.Diffs):
		mv.Verdict = JudgementRobust
		mv.Sentence = fmt.Sprintf("%s is robust to the extent: every difference from %s %s; %s.%s", name, a.base, within, largestWithin, judgedFewText(mv.Diffs))
	case allInside(definedDiffs(mv.Diffs)):
		// Undetermined only because the score is undefined somewhere:
		// the test points are not the reason.
		mv.Sentence = fmt.Sprintf("%s is undetermined: %s, and every difference from %s that could be formed %s; %s.%s",
			name, a.undefinedText(m, model, *mv), a.base, within, largestWithin, judgedFewText(mv.Diffs))
	case big.zero():
		// Every difference is 0: no extent is "the largest". Undetermined
		// for the differences on too few test points, or for an interval
		// that straddles the tolerance around a difference of 0 (named,
		// whichever extent it is on).
		if straddle := straddleText(mv.Diffs, ExtentDifference{}, m.Tolerance); straddle != "" {
			mv.Sentence = fmt.Sprintf("%s is undetermined: every difference from %s is 0, but the paired intervals are too wide to tell whether it moves by more than %s%s.%s%s",
				name, a.base, tol, straddle, notOn, tooFewText(mv.Diffs))
			break
		}
		mv.Sentence = fmt.Sprintf("%s is undetermined: %s to tell whether it moves by more than %s, although every difference from %s is 0.%s%s",
			name, notJudgedWhy(mv.Diffs), tol, a.base, notOn, tooFewText(mv.Diffs))
	default:
		// Undetermined because an interval straddles the tolerance (the
		// paired intervals are too wide, whatever the number of test
		// points), or only because some differences rest on too few
		// common test points to be judged.
		straddle := straddleText(mv.Diffs, big, m.Tolerance)
		why := notJudgedWhy(mv.Diffs) + " to tell"
		if straddle != "" {
			why = "the paired intervals are too wide to tell"
		}
		mv.Sentence = fmt.Sprintf("%s is undetermined: %s whether it moves by more than %s; the largest difference from %s is %s%s.%s%s",
			name, why, tol, a.base, differenceText(big, m.Tolerance), straddle, notOn, tooFewText(mv.Diffs))
	}
}

// fewCommon reports, for a verdict with no difference formed, whether
// each difference failed for want of common test points (a paired record
// on fewer than 2), and the most that any other extent shares with the
// base extent; ok is false when some other reason may apply.
func (mv *ModelVerdict) fewCommon() (most int, ok bool) {
	for _, d := range mv.Diffs {
		if d.Defined || d.Method == "" || d.CommonPoints >= 2 {
			return 0, false
		}
		most = max(most, d.CommonPoints)
	}
	return most, len(mv.Diffs) > 0
}

// omissionWhyZero says why an omission rate's paired difference between
// extents is 0 whatever the data: its "robust" is not evidence. A fixed
// threshold is the user's, not the training points' ("comes from the
// training points" was said of --thresholds 0.5 too).
func omissionWhyZero(m MetricInfo) string {
	from := "comes from the training points"
	if m.Threshold == metrics.ThresholdFixed {
		from = "is fixed"
	}
	return "the threshold " + from + ", whatever the extent, so on the test points both extents hold it omits the same ones; only a change of test points moves the rate"
}

// judgedFewText names the judged differences of ds on fewer common test
// points than a difference is otherwise judged on: an omission rate's
// between extents, 0 by construction (Paired.zeroByConstruction), has no
// sampling error to guard against, so the cut-off does not apply, and
// the sentence says so rather than leave "robust" on 6 points unexplained.
func judgedFewText(ds []ExtentDifference) string {
	var few []string
	cut := 0
	for _, d := range ds {
		if d.Defined && !d.notJudged() && d.Method != "exact" && d.CommonPoints < d.cut() {
			unit := ""
			if len(few) == 0 {
				unit = " common test point" + Plural(d.CommonPoints)
			}
			few = append(few, fmt.Sprintf("%s (%d%s)", d.Extent, d.CommonPoints, unit))
			cut = d.cut()
		}
	}
	if len(few) == 0 {
		return ""
	}
	the, verb := "The difference on", "is"
	if len(few) > 1 {
		the, verb = "The differences on", "are"
	}
	return fmt.Sprintf(" %s %s %s judged on fewer than the %d common test points we otherwise judge a difference on (our cut-off): a difference that is 0 by construction has no sampling error.", the, joinList(few), verb, cut)
}

// describedText describes, without judging, the Boyce index or the
// partial ROC ratio m of a model (name: "Boyce index of M") across
// extents by its differences from base in mv: the largest, and on how
// many extents a difference lies beyond m's tolerance (a description: the
// intervals are not read, notCalibratedCoverage).
func describedText(name, base string, mv *ModelVerdict, m MetricInfo) string {
	tol, why := m.Tolerance, notCalibratedCoverage(m)
	big := mv.Diffs[mv.Largest]
	defined, beyond := beyondCount(mv, tol)
	largest := fmt.Sprintf("the largest is %s on %s", signedSmall(big.Diff), big.Extent)
	if big.Diff == 0 {
		largest = "every one is 0"
	}
	if len(mv.Diffs) == 1 && big.Defined {
		side := "within"
		if beyond == 1 {
			side = "beyond"
		}
		return fmt.Sprintf("%s is described, not judged (%s): its one difference from %s, %s on %s, lies %s ±%s.",
			name, why, base, signedSmall(big.Diff), big.Extent, side, fmtG(tol))
	}
	// "1 of 10 lies", "3 of 10 lie": the verb follows the count beyond.
	lie := "lie"
	if beyond == 1 {
		lie = "lies"
	}
	return fmt.Sprintf("%s is described, not judged (%s): of its differences from %s, %d of %d %s beyond ±%s and %s.",
		name, why, base, beyond, defined, lie, fmtG(tol), largest)
}

// beyondCount returns how many of mv's differences are defined and how
// many of those lie beyond the tolerance tol, |Diff| > tol (a
// description: the intervals are not read).
func beyondCount(mv *ModelVerdict, tol float64) (defined, beyond int) {
	for _, d := range mv.Diffs {
		if d.Defined {
			defined++
			if math.Abs(d.Diff) > tol {
				beyond++
			}
		}
	}
	return defined, beyond
}

// notCalibratedCoverage says why the differences of m between extents are
// described, not judged: "its paired intervals fall short of their 95%
// coverage: 34% to 88% in our simulation check" (BoyceCoverage), or for
// the partial ROC ratio, "... between extents ..."
// (partialROCExtentCoverage).
func notCalibratedCoverage(m MetricInfo) string {
	if m.Kind == MetricPartialROC {
		return "its paired intervals between extents fall short of their 95% coverage: " + PartialROCCoverageClause(m.Key)
	}
	return fmt.Sprintf("its paired intervals fall short of their 95%% coverage: %s in our simulation check", BoyceCoverage)
}

// toleranceText names metric m's tolerance: "our tolerance of ±0.02" when
// it is our default (DefaultToleranceAUC and the others), "the tolerance
// of ±0.3 set for this run" when the user chose another.
func toleranceText(m MetricInfo) string {
	def := map[MetricKind]float64{MetricAUC: DefaultToleranceAUC, MetricAUCUnweighted: DefaultToleranceAUC,
		MetricPartialROC: DefaultTolerancePartialROC, MetricOmission: DefaultToleranceOmission,
		MetricAreaFraction: DefaultToleranceOmission, MetricBoyce: DefaultToleranceBoyce}
	if d, ok := def[m.Kind]; ok && d == m.Tolerance {
		return "our tolerance of ±" + fmtG(m.Tolerance)
	}
	return "the tolerance of ±" + fmtG(m.Tolerance) + " set for this run"
}

// differenceText is "+0.078 on X (95% interval +0.063 to +0.093)", or
// "(exact: no test point moves it)" for a difference without sampling
// error; the bounds show on which side of ±tol they lie (signedVs).
func differenceText(d ExtentDifference, tol float64) string {
	if d.Method == "exact" {
		return fmt.Sprintf("%s on %s (exact: no test point moves it)", signedSmall(d.Diff, tol, -tol), d.Extent)
	}
	// signedSmall: a difference of 0.0002 and its interval read "+0.0002
	// (95% interval +0.0001 to +0.0003)", not "+0.000 (95% interval
	// +0.000 to +0.000)", which reads as no difference at all.
	if d.notJudged() {
		// A description only: its interval is no basis for inference.
		return fmt.Sprintf("%s on %s, not judged (%s)", signedSmall(d.Diff), d.Extent, d.why())
	}
	lo, hi, _ := d.Interval() // judged: it has one
	return fmt.Sprintf("%s on %s (95%% interval %s to %s)", signedSmall(d.Diff), d.Extent, signedSmall(lo, tol, -tol), signedSmall(hi, tol, -tol))
}

// zero tells whether d is exactly 0 with an interval of exactly 0 (or
// no interval).
func (d *ExtentDifference) zero() bool {
	lo, hi, _ := d.Interval()
	return d.Diff == 0 && lo == 0 && hi == 0
}

// undefinedText says where no difference from the base could be formed
// and why: "it is undefined on X" where the score itself is undefined,
// "no paired difference from base could be formed on Y (0 common test
// points)" where the score is defined but the two extents share fewer
// than two test points (an extent beside the base rather than around it).
func (a *analysis) undefinedText(m MetricInfo, model string, mv ModelVerdict) string {
	var undef, apart []string
	for _, d := range mv.Diffs {
		if d.Defined {
			continue
		}
		if sc := a.score(model, d.Extent); sc != nil && d.CommonPoints < 2 {
			if _, ok, _, _, _, _ := metricValue(m, sc); ok {
				apart = append(apart, fmt.Sprintf("%s (%d common test point%s)", d.Extent, d.CommonPoints, Plural(d.CommonPoints)))
				continue
			}
		}
		undef = append(undef, d.Extent)
	}
	var parts []string
	if len(undef) > 0 {
		parts = append(parts, "it is undefined on "+joinList(undef))
	}
	if len(apart) > 0 {
		parts = append(parts, "no paired difference from "+mv.Base+" could be formed on "+joinList(apart))
	}
	return strings.Join(parts, ", and ")
}

// straddleText says on how many extents the 95% interval straddles ±tol,
// which is what leaves a verdict undetermined, and names the one that
// reaches furthest beyond the tolerance when that is not big (the largest
// difference, already quoted): the largest difference's own interval may
// lie inside the tolerance. "" when no interval straddles it.
func straddleText(ds []ExtentDifference, big ExtentDifference, tol float64) string {
	n := 0
	var far *ExtentDifference
	reach := func(d *ExtentDifference) float64 {
		lo, hi, _ := d.Interval()
		return math.Max(math.Abs(lo), math.Abs(hi))
	}
	for i := range ds {
		if d := &ds[i]; d.Defined && d.Position == "overlapping" {
			n++
			if far == nil || reach(d) > reach(far) {
				far = d
			}
		}
	}
	if n == 0 {
		return ""
	}
	out := fmt.Sprintf("; the 95%% interval straddles ±%s on %d of %d extent%s", fmtG(tol), n, len(ds), Plural(len(ds)))
	if far.Extent != big.Extent {
		out += ", reaching furthest beyond it with " + differenceText(*far, tol)
	}
	return out
}

// tooFewText names the differences left unjudged, for resting on fewer
// common test points than their method is judged on (minCommonPoints;
// with their common test points) or on
// fewer than MinPercentileResamples formed resamples (with the formed
// resamples), or "".
func tooFewText(ds []ExtentDifference) string {
	var few, fewB, fewBIDs []string
	formed := map[int]bool{}
	cut := MinPairedPoints
	for _, d := range ds {
		switch {
		case !d.Defined:
		case d.Position == positionTooFew:
			few = append(few, fmt.Sprintf("%s (%d)", d.Extent, d.CommonPoints))
			cut = d.cut()
		case d.Position == positionTooFewResamples:
			fewB = append(fewB, fmt.Sprintf("%s (%d)", d.Extent, d.nFormed))
			fewBIDs = append(fewBIDs, d.Extent)
			formed[d.nFormed] = true
		}
	}
	out := ""
	if len(few) > 0 {
		out += fmt.Sprintf(" Not judged, on fewer than %d common test points (our cut-off): %s.", cut, joinList(few))
	}
	switch {
	case len(fewB) > 1 && len(formed) == 1:
		// One count for all (--iterations below the cut-off): say it once.
		for n := range formed {
			out += fmt.Sprintf(" Not judged, on fewer than %d formed resamples (our cut-off; %d formed on each): %s.", MinPercentileResamples, n, joinList(fewBIDs))
		}
	case len(fewB) > 0:
		out += fmt.Sprintf(" Not judged, on fewer than %d formed resamples (our cut-off): %s.", MinPercentileResamples, joinList(fewB))
	}
	return out
}

// notJudgedWhy says what the differences of ds that are not judged lack:
// "too few common test points", "too few resamples" or both.
func notJudgedWhy(ds []ExtentDifference) string {
	pts, res := notJudgedCounts(ds)
	switch {
	case pts > 0 && res > 0:
		return "too few common test points or resamples"
	case res > 0:
		return "too few resamples"
	}
	return "too few common test points"
}

// notJudgedCounts counts the defined differences of ds not judged: on
// fewer common test points than their method is judged on (points), and from fewer
// than MinPercentileResamples formed resamples (resamples).
func notJudgedCounts(ds []ExtentDifference) (points, resamples int) {
	for _, d := range ds {
		switch {
		case !d.Defined:
		case d.Position == positionTooFew:
			points++
		case d.Position == positionTooFewResamples:
			resamples++
		}
	}
	return points, resamples
}

// largestJudged is the index in ds of the defined difference with the
// largest |Diff| among those judged (not on too few test points), or -1.
func largestJudged(ds []ExtentDifference) int {
	k := -1
	for i, d := range ds {
		if !d.Defined || d.notJudged() {
			continue
		}
		if k < 0 || math.Abs(d.Diff) > math.Abs(ds[k].Diff) {
			k = i
		}
	}
	return k
}

// definedDiffs returns the defined differences of ds.
func definedDiffs(ds []ExtentDifference) []ExtentDifference {
	var out []ExtentDifference
	for _, d := range ds {
		if d.Defined {
			out = append(out, d)
		}
	}
	return out
}

func allInside(ds []ExtentDifference) bool {
	for _, d := range ds {
		if !d.Defined || d.Position != "inside" {
			return false
		}
	}
	return true
}

// undefinedWhy names why a partial ROC ratio or a Boyce index is
// undefined on s.
func undefinedWhy(m MetricInfo, s *Score) string {
	if m.Kind == MetricBoyce && s.Boyce == nil && s.BoyceUndefined != "" {
		return " (" + s.BoyceUndefined + ")"
	}
	if m.Kind != MetricPartialROC {
		return ""
	}
	for _, p := range s.PartialROC {
		if math.Abs(p.E-m.E) <= 1e-12 && !p.Defined && p.Reason != "" {
			out := " (" + p.Reason
			switch {
			case p.DiscreteDefined:
				// x_E of 0.0003 is "0.0003", not "0.000" (no area at all).
				out += fmt.Sprintf("; read at thresholds only, x_E = %s and the ratio is %s", smallPositive(p.DiscreteXE), f3(p.DiscreteRatio))
			case p.TiedAtCrossing > 0:
				out += "; read at thresholds only, the threshold that keeps the tied test points keeps the whole area, so no ratio can be formed"
			}
			return out + ")"
		}
	}
	return ""
}

// verdictFor sums up the model verdicts of metric m.
func verdictFor(m MetricInfo, mvs []ModelVerdict) Verdict {
	v := Verdict{Metric: m.Key, Label: m.Label, Tolerance: m.Tolerance, Verdict: JudgementUndetermined,
		Sensitive: []string{}, Robust: []string{}, Undetermined: []string{}}
	for _, mv := range mvs {
		switch mv.Verdict {
		case JudgementSensitive:
			v.Sensitive = append(v.Sensitive, mv.Model)
		case JudgementRobust:
			v.Robust = append(v.Robust, mv.Model)
		default:
			v.Undetermined = append(v.Undetermined, mv.Model)
		}
	}
	switch {
	case len(v.Sensitive) > 0:
		v.Verdict = JudgementSensitive
	case len(v.Robust) > 0 && len(v.Undetermined) == 0:
		v.Verdict = JudgementRobust
	}
	from := "the base extent"
	if len(mvs) > 0 && mvs[0].Base != vocab.BaseID && mvs[0].Base != "" {
		// The first scored extent stands in for a base extent that could
		// not be scored: name it, not "the base extent".
		from = "the reference extent " + mvs[0].Base
	}
	// A model with no difference from the base at all (one extent
	// scored, or a constant model) is named apart: "undetermined for
	// good, rev and const" was written where nothing could be compared
	// (sentence audit of 2026-12-05).
	var undetermined, none []string
	for _, mv := range mvs {
		if mv.Verdict != JudgementSensitive && mv.Verdict != JudgementRobust {
			if len(mv.Diffs) == 0 {
				none = append(none, mv.Model)
			} else {
				undetermined = append(undetermined, mv.Model)
			}
		}
	}
	var parts []string
	if len(v.Sensitive) > 0 {
		parts = append(parts, "extent-sensitive for "+joinList(v.Sensitive))
	}
	if len(v.Robust) > 0 {
		parts = append(parts, "robust for "+joinList(v.Robust))
	}
	if len(undetermined) > 0 {
		parts = append(parts, "undetermined for "+joinList(undetermined))
	}
	if len(none) > 0 {
		parts = append(parts, fmt.Sprintf("no difference from %s could be formed for %s (each model's sentence says why)", from, joinList(none)))
	}
	v.Sentence = fmt.Sprintf("%s: %s.", withinBracket(upperFirst(m.Label), fmt.Sprintf("tolerance ±%s, paired differences from %s", fmtG(m.Tolerance), from)), strings.Join(parts, "; "))
	if len(none) == len(mvs) && len(mvs) > 0 {
		v.Sentence = fmt.Sprintf("%s: no difference from %s could be formed for any model (each model's sentence says why).", upperFirst(m.Label), from)
	}
	if m.Kind == MetricBoyce || m.Kind == MetricPartialROC {
		v.Sentence = describedVerdictSentence(m, mvs, from)
	}
	if len(mvs) == 1 {
		v.Sentence = mvs[0].Sentence
	}
	return v
}

// describedVerdictSentence sums up the Boyce index or a partial ROC
// ratio (m) over the models of mvs:
// described, not judged, for those with a difference from the base
// extent (from names it), and named apart those with none (undefined or
// not scored on the base extent, or alone on it), for which "described
// for every model" would claim a description that is not there.
func describedVerdictSentence(m MetricInfo, mvs []ModelVerdict, from string) string {
	var described, none []string
	for _, mv := range mvs {
		if mv.Largest >= 0 {
			described = append(described, mv.Model)
		} else {
			none = append(none, mv.Model)
		}
	}
	why := notCalibratedCoverage(m)
	switch {
	case len(none) == 0:
		return fmt.Sprintf("%s: described, not judged, for every model (%s).", upperFirst(m.Label), why)
	case len(described) == 0:
		return fmt.Sprintf("%s: no difference from %s could be formed for any model (each model's sentence says why).", upperFirst(m.Label), from)
	}
	return fmt.Sprintf("%s: described, not judged, for %s (%s); no difference from %s could be formed for %s.",
		upperFirst(m.Label), joinList(described), why, from, joinList(none))
}

// rankings compares every pair of models on metric m extent by extent.
// The predicted area is left out: it has no sampling error, so any
// difference would count as "beyond noise"; and so is the Boyce index.
func (a *analysis) rankings(m MetricInfo) []ModelRanking {
	var out []ModelRanking
	if m.Kind == MetricAreaFraction || m.Kind == MetricBoyce {
		// The Boyce index's differences are not judged either
		// (BoyceCoverage).
		return out
	}
	for i, ma := range a.models {
		for _, mb := range a.models[i+1:] {
			r := ModelRanking{Metric: m.Key, Model: ma, Other: mb, Diffs: []ExtentDifference{}}
			for _, e := range a.extents {
				if a.score(ma, e.ID) == nil || a.score(mb, e.ID) == nil {
					continue
				}
				d := a.difference(m, PairedKindModel, ma, e.ID, mb, e.ID)
				r.Diffs = append(r.Diffs, d)
				if !d.Defined || d.notJudged() {
					continue
				}
				r.Extents++
				lo, hi, _ := d.Interval()
				up, down := lo > 0, hi < 0
				if !m.HigherIsBetter {
					up, down = down, up
				}
				switch {
				case up:
					r.Better++
				case down:
					r.Worse++
				default:
					r.WithinNoise++
				}
			}
			tooFew, tooFewB := notJudgedCounts(r.Diffs)
			switch {
			case r.Extents == 0 && tooFew > 0 && tooFewB == 0:
				r.Sentence = fmt.Sprintf("%s: %s and %s cannot be compared on any extent: where both are defined they share fewer than %d test points (our cut-off).", upperFirst(m.Label), ma, mb, m.minCommonPoints(PairedKindModel))
			case r.Extents == 0 && tooFewB > 0:
				r.Sentence = fmt.Sprintf("%s: %s and %s are not compared on any extent: where both are defined, %s.", upperFirst(m.Label), ma, mb, notComparedWhy(tooFew, tooFewB, m.minCommonPoints(PairedKindModel)))
			case r.Extents == 0:
				r.Sentence = fmt.Sprintf("%s: %s and %s cannot be compared on any extent: %s.", upperFirst(m.Label), ma, mb, a.notComparableWhy(m, ma, mb, r.Diffs))
			case r.identical():
				r.Sentence = fmt.Sprintf("%s: %s and %s score the same on %s compared (every paired difference, and its interval, is 0).",
					upperFirst(m.Label), ma, mb, allExtents(r.Extents))
				r.Sentence += notCountedText(tooFew, tooFewB, m.minCommonPoints(PairedKindModel))
			case r.Better == 0 && r.Worse == 0:
				// "a is better than b on 0 of n" is true but reads as a
				// finding.
				r.Sentence = fmt.Sprintf("%s: %s and %s %s (paired differences, 95%% intervals).",
					upperFirst(m.Label), ma, mb, differOnNone(r.Extents, "extent"+Plural(r.Extents)))
				r.Sentence += notCountedText(tooFew, tooFewB, m.minCommonPoints(PairedKindModel))
			default:
				// The model ahead first, as in the headline; the table
				// keeps Model minus Other.
				lead := r.leaderFirst()
				r.Sentence = fmt.Sprintf("%s: %s is better than %s beyond noise on %d of %d extent%s, worse on %d, within noise on %d (paired differences, 95%% intervals).",
					upperFirst(m.Label), lead.Model, lead.Other, lead.Better, r.Extents, Plural(r.Extents), lead.Worse, r.WithinNoise)
				if m.Kind == MetricOmission {
					r.Sentence = omissionRankingSentence(m, lead, r.Extents, r.WithinNoise)
				}
				r.Sentence += notCountedText(tooFew, tooFewB, m.minCommonPoints(PairedKindModel))
			}
			out = append(out, r)
		}
	}
	return out
}

// omissionRankingSentence is a model comparison's sentence for an
// omission rate: "coarse omits fewer test points than good beyond noise
// on 12 of 13 extents, more on 0, within noise on 1". "Better" claimed
// more than the rates show: each model's threshold keeps its own share of
// the area, and a threshold that keeps more area omits fewer test points
// whatever the model's skill.
func omissionRankingSentence(m MetricInfo, lead ModelRanking, extents, within int) string {
	return fmt.Sprintf("%s: %s omits fewer test points than %s beyond noise on %d of %d extent%s, more on %d, within noise on %d (paired differences, 95%% intervals; each model's threshold keeps its own share of the area, so fewer omissions alone do not make a better model).",
		upperFirst(m.Label), lead.Model, lead.Other, lead.Better, extents, Plural(extents), lead.Worse, within)
}

// notComparableWhy says why two models could be compared on no extent
// when no difference was formed at all (not for want of test points):
// one model's score (or both) is undefined on every extent ("coarse's
// partial ROC ratio at E = 0.05 is undefined on every extent"), no extent
// scores both, or on each extent that does one of them is undefined or
// no paired difference could be formed. diffs are the differences on the
// extents that score both.
func (a *analysis) notComparableWhy(m MetricInfo, ma, mb string, diffs []ExtentDifference) string {
	if len(diffs) == 0 {
		return "no extent scores both"
	}
	what := strings.Replace(m.Label, ", E = ", " at E = ", 1)
	var nowhere []string
	for _, model := range []string{ma, mb} {
		if !a.definedSomewhere(m, model) {
			nowhere = append(nowhere, model+"'s")
		}
	}
	switch len(nowhere) {
	case 1:
		return fmt.Sprintf("%s %s is undefined on every extent", nowhere[0], what)
	case 2:
		return fmt.Sprintf("%s %s are undefined on every extent", joinList(nowhere), what)
	}
	for _, d := range diffs {
		if a.definedOn(m, ma, d.Extent) && a.definedOn(m, mb, d.Extent) {
			return "on every extent that scores both, one of them is undefined or no paired difference could be formed"
		}
	}
	return "on every extent that scores both, one of them is undefined"
}

// definedOn tells whether model's score of metric m is defined on extent.
func (a *analysis) definedOn(m MetricInfo, model, extent string) bool {
	sc := a.score(model, extent)
	if sc == nil {
		return false
	}
	_, ok, _, _, _, _ := metricValue(m, sc)
	return ok
}

// definedSomewhere tells whether model's score of metric m is defined on
// at least one extent.
func (a *analysis) definedSomewhere(m MetricInfo, model string) bool {
	for _, e := range a.extents {
		if a.definedOn(m, model, e.ID) {
			return true
		}
	}
	return false
}

// notCountedText says on how many extents a model comparison was not
// judged: tooFew where the models share fewer than cut test points (the
// metric's minCommonPoints), tooFewB where the difference's interval comes
// from fewer than MinPercentileResamples formed resamples; "" when on none.
func notCountedText(tooFew, tooFewB, cut int) string {
	out := ""
	if tooFew > 0 {
		out += fmt.Sprintf(" Not counted: %d extent%s where they share fewer than %d test points (our cut-off).", tooFew, Plural(tooFew), cut)
	}
	if tooFewB > 0 {
		out += fmt.Sprintf(" Not counted: %d extent%s where the difference rests on fewer than %d formed resamples (our cut-off).", tooFewB, Plural(tooFewB), MinPercentileResamples)
	}
	return out
}

// notComparedWhy says why two models are compared on no extent, some
// differences being on too few common test points (tooFew of them) and
// the others from too few formed resamples (tooFewB); cut is the fewest
// common test points the metric is judged on.
func notComparedWhy(tooFew, tooFewB, cut int) string {
	out := fmt.Sprintf("the difference rests on fewer than %d formed resamples on %d extent%s (our cut-off)", MinPercentileResamples, tooFewB, Plural(tooFewB))
	if tooFew > 0 {
		out = fmt.Sprintf("they share fewer than %d test points on %d extent%s and ", cut, tooFew, Plural(tooFew)) + out
	}
	return out
}

// identical reports whether the two models of rk score the same on every
// extent compared: each counted paired difference and both ends of its
// interval are 0 (two copies of one model, say). "Within noise" would
// understate that: there is no noise between them.
func (rk ModelRanking) identical() bool {
	if rk.Extents == 0 || rk.Better != 0 || rk.Worse != 0 {
		return false
	}
	n := 0
	for _, d := range rk.Diffs {
		if !d.Defined || d.notJudged() {
			continue
		}
		if !d.zero() {
			return false
		}
		n++
	}
	return n == rk.Extents
}
