package report

import (
	"bytes"
	"fmt"
	"image/color"
	"math"
	"math/rand/v2"
	"os"
	"path/filepath"
	"regexp"
	"runtime"
	"strconv"
	"strings"
	"testing"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
	"gonum.org/v1/plot/vg/vgsvg"

	"areasweep/extent/vocab"
)

// manyExtents returns the test sample with its extents replaced by a
// family of about n, as the run writes them: the base region, region
// buffers alternately outside and inside it (20 km steps) and the whole
// raster in chain "region"; point buffers (25 km steps) in chain
// "points"; the hull and, past 200 extents, 8 user extents in no chain.
// Each extent's preview mask is a disc growing with its distance (the
// region buffers' radius 12 cells times exp(d / 800 km), never empty), so
// the outlines are nested as a chain's.
func manyExtents(t testing.TB, n int) *Results {
	t.Helper()
	r := loadSample(t)
	pv := r.Preview
	w, h := pv.Width, pv.Height
	var masks [][]bool
	disc := func(rad float64) []bool {
		m := make([]bool, w*h)
		for y := range h {
			for x := range w {
				dx, dy := float64(x)+0.5-float64(w)/2, float64(y)+0.5-float64(h)/2
				m[y*w+x] = dx*dx+dy*dy <= rad*rad
			}
		}
		return m
	}
	add := func(e Extent, m []bool) {
		e.Status = vocab.StatusOK
		e.AreaKm2 = 0
		for _, in := range m {
			if in {
				e.AreaKm2 += 100
			}
		}
		r.Extents = append(r.Extents, e)
		masks = append(masks, m)
	}
	r.Extents = nil
	user := 0
	if n > 200 {
		user = 8
	}
	nRegion := (n - 3 - user) / 2
	nPoints := n - 3 - user - nRegion
	add(Extent{ID: "base", Kind: vocab.KindBase, Params: "file=region.geojson", Chain: "region"}, disc(12))
	var region []float64
	for i := range nRegion {
		k := i/2 + 1
		d := 20 * float64(k)
		if i%2 == 1 {
			d = -d
		}
		region = append(region, d)
	}
	for _, d := range region {
		add(Extent{ID: fmt.Sprintf("region_%gkm", d), Kind: vocab.KindRegionBuffer, Params: fmt.Sprintf("d_km=%g", d), Chain: "region"},
			disc(12*math.Exp(d/800)))
	}
	add(Extent{ID: "whole_raster", Kind: vocab.KindWholeRaster, Params: "all valid cells", Chain: "region"}, disc(1e9))
	for i := range nPoints {
		d := 25 * float64(i+1)
		add(Extent{ID: fmt.Sprintf("points_%gkm", d), Kind: vocab.KindPointBuffer, Params: fmt.Sprintf("d_km=%g; around=training points", d), Chain: "points"},
			disc(2+d/60))
	}
	add(Extent{ID: "hull", Kind: vocab.KindHull, Params: "convex hull of training points"}, disc(9))
	for i := range user {
		add(Extent{ID: fmt.Sprintf("user_%d", i), Kind: vocab.KindUser, Params: "file=mine.gpkg"}, disc(3+float64(i)))
	}
	// Chains are ordered by area, as the family is.
	vals := make([]float64, w*h)
	for i := range vals {
		vals[i] = float64(i%w) / float64(w)
	}
	r.Preview = NewPreview(w, h, pv.Bounds, vals, 0, 1, masks)
	return r
}

