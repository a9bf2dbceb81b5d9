package report

import (
	"fmt"
	"image/color"
	"math"
	"sort"
	"strconv"
	"strings"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"

	"areasweep/extent/vocab"
)

// chainWaterfall is one nested chain for one or more models with the same
// steps: per model, the AUC on the chain's first extent as a marker, one
// arrow per step from the AUC before to the AUC after (solid for a ring of
// new background, dashed for test records that first fall inside), and
// the AUC on the last extent as a marker. Rows run from the top: start,
// one per step, end; within a row each model has its own line.
type chainWaterfall struct {
	steps  []ChainStep // the steps of the first model (all share them)
	models []int       // index of each model in Sensitivity.ModelNames, -1 for a null
	cs     []*ChainSummary
	marks  []draw.GlyphStyle // each model's marker (colour, shape), set by ringsFigures
	// part and parts number the panels one chain's models are split
	// over when their value columns do not fit beside one (splitWide):
	// part 1 of parts, of group models in all; parts is 0 for a whole
	// panel.
	part, parts, group int
}

// rows returns the number of rows: start, one per step, end.
func (w *chainWaterfall) rows() int { return len(w.steps) + 2 }

// Row geometry of the ring_steps figure, in points at print size; our
// choices. A row holds one line per model, ringLinePitch apart (a marker
// is 4.8 pt across, an arrow head 5.2 pt), plus ringRowGap between rows;
// it is never less than ringMinPitch times the height of the 8 pt row
// labels, so that labels and values one row apart never touch. Rows that
// do not fit on one page at that pitch continue on further pages (never
// squeezed); a piece of a chain split over two pages has at least
// ringMinPieceRows rows unless the whole chain is shorter.
const (
	ringLinePitch    = 5.5 * vg.Length(1)
	ringRowGap       = 4 * vg.Length(1)
	ringMinPitch     = 1.25
	ringMinPieceRows = 3
	// ringPanelGap is the space above each panel's title.
	ringPanelGap = 6 * vg.Length(1)
)

// ringLabelH is the height of one line of text at the label size.
func ringLabelH() vg.Length { return textStyle(minFontPt).Height("Ag") }

// ringRowPitch is the height of one row of a panel of n models.
func ringRowPitch(n int) vg.Length {
	return max(ringMinPitch*ringLabelH(), vg.Length(n)*ringLinePitch+ringRowGap)
}

// ringSeg is rows [from, to) of a waterfall: a whole panel, or the piece
// of one that fits on a page.
type ringSeg struct {
	w        *chainWaterfall
	from, to int
}

func (s ringSeg) rows() int { return s.to - s.from }

// y returns the data coordinate of model k's line in row i of the chain;
// the data's y unit is one row, the segment's top row is at the top.
func (s ringSeg) y(i, k int) float64 {
	n := len(s.w.cs)
	off := (float64(n-1)/2 - float64(k)) * float64(ringLinePitch/ringRowPitch(n))
	return float64(s.to-i) - 0.5 + off
}

// in reports whether row i of the chain is in the segment.
func (s ringSeg) in(i int) bool { return i >= s.from && i < s.to }

// Plot implements plot.Plotter.
func (s ringSeg) Plot(c draw.Canvas, p *plot.Plot) {
	trX, trY := p.Transforms(&c)
	w := s.w
	connector := lineStyle(color.Gray{Y: 120}, 0.5, []vg.Length{vg.Points(1), vg.Points(1.5)})
	last := w.rows() - 1
	for k, cs := range w.cs {
		gs := w.marks[k]
		gs.Radius = vg.Points(2.4)
		col := gs.Color
		// vals[i] is the AUC at the end of row i (the start of row i+1).
		vals := make([]float64, w.rows())
		vals[0] = cs.StartAUC
		for i, st := range cs.Steps {
			vals[i+1] = st.AUCOuter
		}
		vals[last] = cs.EndAUC
		for i := s.from; i < s.to; i++ {
			y := trY(s.y(i, k))
			var at float64 // where the row's drawing starts
			switch {
			case i == 0:
				at = cs.StartAUC
			case i == last:
				at = cs.EndAUC
			default:
				at = cs.Steps[i-1].AUCInner
			}
			if i > 0 && s.in(i-1) {
				c.StrokeLine2(connector, trX(vals[i-1]), trY(s.y(i-1, k)), trX(at), y)
			}
			if i == 0 || i == last {
				c.DrawGlyph(gs, vg.Point{X: trX(at), Y: y})
				continue
			}
			st := cs.Steps[i-1]
			ls := lineStyle(col, 2.2, nil)
			if st.Kind != StepRing {
				ls = lineStyle(col, 1.4, []vg.Length{vg.Points(2.5), vg.Points(1.5)})
			}
			drawArrow(c, ls, trX(st.AUCInner), trX(st.AUCOuter), y)
		}
	}
}

