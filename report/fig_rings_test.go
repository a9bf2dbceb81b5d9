package report

import (
	"fmt"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
	"gonum.org/v1/plot/vg/recorder"
)

// syntheticWaterfall is a chain of the given number of rows (at least
// two: start and end) for the given number of models, with long extent
// names and ring and test-record steps in turn.
func syntheticWaterfall(chain string, rows, models int, firstModel int) *chainWaterfall {
	var members []string
	for i := range rows - 1 {
		members = append(members, fmt.Sprintf("%s_minus%dkm", chain, 10*(rows-i)))
	}
	if rows%7 == 3 {
		// An ID far longer than the room for row names.
		members[len(members)-1] = strings.Repeat("very_long_extent_identifier_", 6) + chain
	}
	var steps []ChainStep
	for i := 1; i < rows-1; i++ {
		kind := StepRing
		if i%2 == 1 {
			kind = "test"
		}
		steps = append(steps, ChainStep{Kind: kind, Inner: members[max(0, i-1)], Outer: members[min(len(members)-1, i)],
			AUCInner: 0.6 + 0.001*float64(i), AUCOuter: 0.6 + 0.001*float64(i+1), AUCRing: 0.9, AUCRingDefined: i%4 != 0})
	}
	w := &chainWaterfall{steps: steps}
	for k := range models {
		cs := &ChainSummary{Chain: chain, Model: fmt.Sprintf("m%d", firstModel+k), Members: members, StartAUC: 0.6, EndAUC: 0.7, Steps: steps}
		w.cs = append(w.cs, cs)
		w.models = append(w.models, firstModel+k)
		w.marks = append(w.marks, markerStyle(firstModel+k))
	}
	return w
}

// TestRingPagesFit lays out the ring_steps pages for chains of 2 to 80
// rows and 1 to 6 models (each case with a second, one-model panel, as a
// null's) and checks what the figure draws: every row of every chain on
// exactly one page, in order; no page taller than maxHeight; rows at
// least ringMinPitch label heights apart; no two texts beside the panels
// (row names on the left, kind and values on the right, the models'
// markers heading their columns) overlapping each other or any data area;
// every text within the page.
func TestRingPagesFit(t *testing.T) {
	minPitch := ringMinPitch * ringLabelH()
	for models := 1; models <= 6; models++ {
		for rows := 2; rows <= 80; rows++ {
			panels := []*chainWaterfall{syntheticWaterfall("region", rows, models, 0), syntheticWaterfall("points", max(2, rows/2), 1, models)}
			legendH, noteH := 2*legendRowHeight+vg.Points(4), vg.Points(60)
			l := newRingLayout(panels, models+1, legendH, noteH)
			name := fmt.Sprintf("%d models, %d rows", models, rows)
			next := map[*chainWaterfall]int{}
			for pi, pg := range l.pages {
				h := l.height(pi)
				need := l.legendH + pg.h + vg.Points(3)
				if pi == 0 {
					need += noteH
				}
				if need > maxHeight+1e-9 {
					t.Fatalf("%s: page %d needs %.1f pt, more than %.1f", name, pi+1, need.Points(), maxHeight.Points())
				}
				page := draw.Canvas{Rectangle: vg.Rectangle{Max: vg.Point{X: twoColumns, Y: h}}}
				rest := page
				if pi == 0 {
					_, rest = splitBottom(rest, noteH)
				}
				_, rest = splitBottom(rest, legendH)
				placed := l.place(pi, rest)
				var boxes []vg.Rectangle
				var what []string
				for _, pl := range placed {
					sg := pl.seg
					if sg.from != next[sg.w] || sg.to <= sg.from {
						t.Fatalf("%s: page %d holds rows %d to %d of chain %s, want from %d", name, pi+1, sg.from, sg.to, sg.w.cs[0].Chain, next[sg.w])
					}
					next[sg.w] = sg.to
					if pl.c.Min.Y < rest.Min.Y-1e-6 {
						t.Errorf("%s: page %d: panel reaches %.1f pt into the legend", name, pi+1, (rest.Min.Y - pl.c.Min.Y).Points())
					}
					if p := (pl.da.Max.Y - pl.da.Min.Y) / vg.Length(sg.rows()); p < minPitch-1e-6 {
						t.Errorf("%s: page %d: rows %.2f pt apart, below %.2f", name, pi+1, p.Points(), minPitch.Points())
					}
					ts := ringTexts(sg, pl.da, l.rc)
					for q := 1; q < len(ts); q++ {
						if d := ts[q-1].y - ts[q].y; d > 0 && d < minPitch-1e-6 {
							t.Errorf("%s: texts %q and %q %.2f pt apart", name, ts[q-1].s, ts[q].s, d.Points())
						}
					}
					for _, tx := range ts {
						boxes, what = append(boxes, tx.box()), append(what, tx.s)
					}
					for k := range sg.w.cs {
						c := ringHeader(pl.da, l.rc, k)
						r := vg.Points(2.4)
						boxes = append(boxes, vg.Rectangle{Min: vg.Point{X: c.X - r, Y: c.Y - r}, Max: vg.Point{X: c.X + r, Y: c.Y + r}})
						what = append(what, fmt.Sprintf("marker of model %d", k))
					}
				}
				for i, b := range boxes {
					if b.Min.X < -1e-6 || b.Max.X > twoColumns+1e-6 || b.Min.Y < -1e-6 || b.Max.Y > h+1e-6 {
						t.Errorf("%s: page %d: %q runs outside the page", name, pi+1, what[i])
					}
					for _, pl := range placed {
						if overlaps(b, pl.da) {
							t.Errorf("%s: page %d: %q overlaps a data area", name, pi+1, what[i])
						}
					}
					for j := range i {
						if overlaps(b, boxes[j]) {
							t.Errorf("%s: page %d: %q overlaps %q", name, pi+1, what[i], what[j])
						}
					}
				}
				if t.Failed() {
					return
				}
			}
			for _, w := range panels {
				if next[w] != w.rows() {
					t.Fatalf("%s: chain %s drawn to row %d of %d", name, w.cs[0].Chain, next[w], w.rows())
				}
			}
			if rows <= 20 && models <= 2 && len(l.pages) != 1 {
				t.Errorf("%s: %d pages, want 1", name, len(l.pages))
			}
		}
	}
}