// TestMapKeyAnyNumber checks the maps' rule at 13 to 256 extents: one panel
// per chain plus one for the extents in no chain (none left off the page),
// a key of at most the two anchors, maxNamed names and one colour bar,
// never taller than that whatever the number of extents; the base and
// the whole raster in their own styles, which no other outline shares; no
// two named outlines alike; buffers on the ramp in order of distance,
// at most maxRampOutlines drawn, the first and last always.
func TestMapKeyAnyNumber(t *testing.T) {
	for _, n := range []int{13, 60, 120, 256} {
		t.Run(fmt.Sprint(n), func(t *testing.T) {
			r := manyExtents(t, n)
			gs := mapGroups(r)
			if len(gs) != 3 {
				t.Fatalf("%d extents in %d panels, want 3 (region, points, no chain)", len(r.Extents), len(gs))
			}
			keyMax := 2*legendRowHeight + rampKeyH + vg.Points(4)
			baseLS, _ := anchorStyle(vocab.KindBase)
			wholeLS, _ := anchorStyle(vocab.KindWholeRaster)
			for _, g := range gs {
				k := mapKeyOf(r, g)
				if len(k.named) > 2+maxNamed {
					t.Errorf("%s: %d names in the key", g.title, len(k.named))
				}
				if h := k.keyHeight(60 * vg.Millimeter); h > keyMax {
					t.Errorf("%s: key %.1f mm tall, more than %.1f mm", g.title, h/vg.Millimeter, keyMax/vg.Millimeter)
				}
				type look struct {
					c    color.Color
					dash string
				}
				seen := map[look]string{}
				for _, it := range k.named {
					ls := it.thumb.(lineThumb).ls
					l := look{ls.Color, fmt.Sprint(ls.Dashes)}
					if prev, ok := seen[l]; ok {
						t.Errorf("%s: %s and %s drawn alike", g.title, prev, it.label)
					}
					seen[l] = it.label
				}
				drawn := map[int]bool{}
				for _, q := range k.order {
					drawn[q] = true
				}
				for q, ei := range g.members {
					e := r.Extents[ei]
					ls := k.styles[q]
					switch e.Kind {
					case vocab.KindBase:
						if !sameLine(ls, baseLS) || !drawn[q] {
							t.Errorf("%s: base drawn %v (drawn %v)", g.title, ls, drawn[q])
						}
						continue
					case vocab.KindWholeRaster:
						if !sameLine(ls, wholeLS) || !drawn[q] {
							t.Errorf("%s: whole raster drawn %v (drawn %v)", g.title, ls, drawn[q])
						}
						continue
					}
					if ls.Color == baseLS.Color || ls.Color == wholeLS.Color {
						t.Errorf("%s: %s in an anchor's colour", g.title, e.ID)
					}
				}
				if k.ramp == nil {
					continue
				}
				if len(k.ramp.marks) > maxRampOutlines || len(k.ramp.marks)+k.thinned+len(k.named) != len(g.members) {
					t.Errorf("%s: %d outlines on the ramp, %d thinned, %d named, of %d members", g.title, len(k.ramp.marks), k.thinned, len(k.named), len(g.members))
				}
				for i := 1; i < len(k.ramp.marks); i++ {
					if k.ramp.marks[i] < k.ramp.marks[i-1] {
						t.Errorf("%s: ramp values %v not in order", g.title, k.ramp.marks)
						break
					}
				}
				if m := k.ramp.marks; m[0] != k.ramp.lo || m[len(m)-1] != k.ramp.hi {
					t.Errorf("%s: drawn %g..%g, ramp %g..%g", g.title, m[0], m[len(m)-1], k.ramp.lo, k.ramp.hi)
				}
			}
			if f, _ := mapFigure(r); strings.Contains(f.Caption, "do not fit") {
				t.Errorf("panels left out: %s", f.Caption)
			}
		})
	}
}

func sameLine(a, b draw.LineStyle) bool {
	return a.Color == b.Color && a.Width == b.Width && fmt.Sprint(a.Dashes) == fmt.Sprint(b.Dashes)
}

// TestRampDrawn checks which outlines of a ramp are drawn: every one up
// to maxRampOutlines, else at most that many, evenly spaced, first and
// last included.
func TestRampDrawn(t *testing.T) {
	for n := 1; n <= 300; n++ {
		d := rampDrawn(n)
		if n <= maxRampOutlines && len(d) != n {
			t.Fatalf("n=%d: %d drawn", n, len(d))
		}
		if len(d) > maxRampOutlines || d[0] != 0 || d[len(d)-1] != n-1 {
			t.Fatalf("n=%d: drawn %v", n, d)
		}
		for i := 2; i < len(d)-1; i++ {
			if d[i]-d[i-1] != d[1]-d[0] {
				t.Fatalf("n=%d: uneven steps %v", n, d)
			}
		}
	}
}

// textBox is the box of a text of a gonum SVG: left edge, baseline.
func textBox(tx svgText) vg.Rectangle {
	return vg.Rectangle{Min: vg.Point{X: vg.Length(tx.x), Y: vg.Length(tx.y - 0.22*tx.size)},
		Max: vg.Point{X: vg.Length(tx.x + tx.width()), Y: vg.Length(tx.y + 0.72*tx.size)}}
}