// drawArrow draws a horizontal arrow from x0 to x1 at height y; a step
// too short for a head is drawn as a tick.
func drawArrow(c draw.Canvas, ls draw.LineStyle, x0, x1, y vg.Length) {
	head := vg.Points(4)
	dir := vg.Length(1)
	if x1 < x0 {
		dir = -1
	}
	if (x1-x0)*dir < head {
		c.StrokeLine2(lineStyle(ls.Color, 0.8, nil), x1, y-vg.Points(2.5), x1, y+vg.Points(2.5))
		if x1 != x0 {
			c.StrokeLine2(lineStyle(ls.Color, 1, nil), x0, y, x1, y)
		}
		return
	}
	ls.Dashes = arrowDashes(ls.Dashes, (x1-dir*head*0.8-x0)*dir)
	c.StrokeLine2(ls, x0, y, x1-dir*head*0.8, y)
	c.FillPolygon(ls.Color, []vg.Point{{X: x1, Y: y}, {X: x1 - dir*head, Y: y + vg.Points(2.6)}, {X: x1 - dir*head, Y: y - vg.Points(2.6)}})
}

// arrowDashes is the dash pattern d of an arrow whose shaft is shaft
// long: d itself when the shaft holds three of its periods, else d
// shrunk until it does, each dash and gap at least 0.5 pt. A short arrow
// of test records (a shaft of one 2.5 pt dash) drew as solid as a ring's.
func arrowDashes(d []vg.Length, shaft vg.Length) []vg.Length {
	var period vg.Length
	for _, l := range d {
		period += l
	}
	if period <= 0 || shaft >= 3*period {
		return d
	}
	f := shaft / (3 * period)
	out := make([]vg.Length, len(d))
	for i, l := range d {
		out[i] = max(l*f, vg.Points(0.5))
	}
	return out
}

// aucRange is the range of every AUC the chain's panel draws (all its
// pieces share the axis).
func (w *chainWaterfall) aucRange() (xmin, xmax float64) {
	xmin, xmax = math.Inf(1), math.Inf(-1)
	for _, cs := range w.cs {
		xmin, xmax = math.Min(xmin, math.Min(cs.StartAUC, cs.EndAUC)), math.Max(xmax, math.Max(cs.StartAUC, cs.EndAUC))
		for _, st := range cs.Steps {
			xmin = math.Min(xmin, math.Min(st.AUCInner, st.AUCOuter))
			xmax = math.Max(xmax, math.Max(st.AUCInner, st.AUCOuter))
		}
	}
	return xmin, xmax
}

// DataRange implements plot.DataRanger.
func (s ringSeg) DataRange() (xmin, xmax, ymin, ymax float64) {
	xmin, xmax = s.w.aucRange()
	return xmin, xmax, 0, float64(s.rows())
}

// rowLabel names row i of the chain.
func (w *chainWaterfall) rowLabel(i int) string {
	switch {
	case i == 0:
		return w.cs[0].Members[0]
	case i == w.rows()-1:
		return w.cs[0].Members[len(w.cs[0].Members)-1]
	case w.steps[i-1].Kind == StepRing:
		return "ring to " + w.steps[i-1].Outer
	default:
		return "test records of " + w.steps[i-1].Outer
	}
}

// rowKind is the right-hand column's word for what row i's values are.
func (w *chainWaterfall) rowKind(i int) string {
	switch {
	case i == 0 || i == w.rows()-1:
		return "AUC"
	case w.steps[i-1].Kind == StepRing:
		return "ring AUC"
	default:
		return "no ring"
	}
}

// rowValue is model k's value in row i: the AUC on the first or last
// extent, the ring's own AUC ("–" when undefined), or "" for a step of
// test records only.
func (w *chainWaterfall) rowValue(i, k int) string {
	cs := w.cs[k]
	switch {
	case i == 0:
		return f3(cs.StartAUC)
	case i == w.rows()-1:
		return f3(cs.EndAUC)
	}
	st := cs.Steps[i-1]
	if st.Kind != StepRing {
		return ""
	}
	if !st.AUCRingDefined {
		return "–"
	}
	return f3(st.AUCRing)
}

