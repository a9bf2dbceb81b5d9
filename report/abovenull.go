package report

import (
	"fmt"
	"math"
	"strings"

	"areasweep/metrics"
)

// PairKind says what a Paired record compares; its values are written to
// results.json.
type PairKind string

// The paired kinds.
const (
	// PairedKindExtent is one model on an extent minus the same model on
	// the base extent (Extent minus OtherExtent).
	PairedKindExtent PairKind = "extent"
	// PairedKindModel is one model minus another on the same extent
	// (Model minus OtherModel).
	PairedKindModel PairKind = "model"
	// PairedKindNull is a model minus a null on one extent (Model minus
	// OtherModel, the null, on the same test points).
	PairedKindNull PairKind = "null"
)

// Readings of a model-minus-null interval (AboveNull, NullGap).
const (
	ReadingAbove     = "above"     // 95% interval wholly above 0
	ReadingNotAbove  = "not_above" // 95% interval includes 0
	ReadingBelow     = "below"     // 95% interval wholly below 0
	ReadingUndefined = "undefined" // no paired difference could be formed
	ReadingTooFew    = "too_few"   // on fewer common test points than the metric is judged on (MinPairedPoints, MinResampledPoints): not read
	// ReadingTooFewResamples: the interval comes from fewer than
	// MinPercentileResamples formed paired resamples: not read.
	ReadingTooFewResamples = "too_few_resamples"
)

// AboveNull is how far one model stands above one null on one metric, per
// extent, from the paired records of kind PairedKindNull: the difference
// model minus null on the test points both hold, with its 95% interval
// (placements for AUC, paired resamples for the partial ROC ratio). The
// per-extent readings are tests of each difference against 0; how the gap
// moves across extents (Smallest, Largest) is a description.
type AboveNull struct {
	Metric   string `json:"metric"` // "auc" or a partial ROC key
	Model    string `json:"model"`
	Null     string `json:"null"`
	NullKind string `json:"null_kind"`
	// BaseExtent is Sensitivity.BaseExtent; BaseReading the reading there.
	BaseExtent  string `json:"base_extent"`
	BaseReading string `json:"base_reading"`
	// Gaps holds one difference per scored extent, in family order.
	Gaps []NullGap `json:"gaps"`
	// Above, NotAbove, Below count the extents by reading; Defined counts
	// those with a difference.
	Above    int `json:"above"`
	NotAbove int `json:"not_above"`
	Below    int `json:"below"`
	Defined  int `json:"defined"`
	// SmallestExtent and LargestExtent are the extents of smallest and
	// largest area with a defined difference (a description of the trend).
	SmallestExtent string `json:"smallest_extent"`
	LargestExtent  string `json:"largest_extent"`
	// Sentence says it in words.
	Sentence string `json:"sentence"`
}

// NullGap is one extent's model-minus-null difference.
type NullGap struct {
	Extent       string  `json:"extent"`
	AreaKm2      float64 `json:"area_km2"`
	CommonPoints int     `json:"common_points"`
	Method       string  `json:"method"`
	Defined      bool    `json:"defined"`
	// ModelValue and NullValue are the two scores on the common points.
	ModelValue float64 `json:"model_value"`
	NullValue  float64 `json:"null_value"`
	Diff       float64 `json:"diff"`
	SE         float64 `json:"se"`
	Low        float64 `json:"ci_low"`
	High       float64 `json:"ci_high"`
	Reading    string  `json:"reading"`
	// NotJudged says why a defined gap is not read (Paired.NotJudgedReason);
	// absent when it is read.
	NotJudged string `json:"not_judged_reason,omitempty"`
	// ModelVsRandom reads ModelValue, the model's own score on the common
	// points, against a random ranking (VsRandomAbove, VsRandomNotShown,
	// VsRandomAtOrBelow, VsRandomPointAbove; setModelVsRandom); ModelLow
	// and ModelHigh are its 95% interval, 0 without one (AUC); ModelP is
	// the partial ROC ratio's one-sided area-random p-value
	// (PartialROC.PRandom) that read it, absent without one. Absent for
	// an undefined gap.
	ModelVsRandom string  `json:"model_vs_random,omitempty"`
	ModelLow      float64 `json:"model_ci_low"`
	ModelHigh     float64 `json:"model_ci_high"`
	ModelP        float64 `json:"model_p_random,omitempty"`
	// nFormed is the number of resamples that formed the difference.
	nFormed int
}

// randomLevel is the score of a random ranking on metric kind k (an AUC
// of 0.5, a partial ROC ratio of 1), and false for a metric without one.
func randomLevel(k MetricKind) (float64, bool) {
	switch k {
	case MetricAUC, MetricAUCUnweighted:
		return 0.5, true
	case MetricPartialROC:
		return 1, true
	}
	return 0, false
}

// aboveWithoutSkill tells whether g reads the model above the null while
// the model itself is not shown to score better than a random ranking
// (AUC 0.5, partial ROC ratio 1): its point estimate is at or below it
// (VsRandomAtOrBelow), or its own 95% interval reaches it
// (VsRandomNotShown). Being above the null is then no sign of skill. The
// known-answer study of a model that is the reverse of a good one (AUC
// 0.165) read "above distance_null beyond noise" on test points far from
// the training points, where the null's AUC was 0.110; a model of AUC
// 0.52 whose own interval held 0.5 was read above such a null with no
// word that it showed no skill either.
func aboveWithoutSkill(k MetricKind, g *NullGap) bool {
	if g == nil || !g.Defined || g.Reading != ReadingAbove {
		return false
	}
	v := g.vsRandom(k)
	return v == VsRandomAtOrBelow || v == VsRandomNotShown
}

