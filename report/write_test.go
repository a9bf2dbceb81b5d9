package report

import (
	"bytes"
	"errors"
	"fmt"
	"html/template"
	"image/png"
	"os"
	"path/filepath"
	"regexp"
	"strconv"
	"strings"
	"sync"
	"testing"

	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
)

// shared holds one report written from the analysed sample, reused by the
// tests that only read it (writing takes a few seconds: 300 dpi PNGs).
var shared struct {
	once sync.Once
	dir  string
	r    *Results
	err  error
}

// TestMain removes the shared report folder after the tests.
func TestMain(m *testing.M) {
	code := m.Run()
	if shared.dir != "" {
		os.RemoveAll(shared.dir)
	}
	os.Exit(code)
}

// writeSample returns a folder holding the report of the analysed sample
// and the results it was written from. Callers must not change either.
func writeSample(t testing.TB) (string, *Results) {
	t.Helper()
	shared.once.Do(func() {
		r, err := Load(filepath.Join(sampleDir, "sample_results.json"))
		if err == nil {
			err = Analyze(r)
		}
		var dir string
		if err == nil {
			dir, err = os.MkdirTemp("", "areasweep-report-test-")
		}
		if err == nil {
			err = Write(dir, r)
		}
		shared.dir, shared.r, shared.err = dir, r, err
	})
	if shared.err != nil {
		t.Fatal(shared.err)
	}
	return shared.dir, shared.r
}

var figureNames = []string{"metrics_vs_area", "roc_curves", "extent_maps", "ring_steps"}

// TestWriteFiles checks that every file is there, the PNGs decode at a
// readable size, no temp files are left, and a second write is
// byte-identical (deterministic output).
func TestWriteFiles(t *testing.T) {
	dir, r := writeSample(t)
	want := []string{"report.html", "methods.md"}
	for _, f := range figureNames {
		for _, ext := range figureFormats {
			want = append(want, filepath.Join("figures", f+"."+ext))
		}
	}
	first := map[string][]byte{}
	for _, name := range want {
		data, err := os.ReadFile(filepath.Join(dir, name))
		if err != nil {
			t.Fatalf("missing %s: %v", name, err)
		}
		first[name] = data
		if strings.HasSuffix(name, ".png") {
			img, err := png.Decode(bytes.NewReader(data))
			if err != nil {
				t.Fatalf("%s: %v", name, err)
			}
			// 300 dpi at one or two journal columns (85 or 175 mm).
			if b := img.Bounds(); b.Dx() != 1004 && b.Dx() != 2067 {
				t.Errorf("%s is %d pixels wide, want 1004 or 2067 (85 or 175 mm at 300 dpi)", name, b.Dx())
			}
		}
		if strings.HasSuffix(name, ".pdf") && !bytes.HasPrefix(data, []byte("%PDF-")) {
			t.Errorf("%s is not a PDF", name)
		}
		if strings.HasSuffix(name, ".svg") && !bytes.Contains(data, []byte("<svg")) {
			t.Errorf("%s is not an SVG", name)
		}
	}
	for _, sub := range []string{dir, filepath.Join(dir, "figures")} {
		ents, _ := os.ReadDir(sub)
		for _, e := range ents {
			if strings.Contains(e.Name(), ".tmp-") {
				t.Errorf("temp file left: %s", e.Name())
			}
		}
	}
	// Same Results, second folder: identical bytes.
	dir2 := t.TempDir()
	if err := Write(dir2, r); err != nil {
		t.Fatal(err)
	}
	for _, name := range want {
		data, _ := os.ReadFile(filepath.Join(dir2, name))
		if !bytes.Equal(data, first[name]) {
			t.Errorf("%s differs between two writes of the same results", name)
		}
	}
}

