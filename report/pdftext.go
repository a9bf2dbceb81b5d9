package report

import (
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
	c.Canvas.FillString(f, pt, winAnsi(s))
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
