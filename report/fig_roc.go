package report

import (
	"fmt"
	"image"
	"image/color"
	"math"
	"slices"
	"sort"
	"strings"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"

	"areasweep/extent/vocab"
)

// rocExtents returns the usable extents in order of area.
func rocExtents(r *Results) []Extent {
	var es []Extent
	for _, e := range r.Extents {
		if e.Status == vocab.StatusOK {
			es = append(es, e)
		}
	}
	sort.SliceStable(es, func(i, j int) bool { return es[i].AreaKm2 < es[j].AreaKm2 })
	return es
}

// rocMaxCurves is the most curves a ROC panel draws (our choice: past
// about 16, curves of neighbouring areas share a colour and cover each
// other; a 13-extent family keeps every curve).
const rocMaxCurves = 16

// rocShown returns the extents whose curves the ROC panels draw, in order
// of area, and whether that is fewer than es (all usable extents, by
// area). Up to rocMaxCurves extents, every one; past that, the base
// region, the whole raster, and of each nested chain (and of the extents
// in no chain) its smallest, middle and largest member, so that the panel
// still spans every kind and the whole range of areas.
func rocShown(es []Extent) ([]Extent, bool) {
	if len(es) <= rocMaxCurves {
		return es, false
	}
	keep := map[string]bool{}
	byChain := map[string][]string{}
	var chains []string
	for _, e := range es {
		if e.Kind == vocab.KindBase || e.Kind == vocab.KindWholeRaster {
			keep[e.ID] = true
			continue
		}
		if _, ok := byChain[e.Chain]; !ok {
			chains = append(chains, e.Chain)
		}
		byChain[e.Chain] = append(byChain[e.Chain], e.ID)
	}
	for _, ch := range chains {
		ids := byChain[ch]
		keep[ids[0]], keep[ids[len(ids)/2]], keep[ids[len(ids)-1]] = true, true, true
	}
	var out []Extent
	for _, e := range es {
		if keep[e.ID] {
			out = append(out, e)
		}
	}
	return out, len(out) < len(es)
}

// rocCurveExtents returns the extents of es that some model or null is
// scored on, which have a curve, and the IDs of the others (no test
// points inside): those have no curve in any panel, so they neither
// take a tick on the colour bar nor stretch its range, and the thinning
// past rocMaxCurves never keeps one of them in place of a curve.
func rocCurveExtents(r *Results, es []Extent) ([]Extent, []string) {
	scored := map[string]bool{}
	for _, sc := range r.Scores {
		if sc.Scored {
			scored[sc.Extent] = true
		}
	}
	var kept []Extent
	var none []string
	for _, e := range es {
		if scored[e.ID] {
			kept = append(kept, e)
		} else {
			none = append(none, e.ID)
		}
	}
	return kept, none
}

// noCurveSentence names the extents without a curve in any panel, for
// the ROC figure's caption; "" for none.
func noCurveSentence(ids []string) string {
	switch len(ids) {
	case 0:
		return ""
	case 1:
		return " No model or null is scored on " + ids[0] + " (the Scores table says why), so it has no curve."
	}
	return " No model or null is scored on " + joinList(ids) + " (the Scores table says why), so they have no curve."
}

func findCurve(r *Results, model, extent string) *Curve {
	for i := range r.Curves {
		if r.Curves[i].Model == model && r.Curves[i].Extent == extent {
			return &r.Curves[i]
		}
	}
	return nil
}

func scoredFor(r *Results, model, extent string) bool {
	for _, s := range r.Scores {
		if s.Model == model && s.Extent == extent {
			return s.Scored
		}
	}
	return false
}

// logPosition places area a on [0, 1] between lo and hi on a log scale.
func logPosition(a, lo, hi float64) float64 {
	if !(hi > lo) || lo <= 0 {
		return 0
	}
	// Differences of logarithms: a quotient hi/lo overflows for areas
	// far apart (1e-300 and 5e8 km² in a hand-edited results.json).
	return (math.Log(a) - math.Log(lo)) / (math.Log(hi) - math.Log(lo))
}

