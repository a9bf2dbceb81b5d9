package report

import (
	"fmt"
	"strconv"
	"strings"
	"testing"

	"areasweep/extent/vocab"
)

// The tests in this file drive the sentence writers with the numbers of
// studies that differ from the demo (a model worse than the null
// everywhere, copies of the null, one scored extent, few test points),
// each where a sentence once said other than its numbers. Expected
// strings are the templates with the numbers filled in by hand.

// TestBoyceBeyondCountAgrees: the Boyce description's count of
// differences beyond the tolerance takes the verb of its number: "1 of 10
// lies", "3 of 10 lie" ("1 of 10 lie beyond ±0.1" was written).
func TestBoyceBeyondCountAgrees(t *testing.T) {
	diff := func(ext string, d float64) ExtentDifference {
		return ExtentDifference{Extent: ext, Defined: true, Diff: d}
	}
	cases := []struct {
		name          string
		diffs         []ExtentDifference
		want, notWant string
	}{
		{"one beyond", []ExtentDifference{diff("a", -0.27), diff("b", 0.05)}, "1 of 2 lies beyond ±0.1 and the largest is -0.270 on a", "1 of 2 lie "},
		{"two beyond", []ExtentDifference{diff("a", -0.27), diff("b", 0.15)}, "2 of 2 lie beyond ±0.1", "lies"},
		{"none beyond", []ExtentDifference{diff("a", 0.02), diff("b", 0.05)}, "0 of 2 lie beyond ±0.1", "lies"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			mv := &ModelVerdict{Diffs: c.diffs, Largest: 0}
			got := describedText("Boyce index of m", "base", mv, MetricInfo{Key: MetricKeyBoyce, Kind: MetricBoyce, Tolerance: 0.1})
			checkWords(t, "Boyce", got, []string{c.want}, []string{c.notWant})
		})
	}
}

// sameAsNull is a Sensitivity whose models each score as the null n on
// the base extent (every difference and its interval 0), as a model
// passed both as --model and as --null does.
func sameAsNull(models ...string) *Sensitivity {
	s := &Sensitivity{BaseExtent: "base"}
	for _, m := range models {
		s.AboveNull = append(s.AboveNull, AboveNull{Metric: "auc", Model: m, Null: "twin", NullKind: "user", BaseExtent: "base",
			BaseReading: ReadingNotAbove, Defined: 1, NotAbove: 1,
			Gaps: []NullGap{{Extent: "base", Defined: true, CommonPoints: 48, Method: "placements", ModelValue: 0.726, NullValue: 0.726, Reading: ReadingNotAbove}}})
	}
	return s
}

// TestReplySameAsNullAgrees: the reply's sentence on models that score as
// a null agrees with their number: "it shows" for one, "they show" for
// several ("the AUCs of m and m2 are the same as that of twin ..., so on
// that extent it shows nothing" was written).
func TestReplySameAsNullAgrees(t *testing.T) {
	cases := []struct {
		models        []string
		want, notWant string
	}{
		{[]string{"m"}, "the AUC of m is the same as that of twin (every paired difference 0), so on that extent it shows nothing beyond what twin holds", "they show"},
		{[]string{"m", "m2"}, "the AUCs of m and m2 are the same as that of twin (every paired difference 0), so on that extent they show nothing beyond what twin holds", "it shows"},
	}
	for _, c := range cases {
		checkWords(t, "reply", reviewerNullText(sameAsNull(c.models...)), []string{c.want}, []string{c.notWant})
	}
}

// TestUndefinedOnItsOnlyExtent: a metric undefined on the base extent
// when the model is scored there and nowhere else (a partial ROC ratio
// whose 1 − E crossing falls among tied test points, in a family of one
// extent) is "undefined on base", not "not scored on base" (the model is
// scored there) nor "scored on base only" (which suggests a value).
func TestUndefinedOnItsOnlyExtent(t *testing.T) {
	r := loadSample(t)
	onlyExtents(r, "base")
	key := MetricKeyPartialROC(r.Settings.E[0])
	for i := range r.Scores {
		if sc := &r.Scores[i]; sc.Model == "good" && sc.Extent == "base" {
			for j := range sc.PartialROC {
				sc.PartialROC[j].Defined, sc.PartialROC[j].Reason = false, "the 1 - E crossing falls among test points tied at one value"
			}
		}
	}
	s := analyzed(t, r)
	cases := []struct {
		name, model   string
		want, notWant []string
	}{
		{"undefined there", "good",
			// A described score "was not described", not "undetermined"
			// (sentence audit of 2026-12-05).
			[]string{"not described (undefined on base, its only scored extent)",
				"undefined on the base extent base (the 1 - E crossing falls among test points tied at one value), the only extent it is scored on, so there is nothing to compare."},
			[]string{"not scored on base", "scored on the base extent base only", "undetermined ("}},
		{"defined there", "broad",
			[]string{"not described (scored on base only)", "scored on the base extent base only, so there is nothing to compare."},
			[]string{"undefined on", "undetermined ("}},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			mv := s.findModelVerdict(key, c.model)
			if mv == nil {
				t.Fatalf("no partial ROC verdict of %s", c.model)
			}
			checkWords(t, "phrase and sentence", verdictPhrase(mv)+"\n"+mv.Sentence, c.want, c.notWant)
		})
	}
}

// TestRankingLeaderFirst: the methods' results and the reply lead an AUC
// model comparison with the model better beyond noise on more extents,
// as the headline does, and say "did not differ" when neither is better
// anywhere ("worse was better than truth beyond noise on 0 of 11 extents,
// worse on 11" and "a scored above b beyond noise on 0 of 9 extents" were
// written: true, but read as findings).
func TestRankingLeaderFirst(t *testing.T) {
	cases := []struct {
		name           string
		rk             ModelRanking
		methods, reply string
		notWant        []string
	}{
		{"second ahead everywhere", ModelRanking{Model: "worse", Other: "truth", Extents: 11, Worse: 11, Diffs: make([]ExtentDifference, 11)},
			"By AUC, truth was better than worse beyond noise on 11 of 11 extents, worse on 0 and within noise on 0.",
			"By AUC, truth scored above worse beyond noise on 11 of 11 extents and below it on 0, so their order held on every extent. ",
			[]string{"worse was better", "worse scored above"}},
		{"second ahead on some", ModelRanking{Model: "a", Other: "b", Extents: 6, Better: 1, Worse: 4, WithinNoise: 1, Diffs: make([]ExtentDifference, 6)},
			"By AUC, b was better than a beyond noise on 4 of 6 extents, worse on 1 and within noise on 1.",
			"By AUC, b scored above a beyond noise on 4 of 6 extents and below it on 1, so their order depends on the extent. ",
			[]string{"a was better", "a scored above"}},
		{"first ahead", ModelRanking{Model: "a", Other: "b", Extents: 11, Better: 7, WithinNoise: 4, Diffs: make([]ExtentDifference, 11)},
			"By AUC, a was better than b beyond noise on 7 of 11 extents, worse on 0 and within noise on 4.",
			"By AUC, a scored above b beyond noise on 7 of 11 extents and below it on 0, so their order did not reverse beyond noise on any extent. ",
			nil},
		{"neither", ModelRanking{Model: "a", Other: "b", Extents: 9, WithinNoise: 9, Diffs: make([]ExtentDifference, 10)},
			"By AUC, a and b did not differ beyond noise on any of the 9 extents compared.",
			"By AUC, a and b did not differ beyond noise on any of the 9 extents compared. ",
			[]string{"on 0 of 9"}},
		{"neither, one extent", ModelRanking{Model: "a", Other: "b", Extents: 1, WithinNoise: 1, Diffs: make([]ExtentDifference, 1)},
			"By AUC, a and b did not differ beyond noise on the 1 extent compared.",
			"By AUC, a and b did not differ beyond noise on the 1 extent compared. ",
			[]string{"any of the 1"}},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			if got := methodsRankingText(c.rk); got != c.methods {
				t.Errorf("methods: %q\nwant     %q", got, c.methods)
			}
			if got := reviewerRankingText(c.rk); got != c.reply {
				t.Errorf("reply: %q\nwant   %q", got, c.reply)
			}
			checkWords(t, "methods and reply", methodsRankingText(c.rk)+reviewerRankingText(c.rk), nil, c.notWant)
		})
	}
}

// TestAnalysisRankingLeaderFirst: the Analysis sentence on two models
// leads with the one better beyond noise on more extents, and says "differ
// beyond noise on none" when neither is better anywhere ("AUC: worse is
// better than truth beyond noise on 0 of 11 extents, worse on 11" was
// written). The counts come from the ranking itself.
func TestAnalysisRankingLeaderFirst(t *testing.T) {
	cases := []struct {
		name          string
		diff, lo, hi  float64
		want, notWant string
	}{
		{"second ahead", -0.05, -0.08, -0.02, "AUC: truncated is better than good beyond noise on %d of %d extents, worse on 0, within noise on 0", "good is better"},
		{"neither", 0.01, -0.02, 0.04, "AUC: good and truncated differ beyond noise on none of %[2]d extents (paired differences, 95%% intervals).", "is better than"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			r := loadSample(t)
			for i := range r.Paired {
				if p := &r.Paired[i]; p.Metric == "auc" && p.Kind == PairedKindModel && p.Model == "good" && p.OtherModel == "truncated" && p.Defined {
					p.Diff, p.Low, p.High = c.diff, Float(c.lo), Float(c.hi)
				}
			}
			s := analyzed(t, r)
			for _, rk := range s.Rankings {
				if rk.Metric == "auc" && rk.Model == "good" && rk.Other == "truncated" {
					if rk.Extents < 2 {
						t.Fatalf("too few extents compared: %+v", rk)
					}
					checkWords(t, "ranking", rk.Sentence, []string{fmt.Sprintf(c.want, rk.Extents, rk.Extents)}, []string{c.notWant})
					return
				}
			}
			t.Fatal("no AUC comparison of good and truncated")
		})
	}
}

