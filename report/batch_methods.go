package report

import (
	"cmp"
	"fmt"
	"math"
	"slices"
	"strings"

	"areasweep/extent/vocab"
)

// textSection is one headed part of the summary's methods text, kept as
// plain paragraphs so that the Markdown file and the HTML page say the
// same words.
type textSection struct {
	Heading    string
	Paragraphs []string
	// List is a bullet list after the paragraphs.
	List []string
}

// delong1988 is cited for the paired AUC differences from placements.
const delong1988 = "DeLong, E.R., DeLong, D.M. & Clarke-Pearson, D.L. (1988) Comparing the areas under two or more correlated receiver operating characteristic curves: a nonparametric approach. Biometrics 44: 837-845."

// ExtentSensitiveDefinition states what the summary counts as an
// extent-sensitive study: the per-study verdicts of Analyze, added up.
const ExtentSensitiveDefinition = "Within each study, and for each model, AUC on every extent was compared with AUC on the study's base extent " +
	"(or, where the base extent could not be scored, on the first scored extent, which stands in for it as the reference) " +
	"by the paired difference on the test points both extents hold, with a Student t 95% interval (n − 1 degrees of freedom for n common test points; Student 1908) from the per-point placements " +
	"(the presence component of the variance of DeLong et al. 1988: an extent's cells are its whole background, not a sample). " +
	"A model's AUC is extent-sensitive when at least one of these intervals lies wholly beyond ±T, robust when every interval lies within ±T, " +
	"and undetermined otherwise (an interval straddles ±T, a difference could not be formed, or it rests on fewer than 10 common test points, " +
	"which we do not judge: our cut-off); T is the study's equivalence tolerance, and the intervals were not adjusted for the number of extents compared. " +
	"A study counts as extent-sensitive when AUC is extent-sensitive for at least one of its models, robust when it is robust for every model, " +
	"and undetermined otherwise, so a study with more models or extents has more chances to count as extent-sensitive and fewer to count as robust. " +
	"These are the verdicts each study's own analysis gives (results.json, sensitivity.verdicts); " +
	"the counts below add them up and describe these studies: no test across studies is made, and they are no estimate for other studies."

// methodsSections returns the summary's methods text.
func (s *BatchSummary) methodsSections() []textSection {
	sw := strings.TrimSpace(s.Software.Name + " " + s.Software.Version)
	if sw == "" {
		sw = "areasweep"
	}
	c := s.Counts
	methods := s.runSentence(sw) + ExtentSensitiveDefinition + " " + s.toleranceSentence() +
		" The extent effect of a model is the paired AUC difference from the base extent of largest magnitude, with its interval; " +
		"each study's extents are built from its own region, points and buffers, so the extent effects of two studies compare different extents, " +
		"and an extent of one name (for example region_50km or hull) differs between studies."
	methods += " " + s.independenceSentence()
	if c.NullPairs > 0 {
		methods += " Where a study scored a null, each model's AUC minus the null's on the base extent was read against 0 with its 95% interval from the placements " +
			"(the distance-only null, minus the distance to the nearest training record, after Hijmans 2012, when scored; else the study's first null): above when the interval lies wholly above 0, below when wholly below, " +
			fmt.Sprintf("not read on fewer than %d common test points (our cut-off). Each reading is a test within its study, not adjusted for the number of models or studies; ", MinPairedPoints) +
			"the counts add them up and are no test across studies."
	}
	results := []string{s.CountSentence()}
	if w := s.notJudgedSentence(); w != "" {
		results = append(results, w)
	}
	if w := s.standInSentence(); w != "" {
		results = append(results, w)
	}
	if c.Pairs > c.Succeeded {
		results = append(results, fmt.Sprintf("Counted by study and model (%d pairs; the models of one study share its test points, so its pairs are not independent), AUC was extent-sensitive for %d, robust for %d and undetermined for %d%s.",
			c.Pairs, c.PairsSensitive, c.PairsRobust, c.PairsUndetermined, notJudgedTail(c.PairsNotJudged, c.PairsNotJudgedUnscored, c.PairsUndetermined, true)))
	}
	if a := s.areaSentence(); a != "" {
		results = append(results, a)
	}
	if n := s.testPointsSentence(); n != "" {
		results = append(results, n)
	}
	if e := s.effectSentence(); e != "" {
		results = append(results, e)
	}
	if c.NullPairs > 0 {
		same := ""
		if c.Same > 0 {
			same = fmt.Sprintf(", the same as it (every paired difference 0) for %d", c.Same)
		}
		results = append(results, fmt.Sprintf("On the base extent, AUC was above the null beyond noise for %d of %d study-model pair%s%s, within noise of it for %d%s and below it for %d%s.",
			c.Above, c.NullPairs, Plural(c.NullPairs), s.nullKindTail(), c.NotAbove, same, c.Below, nullTail(c.TooFew, c.NullPairs-c.Above-c.NotAbove-c.Same-c.Below-c.TooFew))+s.noSkillSentence()+s.noNullSentence())
	}
	secs := []textSection{
		{Heading: "Methods", Paragraphs: []string{methods}},
		{Heading: "Results", Paragraphs: results},
	}
	if c.Failed > 0 {
		var failed []string
		for _, st := range s.Studies {
			if !st.OK {
				failed = append(failed, st.ID+": "+st.Error)
			}
		}
		secs = append(secs, textSection{Heading: "Failed studies",
			Paragraphs: []string{s.failedLead()},
			List:       failed})
	}
	refs := []string{delong1988}
	if c.NullPairs > 0 {
		refs = append(refs, hijmans2012)
	}
	refs = append(refs, student1908)
	return append(secs, textSection{Heading: "References", List: refs})
}

