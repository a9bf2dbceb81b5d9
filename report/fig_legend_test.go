package report

import (
	"fmt"
	"html"
	"image"
	"image/color"
	"image/png"
	"math"
	"os"
	"os/exec"
	"path/filepath"
	"regexp"
	"slices"
	"strings"
	"testing"

	"gonum.org/v1/plot/font"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
	"gonum.org/v1/plot/vg/recorder"

	"areasweep/extent/vocab"
)

// drawnTexts draws f on a recording canvas and returns every text it
// drew, in drawing order.
func drawnTexts(t *testing.T, f figure) []string {
	t.Helper()
	rec := &recorder.Canvas{}
	if err := f.draw(draw.NewCanvas(rec, f.W, f.H)); err != nil {
		t.Fatal(err)
	}
	var out []string
	for _, a := range rec.Actions {
		if fs, ok := a.(*recorder.FillString); ok {
			out = append(out, fs.String)
		}
	}
	return out
}

// TestMetricsLegendOnlyDrawn: a constant model is scored on no extent, so
// no panel of metrics_vs_area draws it, yet the key above the panels
// listed "model const" beside the models drawn, as if its line were hidden
// behind another (a study with a constant raster beside a model and a null
// of the user's). The key lists only what the panels draw; the caption
// names the model as not drawn.
func TestMetricsLegendOnlyDrawn(t *testing.T) {
	r := loadSample(t)
	constantModel(r, "broad")
	analyzed(t, r)
	texts := drawnTexts(t, metricsFigure(r))
	if slices.Contains(texts, "model broad") {
		t.Errorf("the key lists model broad, which no panel draws: %q", texts)
	}
	for _, want := range []string{"model good", "model truncated"} {
		if !slices.Contains(texts, want) {
			t.Errorf("the key lacks %q: %q", want, texts)
		}
	}
	for _, nm := range nulls(r) {
		if want := ModelLabel(r, nm.Name); !slices.Contains(texts, want) {
			t.Errorf("the key lacks the null %q: %q", want, texts)
		}
	}
	checkWords(t, "caption", metricsCaption(r), []string{"so not drawn: broad."}, nil)

	// The whole sample: every model and null is drawn and keyed.
	r = analyzedSample(t)
	texts = drawnTexts(t, metricsFigure(r))
	for _, m := range r.Sensitivity.ModelNames {
		if !slices.Contains(texts, "model "+m) {
			t.Errorf("sample: the key lacks model %s: %q", m, texts)
		}
	}
}

// TestROCEmptyPanelSaysWhy: the ROC panel of a model scored on no extent
// (a constant raster) was an empty frame, explained only by the report's
// caption, so the figure file alone (PNG, PDF, SVG) read as curves lost in
// drawing. The panel itself now says the model was not scored, and only
// that panel.
func TestROCEmptyPanelSaysWhy(t *testing.T) {
	r := loadSample(t)
	constantModel(r, "broad")
	analyzed(t, r)
	// The canvas draws a text of several lines line by line.
	first, _, _ := strings.Cut(rocUnscoredNote, "\n")
	texts := drawnTexts(t, rocFigure(r))
	n := 0
	for _, s := range texts {
		if s == first {
			n++
		}
	}
	if n != 1 {
		t.Errorf("%d panels say %q, want 1 (broad's): %q", n, first, texts)
	}
	if slices.Contains(drawnTexts(t, rocFigure(analyzedSample(t))), first) {
		t.Errorf("sample (every model scored): a panel says %q", first)
	}
}

// scoredEverywhere gives every model and null of r a scored Score on each
// extent it has none on, a copy of its first scored one with the extent's
// ID and area: manyExtents renames the sample's extents, whose scores then
// name none of them, and a figure draws no curve of an extent nothing is
// scored on.
func scoredEverywhere(r *Results) *Results {
	first := map[string]Score{}
	has := map[[2]string]bool{}
	for _, sc := range r.Scores {
		has[[2]string{sc.Model, sc.Extent}] = true
		if _, ok := first[sc.Model]; !ok && sc.Scored {
			first[sc.Model] = sc
		}
	}
	for _, m := range r.Models {
		sc, ok := first[m.Name]
		if !ok {
			continue
		}
		for _, e := range r.Extents {
			if !has[[2]string{m.Name, e.ID}] {
				c := sc
				c.Extent, c.AreaKm2 = e.ID, e.AreaKm2
				r.Scores = append(r.Scores, c)
			}
		}
	}
	return r
}

