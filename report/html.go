package report

import (
	"encoding/json"
	"fmt"
	"html"
	"math"
	"strconv"
	"strings"

	"gonum.org/v1/plot/vg"

	"areasweep/metrics"
)

func htmlEscape(s string) string { return html.EscapeString(s) }

// page accumulates HTML.
type page struct{ strings.Builder }

func (p *page) f(format string, a ...any) { fmt.Fprintf(&p.Builder, format, a...) }
func (p *page) s(s string)                { p.WriteString(s) }

// cell is one table cell: its text and, for numbers, the sort value.
type cell struct {
	text string
	num  float64
	isN  bool
	cls  string
}

func tc(s string) cell { return cell{text: s} }

func nc(v float64, dec int) cell {
	return cell{text: strconv.FormatFloat(v, 'f', dec, 64), num: v, isN: true, cls: "n"}
}

func ic(v int) cell { return cell{text: strconv.Itoa(v), num: float64(v), isN: true, cls: "n"} }

func areaCell(v float64) cell { return cell{text: fmtArea(v), num: v, isN: true, cls: "n"} }

// dash is the text of an undefined number.
var dash = cell{text: "–", cls: "n"}

// table writes a sortable table.
func (p *page) table(id, caption string, head []string, rows [][]cell) {
	p.f(`<div class="tablewrap"><table class="sortable" id="%s">`, htmlEscape(id))
	if caption != "" {
		p.f("<caption>%s</caption>", htmlEscape(caption))
	}
	p.s("<thead><tr>")
	for _, h := range head {
		p.f(`<th scope="col">%s</th>`, htmlEscape(h))
	}
	p.s("</tr></thead><tbody>\n")
	for _, r := range rows {
		p.s("<tr>")
		for _, c := range r {
			attr := ""
			if c.cls != "" {
				attr += fmt.Sprintf(` class="%s"`, c.cls)
			}
			if c.isN {
				attr += fmt.Sprintf(` data-v="%s"`, strconv.FormatFloat(c.num, 'g', 17, 64))
			}
			p.f("<td%s>%s</td>", attr, htmlEscape(c.text))
		}
		p.s("</tr>\n")
	}
	p.s("</tbody></table></div>\n")
}