// failedLead opens the list of failed studies; with no study counted
// there is no count above to leave them out of.
func (s *BatchSummary) failedLead() string {
	c := s.Counts
	lead := fmt.Sprintf("%d stud%s gave no usable results (each line says why: a failure, or results that no longer match the table)", c.Failed, ies(c.Failed))
	if c.Succeeded == 0 {
		return lead + ":"
	}
	return lead + fmt.Sprintf(" and %s left out of every count above:", map[bool]string{true: "is", false: "are"}[c.Failed == 1])
}

// runSentence opens the methods text: how the studies that gave usable
// results were run (failed studies are named apart, in their own section).
func (s *BatchSummary) runSentence(sw string) string {
	const how = " with %s into its own folder, with the occurrence records, models, region and extent settings of its row of the study table. "
	c := s.Counts
	who := fmt.Sprintf("Each of the %d studies of the batch", c.Succeeded)
	switch {
	case c.Succeeded == 0:
		return fmt.Sprintf("Each study of the batch was to be run"+how, sw)
	case c.Succeeded == 1:
		who = "The one study of the batch"
	}
	if c.Failed > 0 {
		who += " that gave usable results"
	}
	return fmt.Sprintf(who+" was run"+how, sw)
}

// CountSentence is the headline count: "AUC was extent-sensitive for 31 of
// 40 studies, robust for 5 and undetermined for 4." (failed studies named
// apart).
func (s *BatchSummary) CountSentence() string {
	c := s.Counts
	switch {
	case c.Succeeded == 0 && c.Studies == 1:
		return "The one study gave no usable results."
	case c.Succeeded == 0:
		return fmt.Sprintf("None of the %d stud%s gave usable results.", c.Studies, ies(c.Studies))
	}
	out := fmt.Sprintf("AUC was extent-sensitive for %d of %d stud%s, robust for %d and undetermined for %d%s.",
		c.Sensitive, c.Succeeded, ies(c.Succeeded), c.Robust, c.Undetermined, notJudgedTail(c.NotJudged, c.NotJudgedUnscored, c.Undetermined, false))
	if c.Succeeded == 1 {
		// "1 of 1 study, robust for 0 and undetermined for 0" counts
		// what a single verdict says in one word.
		out = "AUC was " + oneVerdict(c) + " for the one study" + map[bool]string{true: " that gave usable results"}[c.Failed > 0] +
			notJudgedTail(c.NotJudged, c.NotJudgedUnscored, c.Undetermined, false) + "."
	}
	if v, ok := sharedVerdict(c); ok && c.Succeeded >= 2 {
		// Not "for 0 of 2 studies, robust for 2 and undetermined for 0",
		// nor "for 12 of 12 studies, robust for 0 and undetermined for 0".
		tail := notJudgedTail(c.NotJudged, c.NotJudgedUnscored, c.Undetermined, false)
		all := fmt.Sprintf("all %d studies", c.Succeeded)
		if c.Succeeded == 2 {
			all = "both studies"
			if c.NotJudged == 2 {
				tail = strings.Replace(tail, ", none of which was judged", ", neither of which was judged", 1)
			}
		}
		out = "AUC was " + v + " for " + all + map[bool]string{true: " that gave usable results"}[c.Failed > 0] + tail + "."
	}
	if c.Failed > 0 {
		out += fmt.Sprintf(" %d further stud%s gave no usable results and %s not counted.", c.Failed, ies(c.Failed), map[bool]string{true: "is", false: "are"}[c.Failed == 1])
	}
	return out
}

