package extent

import (
	"archive/zip"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"golang.org/x/text/encoding/charmap"
)

// TestKMLBrokenCoordinates: a KML Placemark whose <coordinates> text is
// present but is not coordinates is refused, naming the file, the
// Placemark (its position and name), the line and the text. GDAL read
// such a text up to its first word that is not a number and said
// nothing: "garbage" alone was skipped as a Placemark without geometry,
// a ring followed by a stray word was read whole, a word within a ring
// was read as 0, and a list cut within a point was refused for what GDAL
// made of it (a ring left open, in the words of the 3D copy). A
// Placemark without a geometry, or with an empty <coordinates/>, is
// still skipped with a warning, and the spellings LIBKML reads right
// (spaces after the commas, no altitude, points on several lines) are
// read.
func TestKMLBrokenCoordinates(t *testing.T) {
	Register()
	dir := t.TempDir()
	g, _ := geoGrid(t, 0, 4, 0.1, 40, 40)
	const ring = "0.55,0.55,0 3.05,0.55,0 3.05,2.95,0 0.55,2.95,0 0.55,0.55,0"
	placemark := func(name, coords string) string {
		n := ""
		if name != "" {
			n = "<name>" + name + "</name>"
		}
		return "<Placemark>" + n + "<Polygon><outerBoundaryIs><LinearRing><coordinates>" + coords + "</coordinates></LinearRing></outerBoundaryIs></Polygon></Placemark>\n"
	}
	doc := func(placemarks ...string) string {
		return `<?xml version="1.0" encoding="UTF-8"?>` + "\n" +
			`<kml xmlns="http://www.opengis.net/kml/2.2"><Document><name>Study</name>` + "\n" +
			placemark("Good", ring) + strings.Join(placemarks, "") + "</Document></kml>\n"
	}
	write := func(name, body string) string {
		p := filepath.Join(dir, name)
		if err := os.WriteFile(p, []byte(body), 0o644); err != nil {
			t.Fatal(err)
		}
		return p
	}
	kmz := func(name, body string) string {
		p := filepath.Join(dir, name)
		f, err := os.Create(p)
		if err != nil {
			t.Fatal(err)
		}
		z := zip.NewWriter(f)
		w, _ := z.Create("doc.kml")
		w.Write([]byte(body))
		if err := z.Close(); err != nil {
			t.Fatal(err)
		}
		f.Close()
		return p
	}
	latin1, _ := charmap.ISO8859_1.NewEncoder().String(strings.Replace(doc(placemark("Forêt", "1,2 garbage")), "UTF-8", "ISO-8859-1", 1))
	for _, c := range []struct {
		name, path string
		words      []string // in the refusal; nil: read
		warn       string   // in a warning when read
	}{
		{"a word after a point", write("garbage.kml", doc(placemark("Bad one", "1,2 garbage"))),
			[]string{"garbage.kml Placemark 2 (\"Bad one\")", "at line 4", `point 2, "garbage", is not longitude,latitude numbers`, `(the text: "1,2 garbage")`, "or delete the Placemark"}, ""},
		{"a word alone", write("word.kml", doc(placemark("Bad one", "garbage"))),
			[]string{"word.kml Placemark 2 (\"Bad one\")", `(the text: "garbage")`}, ""},
		{"a list cut within a point", write("cut.kml", doc(placemark("Bad one", "0.55,0.55,0 3.05,0.55,0 3.05"))),
			[]string{"cut.kml Placemark 2", `point 3, "3.05", is a single number`, "cut short"}, ""},
		{"a list cut after a comma", write("comma.kml", doc(placemark("Bad one", "0.55,0.55,0 3.05,0.55,0 3.05,"))),
			[]string{"comma.kml Placemark 2", "has a value missing"}, ""},
		{"a word after a whole ring", write("after.kml", doc(placemark("Bad one", ring+" garbage"))),
			[]string{"after.kml Placemark 2", `point 6, "garbage"`}, ""},
		{"a word within a ring", write("within.kml", doc(placemark("Bad one", "0.55,0.55 3.05,0.55 x 3.05,2.95 0.55,2.95 0.55,0.55"))),
			[]string{"within.kml Placemark 2", `point 3, "x"`}, ""},
		{"a letter in a number", write("letter.kml", doc(placemark("Bad one", "0.55,0.55 3.05,0.55 3.05,2.9S 0.55,2.95 0.55,0.55"))),
			[]string{"letter.kml Placemark 2", `has "2.9S", which is not a number`}, ""},
		{"points joined by commas", write("joined.kml", doc(placemark("Bad one", "0.55,0.55,0,3.05,0.55 3.05,2.95,0 0.55,2.95,0 0.55,0.55,0"))),
			[]string{"joined.kml Placemark 2", "holds 5 values"}, ""},
		{"not a finite number", write("nan.kml", doc(placemark("Bad one", "0.55,nan 3.05,0.55 3.05,2.95 0.55,0.55"))),
			[]string{"nan.kml Placemark 2", `"nan", which is not a finite number`}, ""},
		{"a Placemark without a name", write("noname.kml", doc(placemark("", "1,2 garbage"))),
			[]string{"noname.kml Placemark 2: the <coordinates> text"}, ""},
		{"in a KMZ archive", kmz("study.kmz", doc(placemark("Bad one", "1,2 garbage"))),
			[]string{"study.kmz Placemark 2 (\"Bad one\")", `(the text: "1,2 garbage")`}, ""},
		{"in a Latin-1 file", write("latin1.kml", latin1),
			[]string{"latin1.kml Placemark 2 (\"Forêt\")", `(the text: "1,2 garbage")`}, ""},
		{"a pin's point", write("pin.kml", doc("<Placemark><name>Pin</name><Point><coordinates>garbage</coordinates></Point></Placemark>\n")),
			[]string{"pin.kml Placemark 2 (\"Pin\")"}, ""},

		{"a Placemark without geometry", write("nogeometry.kml", doc("<Placemark><name>Note</name></Placemark>\n")), nil, "nogeometry.kml feature 2 has no geometry; skipped"},
		{"empty coordinates", write("empty.kml", doc(placemark("Empty", " "))), nil, "empty.kml feature 2 has no geometry; skipped"},
		{"spaces after the commas", write("spaces.kml", doc(placemark("Spaced", "0.55, 0.55, 0 3.05, 0.55, 0 3.05 , 2.95 , 0 0.55,2.95,0 0.55,0.55,0"))), nil, ""},
		{"points on several lines, no altitude", write("lines.kml", doc(placemark("Lines", "\n\t0.55,0.55\n\t3.05,0.55\n\t3.05,2.95\n\t0.55,2.95\n\t5.5e-1,+0.55\n"))), nil, ""},
	} {
		t.Run(c.name, func(t *testing.T) {
			_, warns, err := ReadShape(c.path, g)
			if c.words == nil {
				if err != nil {
					t.Fatalf("refused: %v", err)
				}
				if c.warn != "" && !strings.Contains(strings.Join(warns, "\n"), c.warn) {
					t.Errorf("warnings %q, want one with %q", warns, c.warn)
				}
				return
			}
			if err == nil {
				t.Fatalf("read (warnings %q), want a refusal", warns)
			}
			for _, w := range c.words {
				if !strings.Contains(err.Error(), w) {
					t.Errorf("%v\nlacks %q", err, w)
				}
			}
		})
	}
}
