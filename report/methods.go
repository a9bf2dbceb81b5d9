package report

import (
	"fmt"
	"math"
	"slices"
	"strings"

	"areasweep/extent/vocab"
	"areasweep/metrics"
)

// joinList joins items as "a, b and c".
func joinList(items []string) string {
	switch len(items) {
	case 0:
		return ""
	case 1:
		return items[0]
	}
	return strings.Join(items[:len(items)-1], ", ") + " and " + items[len(items)-1]
}

func fmtList(vs []float64, unit string) string {
	var s []string
	for _, v := range vs {
		s = append(s, fmtG(v))
	}
	out := joinList(s)
	if unit != "" && out != "" {
		out += " " + unit
	}
	return out
}

// methodsDoc is the methods text of one run as plain text in headed
// sections (textSection, as the summary's): methods.md writes it as
// Markdown (markdown) and report.html as headings, paragraphs and a list,
// so that the page shows the user's names as written rather than with the
// backslashes that only a Markdown viewer drops.
type methodsDoc struct {
	// Title heads methods.md; the page's own heading stands for it.
	Title    string
	Intro    string
	Sections []textSection
}

// methodsOf returns the methods text of r: a methods paragraph and a
// reply to a reviewer, both filled with the run's numbers, and the
// references.
func methodsOf(r *Results) methodsDoc {
	sw := strings.TrimSpace(r.Software.Name + " " + r.Software.Version)
	if sw == "" {
		sw = "areasweep"
	}
	var m strings.Builder
	methodsFamily(&m, r, sw)
	methodsRecords(&m, r)
	methodsScores(&m, r)
	methodsInference(&m, r)
	// Results in numbers.
	m.WriteString("Results: ")
	m.WriteString(resultNumbers(r))
	reply := reviewerText(r)
	refs := slices.Clone(references)
	if strings.Contains(m.String()+reply, "Hijmans 2012") {
		refs = append(refs, hijmans2012)
		slices.Sort(refs)
	}
	return methodsDoc{
		Title: "Methods text (" + sw + ")",
		Intro: "Ready to paste; every number comes from this run. Edit freely. The scores are evaluation aids: they describe how well the models rank the test records against the background of each extent, nothing more.",
		Sections: []textSection{
			{Heading: "Methods", Paragraphs: []string{m.String()}},
			{Heading: "Reply to a reviewer", Paragraphs: []string{reply}},
			{Heading: "References", List: refs},
		},
	}
}

// markdown writes d as methods.md. Every text goes through mdText: the
// sentences hold the user's paths, names and ids, and are the same as
// those of report.html.
func (d methodsDoc) markdown() string {
	var b strings.Builder
	fmt.Fprintf(&b, "# %s\n\n%s\n\n", mdText(d.Title), mdText(d.Intro))
	for k, sec := range d.Sections {
		fmt.Fprintf(&b, "## %s\n\n", mdText(sec.Heading))
		for _, p := range sec.Paragraphs {
			b.WriteString(mdText(p) + "\n\n")
		}
		for _, item := range sec.List {
			b.WriteString("- " + mdText(item) + "\n")
		}
		if len(sec.List) > 0 && k < len(d.Sections)-1 {
			b.WriteString("\n")
		}
	}
	return b.String()
}

// methodsText returns methods.md for r.
func methodsText(r *Results) string { return methodsOf(r).markdown() }

// methodsFamily writes the methods paragraph's first sentences: the
// models, the family of extents (software sw), and the extents left out
// and the models not scored on some.
func methodsFamily(b *strings.Builder, r *Results, sw string) {
	s := r.Sensitivity
	models := s.ModelNames
	var ok []Extent
	for _, e := range r.Extents {
		if e.Status == vocab.StatusOK {
			ok = append(ok, e)
		}
	}
	fam := familyList(ok)
	family := fmt.Sprintf("a family of %d evaluation extents", len(ok))
	if len(ok) == 1 {
		// "a family of 1 evaluation extent", then "not among the 1".
		family = "one evaluation extent"
	}
	fmt.Fprintf(b, "We rescored %d suitability model%s (%s) on %s built with %s: %s. Nothing was refitted: each extent is only the background against which the same predictions are evaluated.",
		len(models), Plural(len(models)), joinList(models), family, sw, joinList(fam))
	methodsLeftOut(b, s, len(ok))
	if len(s.Unscored) > 0 {
		var us []string
		for _, u := range s.Unscored {
			us = append(us, fmt.Sprintf("%s on %s (%s)", u.Model, u.Extent, u.Reason))
		}
		fmt.Fprintf(b, " Not scored: %s.", joinList(us))
	}
}

// methodsLeftOut writes the extents left out of the scoring, apart by
// whether the family's count of n holds them: an extent of the family
// that no model could be scored on is one of the n, so the sentence says
// how many remain; an empty or duplicate extent was built but is not one
// of them ("a family of 15 ... Left out: X (same cells as base)" read as
// 14 scored when 15 were).
func methodsLeftOut(b *strings.Builder, s *Sensitivity, n int) {
	var of, besides []string
	for _, e := range s.SkippedExtents {
		w := fmt.Sprintf("%s (%s)", e.ID, e.Reason)
		if e.Status == vocab.StatusOK {
			of = append(of, w)
		} else {
			besides = append(besides, w)
		}
	}
	if len(of) > 0 {
		fmt.Fprintf(b, " Left out of the %d: %s, so %d %s scored.", n, joinList(of), len(s.ScoredExtents), wasWere(len(s.ScoredExtents)))
	}
	switch {
	case len(besides) > 0 && n == 1:
		fmt.Fprintf(b, " Also built, but not evaluated apart from it: %s.", joinList(besides))
	case len(besides) > 0:
		fmt.Fprintf(b, " Also built but not among the %d: %s.", n, joinList(besides))
	}
}

// wasWere is the past of "to be" for a count of n.
func wasWere(n int) string {
	if n == 1 {
		return "was"
	}
	return "were"
}

// methodsRecords writes how many occurrence records were used, why the
// others were dropped, and how many test records each extent holds when
// they differ.
func methodsRecords(b *strings.Builder, r *Results) {
	s := r.Sensitivity
	pc := r.PointCounts
	fmt.Fprintf(b, " We used %d training and %d test occurrence records", pc.Train, pc.Test)
	var dropped []string
	if pc.Thinned > 0 {
		dropped = append(dropped, fmt.Sprintf("%d thinned to one record per cell", pc.Thinned))
	}
	if pc.OutsideRaster > 0 {
		dropped = append(dropped, fmt.Sprintf("%d outside the raster", pc.OutsideRaster))
	}
	if pc.NoData > 0 {
		dropped = append(dropped, fmt.Sprintf("%d on no data", pc.NoData))
	}
	if len(dropped) > 0 {
		fmt.Fprintf(b, " (%s)", joinList(dropped))
	}
	b.WriteString(".")
	if s.TestPointsVary {
		var fewer []string
		all := 0
		for i, id := range s.ScoredExtents {
			if i >= len(s.TestPoints) {
				continue
			}
			if s.TestPoints[i] == pc.Test {
				all++
			} else {
				fewer = append(fewer, fmt.Sprintf("%s %d", id, s.TestPoints[i]))
			}
		}
		holdAll := ""
		if all > 0 {
			holdAll = fmt.Sprintf("%s on %d of the %d extents; ", allOf(pc.Test), all, len(s.ScoredExtents))
		}
		fmt.Fprintf(b, " Each extent is scored on the test records inside it, so the extents differ in their test records: %s%s.", holdAll, fewerList(s, fewer, all > 0))
	}
}

// allOf names every one of n test records: "all 60", "both" for 2, "the
// one" for 1 ("all 2 on 8 of the 11 extents" was written).
func allOf(n int) string {
	switch n {
	case 1:
		return "the one"
	case 2:
		return "both"
	}
	return fmt.Sprintf("all %d", n)
}