// TestIsFigureFile checks IsFigureFile against the files a report writes
// into figures/ (every one is recognised, so --force may replace them)
// and against names it never writes (a user's own file there is kept).
func TestIsFigureFile(t *testing.T) {
	dir, _ := writeSample(t)
	ents, err := os.ReadDir(filepath.Join(dir, "figures"))
	if err != nil || len(ents) == 0 {
		t.Fatalf("figures/ of the sample report: %d files, %v", len(ents), err)
	}
	for _, e := range ents {
		if !IsFigureFile(e.Name()) {
			t.Errorf("the report wrote figures/%s, which IsFigureFile does not recognise", e.Name())
		}
	}
	for _, name := range []string{"ring_steps_2.svg", "ring_steps_12.pdf", "model_minus_null.png"} {
		if !IsFigureFile(name) {
			t.Errorf("IsFigureFile(%q) = false, want true", name)
		}
	}
	for _, name := range []string{"my_figure.png", "roc_curves.jpg", "roc_curves", "ring_steps_1.svg",
		"ring_steps_02.svg", "ring_steps_x.png", "ring_steps_.png", ".roc_curves.svg.tmp-123", "metrics_vs_area.svg.bak"} {
		if IsFigureFile(name) {
			t.Errorf("IsFigureFile(%q) = true, want false", name)
		}
	}
}

// TestWriteErrors covers the contract violations a caller can make.
func TestWriteErrors(t *testing.T) {
	r := loadSample(t)
	cases := []struct {
		name string
		dir  string
		r    *Results
		want string
	}{
		{"nil results", t.TempDir(), nil, "nil results"},
		{"not analysed", t.TempDir(), r, "call Analyze first"},
		{"missing folder", filepath.Join(t.TempDir(), "nope"), analyzedSample(t), "output folder"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			err := Write(c.dir, c.r)
			if err == nil || !strings.Contains(err.Error(), c.want) || !strings.HasPrefix(err.Error(), "report: ") {
				t.Errorf("err = %v, want %q", err, c.want)
			}
		})
	}
}

// urlAttr finds src/href/xlink:href attribute values and CSS url(...).
var urlAttr = regexp.MustCompile(`(?i)(?:\s(?:src|href|xlink:href|action|poster|srcset)\s*=\s*["']?([^"'\s>]*))|url\(\s*["']?([^"')]*)`)

// TestHTMLSelfContained checks the static page: no external URL in any
// src/href/url(), a Content-Security-Policy forbidding fetches, every figure
// inlined by id, the data block and the headline present.
func TestHTMLSelfContained(t *testing.T) {
	dir, r := writeSample(t)
	page, err := os.ReadFile(filepath.Join(dir, "report.html"))
	if err != nil {
		t.Fatal(err)
	}
	html := string(page)
	for _, m := range urlAttr.FindAllStringSubmatch(html, -1) {
		v := m[1] + m[2]
		if v == "" || strings.HasPrefix(v, "#") || strings.HasPrefix(v, "data:") {
			continue
		}
		t.Errorf("external or relative reference in report.html: %q", m[0])
	}
	for _, bad := range []string{"<link", "@import", "<iframe", "<object", "<embed"} {
		if strings.Contains(html, bad) {
			t.Errorf("report.html contains %s", bad)
		}
	}
	if !strings.Contains(html, `Content-Security-Policy" content="default-src 'none'`) {
		t.Error("no Content-Security-Policy blocking fetches")
	}
	for _, f := range figureNames {
		if !strings.Contains(html, `<svg id="fig-`+f+`"`) {
			t.Errorf("figure %s not inlined", f)
		}
	}
	for _, id := range []string{`id="fig-teach"`, `id="sel-model"`, `id="sel-extent"`, `<script type="application/json" id="report-data">`, `class="sortable"`} {
		if !strings.Contains(html, id) {
			t.Errorf("report.html lacks %s", id)
		}
	}
	if !strings.Contains(html, htmlEscape(r.Sensitivity.Headline)) {
		t.Error("headline missing")
	}
	if strings.Index(html, `id="summary"`) > strings.Index(html, `id="figures"`) || strings.Index(html, `id="figures"`) > strings.Index(html, `id="scores"`) {
		t.Error("order must be summary, figures, tables")
	}
	// Every extent, including skipped ones, and every input checksum is listed.
	for _, e := range r.Extents {
		if !strings.Contains(html, ">"+e.ID+"<") {
			t.Errorf("extent %s not listed", e.ID)
		}
	}
	for _, in := range r.Inputs {
		if !strings.Contains(html, in.SHA256) {
			t.Errorf("checksum of %s not listed", in.Path)
		}
	}
	if m := regexp.MustCompile(`(^|[^A-Za-z])NaN|[+-]Inf|Infinity`).FindString(html); m != "" {
		t.Errorf("NaN/Inf in report: %q", m)
	}
}