// overlaps reports whether two rectangles share more than an edge.
func overlaps(a, b vg.Rectangle) bool {
	const eps = 1e-6
	return a.Min.X < b.Max.X-eps && b.Min.X < a.Max.X-eps && a.Min.Y < b.Max.Y-eps && b.Min.Y < a.Max.Y-eps
}

// TestRingPagesSplit checks the page break rules: a chain that fits on an
// empty page is not split, a split leaves at least ringMinPieceRows rows
// on the page it starts on, and the pages are named ring_steps,
// ring_steps_2, ...
func TestRingPagesSplit(t *testing.T) {
	chrome := func(ringSeg) vg.Length { return vg.Points(40) }
	pitch := ringRowPitch(2)
	avail := 40 + 20*pitch // one empty page holds 20 rows of a two-model chain
	a, b := syntheticWaterfall("a", 12, 2, 0), syntheticWaterfall("b", 15, 2, 0)
	pages := layoutRingPages([]*chainWaterfall{a, b}, avail, chrome)
	if len(pages) != 2 || len(pages[0].segs) != 1 || pages[1].segs[0].w != b || pages[1].segs[0].rows() != 15 {
		t.Errorf("two chains of 12 and 15 rows, 20 to a page: got %d pages", len(pages))
	}
	long := syntheticWaterfall("long", 50, 2, 0)
	pages = layoutRingPages([]*chainWaterfall{a, long}, avail, chrome)
	// Page 1 holds a and a first piece of long (the piece's own title and
	// axis take a row's room and more), the next pages 20 rows each.
	total := 0
	for pi, pg := range pages {
		for _, sg := range pg.segs {
			if sg.w == long && sg.rows() < ringMinPieceRows && sg.to != long.rows() {
				t.Errorf("page %d: a piece of %d rows", pi+1, sg.rows())
			}
			if sg.w == long {
				total += sg.rows()
			}
		}
		if pg.h > avail+1e-9 {
			t.Errorf("page %d: %.1f pt, more than %.1f", pi+1, pg.h.Points(), avail.Points())
		}
	}
	if total != 50 {
		t.Errorf("long chain: %d of 50 rows drawn", total)
	}
	null := syntheticWaterfall("n", 3, 1, 0)
	null.models[0] = -1
	pages = layoutRingPages([]*chainWaterfall{a, null}, avail, chrome)
	if len(pages) != 2 || pages[1].segs[0].w != null {
		t.Errorf("a null's chain of 3 rows after a model's of 12, 20 to a page: %d pages, want the null on the second", len(pages))
	}
	if got := ringPageName(0) + " " + ringPageName(2); got != "ring_steps ring_steps_3" {
		t.Errorf("page names %q", got)
	}
}