// TestManyExtentFiguresSVG draws the maps of a 120-extent family and
// checks in the SVGs that every text is inside the
// canvas and no two texts overlap (keys, colour bars, tick labels,
// titles), and that the maps' keys name the anchors and carry a colour
// bar per chain.
func TestManyExtentFiguresSVG(t *testing.T) {
	for _, n := range []int{120, 256} {
		r := manyExtents(t, n)
		f, svg := checkedMapSVG(t, r, fmt.Sprintf("maps of %d extents", n))
		texts, _ := parseSVG(t, svg)
		count := map[string]int{}
		for _, tx := range texts {
			count[tx.s]++
		}
		// At 256 the eight user extents and the hull share the panel of
		// extents in no chain, more than maxNamed: an area bar, in 1000
		// km² as the other area axes (2,600 to 31,200 km²; the bar was
		// labelled in km², "20000", before areaAxis set its unit), and
		// names only for the hull and user_6, discs of one radius and so
		// of one area and colour (twins, told apart by dash).
		hull, user6, areaBars := 1, 0, 0
		if n > 200 {
			user6, areaBars = 1, 1
		}
		if count["base"] != 1 || count["whole_raster"] != 1 || count["hull"] != hull || count["user_6"] != user6 || count["user_5"] != 0 ||
			count["buffer distance (km)"] != 2 || count["extent area (1000 km²)"] != areaBars {
			t.Errorf("%d extents: keys: base %d, whole_raster %d, hull %d, user_6 %d, user_5 %d, distance bars %d, area bars %d", n,
				count["base"], count["whole_raster"], count["hull"], count["user_6"], count["user_5"], count["buffer distance (km)"], count["extent area (1000 km²)"])
		}
		if !strings.Contains(f.Caption, "are not drawn here") {
			t.Errorf("%d extents: caption does not say that outlines were thinned: %s", n, f.Caption)
		}
	}
}

// checkTexts fails when a text of svg lies outside the canvas or overlaps
// another.
func checkTexts(t *testing.T, name string, svg []byte) {
	t.Helper()
	m := reSize.FindSubmatch(svg)
	if m == nil {
		t.Fatalf("%s: no size", name)
	}
	W, H := atof(t, string(m[3])), atof(t, string(m[4]))
	texts, _ := parseSVG(t, svg)
	if len(texts) < 10 {
		t.Fatalf("%s: %d texts", name, len(texts))
	}
	boxes := make([]vg.Rectangle, len(texts))
	for i, tx := range texts {
		boxes[i] = textBox(tx)
		b := boxes[i]
		// parseSVG gives y up from the bottom, as the paths'.
		if b.Min.X < 0 || float64(b.Max.X) > W || b.Min.Y < 0 || float64(b.Max.Y) > H {
			t.Errorf("%s: text %q at (%.1f, %.1f) outside the %.0f x %.0f canvas", name, tx.s, tx.x, tx.y, W, H)
		}
	}
	for i := range boxes {
		for j := i + 1; j < len(boxes); j++ {
			if overlaps(boxes[i], boxes[j]) {
				t.Errorf("%s: texts %q and %q overlap", name, texts[i].s, texts[j].s)
			}
		}
	}
}

