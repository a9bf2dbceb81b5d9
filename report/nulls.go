package report

import (
	"fmt"
	"image/color"
	"math"
	"sort"
	"strings"

	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"

	"areasweep/extent/vocab"
)

// ModelLabel is how the report (and the run's log) names a model: nulls carry what they are,
// so that no reader takes one for a model under evaluation.
func ModelLabel(r *Results, name string) string {
	for _, m := range r.Models {
		if m.Name != name || !m.IsNull() {
			continue
		}
		if m.NullKind == NullDistance {
			return name + " (distance-only null)"
		}
		return name + " (null)"
	}
	return name
}

// nulls returns the nulls of r in Results.Models order.
func nulls(r *Results) []Model {
	var out []Model
	for _, m := range r.Models {
		if m.IsNull() {
			out = append(out, m)
		}
	}
	return out
}

// nullLineStyle draws the k-th null in the metric figures: grey, dotted,
// thinner than the models' lines, and with hollow markers, so it reads as
// a reference and not as one more model. Two greys alternate; each pair
// of nulls takes the next hollow marker (circle, square, triangle, plus,
// cross), so that up to ten nulls (two of the user's and the distance-only null
// already make three) are told apart by grey and marker together. With
// three markers, a run with six --null rasters drew the distance-only
// null, the seventh, as the first; with five, a run with ten drew the
// eleventh as the first. Past ten, each further round of ten takes one
// spoke more around its marker (spokedGlyph), so that no two nulls share
// grey and marker however many a run holds.
func nullLineStyle(k int) (draw.LineStyle, draw.GlyphStyle) {
	grey := []color.Color{color.Gray{Y: 90}, color.Gray{Y: 150}}[k%2]
	shapes := []draw.GlyphDrawer{draw.RingGlyph{}, draw.SquareGlyph{}, draw.TriangleGlyph{}, draw.PlusGlyph{}, draw.CrossGlyph{}}
	shape := spoked(shapes[(k/2)%len(shapes)], k/(2*len(shapes)))
	return draw.LineStyle{Color: grey, Width: vg.Points(1.2), Dashes: []vg.Length{vg.Points(1.5), vg.Points(2)}},
		draw.GlyphStyle{Color: grey, Radius: vg.Points(2.4), Shape: shape}
}

// nullSeries returns, for metric m, the null's value against the extent
// area on every usable extent it is scored on, sorted by area, and the
// nested chain of each of those extents ("" for none).
func nullSeries(r *Results, m MetricInfo, null string) (plotter.XYs, []string) {
	type ext struct {
		area  float64
		chain string
	}
	ok := map[string]ext{}
	for _, e := range r.Extents {
		if e.Status == vocab.StatusOK && e.AreaKm2 > 0 {
			ok[e.ID] = ext{e.AreaKm2, e.Chain}
		}
	}
	type pt struct {
		xy    plotter.XY
		chain string
	}
	var pts []pt
	for i := range r.Scores {
		sc := &r.Scores[i]
		e, usable := ok[sc.Extent]
		if sc.Model != null || !sc.Scored || !usable {
			continue
		}
		if v, has, _, _, _, _ := metricValue(m, sc); has {
			pts = append(pts, pt{plotter.XY{X: e.area, Y: v}, e.chain})
		}
	}
	sort.SliceStable(pts, func(a, b int) bool { return pts[a].xy.X < pts[b].xy.X })
	xys := make(plotter.XYs, len(pts))
	chains := make([]string, len(pts))
	for i, p := range pts {
		xys[i], chains[i] = p.xy, p.chain
	}
	return xys, chains
}

