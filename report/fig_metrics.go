package report

import (
	"fmt"
	"math"
	"slices"
	"sort"
	"strings"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"

	"areasweep/metrics"
)

// metricPoint is one marker of the score-against-area figure.
type metricPoint struct {
	area, v float64
	chain   string  // the extent's nested chain, "" for none
	lo, hi  float64 // the bar, when bar is true
	bar     bool
}

// metricPoints returns model's values of metric m on the scored extents,
// by area. AUC carries plus and minus its SD over the run's full-size
// paired resamples (Score.AUCBootSD); partial ROC is the mean of the
// published half-size bootstrap resamples with their 2.5th to 97.5th
// percentiles, so that point and bar come from the same resamples.
func metricPoints(r *Results, m MetricInfo, model string) []metricPoint {
	scored := map[string]bool{}
	for _, id := range r.Sensitivity.ScoredExtents {
		scored[id] = true
	}
	chainOf := map[string]string{}
	for _, e := range r.Extents {
		chainOf[e.ID] = e.Chain
	}
	var pts []metricPoint
	for i := range r.Scores {
		sc := &r.Scores[i]
		if sc.Model != model || !sc.Scored || !scored[sc.Extent] || sc.AreaKm2 <= 0 {
			continue
		}
		if p, ok := metricPointOf(m, sc, r.Settings.PairedResamples); ok {
			p.area = sc.AreaKm2
			p.chain = chainOf[sc.Extent]
			pts = append(pts, p)
		}
	}
	sort.SliceStable(pts, func(i, j int) bool { return pts[i].area < pts[j].area })
	return pts
}

// metricPointOf is sc's point of metric m; paired is the number of
// full-size paired resamples that AUC's bar (Score.AUCBootSD) comes from.
func metricPointOf(m MetricInfo, sc *Score, paired int) (metricPoint, bool) {
	switch m.Kind {
	case MetricAUC:
		p := metricPoint{v: sc.AUC}
		if paired >= 2 {
			p.lo, p.hi, p.bar = sc.AUC-sc.AUCBootSD, sc.AUC+sc.AUCBootSD, true
		}
		return p, true
	case MetricAUCUnweighted:
		return metricPoint{v: sc.AUCUnweighted}, true
	case MetricPartialROC:
		for _, pr := range sc.PartialROC {
			if math.Abs(pr.E-m.E) > 1e-12 || pr.Iterations-pr.NotFormed < 1 {
				continue
			}
			return metricPoint{v: pr.RatioMean, lo: pr.CILow, hi: pr.CIHigh, bar: BootstrapReadable(pr)}, true
		}
	case MetricOmission, MetricAreaFraction:
		for _, t := range sc.Thresholds {
			if t.Name != m.Threshold || (t.Name == metrics.ThresholdFixed && math.Abs(t.Value-m.ThresholdValue) > 1e-12) {
				continue
			}
			if m.Kind == MetricAreaFraction {
				return metricPoint{v: t.AreaFraction}, true
			}
			if t.N > 0 {
				return metricPoint{v: t.Omission}, true
			}
		}
	case MetricBoyce:
		if sc.Boyce != nil {
			return metricPoint{v: sc.Boyce.Index}, true
		}
	}
	return metricPoint{}, false
}

// valueRange returns the y range of a panel of metric kind from the data
// lo..hi: shares span 0 to 1; other metrics span their data, widened to a
// sensible minimum and snapped to whole tick steps, within the metric's
// possible values.
func valueRange(kind MetricKind, lo, hi float64) (float64, float64) {
	switch kind {
	case MetricOmission, MetricAreaFraction:
		// Shares: the whole 0 to 1, a little wider so that markers at 0
		// or 1 clear the axis.
		return -0.04, 1.04
	}
	minSpan, floor, ceil := 0.04, math.Inf(-1), math.Inf(1)
	switch kind {
	case MetricAUC, MetricAUCUnweighted:
		floor, ceil = 0, 1
	case MetricPartialROC:
		floor = 0
	case MetricBoyce:
		minSpan, floor, ceil = 0.1, -1, 1
	}
	if hi-lo < minSpan {
		mid := (lo + hi) / 2
		lo, hi = mid-minSpan/2, mid+minSpan/2
	}
	pad := 0.06 * (hi - lo)
	lo, hi = lo-pad, hi+pad
	step, _ := niceStep(lo, hi)
	lo, hi = math.Floor(lo/step+1e-9)*step, math.Ceil(hi/step-1e-9)*step
	return math.Max(lo, floor), math.Min(hi, ceil)
}

