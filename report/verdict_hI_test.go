package report

import "testing"

// TestSensitiveVerdictCitesJudged: an extent-sensitive verdict rests on
// the differences judged against the tolerance; it named as "the largest"
// a difference on too few common test points (not judged), which the
// sentence then seemed to count among those beyond the tolerance (HI's
// sweep: 10 test points, one extent holding 9). The differences are those
// of the sample run (results.json of testdata/report): good's AUC on
// whole, +0.138 (0.067 to 0.209), is the largest of the judged ones.
func TestSensitiveVerdictCitesJudged(t *testing.T) {
	r := loadSample(t)
	if setPaired(r, "auc", PairedKindExtent, "good", "points_b25", func(p *Paired) {
		p.CommonPoints = 6
		p.Diff, p.Low, p.High = -0.3, -0.35, -0.25
	}) != 1 {
		t.Fatal("no record of good on points_b25")
	}
	s := analyzed(t, r)
	mv := s.findModelVerdict("auc", "good")
	if mv.Verdict != JudgementSensitive {
		t.Fatalf("verdict %s: %s", mv.Verdict, mv.Sentence)
	}
	if mv.Largest < 0 || mv.Diffs[mv.Largest].Extent != "whole" {
		t.Errorf("largest %d: %+v", mv.Largest, mv.Diffs)
	}
	checkWords(t, "sentence", mv.Sentence,
		[]string{"the largest is +0.138 on whole (95% interval +0.067 to +0.209)", "Not judged, on fewer than 10 common test points (our cut-off): points_b25 (6)."},
		[]string{"the largest is -0.300"})
	checkWords(t, "headline", s.Headline,
		[]string{"is extent-sensitive (largest difference from base +0.138 on whole, 95% interval +0.067 to +0.209)"},
		[]string{"-0.300 on points_b25"})
	checkWords(t, "methods", methodsText(r), []string{"extent-sensitive (largest difference from base +0.138 on whole"}, []string{"-0.300 on points_b25"})
}
