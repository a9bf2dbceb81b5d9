package report

import (
	"bytes"
	"image/color"
	"testing"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
	"gonum.org/v1/plot/vg/vgsvg"
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

// TestPaddingBoxes wants the same data area from a plot of paddingLines
// and paddingScatters as from the plot of the plotter.Lines and
// plotter.Scatters they wrap: curves and points touching the edges,
// reaching outside the axes' ranges, of several widths and sizes, and
// none.
func TestPaddingBoxes(t *testing.T) {
	curves := []plotter.XYs{
		// A diamond: each side's outermost point is a different one.
		{{X: 0.5, Y: 1}, {X: 0, Y: 0.5}, {X: 0.5, Y: 0}, {X: 1, Y: 0.5}},
		{{X: 0, Y: 0}, {X: 0.2, Y: 0.7}, {X: 1, Y: 1}},
		{{X: -0.5, Y: 0.3}, {X: 0.02, Y: -0.1}, {X: 0.5, Y: 0.5}, {X: 0.99, Y: 1.02}},
		{{X: 0.3, Y: 0.001}, {X: 0.3, Y: 0.999}, {X: 1.5, Y: 2}},
		{{X: 0.97, Y: 0.5}, {X: 0.01, Y: 0.02}},
	}
	widths := []float64{9, 1.1, 4, 0.5, 9}
	radii := []float64{12, 9, 1.1, 4, 0.5}
	for n := 0; n <= len(curves); n++ {
		var plain, padded *plot.Plot
		for _, wrap := range []bool{false, true} {
			p := newPlot("", 80*vg.Millimeter)
			p.X.Min, p.X.Max, p.Y.Min, p.Y.Max = 0, 1, 0, 1
			for i, xys := range curves[:n] {
				l, err := plotter.NewLine(xys)
				if err != nil {
					t.Fatal(err)
				}
				l.LineStyle = lineStyle(ink, widths[i], nil)
				sc, err := plotter.NewScatter(xys)
				if err != nil {
					t.Fatal(err)
				}
				sc.GlyphStyle.Radius = vg.Points(radii[i])
				if wrap {
					p.Add(newPaddingLine(l), newPaddingScatter(sc))
				} else {
					p.Add(l, sc)
				}
			}
			if wrap {
				padded = p
			} else {
				plain = p
			}
		}
		c := draw.New(newPNGCanvas(80*vg.Millimeter, 60*vg.Millimeter))
		if a, b := plain.DataCanvas(c).Rectangle, padded.DataCanvas(c).Rectangle; a != b {
			t.Errorf("%d curves: data area %v with the padding wrappers, %v without", n, b, a)
		}
		// Other ranges after the boxes were kept for the first ones.
		for _, p := range []*plot.Plot{plain, padded} {
			p.X.Min, p.X.Max, p.Y.Min, p.Y.Max = 0.1, 0.6, -0.2, 0.9
		}
		if a, b := plain.DataCanvas(c).Rectangle, padded.DataCanvas(c).Rectangle; a != b {
			t.Errorf("%d curves, ranges changed: data area %v with the padding wrappers, %v without", n, b, a)
		}
		// The wrappers draw the same files (paddingLine.Plot makes the
		// calls plotter.Line.Plot makes), lines clipped at the new ranges.
		var files [2][2][]byte
		for k, p := range []*plot.Plot{plain, padded} {
			svg := vgsvg.New(80*vg.Millimeter, 60*vg.Millimeter)
			p.Draw(draw.New(svg))
			var b bytes.Buffer
			if _, err := svg.WriteTo(&b); err != nil {
				t.Fatal(err)
			}
			pc := newPNGCanvas(80*vg.Millimeter, 60*vg.Millimeter)
			p.Draw(draw.New(pc))
			png, err := encodePNG(pc.img, pngDPI)
			if err != nil {
				t.Fatal(err)
			}
			files[k] = [2][]byte{b.Bytes(), bytes.Clone(png)}
		}
		if !bytes.Equal(files[0][0], files[1][0]) || !bytes.Equal(files[0][1], files[1][1]) {
			t.Errorf("%d curves: the wrappers draw other files (SVG same %v, PNG same %v)", n, bytes.Equal(files[0][0], files[1][0]), bytes.Equal(files[0][1], files[1][1]))
		}
	}
}
