package report

import (
	"fmt"
	"image/color"
	"math"
	"slices"
	"sort"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
)

// nullGapPlot draws the "model minus null per extent" figure: for every
// model and null, the paired AUC difference model minus null (from
// Sensitivity.AboveNull) against the extent area (log scale), with its
// 95% interval as a vertical bar and a line at 0. It returns nil when the
// results hold no defined model-minus-null difference.
func nullGapPlot(r *Results, w vg.Length) (*plot.Plot, []legendItem, error) {
	if r.Sensitivity == nil {
		return nil, nil, nil
	}
	var items []legendItem
	maxArea := 0.0
	for _, an := range r.Sensitivity.AboveNull {
		for _, g := range an.Gaps {
			maxArea = math.Max(maxArea, g.AreaKm2)
		}
	}
	div, unit := areaAxis(maxArea)
	p := newPlot("AUC: model minus null, on the same test points", w)
	p.X.Scale = plot.LogScale{}
	p.X.Tick.Marker = logTicks{}
	p.X.Label.Text = unit
	p.Y.Label.Text = "AUC difference (model − null)"
	modelIndex := map[string]int{}
	for i, m := range r.Sensitivity.ModelNames {
		modelIndex[m] = i
	}
	chainOf := map[string]string{}
	for _, e := range r.Extents {
		chainOf[e.ID] = e.Chain
	}
	most := 0
	for _, an := range r.Sensitivity.AboveNull {
		if an.Metric == "auc" {
			most = max(most, len(an.Gaps))
		}
	}
	scale := markerScale(most)
	lo, hi := math.Inf(1), math.Inf(-1)
	nulls := map[string]int{}
	pairModels, pairNulls := map[string]bool{}, map[string]bool{}
	drawn := 0
	for _, an := range r.Sensitivity.AboveNull {
		if an.Metric != "auc" {
			continue
		}
		j, ok := nulls[an.Null]
		if !ok {
			j = len(nulls)
			nulls[an.Null] = j
		}
		i := modelIndex[an.Model]
		var gaps []NullGap
		for _, g := range an.Gaps {
			if g.Defined && g.AreaKm2 > 0 {
				gaps = append(gaps, g)
			}
		}
		if len(gaps) == 0 {
			continue
		}
		dash := gapDash(j)
		if gapNulls(r) == 1 {
			dash = modelDash(i) // one null: the line pattern is the model's
		}
		shift := seriesShift(j*len(modelIndex)+i, len(modelIndex)*gapNulls(r))
		ls, x0, x1, err := addGapSeries(p, gaps, i, shift, dash, div, scale, chainOf)
		if err != nil {
			return nil, nil, err
		}
		lo, hi = math.Min(lo, x0), math.Max(hi, x1)
		gs := markerStyle(i)
		items = append(items, legendItem{an.Model + " − " + ModelLabel(r, an.Null), glyphThumb{gs: gs, line: &ls}})
		drawn++
		pairModels[an.Model], pairNulls[an.Null] = true, true
	}
	if drawn == 0 {
		return nil, nil, nil
	}
	if len(pairModels) > 1 && len(pairNulls) > 1 {
		items = factorKey(r, pairModels, pairNulls, nulls)
	}
	zero, err := plotter.NewLine(plotter.XYs{{X: lo / 1.25, Y: 0}, {X: hi * 1.25, Y: 0}})
	if err != nil {
		return nil, nil, fmt.Errorf("report: figure model minus null: %w", err)
	}
	zero.LineStyle = draw.LineStyle{Color: nullZeroGrey, Width: vg.Points(0.8)}
	p.Add(zero)
	p.X.Min, p.X.Max = lo/1.25, hi*1.25
	p.X.Tick.Marker = logTicks{W: w - vg.Points(10), Pt: minFontPt}
	return p, items, nil
}