// rocFigure draws the ROC curves on the area axis, one panel per model,
// each curve coloured by the area of its extent.
func rocFigure(r *Results) figure {
	panels := rocPanels(r)
	n := max(1, len(panels))
	cols := min(n, 3)
	rows := (n + cols - 1) / cols
	bands := rocBands(r.Settings.E)
	all, noCurve := rocCurveExtents(r, rocExtents(r))
	es, thinned := rocShown(all)
	rk := rocRamp(es)
	styles, twins := rocCurveStyles(es, rk)
	f := figure{Name: rocFigureName, Title: "ROC curves on the area axis", W: twoColumns}
	barW := 24 * vg.Millimeter
	if !rampCurves(es) {
		barW = 0 // no curve on the area ramp: no colour bar to read
	}
	if cols == 1 {
		f.W = oneColumn
	}
	panelW := (f.W - barW) / vg.Length(cols)
	f.Caption = rocCaption(r, es, len(all), thinned, bands)
	if len(twins) > 0 {
		f.Caption += rocTwinsCaption
	}
	if len(es) > 0 {
		f.Caption += noCurveSentence(noCurve)
	}
	diag := lineStyle(color.Gray{Y: 90}, 0.7, []vg.Length{vg.Points(1), vg.Points(2)})
	legend := legendRows(append(rocLegend(r, es, bands, diag), twins...), f.W-barW)
	legendH := vg.Length(len(legend))*legendRowHeight + vg.Points(4)
	f.H = min(maxHeight, legendH+vg.Length(rows)*(panelW+vg.Points(14)))
	f.draw = func(dc draw.Canvas) error {
		bottom, rest := splitBottom(dc, legendH)
		drawLegendRows(bottom, legend)
		barC, rest := splitRight(rest, barW)
		plots := make([][]*plot.Plot, rows)
		for j := range plots {
			plots[j] = make([]*plot.Plot, cols)
		}
		for i, model := range panels {
			p, err := rocPanel(r, model, es, styles, bands, panelW, cols, diag)
			if err != nil {
				return err
			}
			plots[i/cols][i%cols] = p
		}
		drawTiles(plots, rest)
		if rk.hi > 0 && barW > 0 {
			barC.Min.Y += (rest.Max.Y - rest.Min.Y) * 0.15
			barC.Max.Y -= (rest.Max.Y - rest.Min.Y) * 0.15
			drawAreaBar(barC, rk.lo, rk.hi, rk.marks)
		}
		return nil
	}
	return f
}

// rocRamp is the area ramp of the ROC curves (log scale, km²): from the
// smallest to the largest area of the extents of es drawn on it, with a
// mark at each; the base region and the whole raster keep their own
// styles (rocAnchorStyle), so they neither stretch it nor take a mark, as
// on the maps (mapKeyOf). Spanning the whole raster's area, the bar's
// colours past the largest buffer keyed no curve (most of the bar where
// the raster is much larger than the study region).
func rocRamp(es []Extent) *rampKey {
	rk := &rampKey{lo: math.Inf(1), hi: math.Inf(-1), log: true} // drawAreaBar labels its axis
	for _, ex := range es {
		if _, anchor := rocAnchorStyle(ex.Kind); anchor {
			continue
		}
		rk.lo, rk.hi = math.Min(rk.lo, ex.AreaKm2), math.Max(rk.hi, ex.AreaKm2)
		rk.marks = append(rk.marks, ex.AreaKm2)
	}
	if len(rk.marks) == 0 {
		rk.lo, rk.hi = 0, 0
	}
	return rk
}

