package report

import (
	"fmt"
	"strings"
	"testing"

	"areasweep/extent/vocab"
)

// TestAboveNullReadings feeds model-minus-null paired records with chosen
// intervals to Analyze and checks the readings against 0 (wholly above,
// including 0, wholly below), the counts, the smallest and largest extents
// by area, the base sentence and headline, the page's table and the
// figure; and that a record of an unknown kind or a partial ROC record
// does not enter the AUC summary.
func TestAboveNullReadings(t *testing.T) {
	r := withNull(t)
	model := r.Models[0].Name
	var ok []Extent
	for _, e := range r.Extents {
		if e.Status == vocab.StatusOK {
			ok = append(ok, e)
		}
	}
	if len(ok) < 3 {
		t.Fatalf("sample has %d usable extents", len(ok))
	}
	base := BaseExtent(func() []string {
		var ids []string
		for _, e := range ok {
			ids = append(ids, e.ID)
		}
		return ids
	}())
	want := map[string]string{}
	below := 0
	for i, e := range ok {
		p := Paired{Metric: "auc", Kind: PairedKindNull, Model: model, Extent: e.ID, OtherModel: DistanceNullName, OtherExtent: e.ID,
			CommonPoints: 10, Method: "placements", Defined: true, A: 0.8, B: 0.7}
		switch {
		case e.ID == base:
			p.Diff, p.SE, p.Low, p.High = 0.1, Float(0.02), Float(0.06), Float(0.14)
			want[e.ID] = ReadingAbove
		case i%2 == 0:
			p.Diff, p.SE, p.Low, p.High = 0.01, Float(0.02), Float(-0.03), Float(0.05)
			want[e.ID] = ReadingNotAbove
		default:
			p.Diff, p.SE, p.Low, p.High = -0.1, Float(0.02), Float(-0.14), Float(-0.06)
			want[e.ID] = ReadingBelow
			below++
		}
		r.Paired = append(r.Paired, p)
	}
	if err := Analyze(r); err != nil {
		t.Fatal(err)
	}
	var an *AboveNull
	for i := range r.Sensitivity.AboveNull {
		if a := &r.Sensitivity.AboveNull[i]; a.Metric == "auc" && a.Model == model {
			an = a
		}
	}
	if an == nil {
		t.Fatalf("no AUC summary: %+v", r.Sensitivity.AboveNull)
	}
	if an.BaseReading != ReadingAbove || an.Defined != len(ok) || an.Below != below || an.Above != 1 || an.NotAbove != len(ok)-1-below {
		t.Errorf("summary %+v", an)
	}
	small, large := ok[0], ok[0]
	for _, e := range ok {
		if e.AreaKm2 < small.AreaKm2 {
			small = e
		}
		if e.AreaKm2 > large.AreaKm2 {
			large = e
		}
	}
	if an.SmallestExtent != small.ID || an.LargestExtent != large.ID {
		t.Errorf("smallest %s largest %s, want %s and %s", an.SmallestExtent, an.LargestExtent, small.ID, large.ID)
	}
	for _, g := range an.Gaps {
		if g.Reading != want[g.Extent] {
			t.Errorf("%s: reading %s, want %s", g.Extent, g.Reading, want[g.Extent])
		}
	}
	// "beyond noise", as the headline and the "below" sentence say it.
	if !strings.Contains(an.Sentence, "On "+base+", AUC of "+model+" is above "+DistanceNullName+" (distance-only null) beyond noise: +0.100") {
		t.Errorf("sentence: %s", an.Sentence)
	}
	if !strings.Contains(r.Sensitivity.Headline, model+" is above "+DistanceNullName+" beyond noise on "+base) {
		t.Errorf("headline: %s", r.Sensitivity.Headline)
	}
	if rv := reviewerText(r); !strings.Contains(rv, "the AUC of "+model+" (difference +0.100, 95% interval +0.060 to +0.140) is above that of "+DistanceNullName+" beyond noise") {
		t.Errorf("reviewer reply: %s", rv)
	}
	if rows := aboveNullRows(r); len(rows) != len(ok) {
		t.Errorf("table rows %d, want %d", len(rows), len(ok))
	}
	if _, rows := aboveNullSummary(r); len(rows) != len(ok) {
		t.Errorf("table rows %d, want %d", len(rows), len(ok))
	}
	found := false
	for _, f := range figures(r) {
		found = found || f.Name == "model_minus_null"
	}
	if !found {
		t.Error("no model_minus_null figure")
	}

	// A null that the model does not beat on the base extent.
	for i := range r.Paired {
		if r.Paired[i].Kind == PairedKindNull && r.Paired[i].Extent == base {
			r.Paired[i].Low = Float(-0.01)
		}
	}
	if err := Analyze(r); err != nil {
		t.Fatal(err)
	}
	if !strings.Contains(r.Sensitivity.Headline, model+" is not above "+DistanceNullName+" beyond noise on "+base) {
		t.Errorf("headline: %s", r.Sensitivity.Headline)
	}
	if rv := reviewerText(r); !strings.Contains(rv, "the AUC of "+model+" (difference +0.100, 95% interval -0.010 to +0.140) is not above that of "+DistanceNullName+" beyond noise, so on that extent AUC gives no evidence of skill") {
		t.Errorf("reviewer reply: %s", rv)
	}

	// A null the model is below beyond noise on the base extent: "does not
	// beat" or "not above" would understate it.
	for i := range r.Paired {
		if r.Paired[i].Kind == PairedKindNull && r.Paired[i].Extent == base {
			r.Paired[i].Diff, r.Paired[i].Low, r.Paired[i].High = -0.1, Float(-0.14), Float(-0.06)
		}
	}
	if err := Analyze(r); err != nil {
		t.Fatal(err)
	}
	if !strings.Contains(r.Sensitivity.Headline, model+" is below "+DistanceNullName+" beyond noise on "+base+" (AUC difference -0.100") {
		t.Errorf("headline: %s", r.Sensitivity.Headline)
	}
	if rv := reviewerText(r); !strings.Contains(rv, "the AUC of "+model+" (difference -0.100, 95% interval -0.140 to -0.060) is below that of "+DistanceNullName+" beyond noise, so on that extent the geography of the records alone ranks the test records above the background better than the model does") {
		t.Errorf("reviewer reply: %s", rv)
	}
	for _, an := range r.Sensitivity.AboveNull {
		if an.Metric == "auc" && !strings.Contains(an.Sentence, "On "+base+", AUC of "+model+" is below "+DistanceNullName+" (distance-only null) beyond noise: -0.100") {
			t.Errorf("sentence: %s", an.Sentence)
		}
	}
}