// methodsScores writes what was computed on each extent: the AUC, the
// partial ROC ratio, the omission rates, the predicted area and the
// Boyce index, with their settings. Each score, and the binomial test's
// null, is defined in the sentence itself as its paper does (E as the
// omission allowed, the ratio against the random line, the Boyce index as
// a Spearman correlation over a moving window), so that the text stands
// without the report's Terms.
func methodsScores(b *strings.Builder, r *Results) {
	st := r.Settings
	fmt.Fprintf(b, " On each extent we computed the full AUC (Hanley & McNeil 1982) of the test records against every cell of the extent, weighted by cell area (%s); the presences' own cells are part of that background", strings.TrimSpace(r.Grid.CellAreaNote))
	if len(st.E) > 0 {
		fmt.Fprintf(b, "; the partial ROC ratio (Peterson et al. 2008: the area under the ROC curve where at most a share E of the test records is omitted, over the area under the random line there; 1 is random) at E = %s, with x_E, the share of the area where the curve reaches 1 − E, interpolated linearly along the curve segment that crosses 1 − E, reported as undefined where that crossing falls among test records tied at one value (the reading at thresholds only is given instead), and with its own interval and p-value from %s of %d resample%s of %s%% of the test records (seeded from the run seed %d with the extent's name, not the model's; p is not resolved below 1/%d",
			fmtList(st.E, ""), bootstrapName(st), st.Iterations, Plural(st.Iterations), fmtG(100*st.ResampleFraction), r.Seed, st.Iterations)
		switch fewPts, fewB := fewResamplePoints(r), fewFormedBootstrap(r); {
		case fewPts && fewB:
			fmt.Fprintf(b, "; neither is given %s or where fewer than %d resamples formed a ratio, our cut-offs", fewResampleWords(st), MinPercentileResamples)
		case fewPts:
			fmt.Fprintf(b, "; neither is given %s, our cut-off", fewResampleWords(st))
		case fewB:
			fmt.Fprintf(b, "; neither is given where fewer than %d resamples formed a ratio, our cut-off", MinPercentileResamples)
		}
		fmt.Fprintf(b, "); that interval and p-value describe the published method and are no calibrated test of the ratio against 1 (on a model with no skill p fell below 0.05 in %s in our simulation), so no statement of skill rests on them", PublishedPSize)
		if randomTestAbsent(r) {
			b.WriteString("; " + noRandomTest)
		} else {
			draws := metrics.RandomDraws(st.Iterations)
			fmt.Fprintf(b, "; as the test of the ratio against random we give the one-sided Monte Carlo p-value of the full-sample ratio against the ratios of as many test records drawn at random over the extent's area (%d draw%s; Davison & Hinkley 1997), which on a model with no skill fell below 0.05 in about 5%% of studies in our simulation", draws, Plural(draws))
		}
	}
	b.WriteString("; omission rates at the minimum and 10th-percentile training presence")
	if len(st.FixedThresholds) > 0 {
		fmt.Fprintf(b, " and at fixed threshold%s %s", Plural(len(st.FixedThresholds)), fmtList(st.FixedThresholds, ""))
	}
	b.WriteString(" with a one-sided binomial test of the test records at or above the threshold against the share of the extent's area at or above it (Anderson et al. 2003)")
	// The predicted area is judged like the other scores: say what it is.
	b.WriteString("; the predicted area, the share of the extent's area at or above the minimum training presence")
	if st.BoyceSteps > 0 {
		fmt.Fprintf(b, "; and the continuous Boyce index (Boyce et al. 2002; Hirzel et al. 2006: the Spearman rank correlation between a moving window's model value and its ratio of the share of test records to the share of area in it; window of %s of the value range, %d steps), with the area in each window read from a 4096-bin histogram on the extent's own value range (equal bins of a power-of-two width, at least 2048 across the range), each bin's area taken as spread evenly over the bin except the area exactly at each presence value and fixed threshold, counted wholly in the windows that hold the value", fmtG(st.BoyceWindow), st.BoyceSteps)
		for _, m := range r.Models {
			if m.NullKind == NullDistance {
				b.WriteString("; for the distance-only null the bins are never narrower than the power of two at or below 1/4096 of an upper bound on its largest distance, so that its bins are known before its cells are computed, and a narrow extent has fewer of them")
				break
			}
		}
	}
	b.WriteString(".")
}

// fewFormedBootstrap tells whether the published bootstrap of a scored
// partial ROC ratio with enough test points per resample formed some
// resamples, but fewer than MinPercentileResamples: the report gives no
// percentiles or P there (BootstrapReadable), as with too few points per
// resample (fewResamplePoints).
func fewFormedBootstrap(r *Results) bool {
	for _, sc := range r.Scores {
		if !sc.Scored {
			continue
		}
		for _, pr := range sc.PartialROC {
			if pr.ResampleSize >= MinPairedPoints && formedPartialROC(pr) && !BootstrapReadable(pr) {
				return true
			}
		}
	}
	return false
}

// methodsInference writes how the scores' uncertainty and the
// differences were computed and judged, and what is description only.
func methodsInference(b *strings.Builder, r *Results) {
	s, st := r.Sensitivity, r.Settings
	models := s.ModelNames
	fmt.Fprintf(b, " The cells of an extent are its whole background, not a sample of it, so the only sampling variation is that of the test records. For AUC we used each test record's placement (the share of the extent's area scoring below it, ties counted half; the AUC is their mean) and the standard error sqrt(Σ(V_i − AUC)²/(n(n − 1))), the presence component of the variance of DeLong et al. (1988); their full variance, treating cells as a sample, is reported for the unweighted AUC in results.json.")
	one := len(s.ScoredExtents) < 2
	if what := pairedWhat(s); what != "" {
		fmt.Fprintf(b, " %s were taken on the test records both sides hold (paired): for AUC from the placements with a Student t 95%% interval (n − 1 degrees of freedom for n common test records; Student 1908), for the other scores from %d full-size resample%s of the test records drawn once from the seed and shared by every model and extent, as the 2.5th to 97.5th percentiles of the resampled differences (Efron & Tibshirani 1993).", what, st.PairedResamples, Plural(st.PairedResamples))
		if !one {
			b.WriteString(" Where the test records differ, the change of test set is reported separately.")
		}
	}
	if one {
		// Nothing was compared across extents: the verdicts, the
		// tolerances they use and the descriptions across extents were
		// not made, and the methods must not say they were.
		if len(s.ScoredExtents) == 0 {
			b.WriteString(" No model could be scored on any extent, so no score was compared or judged.\n\n")
			return
		}
		b.WriteString(" With one scored extent, no score could be compared across extents, so no score was judged robust or extent-sensitive.")
		if len(models) >= 2 {
			b.WriteString(" Models were compared by their paired differences on that extent.")
		}
		b.WriteString("\n\n")
		return
	}
	fmt.Fprintf(b, " We call a score robust to the extent when every 95%% interval of its difference from %s lies within a tolerance we chose (AUC ±%s, omission rate and predicted area ±%s%s), extent-sensitive when at least one lies wholly outside it, and undetermined otherwise; a difference on fewer than %d common test records (%d for a difference from the resamples, whose percentile intervals our simulation check found misleading on fewer%s; our cut-offs; none for an omission rate between extents, which is 0 on the test records both hold by construction, its threshold not depending on the extent)%s was not judged, and the intervals were not adjusted for the number of extents compared.",
		referenceText(s, "the base extent (%s)"), fmtG(st.ToleranceAUC), fmtG(st.ToleranceOmission), defaultsNote(st), MinPairedPoints, MinResampledPoints, crossingNote(st), fewResamplesNote(r))
	b.WriteString(boyceNotJudged(s, st))
	b.WriteString(partialROCNotJudged(s, st))
	b.WriteString(" As descriptions of the chosen family, without inference, we report the spread of each score across extents")
	if len(s.Chains) > 0 {
		b.WriteString(" and the slope of AUC against log2 of the area along each nested chain")
	}
	if len(models) >= 2 {
		b.WriteString(", the split of the sums of squares of the models × extents table (a property of the extents chosen) and Kendall's W of the model order (Legendre 2005); models were compared by their paired differences on each extent")
	}
	b.WriteString(".\n\n")

}

