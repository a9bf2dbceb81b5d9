package report

import (
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
// Annex D.2): ASCII and U+00A0 to U+00FF as they are, the 27 characters
// of 0x80 to 0x9F by the code page's table (Microsoft's published
// bestfit1252 mapping), U+2212 (minus sign), which the code page lacks, as
// its en dash (0x96), the nearest glyph it has, and any other character as
// "?".
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
		switch {
		case r < 0x80 || (r >= 0xA0 && r <= 0xFF):
			b = append(b, byte(r))
		case r == '\u2212':
			b = append(b, 0x96)
		default:
			c, ok := cp1252High[r]
			if !ok {
				c = '?'
			}
			b = append(b, c)
		}
	}
	return string(b)
}

// cp1252High maps the characters of code page 1252's bytes 0x80 to 0x9F.
var cp1252High = map[rune]byte{
	'€': 0x80, '‚': 0x82, 'ƒ': 0x83, '„': 0x84, '…': 0x85, '†': 0x86, '‡': 0x87,
	'ˆ': 0x88, '‰': 0x89, 'Š': 0x8A, '‹': 0x8B, 'Œ': 0x8C, 'Ž': 0x8E,
	'‘': 0x91, '’': 0x92, '“': 0x93, '”': 0x94, '•': 0x95, '–': 0x96, '—': 0x97,
	'˜': 0x98, '™': 0x99, 'š': 0x9A, '›': 0x9B, 'œ': 0x9C, 'ž': 0x9E, 'Ÿ': 0x9F,
}