// addGapSeries adds to p one model-minus-null series (model i, line
// pattern dash; gaps defined, areas in units of div): a line joining the extents of
// each nested chain (chainOf), the markers scaled by scale, and the 95%
// intervals as bars, the series moved along the area axis by the factor
// shift (seriesShift) so that bars stay apart. It returns the series'
// line style and the smallest and largest x drawn.
func addGapSeries(p *plot.Plot, gaps []NullGap, i int, shift float64, dash []vg.Length, div float64, scale vg.Length, chainOf map[string]string) (ls draw.LineStyle, lo, hi float64, err error) {
	lo, hi = math.Inf(1), math.Inf(-1)
	sort.SliceStable(gaps, func(a, b int) bool { return gaps[a].AreaKm2 < gaps[b].AreaKm2 })
	xys := make(plotter.XYs, len(gaps))
	chains := make([]string, len(gaps))
	var ep struct {
		plotter.XYs
		plotter.YErrors
	}
	for k, g := range gaps {
		x := g.AreaKm2 / div * shift
		xys[k] = plotter.XY{X: x, Y: g.Diff}
		chains[k] = chainOf[g.Extent]
		ep.XYs = append(ep.XYs, plotter.XY{X: x, Y: g.Diff})
		ep.YErrors = append(ep.YErrors, struct{ Low, High float64 }{Low: math.Max(0, g.Diff-g.Low), High: math.Max(0, g.High-g.Diff)})
		lo, hi = math.Min(lo, x), math.Max(hi, x)
	}
	ls = lineStyle(modelColor(i), 1, dash)
	// A line joins the extents of one nested chain only (chainLines).
	for _, line := range chainLines(xys, chains) {
		l, err := plotter.NewLine(line)
		if err != nil {
			return ls, 0, 0, fmt.Errorf("report: figure model minus null: %w", err)
		}
		l.LineStyle = ls
		p.Add(l)
	}
	sc, err := plotter.NewScatter(xys)
	if err != nil {
		return ls, 0, 0, fmt.Errorf("report: figure model minus null: %w", err)
	}
	sc.GlyphStyle = markerStyle(i)
	sc.GlyphStyle.Radius *= scale
	eb, err := plotter.NewYErrorBars(ep)
	if err != nil {
		return ls, 0, 0, fmt.Errorf("report: figure model minus null: %w", err)
	}
	eb.LineStyle = lineStyle(modelColor(i), 0.8, nil)
	eb.CapWidth = vg.Points(3) * scale
	p.Add(sc, eb)
	return ls, lo, hi, nil
}

// gapDashes tell the nulls apart in the model-minus-null figure (colour
// and marker tell the models): each null's pattern differs from every
// other's, whatever the model, so that two pairs of one model never share
// colour, marker and line.
var gapDashes = [][]vg.Length{
	nil,
	{vg.Points(1.5), vg.Points(2)},
	{vg.Points(5), vg.Points(2.5)},
	{vg.Points(7), vg.Points(2.5), vg.Points(1.5), vg.Points(2.5)},
	{vg.Points(9), vg.Points(3)},
	{vg.Points(5), vg.Points(2), vg.Points(1.5), vg.Points(2), vg.Points(1.5), vg.Points(2)},
	// Four more, so that ten nulls differ (six --null rasters and the
	// distance-only null drew the seventh, that null, as the first).
	{vg.Points(1.5), vg.Points(4.5)},
	{vg.Points(12), vg.Points(2.5), vg.Points(1.5), vg.Points(2.5)},
	{vg.Points(3), vg.Points(4)},
	{vg.Points(9), vg.Points(2.5), vg.Points(1.5), vg.Points(2.5), vg.Points(1.5), vg.Points(2.5)},
}

// gapNulls counts the nulls with an AUC difference in the
// model-minus-null figure: with one, each model keeps its own line
// pattern (as in the other figures); with more, the pattern tells the
// null.
func gapNulls(r *Results) int {
	seen := map[string]bool{}
	if r.Sensitivity != nil {
		for _, an := range r.Sensitivity.AboveNull {
			if an.Metric == "auc" {
				seen[an.Null] = true
			}
		}
	}
	return len(seen)
}

// gapDash is the line pattern of the j-th null in the model-minus-null
// figure: gapDashes[j % 10], and from the eleventh null on that pattern
// (solid: a 12 pt dash and a 3 pt gap) followed by j / 10 dots of 1.2 pt,
// so that no two nulls share a pattern however many a run holds (the
// eleventh was drawn as the first).
func gapDash(j int) []vg.Length {
	d := gapDashes[j%len(gapDashes)]
	round := j / len(gapDashes)
	if round == 0 {
		return d
	}
	if d == nil {
		d = []vg.Length{vg.Points(12), vg.Points(3)}
	}
	d = slices.Clone(d)
	for range round {
		d = append(d, vg.Points(1.2), vg.Points(2))
	}
	return d
}

