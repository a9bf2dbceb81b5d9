package report

import (
	"fmt"
	"strings"
	"testing"
)

// TestNullFigureCaptionWords: the model-minus-null figure read a bar
// wholly above 0 as "the model beats the null" and one across 0 as "no
// difference beyond noise", which a reader takes for evidence that the
// two are equal, and it did not say that its intervals, one per extent,
// are unadjusted. It now says "above the null beyond noise", "within
// noise, which does not show the two equal" and names the multiplicity.
func TestNullFigureCaptionWords(t *testing.T) {
	r := withNull(t)
	r.Paired = append(r.Paired, nullPaired(r)...)
	analyzed(t, r)
	f := nullGapFigures(r)
	if len(f) != 1 {
		t.Fatalf("figures: %+v", f)
	}
	checkWords(t, "caption", f[0].Caption,
		[]string{"the model is above the null beyond noise on that extent", "across 0: within noise, which does not show the two equal",
			"Each bar is a test on its own extent, not adjusted for the number of extents."},
		[]string{"beats", "no difference"})
}

// TestMethodsDefinesScores: the methods text named the partial ROC ratio
// "at E = 0.05" without saying what E or the ratio is, gave the binomial
// test without its null, and cited the continuous Boyce index without
// saying it is a Spearman correlation over a moving window, so a
// reviewer could not tell which of the papers' quantities was computed.
// Each is now defined in the sentence as Peterson et al. (2008), Anderson
// et al. (2003) and Hirzel et al. (2006) define it.
func TestMethodsDefinesScores(t *testing.T) {
	checkWords(t, "methods", methodsText(analyzedSample(t)), []string{
		"(Peterson et al. 2008: the area under the ROC curve where at most a share E of the test records is omitted, over the area under the random line there; 1 is random) at E = ",
		"with x_E, the share of the area where the curve reaches 1 − E, interpolated linearly",
		"one-sided binomial test of the test records at or above the threshold against the share of the extent's area at or above it (Anderson et al. 2003)",
		"(Boyce et al. 2002; Hirzel et al. 2006: the Spearman rank correlation between a moving window's model value and its ratio of the share of test records to the share of area in it; window of ",
	}, nil)
}

// TestTermsNullAndUnweighted: the Terms said of a user's null that a
// model not above it beyond noise "does no better there than that
// reference", reading an interval across 0 as evidence of no difference,
// and never defined "AUC (cells unweighted)", which the verdicts and the
// methods' reply read beside the AUC. The null's entry now says such a
// model gives no evidence that it does better, and the unweighted AUC has
// an entry of its own.
func TestTermsNullAndUnweighted(t *testing.T) {
	r := withNull(t)
	analyzed(t, r)
	for i := range r.Models {
		if r.Models[i].IsNull() {
			r.Models[i].NullKind = NullRaster
		}
	}
	page, err := htmlPage(r, nil, methodsDoc{})
	if err != nil {
		t.Fatal(err)
	}
	p := string(page)
	i := strings.Index(p, `<section id="terms">`)
	if i < 0 {
		t.Fatal("no Terms section")
	}
	terms := p[i : i+strings.Index(p[i:], "</section>")]
	checkWords(t, "terms", terms, []string{
		"A model not above it beyond noise on an extent gives, there, no evidence that it does better than that reference.",
		"<dt>AUC (cells unweighted)</dt><dd>The same with every cell counted once, whatever its area",
	}, []string{"does no better there"})
}

// TestGapNamesItsSign: the headline and the model-minus-null sentences
// said "the gap moves from +0.042 on points_50km ... to -0.055", leaving
// the reader to guess whether the gap is model minus null or null minus
// model. The headline now names the two sides ("good minus
// distance_null moves from") and the sentence says "the difference
// (model minus null) runs from"; neither says "the gap" there.
func TestGapNamesItsSign(t *testing.T) {
	r := withNull(t)
	r.Paired = append(r.Paired, nullPaired(r)...)
	s := analyzed(t, r)
	checkWords(t, "headline", s.Headline, []string{"; good minus " + DistanceNullName + " "}, []string{"; the gap "})
	for _, an := range s.AboveNull {
		if an.Defined >= 2 && an.SmallestExtent != an.LargestExtent && !an.allZero() {
			checkWords(t, "sentence", an.Sentence, []string{"extents the difference (model minus null) "}, []string{"the gap runs"})
		}
	}
}