// TestROCNoCurveExtent: an extent with no test points inside is scored for
// no model, so no panel draws its curve, yet the ROC figure's colour bar
// took a tick at its area ("a tick for each curve"), its area could
// stretch the bar's range, and past 16 extents the thinning could keep it
// as a chain's smallest member in place of a curve (a study with a user
// extent away from every point). Such an extent is left out of the
// curves' extents and named in the caption.
func TestROCNoCurveExtent(t *testing.T) {
	for _, n := range []int{10, 60} {
		r := scoredEverywhere(manyExtents(t, n))
		// The smallest point buffer: no test point inside.
		var gone string
		for _, e := range rocExtents(r) {
			if e.Chain == "points" {
				gone = e.ID
				break
			}
		}
		for i := range r.Scores {
			if r.Scores[i].Extent == gone {
				r.Scores[i].Scored, r.Scores[i].NotScored = false, "no test points inside this extent"
			}
		}
		kept, none := rocCurveExtents(r, rocExtents(r))
		if len(none) != 1 || none[0] != gone || len(kept) != len(rocExtents(r))-1 {
			t.Fatalf("n=%d: no curve %v, want [%s]; %d kept", n, none, gone, len(kept))
		}
		shown, _ := rocShown(kept)
		for _, e := range shown {
			if e.ID == gone {
				t.Errorf("n=%d: %s shown without a curve", n, gone)
			}
		}
		f := rocFigure(analyzedSampleWith(t, r))
		checkWords(t, fmt.Sprintf("n=%d: caption", n), f.Caption,
			[]string{"No model or null is scored on " + gone + " (the Scores table says why), so it has no curve."}, nil)
	}
	r := scoredEverywhere(manyExtents(t, 10))
	if f := rocFigure(analyzedSampleWith(t, r)); strings.Contains(f.Caption, "No model or null is scored on") {
		t.Errorf("every extent scored: %s", f.Caption)
	}
}

// TestTextsClearOfRightEdge: a map's x axis that ends on a tick (a grid
// from 150°W to 120°W) put the label "120°W" flush with the figure's right
// edge, its last letter in the PNG's last column of pixels and 0.1 pt past
// the edge in the SVG (the demo's maps; "10000" on model_minus_null
// likewise). Every text of those figures now ends at least 1 pt inside.
func TestTextsClearOfRightEdge(t *testing.T) {
	r := analyzedSample(t)
	// Bounds on whole multiples of the map's tick step (2°): labels at
	// both ends of the x axis.
	r.Preview.Bounds = [4]float64{4, 43.5, 12, 48}
	var checked int
	for _, f := range figures(r) {
		if f.Name != mapFigureName && f.Name != nullFigureName {
			continue
		}
		rec := &recorder.Canvas{}
		if err := f.draw(draw.NewCanvas(rec, f.W, f.H)); err != nil {
			t.Fatal(err)
		}
		for _, a := range rec.Actions {
			fs, ok := a.(*recorder.FillString)
			if !ok || strings.HasPrefix(fs.String, "share of test") || strings.HasPrefix(fs.String, "AUC difference") || strings.HasSuffix(fs.String, "°N") {
				continue // y-axis titles are drawn on a rotated canvas
			}
			checked++
			if end := fs.Point.X + textWidth(fs.String, fs.Size.Points()); end > f.W-1 {
				t.Errorf("%s: %q ends at %.2f pt, within 1 pt of the %.2f pt edge", f.Name, fs.String, end.Points(), f.W.Points())
			}
		}
	}
	if checked == 0 {
		t.Fatal("no text checked")
	}
}