// htmlPage builds report.html.
func htmlPage(r *Results, figs []renderedFigure, methods string) ([]byte, error) {
	s := r.Sensitivity
	var p page
	p.s("<!DOCTYPE html>\n<html lang=\"en\" data-errors=\"\">\n<head>\n<meta charset=\"utf-8\">\n")
	p.s(`<meta http-equiv="Content-Security-Policy" content="default-src 'none'; img-src data:; style-src 'unsafe-inline'; script-src 'unsafe-inline'">` + "\n")
	p.s(`<meta name="viewport" content="width=device-width, initial-scale=1">` + "\n")
	sw := strings.TrimSpace(r.Software.Name + " " + r.Software.Version)
	p.f("<title>%s report: scores across extents</title>\n", htmlEscape(sw))
	p.s("<script>" + errorCaptureJS + "</script>\n")
	p.s("<style>" + reportCSS + "</style>\n</head>\n<body>\n")
	p.f(`<header><h1>How much of the score comes from the extent?</h1><p class="sub">%s · seed %d · %d model%s · %d extents scored</p></header>`+"\n",
		htmlEscape(sw), r.Seed, len(s.ModelNames), plural(len(s.ModelNames)), len(s.ScoredExtents))
	p.s(`<nav aria-label="contents"><a href="#summary">Summary</a> <a href="#figures">Figures</a> <a href="#explore">Explore one extent</a> <a href="#analysis">Analysis</a> <a href="#scores">Scores</a> <a href="#extents">Extents</a> <a href="#settings">Settings and inputs</a> <a href="#warnings">Warnings</a> <a href="#methods">Methods text</a></nav>` + "\n")

	// Summary.
	p.s(`<section id="summary"><h2>Summary</h2>`)
	p.f(`<p class="headline" id="headline">%s</p>`, htmlEscape(s.Headline))
	p.s(`<ul class="verdicts">`)
	for _, v := range s.Verdicts {
		p.f(`<li><span class="badge %s">%s</span> %s</li>`, verdictClass(v.Verdict), htmlEscape(v.Verdict), htmlEscape(v.Sentence))
	}
	p.s("</ul>")
	// Models against the nulls.
	if head, rows := aboveNullSummary(r); len(rows) > 0 {
		p.s(`<h3>Model minus null per extent</h3>`)
		p.f("<p>%s</p>", htmlEscape(aboveNullSummaryNote))
		p.table("tbl-above-null-summary", "", head, rows)
	}
	nw := len(r.Warnings) + len(s.Warnings)
	if nw > 0 {
		p.f(`<p class="warnnote">%d warning%s: see <a href="#warnings">Warnings</a>.</p>`, nw, plural(nw))
	}
	p.s("</section>\n")

	// Figures.
	p.s(`<section id="figures"><h2>Figures</h2>`)
	for i, rf := range figs {
		p.f(`<figure id="figure-%s"><h3>Figure %d. %s</h3>`, rf.fig.Name, i+1, htmlEscape(rf.fig.Title))
		p.s(inlineSVG(rf.svg, "fig-"+rf.fig.Name, rf.fig.Title))
		p.f(`<figcaption>%s`, htmlEscape(rf.fig.Caption))
		if rf.fig.Note != "" {
			p.f(` <span class="note">%s</span>`, htmlEscape(rf.fig.Note))
		}
		p.f(` Files for print: figures/%[1]s.pdf (vector), figures/%[1]s.svg, figures/%[1]s.png (%[2]d dpi), %[3]s mm wide.</figcaption></figure>`+"\n",
			rf.fig.Name, pngDPI, strconv.Itoa(int(math.Round(float64(rf.fig.W/vg.Millimeter)))))
	}
	p.s("</section>\n")

	// Teaching selector.
	p.s(`<section id="explore"><h2>Explore one extent</h2>`)
	p.s(`<p>Pick a model and an extent to see its ROC curve on the area axis and its key numbers. Step through the extents from small to large and watch the AUC move although the model and the test points stay the same: a larger extent adds background that is easy to reject.</p>`)
	p.s(`<div class="controls"><label>Model <select id="sel-model"></select></label> <label>Extent <select id="sel-extent"></select></label> <button type="button" id="btn-prev">smaller extent</button> <button type="button" id="btn-next">larger extent</button></div>`)
	p.s(`<div class="explore"><svg id="fig-teach" class="teach" viewBox="0 0 360 340" width="360" height="340" role="img" aria-label="ROC curve of the chosen model and extent"></svg>`)
	p.s(`<div id="teach-numbers" data-auc="" data-extent="" data-model=""><p id="teach-sentence"></p><table class="keynums"><tbody id="teach-table"></tbody></table><p class="steps-title">AUC of this model on every extent (small to large):</p><div id="teach-steps"></div></div></div>`)
	p.s("</section>\n")

	// Analysis tables.
	p.s(`<section id="analysis"><h2>Analysis</h2>`)
	writeAnalysisTables(&p, r)
	p.s("</section>\n")

	// Every score.
	p.s(`<section id="scores"><h2>Scores</h2>`)
	writeScoreTables(&p, r)
	p.s("</section>\n")

	// Extents.
	p.s(`<section id="extents"><h2>Extents</h2>`)
	writeExtentTables(&p, r)
	p.s("</section>\n")

	// Settings and inputs.
	p.s(`<section id="settings"><h2>Settings and inputs</h2>`)
	writeSettings(&p, r)
	p.s("</section>\n")

	// Warnings.
	p.s(`<section id="warnings"><h2>Warnings</h2>`)
	if nw == 0 {
		p.s("<p>None.</p>")
	} else {
		p.s(`<ul class="warnings">`)
		for _, w := range r.Warnings {
			p.f("<li>run: %s</li>", htmlEscape(w))
		}
		for _, w := range s.Warnings {
			p.f("<li>analysis: %s</li>", htmlEscape(w))
		}
		p.s("</ul>")
	}
	p.s("</section>\n")

	p.s(`<section id="methods"><h2>Methods text</h2><p>The same text is in methods.md beside this file.</p><pre class="methods">`)
	p.s(htmlEscape(methods))
	p.s("</pre></section>\n")

	data, err := teachData(r)
	if err != nil {
		return nil, err
	}
	p.s(`<script type="application/json" id="report-data">`)
	p.s(string(data))
	p.s("</script>\n<script>" + reportJS + "</script>\n</body>\n</html>\n")
	return []byte(p.String()), nil
}

func verdictClass(v string) string {
	switch v {
	case "robust":
		return "robust"
	case "extent-sensitive":
		return "sensitive"
	}
	return "undetermined"
}