// sharedVerdict is the verdict every study with results shares, and
// whether they share one.
func sharedVerdict(c BatchCounts) (string, bool) {
	switch c.Succeeded {
	case c.Sensitive:
		return "extent-sensitive", true
	case c.Robust:
		return "robust", true
	case c.Undetermined:
		return "undetermined", true
	}
	return "", false
}

// oneVerdict is the verdict of the one study with results.
func oneVerdict(c BatchCounts) string {
	v, _ := sharedVerdict(c)
	return v
}

// toleranceSentence names the tolerances used.
func (s *BatchSummary) toleranceSentence() string {
	var ts []string
	for _, t := range s.Tolerances {
		ts = append(ts, fmtG(t))
	}
	switch {
	case len(ts) == 0:
		return ""
	case len(ts) == 1 && s.Tolerances[0] == DefaultToleranceAUC:
		return fmt.Sprintf("Every study used T = %s, our own default (a fiftieth of the AUC scale), not a published standard.", ts[0])
	case len(ts) == 1:
		return fmt.Sprintf("Every study used T = %s.", ts[0])
	}
	return fmt.Sprintf("The studies used T = %s (the default, %s, is our own choice, not a published standard).", joinList(ts), fmtG(DefaultToleranceAUC))
}

// effectSentence describes the spread of the extent effects: their range
// (signed), how many are negative and positive, the median of their
// magnitudes, and how many rest on fewer than MinPairedPoints common test
// points. The effects are maxima over each study's own extents, which
// differ between studies, and the pairs of one study share their test
// points: a description of these studies, not an estimate for others.
func (s *BatchSummary) effectSentence() string {
	var defined []BatchRow
	studies := map[string]bool{}
	for _, r := range s.Rows {
		if r.EffectDefined {
			defined = append(defined, r)
			studies[r.Study] = true
		}
	}
	if len(defined) == 0 {
		return ""
	}
	lo := slices.MinFunc(defined, func(a, b BatchRow) int { return compareEffect(a, b) })
	hi := slices.MaxFunc(defined, func(a, b BatchRow) int { return compareEffect(a, b) })
	mags := make([]float64, len(defined))
	neg, pos, zero, few := 0, 0, 0, 0
	for i, r := range defined {
		mags[i] = math.Abs(r.Effect)
		switch {
		case r.Effect < 0:
			neg++
		case r.Effect > 0:
			pos++
		default:
			zero++
		}
		if !r.EffectJudged {
			few++
		}
	}
	slices.Sort(mags)
	med := mags[len(mags)/2]
	if len(mags)%2 == 0 {
		med = (mags[len(mags)/2-1] + mags[len(mags)/2]) / 2
	}
	place := func(r BatchRow) string {
		return fmt.Sprintf("study %s, model %s, extent %s%s, on %d common test point%s", r.Study, r.Model, r.EffectExtent, effectReference(r), r.EffectPoints, Plural(r.EffectPoints))
	}
	where := func(r BatchRow) string { return signedSmall(r.Effect) + " (" + place(r) + ")" }
	lower := "AUC lower on the extent than on the base extent"
	if slices.ContainsFunc(defined, func(r BatchRow) bool { return effectReference(r) != "" }) {
		lower = "AUC lower on the extent than on its study's base extent, or on the reference extent that stands in for it"
	}
	fewText := ""
	if few > 0 {
		fewText = fmt.Sprintf(" Of these, %d rest%s on fewer than %d common test points and %s not judged (our cut-off).", few, map[bool]string{true: "s"}[few == 1], MinPairedPoints, map[bool]string{true: "was", false: "were"}[few == 1])
	}
	if len(defined) == 1 {
		return "The extent effect was " + where(lo) + "." + strings.Replace(fewText, " Of these, 1 rests", " It rests", 1)
	}
	zeroText := ""
	if zero > 0 {
		zeroText = fmt.Sprintf(", %d zero", zero)
	}
	span := fmt.Sprintf("The extent effects ran from %s to %s", where(lo), where(hi))
	if signedSmall(lo.Effect) == signedSmall(hi.Effect) {
		// "ran from +0.078 (...) to +0.078 (...)" reads as a misprint:
		// the two ends print alike.
		span = fmt.Sprintf("The extent effects all read %s as printed here (the smallest: %s; the largest: %s)", signedSmall(lo.Effect), place(lo), place(hi))
	}
	return fmt.Sprintf("%s: %d negative (%s, on their common test points)%s and %d positive, "+
		"their magnitudes of median %s over %d study-model pairs from %d stud%s.%s "+
		"Each is the largest by magnitude of its model's differences in its study, over extents that differ between studies, and the pairs of one study share its test points: "+
		"a description of these studies, not an estimate for others.",
		span, neg, lower, zeroText, pos, smallPositive(med), len(defined), len(studies), ies(len(studies)), fewText)
}