// TestMethodsText checks that methods.md carries this run's numbers.
func TestMethodsText(t *testing.T) {
	dir, r := writeSample(t)
	data, err := os.ReadFile(filepath.Join(dir, "methods.md"))
	if err != nil {
		t.Fatal(err)
	}
	md := string(data)
	auc := r.Sensitivity.findSpread("auc", "good")
	want := []string{
		"## Methods", "## Reply to a reviewer",
		r.Software.Name + " " + r.Software.Version,
		"E = 0.05 and 0.1", "published bootstrap of " + strconv.Itoa(r.Settings.Iterations) + " resamples", "50% of the test records",
		"seed " + strconv.FormatUint(r.Seed, 10),
		"base (the base extent, the study region as given: study region polygon; " + fmtArea(r.Extents[0].AreaKm2) + " km²)",
		"AUC of good ranged " + f3(auc.Min) + "–" + f3(auc.Max),
		"evaluation aids", "evaluation extents",
		"Hanley & McNeil 1982", "Anderson et al. 2003", "DeLong et al. (1988)", "Hirzel et al. 2006", "Peterson et al. 2008",
		"presences' own cells are part of that background", "x_E, the share of the area where the curve reaches 1 − E, interpolated linearly", "4096-bin histogram",
		strconv.Itoa(r.Settings.PairedResamples) + " full-size resamples", "AUC ±0.02", "differ in their test records",
	}
	for _, w := range want {
		if !strings.Contains(md, w) {
			t.Errorf("methods.md lacks %q", w)
		}
	}
	for _, bad := range []string{"calibration extent", "same test records", "chi-square"} {
		if strings.Contains(md, bad) {
			t.Errorf("methods.md says %q", bad)
		}
	}
}

// TestMaskEdges checks the outline of a small mask against a hand count.
func TestMaskEdges(t *testing.T) {
	// 3x3 grid, an L-shaped mask of 3 cells:
	//   X . .
	//   X X .
	//   . . .
	// Perimeter of the L = 8 unit edges (hand count).
	m := []bool{true, false, false, true, true, false, false, false, false}
	var total float64
	for _, s := range maskEdges(m, 3, 3) {
		total += (s[2] - s[0]) + (s[3] - s[1])
	}
	if total != 8 {
		t.Errorf("outline length %v, want 8", total)
	}
	// A full grid is outlined by the grid border: 4 merged runs of 3.
	full := []bool{true, true, true, true, true, true, true, true, true}
	if segs := maskEdges(full, 3, 3); len(segs) != 4 {
		t.Errorf("full mask gives %d runs, want 4", len(segs))
	}
}

// TestFormatting checks the number formats used in sentences.
func TestFormatting(t *testing.T) {
	cases := []struct{ got, want string }{
		{fmtArea(84922), "84,900"},
		{fmtArea(231212.4), "231,000"},
		{fmtArea(41.23), "41.2"},
		{fmtArea(1234), "1,230"},
		{areaRange(28232, 231212), "from 28.2 to 231 thousand km²"},
		{areaRange(1200, 40000), "from 1.2 to 40 thousand km²"},
		{areaRange(120, 9800), "from 120 to 9,800 km²"},
		{areaRange(391788.6, 3251635.3), "from 392 to 3,250 thousand km²"}, // three significant digits, as fmtArea
		{signed3(0.0312), "+0.031"},
		{signed3(-0.0004), "+0.000"},
		{pct(0.714), "71%"},
	}
	for _, c := range cases {
		if c.got != c.want {
			t.Errorf("got %q, want %q", c.got, c.want)
		}
	}
}