// TestOmissionRankingWords: two models' omission rates were compared as
// "coarse is better than good beyond noise on 12 of 13 extents", but each
// model's threshold keeps its own share of the area, and one that keeps
// more omits fewer test points whatever the model's skill (the demo's
// truncated coarse "beat" good so while below it by AUC on every extent).
// The sentence now says which model omits fewer test points and that
// this alone does not make it better; AUC keeps "better".
func TestOmissionRankingWords(t *testing.T) {
	r := loadSample(t)
	omission := ""
	for i := range r.Paired {
		p := &r.Paired[i]
		if p.Kind != PairedKindModel || p.Model != "good" || p.OtherModel != "truncated" || !strings.HasPrefix(p.Metric, "omission_") {
			continue
		}
		if omission == "" {
			omission = p.Metric
		}
		if p.Metric == omission {
			// Worked by hand: good omits 0.1 more, interval wholly above 0,
			// on more common test points than the resamples' cut-off.
			p.Defined, p.CommonPoints, p.Resamples, p.NotFormed, p.NotJudged = true, 40, r.Settings.Iterations, 0, ""
			p.Diff, p.Low, p.High = 0.1, Float(0.05), Float(0.15)
		}
	}
	if omission == "" {
		t.Fatal("the sample has no omission comparison of good and truncated")
	}
	s := analyzed(t, r)
	for _, rk := range s.Rankings {
		if rk.Metric == omission && rk.Model == "good" && rk.Other == "truncated" {
			if rk.Extents < 1 {
				t.Fatalf("nothing compared: %+v", rk)
			}
			checkWords(t, "ranking", rk.Sentence, []string{
				fmt.Sprintf("truncated omits fewer test points than good beyond noise on %d of %d extent", rk.Extents, rk.Extents),
				"so fewer omissions alone do not make a better model",
			}, []string{"better than"})
			return
		}
	}
	t.Fatalf("no ranking of %s", omission)
}

// TestOmissionRobustByConstruction: an omission rate's paired difference
// between extents is 0 whatever the data (one threshold from the training
// points, the same test points), yet the Analysis said only "every one is
// 0" and the reply to a reviewer that the omission rates "stayed within
// the tolerance for every model", read as a finding. Both now say it holds
// by construction.
func TestOmissionRobustByConstruction(t *testing.T) {
	r := loadSample(t)
	s := analyzed(t, r)
	found := false
	for _, mv := range s.ModelVerdicts {
		if mv.Metric == "omission_minimum_training_presence" && mv.Verdict == JudgementRobust {
			found = true
			checkWords(t, "verdict", mv.Sentence, []string{"every one is 0, as it must be: the threshold comes from the training points, whatever the extent, so on the test points both extents hold it omits the same ones"}, nil)
		}
		if strings.HasPrefix(mv.Metric, "omission_fixed_") && mv.Verdict == JudgementRobust {
			// The user's threshold, not the training points'.
			checkWords(t, "fixed", mv.Sentence, []string{"as it must be: the threshold is fixed, whatever the extent"}, []string{"from the training points"})
		}
	}
	if !found {
		t.Fatal("no robust omission verdict in the sample")
	}
	// Said of the omission rates alone: the reason was written after a
	// list also holding AUC and the predicted area (sentence audit of
	// 2026-12-05).
	checkWords(t, "methods", methodsText(r), []string{"stayed within the tolerance for every model, as omission rates must: each one's threshold does not depend on the extent, so on the test records two extents share it omits the same ones."},
		[]string{"an omission rate by construction"})
}

