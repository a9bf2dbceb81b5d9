package report

import (
	"fmt"
	"math"
	"regexp"
	"strings"
	"testing"
)

// The partial ROC ratio's differences between extents are described, not
// judged (partialROCExtentCoverage). These tests hold the methods text,
// the reply to a reviewer and the headline to that: no tolerance listed
// among those the verdicts judge against, the description's numbers given
// where the text says it gives them, and a reason where no model has a
// difference to describe.

// judgedList returns the parenthesis of tolerances after marker in text
// ("a tolerance we chose (" or "tolerances we chose ("), "" when absent.
func judgedList(text, marker string) string {
	i := strings.Index(text, marker)
	if i < 0 {
		return ""
	}
	rest := text[i+len(marker):]
	if j := strings.Index(rest, ")"); j >= 0 {
		return rest[:j]
	}
	return rest
}

// TestToleranceListsJudgedOnly: the methods text said "We call a score
// robust ... within a tolerance we chose (AUC ±0.02, partial ROC ratio
// ±0.05, ...)" and the reply "judged the differences against tolerances
// we chose (AUC ±0.02, partial ROC ratio ±0.05, ...)" while no partial ROC
// difference between extents is judged. Its tolerance is now named only
// in the sentence that says it is described, with whose choice it is; a
// tolerance of the ratio set for the run leaves the defaults note of the
// judged ones standing.
func TestToleranceListsJudgedOnly(t *testing.T) {
	for _, c := range []struct {
		name     string
		tolPROC  float64
		tolWords string
	}{
		{"defaults", DefaultTolerancePartialROC, "we say only how many exceed our tolerance of ±0.05."},
		{"partial ROC tolerance set", 0.1, "we say only how many exceed the tolerance of ±0.1 set for this run."},
	} {
		t.Run(c.name, func(t *testing.T) {
			r := loadSample(t)
			r.Settings.TolerancePartialROC = c.tolPROC
			analyzed(t, r)
			text := methodsText(r)
			for _, marker := range []string{"within a tolerance we chose (", "judged the differences against tolerances we chose ("} {
				list := judgedList(text, marker)
				if list == "" {
					t.Fatalf("no %q in the methods text", marker)
				}
				if strings.Contains(list, "partial ROC") {
					t.Errorf("%s%s): lists the partial ROC ratio, whose differences between extents are not judged", marker, list)
				}
				if !strings.Contains(list, "AUC ±0.02") || !strings.Contains(list, "areasweep's defaults, not a published standard") {
					t.Errorf("%s%s): the judged tolerances or their defaults note missing", marker, list)
				}
			}
			checkWords(t, "methods", text, []string{"The partial ROC ratio's differences between extents were described, not judged", c.tolWords,
				"we say only how many exceed our tolerance of ±0.1."}, nil)
		})
	}
}

