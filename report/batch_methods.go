package report

import (
	"fmt"
	"slices"
	"strings"
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
	"by the paired difference on the test points both extents hold, with a 95% interval from the per-point placements (DeLong et al. 1988). " +
	"A model's AUC is extent-sensitive when at least one of these intervals lies wholly beyond ±T, robust when every interval lies within ±T, " +
	"and undetermined otherwise (too few test points to tell, or no difference could be formed); T is the study's equivalence tolerance, " +
	"and a difference on fewer than 10 common test points is not judged (our cut-off). " +
	"A study counts as extent-sensitive when AUC is extent-sensitive for at least one of its models, robust when it is robust for every model, " +
	"and undetermined otherwise. These are the verdicts each study's own analysis gives (results.json, sensitivity.verdicts); " +
	"the counts below add them up, and no test across studies is made."

// methodsSections returns the summary's methods text.
func (s *BatchSummary) methodsSections() []textSection {
	sw := strings.TrimSpace(s.Software.Name + " " + s.Software.Version)
	if sw == "" {
		sw = "areasweep"
	}
	c := s.Counts
	methods := fmt.Sprintf("Each of the %d stud%s of the batch was run with %s into its own folder, with its own occurrence records, models and family of evaluation extents. ",
		c.Studies, ies(c.Studies), sw) + ExtentSensitiveDefinition + " " + s.toleranceSentence() +
		" The extent effect of a model is the paired AUC difference from the base extent of largest magnitude, with its interval."
	if c.NullPairs > 0 {
		methods += " Where a study scored a null, each model's AUC minus the null's on the base extent was read against 0 with its 95% interval from the placements " +
			"(the distance-only null of Hijmans 2012 when scored, else the study's first null): above when the interval lies wholly above 0."
	}
	results := []string{s.CountSentence()}
	if c.Pairs > c.Succeeded {
		results = append(results, fmt.Sprintf("Counted by study and model (%d pairs), AUC was extent-sensitive for %d, robust for %d and undetermined for %d.",
			c.Pairs, c.PairsSensitive, c.PairsRobust, c.PairsUndetermined))
	}
	if n := s.testPointsSentence(); n != "" {
		results = append(results, n)
	}
	if e := s.effectSentence(); e != "" {
		results = append(results, e)
	}
	if c.NullPairs > 0 {
		results = append(results, fmt.Sprintf("On the base extent, AUC was above the null beyond noise for %d of %d study-model pairs, within noise of it for %d and below it for %d%s.",
			c.Above, c.NullPairs, c.NotAbove, c.Below, undefinedTail(c.NullPairs-c.Above-c.NotAbove-c.Below)))
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
			Paragraphs: []string{fmt.Sprintf("%d stud%s gave no results and %s left out of every count above:", c.Failed, ies(c.Failed), map[bool]string{true: "is", false: "are"}[c.Failed == 1])},
			List:       failed})
	}
	refs := []string{delong1988}
	if c.NullPairs > 0 {
		refs = append(refs, hijmans2012)
	}
	return append(secs, textSection{Heading: "References", List: refs})
}

// CountSentence is the headline count: "AUC was extent-sensitive for 31 of
// 40 studies, robust for 5 and undetermined for 4." (failed studies named
// apart).
func (s *BatchSummary) CountSentence() string {
	c := s.Counts
	if c.Succeeded == 0 {
		return fmt.Sprintf("None of the %d stud%s gave results.", c.Studies, ies(c.Studies))
	}
	out := fmt.Sprintf("AUC was extent-sensitive for %d of %d stud%s, robust for %d and undetermined for %d.",
		c.Sensitive, c.Succeeded, ies(c.Succeeded), c.Robust, c.Undetermined)
	if c.Failed > 0 {
		out += fmt.Sprintf(" %d further stud%s failed to run and %s not counted.", c.Failed, ies(c.Failed), map[bool]string{true: "is", false: "are"}[c.Failed == 1])
	}
	return out
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

// effectSentence describes the spread of the extent effects.
func (s *BatchSummary) effectSentence() string {
	var defined []BatchRow
	for _, r := range s.Rows {
		if r.EffectDefined {
			defined = append(defined, r)
		}
	}
	if len(defined) == 0 {
		return ""
	}
	lo := slices.MinFunc(defined, func(a, b BatchRow) int { return compareEffect(a, b) })
	hi := slices.MaxFunc(defined, func(a, b BatchRow) int { return compareEffect(a, b) })
	vals := make([]float64, len(defined))
	for i, r := range defined {
		vals[i] = r.Effect
	}
	slices.Sort(vals)
	med := vals[len(vals)/2]
	if len(vals)%2 == 0 {
		med = (vals[len(vals)/2-1] + vals[len(vals)/2]) / 2
	}
	where := func(r BatchRow) string {
		return fmt.Sprintf("%s (study %s, model %s, extent %s, on %d common test point%s)", signed3(r.Effect), r.Study, r.Model, r.EffectExtent, r.EffectPoints, plural(r.EffectPoints))
	}
	if len(defined) == 1 {
		return "The extent effect was " + where(lo) + "."
	}
	return fmt.Sprintf("The extent effects ran from %s to %s, median %s over %d study-model pairs (a description of these studies, not an estimate for others).",
		where(lo), where(hi), signed3(med), len(defined))
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
			return fmt.Sprintf("The study held %d test point%s on its base extent.", ns[0], plural(ns[0]))
		}
		return fmt.Sprintf("Every study held %d test point%s on its base extent.", ns[0], plural(ns[0]))
	}
	med := float64(ns[len(ns)/2])
	if len(ns)%2 == 0 {
		med = float64(ns[len(ns)/2-1]+ns[len(ns)/2]) / 2
	}
	return fmt.Sprintf("The studies held %d to %d test points on their base extents (median %s); the fewer the points, the wider a difference's interval, "+
		"and a difference on fewer than %d common test points is not judged.", ns[0], ns[len(ns)-1], fmtG(med), MinPairedPoints)
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

// undefinedTail says how many comparisons could not be formed.
func undefinedTail(n int) string {
	if n <= 0 {
		return ""
	}
	return fmt.Sprintf("; on %d the difference could not be formed or rests on fewer than %d test points (not read)", n, MinPairedPoints)
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
	for _, sec := range s.methodsSections() {
		fmt.Fprintf(&b, "\n## %s\n", sec.Heading)
		for _, p := range sec.Paragraphs {
			b.WriteString("\n" + p + "\n")
		}
		if len(sec.List) > 0 {
			b.WriteString("\n")
		}
		for _, item := range sec.List {
			b.WriteString("- " + item + "\n")
		}
	}
	return strings.TrimRight(b.String(), "\n") + "\n"
}
