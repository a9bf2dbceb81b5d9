package main

import (
	"path/filepath"
	"testing"

	"areasweep/report"
)

// TestModelFlatOnTheBase: a model with one value on every cell of the base
// region (and varying outside it) is not scored on the base extent (it
// ranks nothing there), while the distance-only null is. The report then
// takes its differences from the first extent a model is scored on, and
// the run must form them from that extent too: it took them from the base
// extent (where only the null was scored), so the report found none and
// called the model's AUC undetermined, "no difference could be formed",
// on a run where the model is scored on every extent but the base and
// the shrunk one. Found by an adversarial run of odd models.
func TestModelFlatOnTheBase(t *testing.T) {
	s := newSmallStudy(t)
	f := &badFixture{smallStudy: s}
	// The region is 12.5..18.5 E, 41.5..46.5 N: every cell whose centre
	// lies inside holds 0.5.
	flat := f.rasterWith(t, "flat.tif", s.gt, wgs84WKT, func(i int) float64 {
		r, c := i/s.w, i%s.w
		lon, lat := s.gt[0]+(float64(c)+0.5)*s.gt[1], s.gt[3]+(float64(r)+0.5)*s.gt[5]
		if lon > 12.5 && lon < 18.5 && lat > 41.5 && lat < 46.5 {
			return 0.5
		}
		return s.vals[i]
	})
	out := filepath.Join(t.TempDir(), "out")
	smallRunScores(t, out, "--model", "flat="+flat, "--occurrences", s.occ, "--region", s.region)
	res := loadResults(t, out)

	scoredOn := map[string]bool{}
	for _, sc := range res.Scores {
		if sc.Model == "flat" && sc.Scored {
			scoredOn[sc.Extent] = true
		}
	}
	if scoredOn["base"] || len(scoredOn) < 2 {
		t.Fatalf("the test needs flat unscored on base and scored on 2 or more extents; scored on %v", scoredOn)
	}
	ref := res.Sensitivity.BaseExtent
	if ref == "base" || !scoredOn[ref] {
		t.Fatalf("the report's reference is %q; want the first extent flat is scored on", ref)
	}
	n := 0
	for _, p := range res.Paired {
		if p.Kind != report.PairedKindExtent || p.Metric != "auc" {
			continue
		}
		if p.OtherExtent != ref {
			t.Errorf("%s on %s: AUC difference taken from %s, the report's reference is %s", p.Model, p.Extent, p.OtherExtent, ref)
		}
		if p.Model == "flat" {
			n++
		}
	}
	if want := len(scoredOn) - 1; n != want {
		t.Errorf("flat has %d AUC differences between extents, want %d (one per other extent it is scored on)", n, want)
	}
	for _, mv := range res.Sensitivity.ModelVerdicts {
		if mv.Model == "flat" && mv.Metric == "auc" && mv.Largest < 0 {
			t.Errorf("flat's AUC verdict rests on no difference: %s", mv.Sentence)
		}
	}
}