// TestKendallWReadsPointEstimates: two models within noise of each other
// on every extent (a model and a copy with tiny noise) got "Kendall's W =
// 1.000 ...: every extent orders the models as base does", and the page
// "1 = the same order everywhere", which reads as a firm order. W reads
// the point estimates however small their differences; the sentence and
// the page now say so and point to the paired differences.
func TestKendallWReadsPointEstimates(t *testing.T) {
	d := &Decomposition{Metric: "auc", Models: []string{"a", "b"}, Extents: []string{"e1", "e2"}, Defined: true,
		ShareExtent: 0.99, ShareModel: 0.01, KendallWDefined: true, KendallW: 1, BaseExtent: "e1"}
	checkWords(t, "decomposition", decompositionSentence(MetricInfo{Key: "auc", Label: "AUC"}, d),
		[]string{"every extent orders the models' point estimates as e1 does; see the paired model differences for whether that order is beyond noise."},
		[]string{"orders the models as"})
	r := analyzedSample(t)
	page, err := htmlPage(r, nil, methodsDoc{})
	if err != nil {
		t.Fatal(err)
	}
	checkWords(t, "page", string(page), []string{"agree on the order of the models' point estimates (1 = the same order everywhere, however small the differences; tie-corrected)"}, nil)
}

// TestOmissionZeroJudgedOnFewPoints: an omission rate's difference
// between two extents is 0 on their common test points by construction
// (the threshold does not depend on the extent), so it has no sampling
// error and is judged on any number of common points. The audit's
// verdict read "undetermined: too few common test points to tell whether
// it moves by more than ±0.05, although every difference from base is 0"
// with 6 and 8 common points, and the reviewer reply that the test
// records cannot tell. A difference that is not 0, or not of an omission
// rate between extents, keeps the cut-off.
func TestOmissionZeroJudgedOnFewPoints(t *testing.T) {
	zero := func(p Paired) Paired {
		p.Defined, p.Diff, p.SE, p.Low, p.High = true, 0, Float(0), Float(0), Float(0)
		return p
	}
	for _, c := range []struct {
		name   string
		p      Paired
		judged bool
	}{
		{"omission between extents, 0, 6 points", zero(Paired{Metric: "omission_minimum_training_presence", Kind: PairedKindExtent, CommonPoints: 6, Method: "paired_resamples", Resamples: 200}), true},
		{"fixed threshold between extents, 0, 2 points", zero(Paired{Metric: "omission_fixed_0.5", Kind: PairedKindExtent, CommonPoints: 2, Method: "paired_resamples", Resamples: 200}), true},
		{"omission between extents, not 0", func() Paired {
			p := zero(Paired{Metric: "omission_minimum_training_presence", Kind: PairedKindExtent, CommonPoints: 6, Method: "paired_resamples", Resamples: 200})
			p.Diff, p.High = 0.1, Float(0.2)
			return p
		}(), false},
		{"omission between models, 0", zero(Paired{Metric: "omission_minimum_training_presence", Kind: PairedKindModel, CommonPoints: 6, Method: "paired_resamples", Resamples: 200}), false},
		{"AUC between extents, 0", zero(Paired{Metric: "auc", Kind: PairedKindExtent, CommonPoints: 6, Method: "placements"}), false},
	} {
		if got := c.p.Judged(); got != c.judged {
			t.Errorf("%s: judged %v, want %v (%q)", c.name, got, c.judged, c.p.NotJudgedReason())
		}
	}
	// The verdict: the sample's omission differences on one extent put on
	// 6 common points are judged, robust, and the sentence says why.
	r := loadSample(t)
	ext := ""
	for i := range r.Paired {
		p := &r.Paired[i]
		if p.Kind == PairedKindExtent && p.Model == "good" && p.Metric == "omission_minimum_training_presence" && p.Defined && p.Diff == 0 {
			if ext == "" {
				ext = p.Extent
			}
			if p.Extent == ext {
				p.CommonPoints = 6
				p.NotJudged = p.NotJudgedReason()
			}
		}
	}
	if ext == "" {
		t.Fatal("no omission difference of good between extents in the sample")
	}
	s := analyzed(t, r)
	for _, mv := range s.ModelVerdicts {
		if mv.Metric == "omission_minimum_training_presence" && mv.Model == "good" {
			if mv.Verdict != JudgementRobust {
				t.Errorf("verdict %s: %s", mv.Verdict, mv.Sentence)
			}
			checkWords(t, "verdict", mv.Sentence, []string{"The difference on " + ext + " (6 common test points) is judged on fewer than the 10 common test points we otherwise judge a difference on (our cut-off): a difference that is 0 by construction has no sampling error."},
				[]string{"too few common test points", "Not judged"})
			return
		}
	}
	t.Fatal("no omission verdict of good")
}
