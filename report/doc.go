// Package report turns the results of one areasweep run into a sensitivity
// analysis and a self-contained report. It is pure Go (no GDAL).
//
// The run command fills a *Results (results.go: extents, scores per model
// and extent, nested rings, omissions, ROC curves, a coarse map preview,
// points with distances to the nearest training point) and calls
//
//	Analyze(r)      // fills r.Sensitivity
//	Write(dir, r)   // report.html, methods.md, figures/*.pdf, *.svg, *.png
//
// # Analysis
//
// Analyze reads only extents with status "ok" and scores with Scored=true;
// the others are listed (Sensitivity.SkippedExtents, Sensitivity.Unscored).
// For every metric (AUC, AUC unweighted, partial ROC ratio per E, omission
// per threshold, predicted area at the minimum training presence, Boyce
// index) and model it reports:
//
//   - a verdict from the paired differences from the base extent
//     (Results.Paired, computed by the run on the test points both extents
//     hold: placements for AUC, shared full-size resamples for the others):
//     "robust" when every 95% interval lies inside -T..+T, "extent-sensitive"
//     when one lies wholly outside, "undetermined" otherwise. The tolerances
//     T are settings with documented defaults of our own choosing;
//   - with two or more models, the paired model differences extent by
//     extent ("A better than B beyond noise on k of K extents");
//   - descriptions without inference, because the extents are nested or
//     overlapping, share their test points and were chosen by the user:
//     the spread across extents, the slope of AUC against log2(area) along
//     each nested chain, the split of the models x extents sums of squares
//     (a property of the chosen family, kept out of the headline) and
//     Kendall's W of the model order (Kendall & Babington Smith 1939;
//     Legendre 2005) without a chi-square test.
//
// Nested chains are summarised from the rings the run computed exactly; the
// AUC change along a chain telescopes into ring steps and test-point steps
// whose shares sum to one (see ChainSummary). Truncated predictions (a
// floor over >= 20% of the area, or a ROC curve ending in a tie that starts
// below y = 1 and spans more than 0.2 of the area axis), the independence
// of test from training points (share within 3 cell widths; warning above
// 25%) and the omitted test points complete the analysis. Every number
// stored is finite; undefined ones are 0 with a false "defined" flag.
//
// # Report
//
// report.html opens from disk with no network: figures are inline SVG
// (their raster images are data: URIs), the style and scripts are inline,
// and a Content-Security-Policy forbids every fetch. It shows the headline,
// four figures (scores against area, ROC curves on the area axis, maps of
// the extents as small multiples per nested chain, a waterfall of the AUC
// along each chain), sortable tables (threshold tests and partial ROC in
// long form, one row per model, extent and rule or E) and an extent
// selector for teaching (report.html#extent=ID&model=NAME opens it on that
// extent).
//
// Figures are drawn for print (fig_style.go): one or two journal columns
// wide (85 or 175 mm), text of at least 8 pt, legends outside the data,
// ticks from our own generator (fig_ticks.go), written as vector PDF, SVG
// and 300 dpi PNG. Colours follow Paul Tol's colour-blind-safe "vibrant"
// scheme with no colour twice in a panel; lines and markers also differ in
// dash and shape so that greyscale prints work.
// methods.md holds a methods paragraph and a reply to a reviewer filled
// with the run's numbers. Output is deterministic for the same Results.
//
// # Summary across studies
//
// A batch of studies (batch*.go) is summarised from each study's analysed
// Results, or the error that stopped it:
//
//	s, _ := Summarize([]StudyResult{...})
//	WriteSummary(dir, s) // summary.csv, summary_verdicts.csv, summary.html,
//	                     // summary_methods.md, summary_figures/extent_effect.*
//
// It makes no inference of its own: the verdicts and intervals are each
// study's (Sensitivity), and the counts add them up. A study is
// extent-sensitive for AUC when its AUC verdict is (at least one model
// has a paired difference from the base extent whose 95% interval lies
// wholly beyond the tolerance); see ExtentSensitiveDefinition. The figure
// shows each study's extent effect, the paired AUC difference from the
// base extent of largest magnitude, with its interval, studies sorted.
package report
