package report

import (
	"fmt"
	"html/template"
	"math"
	"regexp"
	"slices"
	"strconv"
	"strings"
	"testing"

	"areasweep/extent/vocab"
)

// The tests in this file hold the report's sentences to the numbers they
// quote: each case is a situation cut from the sample (or hand-made) in
// which a sentence once said more, or other, than its numbers.

// setPaired applies fn to the paired records of metric and kind for model
// on extent.
func setPaired(r *Results, metric string, kind PairKind, model, extent string, fn func(p *Paired)) int {
	n := 0
	for i := range r.Paired {
		p := &r.Paired[i]
		if p.Metric == metric && p.Kind == kind && p.Model == model && p.Extent == extent {
			fn(p)
			n++
		}
	}
	return n
}

// analyzed runs Analyze on r and fails the test on an error.
func analyzed(t *testing.T, r *Results) *Sensitivity {
	t.Helper()
	r.Sensitivity = nil
	if err := Analyze(r); err != nil {
		t.Fatal(err)
	}
	return r.Sensitivity
}

// liftResampled raises the common test points of every difference from
// the paired resamples in r to MinResampledPoints where they are fewer
// (the sample holds 20 to 22 test points per extent, so none of its
// resampled differences is judged), for tests of how such differences
// are judged once they rest on enough points; no other number changes.
func liftResampled(r *Results) *Results {
	for i := range r.Paired {
		if p := &r.Paired[i]; (p.Method == "paired_resamples" || p.Method == "point_difference") && p.CommonPoints < MinResampledPoints {
			p.CommonPoints = MinResampledPoints
		}
	}
	return r
}

// intervalRe finds the "95% interval A to B" of a sentence.
var intervalRe = regexp.MustCompile(`95% interval ([+-]?[0-9.]+) to ([+-]?[0-9.]+)`)

// TestVerdictSentences checks the model verdict sentences against their
// numbers in situations where a fixed template was false: exact
// differences said to have a 95% interval, all-zero differences whose
// "largest" named an arbitrary extent, a verdict left undetermined by an
// undefined score blamed on too few test points, and interval bounds a
// hair beyond the tolerance printed as the tolerance itself.
func TestVerdictSentences(t *testing.T) {
	cases := []struct {
		name          string
		build         func(r *Results)
		metric, model string
		verdict       Judgement
		want, notWant []string
	}{
		{name: "exact robust difference has no interval",
			metric: "area_fraction_mtp", model: "truncated", verdict: JudgementRobust,
			want:    []string{"(exact: no test point moves it) lies within ±0.05"},
			notWant: []string{"95% interval"}},
		{name: "all differences 0 name no extent",
			metric: "omission_minimum_training_presence", model: "good", verdict: JudgementRobust,
			want:    []string{"every one is 0"},
			notWant: []string{"the largest is +0.000 on"}},
		{name: "undefined on one extent, every other difference inside",
			build: func(r *Results) {
				setPaired(r, "omission_minimum_training_presence", PairedKindExtent, "good", "hull", func(p *Paired) {
					p.Defined, p.Diff, p.Low, p.High = false, 0, Float(0), Float(0)
				})
			},
			metric: "omission_minimum_training_presence", model: "good", verdict: JudgementUndetermined,
			want:    []string{"it is undefined on hull", "every difference from base that could be formed lies within ±0.05"},
			notWant: []string{"too few test points"}},
		{name: "lower bound a hair above the tolerance",
			build: func(r *Results) {
				for i := range r.Paired {
					if p := &r.Paired[i]; p.Metric == "auc" && p.Kind == PairedKindExtent && p.Model == "good" {
						p.Diff, p.Low, p.High = 0.005, Float(-0.01), Float(0.015)
					}
				}
				setPaired(r, "auc", PairedKindExtent, "good", "whole", func(p *Paired) { p.Diff, p.Low, p.High = 0.03, Float(0.0201), Float(0.0399) })
			},
			metric: "auc", model: "good", verdict: JudgementSensitive,
			want: []string{"+0.030 on whole (95% interval +0.0201 to +0.040)"}},
		{name: "lower bound exactly at the tolerance",
			build: func(r *Results) {
				for i := range r.Paired {
					if p := &r.Paired[i]; p.Metric == "auc" && p.Kind == PairedKindExtent && p.Model == "good" {
						p.Diff, p.Low, p.High = 0.005, Float(-0.01), Float(0.015)
					}
				}
				setPaired(r, "auc", PairedKindExtent, "good", "whole", func(p *Paired) { p.Diff, p.Low, p.High = 0.03, Float(0.02), Float(0.04) })
			},
			metric: "auc", model: "good", verdict: JudgementUndetermined,
			// An interval touching the tolerance straddles it: too wide
			// to tell, whatever the number of test points.
			want:    []string{"the paired intervals are too wide to tell", "(95% interval +0.020 to +0.040)"},
			notWant: []string{"too few"}},
		{name: "undetermined only by a difference on too few test points",
			build: func(r *Results) {
				for i := range r.Paired {
					if p := &r.Paired[i]; p.Metric == "auc" && p.Kind == PairedKindExtent && p.Model == "good" {
						p.Diff, p.Low, p.High = 0.005, Float(-0.01), Float(0.015)
					}
				}
				setPaired(r, "auc", PairedKindExtent, "good", "whole", func(p *Paired) {
					p.Diff, p.Low, p.High, p.CommonPoints = 0.03, Float(-0.05), Float(0.11), MinPairedPoints-1
				})
			},
			metric: "auc", model: "good", verdict: JudgementUndetermined,
			want:    []string{"too few common test points to tell", "Not judged, on fewer than"},
			notWant: []string{"too wide", "straddles"}},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			r := liftResampled(loadSample(t))
			if c.build != nil {
				c.build(r)
			}
			s := analyzed(t, r)
			mv := s.findModelVerdict(c.metric, c.model)
			if mv == nil {
				t.Fatalf("no verdict for %s of %s", c.metric, c.model)
			}
			if mv.Verdict != c.verdict {
				t.Errorf("verdict %s, want %s: %s", mv.Verdict, c.verdict, mv.Sentence)
			}
			checkWords(t, "sentence", mv.Sentence, c.want, c.notWant)
			// Every printed bound lies on the same side of ±T as the
			// bound itself.
			if mv.Largest >= 0 {
				d := mv.Diffs[mv.Largest]
				if m := intervalRe.FindStringSubmatch(mv.Sentence); m != nil {
					for k, v := range []float64{(*d.Low), (*d.High)} {
						p, err := strconv.ParseFloat(m[k+1], 64)
						if err != nil {
							t.Fatal(err)
						}
						for _, ref := range []float64{mv.Tolerance, -mv.Tolerance} {
							if (p > ref) != (v > ref) || (p < ref) != (v < ref) {
								t.Errorf("bound %v printed %s: not on its side of %v", v, m[k+1], ref)
							}
						}
					}
				}
			}
		})
	}
}

// TestSignedVs checks the bounds printed against a cut-off.
func TestSignedVs(t *testing.T) {
	cases := []struct {
		v    float64
		refs []float64
		want string
	}{
		{0.063, []float64{0}, "+0.063"},
		{-0.0004, []float64{0}, "-0.0004"}, // signed3 prints "+0.000"
		{0.0004, []float64{0}, "+0.0004"},  // looks like touching 0 at three decimals
		{0, []float64{0}, "+0.000"},        // exactly the cut-off
		{0.0201, []float64{0.02, -0.02}, "+0.0201"},
		{-0.02001, []float64{0.02, -0.02}, "-0.02001"},
		{0.02, []float64{0.02, -0.02}, "+0.020"},
		{0.0249, []float64{0.02, -0.02}, "+0.025"}, // rounds away from the cut-off: three decimals tell
	}
	for _, c := range cases {
		if got := signedVs(c.v, c.refs...); got != c.want {
			t.Errorf("signedVs(%v, %v) = %q, want %q", c.v, c.refs, got, c.want)
		}
	}
}

// TestAboveNullBorderline: an interval that only just includes or
// excludes 0 is printed so that the reader sees which (the sign of a
// bound that rounds to 0.000 at three decimals was lost); the gap's ends
// are named as the smallest and largest extents, not as the smallest and
// largest gaps.
func TestAboveNullBorderline(t *testing.T) {
	cases := []struct {
		name    string
		low     float64
		reading string
		want    string
	}{
		{"interval just includes 0", -0.0004, ReadingNotAbove, "95% interval -0.0004 to +0.140 that includes 0"},
		{"interval just above 0", 0.0004, ReadingAbove, "95% interval +0.0004 to +0.140"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			r := withNull(t)
			for i := range r.Paired {
				if r.Paired[i].Kind == PairedKindNull {
					r.Paired[i].Low = Float(0.06)
				}
			}
			r.Paired = append(r.Paired, nullPaired(r)...)
			for i := range r.Paired {
				if p := &r.Paired[i]; p.Kind == PairedKindNull && p.Extent == "base" {
					p.Low = Float(c.low)
				}
			}
			s := analyzed(t, r)
			for _, an := range s.AboveNull {
				if an.Metric != "auc" || an.Model != "good" {
					continue
				}
				if an.BaseReading != c.reading {
					t.Errorf("reading %s, want %s", an.BaseReading, c.reading)
				}
				if !strings.Contains(an.Sentence, c.want) {
					t.Errorf("sentence lacks %q: %s", c.want, an.Sentence)
				}
				if !strings.Contains(an.Sentence, "(the smallest extent)") {
					t.Errorf("sentence does not say that the gap's ends are extents: %s", an.Sentence)
				}
				head := strings.Replace(c.want, " that includes 0", "", 1)
				if !strings.Contains(s.Headline, head) {
					t.Errorf("headline lacks %q: %s", head, s.Headline)
				}
				return
			}
			t.Fatal("no AUC comparison of good with the null")
		})
	}
}

// TestHeadlineGapEnds: the headline's clause on how the model-minus-null
// gap moves names its two extents as the smallest and the largest, as the
// summary's sentence does, with the same numbers (the fixture's gap grows
// by 0.01 per extent in family order, so the two ends differ), and how
// many extents put the model above, within noise and below the null.
func TestHeadlineGapEnds(t *testing.T) {
	r := withNull(t)
	r.Paired = append(r.Paired, nullPaired(r)...)
	for i, k := 0, 0; i < len(r.Paired); i++ {
		if p := &r.Paired[i]; p.Kind == PairedKindNull && p.Metric == "auc" {
			p.Diff += 0.01 * float64(k)
			k++
		}
	}
	s := analyzed(t, r)
	for _, an := range s.AboveNull {
		if an.Metric != "auc" || an.Model != "good" {
			continue
		}
		if an.SmallestExtent == an.LargestExtent {
			t.Fatalf("the fixture's smallest and largest extent are both %s", an.SmallestExtent)
		}
		sm, lg := an.gap(an.SmallestExtent), an.gap(an.LargestExtent)
		want := fmt.Sprintf("%s minus %s moves from %s on %s (the smallest extent) to %s on %s (the largest)",
			an.Model, an.Null, signed3(sm.Diff), an.SmallestExtent, signed3(lg.Diff), an.LargestExtent)
		if sm.Diff == lg.Diff {
			t.Fatalf("the fixture's gap is %v at both ends", sm.Diff)
		}
		if !strings.Contains(s.Headline, want) {
			t.Errorf("headline lacks %q: %s", want, s.Headline)
		}
		if !strings.Contains(an.Sentence, fmt.Sprintf("from %s on %s (the smallest extent) to %s on %s (the largest)",
			signed3(sm.Diff), an.SmallestExtent, signed3(lg.Diff), an.LargestExtent)) {
			t.Errorf("the summary's sentence gives other ends: %s", an.Sentence)
		}
		// The counts of extents above, within noise and below: the ends
		// alone could hide that the model is below the null on most.
		read := an.Above + an.NotAbove + an.Below
		if read == 0 {
			t.Fatal("the fixture's gaps are read on no extent")
		}
		counts := fmt.Sprintf("good is above it beyond noise on %d of the %d extents read, within noise on %d and below on %d", an.Above, read, an.NotAbove, an.Below)
		if !strings.Contains(s.Headline, counts) {
			t.Errorf("headline lacks %q: %s", counts, s.Headline)
		}
		if !strings.Contains(an.Sentence, fmt.Sprintf("the model is above the null beyond noise on %d, within noise on %d and below on %d", an.Above, an.NotAbove, an.Below)) {
			t.Errorf("the summary's sentence gives other counts: %s", an.Sentence)
		}
		return
	}
	t.Fatal("no AUC comparison of good with the null")
}

// nullPaired returns one AUC record of kind null per scored extent of
// the first model, +0.100 with interval +0.060 to +0.140 (the fixture of
// TestAboveNullReadings).
func nullPaired(r *Results) []Paired {
	var out []Paired
	for _, sc := range r.Scores {
		if sc.Model != "good" || !sc.Scored {
			continue
		}
		out = append(out, Paired{Metric: "auc", Kind: PairedKindNull, Model: "good", Extent: sc.Extent, OtherModel: DistanceNullName, OtherExtent: sc.Extent,
			CommonPoints: sc.TestPoints, Method: "placements", Defined: true, A: 0.9, B: 0.8, Diff: 0.1, SE: Float(0.02), Low: Float(0.06), High: Float(0.14)})
	}
	return out
}

// TestReviewerNulls: the reply to a reviewer describes each null as what
// it is. A null of the user's (an effort surface, say) is not the
// distance-only null, and a model that does not beat it lacks what that
// null holds, not "skill beyond the geography of the records".
func TestReviewerNulls(t *testing.T) {
	cases := []struct {
		name          string
		kind          string
		want, notWant []string
	}{
		{"distance-only null", NullDistance,
			[]string{"a null that knows only where the training records are (" + DistanceNullName, "no evidence of skill beyond the geography of the records"}, nil},
		{"user null", "user",
			[]string{"We also scored the null " + DistanceNullName + " on", "no evidence of skill beyond what " + DistanceNullName + " holds"},
			[]string{"knows only where the training records are", "geography", "Hijmans"}},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			r := withNull(t)
			for i := range r.Models {
				if r.Models[i].IsNull() {
					r.Models[i].NullKind = c.kind
				}
			}
			r.Paired = append(r.Paired, nullPaired(r)...)
			setPaired(r, "auc", PairedKindNull, "good", "base", func(p *Paired) { p.Low = Float(-0.01) })
			analyzed(t, r)
			rv := reviewerNullText(r.Sensitivity)
			checkWords(t, "reply", rv, c.want, c.notWant)
		})
	}
}

