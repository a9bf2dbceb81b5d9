package report

import (
	"html"
	"os"
	"os/exec"
	"path/filepath"
	"regexp"
	"strings"
	"testing"
)

// svgTextElement matches the text elements of an SVG figure (gonum's vgsvg writes
// each string as one element).
var svgTextElement = regexp.MustCompile(`(?s)<text[^>]*>(.*?)</text>`)

// TestPDFTextReadsAsSVG: every PDF figure of the sample report, read back
// by an independent PDF reader (poppler's pdftotext, Debian poppler-utils,
// installed by setup.sh --test), holds every string of the same figure's
// SVG (white space ignored; the minus sign read as the en dash the PDF's
// code page draws it with, see winAnsi). Before the PDF text was written
// in its font's code page, "30°S" read "30Â°S" and "km²" "kmÂ²" in every
// PDF figure.
func TestPDFTextReadsAsSVG(t *testing.T) {
	if _, err := exec.LookPath("pdftotext"); err != nil {
		if os.Getenv("CI") == "true" {
			t.Fatal("pdftotext not found: CI must install Debian's poppler-utils (scripts/setup.sh --test)")
		}
		t.Skip("pdftotext not found: install Debian's poppler-utils to run this test (a skip is not a pass)")
	}
	dir, _ := writeSample(t)
	svgs, err := filepath.Glob(filepath.Join(dir, "figures", "*.svg"))
	if err != nil || len(svgs) < len(figureNames) {
		t.Fatalf("%d SVG figures (%v), want at least %d", len(svgs), err, len(figureNames))
	}
	squash := func(s string) string {
		return strings.Join(strings.Fields(strings.ReplaceAll(s, "\u2212", "\u2013")), "")
	}
	for _, svg := range svgs {
		name := strings.TrimSuffix(filepath.Base(svg), ".svg")
		src, err := os.ReadFile(svg)
		if err != nil {
			t.Fatal(err)
		}
		out, err := exec.Command("pdftotext", "-raw", strings.TrimSuffix(svg, ".svg")+".pdf", "-").Output()
		if err != nil {
			t.Errorf("%s.pdf: pdftotext: %v", name, err)
			continue
		}
		got := squash(string(out))
		n := 0
		for _, m := range svgTextElement.FindAllSubmatch(src, -1) {
			want := squash(html.UnescapeString(string(m[1])))
			if want == "" {
				continue
			}
			n++
			if !strings.Contains(got, want) {
				t.Errorf("%s.pdf: pdftotext does not read %q (the SVG's text)", name, want)
			}
		}
		if n == 0 {
			t.Errorf("%s.svg holds no text to compare", name)
		}
	}
}