// Series shifts along a log area axis (seriesShift), in log2 units: next
// series at most maxShiftStep apart (3.5%), first to last at most
// maxShiftSpan (15%, so no series more than 7% off its areas). Our
// choices.
const (
	maxShiftStep = 0.05
	maxShiftSpan = 0.2
)

// seriesShift is the factor by which series k of n is moved along a log
// area axis so that the error bars of series at one extent stand apart:
// centred on the true area, maxShiftStep apart, closer when n series
// would span more than maxShiftSpan. Unbounded, 12 models put the first
// and last 17% and 21% off their extents' areas, and the model-minus-null
// figure of one model and seven nulls put the last 45% off.
func seriesShift(k, n int) float64 {
	if n < 2 {
		return 1
	}
	step := math.Min(maxShiftStep, maxShiftSpan/float64(n-1))
	return math.Pow(2, step*(float64(k)-float64(n-1)/2))
}

// areaAxis returns the divisor and unit of an area axis whose largest
// value is max km²: million km² from 10 million km² on, where areaRange
// (the summary's words) counts in millions too and thousands would label
// a global study's axis "100000", "500000"; 1000 km² from 10,000 km².
func areaAxis(max float64) (float64, string) {
	if max >= 1e7 {
		return 1e6, "extent area (million km²)"
	}
	if max >= 1e4 {
		return 1e3, "extent area (1000 km²)"
	}
	return 1, "extent area (km²)"
}

// metricPanel is one metric's data: its points per model.
type metricPanel struct {
	m   MetricInfo
	pts [][]metricPoint // per model, in Sensitivity.ModelNames order
	// nulls holds each null's values against the extent area (km²), in
	// Results.Models order: drawn as grey dotted reference lines;
	// nullChains the nested chain of each value's extent.
	nulls      []plotter.XYs
	nullChains [][]string
}

// chainLines returns, of the points xys with the nested chains chains
// (by area), one polyline per chain of at least two points, in order of
// each chain's first point: a line joins the members of one chain, whose
// areas grow with a single setting, and never an extent of one kind to
// one of another, where a zigzag would read as noise.
func chainLines(xys plotter.XYs, chains []string) []plotter.XYs {
	var order []string
	by := map[string]plotter.XYs{}
	for i, xy := range xys {
		if chains[i] == "" {
			continue
		}
		if _, ok := by[chains[i]]; !ok {
			order = append(order, chains[i])
		}
		by[chains[i]] = append(by[chains[i]], xy)
	}
	var out []plotter.XYs
	for _, ch := range order {
		if len(by[ch]) >= 2 {
			out = append(out, by[ch])
		}
	}
	return out
}

// metricPanels returns the metrics that have at least one point, and the
// largest extent area among their points.
func metricPanels(r *Results) ([]metricPanel, float64) {
	s := r.Sensitivity
	var panels []metricPanel
	maxArea := 0.0
	for _, m := range s.Metrics {
		pn := metricPanel{m: m, pts: make([][]metricPoint, len(s.ModelNames))}
		any := false
		for i, model := range s.ModelNames {
			pn.pts[i] = metricPoints(r, m, model)
			for _, p := range pn.pts[i] {
				any = true
				maxArea = math.Max(maxArea, p.area)
			}
		}
		for _, nm := range nulls(r) {
			xys, chains := nullSeries(r, m, nm.Name)
			pn.nulls = append(pn.nulls, xys)
			pn.nullChains = append(pn.nullChains, chains)
			for _, xy := range xys {
				any = true
				maxArea = math.Max(maxArea, xy.X)
			}
		}
		if any {
			panels = append(panels, pn)
		}
	}
	return panels, maxArea
}