// TestRemoveStalePages checks that a report with fewer ring_steps pages
// than an earlier one in the same folder removes the pages it no longer
// has, and only those.
func TestRemoveStalePages(t *testing.T) {
	dir := t.TempDir()
	names := []string{"ring_steps.png", "ring_steps_2.svg", "ring_steps_3.pdf", "ring_steps_03.png", "ring_steps_x.png", "roc_curves.png"}
	for _, n := range names {
		if err := os.WriteFile(filepath.Join(dir, n), nil, 0o644); err != nil {
			t.Fatal(err)
		}
	}
	if err := removeStalePages(dir, []figure{{Name: "ring_steps"}, {Name: "ring_steps_2"}}); err != nil {
		t.Fatal(err)
	}
	var left []string
	for _, n := range names {
		if _, err := os.Stat(filepath.Join(dir, n)); err == nil {
			left = append(left, n)
		}
	}
	if got := strings.Join(left, " "); got != "ring_steps.png ring_steps_2.svg ring_steps_03.png ring_steps_x.png roc_curves.png" {
		t.Errorf("left %s", got)
	}
}

// TestRingFigureSVG draws the ring_steps pages of a run with three models
// on a chain of 62 extents and a distance-only null, and checks the SVGs:
// pages named ring_steps, ring_steps_2, ...; each at most maxHeight tall;
// every text inside its page, none overlapping another (boxes from the
// font's ascent and descent, as in TestFigurePrintSizes), tick labels at
// their ticks; every row of the chains named on exactly one page; and the
// key of a page lists the models and the null only where that page
// draws them.
func TestRingFigureSVG(t *testing.T) {
	const rows = 62
	var chains []ChainSummary
	for k, w := range []*chainWaterfall{syntheticWaterfall("region", rows, 3, 0), syntheticWaterfall("points", 30, 1, 0)} {
		for _, cs := range w.cs {
			c := *cs
			if k == 1 {
				c.Model = "dnull"
			}
			chains = append(chains, c)
		}
	}
	r := &Results{
		Models:      []Model{{Name: "m0"}, {Name: "m1"}, {Name: "m2"}, {Name: "dnull", Role: RoleNull, NullKind: NullDistance}},
		Sensitivity: &Sensitivity{ModelNames: []string{"m0", "m1", "m2"}, Chains: chains},
	}
	fs := ringsFigures(r)
	if len(fs) < 2 {
		t.Fatalf("%d pages for %d rows of three models", len(fs), rows)
	}
	named := map[string]int{}
	nullKeys, modelKeys := 0, 0
	for pi, f := range fs {
		if f.Name != ringPageName(pi) {
			t.Errorf("page %d named %s", pi+1, f.Name)
		}
		if f.H > maxHeight {
			t.Errorf("%s: %.1f pt tall", f.Name, f.H.Points())
		}
		svg, err := render(f, "svg")
		if err != nil {
			t.Fatal(err)
		}
		probs, _ := checkAxisLabels(t, f.Name, svg)
		for _, p := range probs {
			t.Error(p)
		}
		texts, _ := parseSVG(t, svg)
		// The key lists a line only on the pages that draw it.
		key := map[string]int{}
		nullPanel, modelPanel := false, false
		for _, tx := range texts {
			key[tx.s]++
			if strings.HasPrefix(tx.s, "nested chain ") {
				if strings.Contains(tx.s, "null dnull") {
					nullPanel = true
				} else {
					modelPanel = true
				}
			}
		}
		nullKeys, modelKeys = nullKeys+key["dnull (distance-only null)"], modelKeys+key["model m0"]
		if nullPanel != (key["dnull (distance-only null)"] == 1) || modelPanel != (key["model m0"] == 1 && key["model m2"] == 1) {
			t.Errorf("%s: null panel %v, model panels %v, key: null %d, m0 %d, m2 %d", f.Name, nullPanel, modelPanel,
				key["dnull (distance-only null)"], key["model m0"], key["model m2"])
		}
		box := func(tx svgText) vg.Rectangle {
			return vg.Rectangle{Min: vg.Point{X: vg.Length(tx.x), Y: vg.Length(tx.y - 0.22*tx.size)}, Max: vg.Point{X: vg.Length(tx.x + tx.width()), Y: vg.Length(tx.y + 0.76*tx.size)}}
		}
		for i, tx := range texts {
			named[tx.s]++
			b := box(tx)
			if b.Min.X < -0.5 || b.Max.X > f.W+0.5 || b.Min.Y < -0.5 || b.Max.Y > f.H+0.5 {
				t.Errorf("%s: %q outside the %.0f x %.0f pt page", f.Name, tx.s, f.W.Points(), f.H.Points())
			}
			for _, o := range texts[:i] {
				if overlaps(b, box(o)) {
					t.Errorf("%s: %q at (%.1f, %.1f) overlaps %q at (%.1f, %.1f)", f.Name, tx.s, tx.x, tx.y, o.s, o.x, o.y)
				}
			}
		}
	}
	if nullKeys == 0 || modelKeys == 0 || nullKeys+modelKeys > len(fs) {
		t.Errorf("%d pages: the null in %d keys, the models in %d (each page holds one kind here)", len(fs), nullKeys, modelKeys)
	}
	w := syntheticWaterfall("region", rows, 3, 0)
	for i := range w.rows() {
		if n := named[w.rowLabel(i)]; n != 1 {
			t.Errorf("row %q named %d times", w.rowLabel(i), n)
		}
	}
}