// title is the panel's title.
func (s ringSeg) title(models int) string {
	t := "nested chain " + s.w.cs[0].Chain
	if s.w.parts > 1 {
		// The markers heading the columns and the key name the models.
		t += fmt.Sprintf(", %d of %d models (part %d of %d)", len(s.w.cs), s.w.group, s.w.part, s.w.parts)
	} else if len(s.w.cs) < models || s.w.models[0] < 0 {
		if s.w.models[0] < 0 {
			t += ", null" // a null has a panel of its own
		} else {
			t += ", model"
		}
		for q, c := range s.w.cs {
			if q > 0 {
				t += ","
			}
			t += " " + c.Model
		}
	}
	if s.from > 0 {
		t += " (continued)"
	}
	return t
}

// plot returns the piece's panel: the waterfall and an AUC axis from the
// data, within 0 to 1. The rows' names and values are drawn beside it
// (ringTexts), so the y axis is hidden.
func (s ringSeg) plot(models int, titleW vg.Length) *plot.Plot {
	p := newPlot(s.title(models), titleW)
	p.Add(s)
	p.HideY()
	xmin, xmax := s.w.aucRange()
	if xmax-xmin < 0.02 {
		mid := (xmin + xmax) / 2
		xmin, xmax = mid-0.01, mid+0.01
	}
	pad := 0.06 * (xmax - xmin)
	step, _ := niceStepN(xmin-pad, xmax+pad, 5)
	p.X.Min = math.Max(0, math.Floor((xmin-pad)/step+1e-9)*step)
	p.X.Max = math.Min(1, math.Ceil((xmax+pad)/step-1e-9)*step)
	p.X.Tick.Marker = niceTicks{N: 5}
	p.X.Label.Text = "AUC"
	p.Y.Min, p.Y.Max = 0, float64(s.rows())
	return p
}

// ringChrome is a piece's height besides its rows: the gap above it, its
// title and its AUC axis.
func ringChrome(s ringSeg, models int, titleW vg.Length) vg.Length {
	p := s.plot(models, titleW)
	const h = 1000
	da := p.DataCanvas(draw.Canvas{Rectangle: vg.Rectangle{Max: vg.Point{X: titleW, Y: h}}})
	return h - (da.Max.Y - da.Min.Y) + ringPanelGap
}

// ringPage is one page (figure) of the waterfalls: the pieces it draws,
// top to bottom, and their total height.
type ringPage struct {
	segs []ringSeg
	h    vg.Length
}

// layoutRingPages places the panels' rows on pages whose panels may take
// at most avail: each row ringRowPitch tall, whole panels where they fit;
// a panel that does not fit in what is left of a page starts a new page
// when it would fit on an empty one, and otherwise fills the page (with at
// least ringMinPieceRows rows) and continues on the next. The first null's
// panel (models index -1; waterfallPanels puts them last) starts a new
// page, so that ring_steps holds the models' chains. chrome gives a
// piece's height besides its rows.
func layoutRingPages(panels []*chainWaterfall, avail vg.Length, chrome func(ringSeg) vg.Length) []ringPage {
	var pages []ringPage
	var cur ringPage
	for q, w := range panels {
		pitch := ringRowPitch(len(w.cs))
		if q > 0 && w.models[0] < 0 && panels[q-1].models[0] >= 0 && len(cur.segs) > 0 {
			// The nulls' chains start a page of their own.
			pages = append(pages, cur)
			cur = ringPage{}
		}
		for from := 0; from < w.rows(); {
			seg := ringSeg{w: w, from: from, to: w.rows()}
			ch := chrome(seg)
			left := seg.rows()
			fit := int((avail - cur.h - ch) / pitch)
			if fit >= left {
				cur.segs = append(cur.segs, seg)
				cur.h += ch + vg.Length(left)*pitch
				break
			}
			fresh := int((avail - ch) / pitch)
			if len(cur.segs) > 0 && (fit < min(ringMinPieceRows, left) || fresh >= left) {
				pages = append(pages, cur)
				cur = ringPage{}
				continue
			}
			seg.to = from + max(fit, 1)
			cur.segs = append(cur.segs, seg)
			cur.h += ch + vg.Length(seg.rows())*pitch
			pages = append(pages, cur)
			cur = ringPage{}
			from = seg.to
		}
	}
	if len(cur.segs) > 0 {
		pages = append(pages, cur)
	}
	return pages
}

