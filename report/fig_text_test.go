package report

import (
	"os"
	"path/filepath"
	"strings"
	"testing"

	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
	"gonum.org/v1/plot/vg/recorder"

	"areasweep/extent/vocab"
)

// TestWrapTextBreaksLongNames: a model's name has no spaces, and a name
// wider than a panel stayed whole on one line, so the ROC panels' titles
// ran into their neighbours and off the figure's left edge (seen with
// names of 36 to 39 characters in a 3-column roc_curves.png).
func TestWrapTextBreaksLongNames(t *testing.T) {
	w := textWidth("random_forest_", titleFontPt)
	for _, s := range []string{
		"model random_forest_bioclim_soil_layers_v2",
		"null (spatially-thinned.random.background)",
		"model abcdefghijklmnopqrstuvwxyzabcdefghijklm",
		"short title",
	} {
		got := wrapText(s, titleFontPt, w)
		if strings.ReplaceAll(strings.ReplaceAll(got, "\n", ""), " ", "") != strings.ReplaceAll(s, " ", "") {
			t.Errorf("%q wrapped as %q: characters lost or added", s, got)
		}
		for _, line := range strings.Split(got, "\n") {
			if textWidth(line, titleFontPt) > w {
				t.Errorf("%q: line %q is %.1f pt wide, more than %.1f", s, line, textWidth(line, titleFontPt).Points(), w.Points())
			}
		}
	}
	if got := wrapText("AUC (cells unweighted)", titleFontPt, 200); got != "AUC (cells unweighted)" {
		t.Errorf("a title that fits was changed: %q", got)
	}
}

// TestROCLongNamesInside draws the ROC figure of the sample results with
// its models renamed to names of 37 to 42 characters and asserts that every
// horizontal text lies inside the figure and that no two overlap.
func TestROCLongNamesInside(t *testing.T) {
	b, err := os.ReadFile(filepath.Join(sampleDir, "sample_results.json"))
	if err != nil {
		t.Fatal(err)
	}
	s := string(b)
	for _, m := range []string{"good", "truncated", "broad"} {
		s = strings.ReplaceAll(s, `"`+m+`"`, `"`+m+`_model_with_a_long_descriptive_name"`)
	}
	r := analyzedJSON(t, []byte(s))
	var f *figure
	for _, g := range figures(r) {
		if g.Name == rocFigureName {
			f = &g
		}
	}
	if f == nil {
		t.Fatal("no roc figure")
	}
	rec := &recorder.Canvas{}
	if err := f.draw(draw.NewCanvas(rec, f.W, f.H)); err != nil {
		t.Fatal(err)
	}
	type box struct {
		s              string
		x0, x1, y0, y1 vg.Length
	}
	var boxes []box
	for _, a := range rec.Actions {
		fs, ok := a.(*recorder.FillString)
		if !ok || strings.HasPrefix(fs.String, "share of test") || strings.HasPrefix(fs.String, "extent area") {
			continue // y-axis titles are drawn on a rotated canvas
		}
		w := textWidth(fs.String, fs.Size.Points())
		bx := box{fs.String, fs.Point.X, fs.Point.X + w, fs.Point.Y - 0.2*fs.Size, fs.Point.Y + 0.7*fs.Size}
		if bx.x0 < 0 || bx.x1 > f.W || bx.y0 < 0 || bx.y1 > f.H {
			t.Errorf("%q runs off the %.0f x %.0f pt figure: x %.1f to %.1f", fs.String, f.W.Points(), f.H.Points(), bx.x0.Points(), bx.x1.Points())
		}
		boxes = append(boxes, bx)
	}
	for i, a := range boxes {
		for _, b := range boxes[:i] {
			if a.x0 < b.x1 && b.x0 < a.x1 && a.y0 < b.y1 && b.y0 < a.y1 {
				t.Errorf("%q overlaps %q", a.s, b.s)
			}
		}
	}
}

// TestMetricsCaptionNamesUndrawn: a model of two values has no Boyce
// index on any extent, and the Boyce panel drew the other models alone
// without a word, as if its line were hidden behind another (seen in a
// study with a 0/1 model). The caption names what each panel leaves out.
func TestMetricsCaptionNamesUndrawn(t *testing.T) {
	r := analyzedSample(t)
	if got := undrawnSentence(r); got != "" {
		t.Errorf("sample (every score drawn): %q", got)
	}
	for i := range r.Scores {
		if r.Scores[i].Model == "broad" {
			r.Scores[i].Boyce = nil
		}
	}
	if !strings.Contains(metricsCaption(r), "Undefined on every extent, so not drawn: Boyce index of broad.") {
		t.Errorf("caption lacks broad's Boyce index: %s", metricsCaption(r))
	}
	for i := range r.Scores {
		r.Scores[i].Boyce = nil
	}
	if got := undrawnSentence(r); !strings.Contains(got, "No panel (undefined for every model on every extent): Boyce index.") || strings.Contains(got, "so not drawn") {
		t.Errorf("no Boyce index at all: %q", got)
	}
}