// rocCurveStyles returns the line style of each curve of es (in its
// order): the base region and the whole raster in their own styles
// (rocAnchorStyle), every other extent in the colour of its area on the
// ramp rk, solid unless extents outside its nested chain lie within
// rampTwinGap of it on the ramp, when each takes a dash pattern of its own
// (twinDashes); and the key's entries for those twins, by area.
func rocCurveStyles(es []Extent, rk *rampKey) ([]draw.LineStyle, []legendItem) {
	styles := make([]draw.LineStyle, len(es))
	var onRamp []int
	var ts []float64
	var chains []string
	for k, ex := range es {
		if ls, ok := rocAnchorStyle(ex.Kind); ok {
			styles[k] = ls
			continue
		}
		onRamp = append(onRamp, k)
		ts = append(ts, rk.t(ex.AreaKm2))
		chains = append(chains, ex.Chain)
	}
	dash, twin := twinDashes(ts, chains)
	var twins []legendItem
	for q, k := range onRamp {
		styles[k] = lineStyle(areaRamp(ts[q]), 1.1, twinDash(dash[q]))
		if twin[q] {
			twins = append(twins, legendItem{es[k].ID, lineThumb{styles[k]}})
		}
	}
	return styles, twins
}

// rocTwinsCaption says why some curves are dashed and named in the key.
const rocTwinsCaption = " Extents outside one nested chain whose areas lie within 1/50 of the colour bar of each other (our choice) " +
	"have nearly one colour: each of their curves takes its own dash pattern, and the key names them."

// rocCaption is the ROC figure's caption: what the axes and curves are,
// the anchors' styles, the partial ROC bands (rocBandsCaption), the
// nulls' shading, and, with the extents thinned to those drawn (es of
// nAll), which ones each panel draws.
func rocCaption(r *Results, es []Extent, nAll int, thinned bool, bands []rocBandSpec) string {
	perNull := ""
	if len(nulls(r)) > 0 {
		perNull = " (and per null, after the models)"
	}
	var anchors []string
	for _, ex := range es {
		switch ex.Kind {
		case vocab.KindBase:
			anchors = append(anchors, "the base region (solid magenta)")
		case vocab.KindWholeRaster:
			anchors = append(anchors, "the whole raster (dashed red)")
		}
	}
	anchorNote := ". "
	if len(anchors) > 0 {
		anchorNote = ", except " + strings.Join(anchors, " and ") + ", drawn as on the maps. "
	}
	curves := "one curve per extent coloured by its area (colour bar from the smallest to the largest of these areas, log scale; dark = small; a tick for each curve)" + anchorNote
	switch {
	case len(es) == 0:
		curves = "no curve: no model or null is scored on any extent. "
	case !rampCurves(es):
		// Only the base region and the whole raster: no colour bar.
		curves = "one curve per extent: " + strings.Join(anchors, " and ") + ", drawn as on the maps. "
	}
	c := fmt.Sprintf("ROC curves on the area axis: share of the extent predicted present (x) against share of the test records inside the extent "+
		"predicted present (y), one panel per model%s, %s"+
		"%sDotted: random prediction. "+
		"The selector under the figures names each curve.", perNull, curves, rocBandsCaption(r.Settings.E, bands))
	if len(nulls(r)) > 0 {
		c += " A null's panel is shaded light grey: a reference, not a model."
	}
	if _, un := scoredModels(r); len(un) == 1 {
		c += " Not scored on any extent (the Scores table says why), so its panel is empty: " + un[0] + "."
	} else if len(un) > 1 {
		c += " Not scored on any extent (the Scores table says why), so their panels are empty: " + joinList(un) + "."
	}
	if thinned {
		c += fmt.Sprintf(" With %d extents, more than the %d a panel keeps readable, each panel draws %d: the base region, the whole raster, "+
			"and the smallest, middle and largest of each nested chain and of the extents in no chain (ticks on the colour bar); "+
			"the selector under the figures draws any of the %d.", nAll, rocMaxCurves, len(es), nAll)
	}
	return c
}

// rampCurves reports whether any curve of es is coloured by its area:
// the base region and the whole raster keep their own styles, so a family
// of those two alone has no curve on the area ramp, and its colour bar
// (ticked at their areas) keyed nothing drawn.
func rampCurves(es []Extent) bool {
	for _, ex := range es {
		if _, ok := rocAnchorStyle(ex.Kind); !ok {
			return true
		}
	}
	return false
}

