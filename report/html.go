package report

import (
	"bytes"
	"embed"
	"fmt"
	"html"
	"html/template"
	"math"
	"strconv"
	"strings"

	"gonum.org/v1/plot/vg"

	"areasweep/extent/vocab"
)

// pageFiles are the page template and the style and scripts it inlines:
//
//   - report.html.tmpl: the page (html/template, so every value is escaped
//     for its context);
//   - errors.js runs first, in <head>: it records every script error,
//     unhandled rejection, console.error call and Content-Security-Policy
//     violation into the data-errors attribute of <html>, so that a
//     headless browser's DOM dump shows them;
//   - report.css is the page style: plain, print-friendly, no web fonts;
//   - report.js makes tables sortable and drives the extent selector. It
//     reads the data embedded in <script type="application/json"
//     id="report-data">, honours a fragment such as #extent=ID&model=NAME,
//     and writes the shown AUC into data attributes of #teach-numbers
//     (checked by the tests).
//
//go:embed page/report.html.tmpl page/errors.js page/report.css page/report.js
var pageFiles embed.FS

// pageTemplate is report.html.tmpl, parsed once.
var pageTemplate = template.Must(template.New("report.html.tmpl").
	Funcs(template.FuncMap{"plural": Plural}).
	ParseFS(pageFiles, "page/report.html.tmpl"))

// pageAsset returns an embedded file; the names are fixed above, so a
// missing one is a build mistake.
func pageAsset(name string) string {
	b, err := pageFiles.ReadFile("page/" + name)
	if err != nil {
		panic("report: embedded page file: " + err.Error())
	}
	return string(b)
}

var (
	errorCaptureJS = template.JS(pageAsset("errors.js"))
	reportCSS      = template.CSS(pageAsset("report.css"))
	reportJS       = template.JS(pageAsset("report.js"))
)

// htmlEscape escapes the label appendInlineSVG writes into an SVG's attributes;
// everything else on the page is escaped by html/template.
func htmlEscape(s string) string { return html.EscapeString(s) }

// cell is one table cell: its text and, for numbers, the sort value.
type cell struct {
	text string
	num  float64
	isN  bool
	cls  string
}

// DataV is the sort value written to the data-v attribute.
func (c cell) DataV() string { return strconv.FormatFloat(c.num, 'g', 17, 64) }

func tc(s string) cell { return cell{text: s} }

func nc(v float64, dec int) cell {
	s := strconv.FormatFloat(v, 'f', dec, 64)
	if strings.Trim(s, "-0.") == "" {
		s = strings.TrimPrefix(s, "-") // no negative zero, as f3 and f4
	}
	return cell{text: s, num: v, isN: true, cls: "n"}
}

func ic(v int) cell { return cell{text: strconv.Itoa(v), num: float64(v), isN: true, cls: "n"} }

func areaCell(v float64) cell { return cell{text: fmtArea(v), num: v, isN: true, cls: "n"} }

// dash is the text of an undefined number.
var dash = cell{text: "–", cls: "n"}

// htmlTable is one sortable table of the page.
type htmlTable struct {
	ID, Caption string
	Head        []string
	Rows        [][]cell
	// foldAt is the most rows shown open; a longer table is folded
	// under a summary line (Fold). 0 means foldRows.
	foldAt int
}

// foldRows is the most rows a table shows before it is folded: at 60
// extents the tables run to hundreds of rows (one per extent at least),
// and the page's sentences and figures disappear between them. A table
// of the demo's 13 extents and three models (39 rows) stays open.
const foldRows = 40

// Fold is the summary line of a table folded into a <details> element,
// or "" for a table shown open.
func (t htmlTable) Fold() string {
	at := t.foldAt
	if at == 0 {
		at = foldRows
	}
	if len(t.Rows) <= at {
		return ""
	}
	return fmt.Sprintf("Show the table (%d rows; click a column header to sort)", len(t.Rows))
}

// Body renders the rows of the table's body: per cell a td with its class
// and, for a number, its sort value in data-v, the text escaped as
// html/template escapes text and quoted attributes (attrEscape). The
// template's own loop over the cells cost four reflective method calls a
// cell, most of the time of writing the page at 60 extents; the bytes are
// the same (TestPageGolden, TestTableBody).
func (t htmlTable) Body() template.HTML {
	var b strings.Builder
	for _, row := range t.Rows {
		b.WriteString("<tr>")
		for _, c := range row {
			b.WriteString("<td")
			if c.cls != "" {
				b.WriteString(` class="`)
				attrEscape.WriteString(&b, c.cls)
				b.WriteByte('"')
			}
			if c.isN {
				b.WriteString(` data-v="`)
				attrEscape.WriteString(&b, c.DataV())
				b.WriteByte('"')
			}
			b.WriteByte('>')
			attrEscape.WriteString(&b, c.text)
			b.WriteString("</td>")
		}
		b.WriteString("</tr>\n")
	}
	return template.HTML(b.String())
}