// TestROCShown checks the ROC panels' thinning: every extent up to
// rocMaxCurves; past that the base, the whole raster and the smallest,
// middle and largest member of each chain and of the extents in no chain,
// which span the whole range of areas, and the caption says so.
func TestROCShown(t *testing.T) {
	for _, n := range []int{10, 13, 16, 17, 60, 256} {
		r := scoredEverywhere(manyExtents(t, n))
		es := rocExtents(r)
		shown, thinned := rocShown(es)
		if len(es) <= rocMaxCurves {
			if thinned || len(shown) != len(es) {
				t.Errorf("n=%d: %d of %d shown (thinned %v)", n, len(shown), len(es), thinned)
			}
			continue
		}
		ids := map[string]bool{}
		for _, e := range shown {
			ids[e.ID] = true
		}
		chains := map[string][]Extent{}
		for _, e := range es {
			if e.Kind != vocab.KindBase && e.Kind != vocab.KindWholeRaster {
				chains[e.Chain] = append(chains[e.Chain], e)
			}
		}
		want := 2
		for _, m := range chains {
			want += min(3, len(m))
		}
		if !thinned || len(shown) != want || !ids["base"] || !ids["whole_raster"] {
			t.Errorf("n=%d: %d shown for %d chains (thinned %v): %v", n, len(shown), len(chains), thinned, ids)
		}
		for ch, m := range chains {
			if !ids[m[0].ID] || !ids[m[len(m)-1].ID] || !ids[m[len(m)/2].ID] {
				t.Errorf("n=%d: chain %q: ends or middle missing", n, ch)
			}
		}
		if shown[0].AreaKm2 != es[0].AreaKm2 || shown[len(shown)-1].AreaKm2 != es[len(es)-1].AreaKm2 {
			t.Errorf("n=%d: shown areas %g..%g of %g..%g", n, shown[0].AreaKm2, shown[len(shown)-1].AreaKm2, es[0].AreaKm2, es[len(es)-1].AreaKm2)
		}
		if f := rocFigure(analyzedSampleWith(t, r)); !strings.Contains(f.Caption, fmt.Sprintf("each panel draws %d", len(shown))) ||
			!strings.Contains(f.Caption, "base region (solid magenta) and the whole raster (dashed red)") {
			t.Errorf("n=%d: caption %q", n, f.Caption)
		}
		for _, k := range []vocab.Kind{vocab.KindBase, vocab.KindWholeRaster} {
			rs, _ := rocAnchorStyle(k)
			ms, _ := anchorStyle(k)
			if rs.Color != ms.Color || fmt.Sprint(rs.Dashes) != fmt.Sprint(ms.Dashes) {
				t.Errorf("%s: ROC curve %v, map outline %v", k, rs, ms)
			}
		}
	}
}

// analyzedSampleWith is r with the sample's sensitivity analysis, enough
// for the figures' captions.
func analyzedSampleWith(t *testing.T, r *Results) *Results {
	t.Helper()
	r.Sensitivity = analyzedSample(t).Sensitivity
	return r
}

// TestChainLines: a line joins the points of one chain only, in order of
// area, and points in no chain or alone in their chain have none.
func TestChainLines(t *testing.T) {
	xys := plotter.XYs{{X: 1, Y: 0}, {X: 2, Y: 9}, {X: 3, Y: 1}, {X: 4, Y: 5}, {X: 5, Y: 9}, {X: 6, Y: 2}, {X: 7, Y: 3}}
	chains := []string{"a", "b", "a", "", "b", "a", "c"}
	lines := chainLines(xys, chains)
	want := []plotter.XYs{{{X: 1, Y: 0}, {X: 3, Y: 1}, {X: 6, Y: 2}}, {{X: 2, Y: 9}, {X: 5, Y: 9}}}
	if fmt.Sprint(lines) != fmt.Sprint(want) {
		t.Errorf("lines %v, want %v", lines, want)
	}
}