// noSkillClause is the words that follow "above the null" when
// aboveWithoutSkill holds: the model's own score against random, at or
// below it, or not above it beyond noise (with its interval).
func noSkillClause(k MetricKind, label string, g *NullGap) string {
	lvl, _ := randomLevel(k)
	label = strings.TrimPrefix(label, "the ") // "its own the partial ROC ratio" was written
	if g.vsRandom(k) == VsRandomNotShown {
		if g.ModelP > 0 {
			return fmt.Sprintf("its own %s, %s, is not above %s, that of a random ranking, beyond noise (one-sided p = %s against test points drawn at random over the extent, our cut-off 0.025), so being above the null is no sign of skill",
				label, f3(g.ModelValue), fmtG(lvl), fmtP(g.ModelP))
		}
		return fmt.Sprintf("its own %s, %s, is not above %s, that of a random ranking, beyond noise (its 95%% interval %s to %s reaches it), so being above the null is no sign of skill",
			label, f3(g.ModelValue), fmtG(lvl), f3(g.ModelLow), f3(g.ModelHigh))
	}
	return fmt.Sprintf("its own %s, %s, is at or below %s, that of a random ranking, so being above a null that does worse still is no sign of skill",
		label, f3(g.ModelValue), fmtG(lvl))
}

// pointOnlyClause follows "above the null" when the model's own score is
// above random on its point estimate with no interval to read it by
// (VsRandomPointAbove set by the analysis): whether that is beyond noise
// is not told, and the sentence says so.
func pointOnlyClause(k MetricKind, label string, g *NullGap) string {
	if g.ModelVsRandom != VsRandomPointAbove {
		return ""
	}
	lvl, _ := randomLevel(k)
	label = strings.TrimPrefix(label, "the ")
	why := fmt.Sprintf("fewer than %d common test points (our cut-off)", MinPairedPoints)
	switch {
	case k == MetricPartialROC:
		why = "no area-random p on these test points"
	case g.CommonPoints >= MinPairedPoints:
		why = "no placements of its own on these test points"
	}
	return fmt.Sprintf("; its own %s, %s, is above %s, that of a random ranking, on the point estimate only (no interval: %s)", label, f3(g.ModelValue), fmtG(lvl), why)
}

// readingWords is g's reading as a table shows it ("not above"), with
// "above" qualified where the model itself scores no better than random
// (aboveWithoutSkill), and "the same" for a difference and interval of 0.
func readingWords(k MetricKind, g *NullGap) string {
	if g.Reading == ReadingNotAbove && g.zero() {
		// A copy of the null: "not above" would suggest noise where the
		// sentences say "the same" (every paired difference 0).
		return "the same (every paired difference 0)"
	}
	w := strings.ReplaceAll(g.Reading, "_", " ")
	if aboveWithoutSkill(k, g) {
		lvl, _ := randomLevel(k)
		w += noSkillTag(g.vsRandom(k), lvl)
	}
	return w
}

// noSkillTag follows "above" in a table where the model is not shown
// above lvl, that of a random ranking (aboveWithoutSkill; vs its
// VsRandomAtOrBelow or VsRandomNotShown).
func noSkillTag(vs string, lvl float64) string {
	return fmt.Sprintf(" (model %s: no sign of skill)", noSkillWords(lvl, vs == VsRandomAtOrBelow, vs == VsRandomNotShown))
}

// kindOf is the kind of the metric of key among kinds (buildMetrics'),
// or MetricBoyce, which has no random level, for a key not there.
func kindOf(kinds map[string]MetricKind, key string) MetricKind {
	if k, ok := kinds[key]; ok {
		return k
	}
	return MetricBoyce
}

// noSkillCount says on how many of the extents where an reads the model
// above the null the model itself is not shown above random
// (aboveWithoutSkill), as " (on 1 of them the model itself is at or below
// 0.5, ...)"; "" when on none. The counts alone counted the null plus
// noise "above" the null on an extent where both ranked worse than
// random (AUC 0.082 against 0.052).
func (an *AboveNull) noSkillCount(k MetricKind) string {
	n := 0
	atOrBelow, notShown := false, false
	for i := range an.Gaps {
		if g := &an.Gaps[i]; aboveWithoutSkill(k, g) {
			n++
			atOrBelow = atOrBelow || g.vsRandom(k) == VsRandomAtOrBelow
			notShown = notShown || g.vsRandom(k) == VsRandomNotShown
		}
	}
	if n == 0 {
		return ""
	}
	lvl, _ := randomLevel(k)
	words := noSkillWords(lvl, atOrBelow, notShown)
	if an.Above == 1 {
		// "on 1 of them" would count one of one.
		return fmt.Sprintf(" (there the model itself is %s: no sign of skill)", words)
	}
	on := fmt.Sprintf("on %d of them", n)
	if n == an.Above {
		on = "on each of them" // "on 2 of them" of 2 reads as a part
	}
	return fmt.Sprintf(" (%s the model itself is %s: no sign of skill)", on, words)
}

// gapReading reads a defined interval against 0.
func gapReading(lo, hi float64) string {
	switch {
	case lo > 0:
		return ReadingAbove
	case hi < 0:
		return ReadingBelow
	}
	return ReadingNotAbove
}

// aboveNullMetrics are the metrics compared with the nulls: AUC and the
// partial ROC ratio at every E.
func (a *analysis) aboveNullMetrics() []MetricInfo {
	var out []MetricInfo
	for _, m := range a.metrics {
		if m.Kind == MetricAUC || m.Kind == MetricPartialROC {
			out = append(out, m)
		}
	}
	return out
}

