package report

import (
	"fmt"
	"math"
	"slices"
	"strings"
	"testing"

	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
	"gonum.org/v1/plot/vg/recorder"
)

// gapResults returns results with nm models and nn nulls (the last the
// distance-only null), each pair with an AUC difference on three extents.
func gapResults(nm, nn int) *Results {
	r := &Results{Sensitivity: &Sensitivity{}}
	for i := range nm {
		name := fmt.Sprintf("model_with_a_long_descriptive_name_%02d", i)
		r.Models = append(r.Models, Model{Name: name})
		r.Sensitivity.ModelNames = append(r.Sensitivity.ModelNames, name)
	}
	for j := range nn {
		m := Model{Name: fmt.Sprintf("null_with_a_long_descriptive_name_%02d", j), Role: RoleNull}
		if j == nn-1 {
			m = Model{Name: DistanceNullName, Role: RoleNull, NullKind: NullDistance}
		}
		r.Models = append(r.Models, m)
	}
	for _, m := range r.Sensitivity.ModelNames {
		for _, n := range nulls(r) {
			an := AboveNull{Metric: "auc", Model: m, Null: n.Name, Defined: 3}
			for k, a := range []float64{1e5, 4e5, 1.6e6} {
				an.Gaps = append(an.Gaps, NullGap{Extent: fmt.Sprint("e", k), AreaKm2: a, Defined: true, Diff: 0.1, Low: 0.05, High: 0.15})
			}
			r.Sensitivity.AboveNull = append(r.Sensitivity.AboveNull, an)
		}
	}
	return r
}

// TestNullGapPanelKeepsHeight: with 7 models and 3 nulls the key of the
// model-minus-null figure had 21 rows in a 90 mm figure, so the panel
// under it was squeezed to nothing and its title and axis labels were
// drawn over the key (seen in a study's model_minus_null.png). The panel
// title and the x-axis title, as drawn, must lie inside the figure, below
// every key row, and at least 50 mm apart (the panel between them).
func TestNullGapPanelKeepsHeight(t *testing.T) {
	for _, tc := range []struct{ nm, nn int }{{1, 1}, {2, 1}, {2, 2}, {7, 3}, {12, 6}} {
		r := gapResults(tc.nm, tc.nn)
		figs := nullGapFigures(r)
		if len(figs) != 1 {
			t.Fatalf("%+v: %d figures", tc, len(figs))
		}
		f := figs[0]
		rec := &recorder.Canvas{}
		c := draw.NewCanvas(rec, f.W, f.H)
		if err := f.draw(c); err != nil {
			t.Fatal(err)
		}
		keyLow, titleY, axisY := f.H, vg.Length(-1), vg.Length(-1)
		for _, a := range rec.Actions {
			fs, ok := a.(*recorder.FillString)
			if !ok || fs.String == "AUC difference (model − null)" {
				continue // the y-axis title is drawn on a rotated canvas
			}
			if fs.Point.Y < 0 || fs.Point.Y > f.H {
				t.Errorf("%+v: %q drawn at y %.1f pt, outside the %.1f pt figure", tc, fs.String, fs.Point.Y.Points(), f.H.Points())
			}
			switch {
			case fs.String == "AUC: model minus null, on the same test points":
				titleY = fs.Point.Y
			case fs.String == "extent area (1000 km²)":
				axisY = fs.Point.Y
			case strings.HasPrefix(fs.String, "model_with") || strings.HasPrefix(fs.String, "− "):
				keyLow = min(keyLow, fs.Point.Y)
			}
		}
		if titleY < 0 || axisY < 0 {
			t.Fatalf("%+v: title at %v, axis title at %v", tc, titleY, axisY)
		}
		if titleY >= keyLow {
			t.Errorf("%+v: panel title at y %.1f pt is not below the key (lowest row %.1f pt)", tc, titleY.Points(), keyLow.Points())
		}
		if gap := titleY - axisY; gap < 50*vg.Millimeter {
			t.Errorf("%+v: panel %.1f mm tall between its title and x-axis title, want at least 50 mm", tc, gap/vg.Millimeter)
		}
	}
}

// TestNullGapPairsTellApart: two nulls besides the first were both drawn
// dotted, and a model whose own pattern is dotted (the third) drew all its
// pairs alike, so a reader could not tell which null a line subtracts.
// Every pair of six models and ten nulls differs in colour,
// marker or line pattern.
func TestNullGapPairsTellApart(t *testing.T) {
	seen := map[string]string{}
	for i := range 6 {
		for j := range 10 {
			ls := lineStyle(modelColor(i), 1, gapDash(j))
			key := fmt.Sprintf("%s %T %v", svgColor(ls.Color), markerStyle(i).Shape, ls.Dashes)
			pair := fmt.Sprint(i, "-", j)
			if p, ok := seen[key]; ok {
				t.Errorf("pair %s drawn as pair %s (%s)", pair, p, key)
			}
			seen[key] = pair
		}
	}
	// With one null each model keeps its own pattern (modelDash, as in
	// the other figures), and the caption says which reading applies.
	for _, tc := range []struct {
		nulls int
		want  string
	}{{1, "Colour, marker and line pattern tell the model."}, {2, "Colour and marker tell the model, the line pattern the null."}} {
		f := nullGapFigures(gapResults(2, tc.nulls))
		if len(f) != 1 || !strings.Contains(f[0].Caption, tc.want) {
			t.Errorf("%d nulls: caption lacks %q", tc.nulls, tc.want)
		}
	}
	// Patterns that differ only by a fraction of a point read as one.
	for a := range 10 {
		for b := range a {
			da, db := gapDash(a), gapDash(b)
			if len(da) == len(db) {
				near := true
				for k := range da {
					d := da[k] - db[k]
					near = near && d < vg.Points(1) && d > -vg.Points(1)
				}
				if near {
					t.Errorf("null patterns %d and %d nearly alike: %v, %v", a, b, da, db)
				}
			}
		}
	}
}