// TestBoyceVerdictNamesUndescribed: the Boyce index's summary line says
// "described, not judged, for every model" only when every model has a
// difference from the base extent; a model whose index is undefined on
// the base extent (too few windows with background area, as a model that
// is 1 on the test cells and 0 elsewhere gives) is named apart ("Boyce
// index: described, not judged, for every model" was written beside
// "Boyce index of flat: undetermined, it is undefined on base").
func TestBoyceVerdictNamesUndescribed(t *testing.T) {
	m := MetricInfo{Key: MetricKeyBoyce, Kind: MetricBoyce, Label: "Boyce index", Tolerance: 0.1}
	described := ModelVerdict{Model: "truth", Base: "base", Largest: 0, Diffs: []ExtentDifference{{Extent: "hull", Defined: true, Diff: -0.15}}}
	undefined := ModelVerdict{Model: "flat", Base: "base", Largest: -1, Diffs: []ExtentDifference{{Extent: "hull"}}}
	cases := []struct {
		name          string
		mvs           []ModelVerdict
		want, notWant string
	}{
		{"all described", []ModelVerdict{described, described}, "Boyce index: described, not judged, for every model (its paired intervals", "could be formed"},
		{"one undefined", []ModelVerdict{undefined, described},
			"Boyce index: described, not judged, for truth (its paired intervals fall short of their 95% coverage: " + BoyceCoverage + " in our simulation check); no difference from the base extent could be formed for flat.",
			"every model"},
		{"none described", []ModelVerdict{undefined, undefined}, "Boyce index: no difference from the base extent could be formed for any model", "described, not judged"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			checkWords(t, "Boyce verdict", verdictFor(m, c.mvs).Sentence, []string{c.want}, []string{c.notWant})
		})
	}
}

// TestDecompositionIdenticalCapitalised: a score equal for every model on
// every extent (an omission rate of 0 throughout, as a model that ranks
// every test point above its cut gives) opens its decomposition sentence
// with a capital ("omission at minimum training presence is identical
// ..." was written).
func TestDecompositionIdenticalCapitalised(t *testing.T) {
	r := loadSample(t)
	for i := range r.Scores {
		for j := range r.Scores[i].Thresholds {
			r.Scores[i].Thresholds[j].Omission = 0
		}
	}
	s := analyzed(t, r)
	n := 0
	for _, d := range s.Decompositions {
		if strings.Contains(d.Sentence, "is identical for every model and extent") {
			n++
			checkWords(t, "decomposition", d.Sentence, []string{"Omission at "}, []string{"omission at"})
		}
	}
	if n == 0 {
		t.Fatal("no decomposition says its score is identical for every model and extent")
	}
}

// TestUndeterminedPhraseSaysWhy: the headline's and the results' phrase
// for an undetermined verdict whose largest difference has an interval
// within the tolerance says what leaves it undetermined; quoted alone,
// that interval reads as a robust verdict ("undetermined (largest
// difference from base +0.040 on a, 95% interval +0.035 to +0.045)" was
// written, with ±0.05).
func TestUndeterminedPhraseSaysWhy(t *testing.T) {
	inside := ExtentDifference{Extent: "a", Defined: true, Method: "placements", Diff: 0.04, Low: Float(0.035), High: Float(0.045), Position: "inside"}
	wide := ExtentDifference{Extent: "b", Defined: true, Method: "placements", Diff: 0.01, Low: Float(-0.06), High: Float(0.08), Position: "overlapping"}
	few := ExtentDifference{Extent: "c", Defined: true, Method: "placements", CommonPoints: 6, Diff: 0.01, Low: Float(-0.2), High: Float(0.2), Position: positionTooFew, minPoints: 10}
	undef := ExtentDifference{Extent: "d"}
	mk := func(v Judgement, ds ...ExtentDifference) *ModelVerdict {
		mv := &ModelVerdict{Verdict: v, Base: "base", Tolerance: 0.05, Largest: 0, Diffs: ds}
		for _, d := range ds {
			if !d.Defined {
				mv.Undefined = append(mv.Undefined, d.Extent)
			}
		}
		return mv
	}
	head := "(largest difference from base +0.040 on a, 95% interval +0.035 to +0.045"
	cases := []struct {
		name string
		mv   *ModelVerdict
		want string
	}{
		{"straddles elsewhere", mk(JudgementUndetermined, inside, wide),
			head + "; the 95% interval straddles ±0.05 on 1 of 2 extents, reaching furthest beyond it with +0.010 on b (95% interval -0.060 to +0.080))"},
		{"undefined elsewhere", mk(JudgementUndetermined, inside, undef), head + "; no difference could be formed on d)"},
		{"not judged elsewhere", mk(JudgementUndetermined, inside, few), head + "; not judged on 1 extent: too few common test points)"},
		{"robust", mk(JudgementRobust, inside), head + ")"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			checkWords(t, "phrase", verdictPhrase(c.mv), []string{c.want}, nil)
		})
	}
}

// TestAboveNullUndefinedSaysOnHowFew: a model-minus-null difference that
// could not be formed on the base extent because the two share fewer than
// 2 test points says so (a study with 2 test points, 1 of them on base,
// gave "On base, AUC of good minus distance_null (distance-only null)
// could not be formed." and no reason).
func TestAboveNullUndefinedSaysOnHowFew(t *testing.T) {
	r := &Results{}
	m := MetricInfo{Key: "auc", Kind: MetricAUC, Label: "AUC"}
	cases := []struct {
		name          string
		gap           NullGap
		want, notWant string
	}{
		{"one common point", NullGap{Extent: "base", CommonPoints: 1}, "On base, AUC of good minus nul could not be formed: they share 1 test point.", "points"},
		{"none", NullGap{Extent: "base", CommonPoints: 0}, "could not be formed: they share 0 test points.", ""},
		{"undefined on more", NullGap{Extent: "base", CommonPoints: 30}, "On base, AUC of good minus nul could not be formed.", "share"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			an := &AboveNull{Metric: "auc", Model: "good", Null: "nul", BaseExtent: "base", BaseReading: ReadingUndefined, Gaps: []NullGap{c.gap}}
			nw := []string{}
			if c.notWant != "" {
				nw = append(nw, c.notWant)
			}
			checkWords(t, "sentence", aboveNullSentence(r, m, an), []string{c.want}, nw)
		})
	}
}

// TestNoDifferenceSaysOnHowFew: an AUC verdict with no difference formed
// because the base extent shares fewer than 2 test points with every
// other extent says so, in its sentence and in the headline's phrase (a
// study with 1 test point on base gave "undetermined, no paired difference
// from base could be formed." and "undetermined (no difference could be
// formed)" with no reason). A difference missing for another reason (no
// paired record) keeps the plain words.
func TestNoDifferenceSaysOnHowFew(t *testing.T) {
	r := loadSample(t)
	for i := range r.Paired {
		if p := &r.Paired[i]; p.Metric == "auc" && p.Kind == PairedKindExtent && p.Model == "good" {
			p.Defined, p.CommonPoints = false, 1
		}
	}
	s := analyzed(t, r)
	mv := s.findModelVerdict("auc", "good")
	if mv == nil || mv.Largest >= 0 {
		t.Fatalf("verdict: %+v", mv)
	}
	checkWords(t, "sentence", mv.Sentence, []string{"undetermined, no paired difference from base could be formed: it shares at most 1 test point with any other extent."}, nil)
	checkWords(t, "phrase", verdictPhrase(mv), []string{"undetermined (no difference could be formed: base shares at most 1 test point with any other extent)"}, nil)
	plain := &ModelVerdict{Verdict: JudgementUndetermined, Base: "base", BaseDefined: true, Largest: -1, Diffs: []ExtentDifference{{Extent: "hull"}}}
	checkWords(t, "phrase without a record", verdictPhrase(plain), []string{"undetermined (no difference could be formed)"}, []string{"shares"})
}