// aboveNull builds every model x null x metric comparison over the
// scored extents ids.
func (a *analysis) aboveNull(ids []string) []AboveNull {
	out := []AboveNull{}
	for _, m := range a.aboveNullMetrics() {
		for _, model := range a.models {
			for _, n := range nulls(a.r) {
				an := AboveNull{Metric: m.Key, Model: model, Null: n.Name, NullKind: n.NullKind, BaseExtent: a.base,
					BaseReading: ReadingUndefined, Gaps: []NullGap{}}
				small, large := math.Inf(1), math.Inf(-1)
				for _, id := range ids {
					p := a.pairedFor(m.Key, PairedKindNull, model, id, n.Name, id)
					if p == nil {
						continue
					}
					g := NullGap{Extent: id, CommonPoints: p.CommonPoints, Method: p.Method, Defined: p.Defined, Reading: ReadingUndefined, nFormed: p.Formed()}
					if i, ok := a.extIndex[id]; ok {
						g.AreaKm2 = a.r.Extents[i].AreaKm2
					}
					if p.Defined {
						// A model against a null is judged: its records
						// carry an interval (Validate).
						se, lo, hi, _ := p.Interval()
						g.ModelValue, g.NullValue, g.Diff, g.SE, g.Low, g.High = p.A, p.B, p.Diff, se, lo, hi
						g.Reading = gapReading(lo, hi)
						a.setModelVsRandom(m.Kind, m.Key, model, n.Name, &g)
						if k := p.notJudgedKind(); k != "" && !(g.zero() && (p.Method != "paired_resamples" || p.Formed() > 0)) {
							// A model the same as the null on the common
							// points (every paired difference 0) is read
							// whatever their number: the cut-offs guard
							// intervals that under-cover on few points,
							// and there is no noise here to cover. It was
							// "not told" for the partial ROC ratio on 12
							// points while its AUC read "the same".
							g.Reading, g.NotJudged = k, p.NotJudgedReason()
						}
						an.Defined++
						switch g.Reading {
						case ReadingTooFew, ReadingTooFewResamples:
						case ReadingAbove:
							an.Above++
						case ReadingBelow:
							an.Below++
						default:
							an.NotAbove++
						}
						if g.AreaKm2 < small {
							small, an.SmallestExtent = g.AreaKm2, id
						}
						if g.AreaKm2 > large {
							large, an.LargestExtent = g.AreaKm2, id
						}
					}
					if id == a.base {
						an.BaseReading = g.Reading
					}
					an.Gaps = append(an.Gaps, g)
				}
				if len(an.Gaps) == 0 {
					continue
				}
				an.Sentence = aboveNullSentence(a.r, m, &an)
				out = append(out, an)
			}
		}
	}
	return out
}

// gap returns the gap of an on extent id, or nil.
func (an *AboveNull) gap(id string) *NullGap {
	for i := range an.Gaps {
		if an.Gaps[i].Extent == id {
			return &an.Gaps[i]
		}
	}
	return nil
}

// aboveNullSentence says whether the model beats the null on the base
// extent (a test of the difference against 0) and how the gap moves from
// the smallest to the largest extent (a description).
func aboveNullSentence(r *Results, m MetricInfo, an *AboveNull) string {
	var b strings.Builder
	null := ModelLabel(r, an.Null)
	g := an.gap(an.BaseExtent)
	score := metricPhrase(m)
	scoreOf := metricOf(m, an.Model)
	against := ""
	if g != nil {
		against = againstText(r, an, g)
	}
	switch {
	case g != nil && !g.Defined && g.CommonPoints < 2:
		// Say on how few: "could not be formed" alone reads as a fault.
		fmt.Fprintf(&b, "On %s, %s minus %s could not be formed: they share %d test point%s.", an.BaseExtent, scoreOf, null, g.CommonPoints, Plural(g.CommonPoints))
	case g == nil || !g.Defined:
		fmt.Fprintf(&b, "On %s, %s minus %s could not be formed%s.", an.BaseExtent, scoreOf, null, undefinedGapWhy(r, m, an))
	case !notJudgedPosition(an.BaseReading) && g.zero():
		// A copy of the null: "not above beyond noise" would suggest
		// noise where there is none.
		fmt.Fprintf(&b, "On %s, %s is the same as that of %s %s.", an.BaseExtent, scoreOf, null, sameText(g))
	case an.BaseReading == ReadingTooFew:
		fmt.Fprintf(&b, "On %s, %s minus %s is %s (%s) on %d common test point%s, fewer than the %d we judge a difference on (our cut-off): whether it beats the null is not told.",
			an.BaseExtent, scoreOf, null, signedSmall(g.Diff), f3(g.ModelValue)+" against "+f3(g.NullValue), g.CommonPoints, Plural(g.CommonPoints), m.minCommonPoints(PairedKindNull))
	case an.BaseReading == ReadingTooFewResamples:
		fmt.Fprintf(&b, "On %s, %s minus %s is %s (%s), its interval from %d formed resample%s, fewer than the %d we judge a difference on (our cut-off): whether it beats the null is not told.",
			an.BaseExtent, scoreOf, null, signedSmall(g.Diff), against, g.nFormed, Plural(g.nFormed), MinPercentileResamples)
	case an.BaseReading == ReadingAbove:
		fmt.Fprintf(&b, "On %s, %s is above %s beyond noise: %s (%s, 95%% interval %s to %s)", an.BaseExtent, scoreOf, null,
			signedSmall(g.Diff), against, signedVs(g.Low, 0), signedVs(g.High, 0))
		if aboveWithoutSkill(m.Kind, g) {
			fmt.Fprintf(&b, "; but %s", noSkillClause(m.Kind, score, g))
		}
		b.WriteString(pointOnlyClause(m.Kind, score, g) + ".")
	case an.BaseReading == ReadingBelow:
		// Wholly below 0: the model is worse than the null beyond noise,
		// which "does not beat" would understate.
		fmt.Fprintf(&b, "On %s, %s is below %s beyond noise: %s (%s, 95%% interval %s to %s).", an.BaseExtent, scoreOf, null,
			signedSmall(g.Diff), against, signedVs(g.Low, 0), signedVs(g.High, 0))
	default:
		// An interval that includes 0 tells neither that the model is
		// above the null nor that it is not: no evidence either way.
		fmt.Fprintf(&b, "On %s, %s is not above %s beyond noise: the difference %s (%s) has a 95%% interval %s to %s that includes 0.", an.BaseExtent, scoreOf, null,
			signedSmall(g.Diff), against, signedVs(g.Low, 0), signedVs(g.High, 0))
	}
	if an.Defined >= 2 && an.allZero() {
		fmt.Fprintf(&b, " Across %d extents it is the same on every one (every paired difference 0).", an.Defined)
		return b.String()
	}
	if an.Defined >= 2 && an.SmallestExtent != an.LargestExtent {
		s, l := an.gap(an.SmallestExtent), an.gap(an.LargestExtent)
		notTold := ""
		kp, kb := an.notRead()
		if kp > 0 {
			notTold += fmt.Sprintf(", and not told on %d with fewer than %d common test points (our cut-off)", kp, m.minCommonPoints(PairedKindNull))
		}
		if kb > 0 {
			notTold += fmt.Sprintf(", and not told on %d with fewer than %d formed resamples (our cut-off)", kb, MinPercentileResamples)
		}
		small, large := an.gapEnds()
		counts := fmt.Sprintf("the model is above the null beyond noise on %d%s, %s and below on %d%s", an.Above, an.noSkillCount(m.Kind), an.withinSame(), an.Below, notTold)
		switch {
		case an.Above+an.NotAbove+an.Below > 0:
		case kb == 0:
			counts = fmt.Sprintf("no extent has the %d common test points we read a gap on (our cut-off)", m.minCommonPoints(PairedKindNull))
		case kp == 0:
			counts = fmt.Sprintf("no gap is read: each interval comes from fewer than the %d formed resamples we read a gap on (our cut-off)", MinPercentileResamples)
		default:
			counts = fmt.Sprintf("no gap is read: each rests on fewer than the %d common test points or the %d formed resamples we read a gap on (our cut-offs)", m.minCommonPoints(PairedKindNull), MinPercentileResamples)
		}
		// "This describes ..." as a sentence of its own: a bracket after
		// the counts' "(our cut-off)" read as two brackets in a row.
		// "the difference (model minus null)", not "the gap": the sign
		// of a gap is left to guess.
		fmt.Fprintf(&b, " Across %d extents the difference (model minus null) %s; %s. This describes the family of extents; it is not a test.",
			an.Defined, gapSpan("runs from", s.Diff, an.SmallestExtent, small, l.Diff, an.LargestExtent, large), counts)
	}
	return b.String()
}