// maxListed is the longest list of extents methods.md writes out one by
// one; a longer one is summarized (familyList, fewerList), since a
// paragraph naming 60 extents is one nobody pastes. The Extents table of
// the report and extents.csv list every extent.
const maxListed = 12

// minBufferRun is the shortest run of buffers familyList writes as one
// item.
const minBufferRun = 5

// familyList is the methods paragraph's list of the scored extents, each
// "id (params; area km²)". In a family of more than maxListed extents, a
// run of at least minBufferRun consecutive extents of one kind whose
// params differ only in their d_km is written as one item: "region_m280
// to region_300 (29 region buffers, d_km = -280, -260, …, 300; 1,630,000
// to 5,300,000 km²)", every distance kept.
func familyList(exts []Extent) []string {
	one := func(e Extent) string {
		if e.Kind == vocab.KindBase {
			// Name the reference where the reader first meets it.
			return fmt.Sprintf("%s (the base extent, the study region as given: %s; %s km²)", e.ID, e.Params, fmtArea(e.AreaKm2))
		}
		return fmt.Sprintf("%s (%s; %s km²)", e.ID, e.Params, fmtArea(e.AreaKm2))
	}
	var out []string
	for i := 0; i < len(exts); {
		j := i + 1
		d0, rest0, ok0 := bufferParams(exts[i].Params)
		dist := []string{d0}
		for ; ok0 && j < len(exts) && exts[j].Kind == exts[i].Kind; j++ {
			d, rest, ok := bufferParams(exts[j].Params)
			if !ok || rest != rest0 {
				break
			}
			dist = append(dist, d)
		}
		if len(exts) <= maxListed || !ok0 || j-i < minBufferRun {
			out = append(out, one(exts[i]))
			i++
			continue
		}
		lo, hi := exts[i].AreaKm2, exts[i].AreaKm2
		for _, e := range exts[i:j] {
			lo, hi = min(lo, e.AreaKm2), max(hi, e.AreaKm2)
		}
		if rest0 != "" {
			rest0 = "; " + rest0
		}
		out = append(out, fmt.Sprintf("%s to %s (%d %s, d_km = %s%s; %s to %s km²)", exts[i].ID, exts[j-1].ID, j-i,
			kindNoun(exts[i].Kind), strings.Join(dist, ", "), rest0, fmtArea(lo), fmtArea(hi)))
		i = j
	}
	return out
}

// kindNoun names extents of kind k in the plural: "region buffers".
func kindNoun(k vocab.Kind) string {
	switch k {
	case vocab.KindHull:
		return "buffered hulls"
	case vocab.KindRegionBuffer:
		return "region buffers"
	case vocab.KindPointBuffer:
		return "point buffers"
	}
	return "extents of kind " + string(k)
}

// bufferParams splits an extent's params ("d_km=25; around=training
// points") into its distance and the rest, or ok false when they hold no
// d_km.
func bufferParams(params string) (d, rest string, ok bool) {
	var others []string
	for _, p := range strings.Split(params, "; ") {
		if v, found := strings.CutPrefix(p, "d_km="); found && !ok {
			d, ok = v, true
			continue
		}
		others = append(others, p)
	}
	return d, strings.Join(others, "; "), ok
}

// fewerList is the list of extents holding fewer than all test records,
// each "id n"; longer than maxListed, it names the base extent's count
// and the range of the others instead ("base 418; between 116 on
// points_25km and 499 on the other 53").
func fewerList(s *Sensitivity, fewer []string, someHoldAll bool) string {
	if len(fewer) <= maxListed {
		return joinList(fewer)
	}
	var out []string
	lo, hi := -1, -1
	loID, hiID := "", ""
	others := 0
	for i, id := range s.ScoredExtents {
		if i >= len(s.TestPoints) {
			continue
		}
		n := s.TestPoints[i]
		if !slices.Contains(fewer, fmt.Sprintf("%s %d", id, n)) {
			continue
		}
		if id == s.BaseExtent {
			out = append(out, fmt.Sprintf("%s %d", id, n))
			continue
		}
		others++
		if lo < 0 || n < lo {
			lo, loID = n, id
		}
		if n > hi {
			hi, hiID = n, id
		}
	}
	what := "the other"
	if !someHoldAll && len(out) == 0 {
		what = "the"
	}
	out = append(out, fmt.Sprintf("between %d (%s) and %d (%s) on %s %d (each in the report's Extents table)", lo, loID, hi, hiID, what, others))
	return strings.Join(out, "; ")
}

// referenceText names the extent every difference is taken from: the
// base extent as format says it (format holds one %s for its id), or,
// when the base extent could not be scored and the first scored extent
// stands in for it (BaseExtent), that extent named as the reference with
// the reason the base extent was left out.
func referenceText(s *Sensitivity, format string) string {
	if s.BaseExtent == vocab.BaseID || s.BaseExtent == "" {
		// No extent scored (BaseExtent ""): none stands in, and the
		// differences would be taken from the base extent.
		return fmt.Sprintf(format, vocab.BaseID)
	}
	return fmt.Sprintf("the reference extent %s%s", s.BaseExtent, standInText(s))
}

// standInText is what referenceText says after the reference extent's id
// when it stands in for the base extent: ", in place of the base extent
// base (left out: why)", or "" when the base extent was not among the
// extents left out.
func standInText(s *Sensitivity) string {
	why := ""
	for _, e := range s.SkippedExtents {
		if e.ID == vocab.BaseID {
			why = fmt.Sprintf(", in place of the base extent %s (left out: %s)", e.ID, e.Reason)
		}
	}
	return why
}

// referenceName is referenceText without the base extent's id, which is
// its name already ("the base extent, base," read as two extents): "the
// base extent", or the extent standing in for it, with why.
func referenceName(s *Sensitivity) string {
	if s.BaseExtent == vocab.BaseID || s.BaseExtent == "" {
		return "the base extent"
	}
	return referenceText(s, "%s")
}

// referenceWord is "the base extent", or "the reference extent" when
// another extent stands in for it (referenceText).
func referenceWord(s *Sensitivity) string {
	if s.BaseExtent == vocab.BaseID || s.BaseExtent == "" {
		return "the base extent"
	}
	return "the reference extent"
}

// bootstrapName names the partial ROC bootstrap of settings st: "the
// published bootstrap" when it draws the published 50% of the test
// records (Peterson et al. 2008), else "a bootstrap like the published
// one (which draws 50%)", so that another --fraction is not passed off as
// the published procedure.
func bootstrapName(st Settings) string {
	if st.ResampleFraction == 0.5 {
		return "the published bootstrap"
	}
	return "a bootstrap like the published one (which draws 50%)"
}

// bootstrapNote is bootstrapName inside parentheses: "the published
// bootstrap", or "the published bootstrap draws 50%".
func bootstrapNote(st Settings) string {
	if st.ResampleFraction == 0.5 {
		return "the published bootstrap"
	}
	return "the published bootstrap draws 50%"
}

// pairedWhat names the paired differences the run formed: between the
// extents of one model when two extents or more are scored, between
// models on one extent only when there are two models or more, and
// between a model and a null when a null was scored; "" when none.
func pairedWhat(s *Sensitivity) string {
	var parts []string
	if len(s.ScoredExtents) == 0 {
		return "" // nothing scored, nothing compared
	}
	if len(s.ScoredExtents) >= 2 {
		// With one scored extent there is no other to take a
		// difference from.
		parts = append(parts, "between extents of one model")
	}
	if len(s.ModelNames) >= 2 {
		parts = append(parts, "between models on one extent")
	}
	if len(s.AboveNull) > 0 {
		parts = append(parts, "between a model and a null on one extent")
	}
	switch len(parts) {
	case 0:
		return ""
	case 1:
		return "Differences " + parts[0]
	}
	return "Differences " + parts[0] + ", and " + strings.Join(parts[1:], " or ") + ","
}