// ringCols is the horizontal layout of the pages: room for the row names
// left of the data, and right of it a column for the kind of value
// ("AUC", "ring AUC", "no ring") and one column per model.
type ringCols struct {
	labelW      vg.Length // widest row name, at most ringMaxLabelW
	kindW, colW vg.Length
	models      int // most models in one panel
}

// Horizontal gaps of the right-hand columns, in points.
const (
	ringValueGap = 8 * vg.Length(1) // from the data area to the first column
	ringColGap   = 6 * vg.Length(1) // between columns
)

// newRingCols sizes the columns for the pieces of p.
func newRingCols(p ringPage) ringCols {
	var rc ringCols
	for _, s := range []string{"AUC", "ring AUC", "no ring"} {
		rc.kindW = max(rc.kindW, textWidth(s, minFontPt))
	}
	rc.colW = max(textWidth("0.000", minFontPt), 2*vg.Points(2.4)) + ringColGap
	for _, s := range p.segs {
		rc.models = max(rc.models, len(s.w.cs))
		for i := s.from; i < s.to; i++ {
			rc.labelW = max(rc.labelW, textWidth(s.w.rowLabel(i), minFontPt))
		}
	}
	rc.labelW = min(rc.labelW, ringMaxLabelW)
	return rc
}

// ringMinDataW is the least width of a panel's data area (our choice:
// room for the AUC axis's five tick labels and arrows a reader can tell
// apart). Twelve models' value columns beside one panel left it 60 pt
// wide, its tick labels printed over each other (0.650.700.75...).
const ringMinDataW = 120 * vg.Length(1)

// modelsPerPanel is the most models whose value columns fit right of a
// data area of ringMinDataW, beside row names of rc's width; at least
// one.
func (rc ringCols) modelsPerPanel() int {
	free := twoColumns - rc.left() - (ringValueGap + rc.kindW + ringColGap) - ringMinDataW
	return max(1, int(free/rc.colW))
}

// splitWide returns panels with each panel of more than k models split,
// in model order, into the fewest panels of at most k models, as even as
// possible (12 at k = 7: 6 and 6), numbered as parts of their chain.
func splitWide(panels []*chainWaterfall, k int) []*chainWaterfall {
	var out []*chainWaterfall
	for _, w := range panels {
		n := len(w.cs)
		if n <= k {
			out = append(out, w)
			continue
		}
		parts := (n + k - 1) / k
		for q := range parts {
			from, to := q*n/parts, (q+1)*n/parts
			out = append(out, &chainWaterfall{steps: w.steps, models: w.models[from:to], cs: w.cs[from:to],
				part: q + 1, parts: parts, group: n})
		}
	}
	return out
}

// ringMaxLabelW is the most room the row names take (our choice, 30% of
// the page's width): a longer name is shortened by fitLabel, so that the
// data keep room however long the extents' IDs.
const ringMaxLabelW = 0.3 * twoColumns

// fitLabel returns s, or s cut to its start and end joined by "…" when it
// is wider than w at the label size.
func fitLabel(s string, w vg.Length) string {
	if textWidth(s, minFontPt) <= w {
		return s
	}
	r := []rune(s)
	for cut := 1; cut < len(r); cut++ {
		head := (len(r) - cut + 1) / 2
		t := string(r[:head]) + "…" + string(r[head+cut:])
		if textWidth(t, minFontPt) <= w {
			return t
		}
	}
	return "…"
}

// left is the room left of the data areas; right the room right of them.
func (rc ringCols) left() vg.Length { return rc.labelW + vg.Points(8) }
func (rc ringCols) right() vg.Length {
	return ringValueGap + rc.kindW + ringColGap + vg.Length(rc.models)*rc.colW
}

// colX is the left edge of model k's value column for a data area ending
// at x.
func (rc ringCols) colX(x vg.Length, k int) vg.Length {
	return x + ringValueGap + rc.kindW + ringColGap + vg.Length(k)*rc.colW
}

// ringText is one text beside a panel, vertically centred on y; right
// aligned at x when right, else starting at x.
type ringText struct {
	s     string
	x, y  vg.Length
	right bool
}