// TestHeadlineRankings: the headline gives every pair of models, the one
// better beyond noise on more extents first, and never "A is better than
// B on 0 of n extents" (true, but read as a finding).
func TestHeadlineRankings(t *testing.T) {
	cases := []struct {
		rk   ModelRanking
		want string
	}{
		{ModelRanking{Model: "a", Other: "b", Extents: 13, Better: 13}, "a is better than b beyond noise on 13 of 13 extents"},
		{ModelRanking{Model: "a", Other: "b", Extents: 13, Worse: 12, WithinNoise: 1}, "b is better than a beyond noise on 12 of 13 extents"},
		{ModelRanking{Model: "a", Other: "b", Extents: 6, Better: 1, Worse: 4, WithinNoise: 1}, "b is better than a beyond noise on 4 of 6 extents and worse on 1"},
		{ModelRanking{Model: "a", Other: "b", Extents: 6, WithinNoise: 6}, "a and b differ beyond noise on none of 6 extents"},
		{ModelRanking{Model: "a", Other: "b", Extents: 1, Better: 1}, "a is better than b beyond noise on 1 of 1 extent"},
	}
	for _, c := range cases {
		if got := rankingClause(c.rk); got != c.want {
			t.Errorf("%+v: %q, want %q", c.rk, got, c.want)
		}
	}
	// The sample's three models: every pair, in the headline (its partial
	// ROC differences between extents are described, not judged).
	r := analyzedSample(t)
	for _, w := range []string{
		"By AUC, good and truncated differ beyond noise on none of 6 extents",
		"good is better than broad beyond noise on 5 of 8 extents",
		"truncated is better than broad beyond noise on 4 of 6 extents",
		"The partial ROC ratio at E = 0.05 is described, not judged, across extents (its paired intervals between extents fall short of their 95% coverage: 38% to 91% in our simulation check): for good 7 of 7 differences from base lie beyond ±0.05 (the largest +0.462 on whole; each on too few common test points to be read, 21 for the largest, our cut-off 30), for truncated 5 of 5 (the largest +0.339 on region_b100; each on too few common test points to be read, 21 for the largest, our cut-off 30) and for broad 5 of 7 (the largest +0.543 on whole; each on too few common test points to be read, 21 for the largest, our cut-off 30).",
		// The sample's 20 to 22 test points are fewer than the 30 a
		// partial ROC ratio's difference is read on: said, as the AUC's
		// sentence says "not judged, too few common test points" (helper
		// audit of 2026-12-05).
	} {
		if !strings.Contains(r.Sensitivity.Headline, w) {
			t.Errorf("headline lacks %q: %s", w, r.Sensitivity.Headline)
		}
	}
}

// onlyExtents keeps the extents ids of r (status ok) and marks the others
// empty, with their scores, rings and paired records dropped.
func onlyExtents(r *Results, ids ...string) {
	keep := map[string]bool{}
	for _, id := range ids {
		keep[id] = true
	}
	for i := range r.Extents {
		if !keep[r.Extents[i].ID] {
			r.Extents[i].Status = vocab.StatusEmpty
		}
	}
	var sc []Score
	for _, s := range r.Scores {
		if keep[s.Extent] {
			sc = append(sc, s)
		}
	}
	r.Scores = sc
	var ps []Paired
	for _, p := range r.Paired {
		if keep[p.Extent] && keep[p.OtherExtent] {
			ps = append(ps, p)
		}
	}
	r.Paired = ps
	r.Rings = nil
}

// TestMethodsText checks the methods paragraph, the results and the reply
// to a reviewer in situations where they said more than the numbers.
func TestMethodsTextSituations(t *testing.T) {
	cases := []struct {
		name          string
		build         func(r *Results)
		want, notWant []string
	}{
		{name: "the sample: half the extents hold every test point",
			want: []string{"the extents differ in their test records: all 22 on 4 of the 8 extents; base 21,",
				"on 8 evaluation extents (the base extent and 7 others) from 28.2 to 231 thousand km²",
				// The partial ROC ratio's tolerance is not among those
				// judged against (TestToleranceListsJudgedOnly).
				"tolerances we chose (AUC ±0.02, omission rate and predicted area ±0.05; areasweep's defaults, not a published standard)",
				"The Boyce index's differences were described, not judged",
				"and undetermined otherwise; a difference on fewer than 10 common test records (30 for a difference from the resamples, whose percentile intervals our simulation check found misleading on fewer; our cut-offs; none for an omission rate between extents, which is 0 on the test records both hold by construction, its threshold not depending on the extent) was not judged, and the intervals were not adjusted",
				"Differences between extents of one model, and between models on one extent, were taken on the test records both sides hold (paired)",
				"(seeded from the run seed 20240611 with the extent's name, not the model's; p is not resolved below 1/200)",
				// AUC is extent-sensitive for each of the sample's models,
				// the predicted area for some (TestReplySensitiveForEvery).
				"AUC and AUC (cells unweighted) moved with the extent by more than the tolerance for every model.",
				// Named: "for at least one model" hid truncated, robust.
				"Predicted area at minimum training presence moved with the extent by more than the tolerance for good and broad and stayed within it for truncated.",
				// The partial ROC ratio's differences between extents are
				// described, not judged (partialROCExtentCoverage): said
				// with the tolerances, not among the undetermined.
				"The partial ROC ratio's differences between extents were described, not judged: their percentile intervals fall short of their 95% coverage between nested extents (38% to 91% at E = 0.05 and 58% to 93% at E = 0.1 in our simulation check;",
				"so no verdict rests on them, we give them no interval, and we say only how many exceed our tolerance of ±0.05."},
			notWant: []string{"For the partial ROC ratio at E = 0.05 and the partial ROC ratio at E = 0.1 the test records cannot tell", "on most", "fixed in advance", "alternative evaluation extents", "28,200–231,000 km²", "partial ROC ratio, E = 0.05,", "the base extent, base,"}},
		{name: "no extent holds every test point",
			build: func(r *Results) {
				for i := range r.Extents {
					if r.Extents[i].ID == "whole" || r.Extents[i].ID == "region_b100" || r.Extents[i].ID == "region_b200" || r.Extents[i].ID == "points_b100" {
						r.Extents[i].TestPoints = 21
					}
				}
			},
			want:    []string{"the extents differ in their test records: base 21, region_b50 21, region_b100 21,"},
			notWant: []string{"on most", "all 22 on"}},
		{name: "a model not scored on the base extent",
			build: func(r *Results) {
				for i := range r.Scores {
					if r.Scores[i].Model == "truncated" && r.Scores[i].Extent == "base" {
						r.Scores[i].Scored, r.Scores[i].NotScored = false, "model has no data on 6% of the extent's cells"
					}
				}
			},
			want:    []string{"AUC of truncated ranged 0.797–0.932 over 5 extents (not scored on base) and was undetermined (not scored on base)"},
			notWant: []string{"0.000 on base", "SE 0.000"}},
		{name: "no nested chain",
			build:   func(r *Results) { r.Rings = nil },
			notWant: []string{"slope of AUC"}},
		{name: "one extent",
			build: func(r *Results) { onlyExtents(r, "base") },
			want: []string{"Only one evaluation extent, base (40,600 km², 21 test points), could be scored (the other 9 extents: region_b50, region_b100, region_b200 and 6 more: the extent has no valid cells), so no score can be compared across extents; AUC there: good 0.830,",
				"AUC of good was 0.830 on its one scored extent, base (SE 0.046 from the test records)", "on 1 evaluation extent (base, 40,600 km²)",
				"With one extent, no score can be compared across extents."},
			notWant: []string{"1 extents", "Across 1", "ranged 0.830–0.830", "too few"}},
		{name: "no extent scored (every model constant)",
			build: func(r *Results) {
				for i := range r.Scores {
					r.Scores[i].Scored, r.Scores[i].NotScored = false, "model has one value on every cell with data"
				}
				r.Paired, r.Rings = nil, nil
			},
			want:    []string{"No model could be scored on any of the 8 evaluation extents of this run", "this run cannot answer the question"},
			notWant: []string{"on 0 evaluation extents", "For each score we compared every extent", "cannot tell"}},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			r := loadSample(t)
			if c.build != nil {
				c.build(r)
			}
			s := analyzed(t, r)
			text := s.Headline + "\n" + methodsText(r)
			checkWords(t, "text", text, c.want, c.notWant)
		})
	}
}

// TestTruncationCutoffsOurs: the truncation sentences call their cut-offs
// ours and quote them.
func TestTruncationCutoffsOurs(t *testing.T) {
	r := analyzedSample(t)
	for _, tc := range r.Sensitivity.Truncation {
		for _, w := range []string{"by our cut-offs", "flagged from 20%"} {
			if !strings.Contains(tc.Sentence, w) {
				t.Errorf("%s: lacks %q: %s", tc.Model, w, tc.Sentence)
			}
		}
		if strings.Contains(tc.Sentence, "extent(s)") {
			t.Errorf("%s: %s", tc.Model, tc.Sentence)
		}
	}
}

// TestMetricsCaptionBars: the caption of the scores-against-area figure
// names the resamples each bar comes from. AUC's bar is ± Score.AUCBootSD,
// the SD over the full-size paired resamples (it estimates the AUC's own
// standard error); it was described as the SD of the half-size partial
// ROC bootstrap, "wider than the uncertainty of the full-sample AUC".
func TestMetricsCaptionBars(t *testing.T) {
	cases := []struct {
		name          string
		paired, iters int
		aucBar        bool
		want, notWant []string
	}{
		{"the sample's settings", 100, 200, true,
			[]string{"AUC bars: plus and minus one SD of AUC over the 100 full-size paired resamples", "the mean ratio of the 200 resamples of 50% of the test records"},
			[]string{"wider than", "SD of AUC over the 200"}},
		{"one paired resample", 1, 200, false,
			[]string{"the mean ratio of the 200 resamples"}, []string{"AUC bars"}},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			r := loadSample(t)
			r.Settings.PairedResamples, r.Settings.Iterations = c.paired, c.iters
			analyzed(t, r)
			f := metricsFigure(r)
			checkWords(t, "caption", f.Caption, c.want, c.notWant)
			m := r.Sensitivity.Metrics[0]
			pts := metricPoints(r, m, "good")
			if len(pts) == 0 {
				t.Fatal("no AUC point")
			}
			for _, p := range pts {
				if p.bar != c.aucBar {
					t.Errorf("AUC bar %v, want %v", p.bar, c.aucBar)
				}
				var sd float64
				for _, sc := range r.Scores {
					if sc.Model == "good" && sc.Scored && sc.AreaKm2 == p.area {
						sd = sc.AUCBootSD
					}
				}
				if p.bar && (math.Abs(p.hi-p.v-sd) > 1e-12 || math.Abs(p.v-p.lo-sd) > 1e-12) {
					t.Errorf("bar %v..%v around %v, want ± %v", p.lo, p.hi, p.v, sd)
				}
			}
		})
	}
}

// TestFewTestPoints: a paired difference on fewer than MinPairedPoints
// common test points is reported, not judged. With 3 test points the
// paired AUC interval can have zero width and read as "wholly beyond the
// tolerance", the resamples' percentiles likewise; no verdict, ranking or
// reading against a null rests on them.
func TestFewTestPoints(t *testing.T) {
	r := withNull(t)
	r.Paired = append(r.Paired, nullPaired(r)...)
	for i := range r.Paired {
		if p := &r.Paired[i]; p.Model == "good" || p.OtherModel == "good" {
			p.CommonPoints = 3
			if p.Metric == "auc" && p.Kind == PairedKindExtent {
				p.Diff, p.Low, p.High = 0.1, Float(0.1), Float(0.1) // zero width: every point moved alike
			}
		}
	}
	s := analyzed(t, r)
	mv := s.findModelVerdict("auc", "good")
	if mv.Verdict != JudgementUndetermined || !strings.Contains(mv.Sentence, "Not judged, on fewer than 10 common test points (our cut-off): region_b50 (3)") {
		t.Errorf("verdict %s: %s", mv.Verdict, mv.Sentence)
	}
	for _, d := range mv.Diffs {
		if d.Defined && d.Position != positionTooFew {
			t.Errorf("%s: position %s on 3 test points", d.Extent, d.Position)
		}
	}
	for _, rk := range s.Rankings {
		if rk.Model == "good" && rk.Extents != 0 {
			t.Errorf("%s: good compared on %d extents of 3 test points", rk.Metric, rk.Extents)
		}
	}
	for _, an := range s.AboveNull {
		if an.Model != "good" {
			continue
		}
		if an.BaseReading != ReadingTooFew || an.Above+an.NotAbove+an.Below != 0 || !strings.Contains(an.Sentence, "whether it beats the null is not told") {
			t.Errorf("above null: %+v", an)
		}
	}
	// Not judged: the difference is given, its interval is not.
	if !strings.Contains(s.Headline, "AUC of good ranged 0.798–0.966 and is undetermined (largest difference from base +0.100 on region_b50, not judged, too few common test points: 3, our cut-off 10)") {
		t.Errorf("headline: %s", s.Headline)
	}
	if strings.Contains(s.Headline, "null: good beats") || strings.Contains(s.Headline, "good does not beat") || !strings.Contains(s.Headline, "whether good beats "+DistanceNullName+" on base is not told") {
		t.Errorf("headline: %s", s.Headline)
	}
	if rv := reviewerNullText(s); strings.Contains(rv, "no skill") || !strings.Contains(rv, "too few to compare good (3 common test records)") {
		t.Errorf("reply: %s", rv)
	}
	for _, text := range []string{aboveNullNote, aboveNullSummaryNote, ExtentSensitiveDefinition} {
		if !strings.Contains(text, "fewer than "+strconv.Itoa(MinPairedPoints)+" common test points") {
			t.Errorf("quotes another cut-off: %s", text)
		}
	}
}

// TestCutoffShares: a share compared with a cut-off is printed so that it
// does not read as the cut-off itself (19.96% of the area at the floor is
// not "20%, flagged from 20%"), and a share exactly at the warning level
// is said to be at it, not below it.
func TestCutoffShares(t *testing.T) {
	cases := []struct {
		v, cut float64
		want   string
	}{
		{0.1996, 0.20, "19.96%"},
		{0.2004, 0.20, "20.04%"},
		{0.20, 0.20, "20%"},
		{0.69, 0.25, "69%"},
		{0.00003, 0.20, "0.003%"},
	}
	for _, c := range cases {
		if got := pctVs(c.v, c.cut); got != c.want {
			t.Errorf("pctVs(%v, %v) = %q, want %q", c.v, c.cut, got, c.want)
		}
	}

	r := loadSample(t)
	for i := range r.Models {
		r.Models[i].FloorShare = 0.1996
	}
	for _, tc := range analyzed(t, r).Truncation {
		if len(tc.Tails) > 0 {
			continue // flagged by its ROC tails; the sentence is about them
		}
		if tc.FloorFlag || !strings.Contains(tc.Sentence, "covers 19.96% of the valid area (flagged from 20%)") {
			t.Errorf("%s: floor flag %v: %s", tc.Model, tc.FloorFlag, tc.Sentence)
		}
	}

	// 5 of 20 test points near a training point: 25%, at the level.
	r = loadSample(t)
	k, near := 0, 0
	for i := range r.Points {
		p := &r.Points[i]
		if p.Role != vocab.RoleTest || p.Status != vocab.PointScored {
			continue
		}
		switch {
		case k >= 20:
			p.Status = vocab.PointThinned
		case near < 5:
			p.NearestTrainKm, near = 0.5, near+1
		default:
			p.NearestTrainKm = 500
		}
		k++
	}
	ind := analyzed(t, r).Independence
	if ind.N != 20 || ind.NearCount != 5 || ind.Warn || !strings.Contains(ind.Sentence, "25% lie within 3 cell widths") || !strings.Contains(ind.Sentence, "at our 25% warning level (we warn above it)") {
		t.Errorf("%d of %d near, warn %v: %s", ind.NearCount, ind.N, ind.Warn, ind.Sentence)
	}
}

// TestHijmansCitedWhenCited: the reference list holds Hijmans (2012) when
// the text cites it (the distance-only null, the sorting bias), not for a
// null of the user's alone.
func TestHijmansCitedWhenCited(t *testing.T) {
	for _, kind := range []string{NullDistance, "user"} {
		r := withNull(t)
		for i := range r.Models {
			if r.Models[i].IsNull() {
				r.Models[i].NullKind = kind
			}
		}
		if kind != NullDistance {
			for i := range r.Extents {
				r.Extents[i].SortingBias = nil // only the distance-only null gives it
			}
		}
		analyzed(t, r)
		text := methodsText(r)
		refs := text[strings.Index(text, "## References"):]
		cited := strings.Contains(text[:strings.Index(text, "## References")], "Hijmans 2012")
		if listed := strings.Contains(refs, "Hijmans, R.J. (2012)"); listed != cited || cited != (kind == NullDistance) {
			t.Errorf("%s null: cited %v, listed %v", kind, cited, listed)
		}
	}
}

