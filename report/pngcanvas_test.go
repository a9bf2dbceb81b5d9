package report

import (
	"bytes"
	"image/color"
	"testing"

	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
)

// TestPNGTextSame draws every figure of the sample study on the PNG
// canvas twice, with its own text compositing and with vgimg's, and wants
// the same pixels; and checks that text was drawn at all (the image of a
// label differs from the blank canvas), in a plain and a translucent colour.
func TestPNGTextSame(t *testing.T) {
	r := analyzedSample(t)
	fs := figures(r)
	if len(fs) < 4 {
		t.Fatalf("%d figures, want at least 4", len(fs))
	}
	for _, f := range fs {
		fast, slow := newPNGCanvas(f.W, f.H), newPNGCanvas(f.W, f.H)
		slow.slowText = true
		for _, c := range []*pngCanvas{fast, slow} {
			if err := f.draw(draw.New(c)); err != nil {
				t.Fatal(err)
			}
		}
		if !bytes.Equal(fast.img.Pix, slow.img.Pix) {
			t.Errorf("figure %s: the PNG canvas's text differs from vgimg's", f.Name)
		}
	}
	for _, col := range []color.Color{ink, color.NRGBA{R: 200, G: 30, B: 90, A: 130}} {
		w, h := 60*vg.Millimeter, 20*vg.Millimeter
		fast, slow, blank := newPNGCanvas(w, h), newPNGCanvas(w, h), newPNGCanvas(w, h)
		slow.slowText = true
		for _, c := range []*pngCanvas{fast, slow} {
			sty := textStyle(9)
			sty.Color = col
			dc := draw.New(c)
			// Overlapping strings, one partly off the canvas.
			dc.FillText(sty, vg.Point{X: 2 * vg.Millimeter, Y: 8 * vg.Millimeter}, "AUC 0.731, ring Wq")
			dc.FillText(sty, vg.Point{X: 3 * vg.Millimeter, Y: 8.5 * vg.Millimeter}, "partial ROC gfj")
			dc.FillText(sty, vg.Point{X: 50 * vg.Millimeter, Y: 19 * vg.Millimeter}, "edge text")
		}
		if !bytes.Equal(fast.img.Pix, slow.img.Pix) {
			t.Errorf("text in %v differs from vgimg's", col)
		}
		if bytes.Equal(fast.img.Pix, blank.img.Pix) {
			t.Errorf("text in %v drew nothing", col)
		}
	}
}