// TestRampBarsKeyTheLogScale: the curves of roc_curves and the outlines of
// a map coloured by area take areaRamp at the area's place on a log scale,
// but their colour bars were drawn by gonum's Image plotter, which on a
// log axis warps an image as if its pixels ran evenly in the value: at
// 1000 km² on the demo's bar (392 to 3252 km²) stood the colour of about
// 1,600 km². Each bar's colour at a value is now the colour of that value.
func TestRampBarsKeyTheLogScale(t *testing.T) {
	const lo, hi = 391.8, 3251.6 // the demo's ROC bar, in 1000 km²
	check := func(what string, rec *recorder.Canvas, vertical bool, lo, hi float64) {
		t.Helper()
		var bar *recorder.DrawImage
		for _, a := range rec.Actions {
			if im, ok := a.(*recorder.DrawImage); ok {
				bar = im
			}
		}
		if bar == nil {
			t.Fatalf("%s: no image drawn", what)
		}
		b := bar.Image.Bounds()
		for _, v := range []float64{lo * 1.3, 1000, 1500, 2000, hi / 1.2} {
			pos := logPosition(v, lo, hi)
			var got color.Color
			if vertical {
				got = bar.Image.At(b.Min.X, b.Min.Y+int((1-pos)*float64(b.Dy())))
			} else {
				got = bar.Image.At(b.Min.X+int(pos*float64(b.Dx())), b.Min.Y)
			}
			want := areaRamp(pos)
			r, g, bl, _ := got.RGBA()
			if d := max(absDiff(r>>8, uint32(want.R)), absDiff(g>>8, uint32(want.G)), absDiff(bl>>8, uint32(want.B))); d > 8 {
				t.Errorf("%s: at %g the bar shows (%d, %d, %d), the ramp there is %v", what, v, r>>8, g>>8, bl>>8, want)
			}
		}
	}
	rec := &recorder.Canvas{}
	c := draw.NewCanvas(rec, 24*vg.Millimeter, 200)
	drawAreaBar(c, lo*1000, hi*1000, nil)
	check("ROC area bar", rec, true, lo, hi)

	rec = &recorder.Canvas{}
	c = draw.NewCanvas(rec, 200, 30*vg.Millimeter)
	drawRampBar(c, &rampKey{label: "extent area (km²)", lo: lo, hi: hi, log: true}, 128)
	check("map area bar", rec, false, lo, hi)
}

func absDiff(a, b uint32) uint32 {
	if a > b {
		return a - b
	}
	return b - a
}

// TestPDFImagesUpright: the PDF writer drew every image upside down: the
// maps' suitability background under outlines and points that were not
// (the demo's small islands at 35°S instead of 45°S), and the ROC area
// bar's large areas at its foot, against the PNG and SVG. Read back by an
// independent renderer (poppler's pdftoppm, Debian poppler-utils), an
// image of a red upper and a blue lower half is red above and blue below,
// drawn as RGBA and as a paletted image, and flipRows reverses the rows
// of any other kind too.
func TestPDFImagesUpright(t *testing.T) {
	red, blue := color.RGBA{255, 0, 0, 255}, color.RGBA{0, 0, 255, 255}
	halves := func(w, h int) *image.RGBA {
		img := image.NewRGBA(image.Rect(0, 0, w, h))
		for y := range h {
			for x := range w {
				img.Set(x, y, map[bool]color.Color{true: red, false: blue}[y < h/2])
			}
		}
		return img
	}
	pal := image.NewPaletted(image.Rect(0, 0, 6, 4), color.Palette{red, blue})
	for y := range 4 {
		for x := range 6 {
			pal.Set(x, y, halves(6, 4).At(x, y))
		}
	}
	nrgba := image.NewNRGBA(image.Rect(0, 0, 1, 2))
	nrgba.Set(0, 0, red)
	nrgba.Set(0, 1, blue)
	if got := flipRows(nrgba); !sameRGB(got.At(0, 0), blue) || !sameRGB(got.At(0, 1), red) {
		t.Errorf("flipRows of an NRGBA image: top %v, want blue", got.At(0, 0))
	}
	if _, err := exec.LookPath("pdftoppm"); err != nil {
		if os.Getenv("CI") == "true" {
			t.Fatal("pdftoppm not found: CI must install Debian's poppler-utils (scripts/setup.sh --test)")
		}
		t.Skip("pdftoppm not found: install Debian's poppler-utils to run this test (a skip is not a pass)")
	}
	for name, img := range map[string]image.Image{"rgba 1x2": halves(1, 2), "rgba 8x6": halves(8, 6), "paletted 6x4": pal} {
		f := figure{Name: "upright", W: 100, H: 100, draw: func(c draw.Canvas) error {
			c.DrawImage(vg.Rectangle{Min: vg.Point{X: 10, Y: 10}, Max: vg.Point{X: 90, Y: 90}}, img)
			return nil
		}}
		pdf, err := render(f, "pdf")
		if err != nil {
			t.Fatal(err)
		}
		dir := t.TempDir()
		if err := os.WriteFile(filepath.Join(dir, "f.pdf"), pdf, 0o644); err != nil {
			t.Fatal(err)
		}
		if out, err := exec.Command("pdftoppm", "-r", "72", "-png", "-singlefile", filepath.Join(dir, "f.pdf"), filepath.Join(dir, "f")).CombinedOutput(); err != nil {
			t.Fatalf("pdftoppm: %v: %s", err, out)
		}
		fh, err := os.Open(filepath.Join(dir, "f.png"))
		if err != nil {
			t.Fatal(err)
		}
		page, err := png.Decode(fh)
		fh.Close()
		if err != nil {
			t.Fatal(err)
		}
		// 100 pt at 72 dpi: 100 pixels, y down; the image spans 10 to 90.
		if top, bottom := page.At(50, 25), page.At(50, 75); !sameRGB(top, red) || !sameRGB(bottom, blue) {
			t.Errorf("%s: the PDF shows %v above and %v below, want red above blue", name, top, bottom)
		}
	}
}