// sortingBiasRows gives one table row per extent with a defined spatial
// sorting bias, in family order.
func sortingBiasRows(r *Results) [][]cell {
	var rows [][]cell
	for _, e := range r.Extents {
		sb := e.SortingBias
		if sb == nil || !sb.Defined {
			continue
		}
		rows = append(rows, []cell{tc(e.ID), areaCell(e.AreaKm2), ic(sb.TestPoints), nc(sb.TestMeanKm, 1), nc(sb.BackgroundMeanKm, 1),
			nc(sb.RatioMean, 3), nc(sb.TestMedianKm, 1), nc(sb.BackgroundMedianKm, 1), nc(sb.RatioMedian, 3)})
	}
	return rows
}

// sortingBiasNote explains the sorting-bias table.
const sortingBiasNote = "Spatial sorting bias (Hijmans 2012, Ecology 93:679-688): the mean (and median) geodesic distance from the test points " +
	"inside each extent to the nearest training point, over the same distance averaged over the extent's cells by area. " +
	"Values well below 1 mean the test points lie much nearer the training points than the background does, so that distance alone " +
	"separates them: the distance-only null's AUC on the same extent shows how far that carries. A description, not a test. " +
	"The cells' median is read from bins 0.1% wide."

// sortingBiasNoteFor is sortingBiasNote, with what a ratio above 1 means
// when some extent of r has one (test points all along the far edge of
// the region, say): the note read only values below 1, leaving a table of
// ratios up to 2.5 unexplained.
func sortingBiasNoteFor(r *Results) string {
	for _, e := range r.Extents {
		if sb := e.SortingBias; sb != nil && sb.Defined && (sb.RatioMean > 1 || sb.RatioMedian > 1) {
			return sortingBiasNote + " A ratio above 1 means the test points lie farther from the training points than the extent's cells do, by that measure (mean or median)."
		}
	}
	return sortingBiasNote
}

// nullSentences describes the nulls and the sorting bias for methods.md:
// each null's AUC on the base extent beside the models', its range across
// extents, the paired difference of each model and null with its interval
// (Sensitivity.AboveNull) and the range of the sorting-bias ratio.
func nullSentences(r *Results) string {
	var b strings.Builder
	auc := func(model, ext string) (float64, bool) {
		for _, sc := range r.Scores {
			if sc.Model == model && sc.Extent == ext && sc.Scored {
				return sc.AUC, true
			}
		}
		return 0, false
	}
	okExt := map[string]bool{}
	for _, e := range r.Extents {
		okExt[e.ID] = e.Status == vocab.StatusOK
	}
	for _, n := range nulls(r) {
		lo, hi, k := math.Inf(1), math.Inf(-1), 0
		for _, sc := range r.Scores {
			if sc.Model == n.Name && sc.Scored && okExt[sc.Extent] {
				lo, hi, k = math.Min(lo, sc.AUC), math.Max(hi, sc.AUC), k+1
			}
		}
		if k == 0 {
			continue
		}
		what := "The null " + n.Name
		if n.NullKind == NullDistance {
			what = "A distance-only null (minus the geodesic distance from each cell to the nearest training record; Hijmans 2012)"
		}
		if k == 1 {
			fmt.Fprintf(&b, " %s was scored like the models on the same extents and test records; its AUC was %s on its one extent", what, f3(lo))
		} else {
			fmt.Fprintf(&b, " %s was scored like the models on the same extents and test records; its AUC %s", what, rangeOver(lo, hi, "across", k))
		}
		if v, ok := auc(n.Name, vocab.BaseID); ok {
			if k == 1 {
				b.WriteString(", the base extent")
			} else {
				fmt.Fprintf(&b, " and was %s on the base extent", f3(v))
			}
			var ms []string
			for _, m := range r.Models {
				if mv, ok := auc(m.Name, vocab.BaseID); ok && !m.IsNull() {
					ms = append(ms, fmt.Sprintf("%s %s", m.Name, f3(mv)))
				}
			}
			if len(ms) > 0 {
				// "(model: m 0.859)" for one ("(models: m 0.859)" was written).
				fmt.Fprintf(&b, " (model%s: %s)", Plural(len(ms)), strings.Join(ms, ", "))
			}
		}
		b.WriteString(".")
	}
	if r.Sensitivity != nil {
		for _, an := range r.Sensitivity.AboveNull {
			b.WriteString(" " + an.Sentence)
		}
	}
	lo, hi, k := math.Inf(1), math.Inf(-1), 0
	for _, e := range r.Extents {
		if sb := e.SortingBias; sb != nil && sb.Defined && e.Status == vocab.StatusOK {
			lo, hi, k = math.Min(lo, sb.RatioMean), math.Max(hi, sb.RatioMean), k+1
		}
	}
	if k == 1 {
		fmt.Fprintf(&b, " The spatial sorting bias (mean distance from test to nearest training record over the area-weighted mean distance from the extent's cells; Hijmans 2012) was %s on the one extent where it is defined.", f3(lo))
	} else if k > 0 {
		fmt.Fprintf(&b, " The spatial sorting bias (mean distance from test to nearest training record over the area-weighted mean distance from the extent's cells; Hijmans 2012) %s.", rangeOver(lo, hi, "across", k))
	}
	return b.String()
}