// TestNullKeepsItsStyle draws a scores panel of 120 extents for two
// models and a null and checks that the null is still drawn as the
// reference (grey dotted line, open grey circles, no bars) and that no
// model line takes its grey or its dots; markers shrink with the number
// of points but never below half size.
func TestNullKeepsItsStyle(t *testing.T) {
	const n = 120
	pn := metricPanel{m: MetricInfo{Kind: MetricAUC, Label: "AUC"}, pts: make([][]metricPoint, 2)}
	var nullXY plotter.XYs
	var nullCh []string
	for k := range n {
		area := 1000 * math.Pow(1.03, float64(k))
		ch := []string{"region", "points"}[k%2]
		for i := range pn.pts {
			v := 0.6 + 0.002*float64(k) + 0.01*float64(i)
			pn.pts[i] = append(pn.pts[i], metricPoint{area: area, v: v, lo: v - 0.02, hi: v + 0.02, bar: true, chain: ch})
		}
		nullXY = append(nullXY, plotter.XY{X: area, Y: 0.5 + 0.002*float64(k)})
		nullCh = append(nullCh, ch)
	}
	pn.nulls, pn.nullChains = []plotter.XYs{nullXY}, [][]string{nullCh}
	p, err := pn.plot(50*vg.Millimeter, 1, "extent area (km²)")
	if err != nil {
		t.Fatal(err)
	}
	c := vgsvg.New(60*vg.Millimeter, 50*vg.Millimeter)
	p.Draw(draw.New(c))
	var buf bytes.Buffer
	if _, err := c.WriteTo(&buf); err != nil {
		t.Fatal(err)
	}
	svg := buf.String()
	ls, gs := nullLineStyle(0)
	grey := svgColor(ls.Color)
	nullLine := fmt.Sprintf("stroke:%s;stroke-width:%g;stroke-dasharray:%g,%g", grey, ls.Width.Points(), ls.Dashes[0].Points(), ls.Dashes[1].Points())
	if got := strings.Count(svg, nullLine); got != 2 {
		t.Errorf("%d null lines (one per chain), want 2", got)
	}
	for i := range 256 {
		mc := modelColor(i)
		if svgColor(mc) == grey {
			t.Errorf("model %d drawn in the null's grey", i)
		}
		if r, g, b, _ := mc.RGBA(); r == g && g == b {
			t.Errorf("model %d drawn in a grey", i)
		}
	}
	// Every stroke in the null's grey is its dotted line or its open
	// circles (stroked, never filled, never a bar).
	re := regexp.MustCompile(`style="([^"]*stroke:` + grey + `[^"]*)"`)
	for _, m := range re.FindAllStringSubmatch(svg, -1) {
		if !strings.Contains(m[1], "fill:none") {
			t.Errorf("null drawn filled: %s", m[1])
		}
	}
	if s := markerScale(n); s != 0.5 || markerScale(13) != 1 || !(markerScale(40) < 1 && markerScale(40) > 0.5) {
		t.Errorf("marker scale %g at %d points", s, n)
	}
	if gs.Shape != (draw.RingGlyph{}) {
		t.Errorf("null marker %T, want an open circle", gs.Shape)
	}
}

// svgColor is c as gonum's SVG writes a stroke colour.
func svgColor(c color.Color) string {
	r, g, b, _ := c.RGBA()
	return fmt.Sprintf("#%02X%02X%02X", r>>8, g>>8, b>>8)
}

// TestFiguresSameOnAnyCoreCount writes the sample's report with one core
// and with three and compares every figure file and the page byte for
// byte (the PNGs' sprite caches, the renderings' order and the reused
// buffers must not show in the files).
func TestFiguresSameOnAnyCoreCount(t *testing.T) {
	r := analyzedSample(t)
	write := func(procs int) string {
		defer runtime.GOMAXPROCS(runtime.GOMAXPROCS(procs))
		dir := t.TempDir()
		if err := Write(dir, r); err != nil {
			t.Fatal(err)
		}
		return dir
	}
	one, three := write(1), write(3)
	files, err := filepath.Glob(filepath.Join(one, "figures", "*"))
	if err != nil || len(files) < 12 {
		t.Fatalf("%d figure files (%v)", len(files), err)
	}
	for _, f := range append(files, filepath.Join(one, "report.html")) {
		rel, _ := filepath.Rel(one, f)
		a, errA := os.ReadFile(f)
		b, errB := os.ReadFile(filepath.Join(three, rel))
		if errA != nil || errB != nil || !bytes.Equal(a, b) {
			t.Errorf("%s differs between 1 and 3 cores (%v, %v)", rel, errA, errB)
		}
	}
}

