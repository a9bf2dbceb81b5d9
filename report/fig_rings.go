package report

import (
	"fmt"
	"image/color"
	"math"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
)

// Step colours of the waterfall (from lineColors, so they stay apart for
// colour-blind readers).
var (
	stepUpColor    = lineColors[0]
	stepDownColor  = lineColors[1]
	stepPointColor = lineColors[2]
)

// waterfall draws one chain of one model: the AUC on the first member as a
// dot, one floating bar per step from the AUC before to the AUC after, and
// the AUC on the last member as a dot. Row 0 is drawn at the top.
type waterfall struct {
	cs *ChainSummary
}

// rows returns the number of rows: start, one per step, end.
func (w waterfall) rows() int { return len(w.cs.Steps) + 2 }

// y is the data coordinate of row i (row 0 at the top).
func (w waterfall) y(i int) float64 { return float64(w.rows() - 1 - i) }

// Plot implements plot.Plotter.
func (w waterfall) Plot(c draw.Canvas, p *plot.Plot) {
	trX, trY := p.Transforms(&c)
	sty := textStyle(minFontPt)
	sty.YAlign = draw.YCenter
	half := vg.Points(4)
	label := func(xLeft, xRight, y vg.Length, s string) {
		if xRight+vg.Points(3)+sty.Width(s) <= c.Max.X {
			sty.XAlign = draw.XLeft
			c.FillText(sty, vg.Point{X: xRight + vg.Points(3), Y: y}, s)
			return
		}
		sty.XAlign = draw.XRight
		c.FillText(sty, vg.Point{X: xLeft - vg.Points(3), Y: y}, s)
	}
	dot := func(row int, v float64) {
		x, y := trX(v), trY(w.y(row))
		c.DrawGlyph(draw.GlyphStyle{Color: ink, Radius: vg.Points(2.6), Shape: draw.CircleGlyph{}}, vg.Point{X: x, Y: y})
		label(x-vg.Points(2), x+vg.Points(2), y, f3(v))
	}
	connector := lineStyle(color.Gray{Y: 110}, 0.5, []vg.Length{vg.Points(1), vg.Points(1.5)})
	dot(0, w.cs.StartAUC)
	prev := w.cs.StartAUC
	for i, st := range w.cs.Steps {
		row := i + 1
		y := trY(w.y(row))
		yPrev := trY(w.y(row - 1))
		c.StrokeLine2(connector, trX(prev), yPrev, trX(st.AUCInner), y)
		x0, x1 := trX(math.Min(st.AUCInner, st.AUCOuter)), trX(math.Max(st.AUCInner, st.AUCOuter))
		if x1-x0 < vg.Points(0.8) {
			x1 = x0 + vg.Points(0.8)
		}
		fill := stepUpColor
		switch {
		case st.Kind != "ring":
			fill = stepPointColor
		case st.AUCOuter < st.AUCInner:
			fill = stepDownColor
		}
		rect := vg.Rectangle{Min: vg.Point{X: x0, Y: y - half}, Max: vg.Point{X: x1, Y: y + half}}
		c.SetColor(fill)
		c.Fill(rect.Path())
		c.StrokeLines(lineStyle(ink, 0.4, nil), []vg.Point{rect.Min, {X: rect.Max.X, Y: rect.Min.Y}, rect.Max, {X: rect.Min.X, Y: rect.Max.Y}, rect.Min})
		text := "new test records"
		if st.Kind == "ring" {
			text = "ring AUC –"
			if st.AUCRingDefined {
				text = "ring AUC " + f3(st.AUCRing)
			}
		}
		label(x0, x1, y, text)
		prev = st.AUCOuter
	}
	last := w.rows() - 1
	c.StrokeLine2(connector, trX(prev), trY(w.y(last-1)), trX(w.cs.EndAUC), trY(w.y(last)))
	dot(last, w.cs.EndAUC)
}

// DataRange implements plot.DataRanger.
func (w waterfall) DataRange() (xmin, xmax, ymin, ymax float64) {
	xmin, xmax = math.Min(w.cs.StartAUC, w.cs.EndAUC), math.Max(w.cs.StartAUC, w.cs.EndAUC)
	for _, st := range w.cs.Steps {
		xmin = math.Min(xmin, math.Min(st.AUCInner, st.AUCOuter))
		xmax = math.Max(xmax, math.Max(st.AUCInner, st.AUCOuter))
	}
	return xmin, xmax, -0.5, float64(w.rows()) - 0.5
}

// rowLabels names the rows of a chain's waterfall, top to bottom.
func (w waterfall) rowLabels() []string {
	ls := []string{w.cs.Members[0]}
	for _, st := range w.cs.Steps {
		if st.Kind == "ring" {
			ls = append(ls, "ring to "+st.Outer)
		} else {
			ls = append(ls, "test records of "+st.Outer)
		}
	}
	return append(ls, w.cs.Members[len(w.cs.Members)-1])
}

// ringsNote says how to read the waterfall, in particular a negative step.
const ringsNote = "How to read a step: each bar moves the AUC from one extent of the chain to the next larger one. " +
	"The new ring has its own AUC (printed beside the bar); the AUC of the larger extent is the area-weighted mix of the inner extent's AUC and the ring's. " +
	"A step to the left (negative) means the ring's own AUC is below the inner extent's: the ring added background the model ranks above some test records. " +
	"The steps add up to the change from the first to the last extent, so when steps go both ways one step can exceed the whole change (a share above 100%) while another is negative."