// TestRankingSaysCompared: when some extents both models are scored on
// are left out of a comparison's count (too few common test points), the
// count says "extents compared": "good and coarse differ beyond noise on
// none of 9 extents" under "Across 10 evaluation extents" read as a
// miscount (12 test points on one edge of the base region, 8 of them on
// points_50km).
func TestRankingSaysCompared(t *testing.T) {
	cases := []struct {
		name                     string
		rk                       ModelRanking
		headline, methods, reply string
	}{
		{"one left out", ModelRanking{Model: "a", Other: "b", Extents: 9, Better: 3, WithinNoise: 6, Diffs: make([]ExtentDifference, 10)},
			"a is better than b beyond noise on 3 of 9 extents compared",
			"By AUC, a was better than b beyond noise on 3 of 9 extents compared, worse on 0 and within noise on 6.",
			"By AUC, a scored above b beyond noise on 3 of 9 extents compared and below it on 0"},
		{"neither, one left out", ModelRanking{Model: "a", Other: "b", Extents: 9, WithinNoise: 9, Diffs: make([]ExtentDifference, 10)},
			"a and b differ beyond noise on none of 9 extents compared", "", ""},
		{"all counted", ModelRanking{Model: "a", Other: "b", Extents: 9, Better: 3, WithinNoise: 6, Diffs: make([]ExtentDifference, 9)},
			"a is better than b beyond noise on 3 of 9 extents",
			"By AUC, a was better than b beyond noise on 3 of 9 extents, worse on 0 and within noise on 6.",
			"By AUC, a scored above b beyond noise on 3 of 9 extents and below it on 0"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			if got := rankingClause(c.rk); got != c.headline {
				t.Errorf("headline: %q\nwant      %q", got, c.headline)
			}
			if c.methods != "" {
				checkWords(t, "methods", methodsRankingText(c.rk), []string{c.methods}, nil)
				checkWords(t, "reply", reviewerRankingText(c.rk), []string{c.reply}, nil)
			}
		})
	}
}

// TestMethodsOneExtentClaimsNoComparison: with one scored extent the
// methods paragraph does not describe comparisons across extents that
// were not made (it said "Differences between extents of one model ...
// were taken", "We call a score robust to the extent when ..." and "we
// report the spread of each score across extents, the split of the sums
// of squares ..." for a family of 1 evaluation extent); with several it
// still does.
func TestMethodsOneExtentClaimsNoComparison(t *testing.T) {
	across := []string{"Differences between extents of one model", "We call a score robust to the extent when", "the spread of each score across extents",
		"Where the test records differ, the change of test set is reported separately", "The Boyce index's differences were described"}
	t.Run("one extent", func(t *testing.T) {
		r := loadSample(t)
		onlyExtents(r, "base")
		analyzed(t, r)
		methods, _, _ := strings.Cut(methodsText(r), "Results: ")
		checkWords(t, "methods", methods, []string{"With one scored extent, no score could be compared across extents, so no score was judged robust or extent-sensitive.",
			"Differences between models on one extent were taken on the test records both sides hold (paired)", "Models were compared by their paired differences on that extent."}, across)
	})
	t.Run("several extents", func(t *testing.T) {
		r := analyzedSample(t)
		methods, _, _ := strings.Cut(methodsText(r), "Results: ")
		checkWords(t, "methods", methods, across[:4], []string{"With one scored extent"})
	})
}

// TestTruncationQuotesTheFlaggedTie: the truncation sentence's "up to"
// quotes the largest flagged tie of test points, not the longest last
// segment of any curve: a model whose curve on one extent runs flat at
// y = 1 over 0.824 of the area axis (background below every test point,
// not flagged) and ties test points over 0.300 on another was said to
// "share its lowest value with up to 0.824 of the area axis".
func TestTruncationQuotesTheFlaggedTie(t *testing.T) {
	a := &analysis{r: &Results{Settings: Settings{E: []float64{0.05}}}}
	tc := &TruncationCheck{Model: "m", FloorShare: 0.5, FloorFlag: true, Flag: true, MaxJump: 0.824,
		Tails: []TailJump{{Extent: "hull", YFrom: 0.8, Jump: 0.3}, {Extent: "base", YFrom: 0.9, Jump: 0.25}}}
	checkWords(t, "truncation", a.truncationSentence(tc), []string{"on 2 extents test points share its lowest value with up to 0.300 of the area axis (flagged above 0.2)"}, []string{"0.824"})
}

// TestMethodsRecordsAllOf: the methods' count of extents holding every
// test record names them as a person would: "both on 8 of the 11
// extents" for 2 test records ("all 2 on ..." was written), "the one"
// for 1, "all 60" otherwise.
func TestMethodsRecordsAllOf(t *testing.T) {
	cases := []struct {
		test   int
		counts []int
		want   string
	}{
		{2, []int{1, 2, 2}, "the extents differ in their test records: both on 2 of the 3 extents; base 1."},
		{1, []int{1, 0, 1}, "the extents differ in their test records: the one on 2 of the 3 extents; region 0."},
		{60, []int{48, 60, 60}, "the extents differ in their test records: all 60 on 2 of the 3 extents; base 48."},
	}
	for _, c := range cases {
		r := &Results{PointCounts: PointCounts{Train: 80, Test: c.test},
			Sensitivity: &Sensitivity{BaseExtent: "base", ScoredExtents: []string{"base", "region", "hull"}, TestPoints: c.counts, TestPointsVary: true}}
		var b strings.Builder
		methodsRecords(&b, r)
		checkWords(t, "records", b.String(), []string{c.want}, nil)
	}
}

// TestSortingBiasNoteAboveOne: the sorting-bias note reads a ratio above
// 1 when some extent has one (12 test points along the far edge of the
// base region gave ratios up to 2.452 under a note that explained only
// values below 1), and keeps to values below 1 otherwise.
func TestSortingBiasNoteAboveOne(t *testing.T) {
	above := "A ratio above 1 means the test points lie farther from the training points than the extent's cells do, by that measure (mean or median)."
	for _, c := range []struct {
		ratio float64
		has   bool
	}{{2.452, true}, {0.819, false}} {
		r := &Results{Extents: []Extent{{ID: "base", SortingBias: &SortingBias{Defined: true, RatioMean: c.ratio, RatioMedian: c.ratio}}}}
		if got := sortingBiasNoteFor(r); strings.Contains(got, above) != c.has || !strings.HasPrefix(got, sortingBiasNote) {
			t.Errorf("ratio %g: %q", c.ratio, got)
		}
	}
}

// TestReplyRobustNamesTheTolerance: the reply's answer for an AUC robust
// for every model names the tolerance with its value, as ours only when
// it is our default ("Within our tolerance, ..." was written for a run
// with --tolerance-auc 0.3).
func TestReplyRobustNamesTheTolerance(t *testing.T) {
	for _, c := range []struct {
		tol           float64
		want, notWant string
	}{
		{0.3, "The AUC moved by less than the tolerance of ±0.3 set for this run between these extents: every 95% interval of its differences lies within it.", "our tolerance"},
		{DefaultToleranceAUC, "The AUC moved by less than our tolerance of ±0.02 between these extents: every 95% interval of its differences lies within it.", "set for this run"},
	} {
		s := &Sensitivity{ScoredExtents: []string{"base", "hull"}, Verdicts: []Verdict{{Metric: "auc", Verdict: JudgementRobust, Tolerance: c.tol}}}
		checkWords(t, "reply", aucAnswer(s), []string{c.want}, []string{c.notWant})
	}
}

// TestRobustPhraseEveryZero: a robust verdict whose differences are all 0
// says so in the headline's and the results' phrase instead of naming
// one extent as "the largest" ("robust (largest difference from base
// +0.000 on hull, 95% interval +0.000 to +0.000)").
func TestRobustPhraseEveryZero(t *testing.T) {
	zero := func(ext string) ExtentDifference {
		return ExtentDifference{Extent: ext, Defined: true, Method: "placements", Position: "inside"}
	}
	mv := &ModelVerdict{Verdict: JudgementRobust, Base: "base", Tolerance: 0.02, Largest: 0, Diffs: []ExtentDifference{zero("hull"), zero("whole")}}
	checkWords(t, "phrase", verdictPhrase(mv), []string{"robust (every difference from base is 0)"}, []string{"largest", "hull"})
	mv.Diffs[1].Diff, mv.Diffs[1].Low, mv.Diffs[1].High, mv.Largest = 0.004, Float(0.001), Float(0.007), 1
	checkWords(t, "phrase", verdictPhrase(mv), []string{"robust (largest difference from base +0.004 on whole, 95% interval +0.001 to +0.007)"}, nil)
}

// TestAnalysisNotesNothingToCompare: with one scored extent (or none) the
// Analysis notes say there is nothing to compare, as each verdict's
// sentence does, instead of explaining differences, spreads and sums of
// squares across extents that the tables cannot hold (the page of a
// family of one extent described "the score on every extent minus the
// score on base" above an empty table). With two extents they still
// explain the tables.
func TestAnalysisNotesNothingToCompare(t *testing.T) {
	explain := []string{"For each metric and model, the score on every extent minus the score on",
		"A description of the chosen family: range and SD", "split into extent and model main effects"}
	cases := []struct {
		name          string
		build         func(r *Results)
		want, notWant []string
	}{
		{name: "only the base extent",
			build: func(r *Results) { onlyExtents(r, "base") },
			want: []string{"Only one extent, base, could be scored, so there is nothing to compare: no score has another extent to take a difference from.",
				"the table gives each score on base alone, so its range is 0 and it has no SD across extents",
				"with no second extent there is no extent effect to split from the model effect"},
			notWant: explain},
		{name: "one extent standing in for the unscored base",
			build: func(r *Results) {
				onlyExtents(r, "base", "region_b50")
				for i := range r.Scores {
					if r.Scores[i].Extent == "base" {
						r.Scores[i].Scored, r.Scores[i].NotScored = false, "no test points inside this extent"
					}
				}
			},
			want:    []string{"<h3>Difference from the reference extent</h3><p>Only one extent, region_b50, could be scored, so there is nothing to compare"},
			notWant: explain},
		{name: "two extents",
			build:   func(r *Results) { onlyExtents(r, "base", "region_b50") },
			want:    explain,
			notWant: []string{"nothing to compare"}},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			r := loadSample(t)
			c.build(r)
			analyzed(t, r)
			page, err := htmlPage(r, nil, methodsDoc{})
			if err != nil {
				t.Fatal(err)
			}
			_, analysis, _ := strings.Cut(string(page), `<section id="analysis">`)
			analysis, _, _ = strings.Cut(analysis, "</section>")
			checkWords(t, "analysis", analysis, c.want, c.notWant)
		})
	}
	// No extent scored: the notes' words, from the writer itself.
	none := loneExtentNotes(&Sensitivity{})
	for _, n := range []string{none.Differences, none.Spread, none.Decomposition} {
		checkWords(t, "note", n, []string{"No model could be scored on any extent, so there is nothing to compare"}, nil)
	}
	if loneExtentNotes(&Sensitivity{ScoredExtents: []string{"base", "hull"}}) != nil {
		t.Error("two scored extents given the notes of one")
	}
}