// plot draws the panel: per model a line through the points on a log area
// axis (areas divided by div), bars where the metric has them.
func (pn metricPanel) plot(titleW vg.Length, div float64, unit string) (*plot.Plot, error) {
	p := newPlot(upperFirst(pn.m.Label), titleW)
	p.X.Scale = plot.LogScale{}
	p.X.Tick.Marker = logTicks{}
	p.X.Label.Text = unit
	lo, hi := math.Inf(1), math.Inf(-1)
	amin, amax := math.Inf(1), math.Inf(-1)
	nm := len(pn.pts)
	most := 0
	for _, pts := range pn.pts {
		most = max(most, len(pts))
	}
	for _, xys := range pn.nulls {
		most = max(most, len(xys))
	}
	scale := markerScale(most)
	for i, pts := range pn.pts {
		if len(pts) == 0 {
			continue
		}
		// Models sit a few percent apart on the area axis so that their
		// bars do not overlap.
		shift := seriesShift(i, nm)
		xys := make(plotter.XYs, len(pts))
		chains := make([]string, len(pts))
		var ep errPoints
		for q, pt := range pts {
			x := pt.area / div * shift
			xys[q] = plotter.XY{X: x, Y: pt.v}
			chains[q] = pt.chain
			lo, hi = math.Min(lo, pt.v), math.Max(hi, pt.v)
			amin, amax = math.Min(amin, pt.area/div), math.Max(amax, pt.area/div)
			if pt.bar {
				ep.XYs = append(ep.XYs, plotter.XY{X: x, Y: pt.v})
				ep.YErrors = append(ep.YErrors, struct{ Low, High float64 }{Low: math.Max(0, pt.v-pt.lo), High: math.Max(0, pt.hi-pt.v)})
				lo, hi = math.Min(lo, pt.lo), math.Max(hi, pt.hi)
			}
		}
		for _, line := range chainLines(xys, chains) {
			l, err := plotter.NewLine(line)
			if err != nil {
				return nil, fmt.Errorf("report: figure metrics: %w", err)
			}
			l.LineStyle = lineStyle(modelColor(i), 1, modelDash(i))
			p.Add(l)
		}
		sc, err := plotter.NewScatter(xys)
		if err != nil {
			return nil, fmt.Errorf("report: figure metrics: %w", err)
		}
		sc.GlyphStyle = markerStyle(i)
		sc.GlyphStyle.Radius *= scale
		if len(ep.XYs) > 0 {
			eb, err := plotter.NewYErrorBars(ep)
			if err != nil {
				return nil, fmt.Errorf("report: figure metrics: %w", err)
			}
			eb.LineStyle = lineStyle(modelColor(i), 0.8, nil)
			eb.CapWidth = vg.Points(3) * scale
			p.Add(eb)
		}
		p.Add(sc)
	}
	for j, xys := range pn.nulls {
		if len(xys) == 0 {
			continue
		}
		pts := make(plotter.XYs, len(xys))
		for q, xy := range xys {
			pts[q] = plotter.XY{X: xy.X / div, Y: xy.Y}
			lo, hi = math.Min(lo, xy.Y), math.Max(hi, xy.Y)
			amin, amax = math.Min(amin, xy.X/div), math.Max(amax, xy.X/div)
		}
		ls, gs := nullLineStyle(j)
		gs = spriteOf(gs)
		gs.Radius *= scale
		for _, line := range chainLines(pts, pn.nullChains[j]) {
			l, err := plotter.NewLine(line)
			if err != nil {
				return nil, fmt.Errorf("report: figure metrics: %w", err)
			}
			l.LineStyle = ls
			p.Add(l)
		}
		sc, err := plotter.NewScatter(pts)
		if err != nil {
			return nil, fmt.Errorf("report: figure metrics: %w", err)
		}
		sc.GlyphStyle = gs
		p.Add(sc)
	}
	p.Y.Min, p.Y.Max = valueRange(pn.m.Kind, lo, hi)
	p.X.Min, p.X.Max = amin/1.25, amax*1.25
	// The axis is the panel less the value axis's labels and padding.
	p.X.Tick.Marker = logTicks{W: titleW - vg.Points(10), Pt: minFontPt}
	return p, nil
}

