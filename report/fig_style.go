package report

import (
	"image"
	"image/color"
	"math"
	"sort"
	"strings"
	"unicode/utf8"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/font"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
)

// Print sizes. Figures are drawn at the size they are printed, so a font
// size in points is the size on paper. The column widths are common
// practice for two-column journals (about 85 mm and 175 mm).
const (
	oneColumn  = 85 * vg.Millimeter
	twoColumns = 175 * vg.Millimeter
	// maxHeight keeps a figure on one printed page (common practice:
	// about 230 mm of usable height).
	maxHeight = 230 * vg.Millimeter
)

// edgePad is the room kept between a panel that reaches the right side
// of its figure and the figure's edge: the plot fits the last tick label
// of its x axis inside its canvas exactly, so a label at the axis's end
// ("120°W", "10000") ended on the edge itself, its last letter in the
// PNG's last column of pixels and a hair past the edge in the SVG's
// rounded coordinates.
const edgePad = 3 * vg.Length(1)

// Font sizes in points at print size; nothing is smaller than minFontPt.
const (
	minFontPt   = 8
	titleFontPt = 9
)

var sansFont = font.Font{Typeface: "Liberation", Variant: "Sans"}

// textStyle returns the figures' text style at size pt.
func textStyle(pt float64) draw.TextStyle {
	return draw.TextStyle{Color: color.Black, Font: font.From(sansFont, vg.Points(pt)), Handler: plot.DefaultTextHandler}
}

// textWidth is the printed width of s at size pt.
func textWidth(s string, pt float64) vg.Length {
	f := font.DefaultCache.Lookup(sansFont, vg.Points(pt))
	var w vg.Length
	for _, line := range strings.Split(s, "\n") {
		w = max(w, f.Width(line))
	}
	return w
}

// wrapText breaks s at spaces into lines no wider than w at size pt. A
// single word wider than w (a model's name has no spaces) is broken after
// its '_', '-' or '.', and a piece still wider than w between two
// characters, so that no line runs past w.
func wrapText(s string, pt float64, w vg.Length) string {
	var lines []string
	cur := ""
	for _, word := range strings.Fields(s) {
		for k, piece := range wordPieces(word, pt, w) {
			try := piece
			if cur != "" && k == 0 {
				try = cur + " " + piece
			} else if cur != "" {
				try = cur + piece
			}
			if cur != "" && textWidth(try, pt) > w {
				lines = append(lines, cur)
				cur = piece
				continue
			}
			cur = try
		}
	}
	if cur != "" {
		lines = append(lines, cur)
	}
	return strings.Join(lines, "\n")
}

// wordPieces splits word, when it is wider than w at size pt, into the
// pieces that end at a '_', '-' or '.' (the separator kept at a piece's
// end), and a piece still wider than w into runs of characters no wider
// than w; a word no wider than w is one piece.
func wordPieces(word string, pt float64, w vg.Length) []string {
	if textWidth(word, pt) <= w {
		return []string{word}
	}
	var pieces []string
	start := 0
	for i, c := range word {
		if c == '_' || c == '-' || c == '.' {
			pieces = append(pieces, word[start:i+1])
			start = i + 1
		}
	}
	if start < len(word) {
		pieces = append(pieces, word[start:])
	}
	var out []string
	for _, p := range pieces {
		// Each turn takes at least one character: a width below that of
		// any character (or below zero) gives a character a piece.
		for p != "" && textWidth(p, pt) > w {
			n := 0
			for i := range p {
				if i > 0 && textWidth(p[:i], pt) > w {
					break
				}
				n = i
			}
			if n == 0 { // one character wider than w
				_, n = utf8.DecodeRuneInString(p)
			}
			out = append(out, p[:n])
			p = p[n:]
		}
		if p != "" {
			out = append(out, p)
		}
	}
	return out
}

// Colours.
//
// lineColors is the "vibrant" qualitative scheme of Paul Tol (2021,
// "Colour schemes", SRON technical note SRON/EPS/TN/09-002, issue 3.2),
// published as distinct for the common colour-vision deficiencies and in
// print. We leave out its grey (kept for no data) and order the rest so
// that neighbours differ most: blue, orange, teal, magenta, cyan, red.
// A panel never uses one of these twice; past six lines the figures split
// the panel (map) or change dash and marker together with the colour.
var lineColors = []color.RGBA{
	{0, 119, 187, 255},
	{238, 119, 51, 255},
	{0, 153, 136, 255},
	{238, 51, 119, 255},
	{51, 187, 238, 255},
	{204, 51, 17, 255},
}