// factorKey is the model-minus-null figure's key when several models
// meet several nulls: one entry per model (its colour and marker, without
// a line) and one per null (its line pattern), rather than one per pair, whose rows
// (21 for 7 models and 3 nulls) pushed the panel off the figure.
// nullIndex gives each null's index j.
func factorKey(r *Results, models, nulls map[string]bool, nullIndex map[string]int) []legendItem {
	var items []legendItem
	for i, m := range r.Sensitivity.ModelNames {
		if models[m] {
			// The marker alone: a line under it (solid, the first
			// null's pattern) read as that model's lines being solid
			// against every null.
			items = append(items, legendItem{m, glyphThumb{gs: markerStyle(i)}})
		}
	}
	ns := make([]string, 0, len(nulls))
	for n := range nulls {
		ns = append(ns, n)
	}
	sort.Slice(ns, func(a, b int) bool { return nullIndex[ns[a]] < nullIndex[ns[b]] })
	for _, n := range ns {
		items = append(items, legendItem{"− " + ModelLabel(r, n), lineThumb{lineStyle(ink, 1, gapDash(nullIndex[n]))}})
	}
	return items
}

// nullGapPanelMin is the least height of the model-minus-null panel
// under its key (our choice: the 90 mm figure less two key rows).
const nullGapPanelMin = 90*vg.Millimeter - 2*legendRowHeight - 4

// nullZeroGrey draws the line at 0 of the model-minus-null figure.
var nullZeroGrey = color.Gray{Y: 100}

// nullGapNotReadCaption names the differences the model-minus-null
// figure draws with a bar although they are not read (fewer than
// MinPairedPoints common test points): their bars are no test. "" when
// every drawn one is read.
func nullGapNotReadCaption(r *Results) string {
	var few []string
	for _, an := range r.Sensitivity.AboveNull {
		if an.Metric != "auc" {
			continue
		}
		for _, g := range an.Gaps {
			if g.Defined && g.AreaKm2 > 0 && notJudgedPosition(g.Reading) {
				few = append(few, fmt.Sprintf("%s − %s on %s (%d)", an.Model, an.Null, g.Extent, g.CommonPoints))
			}
		}
	}
	if len(few) == 0 {
		return ""
	}
	return fmt.Sprintf(" Drawn but not read, on fewer than %d common test points (our cut-off): %s.", MinPairedPoints, joinList(few))
}

// nullGapFigures returns the report's "model minus null per extent"
// figure (nullGapPlot), or nothing when no AUC difference between a model
// and a null is defined.
func nullGapFigures(r *Results) []figure {
	has := false
	if r.Sensitivity != nil {
		for _, an := range r.Sensitivity.AboveNull {
			has = has || (an.Metric == "auc" && an.Defined > 0)
		}
	}
	if !has {
		return nil
	}
	f := figure{Name: nullFigureName, Title: "Model minus null per extent",
		Caption: "AUC of each model minus that of each null on the same test points, against the extent area (log scale); " +
			"a line joins the extents of one nested chain (extents in no chain are markers alone). " +
			gapStyleSentence(gapNulls(r)) +
			"Vertical bars: 95% interval from the per-point placements. " + nullGapBarsCaption + nullGapNotReadCaption(r),
		W: twoColumns, H: 90 * vg.Millimeter}
	// The figure grows with its key, so that the panel keeps its height.
	if _, items, err := nullGapPlot(r, f.W-vg.Points(30)); err == nil && items != nil {
		keyH := vg.Length(len(legendRows(items, f.W)))*legendRowHeight + vg.Points(4)
		f.H = min(maxHeight, max(f.H, keyH+nullGapPanelMin))
	}
	f.draw = func(c draw.Canvas) error {
		p, items, err := nullGapPlot(r, f.W-vg.Points(30))
		if err != nil || p == nil {
			return err
		}
		// The legend sits above the panel, outside the data.
		legend := legendRows(items, f.W)
		top, rest := splitTop(c, vg.Length(len(legend))*legendRowHeight+vg.Points(4))
		drawLegendRows(top, legend)
		rest.Max.X -= edgePad
		// The 2 pt the panels of the other figures keep on their left
		// (drawTiles' PadLeft): gonum sets the vertical axis title's
		// baseline one text height from the canvas's edge, so without them
		// the tops of its glyphs stood 0.8 pt outside the figure.
		rest.Min.X += vg.Points(2)
		p.Draw(rest)
		return nil
	}
	return []figure{f}
}

// gapStyleSentence says how the model-minus-null figure tells its lines
// apart (addGapSeries's line patterns).
func gapStyleSentence(nulls int) string {
	if nulls > 1 {
		return "Colour and marker tell the model, the line pattern the null. "
	}
	return "Colour, marker and line pattern tell the model. "
}
