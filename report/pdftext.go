package report

import (
	"image"
	"sync"

	"golang.org/x/text/encoding/charmap"
	"gonum.org/v1/plot/font"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/vgpdf"
)

// pdfCanvas is a PDF canvas whose text reaches the PDF in the code page
// of its embedded font. The PDF writer embeds the font with the WinAnsi
// encoding (code page 1252) and writes a string's bytes as they are, so
// UTF-8 text came out as two glyphs per character: "150Â°W", "km"+"Â²",
// "â^'0.05" for "−0.05" in every PDF figure (seen with pdftotext and in
// pdftoppm's rendering).
type pdfCanvas struct{ *vgpdf.Canvas }

// FillString implements vg.Canvas.
func (c pdfCanvas) FillString(f font.Face, pt vg.Point, s string) {
	tempWork.RLock()
	defer tempWork.RUnlock()
	c.Canvas.FillString(f, pt, winAnsi(s))
}

// DrawImage implements vg.Canvas. The PDF writer draws an image's first
// row at the bottom of its rectangle (its page is flipped to vg's upward
// y, and the image with it), so every image of a PDF figure came out
// upside down: the maps' suitability under outlines and points that were
// not, the ROC area bar's large areas at its foot. The rows are handed
// over in reverse order.
func (c pdfCanvas) DrawImage(rect vg.Rectangle, img image.Image) {
	c.Canvas.DrawImage(rect, flipRows(img))
}

// flipRows returns img with its rows in reverse order, of the same kind
// for the images the figures draw (paletted, RGBA), so that the PDF keeps
// an indexed image indexed; any other kind as RGBA.
func flipRows(img image.Image) image.Image {
	b := img.Bounds()
	switch src := img.(type) {
	case *image.Paletted:
		out := image.NewPaletted(b, src.Palette)
		for y := b.Min.Y; y < b.Max.Y; y++ {
			copy(out.Pix[out.PixOffset(b.Min.X, b.Max.Y-1-(y-b.Min.Y)):][:b.Dx()], src.Pix[src.PixOffset(b.Min.X, y):][:b.Dx()])
		}
		return out
	case *image.RGBA:
		out := image.NewRGBA(b)
		for y := b.Min.Y; y < b.Max.Y; y++ {
			copy(out.Pix[out.PixOffset(b.Min.X, b.Max.Y-1-(y-b.Min.Y)):][:4*b.Dx()], src.Pix[src.PixOffset(b.Min.X, y):][:4*b.Dx()])
		}
		return out
	}
	out := image.NewRGBA(b)
	for y := b.Min.Y; y < b.Max.Y; y++ {
		for x := b.Min.X; x < b.Max.X; x++ {
			out.Set(x, b.Max.Y-1-(y-b.Min.Y), img.At(x, y))
		}
	}
	return out
}

// tempWork is held (read-locked) while the package may have a folder of
// its own in the temporary directory: the PDF writer prepares each font
// size's data in a folder gofpdf-makefont-… there the first time a
// string of that size is drawn (in FillString), and removes it when
// done; CheckTempDir makes and removes one. A stop signal's handler,
// which ends the process with os.Exit (no deferred removal runs), calls
// EndTempWork first, so that such a folder is not left behind (one was,
// in the temporary folder, by a run of the demo stopped ~0.2 s in).
var tempWork sync.RWMutex

// EndTempWork waits until no folder of the package's is in the temporary
// directory and keeps any from being made afterwards: the process is about
// to exit. A string drawn in a PDF after it waits for ever.
func EndTempWork() {
	tempWork.Lock()
}

// winAnsi returns s in code page 1252 (WinAnsiEncoding, PDF 32000-1:2008,
// Annex D.2), by golang.org/x/text's table of the code page: U+2212
// (minus sign), which the code page lacks, as its en dash (0x96), the
// nearest glyph it has, and any other character it lacks as "?".
func winAnsi(s string) string {
	ascii := true
	for i := 0; i < len(s); i++ {
		ascii = ascii && s[i] < 0x80
	}
	if ascii {
		return s
	}
	b := make([]byte, 0, len(s))
	for _, r := range s {
		if r == '\u2212' {
			r = '\u2013'
		}
		c, ok := charmap.Windows1252.EncodeRune(r)
		if !ok {
			c = '?'
		}
		b = append(b, c)
	}
	return string(b)
}