// TestChainSentenceAgainstTheChange: when steps go both ways, the step of
// largest share can go against the chain's change; the sentence says so
// instead of "-500% of the gain comes from".
func TestChainSentenceAgainstTheChange(t *testing.T) {
	cs := ChainSummary{Chain: "c", Model: "m", Members: []string{"a", "b", "c", "d"}, MemberAreasKm2: []float64{10, 20, 40, 80},
		StartAUC: 0.70, EndAUC: 0.75, Change: 0.05, SharesDefined: true, Largest: 0,
		Steps: []ChainStep{
			{Kind: StepRing, Inner: "a", Outer: "b", RingAreaKm2: 10, AUCInner: 0.70, AUCOuter: 0.45, AUCRing: 0.20, AUCRingDefined: true, Change: -0.25, Share: -5},
			{Kind: StepRing, Inner: "b", Outer: "c", RingAreaKm2: 20, AUCInner: 0.45, AUCOuter: 0.60, AUCRing: 0.75, AUCRingDefined: true, Change: 0.15, Share: 3},
			{Kind: StepRing, Inner: "c", Outer: "d", RingAreaKm2: 40, AUCInner: 0.60, AUCOuter: 0.75, AUCRing: 0.90, AUCRingDefined: true, Change: 0.15, Share: 3},
		}}
	got := chainSentence(&cs, "model", DefaultToleranceAUC)
	if strings.Contains(got, "-500% of the gain comes") || !strings.Contains(got, "the largest step goes against the gain (-500% of it): the ring b minus a") {
		t.Errorf("%s", got)
	}
}

// TestChainSentenceNegligibleChange: a chain whose AUC changes by no
// more than the AUC tolerance from end to end gives no share of that
// change. The robust case of the known-answer studies (a model of
// independent values, the same on every extent) wrote "goes from 0.808
// to 0.807; 433% of the loss comes from test points that enter with
// hull_100km" for a change of -0.001 (the numbers below, from that run).
// Steps beyond the tolerance that cancel are named, the largest first.
func TestChainSentenceNegligibleChange(t *testing.T) {
	cs := ChainSummary{Chain: "hull", Model: "iid", Members: []string{"hull", "hull_100km"}, MemberAreasKm2: []float64{380000, 648000},
		StartAUC: 0.8077, EndAUC: 0.8066, Change: -0.0011, SharesDefined: true, Largest: 0,
		Steps: []ChainStep{
			{Kind: StepTestPoints, Inner: "hull", Outer: "hull_100km", AUCInner: 0.8077, AUCOuter: 0.8027, Change: -0.0050, Share: 4.325},
			{Kind: StepRing, Inner: "hull", Outer: "hull_100km", RingAreaKm2: 268000, AUCInner: 0.8027, AUCOuter: 0.8066, AUCRing: 0.8121, AUCRingDefined: true, Change: 0.0039, Share: -3.325},
		}}
	checkWords(t, "chain", chainSentence(&cs, "model", DefaultToleranceAUC),
		[]string{"goes from 0.808 (hull, 380,000 km²) to 0.807 (hull_100km, 648,000 km²): it changes by -0.001 in all, within our tolerance of ±0.02, so no share of the change is given"},
		[]string{"433%", "of the loss", "cancel"})
	// Steps of -0.15 and +0.16 that cancel to +0.01 (our numbers): the
	// larger is named.
	cs.StartAUC, cs.EndAUC, cs.Change = 0.70, 0.71, 0.01
	cs.Steps[0].AUCInner, cs.Steps[0].AUCOuter, cs.Steps[0].Change = 0.70, 0.55, -0.15
	cs.Steps[1].AUCInner, cs.Steps[1].AUCOuter, cs.Steps[1].Change = 0.55, 0.71, 0.16
	cs.Steps[0].Share, cs.Steps[1].Share, cs.Largest = -15, 16, 1
	checkWords(t, "chain", chainSentence(&cs, "model", DefaultToleranceAUC),
		[]string{"it changes by +0.010 in all, within our tolerance of ±0.02", "Its steps go both ways and cancel: the largest, +0.160, comes from the ring hull_100km minus hull."},
		[]string{"of the gain"})
	// On few test points the closing clause does not speak of shares
	// the sentence did not give (the robust study on 5 test points wrote
	// "no share of the change is given ... the shares describe them").
	checkWords(t, "few points", fewPointsClause(5, sharesGiven(&cs, DefaultToleranceAUC)),
		[]string{"as few as 5 test points, fewer than the 10 we judge a difference on (our cut-off): they are described, not judged."}, []string{"shares"})
	checkWords(t, "few points", fewPointsClause(5, sharesGiven(&cs, 0.005)), []string{"the shares describe them"}, nil)
	// Past a tolerance set for the run (0.005), the shares are given.
	checkWords(t, "chain", chainSentence(&cs, "model", 0.005), []string{"1600% of the gain comes from the ring hull_100km minus hull"}, []string{"within"})
}

// TestRankingSentenceReasons: a model comparison that cannot be made says
// why: no difference defined (an undefined score), or too few common test
// points; the cut-off is not blamed for an undefined score.
func TestRankingSentenceReasons(t *testing.T) {
	cases := []struct {
		name          string
		build         func(p *Paired)
		want, notWant string
	}{
		{"undefined on every extent", func(p *Paired) { p.Defined = false },
			// Only the paired records are undefined, both scores defined
			// (TestNotComparableSaysWhy has the scores undefined).
			"Partial ROC ratio, E = 0.05: good and truncated cannot be compared on any extent: on every extent that scores both, one of them is undefined or no paired difference could be formed.", "fewer than"},
		{"too few common test points", func(p *Paired) { p.CommonPoints = 4 },
			"Partial ROC ratio, E = 0.05: good and truncated cannot be compared on any extent: where both are defined they share fewer than 30 test points (our cut-off).", ""},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			r := loadSample(t)
			for i := range r.Paired {
				if p := &r.Paired[i]; p.Metric == "partial_roc_e0.05" && p.Kind == PairedKindModel && p.Model == "good" && p.OtherModel == "truncated" {
					c.build(p)
				}
			}
			s := analyzed(t, r)
			for _, rk := range s.Rankings {
				if rk.Metric != "partial_roc_e0.05" || rk.Model != "good" || rk.Other != "truncated" {
					continue
				}
				if rk.Sentence != c.want || (c.notWant != "" && strings.Contains(rk.Sentence, c.notWant)) {
					t.Errorf("%q, want %q", rk.Sentence, c.want)
				}
				return
			}
			t.Fatal("no comparison of good and truncated")
		})
	}
}

// TestOrderText: the order of the models on an extent shows ties as "="
// ("a > b" for two models with the same AUC said one was above the
// other).
func TestOrderText(t *testing.T) {
	cases := []struct {
		models []string
		ranks  []float64
		want   string
	}{
		{[]string{"a", "b", "c"}, []float64{1, 2, 3}, "a > b > c"},
		{[]string{"a", "b", "c"}, []float64{3, 1.5, 1.5}, "b = c > a"},
		{[]string{"a", "b"}, []float64{1.5, 1.5}, "a = b"},
	}
	for _, c := range cases {
		if got := orderText(c.models, c.ranks); got != c.want {
			t.Errorf("%v %v: %q, want %q", c.models, c.ranks, got, c.want)
		}
	}
	// Two models with the same AUC everywhere (one a rescaling of the
	// other): the page's order table says they tie.
	r := loadSample(t)
	for i := range r.Scores {
		if r.Scores[i].Model == "broad" {
			for j := range r.Scores {
				if r.Scores[j].Model == "good" && r.Scores[j].Extent == r.Scores[i].Extent {
					r.Scores[i].AUC = r.Scores[j].AUC
				}
			}
		}
	}
	s := analyzed(t, r)
	v := decompositionSection(s, map[string]string{})
	if v == nil || v.Ranking == nil || !strings.Contains(string(v.Ranking.Body()), "good = broad") {
		t.Errorf("order table without the tie")
	}
}

// TestToleranceText: a tolerance is called ours only when it is our
// default; one the user set is the run's.
func TestToleranceText(t *testing.T) {
	for _, c := range []struct {
		tol  float64
		want string
	}{{DefaultToleranceAUC, "against our tolerance of ±0.02"}, {0.3, "against the tolerance of ±0.3 set for this run"}} {
		r := loadSample(t)
		r.Settings.ToleranceAUC = c.tol
		s := analyzed(t, r)
		if !strings.Contains(s.Headline, c.want) {
			t.Errorf("tolerance %v: headline lacks %q: %s", c.tol, c.want, s.Headline)
		}
		if c.tol != DefaultToleranceAUC {
			for _, mv := range s.ModelVerdicts {
				if strings.Contains(mv.Sentence, "our tolerance of ±0.3") {
					t.Errorf("%s", mv.Sentence)
				}
			}
		}
	}
}

// TestEffectCaptionCutoff: the batch figure's caption does not call every
// bar beyond the band extent-sensitive: one on fewer than MinPairedPoints
// common test points is not judged.
func TestEffectCaptionCutoff(t *testing.T) {
	s, err := Summarize(handBatch())
	if err != nil {
		t.Fatal(err)
	}
	f, ok := effectFigure(s)
	if !ok || !strings.Contains(f.Caption, "unless it rests on fewer than "+strconv.Itoa(MinPairedPoints)+" common test points") {
		t.Errorf("caption: %s", f.Caption)
	}
}

// TestOneTestPointHasNoSE: with one test record the placements give no
// SE (Score.AUCSE is 0 by convention); the results do not print "SE
// 0.000".
func TestOneTestPointHasNoSE(t *testing.T) {
	r := loadSample(t)
	for i := range r.Scores {
		if r.Scores[i].Model == "good" && r.Scores[i].Extent == "base" {
			r.Scores[i].TestPoints, r.Scores[i].AUCSE = 1, 0
		}
	}
	analyzed(t, r)
	text := resultNumbers(r)
	if !strings.Contains(text, "(0.830 on base, no SE with fewer than two test records)") {
		t.Errorf("%s", text)
	}
}

// TestPageHeaderOneExtent: the page's header counts one scored extent in
// the singular.
func TestPageHeaderOneExtent(t *testing.T) {
	r := loadSample(t)
	onlyExtents(r, "base")
	analyzed(t, r)
	page, err := htmlPage(r, nil, methodsDoc{})
	if err != nil {
		t.Fatal(err)
	}
	if !strings.Contains(string(page), "3 models · 1 extent scored</p>") {
		t.Errorf("header: %s", regexp.MustCompile(`<p class="sub">[^<]*</p>`).Find(page))
	}
}

// TestROCCaptionNulls: the ROC caption mentions null panels only when the
// run has a null.
func TestROCCaptionNulls(t *testing.T) {
	r := analyzedSample(t)
	if c := rocFigure(r).Caption; strings.Contains(c, "per null") {
		t.Errorf("no null, caption: %s", c)
	}
	r = withNull(t)
	analyzed(t, r)
	if c := rocFigure(r).Caption; !strings.Contains(c, "(and per null, after the models)") {
		t.Errorf("with a null, caption: %s", c)
	}
}

// TestAreaRangeRoundsAsTheTables: the headline's and the reply's area
// range rounds each area as the extent lists and tables do (fmtArea):
// the demo's whole raster was "3,252 thousand km²" in the headline and
// "3,250,000 km²" in the methods text's list.
func TestAreaRangeRoundsAsTheTables(t *testing.T) {
	cases := []struct {
		lo, hi float64
		want   string
	}{
		{391788.6, 3251635.3, "from 392 to 3,250 thousand km²"},
		{28183, 230912, "from 28.2 to 231 thousand km²"},
		{5432, 84900, "from 5.43 to 84.9 thousand km²"},
		{41.23, 9876, "from 41.2 to 9,880 km²"},
		// A global study (helper hM's 2.5-arc-minute grid): "from 117,000
		// to 128,000 thousand km²" before.
		{117.3e6, 127.8e6, "from 117 to 128 million km²"},
		{2456789, 510065621.7, "from 2.46 to 510 million km²"},
	}
	for _, c := range cases {
		got := areaRange(c.lo, c.hi)
		if got != c.want {
			t.Errorf("areaRange(%v, %v) = %q, want %q", c.lo, c.hi, got, c.want)
		}
		if c.hi < 1e4 || c.hi >= 1e7 {
			continue // the check below reads thousands
		}
		// The same number as fmtArea's, in thousands.
		for k, v := range []float64{c.lo, c.hi} {
			f := strings.Fields(strings.TrimPrefix(got, "from "))
			th, err := strconv.ParseFloat(strings.ReplaceAll(f[2*k], ",", ""), 64)
			if err != nil {
				t.Fatal(err)
			}
			km, _ := strconv.ParseFloat(strings.ReplaceAll(fmtArea(v), ",", ""), 64)
			if math.Abs(th*1000-km) > 1e-6*km {
				t.Errorf("%v: %s thousand here, %s km² in the tables", v, f[2*k], fmtArea(v))
			}
		}
	}
}

// TestOmittedNoteFollowsTheMaps: the note on omitted test points says the
// maps mark them only when the report has maps, and names the model.
func TestOmittedNoteFollowsTheMaps(t *testing.T) {
	for _, preview := range []bool{true, false} {
		r := loadSample(t)
		if !preview {
			r.Preview = nil
		}
		analyzed(t, r)
		page, err := htmlPage(r, nil, methodsDoc{})
		if err != nil {
			t.Fatal(err)
		}
		says := strings.Contains(string(page), "the maps mark the test points model "+r.Models[0].Name+" omits")
		if says != preview {
			t.Errorf("preview %v: the page says the maps mark omitted points: %v", preview, says)
		}
	}
}

// TestRingsNoteBothSteps: the waterfall's note reads a negative step of
// either kind; a dashed step (test records entering) adds no ring, so
// "the ring's own AUC is below" cannot explain it.
func TestRingsNoteBothSteps(t *testing.T) {
	for _, w := range []string{"A solid arrow pointing left", "a dashed one, that the test records first falling inside place lower"} {
		if !strings.Contains(ringsNote, w) {
			t.Errorf("note lacks %q: %s", w, ringsNote)
		}
	}
}

// checkWords fails t for each of want that text lacks and each of notWant
// it holds, naming what the text is (a sentence, a caption, ...).
func checkWords(t *testing.T, what, text string, want, notWant []string) {
	t.Helper()
	for _, w := range want {
		if !strings.Contains(text, w) {
			t.Errorf("%s lacks %q:\n%s", what, w, text)
		}
	}
	for _, w := range notWant {
		if strings.Contains(text, w) {
			t.Errorf("%s says %q:\n%s", what, w, text)
		}
	}
}

// The cases below come from studies the demo does not cover: a model
// below the distance-only null, a single model with a null of the user's,
// 8 and 15 test points, test points beside the training points, an
// extent without test points, copies of one model and a constant model.