// TestCutCorners checks the outlines' smoothing: a staircase of single
// cells becomes one diagonal, and on the boundaries of random masks every
// point of a smoothed line lies on the original line, closed lines stay
// closed, open ones keep their ends, and every corner of the original is
// within 0.36 cell (sqrt(2)/4, by construction) of the smoothed line.
func TestCutCorners(t *testing.T) {
	stairs := [][2]float64{{0, 0}, {1, 0}, {1, 1}, {2, 1}, {2, 2}, {3, 2}}
	if got, want := fmt.Sprint(cutCorners(stairs)), fmt.Sprint([][2]float64{{0, 0}, {0.5, 0}, {2.5, 2}, {3, 2}}); got != want {
		t.Errorf("staircase: %s, want %s", got, want)
	}
	onSeg := func(p, a, b [2]float64) bool {
		cross := (b[0]-a[0])*(p[1]-a[1]) - (b[1]-a[1])*(p[0]-a[0])
		return cross == 0 && p[0] >= math.Min(a[0], b[0]) && p[0] <= math.Max(a[0], b[0]) && p[1] >= math.Min(a[1], b[1]) && p[1] <= math.Max(a[1], b[1])
	}
	segDist := func(p, a, b [2]float64) float64 {
		dx, dy := b[0]-a[0], b[1]-a[1]
		u := math.Max(0, math.Min(1, ((p[0]-a[0])*dx+(p[1]-a[1])*dy)/(dx*dx+dy*dy)))
		return math.Hypot(a[0]+u*dx-p[0], a[1]+u*dy-p[1])
	}
	rng := rand.New(rand.NewPCG(11, 13))
	for trial := range 40 {
		const w, h = 30, 20
		m := make([]bool, w*h)
		for range 6 {
			cx, cy, r := rng.Float64()*w, rng.Float64()*h, 1+rng.Float64()*6
			for y := range h {
				for x := range w {
					if math.Hypot(float64(x)+0.5-cx, (float64(y)+0.5-cy)*1.3) <= r {
						m[y*w+x] = true
					}
				}
			}
		}
		for _, line := range edgeLines(maskEdges(m, w, h)) {
			orig := append([][2]float64(nil), line...)
			got := cutCorners(line)
			closed := orig[0] == orig[len(orig)-1] && len(orig) > 3
			if closed != (got[0] == got[len(got)-1]) || (!closed && (got[0] != orig[0] || got[len(got)-1] != orig[len(orig)-1])) {
				t.Fatalf("trial %d: ends %v..%v became %v..%v", trial, orig[0], orig[len(orig)-1], got[0], got[len(got)-1])
			}
			for _, p := range got {
				on := false
				for i := 1; i < len(orig) && !on; i++ {
					on = onSeg(p, orig[i-1], orig[i])
				}
				if !on {
					t.Fatalf("trial %d: point %v off the original line", trial, p)
				}
			}
			for _, p := range orig {
				d := math.Inf(1)
				for i := 1; i < len(got); i++ {
					d = math.Min(d, segDist(p, got[i-1], got[i]))
				}
				if len(got) > 1 && d > math.Sqrt2/4+1e-12 {
					t.Fatalf("trial %d: corner %v %.3f cell from the smoothed line", trial, p, d)
				}
			}
		}
	}
}

// TestROCNullPanelShaded: the ROC figure shades the data area of each
// null's panel and of no model's, and its key and caption say so.
func TestROCNullPanelShaded(t *testing.T) {
	for _, withN := range []bool{false, true} {
		r := analyzedSample(t)
		if withN {
			r = withNull(t)
			if err := Analyze(r); err != nil {
				t.Fatal(err)
			}
		}
		f := rocFigure(r)
		svg, err := render(f, "svg")
		if err != nil {
			t.Fatal(err)
		}
		fill := "fill:" + svgColor(nullPanelShade)
		want := 0
		if withN {
			want = 2 // the null's panel and the key's box
		}
		if got := strings.Count(string(svg), fill); got != want {
			t.Errorf("null %v: %d shapes filled %s, want %d", withN, got, fill, want)
		}
		if got := strings.Contains(f.Caption, "a reference, not a model"); got != withN {
			t.Errorf("null %v: caption %q", withN, f.Caption)
		}
	}
}