// sameRGB reports whether two colours agree within 8 of 255 per channel.
func sameRGB(a, b color.Color) bool {
	ar, ag, ab, _ := a.RGBA()
	br, bg, bb, _ := b.RGBA()
	return absDiff(ar>>8, br>>8) <= 8 && absDiff(ag>>8, bg>>8) <= 8 && absDiff(ab>>8, bb>>8) <= 8
}

// TestMapUnscoredModel: when the first model, the maps' background, is a
// constant raster it is scored on no extent and has no threshold, yet the
// maps' key read "test point omitted at the 10th percentile training
// presence (none)", as if it omitted no test point, and its suitability
// bar ran from 0.5 to 1.5 (ticks 0.6 to 1.4) for a raster of 0.5
// everywhere. The key now has no omission marks and the caption says why;
// the bar shows the one value.
func TestMapUnscoredModel(t *testing.T) {
	r := loadSample(t)
	first := r.Models[0].Name
	for i := range r.Scores {
		if r.Scores[i].Model == first {
			r.Scores[i].Scored, r.Scores[i].NotScored = false, "constant suitability (minimum equals maximum on this extent)"
		}
	}
	analyzed(t, r)
	r.Preview.ValueMin, r.Preview.ValueMax = 0.5, 0.5
	f, ok := mapFigure(r)
	if !ok {
		t.Fatal("no map figure")
	}
	texts := drawnTexts(t, f)
	var ticks []string
	for _, s := range texts {
		if strings.Contains(s, "omitted") {
			t.Errorf("key of an unscored model: %q", s)
		}
		if _, err := fmt.Sscanf(s, "%g", new(float64)); err == nil && !strings.ContainsAny(s, "°") {
			ticks = append(ticks, s)
		}
	}
	if !slices.Contains(texts, "suitability, model "+first+" (one value on every cell)") {
		t.Errorf("bar label: %q", texts)
	}
	for _, s := range []string{"0.6", "1.0", "1.4"} {
		if slices.Contains(ticks, s) {
			t.Errorf("the bar of a raster of 0.5 ticks %s: %q", s, ticks)
		}
	}
	checkWords(t, "caption", f.Caption, []string{"no omission marks: model " + first + " is scored on no extent"}, []string{"omits at the 10th percentile", "under the omission marks"})

	// The sample as it is: the marks and their words.
	f, _ = mapFigure(analyzedSample(t))
	checkWords(t, "sample caption", f.Caption, []string{"omits at the 10th percentile", "under the omission marks"}, []string{"no omission marks"})
}

// reRotatedText is a vertical axis title of a gonum SVG: text turned a
// quarter turn, so that its y attribute is its baseline's distance from
// the figure's left edge and the glyphs' tops point left.
var reRotatedText = regexp.MustCompile(`<g transform="rotate\(90\)">\s*<text x="[^"]+" y="([^"]+)" transform="scale\(1, -1\)"\s*style="[^"]*font-size:([0-9.]+)px[^"]*">([^<]*)</text>`)