// box is the text's extent at the label size.
func (t ringText) box() vg.Rectangle {
	w, h := textWidth(t.s, minFontPt), ringLabelH()
	x0 := t.x
	if t.right {
		x0 -= w
	}
	return vg.Rectangle{Min: vg.Point{X: x0, Y: t.y - h/2}, Max: vg.Point{X: x0 + w, Y: t.y + h/2}}
}

// ringTexts returns the texts of piece s whose rows fill data area da:
// each row's name left of it, and right of it the kind of value and one
// value per model (one text per column, so never two on one line), each
// at its row's centre.
func ringTexts(s ringSeg, da vg.Rectangle, rc ringCols) []ringText {
	pitch := (da.Max.Y - da.Min.Y) / vg.Length(s.rows())
	var ts []ringText
	for i := s.from; i < s.to; i++ {
		y := da.Max.Y - (vg.Length(i-s.from)+0.5)*pitch
		ts = append(ts, ringText{s: fitLabel(s.w.rowLabel(i), rc.labelW), x: da.Min.X - vg.Points(4), y: y, right: true},
			ringText{s: s.w.rowKind(i), x: da.Max.X + ringValueGap, y: y})
		for k := range s.w.cs {
			if v := s.w.rowValue(i, k); v != "" {
				ts = append(ts, ringText{s: v, x: rc.colX(da.Max.X, k), y: y})
			}
		}
	}
	return ts
}

// ringHeader is where model k's marker heads its value column: centred
// over the column's numbers, just above the data area.
func ringHeader(da vg.Rectangle, rc ringCols, k int) vg.Point {
	return vg.Point{X: rc.colX(da.Max.X, k) + (rc.colW-ringColGap)/2, Y: da.Max.Y + vg.Points(5)}
}

// alignData moves the sides of c so that p's data area runs from x0 to
// x1: the plot pads its data area for the tick labels at its ends, which
// differ from panel to panel. Two rounds, as the padding depends a little
// on the width.
func alignData(p *plot.Plot, c *draw.Canvas, x0, x1 vg.Length) {
	c.Min.X, c.Max.X = x0, x1
	for range 2 {
		da := p.DataCanvas(*c)
		c.Min.X += x0 - da.Min.X
		c.Max.X += x1 - da.Max.X
	}
}

// ringsNote says how to read the waterfall, in particular a negative step.
// It is drawn under the panels of the first page, where the figure's
// files carry it wherever they go; the caption points to it instead of
// saying it again (the page showed it twice, in the drawing and the
// caption).
const ringsNote = "How to read a step: each arrow moves the AUC from one extent of the chain to the next larger one. " +
	"The new ring has its own AUC (in the columns on the right); the AUC of the larger extent is the area-weighted mix of the inner extent's AUC and the ring's. " +
	"A solid arrow pointing left (a negative step) means the ring's own AUC is below the inner extent's: the ring added background the model ranks above some test records; " +
	"a dashed one, that the test records first falling inside place lower, on average, against the inner extent's background than the others. " +
	"The steps add up to the change from the first to the last extent, so when steps go both ways one step can exceed the whole change (a share above 100%) while another is negative."

// sameSteps reports whether two chain summaries have the same steps.
func sameSteps(a, b []ChainStep) bool {
	if len(a) != len(b) {
		return false
	}
	for i := range a {
		if a[i].Kind != b[i].Kind || a[i].Inner != b[i].Inner || a[i].Outer != b[i].Outer {
			return false
		}
	}
	return true
}

// waterfallPanels groups the chain summaries into panels: one per chain,
// with every model whose steps match the chain's first model (a model
// with other steps, and a null, gets its own panel). The models' panels
// come first, in chain order, then the nulls'.
func waterfallPanels(s *Sensitivity) []*chainWaterfall {
	modelIndex := map[string]int{}
	for i, m := range s.ModelNames {
		modelIndex[m] = i
	}
	var ws, nullWs []*chainWaterfall
	for i := range s.Chains {
		c := &s.Chains[i]
		if len(c.Members) < 2 {
			continue
		}
		mi, isModel := modelIndex[c.Model]
		if !isModel {
			mi = -1
		}
		list := &ws
		if !isModel {
			list = &nullWs
		}
		placed := false
		for _, w := range *list {
			if isModel && w.cs[0].Chain == c.Chain && sameSteps(w.steps, c.Steps) {
				w.cs = append(w.cs, c)
				w.models = append(w.models, mi)
				placed = true
				break
			}
		}
		if !placed {
			*list = append(*list, &chainWaterfall{steps: c.Steps, cs: []*ChainSummary{c}, models: []int{mi}})
		}
	}
	return append(ws, nullWs...)
}