// undefinedGapWhy says why the difference of an on its base extent could
// not be formed when one side's score is undefined there: ": it is
// undefined for coarse there (the 1 - E crossing falls among ...)", or
// "" (the sentence said "could not be formed" with no reason).
func undefinedGapWhy(r *Results, m MetricInfo, an *AboveNull) string {
	var parts []string
	for _, name := range []string{an.Model, an.Null} {
		sc := findScore(r, name, an.BaseExtent)
		if sc == nil {
			continue
		}
		if _, ok, _, _, _, _ := metricValue(m, sc); !ok {
			parts = append(parts, name+undefinedWhy(m, sc))
		}
	}
	if len(parts) == 0 {
		return ""
	}
	return ": it is undefined there for " + strings.Join(parts, " and for ")
}

// againstText is "0.866 against 0.862", the model's and the null's
// values of g, with "on the N test points both score" when that is not
// every test point the model or the null is scored on there: the
// null's score of the tables (on all its points) could otherwise be
// read beside a different value of the null here (helper audit of
// 2026-12-05).
func againstText(r *Results, an *AboveNull, g *NullGap) string {
	t := fmt.Sprintf("%s against %s", f3(g.ModelValue), f3(g.NullValue))
	sc, ns := findScore(r, an.Model, g.Extent), findScore(r, an.Null, g.Extent)
	if sc != nil && ns != nil && (sc.TestPoints != g.CommonPoints || ns.TestPoints != g.CommonPoints) {
		t += fmt.Sprintf(" on the %d test point%s both score", g.CommonPoints, Plural(g.CommonPoints))
	}
	return t
}

// gapSpan says how the model-minus-null gap goes from the smallest
// extent (a, its difference da, note na) to the largest (b, db, nb):
// "moves from +0.042 on a (the smallest extent) to -0.055 on b (the
// largest)" with verb "moves from", or, when the two print alike, "is
// +0.100 on both a (...) and b (...)" ("moves from +0.100 ... to +0.100"
// claimed a change the numbers do not show).
func gapSpan(verb string, da float64, a, na string, db float64, b, nb string) string {
	if signedSmall(da) == signedSmall(db) {
		return fmt.Sprintf("is %s on both %s %s and %s %s", signedSmall(da), a, na, b, nb)
	}
	return fmt.Sprintf("%s %s on %s %s to %s on %s %s", verb, signedSmall(da), a, na, signedSmall(db), b, nb)
}

// notRead counts the defined gaps of an that are not read: kp on fewer
// common test points than the metric is judged on, kb from fewer than
// MinPercentileResamples formed resamples.
func (an *AboveNull) notRead() (kp, kb int) {
	for _, g := range an.Gaps {
		switch {
		case !g.Defined:
		case g.Reading == ReadingTooFew:
			kp++
		case g.Reading == ReadingTooFewResamples:
			kb++
		}
	}
	return kp, kb
}

// why says why g is not read: NotJudged, or its words from the reading
// when NotJudged is not filled (a gap made by hand).
func (g *NullGap) why() string {
	if g.NotJudged != "" || !g.Defined || !notJudgedPosition(g.Reading) {
		return g.NotJudged
	}
	// A gap is of kind null, whose cut-off depends on its method alone.
	return notJudgedReason(g.Reading, "", g.CommonPoints, g.nFormed, minCommonPoints(g.Method, PairedKindNull, ""))
}