// attrEscape is html/template's escaping of a string in text and in a
// quoted attribute value (its htmlReplacementTable; other runes, invalid
// UTF-8 included, are kept).
var attrEscape = strings.NewReplacer("\x00", "\uFFFD", `"`, "&#34;", "&", "&amp;", "'", "&#39;", "+", "&#43;", "<", "&lt;", ">", "&gt;")

// table returns a sortable table with no caption.
func table(id string, head []string, rows [][]cell) htmlTable {
	return htmlTable{ID: id, Head: head, Rows: rows}
}

// notedTable is a table with the paragraph that introduces it.
type notedTable struct {
	Note  string
	Table htmlTable
}

// badge is a verdict with its badge style and sentence.
type badge struct {
	Class    string
	Verdict  string
	Sentence string
}

// verdictBadge is the badge of metric's verdict: "described" for a score
// described, never judged (NotCalibrated between extents), whose
// verdict field is undetermined for want of a test: an "undetermined"
// badge beside "described, not judged" read as a judgement that could
// not be reached (sentence audit of 2026-12-05).
func verdictBadge(metric string, verdict Judgement, sentence string) badge {
	if NotCalibrated(metric, PairedKindExtent) {
		return badge{Class: "described", Verdict: "described", Sentence: sentence}
	}
	return badge{Class: verdictClass(verdict), Verdict: string(verdict), Sentence: sentence}
}

// figureView is one figure of the page.
type figureView struct {
	Number               int
	Name, Title, Caption string
	SVG                  template.HTML // a marker for the SVG (spliceSVGs)
	DPI                  int
	WidthMM              string
}

// pageView is everything report.html.tmpl shows.
type pageView struct {
	ErrorJS, ReportJS template.JS
	CSS               template.CSS

	Software      string
	Seed          uint64
	Models        int
	ScoredExtents int
	Headline      string
	// BaseNote names the extent every difference is taken from, for a
	// reader who meets "difference from base" first in the headline.
	BaseNote string
	Verdicts []badge
	// E lists the partial ROC's allowed omissions ("0.05 and 0.1"), ""
	// without partial ROC; HasDistanceNull says whether the run scored
	// the distance-only null (and so the sorting bias), HasUserNull
	// whether it scored a null of the user's (--null). All for the Terms
	// section, which names only what the page holds.
	E               string
	HasDistanceNull bool
	HasUserNull     bool
	// AboveNullSummary is nil without a null model.
	AboveNullSummary *notedTable
	// Warnings counts RunWarnings and AnalysisWarnings.
	Warnings         int
	RunWarnings      []string
	AnalysisWarnings []string

	Figures  []figureView
	Analysis analysisView
	Scores   scoresView
	Extents  extentsView
	Settings settingsView
	Methods  methodsDoc
	// Data is the selector's JSON (teachData), safe inside <script>.
	Data template.JS
}

// htmlPage builds report.html from the page template.
func htmlPage(r *Results, figs []renderedFigure, methods methodsDoc) ([]byte, error) {
	// The template gets a marker in place of each figure's SVG, which
	// goes in after (spliceSVGs): the SVGs are most of the page (7 MB at
	// 60 extents), and through the template each was copied four times
	// (into a string, into a string with its new root tag, into fmt's
	// buffer, into the page).
	v, err := newPageView(r, figs, methods, func(i int) template.HTML { return template.HTML(svgMarker(i)) })
	if err != nil {
		return nil, err
	}
	b := bytes.NewBuffer(make([]byte, 0, len(v.Data)+1<<20))
	if err := pageTemplate.Execute(b, v); err != nil {
		return nil, fmt.Errorf("report: report.html: %w", err)
	}
	return spliceSVGs(plainPlus(b.Bytes()), figs)
}

// newPageView returns the page's view, with svg(i) as the i-th figure's
// SVG.
func newPageView(r *Results, figs []renderedFigure, methods methodsDoc, svg func(i int) template.HTML) (pageView, error) {
	s := r.Sensitivity
	data, err := teachData(r)
	if err != nil {
		return pageView{}, err
	}
	v := pageView{
		ErrorJS: errorCaptureJS, ReportJS: reportJS, CSS: reportCSS,
		Software:         strings.TrimSpace(r.Software.Name + " " + r.Software.Version),
		Seed:             r.Seed,
		Models:           len(s.ModelNames),
		ScoredExtents:    len(s.ScoredExtents),
		Headline:         s.Headline,
		Warnings:         len(r.Warnings) + len(s.Warnings),
		RunWarnings:      r.Warnings,
		AnalysisWarnings: s.Warnings,
		Analysis:         analysisSection(r),
		Scores:           scoresSection(r),
		Extents:          extentsSection(r),
		Settings:         settingsSection(r),
		Methods:          methods,
		Data:             template.JS(data),
	}
	for _, vd := range s.Verdicts {
		v.Verdicts = append(v.Verdicts, verdictBadge(vd.Metric, vd.Verdict, vd.Sentence))
	}
	if head, rows := aboveNullSummary(r); len(rows) > 0 {
		tb := table("tbl-above-null-summary", head, rows)
		tb.foldAt = summaryFoldRows
		v.AboveNullSummary = &notedTable{Note: aboveNullSummaryNote, Table: tb}
	}
	v.BaseNote = baseNote(r)
	v.E = fmtList(r.Settings.E, "")
	for _, m := range r.Models {
		v.HasDistanceNull = v.HasDistanceNull || (m.IsNull() && m.NullKind == NullDistance)
		v.HasUserNull = v.HasUserNull || (m.IsNull() && m.NullKind != NullDistance)
	}
	for i, rf := range figs {
		v.Figures = append(v.Figures, figureView{
			Number: i + 1, Name: rf.fig.Name, Title: rf.fig.Title, Caption: rf.fig.Caption,
			SVG:     svg(i),
			DPI:     pngDPI,
			WidthMM: strconv.Itoa(int(math.Round(float64(rf.fig.W / vg.Millimeter)))),
		})
	}
	return v, nil
}