// TestNotComparableSaysWhy: a model comparison formed on no extent says
// why ("good and broad cannot be compared on any extent." said nothing
// more): one model's score, or both, undefined on every extent, or on
// each extent one of the two undefined, or no paired difference formed
// where both are defined. The sample's partial ROC ratio at E = 0.05 is
// made undefined (scores and model pairs) where each case says.
func TestNotComparableSaysWhy(t *testing.T) {
	const key = "partial_roc_e0.05"
	undefine := func(r *Results, model string, on func(ext string) bool) {
		for i := range r.Scores {
			if sc := &r.Scores[i]; sc.Model == model && on(sc.Extent) {
				for j := range sc.PartialROC {
					if sc.PartialROC[j].E == 0.05 {
						sc.PartialROC[j].Defined = false
					}
				}
			}
		}
	}
	// Every difference of good and broad is undefined in every case.
	unpair := func(r *Results) {
		for i := range r.Paired {
			if p := &r.Paired[i]; p.Metric == key && p.Kind == PairedKindModel && (p.Model == "broad" || p.OtherModel == "broad") && (p.Model == "good" || p.OtherModel == "good") {
				p.Defined = false
			}
		}
	}
	every := func(string) bool { return true }
	cases := []struct {
		name          string
		build         func(r *Results)
		want, notWant []string
	}{
		{name: "one model undefined on every extent",
			build: func(r *Results) { undefine(r, "broad", every) },
			want:  []string{"Partial ROC ratio, E = 0.05: good and broad cannot be compared on any extent: broad's partial ROC ratio at E = 0.05 is undefined on every extent."}},
		{name: "both undefined on every extent",
			build: func(r *Results) { undefine(r, "broad", every); undefine(r, "good", every) },
			want:  []string{"good and broad cannot be compared on any extent: good's and broad's partial ROC ratio at E = 0.05 are undefined on every extent."}},
		{name: "each undefined where the other is defined",
			build: func(r *Results) {
				undefine(r, "broad", func(ext string) bool { return ext == "base" })
				undefine(r, "good", func(ext string) bool { return ext != "base" })
			},
			want:    []string{"good and broad cannot be compared on any extent: on every extent that scores both, one of them is undefined."},
			notWant: []string{"on every extent."}},
		{name: "both defined, no difference formed",
			build:   func(r *Results) {},
			want:    []string{"good and broad cannot be compared on any extent: on every extent that scores both, one of them is undefined or no paired difference could be formed."},
			notWant: []string{"on every extent."}},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			r := liftResampled(loadSample(t))
			c.build(r)
			unpair(r)
			s := analyzed(t, r)
			for _, rk := range s.Rankings {
				if rk.Metric == key && rk.Model == "good" && rk.Other == "broad" {
					checkWords(t, "ranking", rk.Sentence, c.want, c.notWant)
					return
				}
			}
			t.Fatal("no comparison of good and broad")
		})
	}
}

// TestWithinBracket: a verdict line's note goes inside the label's own
// bracket when the label ends with one ("AUC (cells unweighted; tolerance
// ...)"), never as a bracket after a bracket; and no verdict sentence of
// the analysed sample holds ") (" (it read "AUC (cells unweighted)
// (tolerance ±0.02, ...)").
func TestWithinBracket(t *testing.T) {
	for _, c := range []struct{ label, note, want string }{
		{"AUC", "tolerance ±0.02", "AUC (tolerance ±0.02)"},
		{"AUC (cells unweighted)", "tolerance ±0.02", "AUC (cells unweighted; tolerance ±0.02)"},
		{"Partial ROC ratio, E = 0.05", "tolerance ±0.05", "Partial ROC ratio, E = 0.05 (tolerance ±0.05)"},
		{"odd)", "n", "odd) (n)"}, // no opening bracket: not the label's own
	} {
		if got := withinBracket(c.label, c.note); got != c.want {
			t.Errorf("withinBracket(%q, %q) = %q, want %q", c.label, c.note, got, c.want)
		}
	}
	r := analyzedSample(t)
	n := 0
	for _, v := range r.Sensitivity.Verdicts {
		if strings.Contains(v.Sentence, ") (") {
			t.Errorf("verdict sentence with a bracket after a bracket: %s", v.Sentence)
		}
		if strings.Contains(v.Sentence, "(cells unweighted; tolerance") {
			n++
		}
	}
	if n == 0 {
		t.Error("the sample has no verdict on the AUC with cells unweighted: the check above saw none")
	}
}

// TestSharePercentsAddUp: the split of a sum of squares into extent,
// model and non-additive parts prints whole percents that add up to 100,
// in the sentence and in the table ("extent 50%, model 48% and
// non-additive 3%" was written for shares 0.496, 0.477 and 0.027, and
// "33%" three times for thirds); two models are "both models" ("scored
// for all 2 models" was written). Expected percents worked by hand:
// largest remainder, an earlier share first on a tie.
func TestSharePercentsAddUp(t *testing.T) {
	cases := []struct {
		name   string
		shares [3]float64
		want   string
		models int
	}{
		{"demo-like", [3]float64{0.496, 0.477, 0.027}, "for both models, the sum of squares of AUC splits into extent 49%, model 48% and non-additive 3%;", 2},
		{"thirds", [3]float64{1.0 / 3, 1.0 / 3, 1.0 / 3}, "for all 3 models, the sum of squares of AUC splits into extent 34%, model 33% and non-additive 33%;", 3},
		{"tiny ends", [3]float64{0.004, 0.992, 0.004}, "splits into extent 1%, model 99% and non-additive 0%;", 2},
		{"exact", [3]float64{0.25, 0.5, 0.25}, "splits into extent 25%, model 50% and non-additive 25%;", 2},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			models := []string{"a", "b", "c"}[:c.models]
			d := &Decomposition{Metric: "auc", Models: models, Extents: []string{"e1", "e2", "e3"}, Defined: true,
				ShareExtent: c.shares[0], ShareModel: c.shares[1], ShareResidual: c.shares[2]}
			got := decompositionSentence(MetricInfo{Key: "auc", Label: "AUC"}, d)
			checkWords(t, "decomposition", got, []string{c.want}, []string{"all 2 models"})
			v := decompositionSection(&Sensitivity{Decompositions: []Decomposition{*d}}, map[string]string{"auc": "AUC"})
			sum := 0
			for _, cl := range v.Table.Rows[0][2:5] {
				n, err := strconv.Atoi(cl.text)
				if err != nil {
					t.Fatalf("table cell %q: %v", cl.text, err)
				}
				sum += n
			}
			if sum != 100 {
				t.Errorf("table row %v adds up to %d%%, not 100", v.Table.Rows[0][2:5], sum)
			}
		})
	}
}

// TestFewExtentsQuantifiers: model comparisons counted over one or two
// extents say so in words that fit the count: "do not differ beyond noise
// on the 1 extent", "on neither of the 2 extents", "score the same on both
// extents" ("differ beyond noise on none of 1 extent" and "on all 2
// extents" were written).
func TestFewExtentsQuantifiers(t *testing.T) {
	within := func(ext string) ExtentDifference {
		return ExtentDifference{Extent: ext, Defined: true, Diff: 0.01, Low: Float(-0.02), High: Float(0.04), Position: "inside"}
	}
	zero := func(ext string) ExtentDifference {
		return ExtentDifference{Extent: ext, Defined: true, Position: "inside"}
	}
	cases := []struct {
		name          string
		rk            ModelRanking
		want, notWant string
	}{
		{"one extent", ModelRanking{Metric: "auc", Model: "a", Other: "b", Extents: 1, WithinNoise: 1, Diffs: []ExtentDifference{within("base")}},
			"a and b do not differ beyond noise on the 1 extent", "none of 1"},
		{"two extents", ModelRanking{Metric: "auc", Model: "a", Other: "b", Extents: 2, WithinNoise: 2, Diffs: []ExtentDifference{within("base"), within("x")}},
			"a and b differ beyond noise on neither of the 2 extents", "none of 2"},
		{"three extents", ModelRanking{Metric: "auc", Model: "a", Other: "b", Extents: 3, WithinNoise: 3, Diffs: []ExtentDifference{within("base"), within("x"), within("y")}},
			"a and b differ beyond noise on none of 3 extents", "neither"},
		{"two identical", ModelRanking{Metric: "auc", Model: "a", Other: "b", Extents: 2, WithinNoise: 2, Diffs: []ExtentDifference{zero("base"), zero("x")}},
			"a and b score the same on both extents", "all 2"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			checkWords(t, "ranking clause", rankingClause(c.rk), []string{c.want}, []string{c.notWant})
		})
	}
}

