package report

import (
	"bytes"
	"encoding/base64"
	"fmt"
	"image"
	"image/color"
	"math"
	"sort"
	"strings"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/font"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
	"gonum.org/v1/plot/vg/vgimg"
	"gonum.org/v1/plot/vg/vgsvg"
)

// okabeIto is the eight-colour palette of Okabe & Ito (2008, "Color
// Universal Design (CUD): how to make figures and presentations that are
// friendly to colorblind people", J*Fly), safe for the common colour-vision
// deficiencies. The order is ours, chosen so that the first three colours
// also differ in grey value: black, orange, blue, bluish green, reddish
// purple, sky blue, vermillion, yellow.
var okabeIto = []color.RGBA{
	{0, 0, 0, 255},
	{230, 159, 0, 255},
	{0, 114, 178, 255},
	{0, 158, 115, 255},
	{204, 121, 167, 255},
	{86, 180, 233, 255},
	{213, 94, 0, 255},
	{240, 228, 66, 255},
}

// okabeHex is okabeIto as CSS hex strings, for the inline script.
func okabeHex(i int) string {
	c := okabeIto[i%len(okabeIto)]
	return fmt.Sprintf("#%02x%02x%02x", c.R, c.G, c.B)
}

// dashes are distinct line patterns so that lines stay apart in greyscale.
var dashes = [][]vg.Length{
	nil,
	{vg.Points(6), vg.Points(3)},
	{vg.Points(1.5), vg.Points(2)},
	{vg.Points(8), vg.Points(3), vg.Points(1.5), vg.Points(3)},
	{vg.Points(3), vg.Points(3)},
	{vg.Points(10), vg.Points(4)},
	{vg.Points(6), vg.Points(2), vg.Points(1.5), vg.Points(2), vg.Points(1.5), vg.Points(2)},
	{vg.Points(2), vg.Points(5)},
}

// glyphs are distinct marker shapes, one per model.
var glyphs = []draw.GlyphDrawer{
	draw.CircleGlyph{}, draw.TriangleGlyph{}, draw.SquareGlyph{}, draw.CrossGlyph{},
	draw.PlusGlyph{}, draw.RingGlyph{}, draw.PyramidGlyph{}, draw.BoxGlyph{},
}

func modelColor(i int) color.Color      { return okabeIto[i%len(okabeIto)] }
func modelDash(i int) []vg.Length       { return dashes[i%len(dashes)] }
func modelGlyph(i int) draw.GlyphDrawer { return glyphs[i%len(glyphs)] }

// figure is one figure of the report.
type figure struct {
	Name    string // file base name; the inline SVG gets id "fig-" + Name
	Title   string
	Caption string
	W, H    vg.Length
	draw    func(c draw.Canvas) error
}

var sansFont = font.Font{Typeface: "Liberation", Variant: "Sans"}

// newPlot returns a plot with our text styles (Liberation Sans, small).
func newPlot(title string) *plot.Plot {
	p := plot.New()
	p.Title.Text = title
	p.Title.TextStyle.Font = font.From(sansFont, 9)
	p.Title.Padding = vg.Points(3)
	for _, ax := range []*plot.Axis{&p.X, &p.Y} {
		ax.Label.TextStyle.Font = font.From(sansFont, 8)
		ax.Tick.Label.Font = font.From(sansFont, 7)
		ax.Padding = vg.Points(2)
	}
	p.Legend.TextStyle.Font = font.From(sansFont, 7)
	p.Legend.ThumbnailWidth = vg.Points(22)
	return p
}

// renderSVG draws f into an SVG document.
func renderSVG(f figure) ([]byte, error) {
	c := vgsvg.New(f.W, f.H)
	if err := f.draw(draw.New(c)); err != nil {
		return nil, err
	}
	var buf bytes.Buffer
	if _, err := c.WriteTo(&buf); err != nil {
		return nil, fmt.Errorf("report: figure %s: write SVG: %w", f.Name, err)
	}
	return fixSVGImages(buf.Bytes()), nil
}