// rocPanels lists the ROC figure's panels: the models, then the nulls.
func rocPanels(r *Results) []string {
	out := append([]string(nil), r.Sensitivity.ModelNames...)
	for _, n := range nulls(r) {
		out = append(out, n.Name)
	}
	return out
}

// rocPanelTitle names a ROC panel: "model NAME", or what the null is
// first and its name after, so that a narrow panel's wrapped title keeps
// "distance-only null" on one line.
func rocPanelTitle(r *Results, name string) string {
	for _, m := range r.Models {
		if m.Name != name || !m.IsNull() {
			continue
		}
		if m.NullKind == NullDistance {
			return "distance-only null (" + name + ")"
		}
		return "null (" + name + ")"
	}
	return "model " + name
}

// nullsInMetricsCaption says how the scores-against-area figure draws the
// nulls: at their full-sample values, with no bar (no resample SD is
// drawn for them) and not shifted along the area axis.
const nullsInMetricsCaption = "Nulls: grey open circles on dotted lines, at their full-sample scores, without bars and not shifted."

// nullsInMetricsCaptionMany is nullsInMetricsCaption for three to six
// nulls, whose markers differ (nullLineStyle).
const nullsInMetricsCaptionMany = "Nulls: grey open markers on dotted lines (circles for the first two, in two greys, then squares, then triangles), at their full-sample scores, without bars and not shifted."

// nullsInMetricsCaptionFor is the metrics caption's sentence on n nulls:
// nullsInMetricsCaption for one or two, nullsInMetricsCaptionMany up to
// six, and past that every marker nullLineStyle gives them named.
func nullsInMetricsCaptionFor(n int) string {
	switch {
	case n <= 0:
		return ""
	case n <= 2:
		return nullsInMetricsCaption
	case n <= 6:
		return nullsInMetricsCaptionMany
	}
	spokes := ""
	if n > 10 {
		spokes = "; from the eleventh on, each further ten take one spoke more around the marker"
	}
	return "Nulls: grey open markers on dotted lines (circles for the first two, in two greys, then squares, triangles, pluses and crosses" + spokes +
		"), at their full-sample scores, without bars and not shifted."
}

// nullGapBarsCaption reads the model-minus-null figure's bars both ways
// (a bar wholly below 0 is as much a finding as one above) and says that
// the pairs are drawn a few percent apart along the area axis.
//
// A bar across 0 is "within noise", not "no difference": a wide interval
// over 0 does not show the model and the null equal. Each bar is a test
// of its own extent, so the caption says they are not adjusted.
const nullGapBarsCaption = "Bars wholly above 0: the model is above the null beyond noise on that extent; wholly below 0: below it; " +
	"across 0: within noise, which does not show the two equal. Each bar is a test on its own extent, not adjusted for the number of extents. The points of each model and null pair are shifted a few percent apart along the area axis so that their bars do not overlap."