// TestAgainstTheNulls: the headline's clauses on the nulls open with
// "Against the nulls:" when they name two nulls or more, and with
// "Against the null:" when they name one, whatever the number of models
// ("Against the null:" before clauses on effort and distance_null was
// written).
func TestAgainstTheNulls(t *testing.T) {
	gap := func(model, null string) AboveNull {
		return AboveNull{Metric: "auc", Model: model, Null: null, BaseExtent: "base", BaseReading: ReadingBelow, Defined: 1, Below: 1,
			Gaps: []NullGap{{Extent: "base", Defined: true, CommonPoints: 39, Method: "placements", Diff: -0.3, Low: -0.4, High: -0.2, Reading: ReadingBelow}}}
	}
	cases := []struct {
		name          string
		ans           []AboveNull
		want, notWant string
	}{
		{"two nulls", []AboveNull{gap("m", "effort"), gap("m", "distance_null")}, " Against the nulls: m is below effort", "Against the null:"},
		{"one null, two models", []AboveNull{gap("m", "distance_null"), gap("k", "distance_null")}, " Against the null: m is below distance_null", "Against the nulls"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			checkWords(t, "headline", aboveNullHeadline(&Sensitivity{AboveNull: c.ans}), []string{c.want}, []string{c.notWant})
		})
	}
}

// TestNullSentenceModelsCounted: the methods' sentence on a null lists
// the models' AUC on the base extent under "model:" when there is one
// ("(models: md 0.859)" was written) and "models:" when there are more.
func TestNullSentenceModelsCounted(t *testing.T) {
	for _, c := range []struct {
		models        []string
		want, notWant string
	}{
		{[]string{"md"}, "was 0.885 on the base extent (model: md 0.859).", "models:"},
		{[]string{"md", "ew"}, "was 0.885 on the base extent (models: md 0.859, ew 0.859).", "model:"},
	} {
		r := &Results{Extents: []Extent{{ID: "base", Status: vocab.StatusOK}, {ID: "x", Status: vocab.StatusOK}}}
		for _, m := range c.models {
			r.Models = append(r.Models, Model{Name: m, Role: RoleModel})
			r.Scores = append(r.Scores, Score{Model: m, Extent: "base", Scored: true, AUC: 0.859})
		}
		r.Models = append(r.Models, Model{Name: "effort", Role: RoleNull, NullKind: NullRaster})
		r.Scores = append(r.Scores, Score{Model: "effort", Extent: "base", Scored: true, AUC: 0.885}, Score{Model: "effort", Extent: "x", Scored: true, AUC: 0.9})
		checkWords(t, "null sentence", nullSentences(r), []string{c.want}, []string{c.notWant})
	}
}

// TestChainSlopeNotPrintedAsZero: a chain's slope too small for three
// decimals is printed with the digits that tell it from 0 ("AUC changes
// by +0.000 per doubling" was written beside AUCs going from 0.604 to
// 0.605); a slope of exactly 0 stays "+0.000".
func TestChainSlopeNotPrintedAsZero(t *testing.T) {
	for _, c := range []struct {
		slope float64
		want  string
	}{
		{0.0004, "changes by +0.0004 per doubling"},
		{-0.0003, "changes by -0.0003 per doubling"},
		{0.0123, "changes by +0.012 per doubling"},
		{0, "changes by +0.000 per doubling"},
	} {
		cs := ChainSummary{Chain: "points", Model: "m", Members: []string{"a", "b", "c"}, MemberAreasKm2: []float64{10, 20, 40},
			StartAUC: 0.604, EndAUC: 0.605, Change: 0.001, SharesDefined: true, Largest: 0,
			Slope: Slope{Defined: true, PerDoubling: c.slope, N: 3},
			Steps: []ChainStep{{Kind: StepRing, Inner: "a", Outer: "b", RingAreaKm2: 10, AUCInner: 0.604, AUCOuter: 0.605, AUCRing: 0.606, AUCRingDefined: true, Change: 0.001, Share: 1}}}
		checkWords(t, "chain", chainSentence(&cs, "model", DefaultToleranceAUC), []string{c.want}, nil)
	}
}

// TestTinyDifferencesNotPrintedAsZero: a difference, interval bound, SE or
// x_E too small for three decimals prints the digits that tell it from 0,
// with its own sign ("largest difference from base +0.000 on hull, 95%
// interval +0.000 to +0.000" was written for -0.0003, a model ranking
// every test point above nearly every cell); below 5e-7 (our cut-off)
// it stays "+0.000". Expected strings worked by hand.
func TestTinyDifferencesNotPrintedAsZero(t *testing.T) {
	d := ExtentDifference{Extent: "hull", Defined: true, Diff: -0.0003, Low: Float(-0.00034), High: Float(-0.00026), Method: "placements", Position: "inside"}
	mv := &ModelVerdict{Verdict: JudgementRobust, Base: "base", Tolerance: 0.02, Diffs: []ExtentDifference{d}, Largest: 0, BaseDefined: true}
	checkWords(t, "verdict phrase", verdictPhrase(mv), []string{"robust (largest difference from base -0.0003 on hull, 95% interval -0.0003 to -0.0003)"}, []string{"+0.000"})
	checkWords(t, "difference", differenceText(d, 0.02), []string{"-0.0003 on hull (95% interval -0.0003 to -0.0003)"}, []string{"0.000 "})
	for _, c := range []struct {
		v    float64
		want string
	}{
		{-0.0003, "-0.0003"}, {0.00002, "+0.00002"}, {0.0123, "+0.012"}, {0, "+0.000"}, {1e-9, "+0.000"}, {-1e-9, "+0.000"},
	} {
		if got := signedSmall(c.v); got != c.want {
			t.Errorf("signedSmall(%g) = %q, want %q", c.v, got, c.want)
		}
	}
	// A tolerance still gets the digits that tell a bound from it.
	if got := signedSmall(0.0200001, 0.02, -0.02); got != "+0.0200001" {
		t.Errorf("signedSmall near the tolerance = %q", got)
	}
	if got := seText(&Score{TestPoints: 15, AUCSE: 0.00012}); got != "SE 0.0001 from the test records" {
		t.Errorf("seText = %q", got)
	}
}

// TestRangeOfOneValue: a score that prints alike on every extent is said
// to be that value on every extent, not to range from it to itself
// ("AUC of good ranged 1.000–1.000" was written); a real range reads as
// before.
func TestRangeOfOneValue(t *testing.T) {
	for _, c := range []struct {
		lo, hi float64
		n      int
		want   string
	}{
		{0.99971, 0.99996, 10, "was 1.000 on all 10 extents to three decimals"},
		{0.5, 0.5004, 2, "was 0.500 on both extents to three decimals"},
		{0.704, 0.893, 13, "ranged 0.704–0.893 over 13 extents"},
	} {
		if got := rangeOver(c.lo, c.hi, "over", c.n); got != c.want {
			t.Errorf("rangeOver(%g, %g, %d) = %q, want %q", c.lo, c.hi, c.n, got, c.want)
		}
	}
}

// TestGapSameAtBothEnds: a model-minus-null gap that prints alike on the
// smallest and the largest extent is said to be that on both, not to
// move ("the gap moves from +0.100 on a to +0.100 on b" was written).
func TestGapSameAtBothEnds(t *testing.T) {
	got := gapSpan("moves from", 0.1002, "a", "(the smallest extent)", 0.0998, "b", "(the largest)")
	if want := "is +0.100 on both a (the smallest extent) and b (the largest)"; got != want {
		t.Errorf("gapSpan = %q, want %q", got, want)
	}
	got = gapSpan("runs from", 0.042, "a", "(the smallest extent)", -0.055, "b", "(the largest)")
	if want := "runs from +0.042 on a (the smallest extent) to -0.055 on b (the largest)"; got != want {
		t.Errorf("gapSpan = %q, want %q", got, want)
	}
}