func writeAnalysisTables(p *page, r *Results) {
	s := r.Sensitivity
	label := map[string]string{}
	for _, m := range s.Metrics {
		label[m.Key] = m.Label
	}
	// Verdicts with every paired difference from the base extent.
	p.f(`<h3>Difference from the base extent</h3><p>For each metric and model, the score on every extent minus the score on %s, on the test points both hold (paired). AUC: from each test point's placement (share of the extent's area below it, ties half), standard error sqrt(Σ(D−mean D)²/(n(n−1))) and a normal 95%% interval; the cells are the whole population of the extent, not a sample. Other metrics: %d full-size resamples of the test points, the same for every model and extent, and the 2.5–97.5 percentiles of the resampled differences. Robust: every interval inside ± the tolerance; extent-sensitive: at least one interval wholly outside; otherwise undetermined. The test-set shift is how much the change of test points moved the score on top of the paired difference.</p>`,
		htmlEscape(s.BaseExtent), r.Settings.PairedResamples)
	p.s(`<ul class="sentences">`)
	for _, mv := range s.ModelVerdicts {
		p.f(`<li><span class="badge %s">%s</span> %s</li>`, verdictClass(mv.Verdict), htmlEscape(mv.Verdict), htmlEscape(mv.Sentence))
	}
	p.s("</ul>")
	var rows [][]cell
	for _, mv := range s.ModelVerdicts {
		for _, d := range mv.Diffs {
			row := []cell{tc(label[mv.Metric]), tc(mv.Model), tc(d.Extent), ic(d.TestPoints), ic(d.CommonPoints)}
			if !d.Defined {
				row = append(row, dash, dash, dash, dash, tc("undefined"))
				rows = append(rows, row)
				continue
			}
			row = append(row, nc(d.Diff, 4), cell{text: f4(d.Low) + " to " + f4(d.High), num: d.Low, isN: true, cls: "n"},
				tc(strings.ReplaceAll(d.Method, "_", " ")), nc(d.TestSetShift, 4), tc(d.Position))
			rows = append(rows, row)
		}
	}
	p.table("tbl-differences", "", []string{"metric", "model", "extent", "test points", "common", "difference", "95% interval", "method", "test-set shift", "against tolerance"}, rows)

	// Model comparisons.
	if len(s.Rankings) > 0 {
		p.s(`<h3>Models compared extent by extent</h3><p>Paired differences between two models on the same extent and test points; "beyond noise" means the 95% interval excludes 0.</p><ul class="sentences">`)
		rows = nil
		for _, rk := range s.Rankings {
			p.f("<li>%s</li>", htmlEscape(rk.Sentence))
			rows = append(rows, []cell{tc(label[rk.Metric]), tc(rk.Model + " − " + rk.Other), ic(rk.Extents), ic(rk.Better), ic(rk.Worse), ic(rk.WithinNoise)})
		}
		p.s("</ul>")
		p.table("tbl-model-differences", "", []string{"metric", "models", "extents", "better beyond noise", "worse beyond noise", "within noise"}, rows)
	}

	// Spread (description).
	p.s(`<h3>Spread across extents</h3><p>A description of the chosen family: range and SD (divisor n−1) of each score across the scored extents. The extents are nested or overlapping and share their test points, so these are not a sample of possible extents.</p>`)
	rows = nil
	for _, sp := range s.Spreads {
		row := []cell{tc(label[sp.Metric]), tc(sp.Model), ic(sp.N)}
		if sp.N == 0 {
			row = append(row, dash, dash, dash, dash)
			rows = append(rows, row)
			continue
		}
		row = append(row, nc(sp.Min, 3), nc(sp.Max, 3), nc(sp.Range, 3), defNum(sp.SD, sp.SDDefined, 3))
		rows = append(rows, row)
	}
	p.table("tbl-spread", "", []string{"metric", "model", "extents scored", "minimum", "maximum", "range", "SD across extents"}, rows)

	// Decomposition.
	if len(s.Decompositions) > 0 {
		p.s(`<h3>Sums of squares of the models × extents table</h3><p>A property of the chosen family, not a finding about the models: each metric's sum of squares over the extents scored for every model, split into extent and model main effects and the non-additive rest; another family of extents gives another split. Kendall's W describes how far the extents agree on the order of the models (1 = the same order everywhere, tie-corrected); no test is attached because the extents are not independent.</p>`)
		rows = nil
		for _, d := range s.Decompositions {
			row := []cell{tc(label[d.Metric]), ic(len(d.Extents))}
			if d.Defined {
				row = append(row, nc(100*d.ShareExtent, 0), nc(100*d.ShareModel, 0), nc(100*d.ShareResidual, 0))
			} else {
				row = append(row, dash, dash, dash)
			}
			row = append(row, defNum(d.KendallW, d.KendallWDefined, 3))
			row = append(row, tc(d.BaseExtent), tc(strings.Join(d.DiffersFromBase, ", ")))
			rows = append(rows, row)
		}
		p.table("tbl-decomposition", "", []string{"metric", "extents", "extent %", "model %", "non-additive %", "Kendall's W", "base extent", "order differs on"}, rows)
		if d := s.findDecomposition("auc"); d != nil && len(d.Rankings) > 0 {
			p.s(`<h3>Order of the models by AUC on each extent</h3><p>Point estimates only; the paired model differences above say whether an order is beyond noise.</p>`)
			rows = nil
			for _, er := range d.Rankings {
				row := []cell{tc(er.Extent)}
				for _, rk := range er.Ranks {
					row = append(row, nc(rk, 1))
				}
				row = append(row, tc(strings.Join(er.Order, " > ")), tc(yesNo(er.DiffersFromBase)))
				rows = append(rows, row)
			}
			head := []string{"extent"}
			for _, m := range d.Models {
				head = append(head, "rank of "+m)
			}
			head = append(head, "order (best first)", "differs from "+d.BaseExtent)
			p.table("tbl-ranking", "", head, rows)
		}
	}

	// Chains.
	if len(s.Chains) > 0 {
		p.s(`<h3>Nested rings</h3><ul class="sentences">`)
		for _, c := range s.Chains {
			p.f("<li>%s</li>", htmlEscape(c.Sentence))
		}
		p.s("</ul>")
		rows = nil
		for _, c := range s.Chains {
			for _, st := range c.Steps {
				what := "ring " + st.Outer + " − " + st.Inner
				if st.Kind == "test_points" {
					what = "test points entering with " + st.Outer
				}
				row := []cell{tc(c.Chain), tc(c.Model), tc(what)}
				if st.Kind == "ring" {
					row = append(row, areaCell(st.RingAreaKm2), defNum(st.AUCRing, st.AUCRingDefined, 3))
				} else {
					row = append(row, dash, dash)
				}
				row = append(row, nc(st.AUCInner, 3), nc(st.AUCOuter, 3), nc(st.Change, 4), defNum(100*st.Share, c.SharesDefined, 0))
				rows = append(rows, row)
			}
		}
		p.table("tbl-chains", "", []string{"nested chain", "model", "step", "ring area (km²)", "AUC of the ring alone", "AUC before", "AUC after", "change", "share of the chain's change (%)"}, rows)
		rows = nil
		for _, c := range s.Chains {
			rows = append(rows, []cell{tc(c.Chain), tc(c.Model), ic(c.Slope.N), defNum(c.Slope.PerDoubling, c.Slope.Defined, 4), defNum(c.Slope.R2, c.Slope.R2Defined, 2)})
		}
		p.s(`<p>Slope of AUC against log2(area) along each chain: a description of the chain (its members are nested and share test points), with no interval.</p>`)
		p.table("tbl-chain-slopes", "", []string{"nested chain", "model", "members", "AUC change per doubling of area", "r²"}, rows)
	}

	// Truncation.
	p.s(`<h3>Truncated predictions</h3><ul class="sentences">`)
	for _, t := range s.Truncation {
		p.f("<li>%s</li>", htmlEscape(t.Sentence))
	}
	p.s("</ul>")

	// Models against the nulls, every metric.
	if rows := aboveNullRows(r); len(rows) > 0 {
		p.s(`<h3>Model minus null</h3><ul class="sentences">`)
		for _, an := range s.AboveNull {
			p.f("<li>%s</li>", htmlEscape(an.Sentence))
		}
		p.s("</ul>")
		p.f("<p>%s</p>", htmlEscape(aboveNullNote))
		p.table("tbl-above-null", "", []string{"metric", "model", "null", "extent", "area", "common test points", "model", "null", "model minus null", "95% interval", "method", "reading"}, rows)
	}

	// Independence.
	ind := s.Independence
	p.s(`<h3>Independence of the test points</h3>`)
	p.f("<p>%s</p>", htmlEscape(ind.Sentence))
	if ind.Defined {
		p.table("tbl-independence", "Distance from each test point to the nearest training point (km)", []string{"n", "min", "lower quartile", "median", "upper quartile", "max", "cell width km", "within km", "share within"},
			[][]cell{{ic(ind.N), nc(ind.Min, 2), nc(ind.Q1, 2), nc(ind.Median, 2), nc(ind.Q3, 2), nc(ind.Max, 2), nc(ind.CellWidthKm, 2), nc(ind.NearKm, 2), nc(ind.NearShare, 2)}})
	}
	if sb := sortingBiasRows(r); len(sb) > 0 {
		p.s(`<h3>Spatial sorting bias</h3>`)
		p.f("<p>%s</p>", htmlEscape(sortingBiasNote))
		p.table("tbl-sorting-bias", "Distance to the nearest training point: test points against the extent's cells", []string{"extent", "area",
			"test points", "test mean km", "cells mean km", "ratio of means", "test median km", "cells median km", "ratio of medians"}, sb)
	}

	// Where errors fall.
	p.s(`<h3>Where errors fall</h3><p>Test points omitted at each threshold (ids are line numbers in the occurrence file; the maps mark the test points the first model omits at the minimum and at the 10th percentile training presence).</p>`)
	rows = nil
	for _, o := range s.OmittedPoints {
		ids := make([]string, len(o.IDs))
		for i, id := range o.IDs {
			ids[i] = strconv.Itoa(id)
		}
		rows = append(rows, []cell{tc(o.Model), tc(thresholdLabel(o.Threshold)), nc(o.Value, 4), ic(o.Count), ic(o.TestPoints), nc(o.Share, 3), tc(strings.Join(ids, ", "))})
	}
	p.table("tbl-omitted", "", []string{"model", "rule", "cut value", "test records missed", "test records", "share missed", "ids of the missed records"}, rows)
}

