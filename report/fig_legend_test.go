package report

import (
	"slices"
	"strings"
	"testing"

	"gonum.org/v1/plot/vg/draw"
	"gonum.org/v1/plot/vg/recorder"
)

// drawnTexts draws f on a recording canvas and returns every text it
// drew, in drawing order.
func drawnTexts(t *testing.T, f figure) []string {
	t.Helper()
	rec := &recorder.Canvas{}
	if err := f.draw(draw.NewCanvas(rec, f.W, f.H)); err != nil {
		t.Fatal(err)
	}
	var out []string
	for _, a := range rec.Actions {
		if fs, ok := a.(*recorder.FillString); ok {
			out = append(out, fs.String)
		}
	}
	return out
}

// TestMetricsLegendOnlyDrawn: a constant model is scored on no extent, so
// no panel of metrics_vs_area draws it, yet the key above the panels
// listed "model const" beside the models drawn, as if its line were hidden
// behind another (a study with a constant raster beside a model and a null
// of the user's). The key lists only what the panels draw; the caption
// names the model as not drawn.
func TestMetricsLegendOnlyDrawn(t *testing.T) {
	r := loadSample(t)
	for i := range r.Scores {
		if r.Scores[i].Model == "broad" {
			r.Scores[i].Scored, r.Scores[i].NotScored = false, "constant suitability (minimum equals maximum on this extent)"
		}
	}
	analyzed(t, r)
	texts := drawnTexts(t, metricsFigure(r))
	if slices.Contains(texts, "model broad") {
		t.Errorf("the key lists model broad, which no panel draws: %q", texts)
	}
	for _, want := range []string{"model good", "model truncated"} {
		if !slices.Contains(texts, want) {
			t.Errorf("the key lacks %q: %q", want, texts)
		}
	}
	for _, nm := range nulls(r) {
		if want := ModelLabel(r, nm.Name); !slices.Contains(texts, want) {
			t.Errorf("the key lacks the null %q: %q", want, texts)
		}
	}
	checkWords(t, "caption", metricsCaption(r), []string{"so not drawn: broad."}, nil)

	// The whole sample: every model and null is drawn and keyed.
	r = analyzedSample(t)
	texts = drawnTexts(t, metricsFigure(r))
	for _, m := range r.Sensitivity.ModelNames {
		if !slices.Contains(texts, "model "+m) {
			t.Errorf("sample: the key lacks model %s: %q", m, texts)
		}
	}
}

// TestROCEmptyPanelSaysWhy: the ROC panel of a model scored on no extent
// (a constant raster) was an empty frame, explained only by the report's
// caption, so the figure file alone (PNG, PDF, SVG) read as curves lost in
// drawing. The panel itself now says the model was not scored, and only
// that panel.
func TestROCEmptyPanelSaysWhy(t *testing.T) {
	r := loadSample(t)
	for i := range r.Scores {
		if r.Scores[i].Model == "broad" {
			r.Scores[i].Scored, r.Scores[i].NotScored = false, "constant suitability (minimum equals maximum on this extent)"
		}
	}
	analyzed(t, r)
	// The canvas draws a text of several lines line by line.
	first, _, _ := strings.Cut(rocUnscoredNote, "\n")
	texts := drawnTexts(t, rocFigure(r))
	n := 0
	for _, s := range texts {
		if s == first {
			n++
		}
	}
	if n != 1 {
		t.Errorf("%d panels say %q, want 1 (broad's): %q", n, first, texts)
	}
	if slices.Contains(drawnTexts(t, rocFigure(analyzedSample(t))), first) {
		t.Errorf("sample (every model scored): a panel says %q", first)
	}
}