// effectReference names the extent a row's extent effect is taken from
// when another extent stands in for its study's base extent (" against
// the reference extent region_50km", as the study's own report names
// it); "" when the base extent is the reference.
func effectReference(r BatchRow) string {
	if r.BaseExtent == "" || r.BaseExtent == vocab.BaseID {
		return ""
	}
	return " against the reference extent " + r.BaseExtent
}

// testPointsSentence gives the span of the studies' test points on their
// base extents, so that a reader weighs a study of 12 points against one
// of 500: "The studies held 12 to 500 test points on their base extents
// (median 60)." Empty when no study's count is known.
func (s *BatchSummary) testPointsSentence() string {
	var ns []int
	for _, st := range s.Studies {
		if n, ok := s.TestPoints(st.ID); st.OK && ok {
			ns = append(ns, n)
		}
	}
	if len(ns) == 0 {
		return ""
	}
	slices.Sort(ns)
	if ns[0] == ns[len(ns)-1] {
		if len(ns) == 1 {
			return fmt.Sprintf("The study held %d test point%s on its base extent.", ns[0], Plural(ns[0]))
		}
		return fmt.Sprintf("Every study held %d test point%s on its base extent.", ns[0], Plural(ns[0]))
	}
	med := float64(ns[len(ns)/2])
	if len(ns)%2 == 0 {
		med = float64(ns[len(ns)/2-1]+ns[len(ns)/2]) / 2
	}
	return fmt.Sprintf("The studies held %d to %d test points on their base extents (median %s); other things equal, the fewer the points, the wider a difference's interval, "+
		"and a difference on fewer than %d common test points is not judged (our cut-off).", ns[0], ns[len(ns)-1], fmtG(med), MinPairedPoints)
}

// compareEffect orders rows by effect, then study and model.
func compareEffect(a, b BatchRow) int {
	switch {
	case a.Effect < b.Effect:
		return -1
	case a.Effect > b.Effect:
		return 1
	case a.Study != b.Study:
		return strings.Compare(a.Study, b.Study)
	}
	return strings.Compare(a.Model, b.Model)
}

// nullTail says how many readings against a null were not made: tooFew
// on fewer than MinPairedPoints common test points, undefined where no
// difference could be formed.
func nullTail(tooFew, undefined int) string {
	out := ""
	if tooFew > 0 {
		out += fmt.Sprintf("; %d rest%s on fewer than %d common test points and %s not read (our cut-off)", tooFew, map[bool]string{true: "s"}[tooFew == 1], MinPairedPoints, map[bool]string{true: "was", false: "were"}[tooFew == 1])
	}
	if undefined > 0 {
		out += fmt.Sprintf("; on %d no difference could be formed", undefined)
	}
	return out
}