// TestLogTicksSpread: with an axis length, log tick labels never come
// within 3 pt of each other, powers of ten included (each labelled unless
// it would touch the one labelled before it), and on a long enough axis
// every 1, 2 and 5 x 10^k is.
func TestLogTicksSpread(t *testing.T) {
	for _, w := range []vg.Length{40, 80, 120, 200, 2000} {
		for _, lo := range []float64{3, 40, 700, 5000} {
			for _, decades := range []float64{0.7, 1.5, 2.4, 4, 6.3} {
				hi := lo * math.Pow(10, decades)
				spread := logTicks{W: w, Pt: minFontPt}.Ticks(lo, hi)
				all := logTicks{}.Ticks(lo, hi)
				var xs []float64
				var labels []string
				decX, decLabel := 0.0, "" // the last power of ten labelled
				for i, tk := range spread {
					if tk.Value != all[i].Value {
						t.Fatalf("[%g, %g]: ticks differ", lo, hi)
					}
					isDecade := tk.Value == math.Pow10(int(math.Round(math.Log10(tk.Value))))
					x := math.Log10(tk.Value/lo) / math.Log10(hi/lo) * float64(w)
					if isDecade && all[i].Label != "" {
						// A power of ten goes unlabelled only where it would
						// touch the power of ten labelled before it.
						touches := decLabel != "" && vg.Length(x-decX) < (textWidth(decLabel, minFontPt)+textWidth(all[i].Label, minFontPt))/2+vg.Points(3)
						if tk.Label == "" && !touches {
							t.Errorf("w=%g [%g, %g]: power of ten %g unlabelled", w, lo, hi, tk.Value)
						}
						if tk.Label != "" {
							decX, decLabel = x, tk.Label
						}
					}
					if tk.Label != "" {
						xs = append(xs, x)
						labels = append(labels, tk.Label)
					}
				}
				for i := 1; i < len(xs); i++ {
					// Every two labels keep 3 pt apart, powers of ten too:
					// on a range of 6.3 decades "10000" and "100000"
					// overlapped on a 150 pt axis.
					need := (textWidth(labels[i-1], minFontPt)+textWidth(labels[i], minFontPt))/2 + vg.Points(3)
					if vg.Length(xs[i]-xs[i-1]) < need {
						t.Errorf("w=%g [%g, %g]: labels %s and %s %.1f pt apart", w, lo, hi, labels[i-1], labels[i], xs[i]-xs[i-1])
					}
				}
				if w == 2000 && len(labels) != countLabels(all) {
					t.Errorf("w=%g [%g, %g]: %d of %d labels on a long axis", w, lo, hi, len(labels), countLabels(all))
				}
			}
		}
	}
}

func isPow10(label string) bool {
	v, err := strconv.ParseFloat(label, 64)
	return err == nil && v == math.Pow10(int(math.Round(math.Log10(v))))
}

func countLabels(ts []plot.Tick) int {
	n := 0
	for _, tk := range ts {
		if tk.Label != "" {
			n++
		}
	}
	return n
}

// TestMapPDFSameBytes renders the maps of a 60-extent family (a colour
// bar per chain besides the suitability bar) as PDF a dozen times and
// requires the same bytes each time: the PDF writer orders images of one
// width by map iteration, so two different bars of one width came out in
// either order (barPixels keeps the widths apart, from the preview's too).
func TestMapPDFSameBytes(t *testing.T) {
	for w := 100; w <= 140; w++ {
		b := barPixels(w)
		if b.suitability == b.ramp || b.suitability == w || b.ramp == w {
			t.Errorf("preview %d px: bars %+v", w, b)
		}
	}
	for _, pw := range []int{0, 127, 128} {
		r := manyExtents(t, 60)
		if pw > 0 { // a preview as wide as a bar would be
			pv := r.Preview
			_, masks, err := decodePreview(pv)
			if err != nil {
				t.Fatal(err)
			}
			wide := make([][]bool, len(masks))
			for k, m := range masks {
				wide[k] = make([]bool, pw*pv.Height)
				for y := range pv.Height {
					copy(wide[k][y*pw:], m[y*pv.Width:(y+1)*pv.Width])
				}
			}
			r.Preview = NewPreview(pw, pv.Height, pv.Bounds, make([]float64, pw*pv.Height), 0, 1, wide)
		}
		f, _ := mapFigure(r)
		first, err := render(f, "pdf")
		if err != nil {
			t.Fatal(err)
		}
		first = append([]byte(nil), first...)
		for range 12 {
			f, _ := mapFigure(r)
			again, err := render(f, "pdf")
			if err != nil {
				t.Fatal(err)
			}
			if !bytes.Equal(first, again) {
				t.Fatalf("preview %d px: the maps' PDF differs between two renderings", pw)
			}
		}
	}
}