// Plural is "s" after a count of n other than 1 ("1 extent", "2
// extents"): the one pluralisation of the tool's sentences and messages.
func Plural(n int) string {
	if n == 1 {
		return ""
	}
	return "s"
}

// rangeOver says the range lo–hi of a score over (prep: "over",
// "across") n extents: "ranged 0.704–0.893 over 13 extents", or "was
// 1.000 on all 10 extents to three decimals" when both ends print alike
// ("ranged 1.000–1.000" was written).
func rangeOver(lo, hi float64, prep string, n int) string {
	if f3(lo) == f3(hi) {
		return fmt.Sprintf("was %s on %s to three decimals", f3(lo), allOfNoun(n, "extent"))
	}
	return fmt.Sprintf("ranged %s–%s %s %d extent%s", f3(lo), f3(hi), prep, n, Plural(n))
}

// allExtents is "all n extents", "both extents" when n is 2, or "the 1
// extent" when n is 1.
func allExtents(n int) string { return allOfNoun(n, "extent") }

// allOfNoun names every one of n things called noun: "all 13 extents",
// "both models" for 2 ("all 2 extents" was written), "the 1 extent" for 1.
func allOfNoun(n int, noun string) string {
	switch n {
	case 1:
		return "the 1 " + noun
	case 2:
		return "both " + noun + "s"
	}
	return fmt.Sprintf("all %d %ss", n, noun)
}

// references are the methods cited in methods.md.
// hijmans2012 is listed when the text cites it (the distance-only null and
// the sorting bias; a null of the user's alone does not).
const hijmans2012 = "Hijmans, R.J. (2012) Cross-validation of species distribution models: removing spatial sorting bias and calibration with a null model. Ecology 93: 679-688."

var references = []string{
	"Anderson, R.P., Lew, D. & Peterson, A.T. (2003) Evaluating predictive models of species' distributions: criteria for selecting optimal models. Ecological Modelling 162: 211-232.",
	"Boyce, M.S., Vernier, P.R., Nielsen, S.E. & Schmiegelow, F.K.A. (2002) Evaluating resource selection functions. Ecological Modelling 157: 281-300.",
	"Davison, A.C. & Hinkley, D.V. (1997) Bootstrap Methods and their Application. Cambridge University Press, Cambridge.",
	"DeLong, E.R., DeLong, D.M. & Clarke-Pearson, D.L. (1988) Comparing the areas under two or more correlated receiver operating characteristic curves: a nonparametric approach. Biometrics 44: 837-845.",
	"Efron, B. & Tibshirani, R.J. (1993) An Introduction to the Bootstrap. Chapman & Hall, New York.",
	"Hanley, J.A. & McNeil, B.J. (1982) The meaning and use of the area under a receiver operating characteristic (ROC) curve. Radiology 143: 29-36.",
	"Hirzel, A.H., Le Lay, G., Helfer, V., Randin, C. & Guisan, A. (2006) Evaluating the ability of habitat suitability models to predict species presences. Ecological Modelling 199: 142-152.",
	"Legendre, P. (2005) Species associations: the Kendall coefficient of concordance revisited. Journal of Agricultural, Biological and Environmental Statistics 10: 226-245.",
	"Peterson, A.T., Papeş, M. & Soberón, J. (2008) Rethinking receiver operating characteristic analysis applications in ecological niche modeling. Ecological Modelling 213: 63-72.",
	student1908,
}

// noRandomTest says that a results.json holds no area-random test
// (randomTestAbsent).
const noRandomTest = "this results.json holds no test of the ratio against random (it was written before areasweep computed one; rerun areasweep run to get it)"

// randomTestAbsent tells whether r holds a defined partial ROC ratio but
// no area-random test anywhere: a run that computes the test writes, on
// every defined ratio, p_random or p_random_note; a results.json written
// before it holds neither, and its text must not say the test is given.
func randomTestAbsent(r *Results) bool {
	defined := false
	for _, sc := range r.Scores {
		for _, pr := range sc.PartialROC {
			if pr.PRandom > 0 || pr.PRandomNote != "" {
				return false
			}
			defined = defined || (sc.Scored && pr.Defined)
		}
	}
	return defined
}

// randomTestCount says on how many of the extents where model's partial
// ROC ratio at e was tested against random (PartialROC.PRandom, read
// from at least MinRandomDraws draws) it lay above (p below
// randomPCutoff); where none was read, that it was not tested because
// too few draws formed a ratio, or "" when none was computed.
func randomTestCount(r *Results, model string, e float64) string {
	tested, above, few, most := 0, 0, 0, 0
	for _, sc := range r.Scores {
		if sc.Model != model || !sc.Scored {
			continue
		}
		for _, pr := range sc.PartialROC {
			switch {
			case pr.E != e || !pr.Defined || pr.PRandom == 0:
			case !randomRead(pr):
				few++
				most = max(most, pr.RandomFormed)
			default:
				tested++
				if pr.PRandom < randomPCutoff {
					above++
				}
			}
		}
	}
	const random = "that of as many test records drawn at random over the extent's area"
	switch {
	case tested == 0 && few > 0:
		return fmt.Sprintf(", and it was not tested against %s: at most %d draw%s formed a ratio on an extent, fewer than the %d (our cut-off) from which a p-value can fall below %s", random, most, Plural(most), MinRandomDraws, fmtG(randomPCutoff))
	case tested == 0:
		return ""
	case tested == 1 && above == 0:
		// "not above ... (one-sided p below 0.025)" read as if p was below.
		return fmt.Sprintf(", and not above %s on the one extent where it was tested (its one-sided p is not below %s, our cut-off)", random, fmtG(randomPCutoff))
	case tested == 1:
		return fmt.Sprintf(", and above %s on the one extent where it was tested (one-sided p below %s, our cut-off)", random, fmtG(randomPCutoff))
	case above == 0:
		return fmt.Sprintf(", and above %s on none of the %d extents where it was tested (on none is the one-sided p below %s, our cut-off; each extent tested on its own, not adjusted for their number)",
			random, tested, fmtG(randomPCutoff))
	}
	return fmt.Sprintf(", and above %s on %d of the %d extents where it was tested (one-sided p below %s, our cut-off; each extent tested on its own, not adjusted for their number)",
		random, above, tested, fmtG(randomPCutoff))
}

// student1908 is cited for the t interval of the paired AUC differences.
const student1908 = "Student (1908) The probable error of a mean. Biometrika 6: 1-25."