// TestChainChangeBelowDecimals: a nested chain whose AUC prints alike at
// both ends gives no share of its change ("goes from 0.440 to 0.440; 242%
// of the gain comes from the ring ..." was written, a gain the reader
// cannot see); it says the change, with its digits.
func TestChainChangeBelowDecimals(t *testing.T) {
	cs := ChainSummary{Chain: "region", Model: "n4", Members: []string{"a", "b", "c"}, MemberAreasKm2: []float64{174000, 300000, 712000},
		StartAUC: 0.4401, EndAUC: 0.4403, Change: 0.0002, SharesDefined: true, Largest: 0,
		Steps: []ChainStep{
			{Kind: StepRing, Inner: "a", Outer: "b", RingAreaKm2: 126000, AUCInner: 0.4401, AUCOuter: 0.4406, AUCRing: 0.441, AUCRingDefined: true, Change: 0.0005, Share: 2.5},
			{Kind: StepRing, Inner: "b", Outer: "c", RingAreaKm2: 412000, AUCInner: 0.4406, AUCOuter: 0.4403, AUCRing: 0.4401, AUCRingDefined: true, Change: -0.0003, Share: -1.5},
		}}
	checkWords(t, "chain", chainSentence(&cs, "model", DefaultToleranceAUC),
		[]string{"goes from 0.440 (a, 174,000 km²) to 0.440 (c, 712,000 km²): it changes by +0.0002 in all, which the three decimals do not show, so no share of the change is given"},
		[]string{"of the gain", "250%"})
	// Ends 0.4396 and 0.4404 both print 0.440; their change is +0.0008,
	// not "+0.001" (worked by hand).
	cs.StartAUC, cs.EndAUC, cs.Change = 0.4396, 0.4404, 0.0008
	checkWords(t, "chain", chainSentence(&cs, "model", DefaultToleranceAUC), []string{"it changes by +0.0008 in all"}, []string{"+0.001"})
	cs.StartAUC, cs.EndAUC, cs.Change = 0.44, 0.44002, 0.00002
	checkWords(t, "chain", chainSentence(&cs, "model", DefaultToleranceAUC), []string{"it changes by +0.00002 in all"}, nil)
}

// TestHeadlineOneValue: the headline says a model's AUC is one value on
// every extent when its ends print alike (AUCs set by hand to 0.9996 +
// k 1e-5 on the sample's extents), not "ranged 1.000–1.000"; the
// methods' results say the same.
func TestHeadlineOneValue(t *testing.T) {
	r := loadSample(t)
	k := 0
	for i := range r.Scores {
		if r.Scores[i].Model == "broad" && r.Scores[i].Scored {
			r.Scores[i].AUC = 0.9996 + float64(k)*1e-5
			k++
		}
	}
	s := analyzed(t, r)
	sp := s.findSpread("auc", "broad")
	want := fmt.Sprintf("AUC of broad was 1.000 on all %d extents (to three decimals) and is", sp.N)
	checkWords(t, "headline", s.Headline, []string{want}, []string{"ranged 1.000–1.000"})
	checkWords(t, "methods", methodsText(r), []string{fmt.Sprintf("AUC of broad was 1.000 on all %d extents to three decimals (", sp.N)}, []string{"ranged 1.000–1.000"})
}

// TestReplySensitiveForEvery: the reply says a score moved beyond the
// tolerance "for every model" when each model's verdict is
// extent-sensitive, and "for at least one model" when only some are
// ("AUC ... moved with the extent by more than the tolerance for at least
// one model" was written when it did for both of the demo's models).
func TestReplySensitiveForEvery(t *testing.T) {
	s := &Sensitivity{ModelNames: []string{"a", "b"}, ScoredExtents: []string{"base", "x", "y"},
		Metrics:  []MetricInfo{{Key: "auc", Label: "AUC"}, {Key: "pa", Label: "predicted area"}},
		Verdicts: []Verdict{{Metric: "auc", Label: "AUC", Verdict: JudgementSensitive}, {Metric: "pa", Label: "predicted area", Verdict: JudgementSensitive}},
		ModelVerdicts: []ModelVerdict{
			{Metric: "auc", Model: "a", Verdict: JudgementSensitive}, {Metric: "auc", Model: "b", Verdict: JudgementSensitive},
			{Metric: "pa", Model: "a", Verdict: JudgementSensitive}, {Metric: "pa", Model: "b", Verdict: JudgementRobust},
		}}
	var b strings.Builder
	reviewerVerdicts(&b, s)
	checkWords(t, "reply", b.String(),
		[]string{"AUC moved with the extent by more than the tolerance for every model.", "Predicted area moved with the extent by more than the tolerance for at least one model."},
		[]string{"AUC and predicted area moved"})
}

// TestAboveNullWithoutSkill: a model above the null beyond noise whose
// own score is at most that of a random ranking (AUC 0.5, partial ROC
// ratio 1) is said to show no skill, in the sentence, the headline, the
// reviewer's reply and the tables; a model above random is not. The
// numbers are the known-answer study's reverse of a good model (AUC
// 0.165 against the distance-only null's 0.110 on test points far from
// the training points), which read "above distance_null beyond noise"
// with nothing more.
func TestAboveNullWithoutSkill(t *testing.T) {
	an := func(model string, mv, nv float64) AboveNull {
		return AboveNull{Metric: "auc", Model: model, Null: "distance_null", NullKind: NullDistance, BaseExtent: "base", BaseReading: ReadingAbove, Defined: 1, Above: 1,
			SmallestExtent: "base", LargestExtent: "base",
			Gaps: []NullGap{{Extent: "base", AreaKm2: 461000, Defined: true, CommonPoints: 150, Method: "placements", ModelValue: mv, NullValue: nv,
				Diff: mv - nv, Low: mv - nv - 0.019, High: mv - nv + 0.018, Reading: ReadingAbove}}}
	}
	inv, env := an("inverse", 0.165, 0.110), an("env", 0.835, 0.110)
	m := MetricInfo{Key: "auc", Label: "AUC", Kind: MetricAUC}
	noSkill := "its own AUC, 0.165, is at or below 0.5, that of a random ranking, so being above a null that does worse still is no sign of skill"
	checkWords(t, "sentence", aboveNullSentence(&Results{}, m, &inv), []string{"On base, AUC of inverse is above distance_null beyond noise: +0.055 (0.165 against 0.110, 95% interval +0.036 to +0.073); but " + noSkill + "."}, nil)
	checkWords(t, "sentence", aboveNullSentence(&Results{}, m, &env), []string{"is above distance_null beyond noise: +0.725 (0.835 against 0.110, 95% interval +0.706 to +0.743)."}, []string{"no sign of skill"})
	s := &Sensitivity{BaseExtent: "base", AboveNull: []AboveNull{env, inv}}
	checkWords(t, "headline", aboveNullHeadline(s), []string{"inverse is above distance_null beyond noise on base (AUC difference +0.055, 95% interval +0.036 to +0.073) but " + noSkill}, nil)
	checkWords(t, "reply", reviewerNullText(s),
		[]string{"On the base extent the AUC of env (difference +0.725, 95% interval +0.706 to +0.743) is above that of distance_null beyond noise.",
			"On the base extent the AUC of inverse (difference +0.055, 95% interval +0.036 to +0.073; AUC 0.165) is above that of distance_null beyond noise but at or below 0.5, that of a random ranking, so on that extent this shows only that distance_null ranks the test records worse still, not skill."},
		[]string{"AUCs of env"})
	// The counts across extents say how many of the extents read above
	// are so: the null plus noise was above on 1 extent where both ranked
	// worse than random (AUC 0.082 against 0.052, the known-answer run).
	nn := an("nullnoise", 0.114, 0.110)
	nn.BaseReading, nn.Gaps[0].Reading, nn.Gaps[0].Low, nn.Gaps[0].High = ReadingNotAbove, ReadingNotAbove, -0.006, 0.015
	nn.Gaps = append(nn.Gaps, NullGap{Extent: "region_minus50km", AreaKm2: 327000, Defined: true, CommonPoints: 107, Method: "placements",
		ModelValue: 0.082, NullValue: 0.052, Diff: 0.029, Low: 0.017, High: 0.042, Reading: ReadingAbove})
	nn.Defined, nn.Above, nn.NotAbove, nn.SmallestExtent = 2, 1, 1, "region_minus50km"
	checkWords(t, "sentence", aboveNullSentence(&Results{}, m, &nn), []string{"the model is above the null beyond noise on 1 (there the model itself is at or below 0.5, random: no sign of skill), within noise on 1 and below on 0"}, nil)
	checkWords(t, "headline", aboveNullHeadline(&Sensitivity{BaseExtent: "base", AboveNull: []AboveNull{nn}}),
		[]string{"nullnoise is above it beyond noise on 1 of the 2 extents read (there the model itself is at or below 0.5, random: no sign of skill), within noise on 1"}, nil)
	env.Gaps = append(env.Gaps, nn.Gaps[1])
	env.Defined, env.Above, env.SmallestExtent = 2, 2, "region_minus50km"
	checkWords(t, "sentence", aboveNullSentence(&Results{}, m, &env), []string{"above the null beyond noise on 2 (on 1 of them the model itself is at or below 0.5, random: no sign of skill), within noise on 0"}, nil)
	// Every extent read above is so: "on each of them".
	inv.Gaps = append(inv.Gaps, NullGap{Extent: "region_minus50km", AreaKm2: 327000, Defined: true, CommonPoints: 107, Method: "placements",
		ModelValue: 0.155, NullValue: 0.052, Diff: 0.103, Low: 0.087, High: 0.120, Reading: ReadingAbove})
	inv.Defined, inv.Above, inv.SmallestExtent = 2, 2, "region_minus50km"
	checkWords(t, "sentence", aboveNullSentence(&Results{}, m, &inv), []string{"above the null beyond noise on 2 (on each of them the model itself is at or below 0.5"}, []string{"on 2 of them"})
	g := inv.Gaps[0]
	checkWords(t, "table", readingWords(MetricAUC, &g), []string{"above (model at or below 0.5, random: no sign of skill)"}, nil)
	// A partial ROC ratio of 0.9 is below random (1); one of 1.2 is not.
	g.ModelValue = 0.9
	checkWords(t, "table", readingWords(MetricPartialROC, &g), []string{"above (model at or below 1, random: no sign of skill)"}, nil)
	g.ModelValue = 1.2
	if w := readingWords(MetricPartialROC, &g); w != "above" {
		t.Errorf("partial ROC ratio 1.2 above the null reads %q, want \"above\"", w)
	}
	// A copy of the null (difference and interval 0) reads as the
	// sentences say, "the same", not "not above" (the known-answer
	// study's null of the user's, the same file as a model).
	same := NullGap{Extent: "base", Defined: true, CommonPoints: 150, Method: "placements", ModelValue: 0.110, NullValue: 0.110, Reading: ReadingNotAbove}
	if w := readingWords(MetricAUC, &same); w != "the same (every paired difference 0)" {
		t.Errorf("a copy of the null reads %q", w)
	}
	// The Boyce index has no random level here: nothing is added.
	g.ModelValue = -0.5
	if w := readingWords(MetricBoyce, &g); w != "above" {
		t.Errorf("Boyce reads %q, want \"above\"", w)
	}
}