func yesNo(b bool) string {
	if b {
		return "yes"
	}
	return "no"
}

func f4(v float64) string {
	s := strconv.FormatFloat(v, 'f', 4, 64)
	if s == "-0.0000" {
		s = "0.0000"
	}
	return s
}

func defNum(v float64, ok bool, dec int) cell {
	if !ok {
		return dash
	}
	return nc(v, dec)
}

// ruleName spells out a threshold rule: "minimum training presence",
// "10th percentile training presence" or "fixed cut 0.5".
func ruleName(t Threshold) string {
	if t.Name == metrics.ThresholdFixed {
		return "fixed cut " + fmtG(t.Value)
	}
	return thresholdLabel(t.Name)
}

// formedPartialROC reports whether at least one bootstrap resample formed a
// partial ROC ratio.
func formedPartialROC(pr PartialROC) bool {
	return !(pr.Iterations > 0 && pr.NotFormed >= pr.Iterations)
}

// writeScoreTables writes the scores as three long tables: the scores
// with one value per model and extent, the partial ROC results (one row
// per model, extent and E) and the threshold tests (one row per model,
// extent and rule).
func writeScoreTables(p *page, r *Results) {
	st := r.Settings
	p.s(`<h3 id="scores-main">Scores per model and extent</h3>`)
	p.s(`<p>Every score uses the test records inside the extent (training records for the training AUC). AUC standard error: from the test records' placements, the extent's cells taken as the whole population. AUC resample SD: the SD of AUC over the run's full-size paired resamples of the test records; it estimates the same quantity. Click a column header to sort.</p>`)
	head := []string{"model", "extent", "extent area (km²)", "test records inside", "training records inside", "scored",
		"AUC", "AUC standard error", "AUC with cells unweighted", "AUC on the training records", "AUC resample SD", "Boyce index"}
	var rows [][]cell
	for _, sc := range r.Scores {
		row := []cell{tc(modelLabel(r, sc.Model)), tc(sc.Extent), areaCell(sc.AreaKm2)}
		if !sc.Scored {
			row = append(row, dash, dash, tc("no: "+sc.NotScored))
			for len(row) < len(head) {
				row = append(row, dash)
			}
			rows = append(rows, row)
			continue
		}
		row = append(row, ic(sc.TestPoints), ic(sc.TrainPoints), tc("yes"), nc(sc.AUC, 3), nc(sc.AUCSE, 4), nc(sc.AUCUnweighted, 3), nc(sc.AUCTrain, 3), nc(sc.AUCBootSD, 4))
		if sc.Boyce != nil {
			row = append(row, nc(sc.Boyce.Index, 3))
		} else {
			row = append(row, dash)
		}
		rows = append(rows, row)
	}
	p.table("tbl-scores", "", head, rows)

	p.s(`<h3 id="scores-partial-roc">Partial ROC</h3>`)
	p.f(`<p>One row per model, extent and allowable omission E. Full-sample ratio: all test records inside the extent. Resamples: %d bootstrap draws of %s%% of those test records; the mean, the 2.5th to 97.5th percentiles and the share of resamples with a ratio of at most 1 (the P value) come from the resamples that formed a ratio.</p>`,
		st.Iterations, fmtG(100*st.ResampleFraction))
	head = []string{"model", "extent", "E", "partial ROC ratio, full sample", "partial ROC ratio, resample mean", "2.5th to 97.5th percentile of resamples", "share of resamples at or below 1 (P)", "resamples formed"}
	rows = nil
	for _, sc := range r.Scores {
		if !sc.Scored {
			continue
		}
		for _, pr := range sc.PartialROC {
			row := []cell{tc(sc.Model), tc(sc.Extent), nc(pr.E, 2)}
			full := nc(pr.Ratio, 3)
			if !pr.Defined {
				full = cell{text: "undefined: " + pr.Reason}
			}
			if !formedPartialROC(pr) {
				row = append(row, full, dash, dash, dash)
			} else {
				row = append(row, full, nc(pr.RatioMean, 3),
					cell{text: f3(pr.CILow) + " to " + f3(pr.CIHigh), num: pr.CILow, isN: true, cls: "n"},
					cell{text: fmtPResampled(pr.PValue, pr.Iterations-pr.NotFormed), num: pr.PValue, isN: true, cls: "n"})
			}
			row = append(row, cell{text: fmt.Sprintf("%d of %d", pr.Iterations-pr.NotFormed, pr.Iterations), num: float64(pr.Iterations - pr.NotFormed), isN: true, cls: "n"})
			rows = append(rows, row)
		}
	}
	p.table("tbl-partial-roc", "", head, rows)

	p.s(`<h3 id="scores-thresholds">Threshold tests</h3>`)
	p.s(`<p>One row per model, extent and rule. The cut comes from the training records (or is fixed), so it is the same on every extent; the test records are those inside the extent. Missed: test records below the cut. One-sided binomial P: the chance of at least as many test records at or above the cut if they fell at random on the extent, each with probability equal to the share of the extent at or above the cut. That share, and so P, changes with the extent; the share missed changes only when an extent leaves test records out.</p>`)
	head = []string{"model", "extent", "rule", "cut value", "test records missed (k of n)", "share missed", "share of the extent at or above the cut", "one-sided binomial P"}
	rows = nil
	for _, sc := range r.Scores {
		if !sc.Scored {
			continue
		}
		for _, t := range sc.Thresholds {
			missed := t.N - t.Successes
			row := []cell{tc(sc.Model), tc(sc.Extent), tc(ruleName(t)), nc(t.Value, 4),
				cell{text: fmt.Sprintf("%d of %d", missed, t.N), num: float64(missed), isN: true, cls: "n"}}
			if t.N > 0 {
				row = append(row, nc(t.Omission, 3))
			} else {
				row = append(row, dash)
			}
			row = append(row, nc(t.AreaFraction, 3), cell{text: fmtP(t.PBinomial), num: t.PBinomial, isN: true, cls: "n"})
			rows = append(rows, row)
		}
	}
	p.table("tbl-thresholds", "", head, rows)
}