// resultNumbers states, per model, the AUC range and verdict, the partial
// ROC verdict, the model comparison and the independence check.
func resultNumbers(r *Results) string {
	s := r.Sensitivity
	var parts []string
	for _, m := range s.ModelNames {
		sp := s.findSpread("auc", m)
		mv := s.findModelVerdict("auc", m)
		if sp == nil || sp.N == 0 || mv == nil {
			continue
		}
		onBase := fmt.Sprintf("not scored on %s", mv.Base)
		if mv.BaseDefined {
			onBase = fmt.Sprintf("%s on %s, %s", f3(mv.BaseValue), mv.Base, seText(findScore(r, m, mv.Base)))
		}
		if c := belowRandomClause(r, sp); c != "" {
			onBase += "; " + c
		}
		t := fmt.Sprintf("AUC of %s %s (%s) and was %s", m, rangeOver(sp.Min, sp.Max, "over", sp.N), onBase, verdictPhrase(mv))
		if sp.N == 1 {
			se := ""
			if sc := findScore(r, m, sp.Extents[0]); sc != nil {
				se = " (" + seText(sc) + ")"
			}
			t = fmt.Sprintf("AUC of %s was %s on its one scored extent, %s%s, so no difference between extents could be formed", m, f3(sp.Min), sp.Extents[0], se)
		}
		if len(r.Settings.E) > 0 {
			if pv := s.findModelVerdict(MetricKeyPartialROC(r.Settings.E[0]), m); pv != nil {
				t += fmt.Sprintf("; its partial ROC ratio at E = %s was %s", fmtG(r.Settings.E[0]), verdictPhrase(pv))
			}
			t += randomTestCount(r, m, r.Settings.E[0])
		}
		parts = append(parts, t)
	}
	out := ""
	if len(parts) > 0 {
		out = strings.Join(parts, ". ") + "."
	}
	for _, rk := range s.Rankings {
		if rk.Metric == "auc" && rk.identical() {
			out += fmt.Sprintf(" By AUC, %s and %s scored the same on %s (every paired difference 0).", rk.Model, rk.Other, allExtents(rk.Extents))
		} else if rk.Metric == "auc" && rk.Extents > 0 {
			out += " " + methodsRankingText(rk)
			if w := unlikeCellsWords(r, rk.Model, rk.Other); w != "" {
				out = strings.TrimSuffix(out, ".") + w + "."
			}
		}
	}
	if ind := s.Independence; ind.Defined && ind.N == 1 {
		// One test record: no median and no share ("Test records lay a
		// median 40.1 km ...; 0% lay within" was written).
		within := "beyond"
		if ind.NearCount == 1 {
			within = "within"
		}
		out += fmt.Sprintf(" The one test record lay %s km from the nearest training record, %s %g cell widths.", trimFloat(ind.Min, 3), within, NearCells)
	} else if ind.Defined {
		out += fmt.Sprintf(" Test records lay a median %s km from the nearest training record; %s lay within %g cell widths.",
			trimFloat(ind.Median, 3), pctVs(ind.NearShare, NearShareWarn), NearCells)
	}
	out += nullSentences(r)
	return strings.TrimSpace(out)
}

// fewResamplesNote names, inside the methods' sentence on what was not
// judged, the cut-off on resamples when some defined paired difference
// of r was not judged for it (with --iterations below
// MinPercentileResamples, or resamples that did not form); "" otherwise,
// as in every run with enough resamples.
func fewResamplesNote(r *Results) string {
	n := 0
	for i := range r.Paired {
		if p := &r.Paired[i]; p.Defined && p.notJudgedKind() == positionTooFewResamples {
			n++
		}
	}
	if n == 0 {
		return ""
	}
	return fmt.Sprintf(" or with a percentile interval from fewer than %d formed resamples (our cut-off; %d of the %d paired differences here, from %d resample%s drawn)",
		MinPercentileResamples, n, len(r.Paired), r.Settings.PairedResamples, Plural(r.Settings.PairedResamples))
}

// crossingNote names the partial ROC ratio's larger cut-offs between
// models (partialROCMinPoints) at the run's E where they exceed
// MinResampledPoints: ", and for the partial ROC ratio between two models
// 150 at E = 0.01, so that at least 1.5 test records are expected beyond
// its 1 − E crossing"; "" when every E is 0.05 or more.
func crossingNote(st Settings) string {
	var cuts []string
	for _, e := range st.E {
		if c := partialROCMinPoints(e); c > MinResampledPoints {
			cuts = append(cuts, fmt.Sprintf("%d at E = %s", c, fmtG(e)))
		}
	}
	if len(cuts) == 0 {
		return ""
	}
	return fmt.Sprintf(", and for the partial ROC ratio between two models %s, so that at least %s test records are expected beyond its 1 − E crossing",
		joinList(cuts), fmtG(MinCrossingPoints))
}

// defaultsNote says, inside the list of the tolerances the verdicts
// judge against (AUC, omission rate and predicted area), that they are
// areasweep's defaults when all of them are: not a published standard.
// The partial ROC ratio's and the Boyce index's tolerances count what is
// described, not judged: their own sentences name them (toleranceText).
func defaultsNote(st Settings) string {
	if st.ToleranceAUC == DefaultToleranceAUC && st.ToleranceOmission == DefaultToleranceOmission {
		return "; areasweep's defaults, not a published standard"
	}
	return ""
}

// boyceNotJudged says, when the Boyce index is among s's metrics, that its
// differences were described, not judged, and why (BoyceCoverage); "".
func boyceNotJudged(s *Sensitivity, st Settings) string {
	for _, m := range s.Metrics {
		if m.Kind == MetricBoyce {
			return fmt.Sprintf(" The Boyce index's differences were described, not judged: their paired intervals fall short of their 95%% coverage (%s in our simulation check; the index from a sample of test records is biased against its value on the whole presence distribution), so no verdict or ranking rests on them, we give them no interval, and we say only how many exceed %s.",
				BoyceCoverage, toleranceText(MetricInfo{Kind: MetricBoyce, Tolerance: st.ToleranceBoyce}))
		}
	}
	return ""
}

// partialROCNotJudged says, when a partial ROC ratio is among s's
// metrics, that its differences between extents were described, not
// judged, and why (partialROCExtentCoverage); "".
func partialROCNotJudged(s *Sensitivity, st Settings) string {
	for _, m := range s.Metrics {
		if m.Kind == MetricPartialROC {
			return fmt.Sprintf(" The partial ROC ratio's differences between extents were described, not judged: their percentile intervals fall short of their 95%% coverage between nested extents (%s; the difference rests on the lowest E share of the test records, whose resampled differences do not mirror its sampling distribution, and no other bootstrap interval we measured did better on every landscape), so no verdict rests on them, we give them no interval, and we say only how many exceed %s.",
				partialROCCoverageRun(st.E), toleranceText(MetricInfo{Kind: MetricPartialROC, Tolerance: st.TolerancePartialROC}))
		}
	}
	return ""
}

// findScore returns the scored Score of model on extent, or nil.
func findScore(r *Results, model, extent string) *Score {
	for i := range r.Scores {
		if sc := &r.Scores[i]; sc.Model == model && sc.Extent == extent && sc.Scored {
			return sc
		}
	}
	return nil
}

// seText is "SE 0.022 from the test records", or why there is none: the
// placements' SE needs at least two test records (Score.AUCSE is 0 then).
func seText(sc *Score) string {
	if sc == nil || sc.TestPoints < 2 {
		return "no SE with fewer than two test records"
	}
	// smallPositive: an SE of 0.0001 is not "0.000", no uncertainty.
	return fmt.Sprintf("SE %s from the test records", smallPositive(sc.AUCSE))
}

// fmtP formats a p-value for a table cell: "< 0.001" or "0.042".
func fmtP(p float64) string {
	if p < 0.001 {
		return "< 0.001"
	}
	return f3(p)
}

// fmtPResampled formats a p-value estimated from b resamples, which cannot
// resolve values below 1/b: "< 0.002" for p = 0 and b = 500, else three
// decimals (or fmtP's "< 0.001" when 1/b is smaller than that).
func fmtPResampled(p float64, b int) string {
	if b <= 0 {
		return "–"
	}
	if floor := 1 / float64(b); p < floor {
		return "< " + ceilSig(floor, 2)
	}
	return fmtP(p)
}

// ceilSig prints v > 0 to sig significant digits rounded up, so that a
// bound printed after "<" is not below the true one (1/184 = 0.005435 is
// "0.0055", not "0.0054"); a v that the digits hold exactly (1/500) prints
// as it is.
func ceilSig(v float64, sig int) string {
	m := math.Pow(10, math.Floor(math.Log10(v))-float64(sig-1))
	q := v / m
	if r := math.Round(q); math.Abs(q-r) <= 1e-9*q {
		q = r
	} else {
		q = math.Ceil(q)
	}
	return trimFloat(q*m, sig)
}