// rocLegend is the ROC figure's key: the partial ROC bands (one E: its
// band; several: each E's region, its own band and those above it), the
// random prediction (diag), the nulls' shading and the anchors' styles.
func rocLegend(r *Results, es []Extent, bands []rocBandSpec, diag draw.LineStyle) []legendItem {
	var items []legendItem
	if len(bands) == 1 {
		items = append(items, legendItem{fmt.Sprintf("partial ROC region (E = %s)", fmtG(bands[0].e)), boxThumb{fill: bands[0].fill}})
	} else {
		for k, b := range bands {
			items = append(items, legendItem{fmt.Sprintf("partial ROC region, E = %s", fmtG(b.e)), bandsThumb{bands: bands, upTo: k}})
		}
	}
	items = append(items, legendItem{"random prediction", lineThumb{diag}})
	if len(nulls(r)) > 0 {
		items = append(items, legendItem{"null's panel (a reference)", boxThumb{fill: nullPanelShade}})
	}
	// The base region and the whole raster keep the maps' styles
	// (anchorStyle), so that the two references read the same in every
	// figure; the other curves are on the area ramp.
	for _, ex := range es {
		if ls, ok := rocAnchorStyle(ex.Kind); ok {
			items = append(items, legendItem{ex.ID, lineThumb{ls}})
		}
	}
	return items
}

// rocBand is the fill of the partial ROC region of one E, and of the
// largest E's band when several are shaded.
var rocBand = color.Gray{Y: 225}

// rocMaxBands is the most E values a ROC panel shades (our choice: four
// greys from rocBandDark to rocBand stay apart in print and under the
// curves; more would make a gradient that no one reads band by band).
// The others are named in the caption as not shaded.
const rocMaxBands = 4

// rocBandDark is the grey of the band nearest y = 1, the smallest E's,
// when several E values are shaded (our choice: dark enough to stand
// apart from rocBand, light enough that the lightest curves of the area
// ramp still show on it).
const rocBandDark = 190

// rocBandSpec is one shaded band of a ROC panel: y from lo to hi, the
// part of the partial ROC region of E = e that the region of no smaller
// E shaded holds; the region of e is this band and every band above it.
type rocBandSpec struct {
	e, lo, hi float64
	fill      color.Gray
}

// rocBands returns the bands of the first rocMaxBands E values of es as
// given (the first is the report's main E), ordered by E: the smallest
// E's band from y = 1 - E to 1, each next one from 1 - E up to the band
// above it, each in its own grey, darkest at the top (a stricter
// region). One E keeps rocBand. nil for no E.
func rocBands(es []float64) []rocBandSpec {
	shown := slices.Clone(es[:min(len(es), rocMaxBands)])
	slices.Sort(shown)
	out := make([]rocBandSpec, 0, len(shown))
	top := 1.0
	for k, e := range shown {
		if !(e > 0 && e < 1) || 1-e >= top {
			continue // not a region (Validate refuses such E)
		}
		grey := rocBand
		if len(shown) > 1 {
			grey.Y = uint8(math.Round(rocBandDark + float64(rocBand.Y-rocBandDark)*float64(k)/float64(len(shown)-1)))
		}
		out = append(out, rocBandSpec{e: e, lo: 1 - e, hi: top, fill: grey})
		top = 1 - e
	}
	return out
}

// rocBandsCaption is the caption's sentence on the partial ROC bands of
// es (bands, rocBands): "" for none.
func rocBandsCaption(es []float64, bands []rocBandSpec) string {
	switch len(bands) {
	case 0:
		return ""
	case 1:
		return fmt.Sprintf("Grey band: the partial ROC region, where at most E = %s of the test records are omitted. ", fmtG(bands[0].e))
	}
	var shown []string
	for _, b := range bands {
		shown = append(shown, fmtG(b.e))
	}
	c := fmt.Sprintf("Grey bands: the partial ROC region of each E (%s), where at most E of the test records are omitted, from y = 1 down to 1 − E: "+
		"the region of E = %s is the darkest band at the top, that of each larger E its own, lighter band and every band above it (the key draws each). ",
		joinList(shown), shown[0])
	if len(es) > rocMaxBands {
		var rest []string
		for _, e := range es[rocMaxBands:] {
			rest = append(rest, fmtG(e))
		}
		c += fmt.Sprintf("Only the first %d E values given are shaded (our choice); E = %s are not, and the partial ROC table gives their ratios. ", rocMaxBands, joinList(rest))
	}
	return c
}