// minMetricRow is the least height of a row of metricsFigure's panels
// (our choice, as the maps' 30 mm): a row squeezed below it leaves a panel
// little room inside its axes, and a few hundred rows (one panel per
// fixed threshold) gave the panels a negative height, whose lines the
// rasterizer then drew millions of points long (a run with 300
// --thresholds had not finished its report after 10 minutes).
const minMetricRow = 30 * vg.Millimeter

// metricsLayout is metricsFigure's layout: the panels that fit the page
// (fitMetricPanels) and those left out, the largest extent area, the
// figure's width and its legend rows and height.
type metricsLayout struct {
	panels, left []metricPanel
	maxArea      float64
	w            vg.Length
	legend       [][]legendItem
	legendH      vg.Length
}

func layoutMetrics(r *Results) metricsLayout {
	panels, maxArea := metricPanels(r)
	l := metricsLayout{maxArea: maxArea, w: twoColumns}
	if len(panels) <= 1 {
		l.w = oneColumn
	}
	// The panels that fit are chosen with the key of every panel; the
	// key drawn lists what they draw, never taller.
	l.legend = legendRows(metricsLegend(r, panels), l.w)
	l.legendH = vg.Length(len(l.legend))*legendRowHeight + vg.Points(4)
	l.panels, l.left = fitMetricPanels(panels, max(1, int((maxHeight-l.legendH)/minMetricRow)))
	if len(l.left) > 0 {
		l.legend = legendRows(metricsLegend(r, l.panels), l.w)
		l.legendH = vg.Length(len(l.legend))*legendRowHeight + vg.Points(4)
	}
	return l
}

// metricsLegend is the key of the panels: each model and null with a
// marker in at least one of them, models in Sensitivity.ModelNames order
// and then the nulls, each in the style its index gives. A model or null
// drawn in no panel (a constant raster, scored on no extent) has no
// entry: the key listed it beside the lines drawn, as if its line were
// hidden behind another, while the caption names it as not drawn.
func metricsLegend(r *Results, panels []metricPanel) []legendItem {
	var items []legendItem
	for i, model := range r.Sensitivity.ModelNames {
		if !slices.ContainsFunc(panels, func(pn metricPanel) bool { return len(pn.pts[i]) > 0 }) {
			continue
		}
		ls := lineStyle(modelColor(i), 1, modelDash(i))
		items = append(items, legendItem{"model " + model, glyphThumb{gs: markerStyle(i), line: &ls}})
	}
	for j, nm := range nulls(r) {
		if !slices.ContainsFunc(panels, func(pn metricPanel) bool { return len(pn.nulls[j]) > 0 }) {
			continue
		}
		ls, gs := nullLineStyle(j)
		items = append(items, legendItem{ModelLabel(r, nm.Name), glyphThumb{gs: gs, line: &ls}})
	}
	return items
}