// TestRingPagesSentence: a run with one short chain and the distance-only
// null has two waterfall pages only because the nulls' chains start a page
// of their own, yet the caption said the rows "do not fit one page"; and
// it printed the row pitch 1.25 as "1.2" (%.2g). The caption now says
// which pages hold the models' overflow and which the nulls' chains.
func TestRingPagesSentence(t *testing.T) {
	null := func(w *chainWaterfall) *chainWaterfall {
		for k := range w.models {
			w.models[k] = -1
		}
		return w
	}
	for _, tc := range []struct {
		rows       int
		withNull   bool
		want, dont []string
	}{
		{3, true, []string{"The nulls' chains are on a page of their own, ring_steps_2."}, []string{"do not fit"}},
		{3, false, nil, []string{"do not fit", "nulls"}},
		{200, true, []string{"at least 1.25 times the label height apart, do not fit one page: the chains continue in ring_steps_2", "The nulls' chains are on a page of their own, ring_steps_"}, nil},
	} {
		panels := []*chainWaterfall{syntheticWaterfall("region", tc.rows, 2, 0)}
		if tc.withNull {
			panels = append(panels, null(syntheticWaterfall("points", 3, 1, 2)))
		}
		l := newRingLayout(panels, 2, 2*legendRowHeight+vg.Points(4), vg.Points(60))
		got := ringPagesSentence(l.pages)
		for _, w := range tc.want {
			if !strings.Contains(got, w) {
				t.Errorf("%d rows, null %v, %d pages: %q lacks %q", tc.rows, tc.withNull, len(l.pages), got, w)
			}
		}
		for _, d := range tc.dont {
			if strings.Contains(got, d) {
				t.Errorf("%d rows, null %v, %d pages: %q says %q", tc.rows, tc.withNull, len(l.pages), got, d)
			}
		}
	}
}

// TestRingManyModelsSplit: with twelve models the value columns beside a
// ring_steps panel left its data area about 60 pt wide, and the AUC
// axis's tick labels were printed over each other (0.650.700.750.800.85;
// a study of twelve models). A chain's models are now split over panels
// whose data area keeps ringMinDataW: every model on exactly one panel
// of the chain, each text inside its page and clear of every other.
func TestRingManyModelsSplit(t *testing.T) {
	for _, models := range []int{6, 12, 20} {
		w := syntheticWaterfall("region", 6, models, 0)
		var chains []ChainSummary
		var names []string
		r := &Results{}
		for k, cs := range w.cs {
			chains = append(chains, *cs)
			names = append(names, cs.Model)
			r.Models = append(r.Models, Model{Name: fmt.Sprintf("m%d", k)})
		}
		r.Sensitivity = &Sensitivity{ModelNames: names, Chains: chains}
		fs := ringsFigures(r)
		if len(fs) == 0 {
			t.Fatalf("%d models: no figure", models)
		}
		seen := map[string]int{}
		for _, f := range fs {
			svg, err := render(f, "svg")
			if err != nil {
				t.Fatal(err)
			}
			name := fmt.Sprintf("%d models, %s", models, f.Name)
			checkTexts(t, name, svg)
			probs, _ := checkAxisLabels(t, name, svg)
			for _, p := range probs {
				t.Error(p)
			}
			texts, _ := parseSVG(t, svg)
			for _, tx := range texts {
				if strings.HasPrefix(tx.s, "model m") {
					seen[tx.s]++
				}
			}
		}
		for _, m := range names {
			if seen["model "+m] == 0 {
				t.Errorf("%d models: model %s in no key", models, m)
			}
		}
		split := strings.Contains(fs[0].Caption, "split over panels")
		if want := models > 6; split != want {
			t.Errorf("%d models: caption says split %v, want %v: %s", models, split, want, fs[0].Caption)
		}
	}
	// The split itself: as even as possible, in model order, numbered.
	w := syntheticWaterfall("region", 4, 12, 0)
	parts := splitWide([]*chainWaterfall{w}, 7)
	if len(parts) != 2 || len(parts[0].cs) != 6 || len(parts[1].cs) != 6 || parts[1].models[0] != 6 || parts[1].part != 2 || parts[1].parts != 2 {
		t.Fatalf("12 models at 7 a panel: %d parts", len(parts))
	}
	if got := (ringSeg{w: parts[1], to: parts[1].rows()}).title(12); got != "nested chain region, 6 of 12 models (part 2 of 2)" {
		t.Errorf("title %q", got)
	}
}