// wholePanels returns every panel as one piece.
func wholePanels(panels []*chainWaterfall) []ringSeg {
	segs := make([]ringSeg, len(panels))
	for i, w := range panels {
		segs[i] = ringSeg{w: w, from: 0, to: w.rows()}
	}
	return segs
}

// ringLayout is the arrangement of the ring_steps pages: the pieces on
// each page, the columns every page shares, the panels' title width, the
// number of models (a panel with fewer names its models) and the heights
// of the legend and note at the foot of a page (the note on the first
// page only).
type ringLayout struct {
	pages          []ringPage
	rc             ringCols
	titleW         vg.Length
	models         int
	legendH, noteH vg.Length
}

// newRingLayout places panels on pages of width twoColumns that keep
// legendH and noteH for the legend and note.
func newRingLayout(panels []*chainWaterfall, models int, legendH, noteH vg.Length) ringLayout {
	l := ringLayout{models: models, legendH: legendH, noteH: noteH}
	// One set of columns for every page, from every panel's rows, so that
	// the data areas line up from page to page and a title wrapped to
	// their width never reaches the value columns.
	l.rc = newRingCols(ringPage{segs: wholePanels(panels)})
	l.titleW = max(twoColumns-l.rc.left()-l.rc.right(), vg.Points(60))
	// Every page keeps room for the note, so that the first page's room
	// does not depend on how many pages follow.
	avail := maxHeight - legendH - noteH - vg.Points(3)
	l.pages = layoutRingPages(panels, avail, func(sg ringSeg) vg.Length { return ringChrome(sg, models, l.titleW) })
	return l
}

// height is page pi's height.
func (l ringLayout) height(pi int) vg.Length {
	h := l.legendH + l.pages[pi].h + vg.Points(3)
	if pi == 0 {
		h += l.noteH
	}
	return min(maxHeight, h)
}

// ringPlaced is one piece drawn on a page: its panel, the canvas it is
// drawn in and its data area.
type ringPlaced struct {
	seg ringSeg
	p   *plot.Plot
	c   draw.Canvas
	da  vg.Rectangle
}

// place lays out page pi's pieces in rest (the page above its legend and
// note), top to bottom, with every data area from the same left to the
// same right edge.
func (l ringLayout) place(pi int, rest draw.Canvas) []ringPlaced {
	var out []ringPlaced
	y := rest.Max.Y - vg.Points(3) // glyphs of the top title reach above its box
	for _, sg := range l.pages[pi].segs {
		p := sg.plot(l.models, l.titleW)
		rows := vg.Length(sg.rows()) * ringRowPitch(len(sg.w.cs))
		c := rest
		c.Max.Y = y
		c.Min.Y = y - ringChrome(sg, l.models, l.titleW) - rows
		y = c.Min.Y
		c.Max.Y -= ringPanelGap
		alignData(p, &c, rest.Min.X+l.rc.left(), rest.Max.X-l.rc.right())
		out = append(out, ringPlaced{seg: sg, p: p, c: c, da: p.DataCanvas(c).Rectangle})
	}
	return out
}

// ringPageName names page i (from 0) of the ring_steps figure.
func ringPageName(i int) string {
	if i == 0 {
		return ringFigureName
	}
	return fmt.Sprintf("%s_%d", ringFigureName, i+1)
}

// ringPageNumber returns N for ring_steps_N, a further page of the
// ring_steps figure (N >= 2, written as ringPageName writes it).
func ringPageNumber(base string) (int, bool) {
	n, err := strconv.Atoi(strings.TrimPrefix(base, ringFigureName+"_"))
	if err != nil || n < 2 || ringPageName(n-1) != base {
		return 0, false
	}
	return n, true
}

// ringPagesSentence tells why the waterfall has more pages than one: the
// models' rows do not fit one page, and the nulls' chains start a page of
// their own (a run with one chain and the distance-only null has two pages
// whose rows would fit one). "" for one page.
func ringPagesSentence(pages []ringPage) string {
	var more, nullPages []string
	for q := 1; q < len(pages); q++ {
		if pages[q].segs[0].w.models[0] < 0 {
			nullPages = append(nullPages, ringPageName(q))
		} else {
			more = append(more, ringPageName(q))
		}
	}
	out := ""
	if len(more) > 0 {
		out += fmt.Sprintf(" The rows, at least %g times the label height apart, do not fit one page: the chains continue in %s.", ringMinPitch, strings.Join(more, ", "))
	}
	switch {
	case len(nullPages) == 1:
		out += fmt.Sprintf(" The nulls' chains are on a page of their own, %s.", nullPages[0])
	case len(nullPages) > 1:
		out += fmt.Sprintf(" The nulls' chains are on pages of their own, %s.", strings.Join(nullPages, ", "))
	}
	return out
}

