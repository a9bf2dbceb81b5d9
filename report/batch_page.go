package report

import (
	"bytes"
	_ "embed"
	"fmt"
	"html/template"
	"net/url"
	"strings"
)

//go:embed batch.html.tmpl
var batchPageSource string

// batchPage is the summary page's template, parsed once.
var batchPage = template.Must(template.New("summary").Parse(batchPageSource))

// pageRow is one line of the studies table: a study and model, or a
// failed study.
type pageRow struct {
	Study, Link, Model, Base           string
	Failed                             bool
	Error                              string
	Extents                            int
	AUCBase, TestPoints, Range, Effect string
	Interval, Verdict                  string
	// NotJudged marks an undetermined verdict with no judged difference.
	NotJudged                   bool
	Null, NullInterval, Reading string
}

// pageData is what the template reads.
type pageData struct {
	Software      string
	Counts        BatchCounts
	CountSentence string
	Definition    string
	SVG           template.HTML
	FigureName    string
	Caption       string
	NoEffect      []string
	Rows          []pageRow
	Failed        []StudySummary
	// Warned are the studies with results that warned, in study order.
	Warned  []StudySummary
	Methods []textSection
}

// studyLink turns a study's relative report path into a link: each path
// element escaped, so that an id never breaks out of the attribute or
// turns into a scheme.
func studyLink(rel string) string {
	if rel == "" {
		return ""
	}
	parts := strings.Split(rel, "/")
	for i, p := range parts {
		parts[i] = url.PathEscape(p)
	}
	return "./" + strings.Join(parts, "/")
}

// page renders summary.html with the figure's SVG (nil when there is no
// figure) inlined.
func (s *BatchSummary) page(svg []byte) ([]byte, error) {
	sw := strings.TrimSpace(s.Software.Name + " " + s.Software.Version)
	if sw == "" {
		sw = "areasweep"
	}
	d := pageData{Software: sw, Counts: s.Counts, CountSentence: s.CountSentence(), Definition: ExtentSensitiveDefinition,
		FigureName: EffectFigure, Methods: s.methodsSections()}
	if f, ok := effectFigure(s); ok && svg != nil {
		d.SVG = template.HTML(inlineFigureSVG(svg, "fig-"+EffectFigure, f.Title))
		d.Caption = f.Caption
	}
	drawn := map[string]bool{}
	for _, id := range s.EffectOrder() {
		drawn[id] = true
	}
	next := 0
	for _, st := range s.Studies {
		if !st.OK {
			d.Failed = append(d.Failed, st)
			d.Rows = append(d.Rows, pageRow{Study: st.ID, Failed: true, Error: st.Error})
			continue
		}
		if !drawn[st.ID] {
			d.NoEffect = append(d.NoEffect, st.ID)
		}
		if len(st.Warnings) > 0 {
			d.Warned = append(d.Warned, st)
		}
		for ; next < len(s.Rows) && s.Rows[next].Study == st.ID; next++ {
			pr := pageRowOf(s.Rows[next], studyLink(st.Report))
			if st.StandIn != "" {
				pr.Base += " (stands in for the base extent: " + st.StandIn + ")"
			}
			if pr.Verdict == string(JudgementUndetermined) && !s.Rows[next].Judged {
				pr.NotJudged = true
			}
			d.Rows = append(d.Rows, pr)
		}
	}
	var b bytes.Buffer
	if err := batchPage.Execute(&b, d); err != nil {
		return nil, fmt.Errorf("report: write %s: %w", SummaryHTML, err)
	}
	return b.Bytes(), nil
}

// pageRowOf formats one study and model for the table.
func pageRowOf(r BatchRow, link string) pageRow {
	const none = "–"
	pr := pageRow{Study: r.Study, Link: link, Model: r.Model, Base: r.BaseExtent, Extents: r.Extents, Verdict: string(r.Verdict),
		AUCBase: none, TestPoints: none, Range: none, Effect: none, Interval: none, Null: none, NullInterval: none, Reading: none}
	if r.AUCBaseDefined {
		pr.AUCBase = f3(r.AUCBase)
	}
	if r.TestPointsKnown {
		pr.TestPoints = fmt.Sprint(r.TestPoints)
	}
	if r.Extents > 0 {
		pr.Range = f3(r.AUCMin) + "–" + f3(r.AUCMax)
	}
	if r.EffectDefined {
		// signedSmall: a difference of 0.0002 reads "+0.0002", not
		// "+0.000", and an interval's ends show on which side of 0 and
		// of the tolerance they lie, as in each study's report.
		pr.Effect = signedSmall(r.Effect) + " (" + r.EffectExtent + ", " + fmt.Sprint(r.EffectPoints) + " common)"
		pr.Interval = signedSmall(r.EffectLow, r.Tolerance, -r.Tolerance) + " to " + signedSmall(r.EffectHigh, r.Tolerance, -r.Tolerance)
		if r.EffectNotJudged != "" {
			// A description: the interval of a difference not judged is
			// not shown as if it were inference.
			pr.Interval = "not judged (" + r.EffectNotJudged + ")"
		}
	}
	if r.Null != "" {
		pr.Reading = strings.ReplaceAll(r.NullReading, "_", " ")
		if r.nullSame() {
			pr.Reading = "the same (every paired difference 0)"
		}
		if r.NullNoSkill != "" {
			// As in the study's own tables (readingWords).
			pr.Reading += noSkillTag(r.NullNoSkill, 0.5)
		}
	}
	if r.NullDefined {
		pr.Null = signedSmall(r.NullDiff) + " (" + r.Null + ")"
		pr.NullInterval = signedSmall(r.NullLow) + " to " + signedSmall(r.NullHigh)
		if r.NullNotJudged != "" {
			pr.NullInterval = "not judged (" + r.NullNotJudged + ")"
		}
	}
	return pr
}

// inlineFigureSVG prepares an SVG document for inlining: drops what comes
// before the root element and gives it an id, a class, a role and a label.
func inlineFigureSVG(svg []byte, id, label string) string {
	s := string(svg)
	if i := strings.Index(s, "<svg"); i >= 0 {
		s = s[i:]
	}
	attrs := fmt.Sprintf(`<svg id="%s" class="figure" role="img" aria-label="%s"`, template.HTMLEscapeString(id), template.HTMLEscapeString(label))
	return strings.Replace(s, "<svg", attrs, 1)
}