// TestShortDashedArrow: a step of test records is drawn dashed (2.5 pt
// dashes, 1.5 pt gaps) and a ring solid, but a short step's shaft held one
// dash and read as solid (six models on the demo: steps of 0.04 AUC). A
// dashed shaft now holds at least two periods of its pattern, however
// short, down to dashes and gaps of 0.5 pt.
func TestShortDashedArrow(t *testing.T) {
	dashed := []vg.Length{vg.Points(2.5), vg.Points(1.5)}
	for _, shaft := range []vg.Length{2, 3.6, 6, 9, 12, 40} {
		got := arrowDashes(dashed, shaft)
		var period vg.Length
		for _, l := range got {
			period += l
			if l < vg.Points(0.5)-1e-9 {
				t.Errorf("shaft %.1f pt: dash or gap %.2f pt, below 0.5", shaft.Points(), l.Points())
			}
		}
		if 2*period > shaft && period > vg.Points(1.0)+1e-9 {
			t.Errorf("shaft %.1f pt: pattern %v (period %.2f pt) shows fewer than two dashes", shaft.Points(), got, period.Points())
		}
		if shaft >= 12 && (got[0] != dashed[0] || got[1] != dashed[1]) {
			t.Errorf("shaft %.1f pt: a long shaft's pattern changed to %v", shaft.Points(), got)
		}
	}
	if got := arrowDashes(nil, 3); got != nil {
		t.Errorf("solid arrow given dashes %v", got)
	}
	// As drawn: a step of 10 pt (a shaft of 6.8 pt) of test records.
	rec := &recorder.Canvas{}
	drawArrow(draw.NewCanvas(rec, 100, 20), lineStyle(ink, 1.4, dashed), 10, 20, 10)
	for _, a := range rec.Actions {
		if sd, ok := a.(*recorder.SetLineDash); ok && len(sd.Dashes) > 0 {
			if period := sd.Dashes[0] + sd.Dashes[1]; 2*period > 6.8 {
				t.Errorf("10 pt step: shaft dashed %v, fewer than two dashes in 6.8 pt", sd.Dashes)
			}
		}
	}
}

// TestRingCaptionNamesSkippedStart: a chain starts at its first member
// where the model is scored, so a study whose base region holds no test
// point (a region drawn away from the records) drew its region chain from
// region_100km down, with base and region_minus50km gone and no word of
// why. The caption now names the members left out. In the sample, the
// region chain's base unscored for every model starts the chain at
// region_b50.
func TestRingCaptionNamesSkippedStart(t *testing.T) {
	r := loadSample(t)
	for i := range r.Scores {
		if r.Scores[i].Extent == "base" {
			r.Scores[i] = Score{Model: r.Scores[i].Model, Extent: "base", NotScored: "no test points inside this extent"}
		}
	}
	if err := Analyze(r); err != nil {
		t.Fatal(err)
	}
	figs := ringsFigures(r)
	if len(figs) == 0 {
		t.Fatal("no waterfall")
	}
	want := "Chain region starts at region_b50 for good, truncated and broad: its smaller member base has no AUC there"
	if !strings.Contains(figs[0].Caption, want) {
		t.Errorf("caption lacks %q:\n%s", want, figs[0].Caption)
	}
	// With every member scored, no such sentence.
	full := analyzedSample(t)
	if c := ringsFigures(full)[0].Caption; strings.Contains(c, " starts at ") {
		t.Errorf("caption of the full sample names a skipped start: %s", c)
	}
}