// TestFactorKeyModelsWithoutLine: when several models meet several nulls,
// colour and marker tell the model and the line pattern the null, yet
// each model's key entry drew its marker on a solid line, the first
// null's pattern, as if that model's lines were solid against every null
// (a study of six models, a null of the user's and the distance-only
// null). A model's entry is its marker alone; each null's, its pattern.
func TestFactorKeyModelsWithoutLine(t *testing.T) {
	r := gapResults(3, 2)
	_, items, err := nullGapPlot(r, twoColumns)
	if err != nil {
		t.Fatal(err)
	}
	models, nullsKeyed := 0, 0
	for _, it := range items {
		switch th := it.thumb.(type) {
		case glyphThumb:
			models++
			if th.line != nil {
				t.Errorf("model %q keyed with a line %v", it.label, th.line.Dashes)
			}
		case lineThumb:
			nullsKeyed++
		}
	}
	if models != 3 || nullsKeyed != 2 {
		t.Errorf("key of 3 models and 2 nulls: %d model entries, %d null entries", models, nullsKeyed)
	}
}

// TestAreaAxisGlobalUnit: the area axes of metrics_vs_area,
// model_minus_null and the ROC colour bar counted in 1000 km² at any
// size, so a study of the whole globe (510 million km²) read "100000",
// "200000", "500000" on its axes while the report's summary said "from 66
// to 510 million km²" (areaRange). Past 10 million km², as areaRange, the
// axes count in million km²; below 10,000 km² in km², between in 1000 km².
func TestAreaAxisGlobalUnit(t *testing.T) {
	for _, tc := range []struct {
		max  float64
		div  float64
		unit string
	}{
		{9999, 1, "extent area (km²)"},
		{1e4, 1e3, "extent area (1000 km²)"},
		{3.25e6, 1e3, "extent area (1000 km²)"},
		{1e7, 1e6, "extent area (million km²)"},
		{5.1e8, 1e6, "extent area (million km²)"},
	} {
		if div, unit := areaAxis(tc.max); div != tc.div || unit != tc.unit {
			t.Errorf("areaAxis(%g) = %g, %q; want %g, %q", tc.max, div, unit, tc.div, tc.unit)
		}
	}
	// The model-minus-null figure of a global study: extents of 66, 105
	// and 510 million km² (a run on a 0.25° grid of the whole globe).
	r := gapResults(1, 1)
	for i := range r.Sensitivity.AboveNull {
		for k, a := range []float64{6.6e7, 1.05e8, 5.1e8} {
			r.Sensitivity.AboveNull[i].Gaps[k].AreaKm2 = a
		}
	}
	texts := drawnTexts(t, nullGapFigures(r)[0])
	if !slices.Contains(texts, "extent area (million km²)") {
		t.Errorf("axis title not in million km²: %q", texts)
	}
	for _, s := range texts {
		if len(s) >= 5 && strings.Trim(s, "0123456789") == "" {
			t.Errorf("tick label %q: five digits or more where the unit could be a million km²", s)
		}
	}
}

// TestSeriesShiftBounded: series are moved along the area axis so that
// their bars stand apart, by 2^(0.05 k) in the metrics figure and
// 2^(0.03 (i+3j)) in the model-minus-null figure, without bound: 12
// models put the first and last 17% and 21% off their extents' areas,
// and one model with seven nulls put the last 45% off (seen in a run
// with six --null rasters), while the captions say "a few percent".
// Every series now lies within 2^0.1 (7%, our cut-off) of the true area,
// series are centred on it, and up to five keep the old 2^0.05 step.
func TestSeriesShiftBounded(t *testing.T) {
	for n := 1; n <= 40; n++ {
		prev := 0.0
		for k := range n {
			s := seriesShift(k, n)
			if d := math.Abs(math.Log2(s)); d > maxShiftSpan/2+1e-12 {
				t.Errorf("n=%d: series %d shifted by %.3f, %.1f%%", n, k, s, 100*(s-1))
			}
			if k > 0 && !(s > prev) {
				t.Errorf("n=%d: series %d not right of series %d", n, k, k-1)
			}
			if n <= 5 && k > 0 && math.Abs(math.Log2(s/prev)-0.05) > 1e-12 {
				t.Errorf("n=%d: step %.4f, want the old 0.05", n, math.Log2(s/prev))
			}
			prev = s
		}
		if s := seriesShift(0, n) * seriesShift(n-1, n); math.Abs(s-1) > 1e-12 {
			t.Errorf("n=%d: not centred (first x last = %g)", n, s)
		}
	}
	// The figure of one model and seven nulls: the drawn x range (the
	// axis less its 1.25 margin) within 7% of the areas, 100 to 1600
	// thousand km².
	r := gapResults(1, 7)
	p, _, err := nullGapPlot(r, 150*vg.Millimeter)
	if err != nil || p == nil {
		t.Fatalf("no plot: %v", err)
	}
	if lo, hi := p.X.Min*1.25, p.X.Max/1.25; lo < 100/math.Pow(2, 0.1)-1e-9 || hi > 1600*math.Pow(2, 0.1)+1e-9 {
		t.Errorf("series drawn from %.1f to %.1f, areas 100 to 1600", lo, hi)
	}
}
