package report

import (
	"bytes"
	"flag"
	"html/template"
	"os"
	"path/filepath"
	"testing"
)

var update = flag.Bool("update", false, "rewrite the golden pages in testdata/page from the current renderer")

// goldenPage is a Results and the methods text shown with it.
type goldenPage struct {
	r       *Results
	methods methodsDoc
}

// goldenPages are the Results whose report.html is kept in testdata/page,
// without figures (their files are checked by the figure tests).
func goldenPages(t *testing.T) map[string]goldenPage {
	t.Helper()
	// Text that needs escaping wherever a string reaches the page: in
	// text, in <title>, in a table cell, in the methods text's heading,
	// paragraph and list.
	r := analyzedSample(t)
	bad := `<b>&amp; "q" 'a' +1 </script><!--`
	r.Software.Name = bad
	r.Sensitivity.Headline = bad
	r.Warnings = []string{bad, "second +0.1"}
	r.Sensitivity.Warnings = []string{bad}
	r.Settings.EcoregionField = bad
	r.Grid.CRS = bad
	r.Inputs = append(r.Inputs, Input{Role: bad, Path: bad, SHA256: bad})
	v := r.Sensitivity.Verdicts[0]
	v.Verdict, v.Sentence = Judgement(bad), bad
	r.Sensitivity.Verdicts = append(r.Sensitivity.Verdicts, v)

	// Every optional part absent.
	bare := analyzedSample(t)
	s := bare.Sensitivity
	s.Rankings, s.Decompositions, s.Chains, s.AboveNull = nil, nil, nil, nil
	s.SkippedExtents, s.Unscored, s.Warnings, bare.Warnings = nil, nil, nil, nil
	s.Independence.Defined = false
	methods := methodsDoc{Title: bad, Intro: bad, Sections: []textSection{{Heading: bad, Paragraphs: []string{"methods + more"}, List: []string{bad}}}}
	return map[string]goldenPage{"escapes": {r, methods}, "bare": {bare, methodsDoc{}}}
}

// TestPageGolden compares report.html with the golden pages byte for byte.
// The goldens are our own output, not an outside reference: they were
// written by the fmt-based renderer that html/template replaced, and the
// template renderer reproduced them exactly (as it did the demo's page and
// the sample's and null sample's pages with figures). Rewrite them with
// go test ./report/ -run TestPageGolden -update after a deliberate change
// to the page, and read the diff.
func TestPageGolden(t *testing.T) {
	for name, c := range goldenPages(t) {
		got, err := htmlPage(c.r, nil, c.methods)
		if err != nil {
			t.Fatal(err)
		}
		path := filepath.Join("testdata", "page", name+".html")
		if *update {
			if err := os.WriteFile(path, got, 0o644); err != nil {
				t.Fatal(err)
			}
			continue
		}
		want, err := os.ReadFile(path)
		if err != nil {
			t.Fatal(err)
		}
		if !bytes.Equal(got, want) {
			i := 0
			for i < len(got) && i < len(want) && got[i] == want[i] {
				i++
			}
			lo := max(0, i-80)
			t.Errorf("%s: page differs from %s at byte %d:\n got ...%q\nwant ...%q", name, path, i,
				got[lo:min(len(got), i+80)], want[lo:min(len(want), i+80)])
		}
	}
}

// TestTableBody wants htmlTable.Body to write what the page template's
// loop over the cells wrote, escaping included: markup, quotes, plus
// signs, a NUL, invalid UTF-8, U+FFFD and noncharacters in text and class.
func TestTableBody(t *testing.T) {
	loop := template.Must(template.New("").Parse(`{{range .}}<tr>{{range .}}<td{{with .Class}} class="{{.}}"{{end}}{{if .IsNum}} data-v="{{.DataV}}"{{end}}>{{.Text}}</td>{{end}}</tr>
{{end}}`))
	type view struct {
		Text, Class, DataV string
		IsNum              bool
	}
	odd := []string{"", "plain", `a<b>&"c"'d'`, "+0.031", "x\x00y", "bad\xffutf8", "\uFFFD \uFDD0 \uFFFF –", "n"}
	var rows [][]cell
	for i, s := range odd {
		rows = append(rows, []cell{tc(s), {text: s, cls: odd[(i+2)%len(odd)]}, nc(-1.5e-7*float64(i), 3), dash})
	}
	var views [][]view
	for _, row := range rows {
		var vs []view
		for _, c := range row {
			vs = append(vs, view{Text: c.text, Class: c.cls, DataV: c.DataV(), IsNum: c.isN})
		}
		views = append(views, vs)
	}
	var want bytes.Buffer
	if err := loop.Execute(&want, views); err != nil {
		t.Fatal(err)
	}
	if got := string(table("t", nil, rows).Body()); got != want.String() {
		t.Errorf("Body:\n%q\nthe template wrote:\n%q", got, want.String())
	}
}

// TestInPlaceRewrites checks plainPlus and fixSVG, which rewrite without
// bytes.ReplaceAll's copies, against bytes.ReplaceAll.
func TestInPlaceRewrites(t *testing.T) {
	for _, s := range []string{"", "plain", "&#43;", "&#43;&#43;x&#43;", "a&#4&#43;3;b", "&#43", "x&#43;0.031 y &amp;#43;"} {
		want := bytes.ReplaceAll([]byte(s), []byte("&#43;"), []byte("+"))
		if got := plainPlus([]byte(s)); !bytes.Equal(got, want) {
			t.Errorf("plainPlus(%q) = %q, want %q", s, got, want)
		}
	}
	for _, s := range []string{"", "<svg>", "<image x/><image y/>", "font-family:Liberation Sans;<image a/>font-family:Liberation Sans;",
		"<imagefont-family:Liberation Sans; <image ", "<image <image font-family:Liberation Sans;font-family:Liberation Sans;"} {
		want := []byte(s)
		for _, f := range svgFixes {
			want = bytes.ReplaceAll(want, f[0], f[1])
		}
		if got := fixSVG([]byte(s)); !bytes.Equal(got, want) {
			t.Errorf("fixSVG(%q) = %q, want %q", s, got, want)
		}
	}
}