// reviewerText answers "is the score a property of the model or of the
// extent?" with this run's numbers.
func reviewerText(r *Results) string {
	s := r.Sensitivity
	var b strings.Builder
	if len(s.ScoredExtents) == 0 {
		// Nothing was scored: no count of extents, comparison or
		// verdict to report, and no answer to the question.
		ok := 0
		for _, e := range r.Extents {
			if e.Status == vocab.StatusOK {
				ok++
			}
		}
		fmt.Fprintf(&b, "We thank the reviewer for raising the dependence of the evaluation scores on the extent of the background. No model could be scored on any of the %d evaluation extent%s of this run (the report gives each extent's reason), so no score can be compared across extents and this run cannot answer the question.", ok, Plural(ok))
		return b.String()
	}
	reviewerWhat(&b, r)
	reviewerVerdicts(&b, s)
	b.WriteString(aucAnswer(s))
	b.WriteString(reviewerPartialROC(r))
	b.WriteString(reviewerBoyce(r))
	for _, rk := range s.Rankings {
		if rk.Metric == "auc" && rk.identical() {
			fmt.Fprintf(&b, "By AUC, %s and %s scored the same on %s. ", rk.Model, rk.Other, allExtents(rk.Extents))
		} else if rk.Metric == "auc" && rk.Extents > 0 {
			b.WriteString(reviewerRankingText(rk))
		}
	}
	b.WriteString(reviewerNullText(s))
	if len(s.ModelNames) >= 2 {
		b.WriteString("We therefore report every score together with the extent it was computed on, compare models only within one extent, and treat the values as evaluation aids rather than as absolute measures of model quality.")
	} else {
		// One model: there is no model comparison to restrict.
		b.WriteString("We therefore report every score together with the extent it was computed on and treat the values as evaluation aids rather than as absolute measures of model quality.")
	}
	if s.Independence.Warn {
		fmt.Fprintf(&b, " We also note that %s of the test records lie within %g cells of a training record, so every score computed from the test records is likely optimistic.", pctVs(s.Independence.NearShare, NearShareWarn), NearCells)
	}
	return b.String()
}

// reviewerWhat writes what the reply rests on: the extents rescored
// (with their range of areas and of test records) and, with two or more,
// how they were compared and judged.
func reviewerWhat(b *strings.Builder, r *Results) {
	s, st := r.Sensitivity, r.Settings
	n := len(s.ScoredExtents)
	b.WriteString("We thank the reviewer for raising the dependence of the evaluation scores on the extent of the background. ")
	fmt.Fprintf(b, "We rescored the same predictions, with the same settings, on %d evaluation extent%s", n, Plural(n))
	if n > 0 {
		lo, hi := -1.0, -1.0
		for _, e := range r.Extents {
			for _, id := range s.ScoredExtents {
				if id == e.ID {
					if lo < 0 || e.AreaKm2 < lo {
						lo = e.AreaKm2
					}
					if e.AreaKm2 > hi {
						hi = e.AreaKm2
					}
				}
			}
		}
		if n == 1 {
			fmt.Fprintf(b, " (%s, %s km²)", s.ScoredExtents[0], fmtArea(lo))
		} else {
			// The headline's rounding, so that the same areas read the same.
			// A stand-in's reason after a semicolon: inside the
			// parenthesis, referenceText's own parenthesis nested.
			ref, why := referenceName(s), ""
			if s.BaseExtent != vocab.BaseID {
				ref = "the reference extent " + s.BaseExtent
				for _, e := range s.SkippedExtents {
					if e.ID == vocab.BaseID {
						why = fmt.Sprintf("; it stands in for the base extent %s, left out: %s", e.ID, e.Reason)
					}
				}
			}
			fmt.Fprintf(b, " (%s and %d other%s%s) %s", ref, n-1, Plural(n-1), why, areaRange(lo, hi))
		}
	}
	if s.TestPointsVary {
		lo, hi := s.TestPoints[0], s.TestPoints[0]
		for _, n := range s.TestPoints {
			lo, hi = min(lo, n), max(hi, n)
		}
		fmt.Fprintf(b, " (between %d and %d of the %d test records fall inside an extent, and each extent is scored on those)", lo, hi, r.PointCounts.Test)
	}
	b.WriteString(". ")
	if n != 1 {
		fmt.Fprintf(b, "For each score we compared every extent with %s on the test records both hold, with 95%% intervals from those records (the cells of an extent are its whole background, so the records are the only sample), and judged the differences against tolerances we chose (AUC ±%s, omission rate and predicted area ±%s%s).%s ",
			referenceWord(s), fmtG(st.ToleranceAUC), fmtG(st.ToleranceOmission), defaultsNote(st), boyceNotJudged(s, st)+partialROCNotJudged(s, st))
		if n > 2 {
			// One interval wholly outside makes a score extent-sensitive:
			// with many extents that is easier to reach by chance.
			fmt.Fprintf(b, "The intervals are per extent, not adjusted for the %d comparisons with %s. ", n-1, referenceWord(s))
		}
	}
}

// reviewerVerdicts writes which scores moved with the extent beyond the
// tolerance, which stayed within it and which the test records cannot
// judge.
func reviewerVerdicts(b *strings.Builder, s *Sensitivity) {
	n := len(s.ScoredExtents)
	// robustOmission holds the omission rates that stayed within the
	// tolerance: robust by construction, said apart from the other
	// robust scores (the reason was written after a list holding AUC and
	// the predicted area, which it does not explain).
	var robust, robustOmission, sensitiveAll, undetermined []string
	// sensitive groups the scores extent-sensitive for some models only
	// by which models are which, so the reply names them: "for at least
	// one model" hid a model that stayed within the tolerance (sentence
	// audit of 2026-12-05).
	type split struct{ labels, sens, rob, und []string }
	var sensitive []*split
	splitOf := map[string]*split{}
	for _, v := range s.Verdicts {
		if NotCalibrated(v.Metric, PairedKindExtent) {
			continue // described, not judged: said with the tolerances
		}
		label := v.Label
		for _, m := range s.Metrics {
			if m.Key == v.Metric {
				label = metricPhrase(m) // no comma inside a list
			}
		}
		switch {
		case v.Verdict == JudgementRobust && strings.HasPrefix(v.Metric, "omission_"):
			robustOmission = append(robustOmission, label)
		case v.Verdict == JudgementRobust:
			robust = append(robust, label)
		case v.Verdict == JudgementSensitive && s.sensitiveForEvery(v.Metric):
			sensitiveAll = append(sensitiveAll, label)
		case v.Verdict == JudgementSensitive:
			k := strings.Join(v.Sensitive, "\x00") + "\x01" + strings.Join(v.Robust, "\x00") + "\x01" + strings.Join(v.Undetermined, "\x00")
			sp := splitOf[k]
			if sp == nil {
				sp = &split{sens: v.Sensitive, rob: v.Robust, und: v.Undetermined}
				splitOf[k] = sp
				sensitive = append(sensitive, sp)
			}
			sp.labels = append(sp.labels, label)
		default:
			undetermined = append(undetermined, label)
		}
	}
	if n == 1 {
		// Nothing to compare: the verdicts are undetermined for want of a
		// second extent, not of test records.
		robust, robustOmission, sensitive, sensitiveAll, undetermined = nil, nil, nil, nil, nil
		b.WriteString("With one extent, no score can be compared across extents. ")
	}
	// With one model, "for at least one model" and "for every model"
	// would say less than the numbers: name it.
	some, every := "for at least one model", "for every model"
	if len(s.ModelNames) == 1 {
		some, every = "for "+s.ModelNames[0], "for "+s.ModelNames[0]
	}
	if len(sensitiveAll) > 0 {
		// Every model: "for at least one model" would say less than
		// the verdicts (the demo's AUC, extent-sensitive for both).
		fmt.Fprintf(b, "%s moved with the extent by more than the tolerance %s. ", upperFirst(joinList(sensitiveAll)), every)
	}
	for _, sp := range sensitive {
		if len(sp.sens) == 0 {
			// Model lists not recorded (an older results.json).
			fmt.Fprintf(b, "%s moved with the extent by more than the tolerance %s. ", upperFirst(joinList(sp.labels)), some)
			continue
		}
		fmt.Fprintf(b, "%s moved with the extent by more than the tolerance for %s", upperFirst(joinList(sp.labels)), joinList(sp.sens))
		if len(sp.rob) > 0 {
			fmt.Fprintf(b, " and stayed within it for %s", joinList(sp.rob))
		}
		if len(sp.und) > 0 {
			fmt.Fprintf(b, "; for %s the test records cannot tell", joinList(sp.und))
		}
		b.WriteString(". ")
	}
	if len(robust) > 0 {
		fmt.Fprintf(b, "%s stayed within the tolerance %s. ", upperFirst(joinList(robust)), every)
	}
	if len(robustOmission) > 0 {
		// Reads as a finding otherwise: say that it cannot fail. The
		// threshold is fixed or from the training records, so the
		// extent does not move it.
		fmt.Fprintf(b, "%s stayed within the tolerance %s, as %s must: %s threshold does not depend on the extent, so on the test records two extents share it omits the same ones. ",
			upperFirst(joinList(robustOmission)), every, pick(len(robustOmission) == 1, "an omission rate", "omission rates"), pick(len(robustOmission) == 1, "its", "each one's"))
	}
	if len(undetermined) > 0 {
		// Undetermined: an interval straddles the tolerance, or a score
		// is undefined or has too few common test records somewhere.
		why := "an interval straddles the tolerance, or the score is undefined or not judged on some extent"
		if nowhere := s.scoredNowhere(); len(nowhere) > 0 {
			why += fmt.Sprintf(", or, for %s, no extent is scored", joinList(nowhere))
		}
		who := "the test records cannot tell"
		if s.fewResamples() {
			// The run's resamples, not the test records, are short.
			who = "no verdict was reached"
			why += fmt.Sprintf("; here differences whose interval comes from fewer than %d formed resamples were not judged, our cut-off", MinPercentileResamples)
		}
		fmt.Fprintf(b, "For %s %s (%s). ", joinList(undetermined), who, why)
	}
}