// summaryFoldRows is the most rows a table of the summary shows open:
// the summary should fit a screen or two above the figures.
const summaryFoldRows = 20

// baseNote says which extent the differences are taken from, what it is
// and how many test points it holds: "The base extent is base (the
// study region as given, file=region.gpkg; 1,230,000 km²; 90 of the 90
// test points).
// Every difference from base on this page is ...". It is "" when no
// extent was scored.
func baseNote(r *Results) string {
	s := r.Sensitivity
	if s == nil || len(s.ScoredExtents) == 0 {
		return ""
	}
	var e *Extent
	for i := range r.Extents {
		if r.Extents[i].ID == s.BaseExtent {
			e = &r.Extents[i]
		}
	}
	if e == nil {
		return ""
	}
	kind := "kind " + string(e.Kind) + ": "
	if e.Kind == vocab.KindBase {
		kind = "the study region as given, "
	}
	what := fmt.Sprintf("%s%s; %s km²; %d of the %d test point%s", kind, e.Params, fmtArea(e.AreaKm2), e.TestPoints, r.PointCounts.Test, Plural(r.PointCounts.Test))
	if len(s.ScoredExtents) == 1 {
		return fmt.Sprintf("The one scored extent is %s (%s).", e.ID, what)
	}
	lead := fmt.Sprintf("The base extent is %s (%s)", e.ID, what)
	if s.BaseExtent != vocab.BaseID {
		// The extent's description before the stand-in's bracket, not
		// a bracket after a bracket.
		lead = fmt.Sprintf("The reference extent %s (%s)%s", e.ID, what, standInText(s))
	}
	return fmt.Sprintf("%s. Every \"difference from %s\" on this page is a score on another extent minus the score on %s, on the test points both hold; the Extents section lists every extent.",
		lead, e.ID, e.ID)
}

// svgMarker is the text the page template gets in place of the i-th
// figure's SVG: a comment that nothing else on the page holds.
func svgMarker(i int) string { return fmt.Sprintf("<!--areasweep figure %d svg-->", i) }

// spliceSVGs returns page with each figure's svgMarker replaced by the
// figure's SVG as appendInlineSVG prepares it, in one buffer of the final size:
// the bytes the template wrote when it was given the SVGs themselves
// (plainPlus, run before, changes nothing in an SVG: vgsvg escapes '&').
// A marker not found once, in order, is an internal error.
func spliceSVGs(page []byte, figs []renderedFigure) ([]byte, error) {
	size := len(page)
	for _, rf := range figs {
		size += len(rf.svg) + 230 + len(htmlEscape(rf.fig.Title)) // the new root tag
	}
	out := make([]byte, 0, size)
	for i, rf := range figs {
		m := svgMarker(i)
		at := bytes.Index(page, []byte(m))
		if at < 0 {
			return nil, fmt.Errorf("report: report.html: internal error: no place for figure %s", rf.fig.Name)
		}
		out = appendInlineSVG(append(out, page[:at]...), rf.svg, "fig-"+rf.fig.Name, rf.fig.Title, rf.fig.W)
		page = page[at+len(m):]
	}
	return append(out, page...), nil
}

// plainPlus writes back as '+' the "&#43;" that html/template uses for a
// plus sign in text and attribute values (a defence against UTF-7
// sniffing, moot here: the page declares utf-8 before any value). Nothing
// else on the page holds that entity: a literal "&#43;" in a value comes
// out as "&amp;#43;", the inlined SVG is escaped by html.EscapeString
// (gonum's vgsvg) and the JSON by encoding/json (& as \u0026). Signed
// numbers such as "+0.042" so read as typed in the page source, as they
// did before the page moved to html/template.
// It replaces in place (the text only shrinks): the page is megabytes,
// and a copy of it was fresh memory to fault in.
func plainPlus(b []byte) []byte {
	const entity = "&#43;"
	w := 0 // bytes kept so far
	for r := 0; ; {
		i := bytes.Index(b[r:], []byte(entity))
		if i < 0 {
			w += copy(b[w:], b[r:])
			return b[:w]
		}
		w += copy(b[w:], b[r:r+i])
		b[w] = '+'
		w++
		r += i + len(entity)
	}
}

func verdictClass(v Judgement) string {
	switch v {
	case JudgementRobust:
		return "robust"
	case JudgementSensitive:
		return "sensitive"
	}
	return "undetermined"
}