// TestROCNoBarWithoutRamp: a family of the base region and the whole
// raster alone draws both curves in their own styles (magenta, dashed
// red), yet the ROC figure drew a colour bar of extent area, ticked at
// their areas, that keyed no curve, and the caption said the curves were
// coloured by area. Such a figure has no bar and says what its two curves
// are.
func TestROCNoBarWithoutRamp(t *testing.T) {
	r := scoredEverywhere(manyExtents(t, 10))
	var keep []Extent
	for _, e := range r.Extents {
		if e.Kind == vocab.KindBase || e.Kind == vocab.KindWholeRaster {
			keep = append(keep, e)
		}
	}
	r.Extents = keep
	analyzedSampleWith(t, r)
	f := rocFigure(r)
	rec := &recorder.Canvas{}
	if err := f.draw(draw.NewCanvas(rec, f.W, f.H)); err != nil {
		t.Fatal(err)
	}
	for _, a := range rec.Actions {
		if fs, ok := a.(*recorder.FillString); ok && strings.HasPrefix(fs.String, "extent area") {
			t.Errorf("colour bar %q drawn with no curve on the area ramp", fs.String)
		}
	}
	if strings.Contains(f.Caption, "colour bar") || !strings.Contains(f.Caption, "one curve per extent: the base region (solid magenta) and the whole raster (dashed red)") {
		t.Errorf("caption: %s", f.Caption)
	}
	// With the other extents back, the bar and its sentence return.
	r = analyzedSampleWith(t, scoredEverywhere(manyExtents(t, 10)))
	if f := rocFigure(r); !strings.Contains(f.Caption, "colour bar") {
		t.Errorf("caption of a full family lacks the colour bar: %s", f.Caption)
	}
}

// TestMetricsCaptionNamesUnscored: a constant model is scored on no
// extent, and the metrics figure's caption called each of its scores
// "Undefined on every extent" (hD's degenerate-data hunt: a constant
// model beside the distance-only null); with no model or null scored at
// all it said "No panel (undefined for every model on every extent)". A
// model scored nowhere has no score to be undefined: the caption says it
// was not scored.
func TestMetricsCaptionNamesUnscored(t *testing.T) {
	r := loadSample(t)
	constantModel(r, "broad")
	analyzed(t, r)
	got := undrawnSentence(r)
	checkWords(t, "one model constant", got, []string{"Not scored on any extent (the Scores table says why), so not drawn: broad."}, []string{"of broad", "Undefined"})
	for i := range r.Scores {
		r.Scores[i].Scored, r.Scores[i].NotScored = false, "constant suitability (minimum equals maximum on this extent)"
	}
	r.Paired, r.Rings = nil, nil
	analyzed(t, r)
	got = undrawnSentence(r)
	checkWords(t, "every model constant", got, []string{"Not scored on any extent (the Scores table says why), so not drawn: good, truncated and broad."}, []string{"Undefined", "No panel"})
}

// TestROCCaptionNamesUnscored: the ROC figure draws a panel for every
// model and null; a constant model's panel is empty (no extent scored it:
// hD's degenerate-data hunt), and the caption said nothing of it, so an
// empty panel read as curves lost in drawing. The caption names it.
func TestROCCaptionNamesUnscored(t *testing.T) {
	r := loadSample(t)
	constantModel(r, "broad")
	analyzed(t, r)
	es := r.Extents
	checkWords(t, "one model constant", rocCaption(r, es, len(es), false, rocBands([]float64{0.05})),
		[]string{"Not scored on any extent (the Scores table says why), so its panel is empty: broad."}, []string{"good.", "truncated."})
	r = loadSample(t)
	analyzed(t, r)
	checkWords(t, "sample", rocCaption(r, es, len(es), false, rocBands([]float64{0.05})), nil, []string{"Not scored on any extent"})
}

// TestMetricsCaptionFewFormedResamples: with --iterations 2 to 39 (or an
// extent where fewer than 40 resamples of the published bootstrap formed a
// ratio) the figure draws no partial ROC bar there (BootstrapReadable),
// yet the caption said "the bar spans their 2.5th to 97.5th percentiles"
// without a word of it (hD's degenerate-data hunt: --iterations 2
// --fraction 1, no bar on any extent); the methods text said so already.
func TestMetricsCaptionFewFormedResamples(t *testing.T) {
	const spans = "the bar spans their 2.5th to 97.5th percentiles"
	r := loadSample(t)
	r.Settings.Iterations = 20
	for i := range r.Scores {
		for j := range r.Scores[i].PartialROC {
			pr := &r.Scores[i].PartialROC[j]
			pr.Iterations, pr.NotFormed, pr.ResampleSize = 20, 0, MinPairedPoints
		}
	}
	analyzed(t, r)
	checkWords(t, "20 resamples", metricsCaption(r),
		[]string{"Partial ROC: the point is the mean ratio of the 20 resamples", "(the published bootstrap), with no bar: fewer than 40 resamples place no 2.5th or 97.5th percentile inside the resampled values (our cut-off); the full-sample"},
		[]string{spans})
	r = loadSample(t)
	r.Settings.Iterations = 200
	n := 0
	for i := range r.Scores {
		for j := range r.Scores[i].PartialROC {
			pr := &r.Scores[i].PartialROC[j]
			pr.Iterations, pr.NotFormed, pr.ResampleSize = 200, 0, MinPairedPoints
			if r.Scores[i].Scored && n == 0 {
				pr.NotFormed = 170 // 30 formed
				n++
			}
		}
	}
	analyzed(t, r)
	checkWords(t, "30 formed on one extent", metricsCaption(r),
		[]string{spans + " (no bar where fewer than 40 resamples formed a ratio, our cut-off)"}, nil)
}

// constantModel marks model as scored on no extent in r, as a constant
// raster is (the words the pipeline gives such a score).
func constantModel(r *Results, model string) {
	for i := range r.Scores {
		if r.Scores[i].Model == model {
			r.Scores[i].Scored, r.Scores[i].NotScored = false, "constant suitability (minimum equals maximum on this extent)"
		}
	}
}