// zero reports whether every paired difference of g is 0: the
// difference, its SE and both ends of its interval (an SE of 0 means every
// placement difference, or every paired resample's difference, equals the
// difference, 0). The model then scores as the null does on the common
// test points: "the same", whatever their number (aboveNull).
func (g *NullGap) zero() bool {
	return g.Defined && g.Diff == 0 && g.SE == 0 && g.Low == 0 && g.High == 0
}

// sameText says that the model scores as the null does on g's common
// test points, and why there is nothing to judge: each test point's
// placement is the same (AUC), or the difference is 0 on the common points
// and on each paired resample. No interval is quoted: on fewer common
// points than a difference is judged on, none would be read.
func sameText(g *NullGap) string {
	on := fmt.Sprintf("on their %d common test point%s (%s against %s)", g.CommonPoints, Plural(g.CommonPoints), f3(g.ModelValue), f3(g.NullValue))
	if g.Method == "placements" {
		return on + ": every test point's placement is the same, so there is no gap to judge against noise"
	}
	return on + ": the difference is 0 on them and on every paired resample, so there is no gap to judge against noise"
}

// withinSame is "within noise on 3", or with extents where the model is
// the same as the null, "within noise on 1, the same on 2": counted
// within noise, a copy of the null read as noise where there is none.
func (an *AboveNull) withinSame() string {
	k := an.sameCount()
	if k == 0 {
		return fmt.Sprintf("within noise on %d", an.NotAbove)
	}
	return fmt.Sprintf("within noise on %d, the same on %d", an.NotAbove-k, k)
}

// sameCount counts the gaps of an read "not_above" that are 0 (zero):
// the extents where the model is the same as the null, counted apart
// from those within noise.
func (an *AboveNull) sameCount() int {
	n := 0
	for i := range an.Gaps {
		if g := &an.Gaps[i]; g.Reading == ReadingNotAbove && g.zero() {
			n++
		}
	}
	return n
}

// allZero reports whether every defined gap of an is 0 with its interval
// (the model scores as the null does on every extent).
func (an *AboveNull) allZero() bool {
	n := 0
	for i := range an.Gaps {
		if g := &an.Gaps[i]; g.Defined {
			if !g.zero() {
				return false
			}
			n++
		}
	}
	return n > 0
}

// gapEnds names the two extents the gap's description runs between:
// "(the smallest extent)" and "(the largest)" when they are the smallest
// and largest of the extents compared, "(the smallest extent where it is
// defined)" when the difference is undefined on some smaller one, and
// each end's common test points when they are fewer than the metric is
// judged on (such a gap is a description, not read against 0).
func (an *AboveNull) gapEnds() (small, large string) {
	lo, hi := math.Inf(1), math.Inf(-1)
	for _, g := range an.Gaps {
		lo, hi = math.Min(lo, g.AreaKm2), math.Max(hi, g.AreaKm2)
	}
	end := func(id, word string, all bool) string {
		out := "the " + word
		if word == "smallest" {
			out += " extent"
		}
		if !all {
			out += " where it is defined"
		}
		if g := an.gap(id); g != nil && g.Reading == ReadingTooFew {
			out += fmt.Sprintf(", on %d common test point%s, not read", g.CommonPoints, Plural(g.CommonPoints))
		}
		if g := an.gap(id); g != nil && g.Reading == ReadingTooFewResamples {
			out += fmt.Sprintf(", from %d formed resample%s, not read", g.nFormed, Plural(g.nFormed))
		}
		return "(" + out + ")"
	}
	s, l := an.gap(an.SmallestExtent), an.gap(an.LargestExtent)
	return end(an.SmallestExtent, "smallest", s != nil && s.AreaKm2 <= lo), end(an.LargestExtent, "largest", l != nil && l.AreaKm2 >= hi)
}

// metricOf names metric m of model inside a sentence, the E of a
// partial ROC ratio after the model: "AUC of good", "the partial ROC
// ratio of good at E = 0.05" (scoreName at a sentence's start).
func metricOf(m MetricInfo, model string) string {
	if m.Kind == MetricPartialROC {
		return fmt.Sprintf("the partial ROC ratio of %s at E = %s", model, fmtG(m.E))
	}
	return m.Label + " of " + model
}

// metricPhrase names metric m inside a sentence: "AUC", "the partial ROC
// ratio at E = 0.05".
func metricPhrase(m MetricInfo) string {
	if m.Kind == MetricPartialROC {
		return "the partial ROC ratio at E = " + fmtG(m.E)
	}
	return m.Label
}

// baseGap is one model-minus-null AUC summary with its defined difference
// on the base extent.
type baseGap struct {
	an *AboveNull
	g  *NullGap
}

// baseAUCGaps returns, in Sensitivity.AboveNull order, every AUC summary
// whose difference on the base extent is defined: what the headline and
// the reply to a reviewer say about the nulls.
func (s *Sensitivity) baseAUCGaps() []baseGap {
	var out []baseGap
	for i := range s.AboveNull {
		an := &s.AboveNull[i]
		if an.Metric != "auc" {
			continue
		}
		if g := an.gap(an.BaseExtent); g != nil && g.Defined {
			out = append(out, baseGap{an, g})
		}
	}
	return out
}