// bandsThumb is a key's thumbnail of the region of the upTo-th band:
// the bands' stripes from the top, those above and at upTo filled, the
// rest left white, as the panel shades them.
type bandsThumb struct {
	bands []rocBandSpec
	upTo  int
}

// Thumbnail implements plot.Thumbnailer.
func (t bandsThumb) Thumbnail(c *draw.Canvas) {
	r := vg.Rectangle{Min: vg.Point{X: c.Min.X + vg.Points(5), Y: c.Min.Y}, Max: vg.Point{X: c.Max.X - vg.Points(5), Y: c.Max.Y}}
	h := (r.Max.Y - r.Min.Y) / vg.Length(len(t.bands))
	for k := 0; k <= t.upTo && k < len(t.bands); k++ {
		s := vg.Rectangle{Min: vg.Point{X: r.Min.X, Y: r.Max.Y - h*vg.Length(k+1)}, Max: vg.Point{X: r.Max.X, Y: r.Max.Y - h*vg.Length(k)}}
		c.SetColor(t.bands[k].fill)
		c.Fill(s.Path())
	}
	c.StrokeLines(lineStyle(ink, 0.5, nil), []vg.Point{r.Min, {X: r.Max.X, Y: r.Min.Y}, r.Max, {X: r.Min.X, Y: r.Max.Y}, r.Min})
}

// rocPanel draws model's panel: the null's shade, the partial ROC bands
// (rocBands), the random prediction (diag) and one curve per extent of es
// in its style (styles, rocCurveStyles), largest first. The panel of a model or null scored on no extent holds only
// rocUnscoredNote.
func rocPanel(r *Results, model string, es []Extent, styles []draw.LineStyle, bands []rocBandSpec, panelW vg.Length, cols int, diag draw.LineStyle) (*plot.Plot, error) {
	p := newPlot(rocPanelTitle(r, model), panelW-vg.Points(30))
	p.X.Min, p.X.Max, p.Y.Min, p.Y.Max = 0, 1, 0, 1
	p.X.Label.Text = "share of extent predicted present"
	if cols >= 3 {
		p.X.Tick.Marker = niceTicks{N: 3} // narrow panels: 0, 0.5, 1
	}
	p.Y.Label.Text = "share of test records"
	if isNull(r, model) {
		// A null's panel is shaded: a reference, never one more
		// model.
		shade, err := plotter.NewPolygon(plotter.XYs{{X: 0, Y: 0}, {X: 1, Y: 0}, {X: 1, Y: 1}, {X: 0, Y: 1}})
		if err != nil {
			return nil, fmt.Errorf("report: figure roc: %w", err)
		}
		shade.Color = nullPanelShade
		shade.LineStyle.Width = 0
		p.Add(shade)
	}
	if scored, _ := scoredModels(r); !scored[model] {
		// No curve to read against the band and the diagonal: the panel
		// says why it is empty in the figure itself, not only in the
		// report's caption (the PNG or PDF travels without it).
		p.Add(panelNote{s: rocUnscoredNote})
		return p, nil
	}
	for _, b := range bands {
		poly, err := plotter.NewPolygon(plotter.XYs{{X: 0, Y: b.lo}, {X: 1, Y: b.lo}, {X: 1, Y: b.hi}, {X: 0, Y: b.hi}})
		if err != nil {
			return nil, fmt.Errorf("report: figure roc: %w", err)
		}
		poly.Color = b.fill
		poly.LineStyle.Width = 0
		p.Add(poly)
	}
	d, err := plotter.NewLine(plotter.XYs{{X: 0, Y: 0}, {X: 1, Y: 1}})
	if err != nil {
		return nil, fmt.Errorf("report: figure roc: %w", err)
	}
	d.LineStyle = diag
	p.Add(d)
	// Largest first, so the small extents' dark curves lie on top,
	// and the anchors last of all.
	order := make([]int, 0, len(es))
	for _, anchors := range []bool{false, true} {
		for k := len(es) - 1; k >= 0; k-- {
			if _, ok := rocAnchorStyle(es[k].Kind); ok == anchors {
				order = append(order, k)
			}
		}
	}
	for _, k := range order {
		ex := es[k]
		c := findCurve(r, model, ex.ID)
		if c == nil || !scoredFor(r, model, ex.ID) {
			continue
		}
		m := min(len(c.X), len(c.Y))
		if m < 2 {
			continue
		}
		xys := make(plotter.XYs, m)
		for q := range m {
			xys[q] = plotter.XY{X: c.X[q], Y: c.Y[q]}
		}
		l, err := plotter.NewLine(xys)
		if err != nil {
			return nil, fmt.Errorf("report: figure roc: %w", err)
		}
		l.LineStyle = styles[k]
		p.Add(newPaddingLine(l))
	}
	return p, nil
}