// TestNullGapEndsNamed: the extents the model-minus-null gap is described
// between are named for what they are. When the difference is undefined
// on the smallest extent, the next one is "the smallest extent where it is
// defined", not "the smallest extent"; an end resting on fewer than 10
// common test points says so; and when no extent has 10, the counts of
// "above, within, below" (all 0) give way to saying that no gap is read.
// The sentence then says in words of its own that it describes the family
// of extents, not a bracket after the cut-off's "(our cut-off)".
func TestNullGapEndsNamed(t *testing.T) {
	smallest := func(r *Results) string {
		id, lo := "", math.Inf(1)
		for _, e := range r.Extents {
			if e.Status == vocab.StatusOK && findScore(r, "good", e.ID) != nil && e.AreaKm2 < lo {
				id, lo = e.ID, e.AreaKm2
			}
		}
		return id
	}
	cases := []struct {
		name          string
		build         func(r *Results, small string)
		want, notWant []string
	}{
		{name: "undefined on the smallest extent",
			build: func(r *Results, small string) {
				setPaired(r, "auc", PairedKindNull, "good", small, func(p *Paired) { p.Defined = false })
			},
			want:    []string{"(the smallest extent where it is defined)", "(the largest)"},
			notWant: []string{"(the smallest extent) to"}},
		{name: "too few common test points on the smallest extent",
			build: func(r *Results, small string) {
				setPaired(r, "auc", PairedKindNull, "good", small, func(p *Paired) { p.CommonPoints = 5 })
			},
			want: []string{"(the smallest extent, on 5 common test points, not read)"}},
		{name: "too few common test points everywhere",
			build: func(r *Results, small string) {
				for i := range r.Paired {
					if r.Paired[i].Kind == PairedKindNull {
						r.Paired[i].CommonPoints = 8
					}
				}
			},
			want:    []string{"(the largest, on 8 common test points, not read)", "no extent has the 10 common test points we read a gap on (our cut-off). This describes the family of extents; it is not a test."},
			notWant: []string{"above the null beyond noise on 0, within noise on 0 and below on 0"}},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			r := withNull(t)
			r.Paired = append(r.Paired, nullPaired(r)...)
			c.build(r, smallest(r))
			s := analyzed(t, r)
			for _, an := range s.AboveNull {
				if an.Metric == "auc" && an.Model == "good" {
					checkWords(t, "sentence", an.Sentence, c.want, c.notWant)
					// The family's gap is described, not tested, in words
					// of its own: not a bracket after another bracket
					// ("(our cut-off) (a description of ...)" was written).
					checkWords(t, "sentence", an.Sentence, []string{"This describes the family of extents; it is not a test."}, []string{") ("})
					checkWords(t, "headline", s.Headline, c.want[:1], c.notWant)
					return
				}
			}
			t.Fatal("no AUC comparison of good with the null")
		})
	}
}

// TestTooFewAllZero: a verdict left undetermined by differences on too
// few test points, every difference being 0, does not name one extent's
// "+0.000" as the largest. (AUC: an omission rate's differences between
// extents, 0 by construction, are judged on any number of points,
// TestOmissionZeroJudgedOnFewPoints.)
func TestTooFewAllZero(t *testing.T) {
	r := liftResampled(loadSample(t))
	const metric = "auc"
	for i := range r.Paired {
		if p := &r.Paired[i]; p.Metric == metric && p.Kind == PairedKindExtent && p.Model == "good" {
			p.Diff, p.SE, p.Low, p.High = 0, Float(0), Float(0), Float(0)
		}
	}
	if setPaired(r, metric, PairedKindExtent, "good", "hull", func(p *Paired) { p.CommonPoints = 6 }) != 1 {
		t.Fatal("no record of good on hull")
	}
	s := analyzed(t, r)
	mv := s.findModelVerdict(metric, "good")
	if mv.Verdict != JudgementUndetermined {
		t.Fatalf("verdict %s: %s", mv.Verdict, mv.Sentence)
	}
	checkWords(t, "sentence", mv.Sentence, []string{"although every difference from base is 0", "Not judged, on fewer than 10 common test points (our cut-off): hull (6)"},
		[]string{"the largest difference from base is +0.000"})
}

// TestIdenticalModels: two models whose every paired difference and its
// interval are 0 (copies of one raster) "score the same"; "within noise"
// would say there is noise between them.
func TestIdenticalModels(t *testing.T) {
	r := loadSample(t)
	for i := range r.Paired {
		if p := &r.Paired[i]; p.Metric == "auc" && p.Kind == PairedKindModel && p.Model == "good" && p.OtherModel == "truncated" {
			p.Diff, p.Low, p.High, p.SE = 0, Float(0), Float(0), Float(0)
		}
	}
	s := analyzed(t, r)
	var rk *ModelRanking
	for i := range s.Rankings {
		if s.Rankings[i].Metric == "auc" && s.Rankings[i].Model == "good" && s.Rankings[i].Other == "truncated" {
			rk = &s.Rankings[i]
		}
	}
	if rk == nil {
		t.Fatal("no AUC ranking of good and truncated")
	}
	checkWords(t, "ranking", rk.Sentence, []string{"AUC: good and truncated score the same on all 6 extents compared (every paired difference, and its interval, is 0)."},
		[]string{"within noise"})
	checkWords(t, "headline", s.Headline, []string{"By AUC, good and truncated score the same on all 6 extents;"}, []string{"good and truncated differ beyond noise"})
	checkWords(t, "methods", methodsText(r), []string{"By AUC, good and truncated scored the same on all 6 extents (every paired difference 0).",
		"By AUC, good and truncated scored the same on all 6 extents. "}, []string{"good was better than truncated beyond noise on 0", "good scored above truncated"})
}

// TestChainsStartFromScores: a chain's first AUC is the score on its first
// member. A null's chain took the first ring's AUCInner (the outer
// extent's test points against the inner cells) because only the models'
// scores were looked up, which missed the step of test points; and a
// chain whose first member has no score (no test point inside) started
// from an AUC that member does not have.
func TestChainsStartFromScores(t *testing.T) {
	t.Run("null", func(t *testing.T) {
		r := withNull(t)
		for _, g := range r.Rings {
			if g.Model == "good" {
				g.Model = DistanceNullName
				r.Rings = append(r.Rings, g)
			}
		}
		s := analyzed(t, r)
		for _, cs := range s.Chains {
			if cs.Model != DistanceNullName || cs.Chain != "points" {
				continue
			}
			// withNull gives the null an AUC of 0.999 on every extent.
			if cs.StartAUC != 0.999 || cs.Steps[0].Kind != StepTestPoints {
				t.Errorf("start %v, first step %s; want the null's score 0.999 and a step of test points", cs.StartAUC, cs.Steps[0].Kind)
			}
			checkWords(t, "sentence", cs.Sentence, []string{"Along chain points, AUC of null " + DistanceNullName + " goes from 0.999 (points_b25"}, []string{"of model " + DistanceNullName})
			return
		}
		t.Fatal("no chain of the null")
	})
	t.Run("first member not scored", func(t *testing.T) {
		r := loadSample(t)
		for i := range r.Scores {
			if r.Scores[i].Model == "good" && r.Scores[i].Extent == "base" {
				r.Scores[i].Scored, r.Scores[i].NotScored = false, "no test points inside this extent"
			}
		}
		s := analyzed(t, r)
		for _, cs := range s.Chains {
			if cs.Model != "good" || cs.Chain != "region" {
				continue
			}
			if cs.Members[0] != "region_b50" || cs.StartAUC != findScore(r, "good", "region_b50").AUC {
				t.Errorf("chain starts at %s with %v", cs.Members[0], cs.StartAUC)
			}
			checkWords(t, "sentence", cs.Sentence, []string{"goes from 0.916 (region_b50"}, []string{"(base,"})
			return
		}
		t.Fatal("no region chain of good")
	})
}

// TestConstantModelNotTruncated: a model with one value on every valid
// cell is constant, not truncated, and the partial ROC's remedy for
// truncated predictions does not apply to it.
func TestConstantModelNotTruncated(t *testing.T) {
	r := loadSample(t)
	for i := range r.Models {
		if r.Models[i].Name == "broad" {
			r.Models[i].FloorShare = 1
		}
	}
	s := analyzed(t, r)
	for _, tc := range s.Truncation {
		if tc.Model == "broad" {
			checkWords(t, "sentence", tc.Sentence, []string{"Model broad is constant: its one value covers 100% of the valid area"},
				[]string{"truncated", "Peterson"})
			return
		}
	}
	t.Fatal("no truncation check of broad")
}

// TestIndependenceWording: test points near training points make the
// scores computed from them optimistic (a lower omission rate is
// optimistic, not "inflated"; the predicted area uses no test point), and
// the run does not know that the split was random.
func TestIndependenceWording(t *testing.T) {
	r := analyzedSample(t)
	s := r.Sensitivity
	if !s.Independence.Warn {
		t.Fatal("the sample no longer warns of test points near training points")
	}
	notWant := []string{"inflate", "every score is", "all scores are", "a random split"}
	checkWords(t, "headline", s.Headline, []string{"so every score computed from the test points is likely optimistic."}, notWant)
	checkWords(t, "independence", s.Independence.Sentence, []string{"unlikely to be independent of them (spatial autocorrelation), so every score computed from the test points is likely optimistic."}, notWant)
	checkWords(t, "reply", reviewerText(r), []string{"so every score computed from the test records is likely optimistic."}, notWant)
}

// TestSingleModelText: with one model there is no model comparison, so
// the methods and the reply name the model instead of "at least one
// model" and "every model", and do not describe differences between
// models; a null's paired differences are described as such.
func TestSingleModelText(t *testing.T) {
	r := liftResampled(withNull(t))
	r.Paired = append(r.Paired, nullPaired(r)...)
	keep := func(m string) bool { return m == "good" || m == DistanceNullName }
	var ms []Model
	for _, m := range r.Models {
		if keep(m.Name) {
			ms = append(ms, m)
		}
	}
	r.Models = ms
	var sc []Score
	for _, s := range r.Scores {
		if keep(s.Model) {
			sc = append(sc, s)
		}
	}
	r.Scores = sc
	var ps []Paired
	for _, p := range r.Paired {
		if keep(p.Model) && keep(p.OtherModel) {
			ps = append(ps, p)
		}
	}
	r.Paired = ps
	var rs []Ring
	for _, g := range r.Rings {
		if keep(g.Model) {
			rs = append(rs, g)
		}
	}
	r.Rings = rs
	analyzed(t, r)
	checkWords(t, "methods", methodsText(r),
		[]string{"moved with the extent by more than the tolerance for good.", "stayed within the tolerance for good, as omission rates must:",
			"Differences between extents of one model, and between a model and a null on one extent, were taken",
			"We therefore report every score together with the extent it was computed on and treat the values"},
		[]string{"at least one model", "for every model", "between models on one extent", "compare models only within one extent"})
}

// TestBoyceCited: the Boyce index keeps its name and its origin: the
// methods cite Boyce et al. (2002) beside Hirzel et al. (2006), whose
// continuous form is computed, and list both among the references.
func TestBoyceCited(t *testing.T) {
	r := analyzedSample(t)
	checkWords(t, "methods", methodsText(r), []string{"the continuous Boyce index (Boyce et al. 2002; Hirzel et al. 2006: the Spearman rank correlation",
		"- Boyce, M.S., Vernier, P.R., Nielsen, S.E. & Schmiegelow, F.K.A. (2002) Evaluating resource selection functions. Ecological Modelling 157: 281-300."}, nil)
}

// TestHeadlineBelowRandom: a model whose AUC is below 0.5 on every extent
// ranks the test records below the background more often than not; the
// headline says so rather than leave it to the reader of the range.
func TestHeadlineBelowRandom(t *testing.T) {
	r := loadSample(t)
	for i := range r.Scores {
		if r.Scores[i].Model == "broad" && r.Scores[i].Scored {
			r.Scores[i].AUC = 1 - r.Scores[i].AUC
		}
	}
	s := analyzed(t, r)
	sp := s.findSpread("auc", "broad")
	// How often beyond noise too, as the methods say it.
	want := fmt.Sprintf("AUC of broad ranged %s–%s (below 0.5, the AUC of a random ranking, on every extent, beyond noise on each) and is", f3(sp.Min), f3(sp.Max))
	checkWords(t, "headline", s.Headline, []string{want}, []string{"good ranged 0.798–0.966 (below 0.5", "within noise of 0.5"})
	// On one extent the test records cannot tell: said.
	r = loadSample(t)
	flipped := false
	for i := range r.Scores {
		if r.Scores[i].Model == "broad" && r.Scores[i].Scored {
			r.Scores[i].AUC = 1 - r.Scores[i].AUC
			if !flipped && r.Scores[i].AUC > 0.25 {
				r.Scores[i].AUC, flipped = 0.49, true
			}
		}
	}
	s = analyzed(t, r)
	sp = s.findSpread("auc", "broad")
	checkWords(t, "headline, one within noise", s.Headline, []string{fmt.Sprintf("on every extent, beyond noise on %d of them)", sp.N-1)}, nil)
}

// TestHeadlineChanceModel: a model within noise of 0.5 on every extent
// (and near it) is said to be; "ranged 0.503–0.509 and is robust" read as
// any other model (sentence audit of 2026-12-05). A good model is not.
func TestHeadlineChanceModel(t *testing.T) {
	r := loadSample(t)
	for i := range r.Scores {
		if r.Scores[i].Model == "broad" && r.Scores[i].Scored {
			r.Scores[i].AUC = 0.5 + 0.01*float64(i%3)
		}
	}
	s := analyzed(t, r)
	checkWords(t, "headline", s.Headline, []string{"(within noise of 0.5, the AUC of a random ranking, on every extent)"}, []string{"good ranged 0.798–0.966 (within noise"})
}

// TestNullCaptions: the captions of the figures that draw nulls say how:
// the scores-against-area figure draws them without bars (the caption
// described the bars of "each model" only), and the model-minus-null
// figure reads a bar wholly below 0 as well as one above it and says that
// its pairs are shifted along the area axis.
func TestNullCaptions(t *testing.T) {
	r := withNull(t)
	r.Paired = append(r.Paired, nullPaired(r)...)
	analyzed(t, r)
	checkWords(t, "metrics caption", metricsCaption(r), []string{"Nulls: grey open circles on dotted lines, at their full-sample scores, without bars and not shifted."}, nil)
	checkWords(t, "metrics caption without nulls", metricsCaption(loadSample(t)), nil, []string{"Nulls:"})
	// A third null is drawn with open squares (nullLineStyle), and the
	// caption says so rather than "open circles".
	three := withNull(t)
	for _, nm := range []string{"second_null", "third_null"} {
		three.Models = append(three.Models, Model{Name: nm, Role: RoleNull})
	}
	checkWords(t, "metrics caption with three nulls", metricsCaption(three), []string{"then squares, then triangles"}, []string{"open circles"})
	for _, f := range nullGapFigures(r) {
		checkWords(t, "null caption", f.Caption, []string{"wholly below 0: below it", "shifted a few percent apart along the area axis"}, nil)
		return
	}
	t.Fatal("no model-minus-null figure")
}

// TestVerdictMultiplicity: the verdicts read one unadjusted 95% interval
// per extent ("extent-sensitive" when any lies outside the tolerance), so
// the methods and the page say that the intervals are not adjusted for
// the number of extents.
func TestVerdictMultiplicity(t *testing.T) {
	r := analyzedSample(t)
	checkWords(t, "methods", methodsText(r), []string{"was not judged, and the intervals were not adjusted for the number of extents compared."}, nil)
	page, err := htmlPage(r, nil, methodsDoc{})
	if err != nil {
		t.Fatal(err)
	}
	checkWords(t, "page", string(page), []string{"The intervals are per extent, not adjusted for the number of extents"}, nil)
}

// TestModelSameAsNull: a model whose every paired difference from a null
// is 0 (a copy of the null) "is the same as" the null; "not above beyond
// noise" and a gap "moving" from +0.000 to +0.000 would speak of noise
// and movement where there is none. No interval is quoted for it.
func TestModelSameAsNull(t *testing.T) {
	r := withNull(t)
	ps := nullPaired(r)
	for i := range ps {
		ps[i].A, ps[i].B, ps[i].Diff, ps[i].SE, ps[i].Low, ps[i].High = 0.8, 0.8, 0, Float(0), Float(0), Float(0)
	}
	r.Paired = append(r.Paired, ps...)
	s := analyzed(t, r)
	for _, an := range s.AboveNull {
		if an.Metric != "auc" || an.Model != "good" {
			continue
		}
		notWant := []string{"not above", "moves from", "runs from", "within noise", "interval"}
		checkWords(t, "sentence", an.Sentence, []string{"On base, AUC of good is the same as that of " + DistanceNullName + " (distance-only null) on their 21 common test points (0.800 against 0.800): every test point's placement is the same, so there is no gap to judge against noise.",
			"Across 8 extents it is the same on every one (every paired difference 0)."}, notWant)
		checkWords(t, "headline", s.Headline, []string{"good scores the same as " + DistanceNullName + " on base (every paired AUC difference 0, on 21 common test points); the gap is 0 on every extent"}, notWant[:4])
		checkWords(t, "reply", reviewerNullText(s), []string{"the AUC of good is the same as that of " + DistanceNullName}, []string{"not above"})
		return
	}
	t.Fatal("no AUC comparison of good with the null")
}

