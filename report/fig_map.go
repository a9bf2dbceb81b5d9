package report

import (
	"fmt"
	"image"
	"image/color"
	"math"
	"slices"
	"sort"
	"strconv"
	"strings"
	"sync"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"

	"areasweep/extent/vocab"
	"areasweep/metrics"
)

// namedColors are the colours of lineColors that no anchor (anchorStyle)
// uses: blue, orange, teal and cyan.
var namedColors = []color.RGBA{lineColors[0], lineColors[1], lineColors[2], lineColors[4]}

// maxNamed is the most outlines of a panel drawn each in a colour and
// dash of its own and named in the panel's key, besides the base and the
// whole raster (anchorStyle); more, or two or more that all have a buffer
// distance, are drawn on a colour ramp instead (mapKeyOf).
var maxNamed = len(namedColors)

// outline is the boundary of an extent on the preview grid in data
// coordinates: closed or open polylines, drawn with one line style; ring,
// when set, is the centre of a small extent (smallMask), circled so that
// it can be found.
type outline struct {
	lines [][][2]float64 // x, y in the grid CRS
	ls    draw.LineStyle
	ring  *[2]float64
}

// smallRingRadius is the radius of the circle drawn around a small
// extent's outline (our choice: larger than the omission marks' black
// ring, 4.2 pt, and in the outline's colour, so the two do not mix).
const smallRingRadius = 6 * vg.Length(1)

// smallMaskShare is the largest share of the preview's width and height
// that a small extent's cells span (smallMask): 1/64, under 4 pt on a
// panel 230 pt wide, where its outline (a tiny square, often under the
// point marks) could not be seen. Our choice.
const smallMaskShare = 1.0 / 64

// smallMask reports whether mask (w x h preview cells, row-major) holds
// cells that all lie within smallMaskShare of the preview's width and of
// its height, and returns their centre in preview coordinates (column,
// row from the north-west).
func smallMask(mask []bool, w, h int) (centre [2]float64, small bool) {
	c0, r0, c1, r1 := w, h, -1, -1
	for i, in := range mask {
		if in {
			c, r := i%w, i/w
			c0, r0, c1, r1 = min(c0, c), min(r0, r), max(c1, c), max(r1, r)
		}
	}
	if c1 < 0 {
		return centre, false
	}
	small = float64(c1-c0+1) <= smallMaskShare*float64(w) && float64(r1-r0+1) <= smallMaskShare*float64(h)
	return [2]float64{float64(c0+c1+1) / 2, float64(r0+r1+1) / 2}, small
}