// fitMetricPanels keeps at most rows rows of three panels, in their order,
// and returns them and the panels left out: first the omission rates at
// fixed thresholds (the last first), then the partial ROC ratios at the E
// values after the first (the last first), then the last panels.
func fitMetricPanels(panels []metricPanel, rows int) (kept, left []metricPanel) {
	room := 3 * rows
	if len(panels) <= room {
		return panels, nil
	}
	out := make([]bool, len(panels))
	n := len(panels)
	drop := func(which func(i int, pn metricPanel) bool) {
		for i := len(panels) - 1; i >= 0 && n > room; i-- {
			if !out[i] && which(i, panels[i]) {
				out[i] = true
				n--
			}
		}
	}
	firstE := -1
	for i, pn := range panels {
		if pn.m.Kind == MetricPartialROC {
			firstE = i
			break
		}
	}
	drop(func(_ int, pn metricPanel) bool {
		return pn.m.Kind == MetricOmission && pn.m.Threshold == metrics.ThresholdFixed
	})
	drop(func(i int, pn metricPanel) bool { return pn.m.Kind == MetricPartialROC && i != firstE })
	drop(func(int, metricPanel) bool { return true })
	for i, pn := range panels {
		if out[i] {
			left = append(left, pn)
		} else {
			kept = append(kept, pn)
		}
	}
	return kept, left
}

// metricsFigure draws one panel per metric: value against extent area.
func metricsFigure(r *Results) figure {
	l := layoutMetrics(r)
	panels, maxArea := l.panels, l.maxArea
	cols := min(3, max(1, len(panels)))
	rows := max(1, (len(panels)+cols-1)/cols)
	f := figure{Name: metricsFigureName, Title: "Each score against extent area", W: l.w}
	legend, legendH := l.legend, l.legendH
	f.H = min(maxHeight, legendH+vg.Length(rows)*52*vg.Millimeter)
	f.Caption = metricsCaption(r)
	div, unit := areaAxis(maxArea)
	panelW := f.W / vg.Length(cols)
	f.draw = func(dc draw.Canvas) error {
		top, rest := splitTop(dc, legendH)
		drawLegendRows(top, legend)
		plots := make([][]*plot.Plot, rows)
		for j := range plots {
			plots[j] = make([]*plot.Plot, cols)
		}
		for k, pn := range panels {
			p, err := pn.plot(panelW-vg.Points(30), div, unit)
			if err != nil {
				return err
			}
			plots[k/cols][k%cols] = p
		}
		drawTiles(plots, rest)
		return nil
	}
	return f
}

// markerScale is the factor on the markers' size (and the bars' caps) of
// a panel whose longest series has n points: 1 up to 20 points, then
// shrinking as sqrt(20/n), so that a marker's area shrinks as the points
// crowd, down to half the size at 80 points or more (our choice: from 60
// extents on the usual 1.5 decades of area, full-size markers merged into
// one band and the null's open circles into a grey blob).
func markerScale(n int) vg.Length {
	if n <= 20 {
		return 1
	}
	return vg.Length(max(0.5, math.Sqrt(20/float64(n))))
}

// markerStyle is model i's marker.
func markerStyle(i int) draw.GlyphStyle {
	return spriteOf(draw.GlyphStyle{Color: modelColor(i), Radius: vg.Points(2.4), Shape: modelGlyph(i)})
}

// errPoints pairs points with asymmetric vertical error offsets.
type errPoints struct {
	plotter.XYs
	plotter.YErrors
}

// fewResamplePoints tells whether the published bootstrap of a scored
// model or null draws fewer than MinPairedPoints test points per resample
// on some extent (where it gives no interval or P: BootstrapReadable).
func fewResamplePoints(r *Results) bool {
	for _, sc := range r.Scores {
		if sc.Scored && len(sc.PartialROC) > 0 && sc.PartialROC[0].ResampleSize < MinPairedPoints {
			return true
		}
	}
	return false
}

// minBootstrapPoints is the fewest test points on which each resample of
// the published bootstrap at fraction f draws MinPairedPoints of them
// (metrics.ResampleSize; BootstrapReadable): 19 at 0.5.
func minBootstrapPoints(f float64) int {
	if !(f > 0) {
		return MinPairedPoints
	}
	n := max(1, int(math.Ceil((float64(MinPairedPoints)-0.5)/f)))
	for n > 1 && metrics.ResampleSize(f, n-1) >= MinPairedPoints {
		n--
	}
	for metrics.ResampleSize(f, n) < MinPairedPoints {
		n++
	}
	return n
}