// ringsFigure draws one waterfall per chain and model.
func ringsFigure(r *Results) (figure, bool) {
	s := r.Sensitivity
	var chains []string
	seen := map[string]bool{}
	maxRows := 0
	for i := range s.Chains {
		c := &s.Chains[i]
		if len(c.Members) < 2 {
			continue
		}
		if !seen[c.Chain] {
			seen[c.Chain] = true
			chains = append(chains, c.Chain)
		}
		maxRows = max(maxRows, len(c.Steps)+2)
	}
	if len(chains) == 0 {
		return figure{}, false
	}
	models := s.ModelNames
	cols := max(1, min(len(models), 3))
	f := figure{Name: "ring_steps", Title: "AUC step by step along each nested chain", W: twoColumns, Note: ringsNote}
	items := []legendItem{
		{"ring raises AUC", boxThumb{fill: stepUpColor}},
		{"ring lowers AUC", boxThumb{fill: stepDownColor}},
		{"test records that enter with the extent", boxThumb{fill: stepPointColor}},
		{"AUC on the first and last extent", glyphThumb{gs: draw.GlyphStyle{Color: ink, Radius: vg.Points(2.6), Shape: draw.CircleGlyph{}}}},
	}
	legend := legendRows(items, f.W)
	legendH := vg.Length(len(legend))*legendRowHeight + vg.Points(4)
	note := wrapText(f.Note, minFontPt, f.W-vg.Points(8))
	noteH := textStyle(minFontPt).Height(note) + vg.Points(6)
	panelH := vg.Length(maxRows)*vg.Points(12) + vg.Points(52)
	type row struct {
		chain  string
		panels []*ChainSummary
	}
	var rows []row
	for _, ch := range chains {
		for start := 0; start < len(models); start += cols {
			rw := row{chain: ch, panels: make([]*ChainSummary, cols)}
			for k := 0; k < cols && start+k < len(models); k++ {
				for q := range s.Chains {
					c := &s.Chains[q]
					if c.Chain == ch && c.Model == models[start+k] && len(c.Members) >= 2 {
						rw.panels[k] = c
					}
				}
			}
			rows = append(rows, rw)
		}
	}
	f.H = min(maxHeight, legendH+noteH+vg.Length(len(rows))*panelH)
	f.Caption = "Waterfall of the AUC along each nested chain, one panel per chain and model: the dot at the top is the AUC on the chain's smallest extent, " +
		"each bar one step to the next larger extent (a ring of new background, or test records that first fall inside), the dot at the bottom the AUC on the largest extent. " +
		"All AUCs use the test records inside each extent."
	panelW := f.W / vg.Length(cols)
	// Widest row name and widest label beside a bar, for the x ranges.
	var rowLabelW, labelW vg.Length
	for _, rw := range rows {
		for _, cs := range rw.panels {
			if cs == nil {
				continue
			}
			for _, l := range (waterfall{cs: cs}).rowLabels() {
				rowLabelW = max(rowLabelW, textWidth(l, minFontPt))
			}
		}
	}
	labelW = max(textWidth("ring AUC 0.000", minFontPt), textWidth("new test records", minFontPt))
	f.draw = func(dc draw.Canvas) error {
		noteC, rest := splitBottom(dc, noteH)
		sty := textStyle(minFontPt)
		sty.YAlign = draw.YTop
		noteC.FillText(sty, vg.Point{X: noteC.Min.X + vg.Points(4), Y: noteC.Max.Y - vg.Points(2)}, note)
		legC, rest := splitBottom(rest, legendH)
		drawLegendRows(legC, legend)
		plots := make([][]*plot.Plot, len(rows))
		for j, rw := range rows {
			plots[j] = make([]*plot.Plot, cols)
			for k, cs := range rw.panels {
				if cs == nil {
					continue
				}
				wf := waterfall{cs: cs}
				p := newPlot(fmt.Sprintf("chain %s, model %s", cs.Chain, cs.Model), panelW-vg.Points(20))
				p.Add(wf)
				names := wf.rowLabels()
				for a, b := 0, len(names)-1; a < b; a, b = a+1, b-1 {
					names[a], names[b] = names[b], names[a]
				}
				p.NominalY(names...) // NominalY counts from the bottom
				if k > 0 {
					// Rows are named once per chain, in the first column.
					var ts []plot.Tick
					for i := range wf.rows() {
						ts = append(ts, plot.Tick{Value: float64(i)})
					}
					p.Y.Tick.Marker = plot.ConstantTicks(ts)
				}
				xmin, xmax, _, _ := wf.DataRange()
				if xmax-xmin < 0.02 {
					mid := (xmin + xmax) / 2
					xmin, xmax = mid-0.01, mid+0.01
				}
				// Room on the right for the labels beside the bars.
				dataW := panelW - vg.Points(24)
				if k == 0 {
					dataW -= rowLabelW
				}
				frac := math.Min(0.6, float64(labelW+vg.Points(6))/float64(dataW))
				lo := xmin - 0.04*(xmax-xmin)
				hi := lo + (xmax-lo)/(1-frac)
				step, _ := niceStepN(lo, hi, 4)
				p.X.Min, p.X.Max = math.Floor(lo/step+1e-9)*step, math.Ceil(hi/step-1e-9)*step
				p.X.Tick.Marker = niceTicks{N: 4}
				p.X.Label.Text = "AUC"
				p.Y.Min, p.Y.Max = -0.5, float64(wf.rows())-0.5
				plots[j][k] = p
			}
		}
		drawTiles(plots, rest)
		return nil
	}
	return f, true
}