// TestAxisTitlesClearOfLeftEdge: the model-minus-null figure drew its
// vertical axis title ("AUC difference (model − null)") with its baseline
// 6.5 pt from the figure's left edge, so the top of its glyphs (the
// font's ascent, 7.2 pt at 8 pt) began 0.8 pt outside the figure: past
// the SVG's view box in a browser (seen in the report of every run with a
// null, which the browser test's sample has none of) and three pixels
// from the PNG's edge; so did the maps' "y (km)" on a projected grid.
// The other figures keep 2 pt of room. Every vertical axis title of
// every figure now starts at least 1 pt (our choice) inside the left
// edge.
func TestAxisTitlesClearOfLeftEdge(t *testing.T) {
	// The sample has no null of the user's; gapResults draws the
	// model-minus-null figure of two models and one null.
	figs := append(figures(analyzedSample(t)), nullGapFigures(gapResults(2, 1))...)
	// The maps of a projected grid have a vertical axis title, "y (km)"
	// (a grid of 5 m cells in EPSG:3035, 400 m across).
	proj := analyzedSample(t)
	proj.Grid = Grid{CRS: "EPSG:3035", Unit: "metre", UnitM: 1}
	proj.Preview.Bounds = [4]float64{4321000, 3209700, 4321400, 3210000}
	if f, ok := mapFigure(proj); ok {
		figs = append(figs, f)
	}
	seen := map[string]bool{}
	for _, f := range figs {
		svg, err := render(f, "svg")
		if err != nil {
			t.Fatal(err)
		}
		for _, m := range reRotatedText.FindAllStringSubmatch(string(svg), -1) {
			base, size := atof(t, m[1]), atof(t, m[2])
			seen[f.Name] = true
			face := font.DefaultCache.Lookup(sansFont, vg.Points(size))
			asc := face.Extents().Ascent.Points()
			if left := base - asc; left < 1 {
				t.Errorf("%s: axis title %q starts %.2f pt from the left edge, want at least 1", f.Name, html.UnescapeString(m[3]), left)
			}
		}
	}
	for _, name := range []string{nullFigureName, rocFigureName, mapFigureName} {
		if !seen[name] {
			t.Errorf("figure %s: no vertical axis title found (the sample must draw it)", name)
		}
	}
}

// TestROCBarSpansTheRampCurves: roc_curves' colour bar spans the areas of
// the curves drawn on the area ramp, not the whole raster's, which is
// drawn in its own style (dashed red) and took the bar's top: on the
// sample (areas from the hull, 28,232 km², to region_b200, 225,545 km²,
// and the whole raster at 231,212 km²) the largest ramp curve was a shade
// short of the ramp's end, and on a raster much larger than the study
// region most of the bar keyed no curve. Now the smallest and the largest
// ramp curves take the ramp's two ends, and the whole raster and the base
// region take no tick. One ramp curve alone takes its middle, where the
// bar (widened about a single value) shows it.
func TestROCBarSpansTheRampCurves(t *testing.T) {
	r := analyzedSample(t)
	es, _ := rocShown(rocExtents(r))
	rk := rocRamp(es)
	// Areas from the sample's results.json.
	if math.Abs(rk.lo-28232.020485) > 1e-6 || math.Abs(rk.hi-225544.562162) > 1e-6 {
		t.Errorf("ramp %g to %g km², want the hull's 28232.020485 to region_b200's 225544.562162", rk.lo, rk.hi)
	}
	for _, m := range rk.marks {
		if m == 231211.644433 || m == 40624.396242 {
			t.Errorf("a tick at %g km², the area of the whole raster or the base region", m)
		}
	}
	svg, err := render(rocFigure(r), "svg")
	if err != nil {
		t.Fatal(err)
	}
	for _, end := range []float64{0, 1} {
		if stroke := "stroke:" + svgColor(areaRamp(end)); !strings.Contains(string(svg), stroke) {
			t.Errorf("no curve drawn in the ramp's colour at %g (%s)", end, stroke)
		}
	}
	one := rocRamp([]Extent{{ID: "b", Kind: vocab.KindBase, AreaKm2: 10}, {ID: "p", Kind: vocab.KindPointBuffer, AreaKm2: 50}, {ID: "w", Kind: vocab.KindWholeRaster, AreaKm2: 900}})
	if one.lo != 50 || one.hi != 50 || one.t(50) != 0.5 {
		t.Errorf("one ramp curve: ramp %g to %g, its place %g; want 50, 50 and 0.5", one.lo, one.hi, one.t(50))
	}
}