func writeExtentTables(p *page, r *Results) {
	s := r.Sensitivity
	var rows [][]cell
	for _, e := range r.Extents {
		status := string(e.Status)
		if e.DuplicateOf != "" {
			status += " of " + e.DuplicateOf
		}
		rows = append(rows, []cell{tc(e.ID), tc(e.Kind), tc(e.Params), tc(e.Chain), cell{text: groupThousands(e.Cells), num: float64(e.Cells), isN: true, cls: "n"},
			areaCell(e.AreaKm2), nc(e.ShareOfRaster, 3), ic(e.TrainPoints), ic(e.TestPoints), tc(status)})
	}
	p.s(`<p>One row per extent of the family: its cells and true area among the cells where the first model has data, its share of the raster's valid area, and the training and test records inside it. Extents with status empty, or duplicate of an earlier one, are left out of the analysis.</p>`)
	p.table("tbl-extents", "", []string{"id", "kind", "parameters", "nested chain", "cells", "area (km²)", "share of the raster", "training records inside", "test records inside", "status"}, rows)
	if len(s.SkippedExtents) > 0 {
		p.s("<h3>Left out of the analysis</h3><ul>")
		for _, e := range s.SkippedExtents {
			p.f("<li><b>%s</b> (%s): %s</li>", htmlEscape(e.ID), htmlEscape(string(e.Status)), htmlEscape(e.Reason))
		}
		p.s("</ul>")
	}
	if len(s.Unscored) > 0 {
		p.s("<h3>Not scored</h3><ul>")
		for _, u := range s.Unscored {
			p.f("<li>model <b>%s</b> on <b>%s</b>: %s</li>", htmlEscape(u.Model), htmlEscape(u.Extent), htmlEscape(u.Reason))
		}
		p.s("</ul>")
	}
}