// TestHeadlineCountsManyPairs: the headline named every AUC comparison of
// two models and every model-null pair, so eight models and three nulls
// (seen in a study) gave a summary of 28 comparisons and 24 null clauses,
// thousands of words above the figures. Past maxHeadlinePairs (six, our
// choice) it counts them instead and points to the Analysis, which names
// each; up to six it names them as before.
func TestHeadlineCountsManyPairs(t *testing.T) {
	rk := func(better, worse, n int) ModelRanking {
		return ModelRanking{Metric: "auc", Model: "a", Other: "b", Better: better, Worse: worse, Extents: n}
	}
	// Counts worked by hand: two pairs differ on all 14, one on 4, one
	// on none.
	got := rankingCounts([]ModelRanking{rk(14, 0, 14), rk(10, 4, 14), rk(3, 1, 14), rk(0, 0, 14)})
	if want := "of the 4 pairs of models, 2 differ beyond noise on every extent compared, 1 on some and 1 on none (each pair under Analysis, Models compared extent by extent)"; got != want {
		t.Errorf("rankingCounts:\n got %s\nwant %s", got, want)
	}

	nullPairs := func(n int) *Sensitivity {
		s := &Sensitivity{}
		readings := []string{ReadingAbove, ReadingAbove, ReadingBelow, ReadingNotAbove, ReadingTooFew, ReadingAbove, ReadingBelow, ReadingNotAbove}
		for k := range n {
			s.AboveNull = append(s.AboveNull, AboveNull{Metric: "auc", Model: fmt.Sprint("m", k), Null: DistanceNullName, BaseExtent: "base",
				BaseReading: readings[k], Gaps: []NullGap{{Extent: "base", Defined: true, Diff: 0.05, Low: 0.01, High: 0.09}}})
		}
		return s
	}
	many := aboveNullHeadline(nullPairs(8))
	if want := " Against the nulls, on base: of the 8 pairs of a model and a null, the model is above the null beyond noise (AUC) in 3, within noise in 2 and below in 2, not told in 1"; !strings.HasPrefix(many, want) {
		t.Errorf("8 pairs:\n got %s\nwant it to start %s", many, want)
	}
	if strings.Contains(many, "m0 is above") {
		t.Errorf("8 pairs: a pair is named one by one: %s", many)
	}
	if few := aboveNullHeadline(nullPairs(6)); !strings.Contains(few, "m0 is above "+DistanceNullName+" beyond noise on base") {
		t.Errorf("6 pairs: not named one by one: %s", few)
	}
}