// fewResampleWords says where the bootstrap gives no interval or P for
// too few points per resample: "where a resample draws fewer than 10 test
// records (an extent with fewer than 19 at 50%)".
func fewResampleWords(st Settings) string {
	return fmt.Sprintf("where a resample draws fewer than %d test records (an extent with fewer than %d at %s%%)", MinPairedPoints, minBootstrapPoints(st.ResampleFraction), fmtG(100*st.ResampleFraction))
}

// scoredModels returns the set of models and nulls scored on at least
// one extent, and the labels of the others (a constant raster), models
// in ModelNames order, then nulls.
func scoredModels(r *Results) (map[string]bool, []string) {
	scored := map[string]bool{}
	for _, sc := range r.Scores {
		if sc.Scored {
			scored[sc.Model] = true
		}
	}
	var unscored []string
	if r.Sensitivity != nil {
		for _, model := range r.Sensitivity.ModelNames {
			if !scored[model] {
				unscored = append(unscored, model)
			}
		}
	}
	for _, nm := range nulls(r) {
		if !scored[nm.Name] {
			unscored = append(unscored, ModelLabel(r, nm.Name))
		}
	}
	return scored, unscored
}

// undrawnSentence names, per metric, the models and nulls with no marker
// in its panel (the score undefined on every extent scored: a model of two
// values has no Boyce index), and the metrics with no panel at all, so
// that a line missing from a panel is not read as hidden behind another;
// a model or null scored on no extent (a constant raster) is named once,
// as not scored.
func undrawnSentence(r *Results) string {
	s := r.Sensitivity
	if s == nil {
		return ""
	}
	l := layoutMetrics(r)
	drawn := map[string]metricPanel{}
	for _, pn := range l.panels {
		drawn[pn.m.Key] = pn
	}
	noRoom := map[string]bool{}
	for _, pn := range l.left {
		noRoom[pn.m.Key] = true
	}
	// A model or null scored on no extent (a constant raster) has no
	// score to be undefined: named once, as not scored.
	scored, unscored := scoredModels(r)
	var parts, none []string
	for _, m := range s.Metrics {
		pn, ok := drawn[m.Key]
		if noRoom[m.Key] {
			continue
		}
		if !ok {
			none = append(none, m.Label)
			continue
		}
		var names []string
		for i, model := range s.ModelNames {
			if len(pn.pts[i]) == 0 && scored[model] {
				names = append(names, model)
			}
		}
		for j, nm := range nulls(r) {
			if len(pn.nulls[j]) == 0 && scored[nm.Name] {
				names = append(names, ModelLabel(r, nm.Name))
			}
		}
		if len(names) > 0 {
			parts = append(parts, m.Label+" of "+joinList(names))
		}
	}
	out := ""
	if len(unscored) > 0 {
		out += " Not scored on any extent (the Scores table says why), so not drawn: " + joinList(unscored) + "."
	}
	if len(parts) > 0 {
		out += " Undefined on every extent, so not drawn: " + strings.Join(parts, "; ") + "."
	}
	if len(none) > 0 && len(scored) > 0 {
		out += " No panel (undefined for every model on every extent): " + joinList(none) + "."
	}
	if len(l.left) > 0 {
		out += fmt.Sprintf(" No room on the page for %d more panel%s (%s): their values are in the tables and scores.csv.", len(l.left), Plural(len(l.left)), leftPanels(l.left))
	}
	return out
}

