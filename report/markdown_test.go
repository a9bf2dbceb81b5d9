package report

import (
	"encoding/json"
	"errors"
	"html"
	"os"
	"path/filepath"
	"regexp"
	"strings"
	"testing"
)

// mdUnescape undoes CommonMark's backslash escapes (spec 0.31.2, section
// 2.4: a backslash before ASCII punctuation stands for that character):
// what a Markdown viewer shows of text mdText wrote, for text with no
// other Markdown in it.
func mdUnescape(s string) string {
	var b strings.Builder
	for i := 0; i < len(s); i++ {
		if s[i] == '\\' && i+1 < len(s) && strings.IndexByte("!\"#$%&'()*+,-./:;<=>?@[\\]^_`{|}~", s[i+1]) >= 0 {
			i++
		}
		b.WriteByte(s[i])
	}
	return b.String()
}

// TestMDText: each character that could start Markdown is escaped where it
// could, and left alone where it cannot (so that the raw file stays as
// readable as the sentence); what a viewer shows, the text with its
// backslash escapes undone, is the text given. Expected outputs worked by
// hand from the CommonMark spec 0.31.2 (emphasis flanking rules 6.2, raw
// HTML 6.6, entities 2.5, block starts 4-5) and GitHub's tables and
// strikethrough.
func TestMDText(t *testing.T) {
	cases := []struct{ in, want string }{
		{"region_100km and x_E", "region_100km and x_E"}, // intraword: no emphasis
		{"_gbm_ model", `\_gbm\_ model`},
		{"a*b*", `a\*b\*`},
		{"<b>bold</b>", `\<b>bold\</b>`},
		{"P < 0.001 and a > b", "P < 0.001 and a > b"}, // no tag, not at a line start
		{"<!-- c -->", `\<!-- c -->`},
		{"`code`", "\\`code\\`"},
		{"[link](x)", `\[link\](x)`},
		{"a | b", `a \| b`},
		{"~~gone~~", `\~\~gone\~\~`},
		{"&amp; &#38; and D. & P.", `\&amp; \&#38; and D. & P.`},
		{`C:\data\m.tif`, `C:\\data\\m.tif`},
		{"# heading", `\# heading`},
		{"x # y", "x # y"},
		{"> quote", `\> quote`},
		{"- item", `\- item`},
		{"+ item", `\+ item`},
		{"===", `\===`},
		{"1. item", `1\. item`},
		{"12) item", `12\) item`},
		{"1.5 km", "1.5 km"},
		{"-50 km", `\-50 km`},
		{"a\n# b\n- c", "a\n\\# b\n\\- c"},
		{"über_ß", "über_ß"}, // letters beyond ASCII are letters too
	}
	for _, c := range cases {
		got := mdText(c.in)
		if got != c.want {
			t.Errorf("mdText(%q) = %q, want %q", c.in, got, c.want)
		}
		if back := mdUnescape(got); back != c.in {
			t.Errorf("mdText(%q) reads back as %q", c.in, back)
		}
	}
}

// weirdName holds every character mdText escapes, in positions where it
// would otherwise mean Markdown.
const weirdName = "a<b>*c*_d_`e`[f](g)|h&amp;~i~\\j"

// weirdEscaped is weirdName as methods.md must write it (worked by hand).
const weirdEscaped = "a\\<b>\\*c\\*\\_d\\_\\`e\\`\\[f\\](g)\\|h\\&amp;\\~i\\~\\\\j"

// TestMethodsMarkdownEscaped: methods.md writes a model name holding
// Markdown's special characters escaped, so that a viewer shows the name
// (before, it was written raw: "<b>" read as a tag, "*c*" as emphasis),
// while the report page's sentences keep the name as it is.
func TestMethodsMarkdownEscaped(t *testing.T) {
	data := sampleRenamed(t, weirdName)
	r := &Results{}
	if err := json.Unmarshal(data, r); err != nil {
		t.Fatal(err)
	}
	analyzed(t, r)
	md := methodsText(r)
	if mdText(weirdName) != weirdEscaped {
		t.Fatalf("mdText(%q) = %q, want %q", weirdName, mdText(weirdName), weirdEscaped)
	}
	if !strings.Contains(md, weirdEscaped) {
		t.Errorf("methods.md lacks the escaped name %q", weirdEscaped)
	}
	if strings.Contains(md, weirdName) {
		t.Errorf("methods.md writes the name %q raw", weirdName)
	}
	if !strings.Contains(mdUnescape(md), "AUC of "+weirdName+" ranged") {
		t.Error("methods.md does not read back as the name")
	}
	for _, heading := range []string{"# Methods text (", "\n## Methods\n", "\n## Reply to a reviewer\n", "\n## References\n\n- "} {
		if !strings.Contains(md, heading) {
			t.Errorf("methods.md lacks its own Markdown %q", heading)
		}
	}
	if !strings.Contains(r.Sensitivity.Headline, weirdName) {
		t.Error("the page's headline does not hold the name as it is")
	}
}