// renderPNG draws f into a PNG image at 150 dpi on white.
func renderPNG(f figure) ([]byte, error) {
	c := vgimg.NewWith(vgimg.UseWH(f.W, f.H), vgimg.UseDPI(150), vgimg.UseBackgroundColor(color.White))
	if err := f.draw(draw.New(c)); err != nil {
		return nil, err
	}
	var buf bytes.Buffer
	if _, err := (vgimg.PngCanvas{Canvas: c}).WriteTo(&buf); err != nil {
		return nil, fmt.Errorf("report: figure %s: write PNG: %w", f.Name, err)
	}
	return buf.Bytes(), nil
}

// areaTicks labels a log axis of areas at 1, 2, 5 x 10^k km².
type areaTicks struct{}

func (areaTicks) Ticks(min, max float64) []plot.Tick {
	if min <= 0 || max <= 0 || !(max > min) {
		return []plot.Tick{{Value: min, Label: shortArea(min)}}
	}
	var ts []plot.Tick
	for k := math.Floor(math.Log10(min)) - 1; k <= math.Ceil(math.Log10(max)); k++ {
		base := math.Pow(10, k)
		for m := 1; m <= 9; m++ {
			v := float64(m) * base
			if v < min*0.999 || v > max*1.001 {
				continue
			}
			t := plot.Tick{Value: v}
			if m == 1 || m == 2 || m == 5 {
				t.Label = shortArea(v)
			}
			ts = append(ts, t)
		}
	}
	labelled := 0
	for _, t := range ts {
		if t.Label != "" {
			labelled++
		}
	}
	if labelled < 2 {
		ts = append(ts, plot.Tick{Value: min, Label: shortArea(min)}, plot.Tick{Value: max, Label: shortArea(max)})
	}
	return ts
}

// shortArea writes 2000 as "2k", 1.5e6 as "1.5M".
func shortArea(v float64) string {
	switch {
	case v >= 1e6:
		return trimZeros(v/1e6) + "M"
	case v >= 1e3:
		return trimZeros(v/1e3) + "k"
	default:
		return trimZeros(v)
	}
}

func trimZeros(v float64) string {
	s := fmt.Sprintf("%.3g", v)
	return s
}

// errPoints pairs points with asymmetric vertical error offsets.
type errPoints struct {
	plotter.XYs
	plotter.YErrors
}

// metricsFigure draws one panel per metric: value against extent area.
func metricsFigure(r *Results) figure {
	s := r.Sensitivity
	var keep []MetricInfo
	for _, m := range s.Metrics {
		for _, sp := range s.Spreads {
			if sp.Metric == m.Key && sp.N > 0 {
				keep = append(keep, m)
				break
			}
		}
	}
	cols := 3
	rows := (len(keep) + cols - 1) / cols
	if rows == 0 {
		rows = 1
	}
	f := figure{Name: "metrics_vs_area", Title: "Each score against extent area",
		Caption: "Each metric against the area of the extent (log scale), one line and marker shape per model. " +
			"Vertical bars: AUC plus and minus its bootstrap SD; partial ROC: bootstrap interval (2.5 to 97.5 percentiles). " +
			"Unscored extents are left out.",
		W: 7.5 * vg.Inch, H: vg.Length(rows) * 2.3 * vg.Inch}
	f.draw = func(dc draw.Canvas) error {
		plots := make([][]*plot.Plot, rows)
		for j := range plots {
			plots[j] = make([]*plot.Plot, cols)
		}
		for k, m := range keep {
			p := newPlot(m.Label)
			p.X.Scale = plot.LogScale{}
			p.X.Tick.Marker = areaTicks{}
			p.X.Label.Text = "extent area (km²)"
			nm := len(s.ModelNames)
			for i, model := range s.ModelNames {
				sp := s.findSpread(m.Key, model)
				if sp == nil || sp.N == 0 {
					continue
				}
				shift := math.Pow(2, 0.04*(float64(i)-float64(nm-1)/2))
				idx := sortedByArea(sp.AreasKm2)
				xys := make(plotter.XYs, 0, sp.N)
				var ep errPoints
				for _, q := range idx {
					if sp.AreasKm2[q] <= 0 {
						continue
					}
					x := sp.AreasKm2[q] * shift
					xys = append(xys, plotter.XY{X: x, Y: sp.Values[q]})
					if len(sp.BootLow) == sp.N {
						ep.XYs = append(ep.XYs, plotter.XY{X: x, Y: sp.Values[q]})
						ep.YErrors = append(ep.YErrors, struct{ Low, High float64 }{
							Low: math.Max(0, sp.Values[q]-sp.BootLow[q]), High: math.Max(0, sp.BootHigh[q]-sp.Values[q])})
					}
				}
				if len(xys) == 0 {
					continue
				}
				l, sc, err := plotter.NewLinePoints(xys)
				if err != nil {
					return fmt.Errorf("report: figure metrics: %w", err)
				}
				l.LineStyle = draw.LineStyle{Color: modelColor(i), Width: vg.Points(1), Dashes: modelDash(i)}
				sc.GlyphStyle = draw.GlyphStyle{Color: modelColor(i), Radius: vg.Points(2.6), Shape: modelGlyph(i)}
				p.Add(l, sc)
				if len(ep.XYs) > 0 {
					eb, err := plotter.NewYErrorBars(ep)
					if err != nil {
						return fmt.Errorf("report: figure metrics: %w", err)
					}
					eb.LineStyle = draw.LineStyle{Color: modelColor(i), Width: vg.Points(0.7)}
					eb.CapWidth = vg.Points(3)
					p.Add(eb)
				}
				if k == 0 {
					p.Legend.Add(model, l, sc)
				}
			}
			for j, null := range nulls(r) {
				if xys := nullSeries(r, m, null.Name); len(xys) > 0 {
					l, sc, err := plotter.NewLinePoints(xys)
					if err != nil {
						return fmt.Errorf("report: figure metrics: %w", err)
					}
					l.LineStyle, sc.GlyphStyle = nullLineStyle(j)
					p.Add(l, sc)
					if k == 0 {
						p.Legend.Add(modelLabel(r, null.Name), l, sc)
					}
				}
			}
			if k == 0 {
				p.Legend.Top = false
				p.Legend.Left = false
			}
			plots[k/cols][k%cols] = p
		}
		drawTiles(plots, rows, cols, dc)
		return nil
	}
	return f
}