// TestReplyGivesDescriptions: the reply said the partial ROC ratio's
// and the Boyce index's differences were described "and we say only how
// many exceed" the tolerance, and gave no number of either (the Boyce
// index's found by the audit of 2026-12-05). It now gives, for each
// described metric (the ratio at the first E), each model's count beyond
// the tolerance and its largest difference, read here from the
// sensitivity analysis, without a verdict word or an interval.
func TestReplyGivesDescriptions(t *testing.T) {
	r := liftResampled(loadSample(t))
	s := analyzed(t, r)
	reply := reviewerText(r)
	if !strings.Contains(reply, "we say only how many exceed") {
		t.Fatalf("the reply does not promise the counts; the test needs it to: %s", reply)
	}
	for _, c := range []struct{ key, opening string }{
		{MetricKeyPartialROC(r.Settings.E[0]), "The partial ROC ratio at E = 0.05, described only: "},
		{MetricKeyBoyce, "The Boyce index, described only: "},
	} {
		i := strings.Index(reply, c.opening)
		if i < 0 {
			t.Errorf("the reply gives no description of %s: %s", c.key, reply)
			continue
		}
		sentence := reply[i:]
		sentence = sentence[:strings.Index(sentence, ". ")+1]
		described := 0
		for _, mv := range s.ModelVerdicts {
			if mv.Metric != c.key || mv.Largest < 0 {
				continue
			}
			described++
			defined, beyond := beyondTolerance(mv)
			big := mv.Diffs[mv.Largest]
			largest := fmt.Sprintf(`the largest %s on %s`, regexp.QuoteMeta(signedSmall(big.Diff)), regexp.QuoteMeta(big.Extent))
			if big.Diff == 0 {
				largest = "every one 0"
			}
			want := regexp.MustCompile(fmt.Sprintf(`for %s %d of %d( differences from base lie beyond ±%s)? \(%s\)`,
				regexp.QuoteMeta(mv.Model), beyond, defined, regexp.QuoteMeta(fmtG(mv.Tolerance)), largest))
			if !want.MatchString(sentence) {
				t.Errorf("%s of %s: %q not in %s", c.key, mv.Model, want, sentence)
			}
		}
		if described < 2 {
			t.Errorf("%s: %d models described: the test wants several", c.key, described)
		}
		checkWords(t, "reply's sentence on "+c.key, sentence, nil, []string{"robust", "extent-sensitive", "undetermined", "beyond noise", "95% interval"})
	}
}

// beyondTolerance counts mv's defined differences from the base extent
// and those of them beyond its tolerance, as a description gives them.
func beyondTolerance(mv ModelVerdict) (defined, beyond int) {
	for _, d := range mv.Diffs {
		if d.Defined {
			defined++
			if math.Abs(d.Diff) > mv.Tolerance {
				beyond++
			}
		}
	}
	return defined, beyond
}

// TestHeadlinePartialROCUndefinedOnBase: with the ratio at the first E
// undefined on the base extent for every model, the headline said "The
// partial ROC ratio at E = 0.05 is undetermined for good, truncated and
// broad", a verdict word with no reason (seen with the demo's coarse model
// alone). It now says why no difference is described, as it does where
// some model has one, and the reply says the same.
func TestHeadlinePartialROCUndefinedOnBase(t *testing.T) {
	r := liftResampled(loadSample(t))
	e := r.Settings.E[0]
	key := MetricKeyPartialROC(e)
	for i := range r.Scores {
		if sc := &r.Scores[i]; sc.Extent == "base" {
			for j := range sc.PartialROC {
				if math.Abs(sc.PartialROC[j].E-e) < 1e-12 {
					sc.PartialROC[j].Defined = false
				}
			}
		}
	}
	for i := range r.Paired {
		if p := &r.Paired[i]; p.Metric == key && (p.Extent == "base" || p.OtherExtent == "base") {
			p.Defined = false
		}
	}
	s := analyzed(t, r)
	for _, m := range s.ModelNames {
		if mv := s.findModelVerdict(key, m); mv == nil || mv.Largest >= 0 || mv.BaseDefined {
			t.Fatalf("%s: the ratio is not undefined on base: %+v", m, mv)
		}
	}
	want := "The partial ROC ratio at E = 0.05 is undefined on base for " + joinList(s.ModelNames) + ", so no difference from it is formed."
	checkWords(t, "headline", s.Headline, []string{want}, []string{"partial ROC ratio at E = 0.05 is undetermined"})
	checkWords(t, "reply", reviewerText(r), []string{want}, nil)
}