// ink is the colour of text, axes and points.
var ink = color.RGBA{26, 26, 26, 255}

var colorWhite = color.RGBA{255, 255, 255, 255}

// dashes are distinct line patterns so that lines stay apart in greyscale.
// None is dotted: short dots are the nulls' pattern (nullLineStyle), and a
// model drawn dotted read as a null in a greyscale print.
var dashes = [][]vg.Length{
	nil,
	{vg.Points(5), vg.Points(2.5)},
	{vg.Points(5), vg.Points(2), vg.Points(5), vg.Points(2), vg.Points(1.2), vg.Points(2)},
	{vg.Points(7), vg.Points(2.5), vg.Points(1.2), vg.Points(2.5)},
	{vg.Points(2.5), vg.Points(2.5)},
	{vg.Points(9), vg.Points(3)},
	{vg.Points(5), vg.Points(2), vg.Points(1.2), vg.Points(2), vg.Points(1.2), vg.Points(2)},
}

// glyphs are distinct marker shapes, one per model, none of them one the
// nulls take (the hollow ring, square and triangle, nullLineStyle): filled
// circle, triangle and square, cross, plus, then filled diamond, downward
// triangle and five-pointed star (our own, drawn as polygons), so that up
// to eight models are told from any null by marker alone in a greyscale
// print (the sixth to eighth took the nulls' hollow shapes before).
var glyphs = []draw.GlyphDrawer{
	draw.CircleGlyph{}, draw.PyramidGlyph{}, draw.BoxGlyph{}, draw.CrossGlyph{},
	draw.PlusGlyph{}, polygonGlyph{diamond}, polygonGlyph{downTriangle}, polygonGlyph{star},
}

// polygonShape names the outline a polygonGlyph fills.
type polygonShape int

const (
	diamond polygonShape = iota
	downTriangle
	star
)

// polygonGlyph is a filled polygon marker centred on the point, its size
// set by the style's radius as gonum's filled markers are: a diamond of
// half-diagonal 1.3 r (about the area of BoxGlyph's square of side 2 r),
// a downward triangle the size of PyramidGlyph's upward one, and a
// five-pointed star of outer radius 1.35 r and inner radius 0.55 r (our
// choices, so that the marks look about as heavy as the others).
type polygonGlyph struct{ shape polygonShape }

// DrawGlyph implements draw.GlyphDrawer.
func (g polygonGlyph) DrawGlyph(c *draw.Canvas, sty draw.GlyphStyle, pt vg.Point) {
	c.SetColor(sty.Color)
	r := sty.Radius
	var vs []vg.Point
	switch g.shape {
	case diamond:
		d := r * 1.3
		vs = []vg.Point{{X: 0, Y: d}, {X: d, Y: 0}, {X: 0, Y: -d}, {X: -d, Y: 0}}
	case downTriangle:
		// PyramidGlyph's radius and corners, upside down.
		t := r + (r-r*vg.Length(math.Sin(math.Pi/6)))/2
		x := t * vg.Length(math.Cos(math.Pi/6))
		y := t * vg.Length(math.Sin(math.Pi/6))
		vs = []vg.Point{{X: 0, Y: -t}, {X: x, Y: y}, {X: -x, Y: y}}
	case star:
		for k := range 10 {
			a := math.Pi/2 + float64(k)*math.Pi/5
			l := r * 1.35
			if k%2 == 1 {
				l = r * 0.55
			}
			vs = append(vs, vg.Point{X: l * vg.Length(math.Cos(a)), Y: l * vg.Length(math.Sin(a))})
		}
	}
	var p vg.Path
	for i, v := range vs {
		if i == 0 {
			p.Move(pt.Add(v))
		} else {
			p.Line(pt.Add(v))
		}
	}
	p.Close()
	c.Fill(p)
}