// TestTinyNullGapNotPrintedAsZero: a model that nearly copies the null
// has its gap printed with the digits and sign that tell it from 0 ("R
// is not above distance_null beyond noise on base (AUC difference
// +0.000, 95% interval -0.0002 to +0.00003)" was written for -0.0001).
func TestTinyNullGapNotPrintedAsZero(t *testing.T) {
	an := AboveNull{Metric: "auc", Model: "R", Null: "distance_null", BaseExtent: "base", BaseReading: ReadingNotAbove, Defined: 2, NotAbove: 2,
		SmallestExtent: "hull", LargestExtent: "base",
		Gaps: []NullGap{
			{Extent: "base", AreaKm2: 267000, Defined: true, CommonPoints: 39, Method: "placements", ModelValue: 0.8593, NullValue: 0.8594, Diff: -0.0001, Low: -0.0002, High: 0.00003, Reading: ReadingNotAbove},
			{Extent: "hull", AreaKm2: 50200, Defined: true, CommonPoints: 33, Method: "placements", ModelValue: 0.5923, NullValue: 0.5923, Diff: 0.00004, Low: -0.0001, High: 0.0002, Reading: ReadingNotAbove},
		}}
	head := aboveNullHeadline(&Sensitivity{AboveNull: []AboveNull{an}})
	checkWords(t, "headline", head, []string{"R is not above distance_null beyond noise on base (AUC difference -0.0001, 95% interval -0.0002 to +0.00003)",
		"R minus distance_null moves from +0.00004 on hull (the smallest extent) to -0.0001 on base (the largest)"}, []string{"+0.000 "})
	got := aboveNullSentence(&Results{}, MetricInfo{Key: "auc", Label: "AUC", Kind: MetricAUC}, &an)
	checkWords(t, "sentence", got, []string{"the difference -0.0001 (0.859 against 0.859) has a 95% interval -0.0002 to +0.00003 that includes 0",
		"the difference (model minus null) runs from +0.00004 on hull"}, []string{"+0.000 "})
}

// TestTermsNameWhatThePageHolds: the Terms section names the spatial
// sorting bias among the descriptions only when the run scored the
// distance-only null, which computes it (--no-distance-null skips both),
// and defines a null of the user's when the run has one.
func TestTermsNameWhatThePageHolds(t *testing.T) {
	page := func(r *Results) string {
		t.Helper()
		b, err := htmlPage(r, nil, methodsDoc{})
		if err != nil {
			t.Fatal(err)
		}
		return string(b)
	}
	plain := analyzedSample(t)
	checkWords(t, "page without nulls", page(plain),
		[]string{"the sums of squares of the models × extents table and Kendall&#39;s W describe this family"},
		[]string{"spatial sorting bias describe", "<dt>null</dt>", "<dt>distance-only null</dt>"})
	r := withNull(t)
	analyzed(t, r)
	checkWords(t, "page with the distance-only null", page(r),
		[]string{"Kendall&#39;s W and the spatial sorting bias describe this family", "<dt>distance-only null</dt>"}, []string{"<dt>null</dt>"})
	for i := range r.Models {
		if r.Models[i].IsNull() {
			r.Models[i].NullKind = NullRaster
		}
	}
	checkWords(t, "page with a null of the user's", page(r),
		[]string{"<dt>null</dt><dd>A raster marked as a null (--null)", "table and Kendall&#39;s W describe"}, []string{"<dt>distance-only null</dt>"})
}

// TestOneTestRecordDistance: the methods' results give the one test
// record's distance as such, not as a median with a share ("Test records
// lay a median 40.1 km from the nearest training record; 0% lay within 3
// cell widths" was written for a run with one test record).
func TestOneTestRecordDistance(t *testing.T) {
	for _, c := range []struct {
		ind           Independence
		want, notWant string
	}{
		{Independence{Defined: true, N: 1, Min: 40.1, Median: 40.1, Max: 40.1}, "The one test record lay 40.1 km from the nearest training record, beyond 3 cell widths.", "median"},
		{Independence{Defined: true, N: 1, Min: 2.5, Median: 2.5, Max: 2.5, NearCount: 1, NearShare: 1}, "The one test record lay 2.5 km from the nearest training record, within 3 cell widths.", "median"},
		{Independence{Defined: true, N: 39, Min: 1, Median: 14.7, Max: 85, NearCount: 16, NearShare: 16.0 / 39}, "Test records lay a median 14.7 km from the nearest training record; 41% lay within 3 cell widths.", "one test record"},
	} {
		r := &Results{Sensitivity: &Sensitivity{Independence: c.ind}}
		checkWords(t, "results", resultNumbers(r), []string{c.want}, []string{c.notWant})
	}
}

// TestMapCaptionPanelsLeft: the maps' caption counts the panels that do
// not fit in words that agree with the count ("1 more panels (...) do not
// fit" would be written for one).
func TestMapCaptionPanelsLeft(t *testing.T) {
	r := analyzedSample(t)
	groups := mapGroups(r)
	if len(groups) < 3 {
		t.Fatalf("the sample has %d map panels, the test needs 3", len(groups))
	}
	model := r.Models[0].Name
	one := mapCaption(r, model, groups[:len(groups)-1], groups, mapMarks{}, 1, true)
	checkWords(t, "caption", one, []string{" 1 more panel (" + groups[len(groups)-1].title + ") does not fit on the page;"}, []string{"panels", "do not fit"})
	two := mapCaption(r, model, groups[:len(groups)-2], groups, mapMarks{}, 2, true)
	checkWords(t, "caption", two, []string{" 2 more panels (", ") do not fit on the page;"}, nil)
}

// TestExplorerOpensOnTheReference: the extent explorer opens on the
// extent every difference is taken from: the base extent, or the
// reference extent standing in for an unscored base (it opened on the
// base, where it could only say "Model good is not scored on base").
func TestExplorerOpensOnTheReference(t *testing.T) {
	open := func(r *Results) string {
		t.Helper()
		return explorerPayload(t, r).Default
	}
	r := analyzedSample(t)
	if got := open(r); got != vocab.BaseID {
		t.Errorf("explorer opens on %q, want %q", got, vocab.BaseID)
	}
	for i := range r.Scores {
		if r.Scores[i].Extent == vocab.BaseID {
			r.Scores[i].Scored, r.Scores[i].NotScored = false, "no test points inside this extent"
		}
	}
	s := analyzed(t, r)
	if s.BaseExtent == vocab.BaseID || s.BaseExtent == "" {
		t.Fatalf("reference extent %q", s.BaseExtent)
	}
	if got := open(r); got != s.BaseExtent {
		t.Errorf("explorer opens on %q, want the reference extent %q", got, s.BaseExtent)
	}
}

// TestAUCBelowRandomBeyondNoise: the headline and the methods text say on
// which extents a model's AUC is below 0.5 beyond noise (its t interval
// from the placements wholly below 0.5), where it is so on some extents
// only; an AUC below 0.5 within noise, or on fewer than 10 test points
// (our cut-off), is not named. The known-answer study of a model that
// rates the far background above the presences read "ranged 0.273–0.831"
// with nothing more. Intervals worked by hand with t(0.975, 39) = 2.023:
// 0.30 + 2.023 × 0.02 = 0.340 < 0.5 (named); 0.48 + 2.023 × 0.02 = 0.520
// (not named); 0.30 on 9 points (not read).
func TestAUCBelowRandomBeyondNoise(t *testing.T) {
	r := &Results{}
	sp := &Spread{Metric: "auc", Model: "flip", N: 4, Extents: []string{"base", "wide", "mid", "few"}, Min: 0.30, Max: 0.80}
	for _, c := range []struct {
		ext     string
		auc, se float64
		nPoints int
	}{{"base", 0.80, 0.02, 40}, {"wide", 0.30, 0.02, 40}, {"mid", 0.48, 0.02, 40}, {"few", 0.30, 0.02, 9}} {
		r.Scores = append(r.Scores, Score{Model: "flip", Extent: c.ext, Scored: true, AUC: c.auc, AUCSE: c.se, TestPoints: c.nPoints})
	}
	if got := belowRandom(r, sp); len(got) != 1 || got[0] != "wide" {
		t.Errorf("below random on %v, want [wide]", got)
	}
	checkWords(t, "clause", belowRandomClause(r, sp),
		[]string{"below 0.5, the AUC of a random ranking, beyond noise on wide, its 95% interval from the test points wholly below 0.5"}, []string{"mid", "few"})
	// Below on every extent: "all 4 extents", not "4 of the 4 extents".
	all := &Spread{Metric: "auc", Model: "flip", N: 4, Extents: []string{"base", "wide", "mid", "few"}, Min: 0.30, Max: 0.30}
	rAll := &Results{}
	for _, id := range all.Extents {
		rAll.Scores = append(rAll.Scores, Score{Model: "flip", Extent: id, Scored: true, AUC: 0.30, AUCSE: 0.02, TestPoints: 40})
	}
	checkWords(t, "clause", belowRandomClause(rAll, all), []string{"beyond noise on all 4 extents, its"}, []string{"4 of the 4"})
	r.Scores[1].AUC = 0.46 // 0.46 + 0.040 = 0.500: not wholly below
	if c := belowRandomClause(r, sp); c != "" {
		t.Errorf("AUC 0.46 (SE 0.02, 40 points) read below random: %q", c)
	}
}