func writeSettings(p *page, r *Results) {
	st := r.Settings
	fl := func(v []float64) string {
		if len(v) == 0 {
			return "none"
		}
		return fmtList(v, "")
	}
	rows := [][]cell{
		{tc("software"), tc(strings.TrimSpace(r.Software.Name + " " + r.Software.Version))},
		{tc("seed"), tc(strconv.FormatUint(r.Seed, 10))},
		{tc("region buffers (km)"), tc(fl(st.RegionBuffersKm))},
		{tc("point buffers (km)"), tc(fl(st.PointBuffersKm))},
		{tc("point buffers around all points"), tc(yesNo(st.PointBufferAll))},
		{tc("hull buffers (km)"), tc(fl(st.HullBuffersKm))},
		{tc("ecoregion minimum points"), tc(strconv.Itoa(st.EcoregionMinPoints))},
		{tc("ecoregion field"), tc(st.EcoregionField)},
		{tc("partial ROC E"), tc(fl(st.E))},
		{tc("bootstrap iterations (published partial ROC bootstrap)"), tc(strconv.Itoa(st.Iterations))},
		{tc("resample fraction (published partial ROC bootstrap)"), tc(fmtG(st.ResampleFraction))},
		{tc("paired full-size resamples"), tc(strconv.Itoa(st.PairedResamples))},
		{tc("tolerances (our defaults unless set)"), tc(fmt.Sprintf("AUC ±%s; partial ROC ratio ±%s; omission and predicted area ±%s; Boyce index ±%s",
			fmtG(st.ToleranceAUC), fmtG(st.TolerancePartialROC), fmtG(st.ToleranceOmission), fmtG(st.ToleranceBoyce)))},
		{tc("fixed thresholds"), tc(fl(st.FixedThresholds))},
		{tc("thin to one record per cell"), tc(yesNo(st.ThinPerCell))},
		{tc("Boyce window"), tc(fmtG(st.BoyceWindow))},
		{tc("Boyce steps"), tc(strconv.Itoa(st.BoyceSteps))},
		{tc("grid"), tc(fmt.Sprintf("%d × %d cells, %s", r.Grid.Width, r.Grid.Height, r.Grid.CRS))},
		{tc("geotransform"), tc(fmt.Sprintf("%v", r.Grid.GeoTransform))},
		{tc("cell areas"), tc(r.Grid.CellAreaNote)},
		{tc("points"), tc(fmt.Sprintf("%d train, %d test, %d thinned, %d outside raster, %d on no data",
			r.PointCounts.Train, r.PointCounts.Test, r.PointCounts.Thinned, r.PointCounts.OutsideRaster, r.PointCounts.NoData))},
		{tc("analysis cut-offs (our choices)"), tc(fmt.Sprintf("floor flag ≥ %s of area; tie-tail flag > %g of the area axis; near = within %g cells, warn above %s",
			pct(FloorShareFlag), TailJumpFlag, NearCells, pct(NearShareWarn)))},
	}
	p.table("tbl-settings", "", []string{"setting", "value"}, rows)
	var in [][]cell
	for _, i := range r.Inputs {
		in = append(in, []cell{tc(i.Role), tc(i.Path), {text: i.SHA256, cls: "mono"}})
	}
	p.s("<h3>Inputs</h3>")
	p.table("tbl-inputs", "", []string{"role", "path", "SHA-256"}, in)
	var ms [][]cell
	for _, m := range r.Models {
		ms = append(ms, []cell{tc(modelLabel(r, m.Name)), tc(m.Path), nc(m.ValueMin, 4), nc(m.ValueMax, 4), nc(m.FloorShare, 3)})
	}
	p.s("<h3>Models</h3>")
	p.table("tbl-models", "", []string{"model", "path", "minimum", "maximum", "share of area at minimum"}, ms)
}