// modelColors are the models' colours: the "muted" qualitative scheme
// of Paul Tol (op. cit.), nine colours published as distinct for the
// common colour-vision deficiencies, so that up to nine models each have
// their own colour (the six of lineColors gave the 1st and 7th model one
// colour). We leave out its pale grey (meant for no data; the nulls are
// grey) and order the rest so that neighbours differ most and the two
// lightest come last: indigo, rose, green, wine, teal, olive, purple,
// cyan, sand. Past nine, a model shares its colour with the models nine,
// eighteen, ... before it but not their line pattern (seven, modelDash)
// up to 63 models, nor their marker (eight, modelGlyph) up to 72, nor,
// past that, the spokes of their marker (modelGlyph).
var modelColors = []color.RGBA{
	{0x33, 0x22, 0x88, 255},
	{0xCC, 0x66, 0x77, 255},
	{0x11, 0x77, 0x33, 255},
	{0x88, 0x22, 0x55, 255},
	{0x44, 0xAA, 0x99, 255},
	{0x99, 0x99, 0x33, 255},
	{0xAA, 0x44, 0x99, 255},
	{0x88, 0xCC, 0xEE, 255},
	{0xDD, 0xCC, 0x77, 255},
}

func modelColor(i int) color.Color { return modelColors[i%len(modelColors)] }
func modelDash(i int) []vg.Length  { return dashes[i%len(dashes)] }

// modelGlyph is model i's marker: glyphs[i % 8], and from the 73rd model
// on (past the 72 pairs of nine colours and eight markers) the same
// shape with i / 72 spokes around it (spokedGlyph), so that no two models
// share colour and marker however many there are (a run holds up to 998
// models and nulls); the ring waterfall and the model-minus-null figure
// tell models apart by these two alone.
func modelGlyph(i int) draw.GlyphDrawer {
	return spoked(glyphs[i%len(glyphs)], i/(len(modelColors)*len(glyphs)))
}

// spoked returns g with n spokes around it, or g itself for n = 0.
func spoked(g draw.GlyphDrawer, n int) draw.GlyphDrawer {
	if n == 0 {
		return g
	}
	return spokedGlyph{base: g, spokes: n}
}

// spokedGlyph is a marker with spokes short lines around it, evenly
// spaced from the top, 0.9 pt wide and 1.3 to 2.05 times the radius from
// its centre (our choice: clear of every base shape, long enough to read
// at the markers' 2.4 pt radius, inside the 3 pt margin a PNG sprite
// keeps): the marker of a series past those the base shapes and
// colours tell apart, one spoke more for each further round.
type spokedGlyph struct {
	base   draw.GlyphDrawer
	spokes int
}

// DrawGlyph implements draw.GlyphDrawer.
func (g spokedGlyph) DrawGlyph(c *draw.Canvas, sty draw.GlyphStyle, pt vg.Point) {
	g.base.DrawGlyph(c, sty, pt)
	ls := draw.LineStyle{Color: sty.Color, Width: vg.Points(0.9)}
	for k := range g.spokes {
		a := math.Pi/2 + 2*math.Pi*float64(k)/float64(g.spokes)
		dx, dy := vg.Length(math.Cos(a)), vg.Length(math.Sin(a))
		in, out := sty.Radius*1.3, sty.Radius*2.05
		c.StrokeLine2(ls, pt.X+in*dx, pt.Y+in*dy, pt.X+out*dx, pt.Y+out*dy)
	}
}

// areaRamp maps t in [0, 1] (small to large extent) to a colour whose
// lightness rises steadily from dark indigo through teal to ochre (three
// colours of Tol's schemes, op. cit.), so that the order reads in
// greyscale and under colour-vision deficiencies, and the light end stays
// visible on white.
func areaRamp(t float64) color.RGBA {
	stops := [][3]float64{{34, 34, 85}, {0, 153, 136}, {221, 170, 51}}
	return rampColor(stops, t)
}

// rampTwinGap is how close on a colour ramp (positions 0 to 1) two
// curves or outlines may lie before their colours are taken for one (our
// choice: 1/50 of the ramp, over which areaRamp's colour moves by at most
// 9 of 255 levels in any channel, a difference a line 1 pt wide does not
// show).
const rampTwinGap = 0.02