// TestPartialROCCoverageMeasuredAtE: the coverage quoted for the partial
// ROC ratio's differences between extents (partialROCExtentCoverage) is
// the one measured at the ratio's own E (metrics.TestPairedIntervalCoverage
// runs E = 0.01, 0.05, 0.1 and 0.2): once every E quoted the range of E =
// 0.05, then said it was measured there only. At an E never simulated the
// clause gives the range over the measured ones and says so.
func TestPartialROCCoverageMeasuredAtE(t *testing.T) {
	r := liftResampled(loadSample(t))
	s := analyzed(t, r)
	// The ranges of metrics/coverage_test.go's table (its covExpect floors
	// at 10 to 500 points), rounded to whole percents.
	cover := map[string]string{MetricKeyPartialROC(0.05): "38% to 91% in our simulation check", MetricKeyPartialROC(0.1): "58% to 93% in our simulation check"}
	seen := map[string]bool{}
	for _, mv := range s.ModelVerdicts {
		if !isPartialROCKey(mv.Metric) || mv.Largest < 0 {
			continue
		}
		seen[mv.Metric] = true
		if !strings.Contains(mv.Sentence, "coverage: "+cover[mv.Metric]+")") {
			t.Errorf("%s of %s: %s", mv.Metric, mv.Model, mv.Sentence)
		}
		for _, d := range mv.Diffs {
			if d.Position == positionNotCalibrated && !strings.HasSuffix(d.NotJudged, cover[mv.Metric]) {
				t.Errorf("%s of %s on %s: reason %q", mv.Metric, mv.Model, d.Extent, d.NotJudged)
			}
		}
	}
	if !seen[MetricKeyPartialROC(0.05)] || !seen[MetricKeyPartialROC(0.1)] {
		t.Fatalf("the sample's ratios described: %v; the test wants E = 0.05 and 0.1", seen)
	}
	for i := range r.Paired {
		p := &r.Paired[i]
		if isPartialROCKey(p.Metric) && p.notJudgedKind() == positionNotCalibrated && !strings.HasSuffix(p.NotJudgedReason(), cover[p.Metric]) {
			t.Errorf("paired %s %s %s: %q", p.Metric, p.Model, p.Extent, p.NotJudgedReason())
		}
	}
	checkWords(t, "methods", methodsText(r), []string{"between nested extents (38% to 91% at E = 0.05 and 58% to 93% at E = 0.1 in our simulation check;"}, nil)
	for _, c := range []struct {
		es   []float64
		key  string
		want string
	}{
		{[]float64{0.01}, MetricKeyPartialROC(0.01), "9% to 84% in our simulation check"},
		{[]float64{0.2, 0.05}, MetricKeyPartialROC(0.2), "51% to 78% at E = 0.2 and 38% to 91% at E = 0.05 in our simulation check"},
		{[]float64{0.3}, MetricKeyPartialROC(0.3), "9% to 93% in our simulation check at E = 0.01, 0.05, 0.1 and 0.2, not run at E = 0.3"},
		{[]float64{0.05, 0.025}, MetricKeyPartialROC(0.025), "9% to 93% in our simulation check at E = 0.01, 0.05, 0.1 and 0.2, not run at E = 0.025"},
	} {
		if got := partialROCCoverageRun(c.es); got != c.want {
			t.Errorf("methods at E %v: %q, want %q", c.es, got, c.want)
		}
		if len(c.es) == 1 {
			if got := PartialROCCoverageClause(c.key); got != c.want {
				t.Errorf("%s: %q, want %q", c.key, got, c.want)
			}
		}
	}
}

// TestTermsVerdictsSayDescribed: the page's Terms defined "robust,
// extent-sensitive, undetermined" as verdicts on how a score moves, with
// nothing to say that the partial ROC ratio's differences between extents
// (and the Boyce index's) get none of them, so a reader of a described
// ratio's "undetermined" badge looked it up and found a verdict.
func TestTermsVerdictsSayDescribed(t *testing.T) {
	r := analyzedSample(t)
	page, err := htmlPage(r, nil, methodsDoc{})
	if err != nil {
		t.Fatal(err)
	}
	text := string(page)
	i := strings.Index(text, "<dt>robust, extent-sensitive, undetermined</dt>")
	if i < 0 {
		t.Fatal("no Terms entry for the verdicts")
	}
	entry := text[i:]
	entry = entry[:strings.Index(entry, "</dd>")]
	checkWords(t, "Terms entry", entry, []string{"The partial ROC ratio&#39;s differences between extents and the Boyce index&#39;s get none of these: they are described"}, nil)
}