// teachCell is one model x extent entry of the embedded data.
type teachCell struct {
	Model          string    `json:"model"`
	Extent         string    `json:"extent"`
	Scored         bool      `json:"scored"`
	Reason         string    `json:"reason,omitempty"`
	AUC            float64   `json:"auc"`
	AUCSD          float64   `json:"auc_sd"`
	PartialROC     float64   `json:"partial_roc"`
	PartialROCLow  float64   `json:"partial_roc_low"`
	PartialROCHigh float64   `json:"partial_roc_high"`
	PartialROCOK   bool      `json:"partial_roc_ok"`
	Omission       float64   `json:"omission"`
	AreaFrac       float64   `json:"area_fraction"`
	ThreshOK       bool      `json:"threshold_ok"`
	TestPoints     int       `json:"test_points"`
	X              []float64 `json:"x"`
	Y              []float64 `json:"y"`
}

type teachExtent struct {
	ID      string  `json:"id"`
	Kind    string  `json:"kind"`
	Params  string  `json:"params"`
	AreaKm2 float64 `json:"area_km2"`
	Area    string  `json:"area"`
}

type teachPayload struct {
	Models  []string      `json:"models"`
	Extents []teachExtent `json:"extents"`
	E       float64       `json:"e"`
	Default string        `json:"default_extent"`
	Cells   []teachCell   `json:"cells"`
}