// TestDecompositionEqualNonZeroValues: a score equal to a number other
// than 0 on every model and extent (an omission rate of 0.1 throughout,
// helper audit of 2026-12-05) is identical too: its grand mean came out
// 0.09999999999999999, the sums of squares of rounding alone, and the
// sentence split it into "extent 100%, model 100% and non-additive 100%".
func TestDecompositionEqualNonZeroValues(t *testing.T) {
	r := loadSample(t)
	for i := range r.Scores {
		for j := range r.Scores[i].Thresholds {
			r.Scores[i].Thresholds[j].Omission = 0.1
		}
	}
	s := analyzed(t, r)
	n := 0
	for _, d := range s.Decompositions {
		if !strings.HasPrefix(d.Metric, "omission_") {
			continue
		}
		n++
		if d.Defined || d.ShareExtent != 0 || !strings.Contains(d.Sentence, "is identical for every model and extent") {
			t.Errorf("%s: defined %v, shares %g %g %g: %s", d.Metric, d.Defined, d.ShareExtent, d.ShareModel, d.ShareResidual, d.Sentence)
		}
	}
	if n == 0 {
		t.Fatal("no omission decomposition")
	}
}

// TestRankingOnUnlikeCells: two models scored on different cells of an
// extent (one with no data on part of the grid) are compared with that
// said, in the headline and the methods: "good is better than patchy
// beyond noise on 11 of 11 extents" was written beside the run's own
// warning that they do not compare like with like (helper audit of
// 2026-12-05). With the same cells nothing is added.
func TestRankingOnUnlikeCells(t *testing.T) {
	const caution = "the two are scored on different cells, one having no data where the other has: not like with like"
	r := analyzedSample(t)
	checkWords(t, "headline, same cells", r.Sensitivity.Headline, nil, []string{caution})
	r = loadSample(t)
	var model string
	changed := 0
	for i := range r.Scores {
		if model == "" && r.Scores[i].Scored {
			model = r.Scores[i].Model
		}
		if r.Scores[i].Model == model && r.Scores[i].Scored && changed < 2 {
			r.Scores[i].Cells--
			changed++
		}
	}
	if err := Analyze(r); err != nil {
		t.Fatal(err)
	}
	checkWords(t, "headline", r.Sensitivity.Headline, []string{"(on 2 of them " + caution + ")"}, nil)
	checkWords(t, "methods", methodsText(r), []string{"(on 2 of them " + caution + ")."}, nil)
}

// TestMethodsOneExtent: a family of one extent (the region covers the
// whole raster, so every buffer equals the base) reads "on one evaluation
// extent", and the duplicates "also built, but not evaluated apart from
// it"; "a family of 1 evaluation extent ... Also built but not among the
// 1" was written (helper audit of 2026-12-05).
func TestMethodsOneExtent(t *testing.T) {
	r := analyzedSample(t)
	base := r.Extents[0]
	dup := r.Extents[1]
	dup.Status, dup.DuplicateOf = vocab.StatusDuplicate, base.ID
	r.Extents = []Extent{base, dup}
	r.Sensitivity.SkippedExtents = []SkippedExtent{{ID: dup.ID, Status: vocab.StatusDuplicate, DuplicateOf: base.ID, Reason: "same cells as " + base.ID}}
	var b strings.Builder
	methodsFamily(&b, r, "areasweep")
	checkWords(t, "methods", b.String(), []string{" on one evaluation extent built with areasweep", "Also built, but not evaluated apart from it: " + dup.ID + " (same cells as " + base.ID + ")."},
		[]string{"family of 1", "not among the 1"})
}

// TestHeadlineModelFewerPoints: a model scored on fewer test points than
// an extent holds (no value at some of their cells) has its own count in
// the headline: "(82 to 90 test points per extent)" was read as every
// model's (helper audit of 2026-12-05). Without such a model nothing is
// added.
func TestHeadlineModelFewerPoints(t *testing.T) {
	const tail = "of them, having no value at the others"
	r := analyzedSample(t)
	checkWords(t, "headline, every point", r.Sensitivity.Headline, nil, []string{tail})
	r = loadSample(t)
	var model string
	lo := -1
	for i := range r.Scores {
		if model == "" && r.Scores[i].Scored {
			model = r.Scores[i].Model
		}
		if r.Scores[i].Model == model && r.Scores[i].Scored {
			r.Scores[i].TestPoints -= 3
			if lo < 0 || r.Scores[i].TestPoints < lo {
				lo = r.Scores[i].TestPoints
			}
		}
	}
	if err := Analyze(r); err != nil {
		t.Fatal(err)
	}
	h := r.Sensitivity.Headline
	checkWords(t, "headline", h, []string{"; " + model + " scores ", tail + "), "}, nil)
	if !strings.Contains(h, fmt.Sprintf(" scores %d ", lo)) {
		t.Errorf("headline does not give %s's fewest points, %d: %s", model, lo, h)
	}
}

// TestAboveNullValuesOnCommonPoints: the model's and the null's values
// in the sentence on the base are those of the test points both score;
// where that is not all of either's points it says so, since the null's
// score in the tables (on all its points) differs: "+0.024 (0.890
// against 0.866 ...)" stood beside the null's 0.862 of the tables
// (helper audit of 2026-12-05).
func TestAboveNullValuesOnCommonPoints(t *testing.T) {
	an := AboveNull{Metric: "auc", Model: "patchy", Null: "distance_null", NullKind: NullDistance, BaseExtent: "base", BaseReading: ReadingAbove, Defined: 1, Above: 1,
		SmallestExtent: "base", LargestExtent: "base",
		Gaps: []NullGap{{Extent: "base", AreaKm2: 461000, Defined: true, CommonPoints: 82, Method: "placements", ModelValue: 0.890, NullValue: 0.866,
			Diff: 0.024, Low: 0.004, High: 0.044, Reading: ReadingAbove}}}
	m := MetricInfo{Key: "auc", Label: "AUC", Kind: MetricAUC}
	for _, c := range []struct {
		name         string
		model, null  int
		want, unwant []string
	}{
		{"all points", 82, 82, []string{"(0.890 against 0.866, 95% interval"}, []string{"both score"}},
		{"model scores fewer", 82, 90, []string{"(0.890 against 0.866 on the 82 test points both score, 95% interval"}, nil},
		{"null scores fewer", 90, 82, []string{"(0.890 against 0.866 on the 82 test points both score, 95% interval"}, nil},
	} {
		r := &Results{Scores: []Score{
			{Model: "patchy", Extent: "base", Scored: true, TestPoints: c.model},
			{Model: "distance_null", Extent: "base", Scored: true, TestPoints: c.null},
		}}
		checkWords(t, c.name, aboveNullSentence(r, m, &an), c.want, c.unwant)
	}
}

// TestAboveNullUndefinedSaysWhy: a model-minus-null difference that
// could not be formed because one side's score is undefined on the base
// says which and why; "could not be formed." stood alone (seen on the
// demo's coarse at E = 0.05).
func TestAboveNullUndefinedSaysWhy(t *testing.T) {
	m := MetricInfo{Key: MetricKeyPartialROC(0.05), Label: "partial ROC ratio, E = 0.05", Kind: MetricPartialROC, E: 0.05}
	an := AboveNull{Metric: m.Key, Model: "coarse", Null: "distance_null", NullKind: NullDistance, BaseExtent: "base",
		Gaps: []NullGap{{Extent: "base", CommonPoints: 90, Method: "paired_resamples"}}}
	r := &Results{Scores: []Score{
		{Model: "coarse", Extent: "base", Scored: true, TestPoints: 90, PartialROC: []PartialROC{{E: 0.05, Reason: "the crossing falls among tied test points"}}},
		{Model: "distance_null", Extent: "base", Scored: true, TestPoints: 90, PartialROC: []PartialROC{{E: 0.05, Defined: true, Ratio: 1.4}}},
	}}
	checkWords(t, "sentence", aboveNullSentence(r, m, &an),
		[]string{"On base, the partial ROC ratio of coarse at E = 0.05 minus distance_null could not be formed: it is undefined there for coarse (the crossing falls among tied test points)."},
		[]string{"for distance_null"})
}