// reviewerPartialROC describes the partial ROC ratio at the first E
// across extents, as the headline does (describedModels): the reply says
// its differences are described, not judged, and that it says how many
// exceed the tolerance, so it gives them. "" with fewer than two scored
// extents or no partial ROC verdict.
func reviewerPartialROC(r *Results) string {
	if len(r.Settings.E) == 0 {
		return ""
	}
	return reviewerDescribed(r, MetricKeyPartialROC(r.Settings.E[0]), "The partial ROC ratio at E = "+fmtG(r.Settings.E[0]))
}

// reviewerBoyce describes the Boyce index across extents as
// reviewerPartialROC does the partial ROC ratio: the reply says that of
// its differences too it gives only how many exceed the tolerance
// (boyceNotJudged), and gave no number.
func reviewerBoyce(r *Results) string {
	return reviewerDescribed(r, MetricKeyBoyce, "The Boyce index")
}

// reviewerDescribed is the reply's description of the metric key (a
// metric described, not judged, between extents; name starts its
// sentence) for each model that has it: how many differences from the
// base extent lie beyond the tolerance and the largest
// (describedModels). "" with fewer than two scored extents or no verdict
// on the metric.
func reviewerDescribed(r *Results, key, name string) string {
	s := r.Sensitivity
	if len(s.ScoredExtents) < 2 {
		return ""
	}
	nowhere := s.scoredNowhere()
	var mvs []ModelVerdict
	for _, m := range s.ModelNames {
		if mv := s.findModelVerdict(key, m); mv != nil && !slices.Contains(nowhere, m) {
			mvs = append(mvs, *mv)
		}
	}
	parts, undefined, none := describedModels(s.BaseExtent, mvs)
	if len(parts) == 0 {
		if w := noDifferenceWords(s.BaseExtent, undefined, none); w != "" {
			return fmt.Sprintf("%s %s. ", name, w)
		}
		return ""
	}
	return fmt.Sprintf("%s, described only: %s%s. ", name, joinList(parts), apartWords(s.BaseExtent, undefined, none))
}

// sensitiveForEvery tells whether metric is extent-sensitive for every
// model of s (each model's own verdict).
func (s *Sensitivity) sensitiveForEvery(metric string) bool {
	n := 0
	for _, mv := range s.ModelVerdicts {
		if mv.Metric != metric {
			continue
		}
		if mv.Verdict != JudgementSensitive {
			return false
		}
		n++
	}
	return n > 0 && n == len(s.ModelNames)
}

// fewResamples tells whether some difference from the base extent was
// not judged for too few formed resamples.
func (s *Sensitivity) fewResamples() bool {
	for _, mv := range s.ModelVerdicts {
		for _, d := range mv.Diffs {
			if d.Defined && d.Position == positionTooFewResamples {
				return true
			}
		}
	}
	return false
}

// aucAnswer answers the reviewer's question for AUC in one sentence:
// when AUC is extent-sensitive for some model, its value belongs to the
// model and the extent together, with each such model's range and where
// (point estimates: a description); when it is robust for every model,
// the extents chosen did not move it beyond the tolerance; otherwise "".
func aucAnswer(s *Sensitivity) string {
	var v *Verdict
	for i := range s.Verdicts {
		if s.Verdicts[i].Metric == "auc" {
			v = &s.Verdicts[i]
		}
	}
	if v == nil || len(s.ScoredExtents) < 2 {
		return ""
	}
	switch v.Verdict {
	case JudgementRobust:
		// "our tolerance" only when it is our default: a tolerance the
		// user set is named as theirs, with its value (toleranceText).
		// "did not depend on" claimed no change at all where the
		// intervals may exclude 0 (+0.001 to +0.002) inside the
		// tolerance (sentence audit of 2026-12-05).
		return fmt.Sprintf("The AUC moved by less than %s between these extents: every 95%% interval of its differences lies within it. ", toleranceText(MetricInfo{Kind: MetricAUC, Tolerance: v.Tolerance}))
	case JudgementSensitive:
		var parts []string
		for _, m := range s.ModelNames {
			mv, sp := s.findModelVerdict("auc", m), s.findSpread("auc", m)
			if mv == nil || sp == nil || mv.Verdict != JudgementSensitive || sp.N < 2 {
				continue
			}
			parts = append(parts, fmt.Sprintf("the same predictions of %s scored from %s on %s to %s on %s", m, f3(sp.Min), sp.MinExtent, f3(sp.Max), sp.MaxExtent))
		}
		if len(parts) == 0 {
			return ""
		}
		each := ""
		if s.TestPointsVary {
			each = " (each on the test records inside that extent)"
		}
		return fmt.Sprintf("The value of AUC is therefore a property of the model and the extent together: %s%s. ", joinList(parts), each)
	}
	return ""
}

// methodsRankingText is the results' sentence on one AUC model
// comparison: the model better beyond noise on more extents first, and
// "differed beyond noise on none" when neither is better anywhere ("a was
// better than b on 0 of 9 extents" is true but reads as a finding).
func methodsRankingText(rk ModelRanking) string {
	rk = rk.leaderFirst()
	if rk.Better == 0 {
		return fmt.Sprintf("By AUC, %s and %s did not differ beyond noise on %s.", rk.Model, rk.Other, anyCompared(rk.Extents))
	}
	return fmt.Sprintf("By AUC, %s was better than %s beyond noise on %d of %d %s, worse on %d and within noise on %d.", rk.Model, rk.Other, rk.Better, rk.Extents, rk.extentsWord(), rk.Worse, rk.WithinNoise)
}

// anyCompared is "any of the 9 extents compared", or "the 1 extent
// compared".
func anyCompared(n int) string {
	if n == 1 {
		return "the 1 extent compared"
	}
	return fmt.Sprintf("any of the %d extents compared", n)
}

