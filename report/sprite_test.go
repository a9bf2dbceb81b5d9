package report

import (
	"fmt"
	"math"
	"math/rand/v2"
	"testing"

	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
)

// TestSpriteGlyphMatches draws every marker shape of the figures at
// random places on two PNG canvases, once through gg (the shape itself)
// and once stamped from a sprite (spriteGlyph), and compares the pixels.
// At places on the sprites' quarter-pixel grid a stamp is gg's drawing up
// to the rounding of compositing in 8 rather than 16 bits (at most 2 of
// 255 a channel). Elsewhere a stamp sits up to an eighth of a pixel off,
// which moves the anti-aliased edges: at most a quarter of full
// intensity a pixel, and in total under 8% of the ink (a stroke about 2
// px wide moved 1/16 px on average gains and loses 1/16 of its ink at its
// two edges). The stamped canvas is drawn twice to check that it is the
// same bit for bit.
func TestSpriteGlyphMatches(t *testing.T) {
	shapes := append([]draw.GlyphDrawer{}, glyphs...)
	shapes = append(shapes, strokedGlyph{square: true, width: vg.Points(1.2)}, strokedGlyph{width: vg.Points(1.2)},
		haloGlyph{strokedGlyph{width: vg.Points(1.2)}}, haloGlyph{draw.RingGlyph{}})
	for _, shape := range shapes {
		t.Run(fmt.Sprintf("%T%v", shape, shape), func(t *testing.T) {
			rng := rand.New(rand.NewPCG(3, 5))
			const w, h = 40 * vg.Millimeter, 30 * vg.Millimeter
			var pts, snapped []vg.Point
			snap := func(l vg.Length) vg.Length { // to 1/4 px at pngDPI
				return vg.Length(math.Round(l.Dots(pngDPI)*spriteSteps)/spriteSteps/pngDPI) * vg.Inch
			}
			for range 30 {
				p := vg.Point{X: vg.Length(rng.Float64()) * w, Y: vg.Length(rng.Float64()) * h}
				pts = append(pts, p)
				snapped = append(snapped, vg.Point{X: snap(p.X), Y: snap(p.Y)})
			}
			sty := draw.GlyphStyle{Color: lineColors[0], Radius: vg.Points(2.4), Shape: shape}
			drawAll := func(gs draw.GlyphStyle, at []vg.Point) []byte {
				c := newPNGCanvas(w, h)
				defer pixBuffers.put(c.img.Pix)
				dc := draw.New(c)
				for _, p := range at {
					dc.DrawGlyph(gs, p)
				}
				return append([]byte(nil), c.img.Pix...)
			}
			compare := func(direct, stamped []byte) (worst, diff, ink int) {
				for i := range direct {
					d := int(direct[i]) - int(stamped[i])
					if d < 0 {
						d = -d
					}
					worst = max(worst, d)
					diff += d
					ink += 255 - int(direct[i])
				}
				return worst, diff, ink
			}
			stamped := drawAll(spriteOf(sty), pts)
			if string(stamped) != string(drawAll(spriteOf(sty), pts)) {
				t.Fatal("two stamped drawings differ")
			}
			worst, diff, ink := compare(drawAll(sty, pts), stamped)
			if ink == 0 {
				t.Fatal("nothing drawn")
			}
			if worst > 64 || float64(diff) > 0.08*float64(ink) {
				t.Errorf("stamps differ from gg's drawing by up to %d, in total %d of %d", worst, diff, ink)
			}
			if worst, diff, ink := compare(drawAll(sty, snapped), drawAll(spriteOf(sty), snapped)); worst > 2 {
				t.Errorf("on the quarter-pixel grid, stamps differ from gg's drawing by up to %d (in total %d of %d)", worst, diff, ink)
			}
		})
	}
}