// Plot implements plot.Plotter: every polyline of the outline in one
// stroked path, so one call on the canvas per extent.
func (o *outline) Plot(c draw.Canvas, p *plot.Plot) {
	trX, trY := p.Transforms(&c)
	var path vg.Path
	for _, l := range o.lines {
		for i, pt := range l {
			q := vg.Point{X: trX(pt[0]), Y: trY(pt[1])}
			if i == 0 {
				path.Move(q)
			} else {
				path.Line(q)
			}
		}
	}
	if len(path) == 0 {
		return
	}
	c.SetLineStyle(o.ls)
	c.Stroke(path)
	if o.ring != nil {
		q := vg.Point{X: trX(o.ring[0]), Y: trY(o.ring[1])}
		var ring vg.Path
		ring.Move(vg.Point{X: q.X + smallRingRadius, Y: q.Y})
		ring.Arc(q, smallRingRadius, 0, 2*math.Pi)
		ring.Close()
		ls := o.ls
		ls.Dashes = nil // a dashed ring this small reads as dots
		c.SetLineStyle(ls)
		c.Stroke(ring)
	}
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

// mapGroup is one map panel: a nested chain (or a part of one, or the
// extents in no chain) with the indices of its extents in Results.Extents.
type mapGroup struct {
	title   string
	members []int
}

// mapGroups puts the usable extents into panels: one per nested chain in
// family order, then one for the extents in no chain. However many
// members a panel has, its key stays small: the outlines beyond a few are
// drawn on a colour ramp (mapKeyOf).
func mapGroups(r *Results) []mapGroup {
	var order []string
	byChain := map[string][]int{}
	for i, e := range r.Extents {
		if e.Status != vocab.StatusOK {
			continue
		}
		if _, ok := byChain[e.Chain]; !ok {
			order = append(order, e.Chain)
		}
		byChain[e.Chain] = append(byChain[e.Chain], i)
	}
	var gs []mapGroup
	for _, ch := range order {
		if ch != "" {
			gs = append(gs, mapGroup{title: "nested chain " + ch, members: byChain[ch]})
		}
	}
	if m := byChain[""]; len(m) > 1 {
		gs = append(gs, mapGroup{title: "extents in no chain", members: m})
	} else if len(m) == 1 {
		// One extent alone (the base region of a family with no other
		// usable extent, say), which its key names.
		gs = append(gs, mapGroup{title: "extent in no chain", members: m})
	}
	return gs
}

// extentDistance returns the buffer distance of e in km: the d_km of its
// parameters, or 0 for the convex hull itself; false for extents without
// one (the base, the whole raster, ecoregions, the user's).
func extentDistance(e Extent) (float64, bool) {
	for _, part := range strings.Split(e.Params, ";") {
		if v, ok := strings.CutPrefix(strings.TrimSpace(part), "d_km="); ok {
			d, err := strconv.ParseFloat(v, 64)
			if err == nil && !math.IsInf(d, 0) && !math.IsNaN(d) {
				return d, true
			}
		}
	}
	if e.Kind == vocab.KindHull {
		return 0, true
	}
	return 0, false
}

// anchorStyle is the outline of the base region (solid) and of the whole
// raster (dashed), the same in every panel and in colours that neither
// the ramp nor namedColors use, drawn heavier than the rest; false for
// other kinds.
func anchorStyle(k vocab.Kind) (draw.LineStyle, bool) {
	switch k {
	case vocab.KindBase:
		return lineStyle(lineColors[3], 1.7, nil), true
	case vocab.KindWholeRaster:
		return lineStyle(lineColors[5], 1.4, dashes[1]), true
	}
	return draw.LineStyle{}, false
}

// namedStyle is the k-th named outline of a panel (k < maxNamed).
func namedStyle(k int) draw.LineStyle {
	return lineStyle(namedColors[k%len(namedColors)], 1.3, dashes[k%len(dashes)])
}

// rampWidth is the line width of an outline on the ramp: thin, so that
// outlines a few cells apart stay apart.
const rampWidth = 0.9

// mapKey is how a panel draws its outlines: a style per member, the
// named ones for the key, and the colour ramp of the others.
type mapKey struct {
	styles []draw.LineStyle // per member of the group, in its order
	named  []legendItem     // the anchors, then the named members
	// twins names the members on the ramp drawn with a dash pattern
	// because one outside their chain has nearly their colour
	// (twinDashes).
	twins []legendItem
	ramp  *rampKey // nil when no member is on the ramp
	// order is the order the outlines are drawn in: ramp (by value),
	// named, anchors; thinned is the number of members on the ramp not
	// drawn (rampDrawn).
	order   []int
	thinned int
	// previewW is the preview's width in cells (barPixels).
	previewW int
}

// maxRampOutlines is the most outlines a panel draws on its ramp (our
// choice: at the maps' print size, buffers of a study's usual spacing
// more than about 20 to a panel leave no gap between their lines and
// hide the points under them).
const maxRampOutlines = 20

// rampDrawn returns which of n members on a ramp, in order of value, a
// panel draws: all up to maxRampOutlines; past that every k-th from the
// first, k = ceil((n-1)/(maxRampOutlines-1)), and always the last, so the
// drawn ones span the whole ramp evenly.
func rampDrawn(n int) []int {
	if n <= maxRampOutlines {
		out := make([]int, n)
		for i := range out {
			out[i] = i
		}
		return out
	}
	k := (n - 1 + maxRampOutlines - 2) / (maxRampOutlines - 1)
	var out []int
	for i := 0; i < n-1; i += k {
		out = append(out, i)
	}
	return append(out, n-1)
}

// rampKey is the colour bar of a panel's outlines on the ramp: the value
// from lo to hi (log scale when log) mapped on areaRamp, with a tick at
// the value of each member drawn (marks).
type rampKey struct {
	label  string
	lo, hi float64
	log    bool
	marks  []float64
}

// t places v on the ramp, 0 to 1 (0.5 when the ramp has one value).
func (k *rampKey) t(v float64) float64 {
	if !(k.hi > k.lo) {
		return 0.5
	}
	if k.log {
		return logPosition(v, k.lo, k.hi)
	}
	return (v - k.lo) / (k.hi - k.lo)
}

// mapKeyOf styles the outlines of group g, a rule that holds for any
// number of members: the base region and the whole raster keep their
// anchor styles (anchorStyle) and are named; when every other member has
// a buffer distance and they are two or more, those are drawn on
// areaRamp by distance (dark = nearest, so in a nested chain also
// smallest); otherwise up to maxNamed are drawn each in its own colour
// and dash and named, and more are drawn on areaRamp by area (log scale).
// Of the members on the ramp at most maxRampOutlines are drawn
// (rampDrawn). A key is then at most 2 + maxNamed names and one colour
// bar.
func mapKeyOf(r *Results, g mapGroup) mapKey {
	k := mapKey{styles: make([]draw.LineStyle, len(g.members))}
	var rest []int // indices into g.members
	allDist := true
	var anchors []int
	for q, ei := range g.members {
		e := r.Extents[ei]
		if ls, ok := anchorStyle(e.Kind); ok {
			k.styles[q] = ls
			anchors = append(anchors, q)
			continue
		}
		rest = append(rest, q)
		if _, ok := extentDistance(e); !ok {
			allDist = false
		}
	}
	var named []int
	switch {
	case (allDist && len(rest) >= 2) || len(rest) > maxNamed:
		rk := &rampKey{label: "buffer distance (km)", lo: math.Inf(1), hi: math.Inf(-1)}
		val := func(e Extent) float64 { d, _ := extentDistance(e); return d }
		if !allDist {
			// The area bar counts in the unit of the other area axes
			// (areaAxis), not in km² at any size ("2000000").
			most := 0.0
			for _, q := range rest {
				most = math.Max(most, r.Extents[g.members[q]].AreaKm2)
			}
			div, unit := areaAxis(most)
			rk.label, rk.log = unit, true
			val = func(e Extent) float64 { return e.AreaKm2 / div }
		}
		vals := map[int]float64{}
		for _, q := range rest {
			v := val(r.Extents[g.members[q]])
			if rk.log && !(v > 0) {
				v = math.SmallestNonzeroFloat64 // no area: the ramp's dark end
			} else {
				rk.lo, rk.hi = math.Min(rk.lo, v), math.Max(rk.hi, v)
			}
			vals[q] = v
		}
		if rk.lo > rk.hi {
			rk.lo, rk.hi = 1, 1
		}
		sort.SliceStable(rest, func(a, b int) bool { return vals[rest[a]] < vals[rest[b]] })
		for _, q := range rest {
			k.styles[q] = lineStyle(areaRamp(math.Max(0, rk.t(vals[q]))), rampWidth, nil)
		}
		var ts []float64
		var chains []string
		for _, i := range rampDrawn(len(rest)) {
			q := rest[i]
			k.order = append(k.order, q)
			rk.marks = append(rk.marks, vals[q])
			ts = append(ts, math.Max(0, rk.t(vals[q])))
			chains = append(chains, r.Extents[g.members[q]].Chain)
		}
		// Outlines of one colour outside one chain: a dash each, named.
		dash, twin := twinDashes(ts, chains)
		for n, q := range k.order {
			if twin[n] {
				k.styles[q].Dashes = twinDash(dash[n])
				k.twins = append(k.twins, legendItem{r.Extents[g.members[q]].ID, lineThumb{k.styles[q]}})
			}
		}
		k.ramp = rk
		k.thinned = len(rest) - len(rk.marks)
	default:
		named = rest
	}
	for n, q := range named {
		k.styles[q] = namedStyle(n)
	}
	for _, q := range append(anchors, named...) {
		k.named = append(k.named, legendItem{r.Extents[g.members[q]].ID, lineThumb{k.styles[q]}})
	}
	k.order = append(append(k.order, named...), anchors...)
	return k
}

// rampKeyH is the height of a panel key's colour bar with its ticks,
// tick labels and axis label.
const rampKeyH = 12 * vg.Millimeter

// keyHeight is the height of a panel's key laid out in width w.
func (k mapKey) keyHeight(w vg.Length) vg.Length {
	h := vg.Length(len(legendRows(k.keyItems(), w))) * legendRowHeight
	if k.ramp != nil {
		h += rampKeyH
	}
	return h + vg.Points(4)
}

// keyItems are the key's named outlines: the anchors, the named members,
// then the twins on the ramp.
func (k mapKey) keyItems() []legendItem {
	return append(slices.Clip(k.named), k.twins...)
}

// draw draws the key in c: the named outlines, then the colour bar.
func (k mapKey) draw(c draw.Canvas) {
	rows := legendRows(k.keyItems(), c.Max.X-c.Min.X)
	drawLegendRows(c, rows)
	if k.ramp == nil {
		return
	}
	bc := c
	bc.Max.Y = c.Max.Y - vg.Length(len(rows))*legendRowHeight
	bc.Min.Y = bc.Max.Y - rampKeyH
	drawRampBar(bc, k.ramp, barPixels(k.previewW).ramp)
}

// barWidths are the widths in pixels of the maps' colour-bar images.
type barWidths struct{ suitability, ramp int }

// barPixels returns colour-bar widths (about 128 pixels) that differ from
// each other and from the preview's width w. The PDF writer orders a
// document's images by width alone, from a map, so two different images
// of one width came out in either order: the same maps gave different
// PDF bytes from run to run.
func barPixels(w int) barWidths {
	b := barWidths{suitability: 128, ramp: 127}
	if w == b.suitability {
		b.suitability = 130
	}
	if w == b.ramp {
		b.ramp = 129
	}
	return b
}

// drawRampBar draws a horizontal colour bar of areaRamp for rk in c, an
// axis under it and a short tick above it at each member's value; the
// bar's image is n pixels wide.
func drawRampBar(c draw.Canvas, rk *rampKey, n int) {
	lo, hi := rk.lo, rk.hi
	if !(hi > lo) {
		if rk.log {
			lo, hi = lo/1.1, hi*1.1
		} else {
			lo, hi = lo-1, hi+1
		}
	}
	img := image.NewRGBA(image.Rect(0, 0, n, 1))
	for x := range n {
		img.Set(x, 0, areaRamp((float64(x)+0.5)/float64(n)))
	}
	p := newPlot("", c.Max.X-c.Min.X)
	p.Add(rampImage{img: img, xmin: lo, ymin: 0, xmax: hi, ymax: 1})
	if rk.log {
		p.X.Scale = plot.LogScale{}
		p.X.Tick.Marker = logTicks{W: c.Max.X - c.Min.X - vg.Points(10), Pt: minFontPt}
	}
	p.X.Min, p.X.Max, p.Y.Min, p.Y.Max = lo, hi, 0, 1
	p.HideY()
	p.X.Label.Text = rk.label
	bc := c
	bc.Max.Y -= vg.Points(3) // room for the members' ticks
	da := p.DataCanvas(bc)
	bc.Min.Y += (da.Max.Y - da.Min.Y) - 2.5*vg.Millimeter
	bc.Max.X -= vg.Points(10)
	p.Draw(bc)
	da = p.DataCanvas(bc)
	trX, _ := p.Transforms(&da)
	ls := lineStyle(ink, 0.5, nil)
	for _, v := range rk.marks {
		x := trX(v)
		c.StrokeLine2(ls, x, da.Max.Y, x, da.Max.Y+vg.Points(2.5))
	}
}

// omittedAt returns the ids of the test points model omits at threshold.
func omittedAt(r *Results, model string, threshold metrics.ThresholdRule) map[int]bool {
	out := map[int]bool{}
	for _, o := range r.Omissions {
		if o.Model == model && o.Threshold == threshold {
			for _, id := range o.Omitted {
				out[id] = true
			}
		}
	}
	return out
}

// mapMarks are the point layers of every map panel.
type mapMarks struct {
	layers []mapLayer
}

type mapLayer struct {
	label string
	xys   plotter.XYs
	gs    draw.GlyphStyle
	halo  bool
}

// mapPoints builds the point layers: training and test points, and the
// test points the mapped model omits at each training-presence threshold.
func mapPoints(r *Results, model string) mapMarks {
	mtp := omittedAt(r, model, metrics.ThresholdMTP)
	p10 := omittedAt(r, model, metrics.ThresholdP10)
	var tr, te, om1, om10 plotter.XYs
	for _, pt := range r.Points {
		if pt.Status != vocab.PointScored || pt.Row < 0 || pt.Col < 0 {
			continue
		}
		x, y := pointXY(r.Grid, pt)
		xy := plotter.XY{X: x, Y: y}
		switch pt.Role {
		case vocab.RoleTrain:
			tr = append(tr, xy)
		case vocab.RoleTest:
			te = append(te, xy)
			if mtp[pt.ID] {
				om1 = append(om1, xy)
			}
			if p10[pt.ID] {
				om10 = append(om10, xy)
			}
		}
	}
	none := func(xys plotter.XYs) string {
		if len(xys) == 0 {
			return " (none)"
		}
		return fmt.Sprintf(" (%d)", len(xys))
	}
	lay := []mapLayer{
		{"training point", tr, draw.GlyphStyle{Color: ink, Radius: vg.Points(1.6), Shape: draw.RingGlyph{}}, true},
		{"test point", te, draw.GlyphStyle{Color: ink, Radius: vg.Points(1.9), Shape: draw.PyramidGlyph{}}, true},
	}
	if scored, _ := scoredModels(r); scored[model] {
		// A model scored on no extent (a constant raster) has no
		// threshold: its key said "omitted ... (none)", as if it had
		// omitted no test point.
		lay = append(lay,
			mapLayer{"test point omitted at the 10th percentile training presence" + none(om10), om10, draw.GlyphStyle{Color: ink, Radius: vg.Points(4.2), Shape: strokedGlyph{square: false, width: vg.Points(1.2)}}, true},
			mapLayer{"test point omitted at the minimum training presence" + none(om1), om1, draw.GlyphStyle{Color: ink, Radius: vg.Points(5.8), Shape: strokedGlyph{square: true, width: vg.Points(1.2)}}, true})
	}
	if pv := r.Preview; pv != nil {
		aspect := mapAspect(r)
		for i := range lay {
			if n := len(lay[i].xys); n > crowdedMarks {
				lay[i].xys = mergeMarks(lay[i].xys, (pv.Bounds[2]-pv.Bounds[0])/markLattice, aspect)
				lay[i].label = strings.TrimSuffix(lay[i].label, fmt.Sprintf(" (%d)", n)) + fmt.Sprintf(" (%d points, %d marks)", n, len(lay[i].xys))
			}
		}
	}
	return mapMarks{layers: lay}
}

// crowdedMarks and markLattice are our choices for maps of many points: a
// layer of more than crowdedMarks points is drawn with one mark per cell
// of a lattice markLattice cells across the map (mergeMarks), cells about
// as wide as a mark on a panel, so that the map looks much the same while
// its vector files stay small (50,000 training and 50,000 test points
// made an 84 MB SVG of the maps; with one mark per cell, 9.8 MB).
const (
	crowdedMarks = 2000
	markLattice  = 120
)

// mergeMarks keeps, of the points xys, the first in each cell of a
// lattice with cells dx map units wide and dx*aspect high (square on the
// map, whose x units are aspect times shorter than its y units), in
// their order.
func mergeMarks(xys plotter.XYs, dx, aspect float64) plotter.XYs {
	if !(dx > 0) {
		return xys
	}
	dy := dx * aspect
	seen := make(map[[2]int64]bool, len(xys))
	out := make(plotter.XYs, 0, len(xys))
	for _, p := range xys {
		k := [2]int64{int64(math.Floor(p.X / dx)), int64(math.Floor(p.Y / dy))}
		if !seen[k] {
			seen[k] = true
			out = append(out, p)
		}
	}
	return out
}

// mapScene holds what every map panel shares: the preview as an image,
// the extent masks, the bounds and aspect, and the point layers.
type mapScene struct {
	r *Results
	// img is the preview in colour for raster canvases; pal is the same
	// pixels as an index into the ramp's colours (at most 256: 255 values
	// and no data), which the vector formats embed as PNG: one byte a
	// pixel rather than three, so an eighth of the encoding time and a
	// smaller file, with the same colours.
	img                      *image.RGBA
	pal                      *image.Paletted
	masks                    [][]bool
	west, south, east, north float64
	aspect                   float64 // km per unit in x over km per unit in y
	marks                    mapMarks
	cut                      bool // outlines' corners cut (cornersCut)
	// outlines and keys are the outlines (in drawing order) and the key
	// of each panel (traceOutlines), by the panel's place in the groups
	// the scene was made for.
	outlines [][]*outline
	keys     []mapKey
}

// newMapScene decodes the preview and traces the outlines of the panels
// of groups; marks are the point layers. The scene is read only after,
// so that one serves every format of the figure, drawn at the same time.
func newMapScene(r *Results, marks mapMarks, groups []mapGroup, cellW vg.Length) (*mapScene, error) {
	pv := r.Preview
	vals, masks, err := decodePreview(pv)
	if err != nil {
		return nil, err
	}
	img := image.NewRGBA(image.Rect(0, 0, pv.Width, pv.Height))
	ramp := make(color.Palette, 256)
	for v := range 255 {
		ramp[v] = suitabilityRamp(float64(v) / 254)
	}
	ramp[255] = noDataColor
	pal := image.NewPaletted(img.Rect, ramp)
	for i, v := range vals {
		img.Set(i%pv.Width, i/pv.Width, ramp[v])
		pal.SetColorIndex(i%pv.Width, i/pv.Width, v)
	}
	m := &mapScene{r: r, img: blockScale(img, cellW), pal: pal, masks: masks, aspect: mapAspect(r), marks: marks, cut: cornersCut(cellW, pv.Width)}
	m.west, m.south, m.east, m.north = pv.Bounds[0], pv.Bounds[1], pv.Bounds[2], pv.Bounds[3]
	for _, g := range groups {
		os, key := m.traceOutlines(g)
		m.outlines = append(m.outlines, os)
		m.keys = append(m.keys, key)
	}
	return m, nil
}

// blockScale returns img with each pixel made a k x k block, k the
// whole number of pixels a preview cell spans on a map cellW wide at
// pngDPI (img itself when k < 2). The PNG canvas scales images bilinearly
// (as it must for rotated text), which drew a coarse grid (20 x 15 cells)
// as a smooth blur where the SVG and PDF show its cells; scaled from
// blocks, only each cell's edge pixel is blended.
func blockScale(img *image.RGBA, cellW vg.Length) *image.RGBA {
	w, h := img.Rect.Dx(), img.Rect.Dy()
	k := int(float64(cellW/vg.Inch) * pngDPI / float64(max(w, 1)))
	k = min(k, 4096/max(w, h, 1)) // at most 4096 pixels a side
	if k < 2 {
		return img
	}
	out := image.NewRGBA(image.Rect(0, 0, w*k, h*k))
	for y := range h * k {
		src := img.Pix[(y/k)*img.Stride:]
		dst := out.Pix[y*out.Stride:]
		for x := range w {
			px := src[4*x : 4*x+4]
			for j := range k {
				copy(dst[4*(x*k+j):], px)
			}
		}
	}
	return out
}

// mapAspect returns the maps' aspect, km per x unit over km per y unit:
// on a latitude-longitude grid the cosine of the preview's middle
// latitude (true along that parallel), else 1. r.Preview must be set.
func mapAspect(r *Results) float64 {
	if !r.Grid.Geographic {
		return 1
	}
	return math.Cos((r.Preview.Bounds[1] + r.Preview.Bounds[3]) / 2 * math.Pi / 180)
}

// traceOutlines returns the outline of every extent of group g, in the
// grid CRS and in the order they are drawn (mapKey.order), and the
// panel's key.
func (m *mapScene) traceOutlines(g mapGroup) ([]*outline, mapKey) {
	w, h := m.r.Preview.Width, m.r.Preview.Height
	cw, ch := (m.east-m.west)/float64(w), (m.north-m.south)/float64(h)
	key := mapKeyOf(m.r, g)
	key.previewW = w
	var os []*outline
	for _, q := range key.order {
		ei := g.members[q]
		if ei >= len(m.masks) {
			continue
		}
		lines := edgeLines(maskEdges(m.masks[ei], w, h))
		for k := range lines {
			if m.cut {
				lines[k] = cutCorners(lines[k])
			}
		}
		for _, l := range lines {
			for i := range l {
				l[i] = [2]float64{m.west + l[i][0]*cw, m.north - l[i][1]*ch}
			}
		}
		o := &outline{lines: lines, ls: key.styles[q]}
		if at, small := smallMask(m.masks[ei], w, h); small {
			o.ring = &[2]float64{m.west + at[0]*cw, m.north - at[1]*ch}
		}
		os = append(os, o)
	}
	return os, key
}

// edgeLines joins the axis-parallel runs segs (maskEdges: whole-number
// ends) into polylines: from the first run not yet used, each next run is
// the first unused one, in segs order, that starts or ends where the
// line ends, until none does. A mask's boundary is made of closed loops,
// so most lines close; where four runs meet the line may stop, and the
// rest of the loop starts another. Every run is in exactly one line.
func edgeLines(segs [][4]float64) [][][2]float64 {
	type end = [2]float64
	at := make(map[end][]int32, 2*len(segs))
	for i, s := range segs {
		a, b := end{s[0], s[1]}, end{s[2], s[3]}
		at[a] = append(at[a], int32(i))
		at[b] = append(at[b], int32(i))
	}
	used := make([]bool, len(segs))
	var lines [][][2]float64
	for i, s := range segs {
		if used[i] {
			continue
		}
		used[i] = true
		line := [][2]float64{{s[0], s[1]}, {s[2], s[3]}}
		for {
			tip := line[len(line)-1]
			next := -1
			for _, j := range at[tip] {
				if !used[j] {
					next = int(j)
					break
				}
			}
			if next < 0 {
				break
			}
			used[next] = true
			t := segs[next]
			if (end{t[0], t[1]}) == tip {
				line = append(line, end{t[2], t[3]})
			} else {
				line = append(line, end{t[0], t[1]})
			}
		}
		lines = append(lines, line)
	}
	return lines
}

// maxCutCellPt is the largest a preview cell may be on a panel, in
// points, for outlines to have their corners cut (cornersCut): 3 pt
// (about 1 mm in print, our choice) and larger, a cell is seen as a
// square and its edges are the extent's true edge.
const maxCutCellPt = 3

// cornersCut reports whether outlines on panels cellW wide of a preview
// w cells across have their corners cut (cutCorners): only where a cell
// is under maxCutCellPt, so that a staircase of cells reads as the line
// it stands for. On a coarse grid (6 x 5 cells of 1°) cutting drew a
// region made of whole cells, a rectangle, as an octagon half a cell
// inside its corners.
func cornersCut(cellW vg.Length, w int) bool {
	return w > 0 && cellW/vg.Length(w) < maxCutCellPt
}

// cutCorners smooths a polyline of axis-parallel runs with whole-number
// ends (edgeLines) for drawing: each corner is replaced by the midpoints
// of the unit edges on either side of it, so a staircase of single cells
// becomes one straight diagonal and a long run keeps its straight middle
// (the polygon through the midpoints of the boundary's unit edges, with
// the collinear ones dropped). Every point it returns lies on the
// original line and no point of the result is more than 0.36 cell
// (half a diagonal of half a cell) from it, so outlines at least a cell
// apart never touch. A closed line (first point equal to the last) is cut
// at every corner and stays closed; an open one keeps its two ends.
func cutCorners(line [][2]float64) [][2]float64 {
	n := len(line)
	closed := n > 3 && line[0] == line[n-1]
	if n < 3 {
		return line
	}
	unit := func(a, b [2]float64) [2]float64 {
		dx, dy := b[0]-a[0], b[1]-a[1]
		l := math.Abs(dx) + math.Abs(dy) // axis-parallel: one of them is 0
		return [2]float64{dx / l, dy / l}
	}
	var out [][2]float64
	push := func(p [2]float64) {
		k := len(out)
		if k > 0 && out[k-1] == p {
			return
		}
		if k >= 2 { // drop the middle of three collinear points
			a, b := out[k-2], out[k-1]
			if (b[0]-a[0])*(p[1]-b[1])-(b[1]-a[1])*(p[0]-b[0]) == 0 &&
				(b[0]-a[0])*(p[0]-b[0])+(b[1]-a[1])*(p[1]-b[1]) > 0 {
				out[k-1] = p
				return
			}
		}
		out = append(out, p)
	}
	corner := func(prev, p, next [2]float64) {
		a, b := unit(prev, p), unit(p, next)
		push([2]float64{p[0] - a[0]/2, p[1] - a[1]/2})
		push([2]float64{p[0] + b[0]/2, p[1] + b[1]/2})
	}
	if !closed {
		push(line[0])
		for i := 1; i < n-1; i++ {
			corner(line[i-1], line[i], line[i+1])
		}
		push(line[n-1])
		return out
	}
	// Closed: the corners at 1..n-2, then the one at the start (and end).
	for i := 1; i < n-1; i++ {
		corner(line[i-1], line[i], line[i+1])
	}
	corner(line[n-2], line[0], line[1])
	if len(out) > 0 {
		push(out[0]) // close, dropping the start if it is collinear
	}
	return out
}

// addMarks adds the point layers [from, to) to p, each over a white halo
// where asked.
func (m *mapScene) addMarks(p *plot.Plot, from, to int) error {
	for _, l := range m.marks.layers[from:to] {
		if len(l.xys) == 0 {
			continue
		}
		styles := []draw.GlyphStyle{spriteOf(l.gs)}
		if l.halo {
			styles = []draw.GlyphStyle{spriteOf(haloOf(l.gs)), spriteOf(l.gs)}
		}
		for _, gs := range styles {
			sc, err := plotter.NewScatter(l.xys)
			if err != nil {
				return fmt.Errorf("report: figure map: %w", err)
			}
			sc.GlyphStyle = gs
			p.Add(newPaddingScatter(sc))
		}
	}
	return nil
}

// panel draws group g, the gi-th of the scene's groups, in cell: the map
// with its outline legend below. It returns the map's scale in km per
// point (0 off geographic grids).
func (m *mapScene) panel(gi int, g mapGroup, cell draw.Canvas, legendH vg.Length) (float64, error) {
	legC, mapC := splitBottom(cell, legendH)
	mapC.Max.X -= edgePad
	// The 2 pt the tiled figures keep on their left (drawTiles' PadLeft):
	// a projected grid's "y (km)" began 0.8 pt outside the figure.
	mapC.Min.X += vg.Points(2)
	p := newPlot(g.title, cell.Max.X-cell.Min.X-vg.Points(20))
	var img image.Image = m.pal
	if _, raster := cell.Canvas.(*pngCanvas); raster {
		img = m.img // gg draws an RGBA image fastest
	}
	p.Add(plotter.NewImage(img, m.west, m.south, m.east, m.north))
	if m.r.Grid.Geographic {
		p.X.Tick.Marker = degreeTicks{Lon: true}
		p.Y.Tick.Marker = degreeTicks{}
	} else {
		u, div := gridAxisUnit(m.r.Grid)
		p.X.Label.Text, p.Y.Label.Text = "x ("+u+")", "y ("+u+")"
		p.X.Tick.Marker, p.Y.Tick.Marker = gridTicks{Div: div, N: 4}, gridTicks{Div: div}
	}
	// The training and test points, then the outlines (thin enough to
	// leave the points visible, and the figure's subject), then the
	// omission marks on top.
	if err := m.addMarks(p, 0, min(2, len(m.marks.layers))); err != nil {
		return 0, err
	}
	os, key := m.outlines[gi], m.keys[gi]
	for _, o := range os {
		p.Add(o)
	}
	if err := m.addMarks(p, min(2, len(m.marks.layers)), len(m.marks.layers)); err != nil {
		return 0, err
	}
	fitAspect(p, mapC, m.west, m.south, m.east, m.north, m.aspect)
	if m.r.Grid.Geographic {
		// Latitude labels stack: thinned on a short map (degreeTicks).
		da := p.DataCanvas(mapC)
		p.Y.Tick.Marker = degreeTicks{H: da.Max.Y - da.Min.Y}
	}
	p.Draw(mapC)
	da := p.DataCanvas(mapC)
	legC.Min.X = da.Min.X
	key.draw(legC)
	if !m.r.Grid.Geographic {
		return 0, nil
	}
	return (p.X.Max - p.X.Min) * m.aspect * KmPerDegree / float64(da.Max.X-da.Min.X), nil
}

// Map panel sizes: a panel's map is never taller than mapMaxH, and the
// figure takes more columns (up to mapMaxCols) rather than draw maps
// shorter than mapMinH; what does not fit even then is left out and named
// in the caption. Our own choices, for print at the journal sizes of
// fig_style.go.
const (
	mapMaxH    = 100 * vg.Millimeter
	mapMinH    = 30 * vg.Millimeter
	mapMaxCols = 4
	// keyMinW is the narrowest free room at the end of the panels' last
	// row that takes the shared key (the suitability bar and scale bar
	// read well down to it).
	keyMinW = 70 * vg.Millimeter
	// mapPanelChrome is a panel's height besides its map and legend: title
	// and axis labels.
	mapPanelChrome = 42 // points
)

// mapLayout is the arrangement of the map panels: columns, panel width and
// height, the height of the tallest outline legend, and how many panels
// (the first ones) are drawn.
type mapLayout struct {
	cols         int
	cellW, cellH vg.Length
	legendH      vg.Length
	shown        int
}

// layoutMapPanels arranges the panels of groups in a figure of width w
// whose panels may take at most height avail, for maps of height/width
// ratio hw: the fewest columns (from 2, or 1 for one panel) whose rows fit
// with maps at least mapMinH tall, the maps as tall as the ratio, mapMaxH
// and the room allow. When no column count fits every panel, the widest
// arrangement shows as many rows as fit with maps mapMinH tall. Maps
// shorter than mapMinH at two columns for their shape alone (wider than
// tall) take the column count, from one, that draws them tallest.
func layoutMapPanels(r *Results, groups []mapGroup, w, avail vg.Length, hw float64) mapLayout {
	try := func(cols int) (mapLayout, vg.Length) {
		l := mapLayout{cols: cols, cellW: w / vg.Length(cols)}
		dataW := l.cellW - vg.Points(44)
		l.legendH = legendRowHeight + vg.Points(4)
		for _, g := range groups {
			l.legendH = max(l.legendH, mapKeyOf(r, g).keyHeight(dataW))
		}
		rows := (len(groups) + cols - 1) / cols
		chrome := vg.Points(mapPanelChrome) + l.legendH
		dataH := min(dataW*vg.Length(hw), mapMaxH, avail/vg.Length(rows)-chrome)
		l.cellH, l.shown = dataH+chrome, len(groups)
		return l, dataH
	}
	first := min(2, len(groups))
	if l, _ := try(first); (l.cellW-vg.Points(44))*vg.Length(hw) < mapMinH {
		// Maps much wider than tall (a long, narrow grid) are short
		// for their width, and more columns only make them shorter:
		// take the column count, from one, that draws them tallest
		// with every row on the page.
		var best mapLayout
		bestH := vg.Length(0)
		for cols := 1; cols <= max(first, mapMaxCols); cols++ {
			if c, h := try(cols); h > bestH+1e-9 {
				best, bestH = c, h
			}
		}
		if bestH > 0 {
			return best
		}
	}
	var l mapLayout
	for cols := first; cols <= max(first, mapMaxCols); cols++ {
		var dataH vg.Length
		if l, dataH = try(cols); dataH >= mapMinH || cols == 1 {
			return l
		}
	}
	// Even the widest arrangement has maps too short: keep them mapMinH
	// tall and draw the rows that fit.
	l.cellH = mapMinH + vg.Points(mapPanelChrome) + l.legendH
	rows := max(1, int(avail/l.cellH))
	l.shown = min(len(groups), rows*l.cols)
	return l
}

// leftTitles names the panels left out of the map figure: the last left
// groups of all (the first ones were drawn).
func leftTitles(all []mapGroup, left int) string {
	var ts []string
	for _, g := range all[len(all)-left:] {
		ts = append(ts, g.title)
	}
	return strings.Join(ts, "; ")
}

// mapFigure draws the extents as small multiples: one panel per nested
// chain over the first model's suitability, with the points.
func mapFigure(r *Results) (figure, bool) {
	pv := r.Preview
	groups := mapGroups(r)
	if pv == nil || len(groups) == 0 {
		return figure{}, false
	}
	model := ""
	if len(r.Models) > 0 {
		model = r.Models[0].Name
	}
	f := figure{Name: mapFigureName, Title: "Maps of the extents", W: twoColumns, Dear: true}
	if len(groups) == 1 {
		f.W = oneColumn
	}
	west, south, east, north := pv.Bounds[0], pv.Bounds[1], pv.Bounds[2], pv.Bounds[3]
	aspect := mapAspect(r)
	marks := mapPoints(r, model)
	var shared []legendItem
	for _, l := range marks.layers {
		shared = append(shared, legendItem{l.label, glyphThumb{gs: l.gs}})
	}
	sharedRows := legendRows(shared, f.W/2)
	keyH := 16 * vg.Millimeter // colour bar
	if r.Grid.Geographic {
		keyH = 30 * vg.Millimeter // colour bar, scale bar and north arrow
	}
	// The point marks start 6 pt under the band's top (drawMapKey).
	bottomH := max(vg.Length(len(sharedRows))*legendRowHeight+vg.Points(6), keyH) + vg.Points(4)
	lay := layoutMapPanels(r, groups, f.W, maxHeight-bottomH-vg.Points(2), (north-south)/((east-west)*aspect))
	cols, cellW, cellH, legendH := lay.cols, lay.cellW, lay.cellH, lay.legendH
	all := groups
	left := len(groups) - lay.shown
	groups = groups[:lay.shown]
	rows := (len(groups) + cols - 1) / cols
	// With a cell or more free at the end of the last row (three panels
	// in two columns), the shared key goes there, stacked (point marks,
	// suitability bar, scale bar), rather than in a band under the
	// panels, when the free cells are at least keyMinW wide and it fits
	// their height.
	inCell := false
	var cellRows [][]legendItem
	if free := rows*cols - len(groups); free > 0 {
		freeW := vg.Length(free) * cellW
		cellRows = legendRows(shared, freeW-vg.Points(4))
		need := vg.Length(len(cellRows))*legendRowHeight + vg.Points(10) + keyH
		if freeW >= keyMinW && need <= cellH {
			inCell, bottomH = true, 0
		}
	}
	f.H = min(maxHeight, vg.Length(rows)*cellH+bottomH+vg.Points(2))
	f.Caption = mapCaption(r, model, groups, all, marks, left, cornersCut(cellW, pv.Width))
	// One scene for the three formats (they are drawn at the same time):
	// the preview decoded and every extent's outline traced once.
	scene := sync.OnceValues(func() (*mapScene, error) { return newMapScene(r, marks, groups, cellW) })
	f.draw = func(dc draw.Canvas) error {
		m, err := scene()
		if err != nil {
			return err
		}
		bottom, rest := splitBottom(dc, bottomH)
		rest.Max.Y -= vg.Points(2)
		var kmPerPt float64
		for gi, g := range groups {
			cell := rest
			cell.Min.X = rest.Min.X + vg.Length(gi%cols)*cellW
			cell.Max.X = cell.Min.X + cellW
			cell.Max.Y = rest.Max.Y - vg.Length(gi/cols)*cellH
			cell.Min.Y = cell.Max.Y - cellH
			if kmPerPt, err = m.panel(gi, g, cell, legendH); err != nil {
				return err
			}
		}
		drawMapKey(mapKeyPlace{rest: rest, bottom: bottom, inCell: inCell, panels: len(groups), cols: cols, rows: rows, cellW: cellW, cellH: cellH, w: f.W, keyH: keyH},
			sharedRows, cellRows, pv, model, kmPerPt)
		return nil
	}
	return f, true
}

// mapCaption is the map figure's caption: how to read the panels, the
// outlines, the background (model's suitability) and the marks, with
// notes on thinned outlines and crowded marks, the panels left off the
// page (left of all), and the scale bar's parallel.
func mapCaption(r *Results, model string, groups, all []mapGroup, marks mapMarks, left int, cut bool) string {
	pv := r.Preview
	south, north := pv.Bounds[1], pv.Bounds[3]
	// Name only the anchors a panel draws: the whole raster is not drawn
	// when it has the cells of another extent (a duplicate), nor the base
	// region when it is empty.
	var base, whole bool
	for _, g := range groups {
		for _, i := range g.members {
			base = base || r.Extents[i].Kind == vocab.KindBase
			whole = whole || r.Extents[i].Kind == vocab.KindWholeRaster
		}
	}
	anchors := "the base region is a solid magenta outline and the whole raster a dashed red one; "
	switch {
	case base && !whole:
		anchors = "the base region is a solid magenta outline; "
	case !base && whole:
		anchors = "the whole raster is a dashed red outline; "
	case !base && !whole:
		anchors = ""
	}
	c := fmt.Sprintf("Extents as small multiples, one panel per nested chain (extents in no chain together). "+
		"In each panel %sthe buffers are thin outlines coloured by their distance "+
		"on the panel's colour bar (dark = nearest), so that any number of them keeps one key. "+
		"Other extents have each a colour and dash of their own, named under the panel, up to %d a panel; past that they too are coloured by area on a colour bar. "+
		"Background: suitability of model %s on a coarse copy of the grid (colour bar; pale blue = no data). "+
		"Open circles: training points; triangles: test points; %s"+
		"%s", anchors, maxNamed, model, omissionWords(r, model), outlineWords(cut))
	thinned, twins := 0, 0
	for _, g := range groups {
		k := mapKeyOf(r, g)
		thinned += k.thinned
		twins += len(k.twins)
	}
	if twins > 0 {
		c += " Outlines on a colour bar outside one nested chain whose values lie within 1/50 of the bar of each other (our choice) have nearly one colour: " +
			"each takes its own dash pattern, and the key under the panel names them."
	}
	if thinned > 0 {
		c += fmt.Sprintf(" A panel draws at most %d outlines on its colour bar, spread evenly over it from the first to the last (the ticks above the bar mark those drawn); "+
			"%d are not drawn here, and extents.gpkg holds every extent's outline.", maxRampOutlines, thinned)
	}
	c += smallExtentWords(r, groups)
	if len(marks.layers) > 2 {
		c += " Outlines are drawn over the training and test points and under the omission marks."
	} else {
		c += " Outlines are drawn over the training and test points."
	}
	for _, l := range marks.layers {
		if strings.HasSuffix(l.label, " marks)") {
			c += fmt.Sprintf(" A layer of more than %d points is drawn with one mark where several fall within 1/%d of the map's width (the key gives both counts).", crowdedMarks, markLattice)
			break
		}
	}
	if left > 0 {
		// "1 more panel (X) does not fit" ("1 more panels ... do not" was
		// written for one).
		c += fmt.Sprintf(" %d more panel%s (%s) %s not fit on the page; extents.gpkg holds every extent's outline.",
			left, Plural(left), leftTitles(all, left), map[bool]string{true: "does", false: "do"}[left == 1])
	}
	if r.Grid.Geographic {
		c += fmt.Sprintf(" Scale bar: length along the parallel at %s, where the map's aspect is true.", degreeLabel((north+south)/2, fmtTick(math.Abs((north+south)/2), 0), false))
	}
	return c
}

// outlineWords says how the outlines follow the coarse copy's cells:
// with their corners cut (cornersCut) or along the cells' edges.
func outlineWords(cut bool) string {
	if cut {
		return "Outlines follow the coarse copy's cells with their corners cut (a staircase of cells is drawn as a diagonal), so they are drawn to within one of its cells."
	}
	return "Outlines follow the edges of the coarse copy's cells, which are large enough on the map to be seen."
}

// smallExtentWords names, for the caption, the extents the panels of
// groups draw that are circled (smallMask) and those that cover no cell
// of the preview, which have no outline at all.
func smallExtentWords(r *Results, groups []mapGroup) string {
	_, masks, err := decodePreview(r.Preview)
	if err != nil {
		return "" // the drawing reports it
	}
	var small, none []string
	for _, g := range groups {
		for _, q := range mapKeyOf(r, g).order {
			ei := g.members[q]
			if ei >= len(masks) {
				continue
			}
			if _, ok := smallMask(masks[ei], r.Preview.Width, r.Preview.Height); ok {
				small = append(small, r.Extents[ei].ID)
			} else if !slices.Contains(masks[ei], true) {
				none = append(none, r.Extents[ei].ID)
			}
		}
	}
	var c string
	if len(small) > 0 {
		c += fmt.Sprintf(" A circle in its outline's colour marks %s, too small to be seen on the map (at most 1/%.0f of its width and height).", joinList(small), 1/smallMaskShare)
	}
	if len(none) > 0 {
		c += fmt.Sprintf(" %s %s no cell of the coarse copy, so %s no outline here; extents.gpkg holds %s.",
			joinList(none), map[bool]string{true: "covers", false: "cover"}[len(none) == 1],
			map[bool]string{true: "it has", false: "they have"}[len(none) == 1], map[bool]string{true: "it", false: "them"}[len(none) == 1])
	}
	return c
}

// omissionWords says what the maps' large ring and square mark, or, for a
// model scored on no extent (a constant raster, which has no threshold),
// that nothing is marked and why.
func omissionWords(r *Results, model string) string {
	if scored, _ := scoredModels(r); !scored[model] {
		return fmt.Sprintf("no omission marks: model %s is scored on no extent (the Scores table says why), so it has no threshold. ", model)
	}
	return fmt.Sprintf("large ring and square: test points model %s omits at the 10th percentile and at the minimum training presence. ", model)
}

// mapKeyPlace is where the map figure's shared key goes: in the free
// cells after the last panel (inCell; panels in cols columns and rows
// rows of cellW x cellH in rest) or in the band under the panels
// (bottom, beside the figure's half width w/2); keyH is the height of its
// bars.
type mapKeyPlace struct {
	rest, bottom draw.Canvas
	inCell       bool
	panels       int
	cols, rows   int
	cellW, cellH vg.Length
	w, keyH      vg.Length
}

// drawMapKey draws the map figure's shared key at at: the point marks
// (sharedRows in the band, cellRows in a cell), the suitability colour
// bar of model, and the scale bar (kmPerPt > 0).
func drawMapKey(at mapKeyPlace, sharedRows, cellRows [][]legendItem, pv *Preview, model string, kmPerPt float64) {
	var keyC, barC draw.Canvas
	rowsDrawn := sharedRows
	if at.inCell {
		c := at.rest
		c.Min.X = at.rest.Min.X + vg.Length(at.panels%at.cols)*at.cellW
		c.Max.Y = at.rest.Max.Y - vg.Length(at.rows-1)*at.cellH - vg.Points(6)
		keyC, barC = splitTop(c, vg.Length(len(cellRows))*legendRowHeight+vg.Points(4))
		barC.Min.Y = barC.Max.Y - at.keyH
		rowsDrawn = cellRows
	} else {
		keyC, barC = splitRight(at.bottom, at.w/2)
		keyC.Max.Y -= vg.Points(6)
	}
	barC.Min.X += vg.Points(8)
	drawLegendRows(keyC, rowsDrawn)
	barTop, scaleC := splitTop(barC, 14*vg.Millimeter)
	drawSuitabilityBar(barTop, pv.ValueMin, pv.ValueMax, model, barPixels(pv.Width).suitability)
	if kmPerPt > 0 {
		drawScaleBar(scaleC, kmPerPt)
	}
}

// fitAspect sets the axis ranges of p so that the data keep their aspect
// (aspect = km per x unit / km per y unit) in canvas c, widening whichever
// range has room to spare.
func fitAspect(p *plot.Plot, c draw.Canvas, west, south, east, north, aspect float64) {
	p.X.Min, p.X.Max, p.Y.Min, p.Y.Max = west, east, south, north
	da := p.DataCanvas(c)
	dw, dh := float64(da.Max.X-da.Min.X), float64(da.Max.Y-da.Min.Y)
	xr, yr := (east-west)*aspect, north-south
	if dw/dh > xr/yr {
		need := yr * dw / dh / aspect
		pad := (need - (east - west)) / 2
		p.X.Min, p.X.Max = west-pad, east+pad
	} else {
		need := xr * dh / dw
		pad := (need - (north - south)) / 2
		p.Y.Min, p.Y.Max = south-pad, north+pad
	}
}

// drawSuitabilityBar draws a horizontal colour bar of the suitability
// ramp from lo to hi in c; the bar's image is n pixels wide.
func drawSuitabilityBar(c draw.Canvas, lo, hi float64, model string, n int) {
	label := "suitability, model " + model
	var ticks plot.Ticker
	if !(hi > lo) {
		// One value on every cell (NewPreview draws it in the ramp's
		// first colour): one swatch and one tick, rather than a ramp up
		// to lo + 1 whose values the raster does not hold.
		ticks = plot.ConstantTicks([]plot.Tick{{Value: lo, Label: strings.Replace(fmtG(lo), "-", "\u2212", 1)}})
		lo, hi, n = lo-1, lo+1, 1
		label += " (one value on every cell)"
	}
	img := image.NewRGBA(image.Rect(0, 0, n, 1))
	for x := range n {
		t := (float64(x) + 0.5) / float64(n)
		if ticks != nil {
			t = 0
		}
		img.Set(x, 0, suitabilityRamp(t))
	}
	p := newPlot("", c.Max.X-c.Min.X)
	p.Add(plotter.NewImage(img, lo, 0, hi, 1))
	p.X.Min, p.X.Max, p.Y.Min, p.Y.Max = lo, hi, 0, 1
	if ticks != nil {
		p.X.Tick.Marker = ticks
	}
	p.HideY()
	p.X.Label.Text = label
	bc := c
	da := p.DataCanvas(bc)
	bc.Min.Y += (da.Max.Y - da.Min.Y) - 3*vg.Millimeter
	bc.Max.X -= vg.Points(10)
	p.Draw(bc)
}

// scaleBarLabel writes a scale bar's round length of km kilometres (1, 2
// or 5 x 10^k): in km from 1 km, below that in metres ("200 m"), where
// whole kilometres wrote a bar of 200 m as "0 km".
func scaleBarLabel(km float64) string {
	if km >= 1 {
		return fmtTick(km, 0) + " km"
	}
	m := km * 1000
	return fmtTick(m, maxInt(0, -int(math.Floor(math.Log10(m)+1e-9)))) + " m"
}

// drawScaleBar draws a scale bar of a round length and a north arrow in c,
// at kmPerPt kilometres per point.
func drawScaleBar(c draw.Canvas, kmPerPt float64) {
	target := 0.4 * float64(c.Max.X-c.Min.X) * kmPerPt
	km := math.Pow10(int(math.Floor(math.Log10(target))))
	for _, m := range []float64{5, 2, 1} {
		if m*km <= target {
			km *= m
			break
		}
	}
	length := vg.Length(km / kmPerPt)
	x0 := c.Min.X + vg.Points(10)
	y := c.Min.Y + vg.Points(12)
	ls := lineStyle(ink, 1, nil)
	c.StrokeLine2(ls, x0, y, x0+length, y)
	for _, x := range []vg.Length{x0, x0 + length/2, x0 + length} {
		c.StrokeLine2(ls, x, y, x, y+vg.Points(3))
	}
	sty := textStyle(minFontPt)
	sty.XAlign = draw.XCenter
	c.FillText(sty, vg.Point{X: x0, Y: y + vg.Points(5)}, "0")
	c.FillText(sty, vg.Point{X: x0 + length, Y: y + vg.Points(5)}, scaleBarLabel(km))
	// North arrow, to the right of the bar.
	ax := x0 + length + vg.Points(40)
	c.FillPolygon(ink, []vg.Point{{X: ax, Y: y + vg.Points(16)}, {X: ax - vg.Points(4), Y: y}, {X: ax, Y: y + vg.Points(4)}, {X: ax + vg.Points(4), Y: y}})
	sty.YAlign = draw.YBottom
	c.FillText(sty, vg.Point{X: ax, Y: y + vg.Points(18)}, "N")
}

// strokedGlyph is an open circle or square drawn with a heavier line than
// gonum's ring, so that omission marks stand out among the points.
type strokedGlyph struct {
	square bool
	width  vg.Length
}

// DrawGlyph implements draw.GlyphDrawer.
func (g strokedGlyph) DrawGlyph(c *draw.Canvas, sty draw.GlyphStyle, pt vg.Point) {
	ls := draw.LineStyle{Color: sty.Color, Width: g.width}
	r := sty.Radius
	if g.square {
		c.StrokeLines(ls, []vg.Point{{X: pt.X - r, Y: pt.Y - r}, {X: pt.X + r, Y: pt.Y - r}, {X: pt.X + r, Y: pt.Y + r}, {X: pt.X - r, Y: pt.Y + r}, {X: pt.X - r, Y: pt.Y - r}})
		return
	}
	var p vg.Path
	p.Move(vg.Point{X: pt.X + r, Y: pt.Y})
	p.Arc(pt, r, 0, 2*math.Pi)
	p.Close()
	c.SetLineStyle(ls)
	c.Stroke(p)
}

// haloGlyph is a white outline under a mark, so it stays visible on the
// dark parts of the map and over other points.
type haloGlyph struct{ inner draw.GlyphDrawer }

// DrawGlyph implements draw.GlyphDrawer.
func (h haloGlyph) DrawGlyph(c *draw.Canvas, sty draw.GlyphStyle, pt vg.Point) {
	switch g := h.inner.(type) {
	case strokedGlyph:
		g.width += vg.Points(1)
		sty.Radius -= vg.Points(0.7)
		g.DrawGlyph(c, sty, pt)
	case draw.RingGlyph:
		draw.CircleGlyph{}.DrawGlyph(c, sty, pt)
	default:
		g.DrawGlyph(c, sty, pt)
	}
}

func haloOf(gs draw.GlyphStyle) draw.GlyphStyle {
	return draw.GlyphStyle{Color: colorWhite, Radius: gs.Radius + vg.Points(0.7), Shape: haloGlyph{gs.Shape}}
}

// gridAxisUnit returns the unit a projected map's axes are labelled in
// and the grid units per label unit: km and 1000 for a grid in metres
// (7-digit coordinates such as 3500000 read as 3500), km and 1 for one in
// kilometres, else the grid's unit and 1. The unit is the one the run
// recorded (g.Unit, g.UnitM), else, for results written before it was
// recorded, the one gridUnitText finds in the CRS.
func gridAxisUnit(g Grid) (unit string, div float64) {
	u := g.Unit
	switch {
	case g.UnitM == 1:
		return "km", 1000
	case g.UnitM == 1000:
		return "km", 1
	case u == "":
		u = gridUnitText(g.CRS)
	}
	switch strings.ToLower(u) {
	case "metre", "meter", "metres", "meters", "m":
		return "km", 1000
	}
	return u, 1
}

// gridTicks labels a projected map's axis as niceTicks{N} labels the
// coordinates divided by Div, each tick at its label's value times Div.
type gridTicks struct {
	Div float64
	N   int
}

// Ticks implements plot.Ticker.
func (g gridTicks) Ticks(min, max float64) []plot.Tick {
	ts := niceTicks{N: g.N}.Ticks(min/g.Div, max/g.Div)
	for i := range ts {
		ts[i].Value *= g.Div
	}
	return ts
}

// gridUnitText names the unit of a projected grid's coordinates on the
// map axes: the last length unit of its WKT (the projected axes' unit;
// the ellipsoid's comes first), else the units of its code
// ("EPSG:3031 units"), where "grid units" told a reader nothing.
func gridUnitText(crs string) string {
	if !strings.Contains(crs, "[") {
		if crs == "" {
			return "grid units"
		}
		return crs + " units"
	}
	unit := ""
	for _, key := range []string{`LENGTHUNIT["`, `UNIT["`} {
		rest := crs
		for {
			i := strings.Index(rest, key)
			if i < 0 {
				break
			}
			rest = rest[i+len(key):]
			if j := strings.IndexByte(rest, '"'); j > 0 && !strings.Contains(strings.ToLower(rest[:j]), "degree") {
				unit = rest[:j]
			}
		}
		if unit != "" {
			return unit
		}
	}
	return "grid units"
}
