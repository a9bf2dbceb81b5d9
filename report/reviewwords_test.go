package report

import "testing"

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
