package report

import (
	"fmt"
	"testing"

	"gonum.org/v1/plot/vg/draw"
)

// maxSeries is the most models and nulls a run can score together:
// omitted_points.gpkg holds 2 columns plus 2 per model or null at the
// least, within a GeoPackage table's 2000 columns less 2 (the pipeline's
// validateOmitColumns refuses more), so (1998 - 2) / 2 = 998.
const maxSeries = 998

// look names how a key entry is drawn: its line's colour and pattern and
// its marker's colour and shape (%v: the polygon and spoked glyphs share
// a type).
func look(it legendItem) string {
	g, ok := it.thumb.(glyphThumb)
	if !ok {
		return fmt.Sprintf("%T%v", it.thumb, it.thumb)
	}
	s := fmt.Sprintf("marker %s %s", svgColor(g.gs.Color), shapeName(g.gs.Shape))
	if g.line != nil {
		s += fmt.Sprintf(" line %s %v", svgColor(g.line.Color), g.line.Dashes)
	}
	return s
}

// shapeName names a marker's shape by type and value, through the PNG
// sprite's and the spokes' wrappers (whose own %v hides the type they
// wrap).
func shapeName(g draw.GlyphDrawer) string {
	switch sg := g.(type) {
	case spriteGlyph:
		return shapeName(sg.inner)
	case spokedGlyph:
		return fmt.Sprintf("%s with %d spokes", shapeName(sg.base), sg.spokes)
	}
	return fmt.Sprintf("%T%+v", g, g)
}

// TestMetricsTwelveNullsApart: with more than ten nulls (eleven --null
// rasters and the distance-only null) the metrics figure drew the 11th
// null as the 1st and the 12th as the 2nd: the same grey, dots and open
// marker. Every model and null of the figure's key now has a look of its
// own.
func TestMetricsTwelveNullsApart(t *testing.T) {
	r := loadSample(t)
	first := r.Models[0].Name
	var add []Score
	for k := range 12 {
		name := fmt.Sprintf("null_%02d", k)
		r.Models = append(r.Models, Model{Name: name, Role: RoleNull, NullKind: NullRaster})
		for _, sc := range r.Scores {
			if sc.Model == first {
				sc.Model = name
				add = append(add, sc)
			}
		}
	}
	r.Scores = append(r.Scores, add...)
	r = analyzedSampleWith(t, r)
	panels, _ := metricPanels(r)
	items := metricsLegend(r, panels)
	if len(items) != len(r.Sensitivity.ModelNames)+12 {
		t.Fatalf("%d key entries, want %d models and 12 nulls", len(items), len(r.Sensitivity.ModelNames))
	}
	checkWords(t, "metrics caption with 12 nulls", metricsCaption(r), []string{"then squares, triangles, pluses and crosses; from the eleventh on, each further ten take one spoke more around the marker"}, nil)
	seen := map[string]string{}
	for _, it := range items {
		l := look(it)
		if prev, ok := seen[l]; ok {
			t.Errorf("%s drawn as %s: %s", it.label, prev, l)
		}
		seen[l] = it.label
	}
}

// TestSeriesStylesApart: for every count of models and nulls a run can
// hold (maxSeries), no two models share colour and marker (the ring
// waterfall and the model-minus-null figure tell them by those alone; the
// metrics figure adds the line pattern), no two nulls share grey, marker
// and dots, no model is drawn as a null, and no two nulls share the line
// pattern that tells them apart in the model-minus-null figure.
func TestSeriesStylesApart(t *testing.T) {
	models := map[string]int{}
	for i := range maxSeries {
		gs := markerStyle(i)
		k := fmt.Sprintf("%s %s", svgColor(gs.Color), shapeName(gs.Shape))
		if j, ok := models[k]; ok {
			t.Fatalf("models %d and %d share colour and marker %s", j, i, k)
		}
		models[k] = i
		if d := modelDash(i); dotted(d) {
			t.Fatalf("model %d's line %v is dotted, as a null's", i, d)
		}
	}
	nullLooks := map[string]int{}
	for k := range maxSeries {
		ls, gs := nullLineStyle(k)
		key := fmt.Sprintf("%s %s %v", svgColor(ls.Color), shapeName(gs.Shape), ls.Dashes)
		if j, ok := nullLooks[key]; ok {
			t.Fatalf("nulls %d and %d drawn alike: %s", j, k, key)
		}
		nullLooks[key] = k
		if r, g, b, _ := ls.Color.RGBA(); r != g || g != b {
			t.Fatalf("null %d drawn in colour %v, not a grey", k, ls.Color)
		}
		if !dotted(ls.Dashes) {
			t.Fatalf("null %d's line %v is not dotted", k, ls.Dashes)
		}
		if _, ok := models[fmt.Sprintf("%s %s", svgColor(gs.Color), shapeName(gs.Shape))]; ok {
			t.Fatalf("null %d drawn as a model", k)
		}
	}
	gaps := map[string]int{}
	for j := range maxSeries {
		k := fmt.Sprint(gapDash(j))
		if i, ok := gaps[k]; ok {
			t.Fatalf("nulls %d and %d share the model-minus-null pattern %s", i, j, k)
		}
		gaps[k] = j
	}
}
