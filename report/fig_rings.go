package report

import (
	"image/color"
	"math"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
)

// chainWaterfall draws one nested chain for every model: per model, the AUC
// on the chain's first extent as a marker, one arrow per step from the AUC
// before to the AUC after (solid for a ring of new background, dashed for
// test records that first fall inside), and the AUC on the last extent as
// a marker. Rows run from the top: start, one per step, end; within a row
// each model has its own line. The numbers go in a column just right of
// the data area.
type chainWaterfall struct {
	steps  []ChainStep // the steps of the first model (all share them)
	models []int       // index of each model in the figure's model list
	cs     []*ChainSummary
}

// rows returns the number of rows: start, one per step, end.
func (w chainWaterfall) rows() int { return len(w.steps) + 2 }

// y returns the data coordinate of model k's line in row i (row 0 at the
// top); rows are one model-line apart.
func (w chainWaterfall) y(i, k int) float64 {
	n := len(w.cs)
	top := float64(w.rows()*(n+1)) - 1
	return top - float64(i*(n+1)+k)
}

// rowCentre is the data coordinate of the middle of row i.
func (w chainWaterfall) rowCentre(i int) float64 {
	return (w.y(i, 0) + w.y(i, len(w.cs)-1)) / 2
}

// Plot implements plot.Plotter.
func (w chainWaterfall) Plot(c draw.Canvas, p *plot.Plot) {
	trX, trY := p.Transforms(&c)
	sty := textStyle(minFontPt)
	sty.YAlign = draw.YCenter
	connector := lineStyle(color.Gray{Y: 120}, 0.5, []vg.Length{vg.Points(1), vg.Points(1.5)})
	for k, cs := range w.cs {
		mi := w.models[k]
		col := modelColor(mi)
		// Each number carries its model's marker.
		label := func(y vg.Length, s string) {
			wide := c // DrawGlyph skips points outside its canvas
			wide.Max.X += vg.Points(20)
			wide.DrawGlyph(draw.GlyphStyle{Color: col, Radius: vg.Points(2), Shape: modelGlyph(mi)}, vg.Point{X: c.Max.X + vg.Points(8), Y: y})
			c.FillText(sty, vg.Point{X: c.Max.X + vg.Points(14), Y: y}, s)
		}
		mark := func(row int, v float64) {
			pt := vg.Point{X: trX(v), Y: trY(w.y(row, k))}
			c.DrawGlyph(draw.GlyphStyle{Color: col, Radius: vg.Points(2.4), Shape: modelGlyph(mi)}, pt)
			label(pt.Y, "AUC "+f3(v))
		}
		mark(0, cs.StartAUC)
		prev, prevY := cs.StartAUC, trY(w.y(0, k))
		for i, st := range cs.Steps {
			y := trY(w.y(i+1, k))
			c.StrokeLine2(connector, trX(prev), prevY, trX(st.AUCInner), y)
			ls := lineStyle(col, 2.2, nil)
			text := "new test records"
			if st.Kind == StepRing {
				text = "ring AUC –"
				if st.AUCRingDefined {
					text = "ring AUC " + f3(st.AUCRing)
				}
			} else {
				ls = lineStyle(col, 1.4, []vg.Length{vg.Points(2.5), vg.Points(1.5)})
			}
			drawArrow(c, ls, trX(st.AUCInner), trX(st.AUCOuter), y)
			label(y, text)
			prev, prevY = st.AUCOuter, y
		}
		last := w.rows() - 1
		y := trY(w.y(last, k))
		c.StrokeLine2(connector, trX(prev), prevY, trX(cs.EndAUC), y)
		mark(last, cs.EndAUC)
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
		c.StrokeLine2(lineStyle(ls.Color, 0.8, nil), x1, y-vg.Points(3), x1, y+vg.Points(3))
		if x1 != x0 {
			c.StrokeLine2(lineStyle(ls.Color, 1, nil), x0, y, x1, y)
		}
		return
	}
	c.StrokeLine2(ls, x0, y, x1-dir*head*0.8, y)
	c.FillPolygon(ls.Color, []vg.Point{{X: x1, Y: y}, {X: x1 - dir*head, Y: y + vg.Points(2.6)}, {X: x1 - dir*head, Y: y - vg.Points(2.6)}})
}

