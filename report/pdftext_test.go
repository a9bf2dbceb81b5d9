package report

import (
	"bytes"
	"compress/zlib"
	"io"
	"testing"
)

// TestWinAnsi: expected bytes from code page 1252's table (Microsoft,
// bestfit1252.txt; PDF 32000-1:2008 Annex D.2, WinAnsiEncoding).
func TestWinAnsi(t *testing.T) {
	for _, tc := range []struct{ in, want string }{
		{"AUC 0.75", "AUC 0.75"},
		{"150°W", "150\xb0W"},
		{"extent area (1000 km²)", "extent area (1000 km\xb2)"},
		{"\u22120.05", "\x960.05"},
		{"a – b … c", "a \x96 b \x85 c"},
		{"r² ≈ 1", "r\xb2 ? 1"},
	} {
		if got := winAnsi(tc.in); got != tc.want {
			t.Errorf("winAnsi(%q) = %q, want %q", tc.in, got, tc.want)
		}
	}
}

// TestPDFTextEncoded: every PDF figure wrote its text's UTF-8 bytes into
// a font encoded as WinAnsi, so "30°S" read "30Â°S" and "−0.05"
// "â^'0.05" in a PDF viewer. The map figure's PDF content must hold the
// degree sign as the single byte 0xB0 and no UTF-8 degree sign.
func TestPDFTextEncoded(t *testing.T) {
	r := manyExtents(t, 10)
	f, ok := mapFigure(r)
	if !ok {
		t.Fatal("no map figure")
	}
	pdf, err := render(f, "pdf")
	if err != nil {
		t.Fatal(err)
	}
	var content []byte
	for rest := pdf; ; {
		i := bytes.Index(rest, []byte("stream\n"))
		if i < 0 {
			break
		}
		rest = rest[i+len("stream\n"):]
		j := bytes.Index(rest, []byte("endstream"))
		if j < 0 {
			break
		}
		if zr, err := zlib.NewReader(bytes.NewReader(rest[:j])); err == nil {
			if b, err := io.ReadAll(zr); err == nil && bytes.Contains(b, []byte("Tj")) {
				content = append(content, b...)
			}
		}
		rest = rest[j:]
	}
	if len(content) == 0 {
		t.Fatal("no text content stream found in the PDF")
	}
	if bytes.Contains(content, []byte("\xc2\xb0")) {
		t.Error("PDF text holds UTF-8 degree signs (read as Â°)")
	}
	found := false
	for _, end := range []string{"\xb0)", "\xb0N)", "\xb0S)", "\xb0E)", "\xb0W)"} {
		found = found || bytes.Contains(content, []byte(end))
	}
	if !found {
		t.Error("PDF text holds no WinAnsi degree sign ending a tick label")
	}
}