// reviewerRankingText is the reply's sentence on one AUC model
// comparison, worded as methodsRankingText chooses, with whether their
// order held (rankingOrderText).
func reviewerRankingText(rk ModelRanking) string {
	rk = rk.leaderFirst()
	if rk.Better == 0 {
		return fmt.Sprintf("By AUC, %s and %s did not differ beyond noise on %s. ", rk.Model, rk.Other, anyCompared(rk.Extents))
	}
	return fmt.Sprintf("By AUC, %s scored above %s beyond noise on %d of %d %s and below it on %d%s. ", rk.Model, rk.Other, rk.Better, rk.Extents, rk.extentsWord(), rk.Worse, rankingOrderText(rk))
}

// rankingOrderText says, after an AUC model comparison counted over the
// extents, whether the order of the two models held: ", so their order
// held on every extent" when one is better beyond noise on all of them
// (", ... on every extent compared" when some extents were not compared),
// ", so their order depends on the extent" when each is better beyond
// noise somewhere, ", so their order did not reverse beyond noise on any
// extent" when only the first is, else "" (and on one extent compared,
// where no order can reverse: "did not reverse beyond noise on any
// extent" was written after "on 1 of 1 extent", helper audit of
// 2026-12-05).
func rankingOrderText(rk ModelRanking) string {
	switch {
	case rk.Extents <= 1:
		return ""
	case rk.Extents > 1 && (rk.Better == rk.Extents || rk.Worse == rk.Extents):
		if len(rk.Diffs) > rk.Extents {
			// Some extents were not compared (too few common test
			// points or resamples, or a model undefined there).
			return ", so their order held on every extent compared"
		}
		return ", so their order held on every extent"
	case rk.Better > 0 && rk.Worse > 0:
		return ", so their order depends on the extent"
	case rk.Better > 0 && rk.Worse == 0:
		if len(rk.Diffs) > rk.Extents {
			// As "held on every extent compared": the extents not
			// compared tell nothing of the order.
			return ", so their order did not reverse beyond noise on any extent compared"
		}
		return ", so their order did not reverse beyond noise on any extent"
	}
	return ""
}

// reviewerNullText tells the reviewer, for AUC on the base extent, whether
// each model beats each null scored on the same test records (the paired
// test of Sensitivity.AboveNull), or "" when no null was scored. What a
// model that does not beat a null lacks depends on the null: the
// distance-only null knows where the training records are, a null of the
// user's is described by its name only.
func reviewerNullText(s *Sensitivity) string {
	gaps := s.baseAUCGaps()
	if len(gaps) == 0 {
		return ""
	}
	type byNull struct {
		name, kind              string
		above, not, below, same []string
		// noSkill: above the null, but at or below a random ranking;
		// unshown: above it, but not above random beyond noise.
		noSkill, unshown []string
		few              []string
	}
	var ns []*byNull
	index := map[string]*byNull{}
	for _, bg := range gaps {
		an, g := bg.an, bg.g
		n := index[an.Null]
		if n == nil {
			n = &byNull{name: an.Null, kind: an.NullKind}
			index[an.Null] = n
			ns = append(ns, n)
		}
		// The number is the difference from the null, not the AUC.
		part := fmt.Sprintf("%s (difference %s, 95%% interval %s to %s)", an.Model, signedSmall(g.Diff), signedVs(g.Low, 0), signedVs(g.High, 0))
		switch {
		case an.BaseReading == ReadingTooFew:
			n.few = append(n.few, fmt.Sprintf("%s (%d common test record%s)", an.Model, g.CommonPoints, Plural(g.CommonPoints)))
		case g.zero():
			n.same = append(n.same, an.Model)
		case aboveWithoutSkill(MetricAUC, g) && g.vsRandom(MetricAUC) == VsRandomNotShown:
			n.unshown = append(n.unshown, fmt.Sprintf("%s (difference %s, 95%% interval %s to %s; AUC %s, 95%% interval %s to %s)", an.Model, signedSmall(g.Diff), signedVs(g.Low, 0), signedVs(g.High, 0),
				f3(g.ModelValue), f3(g.ModelLow), f3(g.ModelHigh)))
		case aboveWithoutSkill(MetricAUC, g):
			n.noSkill = append(n.noSkill, fmt.Sprintf("%s (difference %s, 95%% interval %s to %s; AUC %s)", an.Model, signedSmall(g.Diff), signedVs(g.Low, 0), signedVs(g.High, 0), f3(g.ModelValue)))
		case an.BaseReading == ReadingAbove:
			n.above = append(n.above, part)
		case an.BaseReading == ReadingBelow:
			n.below = append(n.below, part)
		default:
			n.not = append(n.not, part)
		}
	}
	var what []string
	for _, n := range ns {
		if n.kind == NullDistance {
			what = append(what, fmt.Sprintf("a null that knows only where the training records are (%s: minus the distance to the nearest one; Hijmans 2012)", n.name))
		} else {
			what = append(what, fmt.Sprintf("the null %s", n.name))
		}
	}
	var b strings.Builder
	on := referenceWord(s) // the extent the base readings are on
	fmt.Fprintf(&b, "We also scored %s on the same extents and test records. ", joinList(what))
	// aucOf is "the AUC of a is" or "the AUCs of a and b are".
	aucOf := func(models []string) string {
		if len(models) > 1 {
			return "the AUCs of " + joinList(models) + " are"
		}
		return "the AUC of " + models[0] + " is"
	}
	for _, n := range ns {
		holds := "what " + n.name + " holds"
		if n.kind == NullDistance {
			holds = "the geography of the records"
		}
		if len(n.above) > 0 {
			fmt.Fprintf(&b, "On %s %s above that of %s beyond noise. ", on, aucOf(n.above), n.name)
		}
		if len(n.noSkill) > 0 {
			// Above a null that ranks worse than random: no skill shown.
			fmt.Fprintf(&b, "On %s %s above that of %s beyond noise but at or below 0.5, that of a random ranking, so on that extent this shows only that %s ranks the test records worse still, not skill. ",
				on, aucOf(n.noSkill), n.name, n.name)
		}
		if len(n.unshown) > 0 {
			// Above the null, but the model's own interval reaches 0.5.
			fmt.Fprintf(&b, "On %s %s above that of %s beyond noise but not above 0.5, that of a random ranking, beyond noise (the model's own 95%% interval from the placements reaches 0.5), so on that extent this does not show skill. ",
				on, aucOf(n.unshown), n.name)
		}
		if len(n.same) > 0 {
			// Every placement equal to the null's: a copy of it.
			// "it shows" for one model, "they show" for several.
			shows := "it shows"
			if len(n.same) > 1 {
				shows = "they show"
			}
			fmt.Fprintf(&b, "On %s %s the same as that of %s (every paired difference 0), so on that extent %s nothing beyond %s. ", on, aucOf(n.same), n.name, shows, holds)
		}
		if len(n.below) > 0 {
			// Wholly below 0: the null ranks the test records better.
			who := "the model does"
			if len(n.below) > 1 {
				who = "the models do"
			}
			fmt.Fprintf(&b, "On %s %s below that of %s beyond noise, so on that extent %s alone ranks the test records above the background better than %s. ",
				on, aucOf(n.below), n.name, holds, who)
		}
		if len(n.not) > 0 {
			// An interval that includes 0: absence of evidence, not
			// evidence that the model has no skill.
			fmt.Fprintf(&b, "On %s %s not above that of %s beyond noise, so on that extent AUC gives no evidence of skill beyond %s. ", on, aucOf(n.not), n.name, holds)
		}
		if len(n.few) > 0 {
			fmt.Fprintf(&b, "On %s the test records are too few to compare %s with %s (we do not judge a difference on fewer than %d common test records, our cut-off). ", on, joinList(n.few), n.name, MinPairedPoints)
		}
	}
	return b.String()
}

func upperFirst(s string) string {
	if s == "" {
		return s
	}
	if s[0] >= 'a' && s[0] <= 'z' {
		return string(s[0]-'a'+'A') + s[1:]
	}
	return s
}

// pick returns a when c holds, else b: a word chosen by a count.
func pick(c bool, a, b string) string {
	if c {
		return a
	}
	return b
}
