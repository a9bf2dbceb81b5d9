package report

import (
	"image"
	"image/color"
	"math"
	"reflect"
	"sync"

	"git.sr.ht/~sbinet/gg"
	"golang.org/x/image/math/fixed"
	"gonum.org/v1/plot/font"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
	"gonum.org/v1/plot/vg/vgimg"
)

// pngCanvas is a vgimg canvas that draws unrotated, untransformed text
// itself. vgimg hands each glyph to gg, which composites it through
// golang.org/x/image/draw's general bilinear transform (a colour
// conversion and an interface call per pixel) even when, as for every
// horizontal label, the transform is the identity; that was the largest
// part of drawing a text-heavy figure at 300 dpi. Here such a glyph is
// composited directly on the image's pixels with the same integer
// arithmetic, so the pixels are the same bit for bit (TestPNGTextSame).
// Text under a rotation, translation or scaling goes to vgimg as before.
type pngCanvas struct {
	*vgimg.Canvas
	img *image.RGBA
	// state mirrors the canvas's Push/Pop stack: the colour and whether a
	// transform is in effect.
	state []textState
	// slowText sends all text to vgimg (the reference in tests).
	slowText bool
	// sprites holds the glyphs drawn so far (spriteGlyph).
	sprites map[spriteKey]*sprite
}

type textState struct {
	color       color.Color
	transformed bool
}

func newFastTextCanvas(c *vgimg.Canvas, img *image.RGBA) *pngCanvas {
	return &pngCanvas{Canvas: c, img: img, state: []textState{{color: color.Black}}}
}

func (c *pngCanvas) top() *textState { return &c.state[len(c.state)-1] }

// SetColor implements vg.Canvas.
func (c *pngCanvas) SetColor(clr color.Color) {
	if clr == nil {
		clr = color.Black
	}
	c.top().color = clr
	c.Canvas.SetColor(clr)
}

// Rotate implements vg.Canvas.
func (c *pngCanvas) Rotate(t float64) {
	c.top().transformed = true
	c.Canvas.Rotate(t)
}

// Translate implements vg.Canvas.
func (c *pngCanvas) Translate(pt vg.Point) {
	c.top().transformed = true
	c.Canvas.Translate(pt)
}

// Scale implements vg.Canvas.
func (c *pngCanvas) Scale(x, y float64) {
	c.top().transformed = true
	c.Canvas.Scale(x, y)
}

// Push implements vg.Canvas.
func (c *pngCanvas) Push() {
	c.state = append(c.state, *c.top())
	c.Canvas.Push()
}

// Pop implements vg.Canvas.
func (c *pngCanvas) Pop() {
	c.state = c.state[:len(c.state)-1]
	c.Canvas.Pop()
}

// FillString implements vg.Canvas. It is vgimg's FillString (gg's
// DrawString under the identity matrix) with each glyph composited by
// drawGlyph.
func (c *pngCanvas) FillString(fnt font.Face, pt vg.Point, str string) {
	if c.slowText || c.top().transformed {
		c.Canvas.FillString(fnt, pt, str)
		return
	}
	if fnt.Font.Size == 0 {
		return
	}
	dpi := c.DPI()
	face := fnt.FontFace(dpi)
	defer face.Close()
	_, h := c.Size()
	x, y := pt.X.Dots(dpi), h.Dots(dpi)-pt.Y.Dots(dpi)
	dot := fixed.Point26_6{X: fixed.Int26_6(math.Round(x * 64)), Y: fixed.Int26_6(math.Round(y * 64))}
	sr, sg, sb, sa := c.top().color.RGBA()
	prev := rune(-1)
	for _, r := range str {
		if prev >= 0 {
			dot.X += face.Kern(prev, r)
		}
		dr, mask, maskp, advance, ok := face.Glyph(dot, r)
		if !ok {
			continue
		}
		drawGlyph(c.img, dr, mask, maskp, [4]uint32{sr, sg, sb, sa})
		dot.X += advance
		prev = r
	}
}