// TestModelSameAsNullFewPoints: a model the same as a null on fewer
// common test points than a difference is judged on (the partial ROC
// ratio's 30 at E = 0.05; AUC's 10) is the same, as its AUC on more
// points is: the audit's model written from the distance-only null read
// "+0.000 (1.037 against 1.037) on 12 common test points, fewer than the
// 30 we judge a difference on: whether it beats the null is not told",
// then "the difference and its interval are 0 on every one", and
// results.json read too_few where AUC read the same. There is no noise
// to judge an exact 0 against, whatever the number of points.
func TestModelSameAsNullFewPoints(t *testing.T) {
	key := MetricKeyPartialROC(0.05)
	for _, c := range []struct {
		metric, method string
		m              MetricInfo
		points         int
		want           string
	}{
		{key, "paired_resamples", MetricInfo{Key: key, Kind: MetricPartialROC, E: 0.05}, 12,
			"On base, the partial ROC ratio of dn at E = 0.05 is the same as that of dcopy (null) on their 12 common test points (1.037 against 1.037): the difference is 0 on them and on every paired resample, so there is no gap to judge against noise."},
		{"auc", "placements", MetricInfo{Key: "auc", Kind: MetricAUC, Label: "AUC"}, 6,
			"On base, AUC of dn is the same as that of dcopy (null) on their 6 common test points (1.037 against 1.037): every test point's placement is the same, so there is no gap to judge against noise."},
	} {
		var ps []Paired
		for _, ext := range []string{"base", "hull"} {
			ps = append(ps, Paired{Metric: c.metric, Kind: PairedKindNull, Model: "dn", Extent: ext, OtherModel: "dcopy", OtherExtent: ext,
				CommonPoints: c.points, Method: c.method, Defined: true, A: 1.037, B: 1.037, SE: Float(0), Low: Float(0), High: Float(0), Resamples: 200})
		}
		if ps[0].Judged() {
			t.Fatalf("%s: %d common points should be below the cut-off", c.metric, c.points)
		}
		a := &analysis{r: &Results{Models: []Model{{Name: "dn"}, {Name: "dcopy", Role: RoleNull, NullKind: "raster"}}, Paired: ps},
			metrics: []MetricInfo{c.m}, models: []string{"dn"}, base: "base", paired: map[pairedKey]int{}, extIndex: map[string]int{}, scores: map[[2]string]*Score{}}
		for i, p := range ps {
			a.paired[pairedKey{p.Metric, p.Kind, p.Model, p.Extent, p.OtherModel, p.OtherExtent}] = i
		}
		ans := a.aboveNull([]string{"base", "hull"})
		if len(ans) != 1 {
			t.Fatalf("%s: %d comparisons, want 1", c.metric, len(ans))
		}
		an := ans[0]
		if an.BaseReading != ReadingNotAbove || an.NotAbove != 2 || an.Gaps[0].NotJudged != "" || an.Gaps[1].Reading != ReadingNotAbove {
			t.Errorf("%s: reading %q, not above %d, not judged %q, on hull %q; want not_above on both extents, read",
				c.metric, an.BaseReading, an.NotAbove, an.Gaps[0].NotJudged, an.Gaps[1].Reading)
		}
		checkWords(t, c.metric, an.Sentence, []string{c.want, "Across 2 extents it is the same on every one (every paired difference 0)."},
			[]string{"not told", "interval", "fewer than"})
		if w := readingWords(c.m.Kind, &an.Gaps[0]); w != "the same (every paired difference 0)" {
			t.Errorf("%s: table reads %q", c.metric, w)
		}
	}
}

// TestHeadlineCountsSame: past maxHeadlinePairs the headline counts the
// pairs where the model is the same as the null apart from those within
// noise: "within noise in 8" of the audit counted two copies of a null as
// noise while the methods called them the same.
func TestHeadlineCountsSame(t *testing.T) {
	var gaps []baseGap
	for i := range 8 {
		g := &NullGap{Extent: "base", Defined: true, ModelValue: 0.6, NullValue: 0.58, Diff: 0.02, SE: 0.05, Low: -0.08, High: 0.12, Reading: ReadingNotAbove}
		if i < 2 {
			g.NullValue, g.Diff, g.SE, g.Low, g.High = 0.6, 0, 0, 0, 0
		}
		gaps = append(gaps, baseGap{&AboveNull{Model: fmt.Sprint("m", i), BaseExtent: "base", BaseReading: ReadingNotAbove}, g})
	}
	checkWords(t, "counts", aboveNullCounts(gaps),
		[]string{"of the 8 pairs of a model and a null, the model is above the null beyond noise (AUC) in 0, within noise in 6, below in 0 and the same (every paired difference 0) in 2 (each pair"}, []string{"within noise in 8"})
}

// TestKendallWUndefinedSaysWhy: when every extent ties every model, the
// table shows no Kendall's W; the sentence says why instead of leaving it
// out silently.
func TestKendallWUndefinedSaysWhy(t *testing.T) {
	r := loadSample(t)
	good := map[string]float64{}
	for _, sc := range r.Scores {
		if sc.Model == "good" {
			good[sc.Extent] = sc.AUC
		}
	}
	for i := range r.Scores {
		r.Scores[i].AUC = good[r.Scores[i].Extent]
	}
	s := analyzed(t, r)
	d := s.findDecomposition("auc")
	if d == nil || !d.Defined || d.KendallWDefined {
		t.Fatalf("decomposition %+v", d)
	}
	checkWords(t, "sentence", d.Sentence, []string{"Kendall's W is undefined: the models tie on every extent."}, nil)
}

// TestExplorerPartialROCLabel: the extent explorer shows the full-sample
// partial ROC ratio with the bootstrap's percentiles; it called the value
// the "published half-size bootstrap", which it is not, and the resamples
// are half-size only when --fraction is 0.5.
func TestExplorerPartialROCLabel(t *testing.T) {
	r := analyzedSample(t)
	page, err := htmlPage(r, nil, methodsDoc{})
	if err != nil {
		t.Fatal(err)
	}
	checkWords(t, "page", string(page), []string{`(full sample; 2.5th to 97.5th percentile of " + data.bootstrap + ": "`,
		`"bootstrap":"the published bootstrap"`}, []string{"half-size", "the published bootstrap's"})
	// Another --fraction is not the published bootstrap: the explorer
	// called it that whatever the fraction.
	r.Settings.ResampleFraction = 0.3
	page, err = htmlPage(r, nil, methodsDoc{})
	if err != nil {
		t.Fatal(err)
	}
	checkWords(t, "page at fraction 0.3", string(page), []string{`"bootstrap":"a bootstrap like the published one (which draws 50%)"`}, []string{`"bootstrap":"the published bootstrap"`})
}

// TestBootstrapNamedByFraction: the partial ROC bootstrap is "the
// published bootstrap" (Peterson et al. 2008) only when it draws 50% of
// the test records; another --fraction is named as a variant of it.
func TestBootstrapNamedByFraction(t *testing.T) {
	r := analyzedSample(t)
	checkWords(t, "methods at 0.5", methodsText(r), []string{"from the published bootstrap of 200 resamples of 50% of the test records"}, nil)
	checkWords(t, "caption at 0.5", metricsCaption(r), []string{"of 50% of the test records (the published bootstrap)"}, nil)
	r.Settings.ResampleFraction = 0.3
	notWant := []string{"the published bootstrap of", "(the published bootstrap)"}
	checkWords(t, "methods at 0.3", methodsText(r), []string{"from a bootstrap like the published one (which draws 50%) of 200 resamples of 30% of the test records"}, notWant)
	checkWords(t, "caption at 0.3", metricsCaption(r), []string{"of 30% of the test records (the published bootstrap draws 50%)"}, notWant)
}

// TestRingPanelNamesNull: the ring figure's panel of a null, and the
// caption of its continuation page, call it a null, as the chain's
// sentence does, not a model.
func TestRingPanelNamesNull(t *testing.T) {
	r := withNull(t)
	for _, g := range r.Rings {
		if g.Model == "good" {
			g.Model = DistanceNullName
			r.Rings = append(r.Rings, g)
		}
	}
	analyzed(t, r)
	var caps []string
	for _, f := range figures(r) {
		caps = append(caps, f.Caption)
	}
	seen := false
	for i := range r.Sensitivity.Chains {
		cs := &r.Sensitivity.Chains[i]
		if cs.Model != DistanceNullName {
			continue
		}
		seg := ringSeg{w: &chainWaterfall{cs: []*ChainSummary{cs}, models: []int{-1}}}
		title := seg.title(len(r.Sensitivity.ModelNames))
		checkWords(t, "panel title", title, []string{"nested chain " + cs.Chain + ", null " + DistanceNullName}, []string{"model"})
		seen = true
	}
	if !seen {
		t.Fatal("no chain of the null")
	}
	checkWords(t, "captions", strings.Join(caps, "\n"), nil, []string{"model " + DistanceNullName})
}

// TestTenPointCutoffOurs: every sentence that applies the 10-common-point
// rule names it as our cut-off (the model comparisons, the note above
// them, the gaps against a null, the methods), the gap's without a second
// bracket after it.
func TestTenPointCutoffOurs(t *testing.T) {
	r := withNull(t)
	ps := nullPaired(r)
	ps[0].CommonPoints = 5
	r.Paired = append(r.Paired, ps...)
	setPaired(r, "auc", PairedKindModel, "good", "base", func(p *Paired) { p.CommonPoints = 5 })
	s := analyzed(t, r)
	for _, rk := range s.Rankings {
		if rk.Metric == "auc" && rk.Model == "good" && rk.Other == "truncated" {
			checkWords(t, "ranking", rk.Sentence, []string{"Not counted: 1 extent where they share fewer than 10 test points (our cut-off)."}, nil)
		}
	}
	for _, an := range s.AboveNull {
		if an.Metric == "auc" && an.Model == "good" {
			checkWords(t, "gap", an.Sentence, []string{"not told on 1 with fewer than 10 common test points (our cut-off). This describes the family of extents; it is not a test."}, []string{") ("})
		}
	}
	checkWords(t, "methods", methodsText(r), []string{"fewer than 10 common test records (30 for a difference from the resamples, whose percentile intervals our simulation check found misleading on fewer; our cut-offs; none for an omission rate between extents, which is 0 on the test records both hold by construction, its threshold not depending on the extent) was not judged"}, nil)
	page, err := htmlPage(r, nil, methodsDoc{})
	if err != nil {
		t.Fatal(err)
	}
	checkWords(t, "page", string(page), []string{"share fewer than 10 test points (30 for a score from the resamples: the partial ROC ratio, an omission rate; our cut-offs) are not counted",
		"fewer than 10 common test points (30 for the partial ROC ratio), or an interval from fewer than 40 formed resamples"}, nil)
}

// TestMethodsDescribeWhatWasComputed: the methods define every score they
// judge (the predicted area was judged and given a tolerance but never
// defined) and describe the Boyce window areas as computed: the area at
// each presence value and fixed threshold is counted exactly, not spread
// over its histogram bin (metrics.Boyce since the window areas were made
// exact at those values).
func TestMethodsDescribeWhatWasComputed(t *testing.T) {
	r := analyzedSample(t)
	checkWords(t, "methods", methodsText(r), []string{
		"; the predicted area, the share of the extent's area at or above the minimum training presence;",
		"each bin's area taken as spread evenly over the bin except the area exactly at each presence value and fixed threshold, counted wholly in the windows that hold the value"}, nil)
}

// TestUndeterminedSaysWhere: an undetermined verdict quotes the largest
// difference, whose interval may lie inside the tolerance while another
// extent's straddles it; the sentence says on how many extents the
// interval straddles the tolerance and names the one reaching furthest.
func TestUndeterminedSaysWhere(t *testing.T) {
	// An omission rate (a percentile interval, as the Boyce index's was
	// before its differences were no longer judged) with a tolerance of
	// 0.1 set for the run.
	const key = "omission_minimum_training_presence"
	r := liftResampled(loadSample(t))
	r.Settings.ToleranceOmission = 0.1
	for i := range r.Paired {
		if p := &r.Paired[i]; p.Metric == key && p.Kind == PairedKindExtent && p.Model == "good" {
			p.Defined, p.Diff, p.Low, p.High = true, 0.01, Float(-0.02), Float(0.04)
		}
	}
	setPaired(r, key, PairedKindExtent, "good", "hull", func(p *Paired) { p.Diff, p.Low, p.High = -0.05, Float(-0.08), Float(0.03) })
	setPaired(r, key, PairedKindExtent, "good", "whole", func(p *Paired) { p.Diff, p.Low, p.High = 0.02, Float(0.005), Float(0.15) })
	s := analyzed(t, r)
	mv := s.findModelVerdict(key, "good")
	if mv.Verdict != JudgementUndetermined {
		t.Fatalf("verdict %s: %s", mv.Verdict, mv.Sentence)
	}
	checkWords(t, "sentence", mv.Sentence, []string{"the largest difference from base is -0.050 on hull (95% interval -0.080 to +0.030); the 95% interval straddles ±0.1 on 1 of",
		"reaching furthest beyond it with +0.020 on whole (95% interval +0.005 to +0.150)"}, nil)
}

// TestReplyTooFewAgainstNull: with too few common test records on the
// base extent, the reply says that no difference is judged there, not
// "we judge no difference" (which reads as "we find none").
func TestReplyTooFewAgainstNull(t *testing.T) {
	r := withNull(t)
	r.Paired = append(r.Paired, nullPaired(r)...)
	setPaired(r, "auc", PairedKindNull, "good", "base", func(p *Paired) { p.CommonPoints = 6 })
	s := analyzed(t, r)
	checkWords(t, "reply", reviewerNullText(s), []string{"too few to compare good (6 common test records) with " + DistanceNullName +
		" (we do not judge a difference on fewer than 10 common test records, our cut-off)"}, []string{"we judge no difference"})
}

// TestReferenceExtentInPlaceOfBase: when the base extent holds no test
// point, the first scored extent stands in for it; the verdicts, the
// methods and the reply call that extent the reference extent and say
// why, instead of calling it "the base extent".
func TestReferenceExtentInPlaceOfBase(t *testing.T) {
	r := withNull(t)
	r.Paired = append(r.Paired, nullPaired(r)...)
	for i := range r.Scores {
		if r.Scores[i].Extent == vocab.BaseID {
			r.Scores[i].Scored, r.Scores[i].NotScored = false, "no test points inside this extent"
		}
	}
	s := analyzed(t, r)
	if s.BaseExtent == vocab.BaseID {
		t.Fatalf("the reference extent is still %s", s.BaseExtent)
	}
	ref := s.BaseExtent
	notWant := []string{"the base extent (" + ref + ")", "the base extent, " + ref, "with the base extent on", "On the base extent "}
	checkWords(t, "verdict", s.Verdicts[0].Sentence, []string{"paired differences from the reference extent " + ref + ")"}, []string{"from the base extent"})
	checkWords(t, "methods", methodsText(r), []string{
		"its difference from the reference extent " + ref + ", in place of the base extent base (left out: ",
		"we compared every extent with the reference extent on the test records both hold",
		"On the reference extent the AUC of good",
		// The reply's list of extents, without a parenthesis nested in its own.
		"(the reference extent " + ref + " and " + fmt.Sprint(len(s.ScoredExtents)-1) + " others; it stands in for the base extent base, left out: no model could be scored)"},
		append(notWant, "(left out: no model could be scored) and"))
	checkWords(t, "headline", s.Headline, []string{"Differences are taken from the reference extent " + ref + ", in place of the base extent base (left out: "}, nil)
	// The page's note on the reference: the extent's own description in
	// its bracket, then the stand-in's; it read "The reference extent X,
	// in place of the base extent base (left out: ...) (kind ...)", a
	// bracket after a bracket.
	checkWords(t, "base note", baseNote(r), []string{"The reference extent " + ref + " (kind ", "), in place of the base extent base (left out: no model could be scored). Every"}, []string{") ("})
	if r0 := analyzed(t, withNull(t)); strings.Contains(r0.Headline, "Differences are taken from") {
		t.Errorf("headline with the base extent scored names a reference extent: %s", r0.Headline)
	}
}

