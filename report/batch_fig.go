package report

import (
	"fmt"
	"image/color"
	"math"
	"slices"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
)

// Layout of the extent-effect figure (our choices): one row per study at
// effectPitch when they fit under maxHeight, with effectFrame for the
// title, legend and axis; below effectMinLabelPitch a row is too thin for
// an 8 pt label (about 2.8 mm tall) and the study names are left off.
const (
	effectPitch         = 4.5 * vg.Millimeter
	effectFrame         = 38 * vg.Millimeter
	effectMinHeight     = 70 * vg.Millimeter
	effectMinLabelPitch = 3.5 * vg.Millimeter
)

// effectLayout is the height of the figure for n rows and whether the
// rows carry their study's name.
func effectLayout(n int) (h vg.Length, labels bool) {
	h = effectFrame + vg.Length(n)*effectPitch
	h = min(max(h, effectMinHeight), maxHeight)
	return h, (h-effectFrame)/vg.Length(max(n, 1)) >= effectMinLabelPitch
}

// effectFigure draws the extent effect across studies: one row per study
// (EffectOrder, the smallest effect at the bottom), one mark per model at
// its extent effect (the paired AUC difference from the base extent of
// largest magnitude) with its 95% interval as a horizontal bar, a line at
// 0 and, when every study used the same tolerance T, the band -T..+T
// shaded. False when no study has a defined effect.
func effectFigure(s *BatchSummary) (figure, bool) {
	order := s.EffectOrder()
	if len(order) == 0 {
		return figure{}, false
	}
	h, labels := effectLayout(len(order))
	f := figure{Name: EffectFigure, Title: "Extent effect across studies", W: twoColumns, H: h}
	f.Caption = "Each row is a study, sorted by its extent effect (the model with the effect of largest magnitude sets the order), most negative at the bottom. " +
		"A mark is a model's paired AUC difference from the study's base extent of largest magnitude, on the test points both extents hold; " +
		"the bar is its 95% interval from the per-point placements. The extents differ between studies (each study's own region and buffers)."
	if ids := s.standInIDs(); len(ids) > 0 {
		f.Caption += " In " + joinList(ids) + " the base extent could not be scored and the first scored extent stands in for it (summary.csv, base_extent)."
	}
	if len(s.Tolerances) == 1 {
		whose := "the studies' tolerance"
		if s.Tolerances[0] == DefaultToleranceAUC {
			whose = "our default tolerance, not a published standard"
		}
		f.Caption += fmt.Sprintf(" Shaded: the equivalence band ±%s (%s); a bar wholly outside it makes the model's AUC extent-sensitive in that study, "+
			"unless it rests on fewer than %d common test points (our cut-off: not judged). A bar across or inside the band does not settle the verdict, "+
			"which rests on every extent of the study (see the table).", fmtG(s.Tolerances[0]), whose, MinPairedPoints)
	} else {
		f.Caption += fmt.Sprintf(" The studies used different tolerances, so no band is drawn; an effect on fewer than %d common test points is not judged (our cut-off).", MinPairedPoints)
	}
	if few := s.fewPointEffects(); len(few) > 0 {
		f.Caption += fmt.Sprintf(" Drawn with a dashed bar and not judged, on fewer than %d common test points: %s.", MinPairedPoints, joinList(few))
	}
	if labels {
		f.Caption += " n: the study's test points on its base extent; an effect rests on those the other extent holds too (summary.csv, auc_diff_points)."
	} else {
		f.Caption += " There are too many studies to name each row; summary.csv lists them."
	}
	f.draw = func(c draw.Canvas) error {
		p, items, err := effectPlot(s, order, labels, f.W-vg.Points(30))
		if err != nil {
			return err
		}
		rest := c
		if len(items) > 1 {
			legend := legendRows(items, f.W)
			var top draw.Canvas
			top, rest = splitTop(c, vg.Length(len(legend))*legendRowHeight+vg.Points(4))
			drawLegendRows(top, legend)
		}
		p.Draw(rest)
		return nil
	}
	return f, true
}

// standInIDs lists the studies whose base extent was replaced by another
// as the reference (StudySummary.StandIn).
func (s *BatchSummary) standInIDs() []string {
	var ids []string
	for _, st := range s.Studies {
		if st.OK && st.StandIn != "" {
			ids = append(ids, st.ID)
		}
	}
	return ids
}

// fewPointEffects lists the drawn extent effects that rest on fewer than
// MinPairedPoints common test points, as "study (model, N)".
func (s *BatchSummary) fewPointEffects() []string {
	var out []string
	for _, r := range s.Rows {
		if r.EffectDefined && !r.EffectJudged {
			out = append(out, fmt.Sprintf("%s (%s, %d)", r.Study, r.Model, r.EffectPoints))
		}
	}
	return out
}

// notJudgedDashes dash the bar of an extent effect that is not judged.
var notJudgedDashes = []vg.Length{vg.Points(2), vg.Points(1.5)}

// xErrPoints pairs points with asymmetric horizontal error offsets.
type xErrPoints struct {
	plotter.XYs
	plotter.XErrors
}