// twinDashes returns, for members at ramp positions ts whose nested
// chains are chains ("" for none), the index of each member's dash
// pattern (twinDash) and whether it has a twin: a member outside its
// chain (another chain, or either in none) within rampTwinGap of it on
// the ramp. Members without a twin are solid (0); the members that have
// twins, in order of position, each take the first pattern that none of
// their twins placed before them has, so that no two twins are drawn
// alike whatever their number. Two members of one chain are not twins:
// nested, their outlines lie one inside the other, and two nested extents
// of nearly one area hold nearly the same cells, so their curves nearly
// coincide.
func twinDashes(ts []float64, chains []string) (dash []int, twin []bool) {
	n := len(ts)
	dash, twin = make([]int, n), make([]bool, n)
	order := make([]int, n)
	for i := range order {
		order[i] = i
	}
	sort.SliceStable(order, func(a, b int) bool { return ts[order[a]] < ts[order[b]] })
	apart := func(i, j int) bool {
		return i != j && math.Abs(ts[i]-ts[j]) < rampTwinGap && (chains[i] == "" || chains[i] != chains[j])
	}
	for a, i := range order {
		used := map[int]bool{}
		for _, j := range order[:a] {
			if apart(i, j) {
				used[dash[j]] = true
			}
		}
		for j := range n {
			twin[i] = twin[i] || apart(i, j)
		}
		for used[dash[i]] {
			dash[i]++
		}
	}
	return dash, twin
}

// twinDash is the k-th dash pattern of twins on a ramp: solid, then the
// patterns of dashes, then patterns of k - len(dashes) + 2 short dashes
// and a long gap, each of its own length, so that every k has a pattern
// of its own.
func twinDash(k int) []vg.Length {
	if k < len(dashes) {
		return dashes[k]
	}
	var d []vg.Length
	for range k - len(dashes) + 2 {
		d = append(d, vg.Points(3), vg.Points(1.5))
	}
	d[len(d)-1] = vg.Points(5)
	return d
}

// suitabilityRamp maps a suitability in [0, 1] to a grey from near white
// (low) to mid grey (high), light enough that coloured outlines and black
// points stay visible everywhere on the map.
func suitabilityRamp(t float64) color.RGBA {
	return rampColor([][3]float64{{247, 247, 247}, {120, 120, 120}}, t)
}

// noDataColor is the map's colour for cells without data: a pale blue
// that no grey of the suitability ramp matches.
var noDataColor = color.RGBA{220, 234, 242, 255}

// rampColor interpolates stops at t, clamped to [0, 1]; a NaN t (the log
// position of areas too far apart for a double's range) is the first
// stop, not an index out of range.
func rampColor(stops [][3]float64, t float64) color.RGBA {
	if !(t > 0) {
		t = 0
	}
	t = math.Min(1, t)
	seg := t * float64(len(stops)-1)
	i := int(math.Floor(seg))
	if i >= len(stops)-1 {
		i = len(stops) - 2
	}
	u := seg - float64(i)
	var c [3]uint8
	for k := range c {
		c[k] = uint8(math.Round(stops[i][k] + u*(stops[i+1][k]-stops[i][k])))
	}
	return color.RGBA{c[0], c[1], c[2], 255}
}

// newPlot returns a panel with our text styles. The title is wrapped to
// width w so that it is never clipped.
func newPlot(title string, w vg.Length) *plot.Plot {
	p := plot.New()
	p.BackgroundColor = nil // the figure's white page shows through
	p.Title.Text = wrapText(title, titleFontPt, w)
	// Only fonts and colours change: plot.New's alignments stay.
	p.Title.TextStyle.Font = font.From(sansFont, titleFontPt)
	p.Title.TextStyle.Color = ink
	p.Title.Padding = vg.Points(3)
	for _, ax := range []*plot.Axis{&p.X, &p.Y} {
		ax.Label.TextStyle.Font = font.From(sansFont, minFontPt)
		ax.Label.TextStyle.Color = ink
		ax.Tick.Label.Font = font.From(sansFont, minFontPt)
		ax.Tick.Label.Color = ink
		ax.Padding = vg.Points(2)
		ax.Tick.Length = vg.Points(3)
		ax.LineStyle.Color = ink
		ax.Tick.LineStyle.Color = ink
		ax.Tick.Marker = niceTicks{}
	}
	p.Legend.TextStyle.Font = font.From(sansFont, minFontPt)
	return p
}

// legendItem is one entry of a legend drawn outside the data.
type legendItem struct {
	label string
	thumb plot.Thumbnailer
}

// legendRowHeight is the height of one legend line.
const legendRowHeight = 11 * vg.Length(1)

// legendRows lays items out left to right in rows no wider than w and
// returns the rows.
func legendRows(items []legendItem, w vg.Length) [][]legendItem {
	var rows [][]legendItem
	var cur []legendItem
	x := vg.Length(0)
	for _, it := range items {
		iw := legendItemWidth(it)
		if len(cur) > 0 && x+iw > w {
			rows = append(rows, cur)
			cur, x = nil, 0
		}
		cur = append(cur, it)
		x += iw
	}
	if len(cur) > 0 {
		rows = append(rows, cur)
	}
	return wrapLegendRows(rows, w)
}

