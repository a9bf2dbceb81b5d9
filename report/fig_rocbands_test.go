package report

import (
	"fmt"
	"image/color"
	"strings"
	"testing"

	"gonum.org/v1/plot/vg/draw"
	"gonum.org/v1/plot/vg/recorder"
)

// TestROCShadesEachE: with --e 0.05,0.1 (the sample's E values) the ROC
// panels shaded the partial ROC region of the first E only, and the key
// and caption named only it, so a reader could not see where the region
// of the second E ends. Each E up to rocMaxBands now has a band of its
// own grey, from y = 1 - E up to the band of the next smaller E, and the
// key and the caption name every E.
func TestROCShadesEachE(t *testing.T) {
	r := analyzedSample(t)
	if len(r.Settings.E) < 2 {
		t.Fatalf("the sample has E = %v: the check needs two", r.Settings.E)
	}
	f := rocFigure(r)
	texts := strings.Join(drawnTexts(t, f), "\n")
	for _, e := range r.Settings.E {
		if !strings.Contains(texts, "E = "+fmtG(e)) {
			t.Errorf("the ROC figure's key does not name E = %s", fmtG(e))
		}
		if !strings.Contains(f.Caption, fmtG(e)) {
			t.Errorf("the ROC caption does not name E = %s: %s", fmtG(e), f.Caption)
		}
	}
	// The greys filled in the figure, besides white and a null panel's
	// shade: one per E at least.
	rec := &recorder.Canvas{}
	if err := f.draw(draw.NewCanvas(rec, f.W, f.H)); err != nil {
		t.Fatal(err)
	}
	var cur color.Color
	greys := map[string]bool{}
	for _, a := range rec.Actions {
		switch a := a.(type) {
		case *recorder.SetColor:
			cur = a.Color
		case *recorder.Fill:
			if cur == nil {
				continue
			}
			r8, g8, b8, _ := cur.RGBA()
			if r8 == g8 && g8 == b8 && r8>>8 != 255 && svgColor(cur) != svgColor(nullPanelShade) {
				greys[svgColor(cur)] = true
			}
		}
	}
	if len(greys) < len(r.Settings.E) {
		t.Errorf("the ROC figure fills %d grey(s) %v for %d E values", len(greys), greys, len(r.Settings.E))
	}
}

// TestROCBands: the bands of E values as given stack from y = 1 down, one
// per E (up to rocMaxBands, the first as given), each with its own grey,
// none the null panel's shade, darker nearer y = 1; one E keeps the one
// grey it always had.
func TestROCBands(t *testing.T) {
	for _, es := range [][]float64{{0.05}, {0.1, 0.05}, {0.05, 0.1, 0.2}, {0.3, 0.01, 0.05, 0.1, 0.2, 0.5}} {
		bs := rocBands(es)
		want := min(len(es), rocMaxBands)
		if len(bs) != want {
			t.Fatalf("E %v: %d bands, want %d", es, len(bs), want)
		}
		seen := map[string]bool{}
		top := 1.0
		for k, b := range bs {
			if b.hi != top || b.lo != 1-b.e {
				t.Errorf("E %v: band %d spans %g..%g for E = %g, want %g..%g", es, k, b.lo, b.hi, b.e, 1-b.e, top)
			}
			if k > 0 && !(b.fill.Y > bs[k-1].fill.Y) {
				t.Errorf("E %v: band %d (grey %d) not lighter than the band above it (grey %d)", es, k, b.fill.Y, bs[k-1].fill.Y)
			}
			c := fmt.Sprint(b.fill.Y)
			if seen[c] || b.fill == nullPanelShade {
				t.Errorf("E %v: band %d's grey %d repeats", es, k, b.fill.Y)
			}
			seen[c] = true
			top = b.lo
		}
		// The first E as given is always shaded.
		found := false
		for _, b := range bs {
			found = found || b.e == es[0]
		}
		if !found {
			t.Errorf("E %v: the first E is not shaded", es)
		}
	}
	six := []float64{0.3, 0.01, 0.05, 0.1, 0.2, 0.5}
	checkWords(t, "six E", rocBandsCaption(six, rocBands(six)),
		[]string{"partial ROC region of each E (0.01, 0.05, 0.1 and 0.3)", "Only the first 4 E values given are shaded (our choice); E = 0.2 and 0.5 are not"}, nil)
	if b := rocBands([]float64{0.05}); b[0].fill != rocBand {
		t.Errorf("one E: grey %d, want the band's %d as before", b[0].fill.Y, rocBand.Y)
	}
}