func round4(v float64) float64 { return math.Round(v*1e4) / 1e4 }

// teachData builds the JSON embedded for the extent selector. Curves are
// rounded to 4 decimals (drawing only).
func teachData(r *Results) ([]byte, error) {
	s := r.Sensitivity
	pl := teachPayload{Models: s.ModelNames, Extents: []teachExtent{}, Cells: []teachCell{}}
	if pl.Models == nil {
		pl.Models = []string{}
	}
	if len(r.Settings.E) > 0 {
		pl.E = r.Settings.E[0]
	}
	for _, e := range rocExtents(r) {
		pl.Extents = append(pl.Extents, teachExtent{ID: e.ID, Kind: e.Kind, Params: e.Params, AreaKm2: e.AreaKm2, Area: fmtArea(e.AreaKm2)})
		if e.ID == "base" {
			pl.Default = e.ID
		}
	}
	if pl.Default == "" && len(pl.Extents) > 0 {
		pl.Default = pl.Extents[0].ID
	}
	for _, m := range pl.Models {
		for _, e := range pl.Extents {
			c := teachCell{Model: m, Extent: e.ID, X: []float64{}, Y: []float64{}}
			var sc *Score
			for i := range r.Scores {
				if r.Scores[i].Model == m && r.Scores[i].Extent == e.ID {
					sc = &r.Scores[i]
					break
				}
			}
			if sc == nil || !sc.Scored {
				c.Reason = "no score"
				if sc != nil && sc.NotScored != "" {
					c.Reason = sc.NotScored
				}
				pl.Cells = append(pl.Cells, c)
				continue
			}
			c.Scored, c.AUC, c.AUCSD, c.TestPoints = true, sc.AUC, sc.AUCBootSD, sc.TestPoints
			for _, pr := range sc.PartialROC {
				if math.Abs(pr.E-pl.E) <= 1e-12 && pr.Defined && !(pr.Iterations > 0 && pr.NotFormed >= pr.Iterations) {
					c.PartialROC, c.PartialROCLow, c.PartialROCHigh, c.PartialROCOK = pr.Ratio, pr.CILow, pr.CIHigh, true
				}
			}
			for _, t := range sc.Thresholds {
				if t.Name == metrics.ThresholdMTP {
					c.Omission, c.AreaFrac, c.ThreshOK = t.Omission, t.AreaFraction, true
				}
			}
			if cv := findCurve(r, m, e.ID); cv != nil {
				n := min(len(cv.X), len(cv.Y))
				for i := 0; i < n; i++ {
					c.X = append(c.X, round4(cv.X[i]))
					c.Y = append(c.Y, round4(cv.Y[i]))
				}
			}
			pl.Cells = append(pl.Cells, c)
		}
	}
	// encoding/json escapes <, > and & so the data cannot close the script.
	b, err := json.Marshal(pl)
	if err != nil {
		return nil, fmt.Errorf("report: embed selector data: %w", err)
	}
	return b, nil
}