// aboveNullCounts is the headline's sentence on the nulls when they and
// the models make more than maxHeadlinePairs pairs: the pairs counted by
// their reading on the base extent (above, within noise, below, not
// told), each named under Analysis.
func aboveNullCounts(gaps []baseGap) string {
	var above, within, same, below, untold, noSkill int
	atOrBelow, notShown := false, false
	for _, bg := range gaps {
		switch bg.an.BaseReading {
		case ReadingNotAbove:
			if bg.g.zero() {
				// A copy of the null: counted "within noise" it read as
				// noise where the methods say "the same".
				same++
			} else {
				within++
			}
		case ReadingAbove:
			above++
			if aboveWithoutSkill(MetricAUC, bg.g) {
				// Counted above, but no sign of skill: say how many.
				noSkill++
				atOrBelow = atOrBelow || bg.g.vsRandom(MetricAUC) == VsRandomAtOrBelow
				notShown = notShown || bg.g.vsRandom(MetricAUC) == VsRandomNotShown
			}
		case ReadingBelow:
			below++
		case ReadingTooFew, ReadingTooFewResamples:
			untold++
		default:
			within++
		}
	}
	skill := ""
	if noSkill > 0 {
		skill = fmt.Sprintf(" (in %d of them the model itself is %s: no sign of skill)", noSkill, noSkillWords(0.5, atOrBelow, notShown))
	}
	out := fmt.Sprintf(" Against the nulls, on %s: of the %d pairs of a model and a null, the model is above the null beyond noise (AUC) in %d%s, within noise in %d and below in %d",
		gaps[0].an.BaseExtent, len(gaps), above, skill, within, below)
	if same > 0 {
		// A pair the same as its null is no noise: counted apart.
		out = fmt.Sprintf(" Against the nulls, on %s: of the %d pairs of a model and a null, the model is above the null beyond noise (AUC) in %d%s, within noise in %d, below in %d and the same (every paired difference 0) in %d",
			gaps[0].an.BaseExtent, len(gaps), above, skill, within, below, same)
	}
	if untold > 0 {
		out += fmt.Sprintf(", not told in %d (too few common test points or resamples, our cut-offs)", untold)
	}
	return out + " (each pair and how its gap moves across the extents under Analysis, Model minus null)."
}

// aboveNullHeadline is the headline's sentence on the nulls: AUC only, one
// clause per model and null, ending with how the gap moves from the
// smallest to the largest extent (named as such, as the summary does).
func aboveNullHeadline(s *Sensitivity) string {
	var parts []string
	nullsNamed := map[string]bool{}
	if gaps := s.baseAUCGaps(); len(gaps) > maxHeadlinePairs {
		return aboveNullCounts(gaps)
	}
	for _, bg := range s.baseAUCGaps() {
		an, g := bg.an, bg.g
		nullsNamed[an.Null] = true
		// The verb follows the interval: wholly above 0, wholly below it,
		// or including it (no evidence either way).
		verb := "is not above"
		switch an.BaseReading {
		case ReadingAbove:
			verb = "is above"
		case ReadingBelow:
			verb = "is below"
		}
		part := fmt.Sprintf("%s %s %s beyond noise on %s (AUC difference %s, 95%% interval %s to %s)", an.Model, verb, an.Null, an.BaseExtent,
			signedSmall(g.Diff), signedVs(g.Low, 0), signedVs(g.High, 0))
		if aboveWithoutSkill(MetricAUC, g) {
			part += " but " + noSkillClause(MetricAUC, "AUC", g)
		}
		if !notJudgedPosition(an.BaseReading) && g.zero() {
			part = fmt.Sprintf("%s scores the same as %s on %s (every paired AUC difference 0, on %d common test point%s)", an.Model, an.Null, an.BaseExtent, g.CommonPoints, Plural(g.CommonPoints))
		}
		if an.BaseReading == ReadingTooFew {
			part = fmt.Sprintf("whether %s beats %s on %s is not told (AUC difference %s on %d test point%s, fewer than our %d)", an.Model, an.Null, an.BaseExtent,
				signedSmall(g.Diff), g.CommonPoints, Plural(g.CommonPoints), MinPairedPoints)
		}
		if an.BaseReading == ReadingTooFewResamples {
			part = fmt.Sprintf("whether %s beats %s on %s is not told (AUC difference %s, not judged, %s)", an.Model, an.Null, an.BaseExtent,
				signedSmall(g.Diff), g.why())
		}
		switch {
		case an.Defined >= 2 && an.allZero():
			part += "; the gap is 0 on every extent"
		case an.Defined >= 2 && an.SmallestExtent != an.LargestExtent:
			sm, lg := an.gap(an.SmallestExtent), an.gap(an.LargestExtent)
			small, large := an.gapEnds()
			// "the gap" left its sign to guess (null minus model reads as
			// naturally); the names say which side is subtracted.
			part += fmt.Sprintf("; %s minus %s ", an.Model, an.Null) + gapSpan("moves from", sm.Diff, an.SmallestExtent, small, lg.Diff, an.LargestExtent, large)
			// How many extents put the model above and below the null:
			// the ends alone can hide that it is below on most.
			if read := an.Above + an.NotAbove + an.Below; read > 0 {
				part += fmt.Sprintf("; %s is above it beyond noise on %d of the %d extent%s read%s, %s and below on %d", an.Model, an.Above, read, Plural(read), an.noSkillCount(MetricAUC), an.withinSame(), an.Below)
			}
		}
		parts = append(parts, part)
	}
	if len(parts) == 0 {
		return ""
	}
	// "the nulls" when the clauses name several ("Against the null:"
	// before clauses on effort and distance_null was written).
	return " Against the null" + Plural(len(nullsNamed)) + ": " + strings.Join(parts, "; ") + "."
}

// aboveNullRows gives the full "model minus null" table of the Analysis
// section: one row per metric, model, null and extent.
func aboveNullRows(r *Results) [][]cell {
	var rows [][]cell
	if r.Sensitivity == nil {
		return nil
	}
	kinds := map[string]MetricKind{}
	for _, m := range buildMetrics(r) {
		kinds[m.Key] = m.Kind
	}
	for _, an := range r.Sensitivity.AboveNull {
		for _, g := range an.Gaps {
			row := []cell{tc(an.Metric), tc(an.Model), tc(ModelLabel(r, an.Null)), tc(g.Extent), areaCell(g.AreaKm2), ic(g.CommonPoints)}
			switch {
			case g.Defined && notJudgedPosition(g.Reading):
				// The difference describes; its interval is not read.
				row = append(row, nc(g.ModelValue, 3), nc(g.NullValue, 3), nc(g.Diff, 3), dash, tc(g.Method), tc("not judged ("+g.why()+")"))
			case g.Defined:
				row = append(row, nc(g.ModelValue, 3), nc(g.NullValue, 3), nc(g.Diff, 3), tc(signedVs(g.Low, 0)+" to "+signedVs(g.High, 0)), tc(g.Method), tc(readingWords(kindOf(kinds, an.Metric), &g)))
			default:
				row = append(row, dash, dash, dash, dash, tc(g.Method), tc("undefined"))
			}
			rows = append(rows, row)
		}
	}
	return rows
}