// TestNoCommonPointsIsNotUndefined: an extent that shares no test point
// with the base (one beside it, not around it) has a defined score; the
// verdict says that no paired difference could be formed there, not that
// the score "is undefined" on it.
func TestNoCommonPointsIsNotUndefined(t *testing.T) {
	r := loadSample(t)
	setPaired(r, "auc", PairedKindExtent, "good", "points_b25", func(p *Paired) {
		p.Defined, p.CommonPoints, p.Diff, p.Low, p.High = false, 0, 0, Float(0), Float(0)
	})
	s := analyzed(t, r)
	mv := s.findModelVerdict("auc", "good")
	checkWords(t, "sentence", mv.Sentence, []string{"No paired difference from base could be formed on points_b25 (0 common test points)."},
		[]string{"undefined on points_b25"})
}

// TestPageReferenceExtent: the page's Analysis heading and note call the
// extent the differences are taken from the reference extent, and say
// why, when the base extent could not be scored.
func TestPageReferenceExtent(t *testing.T) {
	r := loadSample(t)
	for i := range r.Scores {
		if r.Scores[i].Extent == vocab.BaseID {
			r.Scores[i].Scored, r.Scores[i].NotScored = false, "no test points inside this extent"
		}
	}
	s := analyzed(t, r)
	page, err := htmlPage(r, nil, methodsDoc{})
	if err != nil {
		t.Fatal(err)
	}
	checkWords(t, "page", string(page), []string{"<h3>Difference from the reference extent</h3>",
		"minus the score on " + s.BaseExtent + ", in place of the base extent base (left out: "}, []string{"Difference from the base extent"})
	plain, err := htmlPage(analyzedSample(t), nil, methodsDoc{})
	if err != nil {
		t.Fatal(err)
	}
	checkWords(t, "page with base", string(plain), []string{"<h3>Difference from the base extent</h3>", "minus the score on base, on the test points"}, nil)
}

// TestMetricsCaptionOmissionUncertain: the scores figure draws no bar for
// the omission rate, but the omission rate is computed from the test
// records and so has sampling error (only the predicted area has none);
// the caption gave the threshold's origin as the reason for both.
func TestMetricsCaptionOmissionUncertain(t *testing.T) {
	checkWords(t, "caption", metricsCaption(analyzedSample(t)), []string{"The predicted area has no sampling error",
		"the omission rate does vary with the test records"}, []string{"have no bar: the threshold comes from the training records alone"})
}

// TestChainFewTestPoints: a chain whose member has fewer test points than
// our 10-point cut-off says so, since its shares can be one or two points
// moving; a chain on enough points does not.
func TestChainFewTestPoints(t *testing.T) {
	const clause = "rest on as few as"
	r := loadSample(t)
	s := analyzed(t, r)
	for _, cs := range s.Chains {
		if strings.Contains(cs.Sentence, clause) {
			t.Fatalf("chain %s of %s on the sample says %q", cs.Chain, cs.Model, clause)
		}
	}
	for i := range r.Scores {
		if r.Scores[i].Model == "good" && r.Scores[i].Extent == "base" {
			r.Scores[i].TestPoints = 7
		}
	}
	s = analyzed(t, r)
	found := false
	for _, cs := range s.Chains {
		if cs.Model != "good" || !slices.Contains(cs.Members, "base") {
			continue
		}
		found = true
		checkWords(t, "chain "+cs.Chain, cs.Sentence, []string{"These AUCs rest on as few as 7 test points, fewer than the 10 we judge a difference on (our cut-off)"}, nil)
	}
	if !found {
		t.Fatal("no chain of good through base")
	}
}

// TestLongFamilyListed: methods.md writes a run of buffers of a long
// family as one item with every distance, and the extents short of test
// records as the base extent's count and the others' range, so that the
// paragraph stays one a modeller can paste; a family of at most
// maxListed extents is listed one by one.
func TestLongFamilyListed(t *testing.T) {
	var exts []Extent
	exts = append(exts, Extent{ID: "base", Kind: vocab.KindBase, Params: "file=region.gpkg", AreaKm2: 3.14e6})
	for i, d := range []int{-40, -20, 20, 40, 60, 80} {
		exts = append(exts, Extent{ID: fmt.Sprintf("region_%dkm", d), Kind: vocab.KindRegionBuffer, Params: fmt.Sprintf("d_km=%d", d), AreaKm2: 2e6 + float64(i)*1e5})
	}
	for i, d := range []int{25, 50, 75, 100, 125} {
		exts = append(exts, Extent{ID: fmt.Sprintf("points_%dkm", d), Kind: vocab.KindPointBuffer, Params: fmt.Sprintf("d_km=%d; around=training points", d), AreaKm2: 5e5 * float64(i+1)})
	}
	exts = append(exts, Extent{ID: "hull", Kind: vocab.KindHull, Params: "convex hull of training points", AreaKm2: 7e6})
	got := strings.Join(familyList(exts), " | ")
	want := "base (the base extent, the study region as given: file=region.gpkg; 3,140,000 km²) | region_-40km to region_80km (6 region buffers, d_km = -40, -20, 20, 40, 60, 80; 2,000,000 to 2,500,000 km²) | " +
		"points_25km to points_125km (5 point buffers, d_km = 25, 50, 75, 100, 125; around=training points; 500,000 to 2,500,000 km²) | hull (convex hull of training points; 7,000,000 km²)"
	if got != want {
		t.Errorf("long family:\n got %s\nwant %s", got, want)
	}
	if got := familyList(exts[:maxListed]); len(got) != maxListed {
		t.Errorf("a family of %d extents is summarized: %q", maxListed, got)
	}

	s := &Sensitivity{BaseExtent: "base"}
	var fewer []string
	for i, e := range exts {
		s.ScoredExtents = append(s.ScoredExtents, e.ID)
		s.TestPoints = append(s.TestPoints, 100+i)
		fewer = append(fewer, fmt.Sprintf("%s %d", e.ID, 100+i))
	}
	if got, want := fewerList(s, fewer, false), "base 100; between 101 (region_-40km) and 112 (hull) on the other 12 (each in the report's Extents table)"; got != want {
		t.Errorf("fewer:\n got %s\nwant %s", got, want)
	}
	if got, want := fewerList(s, fewer[:3], true), "base 100, region_-40km 101 and region_-20km 102"; got != want {
		t.Errorf("short list of fewer: got %s, want %s", got, want)
	}
}

// TestReplyAnswersTheQuestion: the reply to a reviewer answers "model or
// extent?" for AUC with each extent-sensitive model's range, says
// whether the model order held, says the intervals are not adjusted for
// the number of extents, and does not blame an undetermined verdict on
// too few test records (it may be an interval straddling the tolerance).
func TestReplyAnswersTheQuestion(t *testing.T) {
	r := loadSample(t)
	s := analyzed(t, r)
	reply := reviewerText(r)
	sp := s.findSpread("auc", "good")
	checkWords(t, "reply", reply, []string{
		"The intervals are per extent, not adjusted for the 7 comparisons with the base extent.",
		fmt.Sprintf("The value of AUC is therefore a property of the model and the extent together: the same predictions of good scored from %s on %s to %s on %s",
			f3(sp.Min), sp.MinExtent, f3(sp.Max), sp.MaxExtent),
		"(each on the test records inside that extent)",
	}, []string{"too few (or the score undefined)"})
	for _, rk := range s.Rankings {
		if rk.Metric == "auc" && rk.Better == rk.Extents && !strings.Contains(reply, "so their order held on every extent") {
			t.Errorf("%s better on every extent, the reply does not say the order held:\n%s", rk.Model, reply)
		}
	}
	if rankingOrderText(ModelRanking{Extents: 5, Better: 2, Worse: 1}) != ", so their order depends on the extent" {
		t.Error("an order reversed beyond noise is not said to depend on the extent")
	}
}

// TestPageSaysWhatItShows: the summary names the base extent, what it is
// and its test points, so that a newcomer can read "difference from
// base"; a table longer than foldRows (or summaryFoldRows in the
// summary) is folded under a line that counts its rows; the nested
// rings say, where test points enter along a chain, that a ring's
// "inside" AUC is on the outer extent's test points; and the distance-only
// null's threshold rows are said to describe its construction.
func TestPageSaysWhatItShows(t *testing.T) {
	r := withNull(t)
	s := analyzed(t, r)
	page, err := htmlPage(r, nil, methodsDoc{})
	if err != nil {
		t.Fatal(err)
	}
	p := string(page)
	var base *Extent
	for i := range r.Extents {
		if r.Extents[i].ID == s.BaseExtent {
			base = &r.Extents[i]
		}
	}
	entering := false
	for _, c := range s.Chains {
		for _, st := range c.Steps {
			entering = entering || st.Kind == StepTestPoints
		}
	}
	if !entering {
		t.Fatal("the sample has no chain along which test points enter: the case is not tested")
	}
	checkWords(t, "page", p, []string{
		fmt.Sprintf(`<p class="basenote" id="base-note">The base extent is base (the study region as given, %s; %s km²; %d of the %d test points). Every &#34;difference from base&#34; on this page`,
			base.Params, fmtArea(base.AreaKm2), base.TestPoints, r.PointCounts.Test),
		"<h3>Nested rings</h3><p>" + template.HTMLEscapeString(chainsEnteringNote) + "</p>",
		"The rows of " + DistanceNullName + " (distance-only null) are not a model&#39;s",
		`<th scope="col">area (km²)</th>`,
	}, nil)
	var long, short int
	for _, m := range regexp.MustCompile(`(<details class="fold"><summary>Show the table \((\d+) rows; click a column header to sort\)</summary>)?<div class="tablewrap"><table class="sortable" id="([a-z-]+)">`).FindAllStringSubmatch(p, -1) {
		rows := strings.Count(p[strings.Index(p, `id="`+m[3]+`"`):][:strings.Index(p[strings.Index(p, `id="`+m[3]+`"`):], "</table>")], "<tr><td")
		limit := foldRows
		if m[3] == "tbl-above-null-summary" {
			limit = summaryFoldRows
		}
		switch folded := m[1] != ""; {
		case folded && strconv.Itoa(rows) != m[2]:
			t.Errorf("table %s: summary counts %s rows, table has %d", m[3], m[2], rows)
		case folded != (rows > limit):
			t.Errorf("table %s of %d rows: folded %v, limit %d", m[3], rows, folded, limit)
		case folded:
			long++
		default:
			short++
		}
	}
	if long == 0 || short == 0 {
		t.Errorf("%d folded and %d open tables: the sample should have both", long, short)
	}
	if strings.Count(p, "<details") != strings.Count(p, "</details>") {
		t.Error("unbalanced details elements")
	}
}

// TestTermsSection: the page defines the words a newcomer meets (AUC,
// partial ROC and E, omission rate, minimum training presence, binomial
// test, Boyce index, the verdicts, the paired differences), each
// published method with its citation, and the distance-only null only
// when the run scored it.
func TestTermsSection(t *testing.T) {
	for _, c := range []struct {
		name string
		r    *Results
		null bool
	}{{"with null", withNull(t), true}, {"without null", loadSample(t), false}} {
		t.Run(c.name, func(t *testing.T) {
			analyzed(t, c.r)
			page, err := htmlPage(c.r, nil, methodsDoc{})
			if err != nil {
				t.Fatal(err)
			}
			p := string(page)
			i := strings.Index(p, `<section id="terms">`)
			if i < 0 || !strings.Contains(p, `<a href="#terms">Terms</a>`) {
				t.Fatal("no Terms section in the page or its contents")
			}
			terms := p[i : i+strings.Index(p[i:], "</section>")]
			checkWords(t, "terms", terms, []string{
				"<dt>AUC</dt><dd>", "(Hanley &amp; McNeil 1982)",
				"<dt>partial ROC ratio, E</dt>", "(Peterson et al. 2008)", "(0.05 and 0.1 here)",
				"<dt>omission rate</dt>", "<dt>minimum training presence, 10th percentile training presence</dt>",
				"<dt>binomial test</dt>", "(Anderson et al. 2003)",
				"<dt>Boyce index</dt>", "(Boyce et al. 2002; Hirzel et al. 2006)",
				"<dt>robust, extent-sensitive, undetermined</dt>", "tolerances we chose",
				"not adjusted for the number of extents", "<dt>descriptions</dt>",
			}, nil)
			if got := strings.Contains(terms, "<dt>distance-only null</dt>"); got != c.null {
				t.Errorf("distance-only null defined: %v, want %v", got, c.null)
			}
		})
	}
}

// TestIDListCapped: a cell of the omitted table lists at most maxIDs ids
// and says how many more there are and where they are; a null at 60
// extents missed all 500 test points and its cell ran to screens.
func TestIDListCapped(t *testing.T) {
	var ids []string
	for i := 1; i <= maxIDs+15; i++ {
		ids = append(ids, strconv.Itoa(i))
	}
	got := idList(ids)
	if !strings.HasPrefix(got, "1, 2, 3,") || !strings.HasSuffix(got, ", 30 and 15 more (results.json, omissions, lists every one)") {
		t.Errorf("idList of %d ids: %s", len(ids), got)
	}
	if got := idList(ids[:maxIDs]); got != strings.Join(ids[:maxIDs], ", ") {
		t.Errorf("idList of %d ids is shortened: %s", maxIDs, got)
	}
}

// TestExtentListCapped: a cell naming extents names at most
// maxExtentNames, after their count.
func TestExtentListCapped(t *testing.T) {
	var ids []string
	for i := 0; i < maxExtentNames+3; i++ {
		ids = append(ids, fmt.Sprintf("e%d", i))
	}
	if got, want := extentList(ids), fmt.Sprintf("%d extents: e0, e1, e2, e3, e4, e5, e6, e7, …", len(ids)); got != want {
		t.Errorf("extentList: %s, want %s", got, want)
	}
	if got := extentList(ids[:2]); got != "e0, e1" {
		t.Errorf("extentList of two: %s", got)
	}
}

// TestMetricsCaptionBarsNotPaired: the scores figure's bars are per
// extent, and the caption says a difference between extents is read from
// the paired difference, not from overlapping bars (the extents share
// their test points).
func TestMetricsCaptionBarsNotPaired(t *testing.T) {
	r := analyzedSample(t)
	checkWords(t, "caption", metricsCaption(r), []string{"so whether two extents differ is read from their paired difference under Analysis, not from overlapping bars",
		"The base extent, whose scores the Analysis takes differences from, is at 40,600 km². "}, nil)
	r.Settings.PairedResamples, r.Settings.Iterations = 0, 1
	checkWords(t, "caption without bars", metricsCaption(r), nil, []string{"overlapping bars"})
}