// noSkillSentence names the study-model pairs counted above the null
// whose model's own AUC on the base extent is not shown above 0.5
// (BatchRow.NullNoSkill): those at or below it are above a null that
// ranks worse than random, those whose own interval reaches 0.5 are not
// shown to rank better than random; neither shows skill, which the count
// alone would suggest. "" when there are none.
func (s *BatchSummary) noSkillSentence() string {
	var low, unshown []string
	for _, r := range s.Rows {
		switch r.NullNoSkill {
		case VsRandomAtOrBelow:
			low = append(low, r.Model+" of study "+r.Study)
		case VsRandomNotShown:
			unshown = append(unshown, r.Model+" of study "+r.Study)
		}
	}
	has := func(n int) string { return map[bool]string{true: "has", false: "have"}[n == 1] }
	var parts []string
	if len(low) > 0 {
		parts = append(parts, fmt.Sprintf("%d (%s) %s an AUC at or below 0.5 on the base extent, that of a random ranking: above a null that does worse still", len(low), joinList(low), has(len(low))))
	}
	if len(unshown) > 0 {
		parts = append(parts, fmt.Sprintf("%d (%s) %s an AUC above 0.5 on the base extent whose own 95%% interval from the placements reaches 0.5: not shown to rank better than random", len(unshown), joinList(unshown), has(len(unshown))))
	}
	if len(parts) == 0 {
		return ""
	}
	return fmt.Sprintf(" Of the %d above, %s, which is no sign of skill.", s.Counts.Above, strings.Join(parts, "; and "))
}

// noNullSentence names the study-model pairs that have no comparison
// with a null (the study scored none, as with no-distance-null, or the
// model was not compared on the base extent), which the null counts
// leave out: without it "0 of 1 study-model pair" of a batch of two pairs
// would not say where the other went. "" when every pair has one.
func (s *BatchSummary) noNullSentence() string {
	var pairs []string
	for _, r := range s.Rows {
		if r.Null == "" {
			pairs = append(pairs, r.Study+" ("+r.Model+")")
		}
	}
	if len(pairs) == 0 {
		return ""
	}
	n := len(pairs)
	return fmt.Sprintf(" %d study-model pair%s %s no comparison with a null and %s not counted there: %s.",
		n, Plural(n), map[bool]string{true: "has", false: "have"}[n == 1], map[bool]string{true: "is", false: "are"}[n == 1], joinList(pairs))
}

// nullKindTail names the nulls behind the null counts when they are not
// all the distance-only null.
func (s *BatchSummary) nullKindTail() string {
	c := s.Counts
	switch {
	case c.NullDistance == c.NullPairs:
		return " (against the distance-only null)"
	case c.NullDistance == 0:
		return " (against each study's first null; none scored the distance-only null)"
	}
	return fmt.Sprintf(" (against the distance-only null in %d, against the study's first null in %d: different nulls)", c.NullDistance, c.NullPairs-c.NullDistance)
}

// notJudgedTail says how many of the undetermined verdicts rest on no
// judged difference at all, and why: no difference on MinPairedPoints or
// more common test points, or (unscored of them) no model scored on any
// extent. pairs: the counts are of study-model pairs, not of studies.
func notJudgedTail(notJudged, unscored, undetermined int, pairs bool) string {
	if notJudged == 0 {
		return ""
	}
	few := fmt.Sprintf("no difference from the base extent on %d or more common test points, our cut-off", MinPairedPoints)
	var why string
	switch {
	case unscored == 0:
		why = few
	case unscored == notJudged && pairs:
		why = map[bool]string{true: "its model is", false: "their models are"}[unscored == 1] + " scored on no extent"
	case unscored == notJudged:
		why = "no model of " + map[bool]string{true: "it", false: "them"}[unscored == 1] + " is scored on any extent"
	case pairs:
		why = fmt.Sprintf("%s; in %d, the model is scored on no extent", few, unscored)
	default:
		why = fmt.Sprintf("%s; in %d, no model is scored on any extent", few, unscored)
	}
	switch {
	case notJudged == undetermined && notJudged == 1:
		return ", which was not judged (" + why + ")"
	case notJudged == undetermined:
		return ", none of which was judged (" + why + ")"
	}
	return fmt.Sprintf(", %d of which %s not judged (%s)", notJudged, map[bool]string{true: "was", false: "were"}[notJudged == 1], why)
}