// aboveNullSummary gives the summary's "model minus null per extent"
// table: one row per extent (family order) and one column per model and
// null with the AUC difference, its 95% interval and the reading.
func aboveNullSummary(r *Results) (head []string, rows [][]cell) {
	if r.Sensitivity == nil {
		return nil, nil
	}
	var cols []*AboveNull
	for i := range r.Sensitivity.AboveNull {
		if an := &r.Sensitivity.AboveNull[i]; an.Metric == "auc" && an.Defined > 0 {
			cols = append(cols, an)
		}
	}
	if len(cols) == 0 {
		return nil, nil
	}
	head = []string{"extent", "area (km²)"}
	for _, an := range cols {
		head = append(head, an.Model+" − "+an.Null)
	}
	for _, e := range r.Extents {
		var row []cell
		has := false
		for _, an := range cols {
			g := an.gap(e.ID)
			if g == nil || !g.Defined {
				row = append(row, dash)
				continue
			}
			has = true
			text := fmt.Sprintf("%s (%s to %s) %s", signedSmall(g.Diff), signedVs(g.Low, 0), signedVs(g.High, 0), readingWords(MetricAUC, g))
			if notJudgedPosition(g.Reading) {
				text = fmt.Sprintf("%s, not judged (%s)", signedSmall(g.Diff), g.why())
			}
			row = append(row, cell{text: text, num: g.Diff, isN: true, cls: "n"})
		}
		if has {
			rows = append(rows, append([]cell{tc(e.ID), areaCell(e.AreaKm2)}, row...))
		}
	}
	return head, rows
}

// aboveNullNote explains the table.
var aboveNullNote = "Model minus null on each extent, on the test points both score: AUC from the per-point placements " +
	"(Student t 95% interval, n − 1 degrees of freedom), the partial ROC ratio from the shared full-size paired resamples (percentile interval). " +
	"\"above\": the interval lies wholly above 0 (followed by \"model at or below 0.5, random: no sign of skill\", or 1 for the partial ROC ratio, where the model's own score is no better than a random ranking, " +
	"and by \"model not shown above 0.5, random: no sign of skill\" where it is better but its own 95% interval reaches 0.5, or 1); " +
	"\"not above\": it includes 0; \"below\": it lies wholly below 0; \"the same\": every paired difference is 0 (a copy of the null), read whatever the number of common test points; " +
	fmt.Sprintf("\"not judged\": fewer than %d common test points (%d for the partial ROC ratio), or an interval from fewer than %d formed resamples; the difference is shown, its interval is not read (our cut-offs). ",
		MinPairedPoints, MinResampledPoints, MinPercentileResamples) +
	"Each row is a test of one difference against 0, not adjusted for the number of extents; how the gap changes from extent to extent is a description."

// aboveNullSummaryNote explains the summary table.
const aboveNullSummaryNote = "AUC of each model minus that of each null on the test points both score, with its 95% interval " +
	"from the per-point placements: \"above\" when the interval lies wholly above 0 (followed by \"model at or below 0.5, random: no sign of skill\" where the model's own AUC is no better than a random ranking, and by \"model not shown above 0.5, random: no sign of skill\" where its own 95% interval reaches 0.5), \"not above\" when it includes 0, " +
	"\"below\" when it lies wholly below 0, \"the same\" when every paired difference is 0 (a copy of the null; read whatever the number of common test points), \"not judged\" (the difference is shown, its interval not read) on fewer than 10 common test points (our cut-off). " +
	"Each interval is a test on its own extent, not adjusted for the number of extents. " +
	"The partial ROC ratio and every sentence are under Analysis, Model minus null."

// How a model's own score on the common test points of a model-minus-null
// gap stands against a random ranking (an AUC of 0.5, a partial ROC ratio
// of 1): NullGap.ModelVsRandom. Being above a null says nothing of skill
// unless the model itself is above random.
const (
	// VsRandomAbove: the model's own 95% interval lies wholly above the
	// random level.
	VsRandomAbove = "above"
	// VsRandomNotShown: the point estimate is above the random level but
	// the 95% interval reaches it: skill is not shown beyond noise.
	VsRandomNotShown = "not_shown_above"
	// VsRandomAtOrBelow: the point estimate is at or below the random
	// level.
	VsRandomAtOrBelow = "at_or_below"
	// VsRandomPointAbove: the point estimate is above the random level and
	// there is no interval to read (fewer than MinPairedPoints common test
	// points for AUC; for the partial ROC ratio no readable half-size
	// bootstrap on exactly these test points): read from the point
	// estimate alone.
	VsRandomPointAbove = "above_point_estimate"
)

// aucInterval is the 95% interval of an AUC from the test points'
// placements: auc ± t SE, t the 0.975 quantile of Student's t with n − 1
// degrees of freedom (as for the paired differences); ok is false on
// fewer than MinPairedPoints test points (our cut-off, as for a paired
// difference), where no interval is read.
func aucInterval(auc, se float64, n int) (lo, hi float64, ok bool) {
	if n < MinPairedPoints {
		return 0, 0, false
	}
	t := metrics.T975(n - 1)
	return auc - t*se, auc + t*se, true
}