// DataRange implements plot.DataRanger.
func (w chainWaterfall) DataRange() (xmin, xmax, ymin, ymax float64) {
	xmin, xmax = math.Inf(1), math.Inf(-1)
	for _, cs := range w.cs {
		xmin, xmax = math.Min(xmin, math.Min(cs.StartAUC, cs.EndAUC)), math.Max(xmax, math.Max(cs.StartAUC, cs.EndAUC))
		for _, st := range cs.Steps {
			xmin = math.Min(xmin, math.Min(st.AUCInner, st.AUCOuter))
			xmax = math.Max(xmax, math.Max(st.AUCInner, st.AUCOuter))
		}
	}
	return xmin, xmax, w.y(w.rows()-1, len(w.cs)-1) - 1, w.y(0, 0) + 1
}

// rowLabels names the rows, top to bottom.
func (w chainWaterfall) rowLabels(first, last string) []string {
	ls := []string{first}
	for _, st := range w.steps {
		if st.Kind == StepRing {
			ls = append(ls, "ring to "+st.Outer)
		} else {
			ls = append(ls, "test records of "+st.Outer)
		}
	}
	return append(ls, last)
}

// plot returns the panel: the waterfall with its rows named on the y axis
// and an AUC axis from the data, within 0 to 1.
func (w chainWaterfall) plot(models []string, titleW vg.Length) *plot.Plot {
	title := "nested chain " + w.cs[0].Chain
	if len(w.cs) < len(models) {
		title += ", model"
		for q, c := range w.cs {
			if q > 0 {
				title += ","
			}
			title += " " + c.Model
		}
	}
	p := newPlot(title, titleW)
	p.Add(w)
	names := w.rowLabels(w.cs[0].Members[0], w.cs[0].Members[len(w.cs[0].Members)-1])
	var ts []plot.Tick
	for q, n := range names {
		ts = append(ts, plot.Tick{Value: w.rowCentre(q), Label: n})
	}
	p.Y.Tick.Marker = plot.ConstantTicks(ts)
	p.Y.Tick.Length = 0
	p.Y.LineStyle.Width = 0
	xmin, xmax, ymin, ymax := w.DataRange()
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
	p.Y.Min, p.Y.Max = ymin, ymax
	return p
}

// ringsNote says how to read the waterfall, in particular a negative step.
const ringsNote = "How to read a step: each arrow moves the AUC from one extent of the chain to the next larger one. " +
	"The new ring has its own AUC (in the column on the right); the AUC of the larger extent is the area-weighted mix of the inner extent's AUC and the ring's. " +
	"An arrow pointing left (a negative step) means the ring's own AUC is below the inner extent's: the ring added background the model ranks above some test records. " +
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
// with other steps gets its own panel).
func waterfallPanels(s *Sensitivity) []chainWaterfall {
	modelIndex := map[string]int{}
	for i, m := range s.ModelNames {
		modelIndex[m] = i
	}
	var ws []chainWaterfall
	for i := range s.Chains {
		c := &s.Chains[i]
		if len(c.Members) < 2 {
			continue
		}
		placed := false
		for q := range ws {
			if ws[q].cs[0].Chain == c.Chain && sameSteps(ws[q].steps, c.Steps) {
				ws[q].cs = append(ws[q].cs, c)
				ws[q].models = append(ws[q].models, modelIndex[c.Model])
				placed = true
				break
			}
		}
		if !placed {
			ws = append(ws, chainWaterfall{steps: c.Steps, cs: []*ChainSummary{c}, models: []int{modelIndex[c.Model]}})
		}
	}
	return ws
}