// TestSummaryMethodsMarkdownEscaped: summary_methods.md escapes the study
// ids and errors of its failed list, "#" at an item's start included,
// while summary.csv keeps them as they are.
func TestSummaryMethodsMarkdownEscaped(t *testing.T) {
	s, err := Summarize([]StudyResult{
		{ID: "#1", Err: errors.New("open <models>/m*1*.tif: no such file")},
		{ID: "ok_", Results: handStudy(DefaultToleranceAUC, handModel{name: "m1", aucs: map[string]float64{"base": 0.8, "wide": 0.85},
			effects: []effect{{"wide", 0.05, 0.03, 0.07}}, points: 40})},
	})
	if err != nil {
		t.Fatal(err)
	}
	md := s.MethodsText()
	checkWords(t, "summary_methods.md", md, []string{"\n- \\#1: open \\<models>/m\\*1\\*.tif: no such file\n"}, []string{"open <models>", "m*1*"})
	if !strings.Contains(mdUnescape(md), "- #1: open <models>/m*1*.tif: no such file") {
		t.Error("summary_methods.md does not read back as the error")
	}
	recs := csvRecords(t, s.WriteCSV)
	if recs[1][0] != "#1" || !strings.Contains(strings.Join(recs[1], ","), "<models>/m*1*.tif") {
		t.Errorf("summary.csv row %q", recs[1])
	}
}

// TestPageMethodsShowNames: report.html's "Methods text" showed
// methods.md as it is, so a reader saw a model named "a*b" as "a\*b", the
// backslash that only a Markdown viewer drops. The page shows the text a
// viewer of methods.md shows: the name as the user wrote it (escaped for
// HTML, never read as a tag, an entity or emphasis), the headings as
// headings and the references as a list, with no Markdown marks left.
func TestPageMethodsShowNames(t *testing.T) {
	r := analyzedJSON(t, sampleRenamed(t, weirdName))
	dir := t.TempDir()
	if err := Write(dir, r); err != nil {
		t.Fatal(err)
	}
	page, err := os.ReadFile(filepath.Join(dir, "report.html"))
	if err != nil {
		t.Fatal(err)
	}
	_, sec, ok := strings.Cut(string(page), `<section id="methods">`)
	sec, _, ok2 := strings.Cut(sec, "</section>")
	if !ok || !ok2 {
		t.Fatal("report.html has no methods section")
	}
	// Every tag in the section is one the page writes itself: the name's
	// "<b>" must arrive as text, not as a tag.
	for _, tag := range regexp.MustCompile(`<[^>]*>`).FindAllString(sec, -1) {
		switch strings.Fields(strings.Trim(tag, "<>/"))[0] {
		case "h2", "h3", "p", "ul", "li", "div":
		default:
			t.Errorf("methods section holds the tag %s", tag)
		}
	}
	text := html.UnescapeString(regexp.MustCompile(`<[^>]*>`).ReplaceAllString(sec, "\n"))
	if want := "AUC of " + weirdName + " ranged"; !strings.Contains(text, want) {
		t.Errorf("the page's methods text lacks %q as written", want)
	}
	if esc := mdText(weirdName); strings.Contains(text, esc) {
		t.Errorf("the page's methods text shows the Markdown escapes %q", esc)
	}
	for _, mark := range []string{"\n# ", "\n## ", "\n- "} {
		if strings.Contains(text, mark) {
			t.Errorf("the page's methods text shows the Markdown mark %q", mark)
		}
	}
	for _, h := range []string{"<h3>Methods</h3>", "<h3>Reply to a reviewer</h3>", "<h3>References</h3>", "<ul><li>Anderson, R.P."} {
		if !strings.Contains(sec, h) {
			t.Errorf("methods section lacks %q", h)
		}
	}
}

// sampleRenamed is the sample's results.json text with its model "good"
// renamed name.
func sampleRenamed(t *testing.T, name string) []byte {
	t.Helper()
	data, err := json.Marshal(loadSample(t))
	if err != nil {
		t.Fatal(err)
	}
	quoted, _ := json.Marshal(name)
	return []byte(strings.ReplaceAll(string(data), `"good"`, string(quoted)))
}