// setModelVsRandom reads the model's own score on g's common test points
// against a random ranking (k's level) and fills g.ModelVsRandom,
// g.ModelLow and g.ModelHigh (or g.ModelP). AUC: the interval of
// aucInterval from the model's placements on the test points the null
// also scores. Partial ROC ratio at E (key): its area-random p-value
// (PartialROC.PRandom), when computed on exactly the common test points:
// above below 0.025 (one-sided, as the lower end of a 95% interval; our
// cut-off), else not shown above; never the published bootstrap's
// interval (modelInterval). Without either the point estimate alone
// decides (VsRandomAtOrBelow or VsRandomPointAbove), and the sentence
// says so.
func (a *analysis) setModelVsRandom(k MetricKind, key, model, null string, g *NullGap) {
	lvl, ok := randomLevel(k)
	if !ok || !g.Defined {
		return
	}
	if k == MetricPartialROC && g.ModelValue > lvl {
		if p := a.modelPRandom(key, model, null, g); p > 0 {
			g.ModelP = p
			g.ModelVsRandom = VsRandomNotShown
			if p < randomPCutoff {
				g.ModelVsRandom = VsRandomAbove
			}
			return
		}
	}
	lo, hi, ok := a.modelInterval(k, key, model, null, g)
	switch {
	case g.ModelValue <= lvl:
		g.ModelVsRandom = VsRandomAtOrBelow
	case !ok:
		g.ModelVsRandom = VsRandomPointAbove
	case lo > lvl:
		g.ModelVsRandom = VsRandomAbove
	default:
		g.ModelVsRandom = VsRandomNotShown
	}
	if ok {
		g.ModelLow, g.ModelHigh = lo, hi
	}
}

// modelInterval is the 95% interval of the model's own score on g's
// common test points (setModelVsRandom says which), ok false when there
// is none.
func (a *analysis) modelInterval(k MetricKind, key, model, null string, g *NullGap) (lo, hi float64, ok bool) {
	sc, ns := findScore(a.r, model, g.Extent), findScore(a.r, null, g.Extent)
	if sc == nil || ns == nil {
		return 0, 0, false
	}
	switch k {
	case MetricAUC:
		v, ok := commonPlacements(sc, ns)
		if !ok || len(v) != g.CommonPoints {
			return 0, 0, false
		}
		return aucInterval(g.ModelValue, metrics.PlacementSE(v, metrics.Mean(v)), len(v))
	case MetricPartialROC:
		// None: the only interval of a model's own ratio is the published
		// half-size bootstrap's, which is no calibrated test against 1
		// (PublishedPSize: on a model with no skill it lies wholly above
		// 1 far more often than 2.5% of the time).
		return 0, 0, false
	}
	return 0, 0, false
}

// randomPCutoff is the area-random p-value below which a model's own
// partial ROC ratio reads above random: one-sided 0.025, as the lower end
// of the AUC's 95% interval reads it (our choice).
const randomPCutoff = 0.025

// MinRandomDraws is the fewest formed draws an area-random p-value is
// read on (our cut-off): from d draws the smallest p is 1/(1+d), which
// is below randomPCutoff only from d = 40 on, so a p of fewer draws could
// never read a model as above random, and counting it as a test that the
// model failed would say what the draws cannot tell.
const MinRandomDraws = 40

// randomRead reports whether pr's area-random p-value is read: computed,
// from at least MinRandomDraws formed draws.
func randomRead(pr PartialROC) bool { return pr.PRandom > 0 && pr.RandomFormed >= MinRandomDraws }

// modelPRandom is the area-random p-value of the model's own partial ROC
// ratio at key on g's extent when it was computed on exactly g's common
// test points and from at least MinRandomDraws draws, else 0.
func (a *analysis) modelPRandom(key, model, null string, g *NullGap) float64 {
	sc, ns := findScore(a.r, model, g.Extent), findScore(a.r, null, g.Extent)
	if sc == nil || ns == nil || sc.TestPoints != g.CommonPoints {
		return 0
	}
	for _, pr := range sc.PartialROC {
		if MetricKeyPartialROC(pr.E) == key && pr.Defined && randomRead(pr) {
			return pr.PRandom
		}
	}
	return 0
}

// commonPlacements are the placements of sc's test points that ns (the
// null's score on the same extent) also scores, in sc's order; false when
// sc holds no placement per test point.
func commonPlacements(sc, ns *Score) ([]float64, bool) {
	if len(sc.Placements) != len(sc.TestPointIDs) {
		return nil, false
	}
	in := make(map[int]bool, len(ns.TestPointIDs))
	for _, id := range ns.TestPointIDs {
		in[id] = true
	}
	var v []float64
	for i, id := range sc.TestPointIDs {
		if in[id] {
			v = append(v, sc.Placements[i])
		}
	}
	return v, true
}

// vsRandom is g's ModelVsRandom, or, for a gap without it (a results file
// written before it existed, a gap made by hand), the reading of the
// point estimate alone; "" for a metric with no random level.
func (g *NullGap) vsRandom(k MetricKind) string {
	if g.ModelVsRandom != "" {
		return g.ModelVsRandom
	}
	lvl, ok := randomLevel(k)
	switch {
	case !ok || !g.Defined:
		return ""
	case g.ModelValue <= lvl:
		return VsRandomAtOrBelow
	}
	return VsRandomPointAbove
}

// noSkillWords names, in a table's tag or a count, where the model's own
// score stands against lvl, that of a random ranking: "at or below 0.5,
// random" (VsRandomAtOrBelow), "not shown above 0.5, random"
// (VsRandomNotShown), or both for a count over several extents.
func noSkillWords(lvl float64, atOrBelow, notShown bool) string {
	switch {
	case atOrBelow && notShown:
		return fmt.Sprintf("at or below %s, random, or not shown above it", fmtG(lvl))
	case notShown:
		return fmt.Sprintf("not shown above %s, random", fmtG(lvl))
	}
	return fmt.Sprintf("at or below %s, random", fmtG(lvl))
}