// notJudgedSentence names the studies counted undetermined without any
// judged difference, "" when there are none.
func (s *BatchSummary) notJudgedSentence() string {
	var ids []string
	for _, st := range s.Studies {
		switch {
		case st.OK && st.Unscored:
			ids = append(ids, fmt.Sprintf("%s (%s)", st.ID, st.UnscoredWhy))
		case st.OK && st.NotJudged:
			ids = append(ids, st.ID)
		}
	}
	if len(ids) == 0 {
		return ""
	}
	return fmt.Sprintf("Not judged, so counted neither robust nor extent-sensitive: %s.", joinList(ids))
}

// standInSentence names the studies whose base extent could not be scored
// and the extent that stood in for it, "" when there are none.
func (s *BatchSummary) standInSentence() string {
	var items []string
	for _, st := range s.Studies {
		if st.OK && st.StandIn != "" {
			items = append(items, fmt.Sprintf("%s (%s stands in; base extent left out: %s)", st.ID, st.BaseExtent, st.StandIn))
		}
	}
	if len(items) == 0 {
		return ""
	}
	n := len(items)
	return fmt.Sprintf("In %d stud%s the base extent could not be scored and the first scored extent is the reference for %s differences, test points and null comparison "+
		"(\"base extent\" in this summary and in summary.csv's base_extent means that extent for %s): %s.",
		n, ies(n), map[bool]string{true: "its", false: "their"}[n == 1], map[bool]string{true: "it", false: "them"}[n == 1], joinList(items))
}

// areaSentence gives the span of the reference extents' areas, "" with
// fewer than two studies.
func (s *BatchSummary) areaSentence() string {
	var ok []StudySummary
	for _, st := range s.Studies {
		if st.OK && st.BaseAreaKm2 > 0 {
			ok = append(ok, st)
		}
	}
	if len(ok) < 2 {
		return ""
	}
	lo := slices.MinFunc(ok, func(a, b StudySummary) int { return cmp.Compare(a.BaseAreaKm2, b.BaseAreaKm2) })
	hi := slices.MaxFunc(ok, func(a, b StudySummary) int { return cmp.Compare(a.BaseAreaKm2, b.BaseAreaKm2) })
	if fmtArea(lo.BaseAreaKm2) == fmtArea(hi.BaseAreaKm2) {
		// Two ends that print alike (one region for every study) would
		// read as a span between two studies.
		return fmt.Sprintf("Every base extent covered %s km².", fmtArea(hi.BaseAreaKm2))
	}
	return fmt.Sprintf("The base extents ran from %s km² (%s) to %s km² (%s).", fmtArea(lo.BaseAreaKm2), lo.ID, fmtArea(hi.BaseAreaKm2), hi.ID)
}

// independenceSentence says how far the studies are independent of one
// another: not where they share an occurrence file (same SHA-256), and
// not known beyond the files.
func (s *BatchSummary) independenceSentence() string {
	out := "Studies are independent of one another only as far as their data are; the summary compares the occurrence files only (by SHA-256), " +
		"and studies with different files may still share records, ranges or models."
	var groups []string
	for _, g := range s.SharedOccurrences() {
		groups = append(groups, joinList(g))
	}
	if len(groups) > 0 {
		out += fmt.Sprintf(" These studies use one and the same occurrence file, so their verdicts rest on the same test points and are not independent: %s.", strings.Join(groups, "; "))
	}
	return out
}

// ies is the plural ending of "study".
func ies(n int) string {
	if n == 1 {
		return "y"
	}
	return "ies"
}

// MethodsText returns summary_methods.md: the methods paragraph with the
// definition of an extent-sensitive study, the counts, the failed studies
// and the references.
func (s *BatchSummary) MethodsText() string {
	var b strings.Builder
	b.WriteString("# Summary across studies\n\nReady to paste; every number comes from the studies' own results. Edit freely.\n")
	// Every text goes through mdText: study ids, model names and the
	// failed studies' errors (with their paths) are the user's.
	for _, sec := range s.methodsSections() {
		fmt.Fprintf(&b, "\n## %s\n", mdText(sec.Heading))
		for _, p := range sec.Paragraphs {
			b.WriteString("\n" + mdText(p) + "\n")
		}
		if len(sec.List) > 0 {
			b.WriteString("\n")
		}
		for _, item := range sec.List {
			b.WriteString("- " + mdText(item) + "\n")
		}
	}
	return strings.TrimRight(b.String(), "\n") + "\n"
}