// effectPlot builds the panel of effectFigure and its legend (one item
// per model).
func effectPlot(s *BatchSummary, order []string, labels bool, w vg.Length) (*plot.Plot, []legendItem, error) {
	models := s.Models()
	row := map[string]int{}
	for i, id := range order {
		row[id] = i
	}
	p := newPlot("AUC: paired difference from the base extent of largest magnitude, per study and model", w)
	p.X.Label.Text = "AUC difference (extent − base extent, on common test points)"
	p.Y.Label.Text = "studies, sorted by effect"
	// Inside a row, the study's marks sit in slots 0.25 apart (our
	// choice), centred on the row: a study with one model has its mark on
	// the row's line.
	inRow := map[string][]string{}
	for _, r := range s.Rows {
		if r.EffectDefined {
			inRow[r.Study] = append(inRow[r.Study], r.Model)
		}
	}
	offset := func(study, model string) float64 {
		ms := inRow[study]
		return (float64(slices.Index(ms, model)) - float64(len(ms)-1)/2) * -0.25
	}
	bottom, top := -0.6, float64(len(order))-0.4
	if len(s.Tolerances) == 1 {
		// The band goes first, under the marks.
		t := s.Tolerances[0]
		band, err := plotter.NewPolygon(plotter.XYs{{X: -t, Y: bottom}, {X: t, Y: bottom}, {X: t, Y: top}, {X: -t, Y: top}})
		if err != nil {
			return nil, nil, fmt.Errorf("report: figure %s: %w", EffectFigure, err)
		}
		band.Color = effectBandGrey
		band.LineStyle.Width = 0
		p.Add(band)
	}
	lo, hi := 0.0, 0.0
	var items []legendItem
	anyNotJudged := false
	for j, model := range models {
		// Judged effects (index 0) and those not judged (1): the latter's
		// bars are dashed, so that they do not read as the others.
		var pts [2]xErrPoints
		for _, r := range s.Rows {
			i, ok := row[r.Study]
			if r.Model != model || !r.EffectDefined || !ok {
				continue
			}
			k := 0
			if !r.EffectJudged {
				k, anyNotJudged = 1, true
			}
			y := float64(i) + offset(r.Study, r.Model)
			pts[k].XYs = append(pts[k].XYs, plotter.XY{X: r.Effect, Y: y})
			pts[k].XErrors = append(pts[k].XErrors, struct{ Low, High float64 }{Low: math.Max(0, r.Effect-r.EffectLow), High: math.Max(0, r.EffectHigh-r.Effect)})
			lo, hi = math.Min(lo, math.Min(r.EffectLow, r.Effect)), math.Max(hi, math.Max(r.EffectHigh, r.Effect))
		}
		drawn := false
		for k := range pts {
			if len(pts[k].XYs) == 0 {
				continue
			}
			eb, err := plotter.NewXErrorBars(pts[k])
			if err != nil {
				return nil, nil, fmt.Errorf("report: figure %s: %w", EffectFigure, err)
			}
			eb.LineStyle = lineStyle(modelColor(j), 0.8, nil)
			if k == 1 {
				eb.LineStyle.Dashes = notJudgedDashes
			}
			eb.CapWidth = vg.Points(2.5)
			sc, err := plotter.NewScatter(pts[k].XYs)
			if err != nil {
				return nil, nil, fmt.Errorf("report: figure %s: %w", EffectFigure, err)
			}
			sc.GlyphStyle = markerStyle(j)
			p.Add(eb, sc)
			drawn = true
		}
		if drawn {
			items = append(items, legendItem{model, glyphThumb{gs: markerStyle(j)}})
		}
	}
	if anyNotJudged {
		items = append(items, legendItem{fmt.Sprintf("dashed bar: not judged (fewer than %d common test points)", MinPairedPoints),
			lineThumb{lineStyle(ink, 0.8, notJudgedDashes)}})
	}
	if len(s.Tolerances) == 1 {
		t := s.Tolerances[0]
		lo, hi = math.Min(lo, -t), math.Max(hi, t)
	}
	pad := math.Max((hi-lo)*0.05, 1e-3)
	p.X.Min, p.X.Max = lo-pad, hi+pad
	p.Y.Min, p.Y.Max = bottom, top
	zero, err := plotter.NewLine(plotter.XYs{{X: 0, Y: bottom}, {X: 0, Y: top}})
	if err != nil {
		return nil, nil, fmt.Errorf("report: figure %s: %w", EffectFigure, err)
	}
	zero.LineStyle = draw.LineStyle{Color: nullZeroGrey, Width: vg.Points(0.8)}
	p.Add(zero)
	var ticks []plot.Tick
	if labels {
		for i, id := range order {
			label := id
			if n, ok := s.TestPoints(id); ok {
				label = fmt.Sprintf("%s (n = %d)", id, n)
			}
			ticks = append(ticks, plot.Tick{Value: float64(i), Label: label})
		}
	}
	p.Y.Tick.Marker = plot.ConstantTicks(ticks)
	return p, items, nil
}

// effectBandGrey shades the equivalence band of the extent-effect figure.
var effectBandGrey = color.Gray{Y: 232}