// TestOneExtentBesideUnscoredBase: when the base extent is scored for no
// model and one other extent stands in as the reference, a verdict with
// nothing to compare names that reference extent, not "the base extent".
func TestOneExtentBesideUnscoredBase(t *testing.T) {
	r := loadSample(t)
	onlyExtents(r, "base", "region_b50")
	for i := range r.Scores {
		if r.Scores[i].Extent == "base" {
			r.Scores[i].Scored, r.Scores[i].NotScored = false, "no test points inside this extent"
		}
	}
	s := analyzed(t, r)
	if s.BaseExtent != "region_b50" {
		t.Fatalf("reference extent %q, want region_b50 standing in for the unscored base", s.BaseExtent)
	}
	mv := s.findModelVerdict("auc", "good")
	if mv == nil {
		t.Fatal("no AUC verdict of good")
	}
	checkWords(t, "sentence", mv.Sentence, []string{"scored on the reference extent region_b50 only, so there is nothing to compare"}, []string{"the base extent"})
}

// TestOneTestPointSingular: counts of 1 test point (a study whose test
// records all fall in one cell is thinned to one) are said in the
// singular, and one distance is not given as a range with a median
// ("The 1 test points lie 22.7–22.7 km ... (median 22.7 km)" was written).
// Expected strings are the templates with the count filled in by hand.
func TestOneTestPointSingular(t *testing.T) {
	s := &Sensitivity{TestPoints: []int{1, 1, 1}}
	checkWords(t, "test point text", testPointText(s), []string{"1 test point on each"}, []string{"points"})
	checkWords(t, "chain clause", fewPointsClause(1, true), []string{"as few as 1 test point, fewer than the 10"}, []string{"points,"})
	mv := &ModelVerdict{Verdict: JudgementUndetermined, Base: "base", Tolerance: 0.05, Largest: 0,
		Diffs: []ExtentDifference{{Extent: "hull", Defined: true, CommonPoints: 1, Diff: 0.004, Low: Float(0.004), High: Float(0.004), Position: positionTooFew}}}
	checkWords(t, "verdict phrase", verdictPhrase(mv), []string{"on hull, not judged, too few common test points: 1, our cut-off 10"}, []string{"1 common test points", "interval"})
	checkWords(t, "all extents", allExtents(1), []string{"the 1 extent"}, []string{"all"})
	checkWords(t, "all extents", allExtents(13), []string{"all 13 extents"}, nil)

	// One scored test point 22.7 km from the nearest training point.
	r := loadSample(t)
	k := 0
	for i := range r.Points {
		p := &r.Points[i]
		if p.Role != vocab.RoleTest || p.Status != vocab.PointScored {
			continue
		}
		if k > 0 {
			p.Status = vocab.PointThinned
		}
		p.NearestTrainKm = 22.7
		k++
	}
	ind := analyzed(t, r).Independence
	checkWords(t, "independence", ind.Sentence, []string{"The 1 test point lies 22.7 km from the nearest training point; 0% lie within 3 cell widths"},
		[]string{"points lie", "22.7–22.7", "median"})

	// The reading against a null on 1 common test point.
	r = withNull(t)
	r.Paired = append(r.Paired, nullPaired(r)...)
	for i := range r.Paired {
		if p := &r.Paired[i]; p.Model == "good" || p.OtherModel == "good" {
			p.CommonPoints = 1
		}
	}
	s = analyzed(t, r)
	for _, an := range s.AboveNull {
		if an.Model == "good" && an.Metric == "auc" {
			checkWords(t, "above null", an.Sentence, []string{"on 1 common test point, fewer than the 10"}, []string{"1 common test points"})
		}
	}
	checkWords(t, "headline", s.Headline, []string{"on 1 test point, fewer than our 10"}, []string{"1 test points", "1 common test points"})
	checkWords(t, "reply", reviewerNullText(s), []string{"good (1 common test record)"}, []string{"1 common test records"})

	// The base extent's note, in a run of one test point.
	r = loadSample(t)
	r.PointCounts.Test = 1
	for i := range r.Extents {
		r.Extents[i].TestPoints = min(r.Extents[i].TestPoints, 1)
	}
	analyzed(t, r)
	checkWords(t, "base note", baseNote(r), []string{"1 of the 1 test point)"}, []string{"test points)"})
}

// TestMapCaptionAnchorsDrawn: the map caption names the outlines of the
// base region and of the whole raster only when a panel draws them. A
// whole raster with the cells of another extent is a duplicate, left off
// the maps, and the caption said "the whole raster a dashed red one"
// under maps without it.
func TestMapCaptionAnchorsDrawn(t *testing.T) {
	const (
		both      = "In each panel the base region is a solid magenta outline and the whole raster a dashed red one; the buffers"
		baseOnly  = "In each panel the base region is a solid magenta outline; the buffers"
		wholeOnly = "In each panel the whole raster is a dashed red outline; the buffers"
		neither   = "In each panel the buffers"
	)
	cases := []struct {
		name    string
		drop    []vocab.Kind
		want    string
		notWant []string
	}{
		{"both drawn", nil, both, nil},
		{"whole raster a duplicate", []vocab.Kind{vocab.KindWholeRaster}, baseOnly, []string{"whole raster"}},
		{"base empty", []vocab.Kind{vocab.KindBase}, wholeOnly, []string{"base region"}},
		{"neither", []vocab.Kind{vocab.KindBase, vocab.KindWholeRaster}, neither, []string{"base region", "whole raster"}},
	}
	for _, c := range cases {
		r := loadSample(t)
		for i := range r.Extents {
			// The sample's base and whole raster, of kinds named before
			// vocab's, as a run writes them now.
			switch r.Extents[i].ID {
			case "base":
				r.Extents[i].Kind = vocab.KindBase
			case "whole":
				r.Extents[i].Kind = vocab.KindWholeRaster
			}
			if slices.Contains(c.drop, r.Extents[i].Kind) {
				r.Extents[i].Status = vocab.StatusDuplicate
			}
		}
		gs := mapGroups(r)
		checkWords(t, c.name, mapCaption(r, "good", gs, gs, mapMarks{}, 0, true), []string{c.want}, c.notWant)
	}
}

// TestTableCellNoNegativeZero: a table cell rounds a tiny negative number
// to 0 without a sign, as f3 and f4 do in sentences ("-0.0000" was shown
// for a test-set shift of -1e-6 and for a difference of -3e-5).
func TestTableCellNoNegativeZero(t *testing.T) {
	cases := []struct {
		v    float64
		dec  int
		want string
	}{
		{-1e-6, 4, "0.0000"},
		{-3e-5, 3, "0.000"},
		{math.Copysign(0, -1), 2, "0.00"},
		{-0.00005, 4, "-0.0001"}, // rounds away from 0: keeps its sign
		{-0.0004, 3, "0.000"},
		{-0.0123, 3, "-0.012"},
		{0.5, 0, "0"},
		{-0.4, 0, "0"},
	}
	for _, c := range cases {
		if got := nc(c.v, c.dec); got.text != c.want || got.num != c.v {
			t.Errorf("nc(%v, %d) = %q (%v), want %q", c.v, c.dec, got.text, got.num, c.want)
		}
	}
}

// TestModelScoredNowhere: a model scored on no extent (a constant raster)
// was left out of the headline's AUC clause yet named in its partial ROC
// clause as "undetermined", as if scored, and the reply blamed the test
// records' intervals for metrics undetermined only by it. The headline
// now says it is not scored, and the reply gives that reason.
func TestModelScoredNowhere(t *testing.T) {
	r := loadSample(t)
	var sc []Score
	for _, s := range r.Scores {
		if s.Model == "truncated" {
			s.Scored = false
		}
		sc = append(sc, s)
	}
	r.Scores = sc
	var ps []Paired
	for _, p := range r.Paired {
		if p.Model != "truncated" && p.OtherModel != "truncated" {
			ps = append(ps, p)
		}
	}
	r.Paired = ps
	s := analyzed(t, r)
	if got := s.scoredNowhere(); !slices.Equal(got, []string{"truncated"}) {
		t.Fatalf("scored nowhere: %v", got)
	}
	checkWords(t, "headline", s.Headline, []string{"Model truncated is not scored on any extent (Scores table)."},
		[]string{"for truncated", "and truncated", "truncated and", ", truncated"})
	var b strings.Builder
	reviewerVerdicts(&b, s)
	checkWords(t, "reply", b.String(), []string{"the test records cannot tell (an interval straddles the tolerance, or the score is undefined or not judged on some extent, or, for truncated, no extent is scored)."}, nil)
	// The sample as it is: every model scored somewhere.
	s = analyzed(t, loadSample(t))
	if got := s.scoredNowhere(); len(got) != 0 {
		t.Errorf("scored nowhere on the sample: %v", got)
	}
	checkWords(t, "headline", s.Headline, nil, []string{"not scored on any extent"})
}

// TestDecompositionUndefinedNotUnscored: with every model scored on every
// extent and the partial ROC ratio of one undefined everywhere (its 1 − E
// crossing among tied test points, as the demo's coarse model), the
// models × extents table is empty because the score is undefined, not
// because an extent is unscored; the sentence said "no extent is scored
// for every model".
func TestDecompositionUndefinedNotUnscored(t *testing.T) {
	r := loadSample(t)
	key := MetricKeyPartialROC(r.Settings.E[0])
	for i := range r.Scores {
		if r.Scores[i].Model != "truncated" {
			continue
		}
		for j := range r.Scores[i].PartialROC {
			r.Scores[i].PartialROC[j].Defined = false
		}
	}
	s := analyzed(t, r)
	d := s.findDecomposition(key)
	if d == nil {
		t.Fatal("no decomposition of " + key)
	}
	checkWords(t, "decomposition", d.Sentence+" "+d.Note, []string{"no extent has it defined for every model, so models cannot be compared.", "no extent has the score defined for every model"},
		[]string{"scored"})
}

// TestRankingOrderNotCompared: the reply to a reviewer said "good scored
// above coarse beyond noise on 9 of 9 extents and below it on 0, so their
// order held on every extent" on a run of 10 extents, one of which (the
// reference extent, region_250km, 8 common test points) was not compared
// (seen on the demo with a base region holding no test points; its
// results.json gives extents 9, better 9 and 10 differences). When an
// extent was not compared the order held on every extent compared. The
// counts are those of that run and of the demo at --iterations 200 (13 of
// 13, 13 differences).
func TestRankingOrderNotCompared(t *testing.T) {
	cases := []struct {
		name                           string
		extents, better, worse, nDiffs int
		want                           string
	}{
		{"demo, base holding no test points", 9, 9, 0, 10, ", so their order held on every extent compared"},
		{"demo, every extent compared", 13, 13, 0, 13, ", so their order held on every extent"},
		{"worse everywhere compared, one not", 4, 0, 4, 5, ", so their order held on every extent compared"},
		{"better on some, one not compared", 9, 5, 0, 10, ", so their order did not reverse beyond noise on any extent compared"},
		{"better on some, every extent compared", 9, 5, 0, 9, ", so their order did not reverse beyond noise on any extent"},
		{"one extent compared, better there", 1, 1, 0, 1, ""},
		{"one extent compared of two", 1, 1, 0, 2, ""},
	}
	for _, c := range cases {
		rk := ModelRanking{Metric: "auc", Model: "good", Other: "coarse", Extents: c.extents, Better: c.better, Worse: c.worse, Diffs: make([]ExtentDifference, c.nDiffs)}
		if got := rankingOrderText(rk); got != c.want {
			t.Errorf("%s: %q, want %q", c.name, got, c.want)
		}
	}
}

// TestAboveNullSkillNotShown: a model read above the null beyond noise is
// qualified by its own AUC against 0.5, read with its own 95% interval
// from the placements on the common test points: at or below 0.5 (point
// estimate), not shown above 0.5 (the interval reaches it), or above it
// (no qualifier). Before, only a point AUC at or below 0.5 was qualified,
// and a model of AUC 0.52 whose interval held 0.5 read "above" with no
// word on skill. The sample's 21 test points on base get the placements
// below; intervals from SciPy (scipy.stats.t.ppf(0.975, 20) = 2.0860,
// numpy's sample SD / sqrt(21)): 0.374 to 0.666, 0.515 to 0.525.
func TestAboveNullSkillNotShown(t *testing.T) {
	spread := func(mid, half float64) []float64 {
		v := []float64{mid}
		for range 10 {
			v = append(v, mid-half, mid+half)
		}
		return v
	}
	cases := []struct {
		name       string
		placements []float64
		vs         string
		want       []string
		notWant    []string
	}{
		{"AUC 0.52, interval holds 0.5", spread(0.52, 0.32), VsRandomNotShown,
			[]string{"its own AUC, 0.520, is not above 0.5, that of a random ranking, beyond noise (its 95% interval 0.374 to 0.666 reaches it), so being above the null is no sign of skill",
				"(model not shown above 0.5, random: no sign of skill)"},
			[]string{"at or below 0.5"}},
		{"AUC 0.52, interval above 0.5", spread(0.52, 0.01), VsRandomAbove, nil,
			[]string{"no sign of skill", "not shown"}},
		{"AUC 0.45", spread(0.45, 0.32), VsRandomAtOrBelow,
			[]string{"its own AUC, 0.450, is at or below 0.5, that of a random ranking", "(model at or below 0.5, random: no sign of skill)"},
			[]string{"not shown", "beyond noise (its 95%"}},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			r := withNull(t)
			mean := 0.0
			for _, v := range c.placements {
				mean += v / float64(len(c.placements))
			}
			for i := range r.Scores {
				if sc := &r.Scores[i]; sc.Model == "good" && sc.Extent == "base" {
					if len(sc.Placements) != len(c.placements) {
						t.Fatalf("the sample holds %d test points on base, the case %d", len(sc.Placements), len(c.placements))
					}
					sc.Placements, sc.AUC = c.placements, mean
				}
			}
			r.Paired = append(r.Paired, nullPaired(r)...)
			setPaired(r, "auc", PairedKindNull, "good", "base", func(p *Paired) {
				p.A, p.B, p.Diff, p.Low, p.High = mean, mean-0.12, 0.12, Float(0.05), Float(0.19)
			})
			s := analyzed(t, r)
			var an *AboveNull
			for i := range s.AboveNull {
				if s.AboveNull[i].Metric == "auc" && s.AboveNull[i].Model == "good" {
					an = &s.AboveNull[i]
				}
			}
			if an == nil {
				t.Fatal("no AUC comparison of good with the null")
			}
			g := an.gap("base")
			if g.Reading != ReadingAbove || g.ModelVsRandom != c.vs {
				t.Fatalf("reading %s, model against random %q; want above and %q", g.Reading, g.ModelVsRandom, c.vs)
			}
			all := strings.Join([]string{an.Sentence, s.Headline, readingWords(MetricAUC, g)}, " | ")
			checkWords(t, "sentence, headline and table", all, c.want, c.notWant)
			reply := reviewerNullText(s)
			switch c.vs {
			case VsRandomNotShown:
				checkWords(t, "reply", reply, []string{"AUC 0.520, 95% interval 0.374 to 0.666) is above that of distance_null beyond noise but not above 0.5, that of a random ranking, beyond noise"}, []string{"worse still"})
			case VsRandomAtOrBelow:
				checkWords(t, "reply", reply, []string{"at or below 0.5, that of a random ranking, so on that extent this shows only"}, []string{"not above 0.5"})
			default:
				checkWords(t, "reply", reply, []string{"is above that of distance_null beyond noise."}, []string{"random ranking"})
			}
		})
	}
}

