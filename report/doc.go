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
//   - the spread across extents: min, max, range, sample SD (n-1), and the
//     median within-extent bootstrap SD with the ratio range / median SD;
//   - the ordinary least-squares slope against log2(area): the change per
//     doubling of the extent area, with a 95% CI from Student's t;
//   - a verdict: "robust" when range <= 2 x median bootstrap SD (metrics
//     with a bootstrap) or range <= 0.05 (others). Both cut-offs are our
//     own choices, quoted in the report.
//
// With two or more models, each metric's models x extents table is split
// into extent, model and non-additive sums of squares; models are ranked on
// every extent and Kendall's W (Kendall & Babington Smith 1939; Legendre
// 2005) measures whether the extents agree on the ranking.
//
// Nested chains are summarised from the rings the run computed exactly; the
// AUC change along a chain telescopes into ring steps and test-point steps
// whose shares sum to one (see ChainSummary). Truncated predictions (a
// floor over >= 20% of the area, or a ROC curve ending in a straight
// segment longer than 0.2 of the area axis), the independence of test from
// training points (share within 3 cell widths; warning above 25%) and the
// omitted test points complete the analysis. Every number stored is finite;
// undefined ones are 0 with a false "defined" flag.
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
package report