// ringLabel names the ring that ends at extent id, broken after the first
// underscore so that long ids do not run into their neighbours.
func ringLabel(id string) string {
	if i := strings.Index(id, "_"); i > 0 {
		id = id[:i+1] + "\n" + id[i+1:]
	}
	return "to " + id
}

// drawTiles aligns a rows x cols grid of panels on dc and draws them;
// nil panels leave their tile empty.
func drawTiles(plots [][]*plot.Plot, rows, cols int, dc draw.Canvas) {
	tiles := draw.Tiles{Rows: rows, Cols: cols, PadX: vg.Points(14), PadY: vg.Points(12),
		PadTop: vg.Points(4), PadBottom: vg.Points(4), PadLeft: vg.Points(4), PadRight: vg.Points(8)}
	canv := plot.Align(plots, tiles, dc)
	for j := range plots {
		for i, p := range plots[j] {
			if p != nil {
				p.Draw(canv[j][i])
			}
		}
	}
}

func sortedByArea(areas []float64) []int {
	idx := make([]int, len(areas))
	for i := range idx {
		idx[i] = i
	}
	sort.SliceStable(idx, func(a, b int) bool { return areas[idx[a]] < areas[idx[b]] })
	return idx
}

// extentRamp gives the k-th of n extents (by area, smallest first) a colour
// from dark to light blue: lighter for larger.
func extentRamp(k, n int) color.Color {
	t := 0.0
	if n > 1 {
		t = float64(k) / float64(n-1)
	}
	dark := [3]float64{8, 40, 90}
	light := [3]float64{150, 196, 228}
	var c [3]uint8
	for i := range c {
		c[i] = uint8(math.Round(dark[i] + t*(light[i]-dark[i])))
	}
	return color.RGBA{c[0], c[1], c[2], 255}
}

// rocExtents returns the usable extents in order of area.
func rocExtents(r *Results) []Extent {
	var es []Extent
	for _, e := range r.Extents {
		if e.Status == "ok" {
			es = append(es, e)
		}
	}
	sort.SliceStable(es, func(i, j int) bool { return es[i].AreaKm2 < es[j].AreaKm2 })
	return es
}