func BenchmarkWrite_3models10extents(b *testing.B) {
	r := analyzedSample(b)
	dir := b.TempDir()
	b.ReportAllocs()
	for b.Loop() {
		if err := Write(dir, r); err != nil {
			b.Fatal(err)
		}
	}
}

// TestThresholdTable checks the long threshold-test table: its spelled-out
// headers, one row per scored model, extent and rule, "k of n" matching
// the results (missed = n - successes), and that no page, methods text or
// figure shortens "partial ROC".
func TestThresholdTable(t *testing.T) {
	dir, r := writeSample(t)
	page, err := os.ReadFile(filepath.Join(dir, "report.html"))
	if err != nil {
		t.Fatal(err)
	}
	html := string(page)
	tbl := regexp.MustCompile(`(?s)<table class="sortable" id="tbl-thresholds">(.*?)</table>`).FindStringSubmatch(html)
	if tbl == nil {
		t.Fatal("no threshold tests table")
	}
	for _, h := range []string{"rule", "cut value", "test records missed (k of n)", "share of the extent at or above the cut", "one-sided binomial P"} {
		if !strings.Contains(tbl[1], `<th scope="col">`+h+`</th>`) {
			t.Errorf("threshold table lacks header %q", h)
		}
	}
	rows := regexp.MustCompile(`(?s)<tr><td>([^<]*)</td><td>([^<]*)</td><td>([^<]*)</td><td[^>]*>[^<]*</td><td[^>]*>(\d+) of (\d+)</td>`).FindAllStringSubmatch(tbl[1], -1)
	want := 0
	for _, sc := range r.Scores {
		if !sc.Scored {
			continue
		}
		for _, th := range sc.Thresholds {
			want++
			found := false
			for _, row := range rows {
				if row[1] == sc.Model && row[2] == sc.Extent && row[3] == ruleName(th) {
					found = true
					if row[4] != strconv.Itoa(th.N-th.Successes) || row[5] != strconv.Itoa(th.N) {
						t.Errorf("%s on %s, %s: %s of %s, want %d of %d", sc.Model, sc.Extent, row[3], row[4], row[5], th.N-th.Successes, th.N)
					}
				}
			}
			if !found {
				t.Errorf("no row for %s on %s, %s", sc.Model, sc.Extent, ruleName(th))
			}
		}
	}
	if len(rows) != want || want == 0 {
		t.Errorf("%d threshold rows, want %d", len(rows), want)
	}
	files := []string{"report.html", "methods.md"}
	for _, f := range figureNames {
		files = append(files, filepath.Join("figures", f+".svg"))
	}
	for _, f := range files {
		data, err := os.ReadFile(filepath.Join(dir, f))
		if err != nil {
			t.Fatal(err)
		}
		if m := regexp.MustCompile(`(?i)\bp\s?roc\b`).Find(data); m != nil {
			t.Errorf("%s shortens partial ROC to %q", f, m)
		}
	}
}

// TestWriteFiguresError: a figure that fails to draw gives its error (the
// first in figure order, whatever finished first), the page is not built,
// and the figures drawn without error are written.
func TestWriteFiguresError(t *testing.T) {
	r := analyzedSample(t)
	good := metricsFigure(r)
	fail := func(name string) figure {
		f := good
		f.Name = name
		f.draw = func(draw.Canvas) error { return errors.New("cannot draw " + name) }
		return f
	}
	dir := t.TempDir()
	called := false
	err := writeFigures(dir, []figure{good, fail("a"), fail("b")}, func([]renderedFigure) error {
		called = true
		return nil
	})
	if err == nil || err.Error() != "cannot draw a" {
		t.Errorf("error %v, want the first figure's (cannot draw a)", err)
	}
	if called {
		t.Error("the page was built without every figure")
	}
	for _, format := range figureFormats {
		if _, err := os.Stat(filepath.Join(dir, good.Name+"."+format)); err != nil {
			t.Errorf("%s.%s not written: %v", good.Name, format, err)
		}
		if _, err := os.Stat(filepath.Join(dir, "a."+format)); err == nil {
			t.Errorf("a.%s written", format)
		}
	}
}