// rocUnscoredNote is written in the empty ROC panel of a model or null
// scored on no extent (a constant raster), which draws neither the
// partial ROC band nor the random prediction.
const rocUnscoredNote = "not scored on any extent"

// panelNote is a text centred in a panel's data area, at the label size.
type panelNote struct{ s string }

// Plot implements plot.Plotter.
func (n panelNote) Plot(c draw.Canvas, _ *plot.Plot) {
	sty := textStyle(minFontPt)
	sty.XAlign, sty.YAlign = draw.XCenter, draw.YCenter
	c.FillText(sty, vg.Point{X: (c.Min.X + c.Max.X) / 2, Y: (c.Min.Y + c.Max.Y) / 2}, n.s)
}

// nullPanelShade fills the data area of a null's ROC panel, lighter than
// the partial ROC band (grey 225) so that the band still shows on it.
var nullPanelShade = color.Gray{Y: 240}

// rocAnchorStyle is the ROC curve of the base region and of the whole
// raster: their map outlines' colour and dash (anchorStyle) at the
// curves' width; false for other kinds.
func rocAnchorStyle(k vocab.Kind) (draw.LineStyle, bool) {
	ls, ok := anchorStyle(k)
	ls.Width = vg.Points(1.3)
	return ls, ok
}

// drawAreaBar draws a vertical colour bar of the area ramp from lo to hi
// km² (log scale) in c, with a short tick beside it at each of marks (the
// areas of the curves drawn).
func drawAreaBar(c draw.Canvas, lo, hi float64, marks []float64) {
	div, unit := areaAxis(hi)
	lo, hi = lo/div, hi/div
	if !(hi > lo) {
		lo, hi = lo/1.1, hi*1.1
	}
	const n = 128
	img := image.NewRGBA(image.Rect(0, 0, 1, n))
	for y := range n {
		img.Set(0, y, areaRamp(1-(float64(y)+0.5)/n))
	}
	p := newPlot("", c.Max.X-c.Min.X)
	p.Add(rampImage{img: img, xmin: 0, ymin: lo, xmax: 1, ymax: hi})
	p.Y.Scale = plot.LogScale{}
	p.Y.Tick.Marker = logTicks{}
	p.Y.Min, p.Y.Max = lo, hi
	p.X.Min, p.X.Max = 0, 1
	p.HideX()
	p.Y.Label.Text = unit
	// The bar itself is 4 mm wide, at the right of c after its axis.
	bc := c
	da := p.DataCanvas(bc)
	bc.Max.X -= (da.Max.X - da.Min.X) - 4*vg.Millimeter
	p.Draw(bc)
	da = p.DataCanvas(bc)
	_, trY := p.Transforms(&da)
	ls := lineStyle(ink, 0.5, nil)
	for _, a := range marks {
		y := trY(a / div)
		c.StrokeLine2(ls, da.Max.X, y, da.Max.X+vg.Points(2.5), y)
	}
}