// rocFigure draws the ROC curves on the area axis, one panel per model.
func rocFigure(r *Results) figure {
	panels := rocPanels(r)
	n := len(panels)
	cols := n
	if cols > 3 {
		cols = 3
	}
	if cols == 0 {
		cols = 1
	}
	rows := (n + cols - 1) / cols
	if rows == 0 {
		rows = 1
	}
	e := 0.0
	if len(r.Settings.E) > 0 {
		e = r.Settings.E[0]
	}
	f := figure{Name: "roc_curves", Title: "ROC curves on the area axis",
		Caption: fmt.Sprintf("ROC curves on the area axis: share of the extent predicted present (x) against share of test presences predicted present (y), one panel per model, one line per extent (darker and solid = smaller, lighter = larger). Shaded: the partial ROC region y >= 1 - E for E = %s. Dotted: random prediction.", fmtG(e)),
		W:       7.5 * vg.Inch, H: vg.Length(rows) * 2.9 * vg.Inch}
	if cols == 1 {
		f.W = 3.8 * vg.Inch
	}
	es := rocExtents(r)
	f.draw = func(dc draw.Canvas) error {
		plots := make([][]*plot.Plot, rows)
		for j := range plots {
			plots[j] = make([]*plot.Plot, cols)
		}
		for i, model := range panels {
			p := newPlot(rocPanelTitle(r, model))
			p.X.Min, p.X.Max, p.Y.Min, p.Y.Max = 0, 1, 0, 1
			p.X.Label.Text = "share of extent area predicted present"
			p.Y.Label.Text = "share of test presences"
			if e > 0 {
				poly, err := plotter.NewPolygon(plotter.XYs{{X: 0, Y: 1 - e}, {X: 1, Y: 1 - e}, {X: 1, Y: 1}, {X: 0, Y: 1}})
				if err != nil {
					return fmt.Errorf("report: figure roc: %w", err)
				}
				poly.Color = color.Gray{Y: 222}
				poly.LineStyle.Width = 0
				p.Add(poly)
			}
			diag, _ := plotter.NewLine(plotter.XYs{{X: 0, Y: 0}, {X: 1, Y: 1}})
			diag.LineStyle = draw.LineStyle{Color: color.Gray{Y: 110}, Width: vg.Points(0.6), Dashes: []vg.Length{vg.Points(1), vg.Points(2)}}
			p.Add(diag)
			for k, ex := range es {
				c := findCurve(r, model, ex.ID)
				if c == nil || len(c.X) < 2 || r.Sensitivity != nil && !scoredFor(r, model, ex.ID) {
					continue
				}
				m := len(c.X)
				if len(c.Y) < m {
					m = len(c.Y)
				}
				xys := make(plotter.XYs, m)
				for q := 0; q < m; q++ {
					xys[q] = plotter.XY{X: c.X[q], Y: c.Y[q]}
				}
				l, err := plotter.NewLine(xys)
				if err != nil {
					return fmt.Errorf("report: figure roc: %w", err)
				}
				l.LineStyle = draw.LineStyle{Color: extentRamp(k, len(es)), Width: vg.Points(1.1), Dashes: dashes[k%len(dashes)]}
				p.Add(l)
				p.Legend.Add(ex.ID, l)
			}
			p.Legend.Top = false
			p.Legend.Left = false
			p.Legend.Padding = vg.Points(1.5)
			p.Legend.YOffs = vg.Points(2)
			plots[i/cols][i%cols] = p
		}
		drawTiles(plots, rows, cols, dc)
		return nil
	}
	return f
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

// outline is a set of straight segments in data coordinates drawn with one
// line style: the boundary of an extent on the preview grid.
type outline struct {
	segs [][4]float64
	ls   draw.LineStyle
}

// Plot implements plot.Plotter.
func (o *outline) Plot(c draw.Canvas, p *plot.Plot) {
	trX, trY := p.Transforms(&c)
	for _, s := range o.segs {
		c.StrokeLine2(o.ls, trX(s[0]), trY(s[1]), trX(s[2]), trY(s[3]))
	}
}

// Thumbnail implements plot.Thumbnailer.
func (o *outline) Thumbnail(c *draw.Canvas) {
	y := c.Center().Y
	c.StrokeLine2(o.ls, c.Min.X, y, c.Max.X, y)
}

// decodePreview decodes the preview values and masks.
func decodePreview(pv *Preview, nExt int) (vals []byte, masks [][]bool, err error) {
	n := pv.Width * pv.Height
	if pv.Width <= 0 || pv.Height <= 0 {
		return nil, nil, fmt.Errorf("report: preview has size %dx%d", pv.Width, pv.Height)
	}
	vals, err = base64.StdEncoding.DecodeString(pv.Values)
	if err != nil {
		return nil, nil, fmt.Errorf("report: preview values: %w", err)
	}
	if len(vals) != n {
		return nil, nil, fmt.Errorf("report: preview values hold %d bytes, want %d", len(vals), n)
	}
	for k, m := range pv.Masks {
		bits, err := base64.StdEncoding.DecodeString(m)
		if err != nil {
			return nil, nil, fmt.Errorf("report: preview mask %d: %w", k, err)
		}
		if len(bits)*8 < n {
			return nil, nil, fmt.Errorf("report: preview mask %d holds %d bits, want %d", k, len(bits)*8, n)
		}
		mk := make([]bool, n)
		for i := range mk {
			mk[i] = bits[i/8]&(1<<(uint(i)%8)) != 0
		}
		masks = append(masks, mk)
	}
	return vals, masks, nil
}

// maskEdges returns the boundary of a mask as merged horizontal and
// vertical runs in preview coordinates (col, row from the north-west).
// A boundary edge separates a cell in the mask from one outside (or from the
// edge of the grid).
func maskEdges(m []bool, w, h int) [][4]float64 {
	in := func(c, r int) bool { return c >= 0 && r >= 0 && c < w && r < h && m[r*w+c] }
	var segs [][4]float64
	// Horizontal edges: the line y = r between rows r-1 and r.
	for r := 0; r <= h; r++ {
		start := -1
		for c := 0; c <= w; c++ {
			edge := c < w && in(c, r-1) != in(c, r)
			if edge && start < 0 {
				start = c
			}
			if !edge && start >= 0 {
				segs = append(segs, [4]float64{float64(start), float64(r), float64(c), float64(r)})
				start = -1
			}
		}
	}
	// Vertical edges: the line x = c between columns c-1 and c.
	for c := 0; c <= w; c++ {
		start := -1
		for r := 0; r <= h; r++ {
			edge := r < h && in(c-1, r) != in(c, r)
			if edge && start < 0 {
				start = r
			}
			if !edge && start >= 0 {
				segs = append(segs, [4]float64{float64(c), float64(start), float64(c), float64(r)})
				start = -1
			}
		}
	}
	return segs
}

// pointXY returns the grid-CRS coordinates of a point's cell centre.
func pointXY(g Grid, p Point) (float64, float64) {
	gt := g.GeoTransform
	c, r := float64(p.Col)+0.5, float64(p.Row)+0.5
	return gt[0] + c*gt[1] + r*gt[2], gt[3] + c*gt[4] + r*gt[5]
}

// mapOmitted returns the ids of test points the first model omits at the
// minimum training presence threshold.
func mapOmitted(r *Results) (string, map[int]bool) {
	out := map[int]bool{}
	if len(r.Models) == 0 {
		return "", out
	}
	m := r.Models[0].Name
	for _, o := range r.Omissions {
		if o.Model == m && o.Threshold == "minimum_training_presence" {
			for _, id := range o.Omitted {
				out[id] = true
			}
		}
	}
	return m, out
}

// mapFigure draws the preview surface, extent outlines and points.
func mapFigure(r *Results) (figure, bool) {
	pv := r.Preview
	if pv == nil {
		return figure{}, false
	}
	model := ""
	if len(r.Models) > 0 {
		model = r.Models[0].Name
	}
	f := figure{Name: "map", Title: "Map of the extents",
		Caption: fmt.Sprintf("Suitability of model %s (coarse preview; dark = high, white = no data) with the outline of every usable extent (one colour and dash each), training points (open circles), test points (filled triangles) and test points omitted at the minimum training presence threshold of %s (large ring).", model, model),
		W:       7.5 * vg.Inch, H: 5 * vg.Inch}
	f.draw = func(dc draw.Canvas) error {
		vals, masks, err := decodePreview(pv, len(r.Extents))
		if err != nil {
			return err
		}
		w, h := pv.Width, pv.Height
		img := image.NewRGBA(image.Rect(0, 0, w, h))
		for i, v := range vals {
			c := color.RGBA{255, 255, 255, 255}
			if v != 255 {
				g := uint8(math.Round(238 - float64(v)/254*178)) // 238 (low) .. 60 (high)
				c = color.RGBA{g, g, g, 255}
			}
			img.Set(i%w, i/w, c)
		}
		west, south, east, north := pv.Bounds[0], pv.Bounds[1], pv.Bounds[2], pv.Bounds[3]
		p := newPlot("")
		p.Add(plotter.NewImage(img, west, south, east, north))
		unit := "x (grid units)"
		uniy := "y (grid units)"
		if r.Grid.Geographic {
			unit, uniy = "longitude (°)", "latitude (°)"
		}
		p.X.Label.Text, p.Y.Label.Text = unit, uniy
		cw, ch := (east-west)/float64(w), (north-south)/float64(h)
		var entries []legendItem
		k := 0
		for ei, ex := range r.Extents {
			if ex.Status != "ok" || ei >= len(masks) {
				continue
			}
			segs := maskEdges(masks[ei], w, h)
			for q := range segs {
				segs[q] = [4]float64{west + segs[q][0]*cw, north - segs[q][1]*ch, west + segs[q][2]*cw, north - segs[q][3]*ch}
			}
			// Colour cycles every 8 extents and the dash pattern shifts by one
			// each cycle, so no two of up to 64 outlines share both; the base
			// region is drawn heavier.
			width := vg.Points(1.3)
			if ex.ID == "base" {
				width = vg.Points(2.4)
			}
			o := &outline{segs: segs, ls: draw.LineStyle{Color: okabeIto[(k+1)%len(okabeIto)], Width: width, Dashes: dashes[(k+k/len(okabeIto))%len(dashes)]}}
			if k%len(okabeIto) == len(okabeIto)-1 {
				o.ls.Color = okabeIto[0]
			}
			p.Add(o)
			entries = append(entries, legendItem{ex.ID, o})
			k++
		}
		_, omitted := mapOmitted(r)
		var tr, te, om plotter.XYs
		for _, pt := range r.Points {
			if pt.Status != "scored" || pt.Row < 0 || pt.Col < 0 {
				continue
			}
			x, y := pointXY(r.Grid, pt)
			switch {
			case pt.Role == "train":
				tr = append(tr, plotter.XY{X: x, Y: y})
			case pt.Role == "test":
				te = append(te, plotter.XY{X: x, Y: y})
				if omitted[pt.ID] {
					om = append(om, plotter.XY{X: x, Y: y})
				}
			}
		}
		add := func(xys plotter.XYs, gs draw.GlyphStyle, label string, halo bool) {
			if len(xys) == 0 {
				return
			}
			if halo {
				var shape draw.GlyphDrawer = gs.Shape
				if _, ring := shape.(draw.RingGlyph); ring {
					shape = draw.CircleGlyph{}
				}
				hs, _ := plotter.NewScatter(xys)
				hs.GlyphStyle = draw.GlyphStyle{Color: color.White, Radius: gs.Radius + vg.Points(1.2), Shape: shape}
				p.Add(hs)
			}
			sc, _ := plotter.NewScatter(xys)
			sc.GlyphStyle = gs
			p.Add(sc)
			entries = append(entries, legendItem{label, sc})
		}
		add(tr, draw.GlyphStyle{Color: color.Black, Radius: vg.Points(2.4), Shape: draw.RingGlyph{}}, "training point", true)
		add(te, draw.GlyphStyle{Color: color.Black, Radius: vg.Points(2.8), Shape: draw.PyramidGlyph{}}, "test point", true)
		add(om, draw.GlyphStyle{Color: okabeIto[6], Radius: vg.Points(5.5), Shape: draw.RingGlyph{}}, "test point omitted at MTP", false)

		// Layout: map on the left, legend on the right.
		legendW := 1.9 * vg.Inch
		mapC := dc
		mapC.Max.X -= legendW
		// Keep the map's aspect: km per unit in x and y.
		aspect := 1.0
		if r.Grid.Geographic {
			aspect = math.Cos((north + south) / 2 * math.Pi / 180)
		}
		p.X.Min, p.X.Max, p.Y.Min, p.Y.Max = west, east, south, north
		da := p.DataCanvas(mapC)
		dw, dh := float64(da.Max.X-da.Min.X), float64(da.Max.Y-da.Min.Y)
		xr, yr := (east-west)*aspect, north-south
		if dw/dh > xr/yr { // too wide: widen the x range
			need := yr * dw / dh / aspect
			pad := (need - (east - west)) / 2
			p.X.Min, p.X.Max = west-pad, east+pad
		} else {
			need := xr * dh / dw
			pad := (need - (north - south)) / 2
			p.Y.Min, p.Y.Max = south-pad, north+pad
		}
		p.Draw(mapC)
		legC := dc
		legC.Min.X = dc.Max.X - legendW + vg.Points(6)
		drawLegend(legC, entries)
		return nil
	}
	return f, true
}

type legendItem struct {
	label string
	thumb plot.Thumbnailer
}

// drawLegend draws legend entries top-down in c.
func drawLegend(c draw.Canvas, items []legendItem) {
	sty := draw.TextStyle{Color: color.Black, Font: font.From(sansFont, 7), Handler: plot.DefaultTextHandler}
	sty.YAlign = draw.YCenter
	y := c.Max.Y - vg.Points(14)
	for _, it := range items {
		tc := draw.Canvas{Canvas: c.Canvas, Rectangle: vg.Rectangle{Min: vg.Point{X: c.Min.X, Y: y - vg.Points(4)}, Max: vg.Point{X: c.Min.X + vg.Points(24), Y: y + vg.Points(4)}}}
		it.thumb.Thumbnail(&tc)
		c.FillText(sty, vg.Point{X: c.Min.X + vg.Points(30), Y: y}, it.label)
		y -= vg.Points(13)
	}
}

// ringsFigure draws, per chain, ring AUCs and shares of change per model.
func ringsFigure(r *Results) (figure, bool) {
	s := r.Sensitivity
	var chains []string
	seen := map[string]bool{}
	for _, c := range s.Chains {
		if !seen[c.Chain] {
			seen[c.Chain] = true
			chains = append(chains, c.Chain)
		}
	}
	if len(chains) == 0 {
		return figure{}, false
	}
	f := figure{Name: "rings", Title: "Nested rings",
		Caption: "Nested chains: left, AUC of each ring alone (test presences against the background added by the ring); right, share of the AUC change from the first to the last member contributed by each step (a ring, or test points that enter with it). Bars per model; dotted line: AUC 0.5.",
		W:       7.5 * vg.Inch, H: vg.Length(len(chains)) * 2.5 * vg.Inch}
	f.draw = func(dc draw.Canvas) error {
		plots := make([][]*plot.Plot, len(chains))
		for j, ch := range chains {
			type stepKey struct{ kind, outer string }
			var ringKeys, stepKeys []stepKey
			seenR, seenS := map[stepKey]bool{}, map[stepKey]bool{}
			for _, cs := range s.Chains {
				if cs.Chain != ch {
					continue
				}
				for _, st := range cs.Steps {
					k := stepKey{st.Kind, st.Outer}
					if st.Kind == "ring" && !seenR[k] {
						seenR[k] = true
						ringKeys = append(ringKeys, k)
					}
					if !seenS[k] {
						seenS[k] = true
						stepKeys = append(stepKeys, k)
					}
				}
			}
			pa := newPlot("chain " + ch + ": AUC of each ring")
			pb := newPlot("chain " + ch + ": share of AUC change")
			pa.Y.Min, pa.Y.Max = 0, 1
			pa.Y.Label.Text = "ring AUC"
			pb.Y.Label.Text = "share of change"
			nm := len(s.ModelNames)
			bw := vg.Points(math.Min(12, 150/float64(nm*max(1, len(stepKeys)))))
			for i, model := range s.ModelNames {
				var cs *ChainSummary
				for q := range s.Chains {
					if s.Chains[q].Chain == ch && s.Chains[q].Model == model {
						cs = &s.Chains[q]
					}
				}
				if cs == nil {
					continue
				}
				av := make(plotter.Values, len(ringKeys))
				sv := make(plotter.Values, len(stepKeys))
				for _, st := range cs.Steps {
					for q, k := range ringKeys {
						if k.kind == st.Kind && k.outer == st.Outer && st.AUCRingDefined {
							av[q] = st.AUCRing
						}
					}
					for q, k := range stepKeys {
						if k.kind == st.Kind && k.outer == st.Outer {
							sv[q] = st.Share
						}
					}
				}
				off := bw * vg.Length(float64(i)-float64(nm-1)/2)
				for _, pair := range []struct {
					p *plot.Plot
					v plotter.Values
				}{{pa, av}, {pb, sv}} {
					if len(pair.v) == 0 {
						continue
					}
					b, err := plotter.NewBarChart(pair.v, bw)
					if err != nil {
						return fmt.Errorf("report: figure rings: %w", err)
					}
					b.Color = modelColor(i)
					b.LineStyle = draw.LineStyle{Color: color.Black, Width: vg.Points(0.5)}
					b.Offset = off
					pair.p.Add(b)
					if pair.p == pb {
						pb.Legend.Add(model, b)
					}
				}
			}
			half, _ := plotter.NewLine(plotter.XYs{{X: -0.5, Y: 0.5}, {X: float64(len(ringKeys)) - 0.5, Y: 0.5}})
			half.LineStyle = draw.LineStyle{Color: color.Gray{Y: 90}, Width: vg.Points(0.6), Dashes: []vg.Length{vg.Points(1), vg.Points(2)}}
			pa.Add(half)
			zero, _ := plotter.NewLine(plotter.XYs{{X: -0.5, Y: 0}, {X: float64(len(stepKeys)) - 0.5, Y: 0}})
			zero.LineStyle = draw.LineStyle{Color: color.Black, Width: vg.Points(0.5)}
			pb.Add(zero)
			var an, sn []string
			for _, k := range ringKeys {
				an = append(an, ringLabel(k.outer))
			}
			for _, k := range stepKeys {
				if k.kind == "ring" {
					sn = append(sn, ringLabel(k.outer))
				} else {
					sn = append(sn, "test points\nof "+k.outer)
				}
			}
			pa.NominalX(an...)
			pb.NominalX(sn...)
			pb.Legend.Top = true
			pb.Legend.Left = false
			// Head room for the legend above the bars.
			lo, hi := 0.0, 0.0
			for _, cs := range s.Chains {
				if cs.Chain != ch {
					continue
				}
				for _, st := range cs.Steps {
					lo, hi = math.Min(lo, st.Share), math.Max(hi, st.Share)
				}
			}
			pb.Y.Min, pb.Y.Max = lo-0.05*(hi-lo), hi+0.45*(hi-lo)+0.01
			plots[j] = []*plot.Plot{pa, pb}
		}
		tiles := draw.Tiles{Rows: len(chains), Cols: 2, PadX: vg.Points(16), PadY: vg.Points(14),
			PadTop: vg.Points(4), PadBottom: vg.Points(4), PadLeft: vg.Points(4), PadRight: vg.Points(8)}
		canv := plot.Align(plots, tiles, dc)
		for j := range plots {
			for i, p := range plots[j] {
				p.Draw(canv[j][i])
			}
		}
		return nil
	}
	return f, true
}

// figures returns the report's figures in order.
func figures(r *Results) []figure {
	fs := []figure{metricsFigure(r), rocFigure(r)}
	if f, ok := mapFigure(r); ok {
		fs = append(fs, f)
	}
	if f, ok := ringsFigure(r); ok {
		fs = append(fs, f)
	}
	fs = append(fs, nullGapFigures(r)...)
	return fs
}

// inlineSVG prepares an SVG document for inlining in HTML: drops the XML
// prolog and comment and gives the root element an id, a role and a label.
func inlineSVG(svg []byte, id, label string) string {
	s := string(svg)
	if i := strings.Index(s, "<svg"); i >= 0 {
		s = s[i:]
	}
	attrs := fmt.Sprintf(`<svg id="%s" class="figure" role="img" aria-label="%s"`, id, htmlEscape(label))
	return strings.Replace(s, "<svg", attrs, 1)
}

// fixSVGImages makes embedded raster images fill their rectangle (the map
// preview is stretched to the data extent, not letterboxed) and keeps their
// cells sharp.
func fixSVGImages(svg []byte) []byte {
	return bytes.ReplaceAll(svg, []byte("<image "), []byte(`<image preserveAspectRatio="none" style="image-rendering:pixelated" `))
}