// ringStartWords names, for the waterfall's caption, the smaller members
// of a nested chain its panels leave out: a chain starts at its first
// member where the model is scored (chainSummary), so a region chain
// whose base region holds no test point began at a larger buffer with
// no word of where base had gone. One sentence per chain and start,
// naming the models and nulls it holds for.
func ringStartWords(r *Results) string {
	type start struct {
		chain, first, skipped string
		n                     int
	}
	var order []start
	who := map[start][]string{}
	for _, c := range r.Sensitivity.Chains {
		if len(c.Members) < 2 {
			continue
		}
		type ext struct {
			id   string
			area float64
		}
		var before []ext
		for _, e := range r.Extents {
			if e.Chain == c.Chain && e.Status == vocab.StatusOK && e.AreaKm2 < c.MemberAreasKm2[0] {
				before = append(before, ext{e.ID, e.AreaKm2})
			}
		}
		if len(before) == 0 {
			continue
		}
		sort.SliceStable(before, func(a, b int) bool { return before[a].area < before[b].area })
		ids := make([]string, len(before))
		for k, e := range before {
			ids[k] = e.id
		}
		k := start{c.Chain, c.Members[0], joinList(ids), len(ids)}
		if _, ok := who[k]; !ok {
			order = append(order, k)
		}
		who[k] = append(who[k], ModelLabel(r, c.Model))
	}
	var out string
	for _, k := range order {
		out += fmt.Sprintf(" Chain %s starts at %s for %s: its smaller member%s %s %s no AUC there (the Scores table says why).",
			k.chain, k.first, joinList(who[k]), Plural(k.n), k.skipped, map[bool]string{true: "has", false: "have"}[k.n == 1])
	}
	return out
}