// TestNoSkillPartialROCAndCounts: the model's own partial ROC ratio is
// read against 1 by its area-random p-value (PartialROC.PRandom) when that
// was computed on the common test points (above below 0.025, else not
// shown above), else by the point estimate, which the sentence then says;
// never by its published bootstrap's interval, which is no calibrated
// test against 1 (PublishedPSize, metrics' TestPublishedBootstrapSize; it
// was used until 2026-12-05); a results file that holds an interval
// reading still renders it, naming the ratio without "its own the"
// (written before); and the headline's counts, used past 6 pairs, say
// how many of the pairs above show no skill. p-values, intervals and
// counts are hand-made.
func TestNoSkillPartialROCAndCounts(t *testing.T) {
	r := &Results{Models: []Model{{Name: "m"}, {Name: DistanceNullName, Role: RoleNull, NullKind: NullDistance}}}
	for _, name := range []string{"m", DistanceNullName} {
		r.Scores = append(r.Scores, Score{Model: name, Extent: "base", Scored: true, TestPoints: 40, TestPointIDs: make([]int, 40),
			PartialROC: []PartialROC{{E: 0.05, Defined: true, Ratio: 1.05, CILow: 1.01, CIHigh: 1.2, Iterations: 500, ResampleSize: 20}}})
	}
	a := newAnalysis(r)
	key := MetricKeyPartialROC(0.05)
	cases := []struct {
		name    string
		common  int
		pRandom float64
		value   float64
		want    string
	}{
		{"p below 0.025", 40, 0.01, 1.05, VsRandomAbove},
		{"p of 0.3", 40, 0.3, 1.05, VsRandomNotShown},
		{"p computed on other test points", 39, 0.01, 1.05, VsRandomPointAbove},
		{"no p (a bootstrap wholly above 1 is not read)", 40, 0, 1.05, VsRandomPointAbove},
		{"at or below 1", 40, 0.01, 0.95, VsRandomAtOrBelow},
		// From 39 draws the p, at least 1/40, is not read.
		{"p from too few draws", 40, 0.025, 1.05, VsRandomPointAbove},
	}
	for _, c := range cases {
		formed := 200
		if c.name == "p from too few draws" {
			formed = 39
		}
		r.Scores[0].PartialROC[0].PRandom, r.Scores[0].PartialROC[0].RandomFormed = c.pRandom, formed
		g := NullGap{Extent: "base", Defined: true, CommonPoints: c.common, ModelValue: c.value, Reading: ReadingAbove}
		a.setModelVsRandom(MetricPartialROC, key, "m", DistanceNullName, &g)
		wantP := 0.0
		if c.want == VsRandomAbove || c.want == VsRandomNotShown {
			wantP = c.pRandom
		}
		if g.ModelVsRandom != c.want || g.ModelP != wantP || g.ModelLow != 0 || g.ModelHigh != 0 {
			t.Errorf("%s: %q (p %g, interval %g to %g), want %q (p %g, no interval)", c.name, g.ModelVsRandom, g.ModelP, g.ModelLow, g.ModelHigh, c.want, wantP)
		}
	}
	m := MetricInfo{Key: key, Kind: MetricPartialROC, E: 0.05}
	an := AboveNull{Metric: key, Model: "m", Null: DistanceNullName, BaseExtent: "base", BaseReading: ReadingAbove, Defined: 1, Above: 1,
		Gaps: []NullGap{{Extent: "base", Defined: true, CommonPoints: 39, ModelValue: 1.05, NullValue: 0.9, Diff: 0.15, Low: 0.05, High: 0.25, Reading: ReadingAbove, ModelVsRandom: VsRandomPointAbove}}}
	checkWords(t, "point estimate", aboveNullSentence(r, m, &an),
		[]string{"; its own partial ROC ratio at E = 0.05, 1.050, is above 1, that of a random ranking, on the point estimate only (no interval: no area-random p on these test points)."}, []string{"no sign of skill"})
	an.Gaps[0].ModelVsRandom, an.Gaps[0].ModelP = VsRandomNotShown, 0.3
	checkWords(t, "not shown by p", aboveNullSentence(r, m, &an),
		[]string{"; but its own partial ROC ratio at E = 0.05, 1.050, is not above 1, that of a random ranking, beyond noise (one-sided p = 0.300 against test points drawn at random over the extent, our cut-off 0.025)"}, nil)
	an.Gaps[0].ModelP = 0
	an.Gaps[0].ModelVsRandom, an.Gaps[0].ModelLow, an.Gaps[0].ModelHigh = VsRandomNotShown, 0.98, 1.2
	checkWords(t, "not shown", aboveNullSentence(r, m, &an),
		[]string{"; but its own partial ROC ratio at E = 0.05, 1.050, is not above 1, that of a random ranking, beyond noise (its 95% interval 0.980 to 1.200 reaches it)"}, []string{"its own the"})
	// Counts past maxHeadlinePairs: 7 pairs, 3 above, of them one at or
	// below 0.5 and one not shown above it.
	var gaps []baseGap
	for i, vs := range []string{VsRandomAbove, VsRandomAtOrBelow, VsRandomNotShown, "", "", "", ""} {
		reading := ReadingNotAbove
		if vs != "" {
			reading = ReadingAbove
		}
		// Within noise: an interval around 0, not 0 itself (the same).
		g := &NullGap{Extent: "base", Defined: true, ModelValue: 0.6, Diff: 0.01, SE: 0.03, Low: -0.05, High: 0.07, Reading: reading, ModelVsRandom: vs}
		gaps = append(gaps, baseGap{&AboveNull{Model: fmt.Sprint("m", i), BaseExtent: "base", BaseReading: reading}, g})
	}
	checkWords(t, "counts", aboveNullCounts(gaps),
		[]string{"the model is above the null beyond noise (AUC) in 3 (in 2 of them the model itself is at or below 0.5, random, or not shown above it: no sign of skill), within noise in 4 and below in 0"}, nil)
}

// TestMethodsLeftOutCounts: the methods paragraph's "family of N" and the
// extents it leaves out agree with the count scored. An extent of the
// family on which no model could be scored is one of the N, and the text
// says how many remain; an empty or duplicate extent was built but is not
// one of the N. The sample (8 extents scored, one empty, one duplicate)
// read "a family of 8 ... Left out: ecoregions_min5 (...) and points_b400
// (...)", which a reader takes for 6 scored when 8 were. Counts worked by
// hand from the sample's extents.
func TestMethodsLeftOutCounts(t *testing.T) {
	cases := []struct {
		name          string
		build         func(r *Results)
		want, notWant []string
	}{
		{name: "an empty and a duplicate extent are not of the family",
			want:    []string{"on a family of 8 evaluation extents", "Also built but not among the 8: ecoregions_min5 (the extent has no valid cells) and points_b400 (same cells as whole).", "on 8 evaluation extents (the base extent and 7 others)"},
			notWant: []string{"Left out"}},
		{name: "an extent no model could be scored on is one of the family",
			build: func(r *Results) {
				for i := range r.Scores {
					if r.Scores[i].Extent == "points_b100" {
						r.Scores[i].Scored, r.Scores[i].NotScored = false, "no test points inside this extent"
					}
				}
			},
			want: []string{"on a family of 8 evaluation extents", "Left out of the 8: points_b100 (no model could be scored), so 7 were scored.", "Also built but not among the 8: ecoregions_min5",
				"on 7 evaluation extents (the base extent and 6 others)"}},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			r := loadSample(t)
			if c.build != nil {
				c.build(r)
			}
			analyzed(t, r)
			checkWords(t, "methods", methodsText(r), c.want, c.notWant)
		})
	}
}

// TestPublishedPCaution: the methods text and the report's partial ROC
// table, which give the published bootstrap's interval and P, say that
// they are no calibrated test against 1, with the size measured by
// metrics' TestPublishedBootstrapSize (PublishedPSize), so that a reader
// does not take the published P for evidence of skill, and name the
// area-random p as the test; the table gives that p, or says why not.
func TestPublishedPCaution(t *testing.T) {
	r := analyzedSample(t)
	// The sample predates the test (TestRandomTestAbsentInOldFile); a
	// note on one ratio makes it a file that holds it.
	r.Scores[1].PartialROC[0].PRandomNote = "a reason"
	checkWords(t, "methods", methodsText(r), []string{"that interval and p-value describe the published method and are no calibrated test of the ratio against 1 (on a model with no skill p fell below 0.05 in " + PublishedPSize + " in our simulation)",
		"as the test of the ratio against random we give the one-sided Monte Carlo p-value of the full-sample ratio against the ratios of as many test records drawn at random over the extent's area (200 draws; Davison & Hinkley 1997)"}, nil)
	r.Scores[0].PartialROC[0].PRandom, r.Scores[0].PartialROC[0].RandomFormed = 0.0123, 200
	r.Scores[1].PartialROC[0].PRandomNote = "a reason"
	// The methods' results count the extents where a model's ratio was
	// tested and lay above random: the sample's first score alone has a
	// p (0.0123 < 0.025), so the one extent, above (counted by hand);
	// with a second p of 0.3, 1 of 2.
	checkWords(t, "methods results", methodsText(r), []string{"and above that of as many test records drawn at random over the extent's area on the one extent where it was tested (one-sided p below 0.025, our cut-off)"}, nil)
	second := -1
	for i := range r.Scores {
		if i > 0 && r.Scores[i].Model == r.Scores[0].Model && r.Scores[i].Scored {
			second = i
			break
		}
	}
	r.Scores[second].PartialROC[0].PRandom, r.Scores[second].PartialROC[0].RandomFormed = 0.3, 200
	checkWords(t, "methods results", methodsText(r), []string{"and above that of as many test records drawn at random over the extent's area on 1 of the 2 extents where it was tested (one-sided p below 0.025, our cut-off; each extent tested on its own, not adjusted for their number)"}, nil)
	// Not above on every extent tested: the cut-off is not said as if p
	// was below it ("not above ... (one-sided p below 0.025, our cut-off)"
	// and "on 0 of the 2 extents ... (one-sided p below 0.025)" read so).
	r.Scores[0].PartialROC[0].PRandom = 0.2
	checkWords(t, "methods results, none above", methodsText(r), []string{"and above that of as many test records drawn at random over the extent's area on none of the 2 extents where it was tested (on none is the one-sided p below 0.025, our cut-off; each extent tested on its own, not adjusted for their number)"},
		[]string{"on 0 of the 2 extents"})
	r.Scores[second].PartialROC[0].RandomFormed = 39
	checkWords(t, "methods results, one not above", methodsText(r), []string{"and not above that of as many test records drawn at random over the extent's area on the one extent where it was tested (its one-sided p is not below 0.025, our cut-off)"},
		[]string{"where it was tested (one-sided p below"})
	r.Scores[0].PartialROC[0].PRandom, r.Scores[second].PartialROC[0].RandomFormed = 0.0123, 200
	// A p from fewer than 40 formed draws is not read: 1/(1+d) is not
	// below 0.025 for d < 40, so it could not tell the model above random
	// (helper audit of 2026-12-05: "on 0 of the 13 extents where it was
	// tested" at --iterations 20, every p 1/21). With 39 draws on both
	// extents: not tested, saying why; the table says "not read".
	r.Scores[0].PartialROC[0].RandomFormed, r.Scores[second].PartialROC[0].RandomFormed = 39, 20
	checkWords(t, "methods results, too few draws", methodsText(r), []string{"and it was not tested against that of as many test records drawn at random over the extent's area: at most 39 draws formed a ratio on an extent, fewer than the 40 (our cut-off) from which a p-value can fall below 0.025"}, []string{"extents where it was tested", "extent where it was tested"})
	_, fewPage := writtenPage(t, r)
	checkWords(t, "table, too few draws", fewPage, []string{"not read: 39 draws formed a ratio, fewer than 40 (our cut-off)"}, nil)
	r.Scores[0].PartialROC[0].RandomFormed = 200
	r.Scores[second].PartialROC[0].PRandom = 0
	_, page := writtenPage(t, r)
	checkWords(t, "table", page, []string{">0.012<", "not computed: a reason"}, nil)
	checkWords(t, "report page", page, []string{"It is no calibrated test: on a model with no skill it falls below 0.05 in " + PublishedPSize}, nil)
}

// TestRandomTestAbsentInOldFile: a results.json written before areasweep
// computed the area-random test (no partial ROC entry has p_random or
// p_random_note, as the sample's) has no such test to report, so neither
// the methods text nor the report's partial ROC table says one is given
// (they said "we give the one-sided Monte Carlo p-value" over a column of
// dashes); they say the file holds none and how to get it. With one p,
// the test is described again.
func TestRandomTestAbsentInOldFile(t *testing.T) {
	r := analyzedSample(t)
	given := []string{"as the test of the ratio against random we give the one-sided Monte Carlo p-value"}
	tableGiven := []string{"The last column is a calibrated test"}
	none := "this results.json holds no test of the ratio against random (it was written before areasweep computed one; rerun areasweep run to get it)"
	checkWords(t, "methods, old file", methodsText(r), []string{none}, given)
	_, page := writtenPage(t, r)
	checkWords(t, "table note, old file", page, []string{"The last column is empty: " + none}, tableGiven)
	r.Scores[0].PartialROC[0].PRandomNote = "a reason"
	checkWords(t, "methods, new file", methodsText(r), given, []string{none})
	_, page = writtenPage(t, r)
	checkWords(t, "table note, new file", page, tableGiven, []string{none})
}

// TestDescribedSomeTooFew: a described score whose differences rest in
// part on too few common test points says how many of how many: "for rev
// 0 of 7 (...; 1 of them on too few ...)" left "them" naming nothing
// (sentence audit of 2026-12-05).
func TestDescribedSomeTooFew(t *testing.T) {
	mv := ModelVerdict{Model: "rev", Tolerance: 0.05, baseScored: true, BaseDefined: true, Largest: 0,
		Diffs: []ExtentDifference{
			{Extent: "a", Defined: true, Diff: -0.01, CommonPoints: 40, Position: positionNotCalibrated},
			{Extent: "b", Defined: true, Diff: 0.004, CommonPoints: 20, Position: positionTooFew},
			{Extent: "c", Defined: true, Diff: 0.002, CommonPoints: 40, Position: positionNotCalibrated},
		}}
	parts, _, _ := describedModels("base", []ModelVerdict{mv})
	if len(parts) != 1 {
		t.Fatalf("parts %q", parts)
	}
	checkWords(t, "described", parts[0], []string{"for rev 0 of 3 differences from base lie beyond ±0.05 (the largest -0.010 on a; 1 of the 3 differences on too few common test points to be read)"}, []string{"of them"})
}

// TestOneExtentHeadlineSaysWhy: with one extent scored, the headline says
// why the others are not (duplicates of it here) and names a model
// scored nowhere; "could be scored" alone read as a failure, and the
// constant model was dropped without a word (sentence audit of
// 2026-12-05).
func TestOneExtentHeadlineSaysWhy(t *testing.T) {
	r := loadSample(t)
	onlyExtents(r, "base")
	for i := range r.Extents {
		if r.Extents[i].ID != "base" {
			r.Extents[i].Status, r.Extents[i].DuplicateOf = vocab.StatusDuplicate, "base"
		}
	}
	for i := range r.Scores {
		if r.Scores[i].Model == "broad" {
			r.Scores[i].Scored, r.Scores[i].NotScored = false, "model has one value on every cell with data"
		}
	}
	s := analyzed(t, r)
	checkWords(t, "headline", s.Headline, []string{"could be scored (the other 9 extents: region_b50, region_b100, region_b200 and 6 more: the same cells as base), so no score",
		"; broad is not scored: model has one value on every cell with data."}, []string{"broad 0."})
	// Nothing to compare: no verdict word.
	if mv := s.findModelVerdict("auc", "good"); mv == nil || verdictPhrase(mv) != "not compared across extents (scored on base only)" {
		t.Errorf("AUC of good with one extent: %+v", mv)
	}
	for _, v := range s.Verdicts {
		if v.Metric == "auc" {
			checkWords(t, "AUC verdict", v.Sentence, []string{"AUC: no difference from the base extent could be formed for any model (each model's sentence says why)."}, []string{"undetermined for"})
		}
	}
}