// drawGlyph composites the colour src (alpha-premultiplied, 16 bits per
// channel) through mask onto dst over the rectangle dr, mask pixel maskp
// at dr.Min: for each channel, with the mask's alpha m and the colour's
// alpha a (all in 0..0xffff),
//
//	p = src * m / 0xffff,  d16 = d * 0x101,
//	d' = (d16 * (0xffff - a*m/0xffff) / 0xffff + p) >> 8
//
// which is golang.org/x/image/draw's Over through a bilinear kernel whose
// source pixels fall exactly on the destination's (the weights are 1 and
// 0), followed by image.RGBA's conversion from 16 to 8 bits.
func drawGlyph(dst *image.RGBA, dr image.Rectangle, mask image.Image, maskp image.Point, src [4]uint32) {
	r := dr.Intersect(dst.Rect)
	if r.Empty() {
		return
	}
	alpha, _ := mask.(*image.Alpha)
	for y := r.Min.Y; y < r.Max.Y; y++ {
		row := dst.Pix[dst.PixOffset(r.Min.X, y):]
		for x := r.Min.X; x < r.Max.X; x++ {
			mx, my := maskp.X+x-dr.Min.X, maskp.Y+y-dr.Min.Y
			var ma uint32
			if alpha != nil {
				ma = uint32(alpha.AlphaAt(mx, my).A) * 0x101
			} else {
				_, _, _, ma = mask.At(mx, my).RGBA()
			}
			if ma == 0 {
				continue // d' = d
			}
			pa := src[3] * ma / 0xffff
			pa1 := 0xffff - pa
			d := row[4*(x-r.Min.X) : 4*(x-r.Min.X)+4 : 4*(x-r.Min.X)+4]
			for k := range 4 {
				p := src[k] * ma / 0xffff
				if k < 3 && p > pa {
					p = pa
				}
				d[k] = uint8(uint16(uint32(d[k])*0x101*pa1/0xffff+p) >> 8)
			}
		}
	}
}

// pixBuffers keeps the pixel buffers of finished PNG canvases for the next
// ones. A figure at 300 dpi is up to 22 MB of pixels; taking fresh memory
// for each cost page faults and zeroing, about a tenth of writing a
// report. New buffers come from newPixels (huge pages where it can). At
// most maxFree buffers are kept (as many as figures are drawn at once on a
// small machine); the rest are freed (freePixels).
var pixBuffers bufferList

const maxFree = 4

type bufferList struct {
	mu   sync.Mutex
	free [][]byte
}

// get returns a buffer of n bytes, with any content: a free one, or a new
// one with room for at least room bytes.
func (l *bufferList) get(n, room int) []byte {
	l.mu.Lock()
	defer l.mu.Unlock()
	for i, b := range l.free {
		if cap(b) >= n {
			l.free = append(l.free[:i], l.free[i+1:]...)
			return b[:n]
		}
	}
	return newPixels(max(n, room))[:n]
}

// put keeps b for a later get; b must no longer be used.
func (l *bufferList) put(b []byte) {
	l.mu.Lock()
	defer l.mu.Unlock()
	if len(l.free) < maxFree {
		l.free = append(l.free, b)
		return
	}
	freePixels(b)
}

// spriteGlyph draws the glyph inner on a PNG canvas by stamping a sprite:
// the glyph drawn once per style and quarter-pixel position into a small
// transparent image (by gg, as on the canvas), then composited over the
// canvas's pixels wherever the glyph goes. Drawing each of thousands of
// map marks through gg's path rasteriser was most of the maps' drawing;
// a stamp is one pass over the few pixels the glyph covers. A mark sits
// within an eighth of a pixel of its place (1/2400 inch at pngDPI). On
// other canvases, or under a transform, inner draws as before.
type spriteGlyph struct{ inner draw.GlyphDrawer }

// spriteOf returns gs with its shape drawn as a sprite on PNG canvases.
// A shape that cannot be a map key (the sprites' cache is keyed by it) is
// left as it is.
func spriteOf(gs draw.GlyphStyle) draw.GlyphStyle {
	if gs.Shape == nil || !reflect.TypeOf(gs.Shape).Comparable() {
		return gs
	}
	if _, ok := gs.Shape.(spriteGlyph); !ok {
		gs.Shape = spriteGlyph{gs.Shape}
	}
	return gs
}

// DrawGlyph implements draw.GlyphDrawer.
func (g spriteGlyph) DrawGlyph(c *draw.Canvas, sty draw.GlyphStyle, pt vg.Point) {
	pc, ok := pngCanvasOf(c.Canvas)
	if !ok || pc.top().transformed {
		g.inner.DrawGlyph(c, sty, pt)
		return
	}
	pc.stamp(g.inner, sty, pt)
}

// pngCanvasOf returns the PNG canvas under c, which the plot may have
// wrapped in draw.Canvas values (a cropped canvas wraps its parent).
func pngCanvasOf(c vg.Canvas) (*pngCanvas, bool) {
	for {
		switch cc := c.(type) {
		case *pngCanvas:
			return cc, true
		case draw.Canvas:
			c = cc.Canvas
		case *draw.Canvas:
			c = cc.Canvas
		default:
			return nil, false
		}
	}
}

// spriteSteps is the number of sprite positions per pixel on each axis.
const spriteSteps = 4

type spriteKey struct {
	shape  draw.GlyphDrawer
	color  color.RGBA64
	radius vg.Length
	qx, qy int // sub-pixel position in 1/spriteSteps of a pixel
}