// wrapLegendRows breaks the label of an item wider than w, alone on its
// row (the label of a point mark in a one-column map figure's key), into
// lines that fit, each on a row of its own under the item's marker, so
// that no key runs off its figure.
func wrapLegendRows(rows [][]legendItem, w vg.Length) [][]legendItem {
	var out [][]legendItem
	for _, row := range rows {
		// Drawn, an item reaches 4 + 26 pt and its label's width past
		// the row's start (drawLegendRows); the 12 pt after it that
		// legendItemWidth counts only parts items on one row.
		room := w - vg.Points(4+26)
		if len(row) != 1 || textWidth(row[0].label, minFontPt) <= room || room < textWidth("MW", minFontPt) {
			// Fits, or no room to wrap into (a panel narrower than a
			// key's thumbnail, which no layout keeps): as it is.
			out = append(out, row)
			continue
		}
		lines := strings.Split(wrapText(row[0].label, minFontPt, room), "\n")
		for k, line := range lines {
			it := legendItem{label: line, thumb: row[0].thumb}
			if k > 0 {
				it.thumb = noThumb{}
			}
			out = append(out, []legendItem{it})
		}
	}
	return out
}

// noThumb is the empty thumbnail of a key label's continued line.
type noThumb struct{}

// Thumbnail implements plot.Thumbnailer.
func (noThumb) Thumbnail(*draw.Canvas) {}

func legendItemWidth(it legendItem) vg.Length {
	return vg.Points(22+4+12) + textWidth(it.label, minFontPt)
}

// drawLegendRows draws rows of legend items from the top of c downwards.
func drawLegendRows(c draw.Canvas, rows [][]legendItem) {
	sty := textStyle(minFontPt)
	sty.YAlign = draw.YCenter
	y := c.Max.Y - legendRowHeight/2
	for _, row := range rows {
		x := c.Min.X + vg.Points(4)
		for _, it := range row {
			tc := draw.Canvas{Canvas: c.Canvas, Rectangle: vg.Rectangle{
				Min: vg.Point{X: x, Y: y - vg.Points(3.5)}, Max: vg.Point{X: x + vg.Points(22), Y: y + vg.Points(3.5)}}}
			it.thumb.Thumbnail(&tc)
			c.FillText(sty, vg.Point{X: x + vg.Points(26), Y: y}, it.label)
			x += legendItemWidth(it)
		}
		y -= legendRowHeight
	}
}

// drawTiles aligns a rows x cols grid of panels on dc and draws them; nil
// panels leave their tile empty.
func drawTiles(plots [][]*plot.Plot, dc draw.Canvas) {
	rows := len(plots)
	if rows == 0 {
		return
	}
	cols := len(plots[0])
	tiles := draw.Tiles{Rows: rows, Cols: cols, PadX: vg.Points(12), PadY: vg.Points(10),
		PadTop: vg.Points(2), PadBottom: vg.Points(2), PadLeft: vg.Points(2), PadRight: vg.Points(6)}
	canv := plot.Align(plots, tiles, dc)
	for j := range plots {
		for i, p := range plots[j] {
			if p != nil {
				p.Draw(canv[j][i])
			}
		}
	}
}

// rampImage is a colour bar's image drawn over the data range xmin..xmax,
// ymin..ymax as it is: its pixels already run evenly along the axis as
// drawn (the area ramp is even in the logarithm of the area). gonum's
// Image plotter, on a log axis, warps an image as if its pixels were even
// in the value, so the ROC and map area bars showed at 1000 km² the colour
// of about 1,600 km² (a third of the bar away from the curves and outlines
// they key).
type rampImage struct {
	img                    image.Image
	xmin, ymin, xmax, ymax float64
}

// Plot implements plot.Plotter.
func (r rampImage) Plot(c draw.Canvas, p *plot.Plot) {
	trX, trY := p.Transforms(&c)
	c.DrawImage(vg.Rectangle{Min: vg.Point{X: trX(r.xmin), Y: trY(r.ymin)}, Max: vg.Point{X: trX(r.xmax), Y: trY(r.ymax)}}, r.img)
}