// ringsFigures draws the waterfall panels on as many pages as their rows
// need at the row pitch of ringRowPitch: ring_steps, then ring_steps_2,
// ring_steps_3, ... (the models' chains first, then the nulls'). A long
// chain continues on the next page, its title saying from which row.
func ringsFigures(r *Results) []figure {
	s := r.Sensitivity
	panels := waterfallPanels(s)
	if len(panels) == 0 {
		return nil
	}
	// The row names' room is the same however the models are split.
	perPanel := newRingCols(ringPage{segs: wholePanels(panels)}).modelsPerPanel()
	whole := len(panels)
	panels = splitWide(panels, perPanel)
	split := len(panels) > whole
	nullIndex := map[string]int{}
	for j, nm := range nulls(r) {
		nullIndex[nm.Name] = j
	}
	for _, w := range panels {
		w.marks = make([]draw.GlyphStyle, len(w.cs))
		for k, mi := range w.models {
			if mi >= 0 {
				w.marks[k] = markerStyle(mi)
				continue
			}
			_, w.marks[k] = nullLineStyle(nullIndex[w.cs[k].Model])
		}
	}
	items := ringLegendItems(r, wholePanels(panels), nullIndex)
	const w = twoColumns
	// Every page keeps room for the key of all the pages' lines; a page's
	// key lists the lines drawn on it.
	legendH := vg.Length(len(legendRows(items, w)))*legendRowHeight + vg.Points(4)
	note := wrapText(ringsNote, minFontPt, w-vg.Points(8))
	noteH := textStyle(minFontPt).Height(note) + vg.Points(6)
	lay := newRingLayout(panels, len(s.ModelNames), legendH, noteH)
	pages := lay.pages
	caption := "Waterfall of the AUC along each nested chain, one panel per chain, one line per model in each row: the marker in the top row is the AUC on the chain's smallest extent, " +
		"each arrow one step to the next larger extent (solid: a ring of new background; dashed: test records that first fall inside), the marker in the bottom row the AUC on the largest extent. " +
		"Right of each panel, one column per model, headed by its marker: the AUC on the first and last extent and each ring's own AUC (– when undefined; a step of test records adds no ring). " +
		"All AUCs use the test records inside each extent; there is no bar of uncertainty. " +
		"The note under the panels says how to read a step, a negative one in particular."
	var fs []figure
	for pi, pg := range pages {
		f := figure{Name: ringPageName(pi), Title: "AUC step by step along each nested chain", W: w}
		if len(pages) > 1 {
			f.Title += fmt.Sprintf(" (part %d of %d)", pi+1, len(pages))
		}
		var chains []string
		for _, sg := range pg.segs {
			chains = append(chains, sg.title(len(s.ModelNames)))
		}
		if pi == 0 {
			f.Caption = caption
			if split {
				f.Caption += fmt.Sprintf(" The value columns of more than %d models do not fit beside one panel: a chain's models are split over panels of at most %d (titled part 1, part 2, ...).", perPanel, perPanel)
			}
			f.Caption += ringPagesSentence(pages) + ringStartWords(r)
		} else {
			f.Caption = fmt.Sprintf("Continues %s: %s. Read as %s (its caption and the note under it say how).", ringPageName(pi-1), strings.Join(chains, "; "), ringPageName(0))
		}
		legend := legendRows(ringLegendItems(r, pg.segs, nullIndex), w)
		pageLegendH := vg.Length(len(legend))*legendRowHeight + vg.Points(4)
		if pageLegendH > legendH {
			legend, pageLegendH = legendRows(items, w), legendH
		}
		// A shorter key shortens the page by as much.
		f.H = lay.height(pi) - (legendH - pageLegendH)
		f.draw = func(dc draw.Canvas) error {
			rest := dc
			if pi == 0 {
				var noteC draw.Canvas
				noteC, rest = splitBottom(dc, noteH)
				sty := textStyle(minFontPt)
				sty.YAlign = draw.YTop
				noteC.FillText(sty, vg.Point{X: noteC.Min.X + vg.Points(4), Y: noteC.Max.Y - vg.Points(2)}, note)
			}
			legC, rest := splitBottom(rest, pageLegendH)
			drawLegendRows(legC, legend)
			sty := textStyle(minFontPt)
			sty.YAlign = draw.YCenter
			right := sty
			right.XAlign = draw.XRight
			for _, pl := range lay.place(pi, rest) {
				pl.p.Draw(pl.c)
				for _, t := range ringTexts(pl.seg, pl.da, lay.rc) {
					if t.right {
						dc.FillText(right, vg.Point{X: t.x, Y: t.y}, t.s)
					} else {
						dc.FillText(sty, vg.Point{X: t.x, Y: t.y}, t.s)
					}
				}
				for k := range pl.seg.w.cs {
					gs := pl.seg.w.marks[k]
					gs.Radius = vg.Points(2.4)
					dc.DrawGlyph(gs, ringHeader(pl.da, lay.rc, k))
				}
			}
			return nil
		}
		fs = append(fs, f)
	}
	return fs
}

// ringLegendItems is the key of the waterfall pieces segs: the models
// and then the nulls that have a line in them, in the order of
// Sensitivity.ModelNames and of first appearance, and the two kinds of
// step. nullIndex gives each null's index among the nulls (its style).
func ringLegendItems(r *Results, segs []ringSeg, nullIndex map[string]int) []legendItem {
	s := r.Sensitivity
	usedModel := make([]bool, len(s.ModelNames))
	var usedNulls []string
	seenNull := map[string]bool{}
	for _, sg := range segs {
		for k, mi := range sg.w.models {
			if mi >= 0 {
				usedModel[mi] = true
			} else if nm := sg.w.cs[k].Model; !seenNull[nm] {
				seenNull[nm] = true
				usedNulls = append(usedNulls, nm)
			}
		}
	}
	var items []legendItem
	for i, m := range s.ModelNames {
		if usedModel[i] {
			ls := lineStyle(modelColor(i), 2.2, nil)
			items = append(items, legendItem{"model " + m, glyphThumb{gs: markerStyle(i), line: &ls}})
		}
	}
	for _, nm := range usedNulls {
		ls, gs := nullLineStyle(nullIndex[nm])
		ls.Width, ls.Dashes = vg.Points(2.2), nil
		items = append(items, legendItem{ModelLabel(r, nm), glyphThumb{gs: gs, line: &ls}})
	}
	return append(items,
		legendItem{"ring of new background", lineThumb{lineStyle(ink, 2.2, nil)}},
		legendItem{"test records that first fall inside", lineThumb{lineStyle(ink, 1.4, []vg.Length{vg.Points(2.5), vg.Points(1.5)})}})
}