// leftPanels names the panels left out for room: the omission rates at
// fixed thresholds by their count and range, the others by label.
func leftPanels(left []metricPanel) string {
	var names []string
	var fixed []float64
	for _, pn := range left {
		if pn.m.Kind == MetricOmission && pn.m.Threshold == metrics.ThresholdFixed {
			fixed = append(fixed, pn.m.ThresholdValue)
			continue
		}
		names = append(names, pn.m.Label)
	}
	switch {
	case len(fixed) == 1:
		names = append(names, "omission at the fixed threshold "+fmtG(fixed[0]))
	case len(fixed) > 1:
		names = append(names, fmt.Sprintf("omission at %d fixed thresholds from %s to %s", len(fixed), fmtG(slices.Min(fixed)), fmtG(slices.Max(fixed))))
	}
	return joinList(names)
}

func metricsCaption(r *Results) string {
	st := r.Settings
	c := "Each score against the area of the extent (log scale), one colour, marker and dash per model; " +
		"every score uses the test records inside that extent (counts in the Extents table). " +
		"A line joins the extents of one nested chain (extents in no chain are markers alone), so a family of several kinds has one line per chain and model; " +
		"past 20 extents the markers shrink as they crowd. "
	if s := r.Sensitivity; s != nil && len(s.ScoredExtents) > 1 {
		// Where the reference sits on the area axis.
		for _, e := range r.Extents {
			if e.ID == s.BaseExtent {
				c += fmt.Sprintf("%s, whose scores the Analysis takes differences from, is at %s km². ", upperFirst(referenceName(s)), fmtArea(e.AreaKm2))
			}
		}
	}
	if st.PairedResamples >= 2 {
		c += fmt.Sprintf("AUC bars: plus and minus one SD of AUC over the %d full-size paired resamples of the test records inside the extent, "+
			"which estimates the same uncertainty as the AUC's standard error (Scores table). ", st.PairedResamples)
	}
	if st.Iterations >= 1 {
		bar := ""
		switch fewPts, fewB := fewResamplePoints(r), fewFormedBootstrap(r); {
		case st.Iterations < 2:
		case st.Iterations < MinPercentileResamples:
			// No extent has a bar (BootstrapReadable).
			bar = fmt.Sprintf(", with no bar: fewer than %d resamples place no 2.5th or 97.5th percentile inside the resampled values (our cut-off)", MinPercentileResamples)
		case fewPts && fewB:
			bar = fmt.Sprintf(" and the bar spans their 2.5th to 97.5th percentiles (no bar %s or where fewer than %d resamples formed a ratio, our cut-offs)", fewResampleWords(st), MinPercentileResamples)
		case fewPts:
			bar = fmt.Sprintf(" and the bar spans their 2.5th to 97.5th percentiles (no bar %s, our cut-off)", fewResampleWords(st))
		case fewB:
			bar = fmt.Sprintf(" and the bar spans their 2.5th to 97.5th percentiles (no bar where fewer than %d resamples formed a ratio, our cut-off)", MinPercentileResamples)
		default:
			bar = " and the bar spans their 2.5th to 97.5th percentiles"
		}
		c += fmt.Sprintf("Partial ROC: the point is the mean ratio of the %d resample%s of %s%% of the test records (%s)%s; "+
			"the full-sample ratio is in the tables. ",
			st.Iterations, Plural(st.Iterations), fmtG(100*st.ResampleFraction), bootstrapNote(st), bar)
	}
	if st.PairedResamples >= 2 || st.Iterations >= 2 {
		// Extents share their test points: bars that overlap say nothing
		// about a difference, which is paired.
		c += "Each bar is for its own extent; the extents share their test records, so whether two extents differ is read from their paired difference under Analysis, not from overlapping bars. "
	}
	c += "Omission and predicted area at a threshold have no bar. The predicted area has no sampling error (the threshold comes from the training records alone); " +
		"the omission rate does vary with the test records, and its paired differences with their intervals are under Analysis. " +
		"Markers of different models are shifted a few percent apart along the area axis so that their bars do not overlap. " +
		"Extents that were not scored are left out."
	c += undrawnSentence(r)
	if n := len(nulls(r)); n > 0 {
		c += " " + nullsInMetricsCaptionFor(n)
	}
	return c
}