// sprite is a glyph's pixels, alpha-premultiplied, with its top-left
// pixel at (dx, dy) from the pixel the glyph's position falls in.
type sprite struct {
	img    *image.RGBA
	dx, dy int
}

// stamp draws glyph shape of style sty at pt on c's pixels from its
// sprite, drawing the sprite first when it is new.
func (c *pngCanvas) stamp(shape draw.GlyphDrawer, sty draw.GlyphStyle, pt vg.Point) {
	dpi := c.DPI()
	_, h := c.Size()
	x, y := pt.X.Dots(dpi), h.Dots(dpi)-pt.Y.Dots(dpi)
	ix, iy := math.Floor(x), math.Floor(y)
	qx, qy := int(math.Round((x-ix)*spriteSteps)), int(math.Round((y-iy)*spriteSteps))
	if qx == spriteSteps {
		ix, qx = ix+1, 0
	}
	if qy == spriteSteps {
		iy, qy = iy+1, 0
	}
	k := spriteKey{shape: shape, color: color.RGBA64Model.Convert(sty.Color).(color.RGBA64), radius: sty.Radius, qx: qx, qy: qy}
	s, ok := c.sprites[k]
	if !ok {
		s = drawSprite(shape, sty, dpi, qx, qy)
		if c.sprites == nil {
			c.sprites = map[spriteKey]*sprite{}
		}
		c.sprites[k] = s
	}
	if s.img == nil {
		return
	}
	overRGBA(c.img, s.img, int(ix)+s.dx, int(iy)+s.dy)
}

// drawSprite draws shape in style sty on a transparent image, at (qx, qy)
// 1/spriteSteps of a pixel right of and below a pixel's corner, with gg as
// a vgimg canvas would, and returns the pixels it touched.
func drawSprite(shape draw.GlyphDrawer, sty draw.GlyphStyle, dpi float64, qx, qy int) *sprite {
	half := int(math.Ceil((sty.Radius + vg.Points(3)).Dots(dpi))) + 2
	n := 2*half + 1
	img := image.NewRGBA(image.Rect(0, 0, n, n))
	ctx := gg.NewContextForRGBA(img)
	ctx.SetLineCapButt()
	ctx.InvertY()
	vc := vgimg.NewWith(vgimg.UseImageWithContext(img, ctx), vgimg.UseDPI(int(dpi)))
	clear(img.Pix) // NewWith paints the image white
	cx := (float64(half) + float64(qx)/spriteSteps) / dpi
	cy := (float64(n) - float64(half) - float64(qy)/spriteSteps) / dpi
	w, hh := vc.Size()
	dc := draw.Canvas{Canvas: vc, Rectangle: vg.Rectangle{Max: vg.Point{X: w, Y: hh}}}
	dc.SetColor(sty.Color)
	shape.DrawGlyph(&dc, sty, vg.Point{X: vg.Length(cx) * vg.Inch, Y: vg.Length(cy) * vg.Inch})
	// Keep the touched pixels only.
	var b image.Rectangle
	for py := range n {
		for px := range n {
			if img.Pix[img.PixOffset(px, py)+3] != 0 {
				b = b.Union(image.Rect(px, py, px+1, py+1))
			}
		}
	}
	if b.Empty() {
		return &sprite{}
	}
	sub := image.NewRGBA(image.Rect(0, 0, b.Dx(), b.Dy()))
	for py := 0; py < b.Dy(); py++ {
		copy(sub.Pix[py*sub.Stride:py*sub.Stride+4*b.Dx()], img.Pix[img.PixOffset(b.Min.X, b.Min.Y+py):])
	}
	return &sprite{img: sub, dx: b.Min.X - half, dy: b.Min.Y - half}
}

// overRGBA composites src (alpha-premultiplied) over dst with src's
// top-left pixel at (x0, y0): per channel, with src's alpha a,
//
//	d' = s + round(d * (255 - a) / 255).
func overRGBA(dst, src *image.RGBA, x0, y0 int) {
	r := src.Rect.Add(image.Pt(x0, y0)).Intersect(dst.Rect)
	for y := r.Min.Y; y < r.Max.Y; y++ {
		d := dst.Pix[dst.PixOffset(r.Min.X, y):dst.PixOffset(r.Max.X, y)]
		s := src.Pix[src.PixOffset(r.Min.X-x0, y-y0):]
		for i := 0; i < len(d); i += 4 {
			a := uint32(s[i+3])
			if a == 0 {
				continue
			}
			if a == 255 {
				copy(d[i:i+4], s[i:i+4])
				continue
			}
			na := 255 - a
			for k := range 4 {
				d[i+k] = uint8(uint32(s[i+k]) + (uint32(d[i+k])*na+127)/255)
			}
		}
	}
}
