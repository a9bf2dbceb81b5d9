package report

import (
	"fmt"
	"image/color"
	"testing"

	"gonum.org/v1/plot/vg"
)

// TestModelStylesDistinct: every model up to len(modelColors) (nine, the
// count README gives) has a colour of its own; past that, models sharing
// a colour differ in line pattern up to 63 models and in marker up to 72
// (the least common multiples of the counts of colours and of patterns
// or markers); no model is drawn in a grey, so none looks like a null
// (nullLineStyle: grey, dotted, open markers), whichever null.
func TestModelStylesDistinct(t *testing.T) {
	if len(modelColors) < 9 {
		t.Fatalf("%d model colours, README promises 9", len(modelColors))
	}
	rgb := func(c color.Color) string {
		r, g, b, _ := c.RGBA()
		return fmt.Sprintf("%02x%02x%02x", r>>8, g>>8, b>>8)
	}
	for i := range 9 {
		for j := range i {
			if rgb(modelColor(i)) == rgb(modelColor(j)) {
				t.Errorf("models %d and %d share colour #%s", j+1, i+1, rgb(modelColor(i)))
			}
		}
	}
	line := map[string]int{}
	for i := range 63 {
		k := fmt.Sprintf("%s %v", rgb(modelColor(i)), modelDash(i))
		if j, ok := line[k]; ok {
			t.Errorf("models %d and %d share colour and line pattern", j+1, i+1)
		}
		line[k] = i
	}
	mark := map[string]int{}
	for i := range 72 {
		k := fmt.Sprintf("%s %T%v", rgb(modelColor(i)), modelGlyph(i), modelGlyph(i)) // %v: the polygonGlyph shapes share a type
		if j, ok := mark[k]; ok {
			t.Errorf("models %d and %d share colour and marker", j+1, i+1)
		}
		mark[k] = i
	}
	for i := range 256 {
		r, g, b, _ := modelColor(i).RGBA()
		if r == g && g == b {
			t.Errorf("model %d drawn in a grey", i+1)
		}
		for k := range 6 {
			ls, gs := nullLineStyle(k)
			if rgb(modelColor(i)) == rgb(ls.Color) || rgb(modelColor(i)) == rgb(gs.Color) {
				t.Errorf("model %d drawn in the colour of null %d", i+1, k+1)
			}
		}
	}
}

// TestModelsApartFromNullsInGrey: in a greyscale print colour is gone, so
// a model must differ from every null by its line and by its marker. The
// third model was drawn dotted (1.2 pt dots), as the nulls are, with the
// hollow square of the third and fourth null (an audit of the figures with
// six models and two nulls); the sixth to eighth models took the nulls'
// hollow triangle, square and ring.
func TestModelsApartFromNullsInGrey(t *testing.T) {
	if ls, _ := nullLineStyle(0); !dotted(ls.Dashes) {
		t.Fatalf("the nulls' pattern %v is not dotted: the check below tests nothing", ls.Dashes)
	}
	for i := range len(dashes) {
		if dotted(modelDash(i)) {
			t.Errorf("model %d is drawn dotted (%v), as the nulls are", i+1, modelDash(i))
		}
	}
	for i := range len(glyphs) {
		for k := range 6 {
			if _, gs := nullLineStyle(k); fmt.Sprintf("%T%v", gs.Shape, gs.Shape) == fmt.Sprintf("%T%v", modelGlyph(i), modelGlyph(i)) {
				t.Errorf("model %d takes the marker %T of null %d", i+1, modelGlyph(i), k+1)
			}
		}
	}
}

// dotted tells whether a line pattern is dotted: every dash of it no
// longer than 2 pt.
func dotted(d []vg.Length) bool {
	if len(d) == 0 {
		return false
	}
	for i := 0; i < len(d); i += 2 {
		if d[i] > vg.Points(2) {
			return false
		}
	}
	return true
}