// DataRange implements plot.DataRanger.
func (r rampImage) DataRange() (xmin, xmax, ymin, ymax float64) {
	return r.xmin, r.xmax, r.ymin, r.ymax
}

// splitTop returns the top strip of height h and the rest of c.
func splitTop(c draw.Canvas, h vg.Length) (top, rest draw.Canvas) {
	top, rest = c, c
	top.Min.Y = c.Max.Y - h
	rest.Max.Y = c.Max.Y - h
	return top, rest
}

// splitBottom returns the bottom strip of height h and the rest of c.
func splitBottom(c draw.Canvas, h vg.Length) (bottom, rest draw.Canvas) {
	bottom, rest = c, c
	bottom.Max.Y = c.Min.Y + h
	rest.Min.Y = c.Min.Y + h
	return bottom, rest
}

// splitRight returns the right strip of width w and the rest of c.
func splitRight(c draw.Canvas, w vg.Length) (right, rest draw.Canvas) {
	right, rest = c, c
	right.Min.X = c.Max.X - w
	rest.Max.X = c.Max.X - w
	return right, rest
}

// lineStyle is a solid or dashed line of width wpt points.
func lineStyle(c color.Color, wpt float64, d []vg.Length) draw.LineStyle {
	return draw.LineStyle{Color: c, Width: vg.Points(wpt), Dashes: d}
}

// lineThumb is a legend thumbnail of one line style.
type lineThumb struct{ ls draw.LineStyle }

// Thumbnail implements plot.Thumbnailer.
func (t lineThumb) Thumbnail(c *draw.Canvas) {
	y := c.Center().Y
	c.StrokeLine2(t.ls, c.Min.X, y, c.Max.X, y)
}

// glyphThumb is a legend thumbnail of one marker, optionally on a line.
type glyphThumb struct {
	gs   draw.GlyphStyle
	line *draw.LineStyle
}

// Thumbnail implements plot.Thumbnailer.
func (t glyphThumb) Thumbnail(c *draw.Canvas) {
	if t.line != nil {
		y := c.Center().Y
		c.StrokeLine2(*t.line, c.Min.X, y, c.Max.X, y)
	}
	gs := t.gs
	gs.Radius = min(gs.Radius, vg.Points(4.5)) // stay within the legend row
	c.DrawGlyph(gs, c.Center())
}

// boxThumb is a legend thumbnail of a filled box.
type boxThumb struct{ fill color.Color }

// Thumbnail implements plot.Thumbnailer.
func (t boxThumb) Thumbnail(c *draw.Canvas) {
	r := vg.Rectangle{Min: vg.Point{X: c.Min.X + vg.Points(5), Y: c.Min.Y}, Max: vg.Point{X: c.Max.X - vg.Points(5), Y: c.Max.Y}}
	c.SetColor(t.fill)
	c.Fill(r.Path())
	c.StrokeLines(lineStyle(ink, 0.5, nil), []vg.Point{r.Min, {X: r.Max.X, Y: r.Min.Y}, r.Max, {X: r.Min.X, Y: r.Max.Y}, r.Min})
}

// paddingLine is a plotter.Line that gives the plot, as glyph boxes, only
// those of its points that can set the padding around the data area
// (paddingBoxes). A plotter.Line gives a box of its line width at every
// point, and the plot asks for them again for each padding it computes;
// for a few hundred ROC curves of hundreds of points that was most of the
// memory a report allocated. The boxes are computed once per set of axis
// ranges (padCache): the plot asks four times or more while it is drawn.
type paddingLine struct {
	*plotter.Line
	pad *padCache
}

// newPaddingLine returns l as a paddingLine.
func newPaddingLine(l *plotter.Line) paddingLine { return paddingLine{l, &padCache{}} }

// GlyphBoxes implements plot.GlyphBoxer.
func (l paddingLine) GlyphBoxes(p *plot.Plot) []plot.GlyphBox {
	return l.pad.boxes(p, l.XYs, 0.5*l.LineStyle.Width)
}