// TestWriteFiguresPanic: a figure whose drawing panics (a bug) gives an
// error naming it instead of ending the program from a goroutine.
func TestWriteFiguresPanic(t *testing.T) {
	r := analyzedSample(t)
	bad := metricsFigure(r)
	bad.Name = "bad"
	bad.draw = func(draw.Canvas) error { panic("out of range") }
	err := writeFigures(t.TempDir(), []figure{metricsFigure(r), bad}, func([]renderedFigure) error { return nil })
	if err == nil || !strings.Contains(err.Error(), "figure bad (svg): internal error: out of range") {
		t.Errorf("error %v, want the SVG's internal error", err)
	}
}

// TestSpliceSVGs builds the sample's page with the figures' SVGs spliced
// in after the template (htmlPage) and with the SVGs given to the
// template itself, and wants the same bytes.
func TestSpliceSVGs(t *testing.T) {
	r := analyzedSample(t)
	var figs []renderedFigure
	for _, f := range figures(r) {
		svg, err := render(f, "svg")
		if err != nil {
			t.Fatal(err)
		}
		figs = append(figs, renderedFigure{fig: f, svg: svg})
	}
	got, err := htmlPage(r, figs, methodsDoc{Intro: "methods"})
	if err != nil {
		t.Fatal(err)
	}
	v, err := newPageView(r, figs, methodsDoc{Intro: "methods"}, func(i int) template.HTML {
		return template.HTML(appendInlineSVG(nil, figs[i].svg, "fig-"+figs[i].fig.Name, figs[i].fig.Title, figs[i].fig.W))
	})
	if err != nil {
		t.Fatal(err)
	}
	var want bytes.Buffer
	if err := pageTemplate.Execute(&want, v); err != nil {
		t.Fatal(err)
	}
	if !bytes.Equal(got, plainPlus(want.Bytes())) {
		t.Errorf("page of %d bytes with the SVGs spliced in, %d through the template", len(got), want.Len())
	}
	if len(figs) < 3 || !bytes.Contains(got, appendInlineSVG(nil, figs[2].svg, "fig-"+figs[2].fig.Name, figs[2].fig.Title, figs[2].fig.W)) {
		t.Error("the third figure's SVG is not on the page")
	}
}

// TestInlineSVGWidth: every figure was shown up to 1000 px wide, so a
// one-column figure (85 mm: the ROC curves of a run with one model and
// no null, the map of one panel) was scaled twice as much as a
// two-column one (175 mm) and its 8 pt labels read as about 33 px type
// beside 16 px body text. A figure narrower than two columns now carries
// a max-width in proportion to its print width; a two-column one is
// left to the style sheet's 1000 px.
func TestInlineSVGWidth(t *testing.T) {
	svg := []byte(`<?xml version="1.0"?>` + "\n" + `<svg width="10pt" height="10pt"></svg>`)
	for _, tc := range []struct {
		w    vg.Length
		want string
	}{
		{oneColumn, `<svg id="f" class="figure" role="img" aria-label="F" style="max-width:486px" width="10pt"`},
		{twoColumns, `<svg id="f" class="figure" role="img" aria-label="F" width="10pt"`},
	} {
		got := string(appendInlineSVG(nil, svg, "f", "F", tc.w))
		if !strings.HasPrefix(got, tc.want) {
			t.Errorf("width %.0f mm: %s, want it to start %s", tc.w/vg.Millimeter, got, tc.want)
		}
	}
	// 486 px is 1000 px × 85/175 (worked by hand), the style sheet's
	// width for two columns scaled to one.
	if css, err := os.ReadFile("page/report.css"); err != nil || !strings.Contains(string(css), fmt.Sprintf("max-width: %dpx", pageFigurePx)) {
		t.Errorf("page/report.css does not give svg.figure max-width %d px (%v)", pageFigurePx, err)
	}
}