// TestMapKeyInFreeCell: three map panels in two columns leave the
// bottom-right cell free, and the shared key (point marks, suitability
// bar, scale bar and north arrow) is drawn there, in the right half and above the lowest
// text of the panels, not in a band under them; every text inside the
// canvas and none overlapping another.
func TestMapKeyInFreeCell(t *testing.T) {
	r := manyExtents(t, 60)
	if n := len(mapGroups(r)); n != 3 {
		t.Fatalf("%d panels, want 3", n)
	}
	f, svg := checkedMapSVG(t, r, "maps of 60 extents")
	texts, _ := parseSVG(t, svg)
	suit := "suitability, model " + r.Models[0].Name
	lowest, keyLowest, keys := math.Inf(1), math.Inf(1), 0
	for _, tx := range texts {
		lowest = math.Min(lowest, tx.y)
		if tx.s == suit || tx.s == "N" || strings.HasPrefix(tx.s, "training point") || strings.HasPrefix(tx.s, "test point") {
			keys++
			keyLowest = math.Min(keyLowest, tx.y)
			if tx.x < float64(f.W)/2 {
				t.Errorf("key text %q at x %.1f, left of the free cell", tx.s, tx.x)
			}
		}
	}
	if keys < 3 || !(keyLowest > lowest) {
		t.Errorf("%d key texts, the lowest at y %.1f, the figure's lowest text at %.1f: key not in the free cell", keys, keyLowest, lowest)
	}
}

// checkedMapSVG returns the map figure of r and its SVG, whose texts it
// checks (checkTexts, naming the figure what): every text inside the
// canvas and none overlapping another.
func checkedMapSVG(t *testing.T, r *Results, what string) (figure, []byte) {
	t.Helper()
	f, ok := mapFigure(r)
	if !ok {
		t.Fatal("no map figure")
	}
	svg, err := render(f, "svg")
	if err != nil {
		t.Fatal(err)
	}
	checkTexts(t, what, svg)
	return f, svg
}

// TestNullsTellApart: two nulls of the user's and the distance-only null
// (three nulls) drew the first and third in the same grey, dotted, with
// the same open circles, so a reader could not tell which line was which
// (seen in the metrics figure of a study with two --null rasters). Every
// null of a run with up to ten (six --null rasters and the distance-only
// null drew that null, the seventh, as the first) differs from every
// other in grey or marker.
func TestNullsTellApart(t *testing.T) {
	seen := map[string]int{}
	for k := range 10 {
		ls, gs := nullLineStyle(k)
		key := fmt.Sprintf("%s %T", svgColor(ls.Color), gs.Shape)
		if j, ok := seen[key]; ok {
			t.Errorf("null %d drawn as null %d (%s)", k, j, key)
		}
		seen[key] = k
		switch gs.Shape.(type) {
		case draw.RingGlyph, draw.SquareGlyph, draw.TriangleGlyph, draw.PlusGlyph, draw.CrossGlyph:
		default:
			t.Errorf("null %d's marker %T is not hollow", k, gs.Shape)
		}
	}
}

// TestLogTicksNarrow: an area axis too narrow for two 1, 2 or 5 x 10^k
// labels (one extent scored: its area padded by 1.25 each side) fell back
// to six labels whatever the axis's length, and on a metrics panel
// (about 125 pt) "3750" and "4000" touched. With an axis length, the
// fallback keeps at least two labels, each 3 pt clear of its neighbours.
func TestLogTicksNarrow(t *testing.T) {
	for _, w := range []vg.Length{60, 125, 400} {
		for _, lo := range []float64{3, 260.1, 2601, 7001} {
			for _, decades := range []float64{0.05, 0.1, 0.194, 0.3} {
				hi := lo * math.Pow(10, decades)
				var xs []float64
				var labels []string
				for _, tk := range (logTicks{W: w, Pt: minFontPt}).Ticks(lo, hi) {
					if tk.Label != "" {
						xs = append(xs, math.Log10(tk.Value/lo)/math.Log10(hi/lo)*float64(w))
						labels = append(labels, tk.Label)
					}
				}
				if len(labels) < 2 {
					t.Errorf("w=%g [%g, %g]: labels %v", w, lo, hi, labels)
				}
				if w < 125 {
					continue // two labels are kept however short the axis
				}
				for i := 1; i < len(xs); i++ {
					need := (textWidth(labels[i-1], minFontPt)+textWidth(labels[i], minFontPt))/2 + vg.Points(3)
					if vg.Length(xs[i]-xs[i-1]) < need {
						t.Errorf("w=%g [%g, %g]: labels %s and %s %.1f pt apart, need %.1f", w, lo, hi, labels[i-1], labels[i], xs[i]-xs[i-1], need.Points())
					}
				}
			}
		}
	}
}