// Plot draws the line as plotter.Line's Plot does, with the same calls on
// the canvas (so the same bytes in every format), but each stroked path
// made at its final size rather than grown point by point. A filled or
// stepped line is left to plotter.Line (none of the figures has one).
func (l paddingLine) Plot(c draw.Canvas, plt *plot.Plot) {
	if l.FillColor != nil || l.StepStyle != plotter.NoStep {
		l.Line.Plot(c, plt)
		return
	}
	trX, trY := plt.Transforms(&c)
	ps := make([]vg.Point, len(l.XYs))
	for i, p := range l.XYs {
		ps[i].X = trX(p.X)
		ps[i].Y = trY(p.Y)
	}
	lines := c.ClipLinesXY(ps)
	if l.LineStyle.Width == 0 || len(lines) == 0 {
		return
	}
	c.SetLineStyle(l.LineStyle)
	for _, line := range lines {
		if len(line) == 0 {
			continue
		}
		path := make(vg.Path, 0, len(line))
		path.Move(line[0])
		for _, pt := range line[1:] {
			path.Line(pt)
		}
		c.Stroke(path)
	}
}

// paddingScatter is a plotter.Scatter of one glyph style that gives the
// plot only the glyph boxes that can set its padding (paddingBoxes), once
// per set of axis ranges (padCache).
type paddingScatter struct {
	*plotter.Scatter
	pad *padCache
}

// newPaddingScatter returns sc as a paddingScatter.
func newPaddingScatter(sc *plotter.Scatter) paddingScatter { return paddingScatter{sc, &padCache{}} }

// GlyphBoxes implements plot.GlyphBoxer.
func (sc paddingScatter) GlyphBoxes(p *plot.Plot) []plot.GlyphBox {
	if sc.GlyphStyleFunc != nil {
		return sc.Scatter.GlyphBoxes(p) // boxes of several sizes
	}
	return sc.pad.boxes(p, sc.XYs, sc.GlyphStyle.Radius)
}

// padCache holds the last paddingBoxes of one plotter with the axis
// ranges and half-side they were computed for; it is used only on linear
// axes, whose normalisation depends on the range alone.
type padCache struct {
	ok                     bool
	xmin, xmax, ymin, ymax float64
	r                      vg.Length
	last                   []plot.GlyphBox
}

// boxes returns paddingBoxes(p, xys, r), computed again only when p's
// axis ranges or r changed since the last call (xys must not change).
func (c *padCache) boxes(p *plot.Plot, xys plotter.XYs, r vg.Length) []plot.GlyphBox {
	_, xlin := p.X.Scale.(plot.LinearScale)
	_, ylin := p.Y.Scale.(plot.LinearScale)
	if !xlin || !ylin {
		return paddingBoxes(p, xys, r)
	}
	if !c.ok || c.xmin != p.X.Min || c.xmax != p.X.Max || c.ymin != p.Y.Min || c.ymax != p.Y.Max || c.r != r {
		c.ok, c.xmin, c.xmax, c.ymin, c.ymax, c.r = true, p.X.Min, p.X.Max, p.Y.Min, p.Y.Max, r
		c.last = paddingBoxes(p, xys, r)
	}
	return c.last
}

// paddingBoxes returns, of the boxes of half-side r around the points xys
// (what a plotter.Line or a one-style plotter.Scatter gives), the first
// box of least and of greatest x, and of least and of greatest y, among
// the points inside the axes' ranges. The plot pads by the outermost box
// on each side (gonum plot's leftMost, rightMost, bottomMost and topMost,
// over boxes inside the ranges), and these boxes all have one size, so
// the four give it the same padding as all of them (TestPaddingBoxes).
func paddingBoxes(p *plot.Plot, xys plotter.XYs, r vg.Length) []plot.GlyphBox {
	if r <= 0 {
		return nil // boxes of no size pad nothing
	}
	var ext [4]plot.GlyphBox // least x, greatest x, least y, greatest y
	found := false
	for i := range xys {
		x, y := p.X.Norm(xys[i].X), p.Y.Norm(xys[i].Y)
		if !(x >= 0 && x <= 1 && y >= 0 && y <= 1) {
			continue // outside the ranges (or NaN): never padded for
		}
		b := plot.GlyphBox{X: x, Y: y, Rectangle: vg.Rectangle{Min: vg.Point{X: -r, Y: -r}, Max: vg.Point{X: r, Y: r}}}
		if !found {
			ext, found = [4]plot.GlyphBox{b, b, b, b}, true
			continue
		}
		if x < ext[0].X {
			ext[0] = b
		}
		if x > ext[1].X {
			ext[1] = b
		}
		if y < ext[2].Y {
			ext[2] = b
		}
		if y > ext[3].Y {
			ext[3] = b
		}
	}
	if !found {
		return nil
	}
	return ext[:]
}