// ringsFigure draws one waterfall panel per nested chain.
func ringsFigure(r *Results) (figure, bool) {
	s := r.Sensitivity
	panels := waterfallPanels(s)
	if len(panels) == 0 {
		return figure{}, false
	}
	f := figure{Name: "ring_steps", Title: "AUC step by step along each nested chain", W: twoColumns, Note: ringsNote}
	var items []legendItem
	for i, m := range s.ModelNames {
		ls := lineStyle(modelColor(i), 2.2, nil)
		items = append(items, legendItem{"model " + m, glyphThumb{gs: draw.GlyphStyle{Color: modelColor(i), Radius: vg.Points(2.4), Shape: modelGlyph(i)}, line: &ls}})
	}
	items = append(items,
		legendItem{"ring of new background", lineThumb{lineStyle(ink, 2.2, nil)}},
		legendItem{"test records that first fall inside", lineThumb{lineStyle(ink, 1.4, []vg.Length{vg.Points(2.5), vg.Points(1.5)})}})
	legend := legendRows(items, f.W)
	legendH := vg.Length(len(legend))*legendRowHeight + vg.Points(4)
	note := wrapText(f.Note, minFontPt, f.W-vg.Points(8))
	noteH := textStyle(minFontPt).Height(note) + vg.Points(6)
	labelW := vg.Length(0)
	for _, s := range []string{"ring AUC 0.000", "new test records", "AUC 0.000"} {
		labelW = max(labelW, textWidth(s, minFontPt))
	}
	labelW += vg.Points(18)
	// Panel heights follow their number of lines: 9 pt per model line,
	// plus title and axis.
	heights := make([]vg.Length, len(panels))
	total := vg.Length(0)
	for i, w := range panels {
		heights[i] = vg.Length(w.rows()*(len(w.cs)+1))*vg.Points(8.5) + vg.Points(48)
		total += heights[i]
	}
	f.H = min(maxHeight, legendH+noteH+total+vg.Points(3))
	scale := (f.H - legendH - noteH - vg.Points(3)) / total
	f.Caption = "Waterfall of the AUC along each nested chain, one panel per chain, one line per model: the marker at the top is the AUC on the chain's smallest extent, " +
		"each arrow one step to the next larger extent (solid: a ring of new background; dashed: test records that first fall inside), the marker at the bottom the AUC on the largest extent. " +
		"All AUCs use the test records inside each extent; there is no bar of uncertainty."
	f.draw = func(dc draw.Canvas) error {
		noteC, rest := splitBottom(dc, noteH)
		sty := textStyle(minFontPt)
		sty.YAlign = draw.YTop
		noteC.FillText(sty, vg.Point{X: noteC.Min.X + vg.Points(4), Y: noteC.Max.Y - vg.Points(2)}, note)
		legC, rest := splitBottom(rest, legendH)
		drawLegendRows(legC, legend)
		plots := make([]*plot.Plot, len(panels))
		canv := make([]draw.Canvas, len(panels))
		y := rest.Max.Y - vg.Points(3) // glyphs of the top title reach above its box
		left := vg.Length(0)
		for i, w := range panels {
			p := w.plot(s.ModelNames, f.W-labelW)
			c := rest
			c.Max.Y = y
			c.Min.Y = y - heights[i]*scale
			c.Max.X -= labelW
			c.Min.X += vg.Points(2)
			y = c.Min.Y
			c.Min.Y += vg.Points(6) // a gap above the next panel's title
			da := p.DataCanvas(c)
			left = max(left, da.Min.X-c.Min.X)
			plots[i], canv[i] = p, c
		}
		// Align the data areas' left edges.
		for i, p := range plots {
			c := canv[i]
			da := p.DataCanvas(c)
			c.Min.X += left - (da.Min.X - c.Min.X)
			p.Draw(c)
		}
		return nil
	}
	return f, true
}
