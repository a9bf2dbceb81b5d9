package report

import (
	"encoding/base64"
	"fmt"
	"math"
	"regexp"
	"slices"
	"strings"

	"areasweep/extent/vocab"
	"areasweep/metrics"
)

// MaxPreviewSide bounds each side of the preview a results file may hold;
// areasweep writes at most 240.
const MaxPreviewSide = 4096

// Validate checks that a results file read from disk holds values a run
// can produce, so that `areasweep report DIR` never renders impossible
// numbers (an AUC of -5) or fails half-way on a hand-edited file. Every
// problem names the field (`scores[3].auc`), the model and extent, the
// value and the allowed range. It checks:
//
//   - at least one model and one extent;
//   - the grid size (positive), point counts (>= 0), models (unique names,
//     finite ranges, floor share in [0,1]) and extents (unique ids, a known
//     status, counts >= 0, areas in [0, MaxAreaKm2], share in [0,1], duplicate_of naming
//     an earlier extent);
//   - scores, rings, curves and paired records refer to known models and
//     extents, and there is exactly one score per model and extent;
//   - a scored score holds one test point id and placement per test point;
//   - AUCs, omission rates, area fractions and p-values lie in [0,1], the
//     Boyce index in [-1,1], partial ROC ratios and their intervals in
//     [0,2] and their SDs in [0,2], AUC resample SDs in [0,1], E in
//     (0,1), successes lie in [0, n];
//   - paired records have a known kind and method, counts >= 0 (at most
//     resamples not formed), finite values and a non-negative SE;
//   - points have a known role and status, finite coordinates and a cell
//     of the grid (row and col -1 for a point outside the raster), and
//     point_counts counts them;
//   - the preview's size and encoded lengths match.
func Validate(r *Results) error {
	return validate("results.json", r)
}

// validate is Validate naming the file as file in its message.
func validate(file string, r *Results) error {
	if r == nil {
		return fmt.Errorf("report: no results")
	}
	v := &validator{file: file, models: map[string]bool{}, extents: map[string]bool{}}
	v.header(r)
	v.modelList(r.Models)
	v.extentList(r.Extents)
	v.scores(r)
	v.paired(r.Paired)
	v.pairedComplete(r)
	v.rings(r.Rings)
	v.curves(r.Curves)
	v.curvesComplete(r)
	v.omissions(r.Omissions)
	v.omissionsComplete(r)
	v.points(r.Points, r.Grid)
	v.pointCounts(r.PointCounts, r.Points)
	v.testPointIDs(r)
	if r.Preview != nil {
		v.preview(r.Preview, len(r.Extents))
	}
	return v.err
}

// testPointIDs checks that each score's test_point_ids name test points
// of points, as a run lists the test points it scored (by their line). An
// id of none (edited in) was shown in the report as a point.
func (v *validator) testPointIDs(r *Results) {
	if len(r.Points) == 0 {
		return
	}
	test := map[int]bool{}
	for _, p := range r.Points {
		if p.Role == vocab.RoleTest {
			test[p.ID] = true
		}
	}
	for i, s := range r.Scores {
		for j, id := range s.TestPointIDs {
			if !test[id] {
				v.fail(fmt.Sprintf("scores[%d] (model %s, extent %s).test_point_ids[%d]", i, s.Model, s.Extent, j), "%d is the id of no test point in points (a run lists the test points it scored, by their line)", id)
				return
			}
		}
	}
}

// header checks the settings, the grid's size, the point counts, and
// that a model and an extent are listed.
func (v *validator) header(r *Results) {
	v.settings(r.Settings)
	if r.Grid.Width <= 0 || r.Grid.Height <= 0 {
		v.fail("grid", "size %dx%d is not positive", r.Grid.Width, r.Grid.Height)
	}
	// A run scores north-up grids only (no rotation, cells of positive
	// width and negative height); the maps are drawn from these numbers.
	gt := r.Grid.GeoTransform
	for i, x := range gt {
		v.finite(fmt.Sprintf("grid.geotransform[%d]", i), x)
	}
	if gt[2] != 0 || gt[4] != 0 || !(gt[1] > 0) || !(gt[5] < 0) {
		v.fail("grid.geotransform", "%v is not a north-up grid (a run writes no rotation, a positive cell width and a negative cell height)", gt)
	}
	pc := r.PointCounts
	for _, c := range []struct {
		name string
		n    int
	}{{"train", pc.Train}, {"test", pc.Test}, {"thinned", pc.Thinned}, {"outside_raster", pc.OutsideRaster}, {"nodata", pc.NoData}} {
		v.nonNegInt("point_counts."+c.name, int64(c.n))
	}
	// A run scores at least one model on at least one extent (the base).
	if len(r.Models) == 0 {
		v.fail("models", "the list is empty; a run lists every model it scored")
	}
	if len(r.Extents) == 0 {
		v.fail("extents", "the list is empty; a run lists every extent of its family, the base extent first")
	}
	if len(r.Inputs) == 0 {
		v.fail("inputs", "the list is empty; a run records every input file it read (the models, the occurrences, the region)")
	}
}

// modelList checks each model's name (set, not repeated) and values, and
// records the names.
func (v *validator) modelList(ms []Model) {
	for i, m := range ms {
		at := fmt.Sprintf("models[%d] (%s)", i, m.Name)
		if m.Name == "" || v.models[m.Name] {
			v.fail(at, "name is empty or repeated")
		}
		v.models[m.Name] = true
		switch {
		case m.Role == RoleModel && m.NullKind != "":
			v.fail(at+".null_kind", "%q is set on a model (role %s); a run writes it for a null only", m.NullKind, RoleModel)
		case m.Role == RoleNull && m.NullKind != NullDistance && m.NullKind != NullRaster:
			v.fail(at+".null_kind", "%q is not %s or %s", m.NullKind, NullDistance, NullRaster)
		case m.Role != RoleModel && m.Role != RoleNull:
			v.fail(at+".role", "%q is not %s or %s", m.Role, RoleModel, RoleNull)
		}
		v.finite(at+".value_min", m.ValueMin)
		v.finite(at+".value_max", m.ValueMax)
		v.unit(at+".floor_share", m.FloorShare)
	}
}

// extentList checks each extent's id, status and measures, and records
// the ids.
func (v *validator) extentList(es []Extent) {
	for i, e := range es {
		at := fmt.Sprintf("extents[%d] (%s)", i, e.ID)
		if e.ID == "" || v.extents[e.ID] {
			v.fail(at, "id is empty or repeated")
		}
		if e.DuplicateOf != "" && !v.extents[e.DuplicateOf] {
			v.fail(at+".duplicate_of", "%q is not an earlier extent", e.DuplicateOf)
		}
		v.extents[e.ID] = true
		if !slices.Contains(vocab.Kinds, e.Kind) {
			v.fail(at+".kind", "%q is not an extent kind (%s)", e.Kind, kindList())
		}
		switch e.Status {
		case vocab.StatusOK, vocab.StatusEmpty, vocab.StatusDuplicate:
		default:
			v.fail(at+".status", "%q is not %s, %s or %s", e.Status, vocab.StatusOK, vocab.StatusEmpty, vocab.StatusDuplicate)
		}
		v.nonNegInt(at+".cells", e.Cells)
		v.area(at+".area_km2", e.AreaKm2)
		v.unit(at+".share_of_raster", e.ShareOfRaster)
		v.nonNegInt(at+".train_points", int64(e.TrainPoints))
		v.nonNegInt(at+".test_points", int64(e.TestPoints))
	}
}

// ref checks that a record at at names a known model and extent.
func (v *validator) ref(at, model, ext string) {
	if !v.models[model] {
		v.fail(at, "model %q is not in models", model)
	}
	if !v.extents[ext] {
		v.fail(at, "extent %q is not in extents", ext)
	}
}

// scores checks each score and that there is exactly one per model and
// extent.
func (v *validator) scores(r *Results) {
	scored := map[[2]string]bool{}
	for i, s := range r.Scores {
		at := fmt.Sprintf("scores[%d] (model %s, extent %s)", i, s.Model, s.Extent)
		v.ref(at, s.Model, s.Extent)
		if scored[[2]string{s.Model, s.Extent}] {
			v.fail(at, "model %s on extent %s is scored twice", s.Model, s.Extent)
		}
		scored[[2]string{s.Model, s.Extent}] = true
		v.score(at, s)
	}
	// A run writes one score, scored or not, per model and extent.
	for _, m := range r.Models {
		for _, e := range r.Extents {
			if !scored[[2]string{m.Name, e.ID}] {
				v.fail("scores", "hold no score of model %s on extent %s; a run writes one for every model and extent", m.Name, e.ID)
			}
		}
	}
}

// paired checks each paired difference's names, kind, method, counts and
// numbers.
func (v *validator) paired(ps []Paired) {
	for i, p := range ps {
		at := fmt.Sprintf("paired[%d] (%s, model %s, extent %s)", i, p.Metric, p.Model, p.Extent)
		v.ref(at, p.Model, p.Extent)
		v.ref(at+" other side", p.OtherModel, p.OtherExtent)
		switch p.Kind {
		case PairedKindExtent, PairedKindModel, PairedKindNull:
		default:
			v.fail(at+".kind", "%q is not %s, %s or %s", p.Kind, PairedKindExtent, PairedKindModel, PairedKindNull)
		}
		switch p.Method {
		case "placements", "paired_resamples":
			// A defined difference of these methods has its SE and
			// interval: one deleted would otherwise read as none.
			for _, x := range []struct {
				name string
				v    *float64
			}{{"se", p.SE}, {"ci_low", p.Low}, {"ci_high", p.High}} {
				if p.Defined && x.v == nil {
					v.fail(at+"."+x.name, "is missing from a defined difference of method %s", p.Method)
				}
			}
		case "point_difference":
			// Described, not judged: no interval, no resamples.
			if p.SE != nil || p.Low != nil || p.High != nil || p.Resamples != 0 {
				v.fail(at, "a point_difference has no se, ci_low, ci_high or resamples")
			}
			if !NotCalibrated(p.Metric, p.Kind) {
				v.fail(at+".method", "point_difference is the method of the differences described, not judged (the Boyce index's, and the partial ROC ratio's between extents), not of %s of kind %s", p.Metric, p.Kind)
			}
		default:
			v.fail(at+".method", "%q is not placements, paired_resamples or point_difference", p.Method)
		}
		v.nonNegInt(at+".common_points", int64(p.CommonPoints))
		v.nonNegInt(at+".resamples", int64(p.Resamples))
		v.between(at+".resamples_not_formed", float64(p.NotFormed), 0, float64(max(p.Resamples, 0)))
		for _, x := range []struct {
			name string
			v    float64
		}{{"a", p.A}, {"b", p.B}, {"diff", p.Diff}, {"test_set_shift", p.TestSetShift}} {
			v.finite(at+"."+x.name, x.v)
		}
		for _, x := range []struct {
			name string
			v    *float64
		}{{"ci_low", p.Low}, {"ci_high", p.High}} {
			if x.v != nil {
				v.finite(at+"."+x.name, *x.v)
			}
		}
		if p.SE != nil {
			v.nonNeg(at+".se", *p.SE)
		}
	}
}

// pairedComplete checks that paired holds, for every comparison a run
// makes (PairJobs), its AUC record: a list emptied or cut by hand would
// otherwise be read as differences that could not be formed, and the
// report would call every verdict undetermined.
func (v *validator) pairedComplete(r *Results) {
	has := map[PairJob]bool{}
	for _, p := range r.Paired {
		if p.Metric == "auc" {
			has[PairJob{p.Kind, p.Model, p.Extent, p.OtherModel, p.OtherExtent}] = true
		}
	}
	ids := make([]string, len(r.Extents))
	for i, e := range r.Extents {
		ids[i] = e.ID
	}
	for _, j := range PairJobs(r.Models, ids, r.Scores) {
		if !has[j] {
			v.fail("paired", "hold no AUC difference of model %s on extent %s minus model %s on extent %s (kind %s); a run writes one for every comparison of scored models and extents", j.Model, j.Extent, j.OtherModel, j.Other, j.Kind)
			return
		}
	}
}

// kindList is the extent kinds as a message lists them.
func kindList() string {
	names := make([]string, len(vocab.Kinds))
	for i, k := range vocab.Kinds {
		names[i] = string(k)
	}
	return strings.Join(names, ", ")
}

// rings checks each ring step's names, AUCs and areas.
func (v *validator) rings(gs []Ring) {
	for i, g := range gs {
		at := fmt.Sprintf("rings[%d] (model %s, %s to %s)", i, g.Model, g.Inner, g.Outer)
		v.ref(at, g.Model, g.Inner)
		v.ref(at, g.Model, g.Outer)
		v.unit(at+".auc_inner", g.AUCInner)
		v.unit(at+".auc_ring", g.AUCRing)
		v.unit(at+".auc_outer", g.AUCOuter)
		v.area(at+".inner_area_km2", g.InnerAreaKm2)
		v.area(at+".ring_area_km2", g.RingAreaKm2)
		v.nonNegInt(at+".ring_cells", g.RingCells)
		v.finite(at+".share_of_change", g.ShareOfChange)
	}
}

// curves checks each ROC curve's names and points.
func (v *validator) curves(cs []Curve) {
	for i, c := range cs {
		at := fmt.Sprintf("curves[%d] (model %s, extent %s)", i, c.Model, c.Extent)
		v.ref(at, c.Model, c.Extent)
		if len(c.X) != len(c.Y) {
			v.fail(at, "x has %d values and y %d", len(c.X), len(c.Y))
		}
		for k := range c.X {
			v.unit(fmt.Sprintf("%s.x[%d]", at, k), c.X[k])
		}
		for k := range c.Y {
			v.unit(fmt.Sprintf("%s.y[%d]", at, k), c.Y[k])
		}
	}
}

// curvesComplete checks that there is exactly one ROC curve per scored
// model and extent, and none of an unscored one, as a run writes them.
func (v *validator) curvesComplete(r *Results) {
	n := map[[2]string]int{}
	for _, c := range r.Curves {
		n[[2]string{c.Model, c.Extent}]++
	}
	for _, s := range r.Scores {
		k := [2]string{s.Model, s.Extent}
		switch {
		case s.Scored && n[k] == 0:
			v.fail("curves", "hold no ROC curve of model %s on extent %s, which is scored; a run writes one for every scored model and extent", s.Model, s.Extent)
		case n[k] > 1:
			v.fail("curves", "hold %d ROC curves of model %s on extent %s; a run writes one", n[k], s.Model, s.Extent)
		case !s.Scored && n[k] > 0:
			v.fail("curves", "hold a ROC curve of model %s on extent %s, which is not scored; a run writes none there", s.Model, s.Extent)
		}
	}
}

// omissions checks each omitted point's model and value.
func (v *validator) omissions(om []Omission) {
	for i, o := range om {
		at := fmt.Sprintf("omissions[%d] (model %s)", i, o.Model)
		if !v.models[o.Model] {
			v.fail(at, "model %q is not in models", o.Model)
		}
		v.finite(at+".value", o.Value)
	}
}

// omissionsComplete checks that omissions hold, for every threshold of a
// scored model (its scores' thresholds, which do not depend on the
// extent; fixed thresholds share one name and differ by value), the list
// of the test points the model omits there: a list emptied or edited by
// hand dropped the omitted points from the maps without a word.
func (v *validator) omissionsComplete(r *Results) {
	type key struct {
		model, name string
		value       float64
	}
	has := map[key]bool{}
	for _, o := range r.Omissions {
		has[key{o.Model, string(o.Threshold), o.Value}] = true
	}
	for _, s := range r.Scores {
		if !s.Scored {
			continue
		}
		for _, t := range s.Thresholds {
			if !has[key{s.Model, string(t.Name), t.Value}] {
				v.fail("omissions", "hold no list of the test points model %s omits at the threshold %s (value %v, as its scores give it); a run writes one for every threshold of a scored model", s.Model, t.Name, t.Value)
				return
			}
		}
	}
}

// points checks each occurrence's role, status, coordinates and cell on
// grid g.
func (v *validator) points(ps []Point, g Grid) {
	for i, p := range ps {
		at := fmt.Sprintf("points[%d] (line %d)", i, p.ID)
		if p.Role != vocab.RoleTrain && p.Role != vocab.RoleTest {
			v.fail(at+".role", "%q is not train or test", p.Role)
		}
		switch p.Status {
		case vocab.PointScored, vocab.PointOutsideRaster, vocab.PointNoData, vocab.PointThinned:
		default:
			v.fail(at+".status", "%q is not scored, outside_raster, nodata or thinned", p.Status)
		}
		v.finite(at+".lon", p.Lon)
		v.finite(at+".lat", p.Lat)
		// A point outside the raster has no cell (-1, -1); any other lies
		// on one.
		if p.Status == vocab.PointOutsideRaster {
			if p.Row != -1 || p.Col != -1 {
				v.fail(at, "row %d, col %d: a point outside the raster has row -1 and col -1", p.Row, p.Col)
			}
		} else if p.Row < 0 || p.Row >= g.Height || p.Col < 0 || p.Col >= g.Width {
			v.fail(at, "row %d, col %d is not a cell of the %dx%d grid", p.Row, p.Col, g.Width, g.Height)
		}
		v.nonNeg(at+".nearest_train_km", p.NearestTrainKm)
	}
}

// pointCounts checks that point_counts counts the points by status (and
// the scored ones by role), as a run writes them: a points list emptied
// or cut by hand would otherwise drop the points from the maps and the
// check of test points near training points (and its warning) without a
// word.
func (v *validator) pointCounts(pc PointCounts, ps []Point) {
	var n PointCounts
	for _, p := range ps {
		switch p.Status {
		case vocab.PointScored:
			if p.Role == vocab.RoleTrain {
				n.Train++
			} else {
				n.Test++
			}
		case vocab.PointThinned:
			n.Thinned++
		case vocab.PointOutsideRaster:
			n.OutsideRaster++
		case vocab.PointNoData:
			n.NoData++
		}
	}
	for _, c := range []struct {
		name, what string
		want, got  int
	}{{"train", "scored training points", pc.Train, n.Train}, {"test", "scored test points", pc.Test, n.Test},
		{"thinned", "thinned points", pc.Thinned, n.Thinned}, {"outside_raster", "points outside the raster", pc.OutsideRaster, n.OutsideRaster},
		{"nodata", "points on no-data cells", pc.NoData, n.NoData}} {
		if c.want != c.got {
			v.fail("point_counts."+c.name, "%d, but points lists %d %s; a run counts every point it lists", c.want, c.got, c.what)
			return
		}
	}
}

// validator keeps the first problem found.
// validator gathers Validate's first problem; file names the file in it.
type validator struct {
	file string
	err  error
	// models and extents are the names listed so far, for the records
	// that refer to them (ref).
	models, extents map[string]bool
	// E are the settings' E values, which every scored score holds.
	E []float64
	// frac is settings.resample_fraction.
	frac float64
	// iters is settings.iterations.
	iters int
}

// randomTest checks the area-random test of partial ROC entry p (at pa):
// a run writes p_random = (1 + k) / (1 + random_draws_formed) with k at
// most the formed draws, these at most settings.iterations, only on a
// defined ratio, and p_random_note only where p_random is absent.
func (v *validator) randomTest(pa string, p PartialROC) {
	d := p.RandomFormed
	switch {
	case d < 0:
		v.fail(pa+".random_draws_formed", "%d is negative", d)
	case d > metrics.RandomDraws(v.iters):
		v.fail(pa+".random_draws_formed", "%d is more than the draws a run makes, %d (settings.iterations, at most %d)", d, metrics.RandomDraws(v.iters), metrics.MaxRandomDraws)
	case p.PRandom == 0:
	case !p.Defined:
		v.fail(pa+".p_random", "is given on an undefined ratio; a run tests only a defined ratio against random")
	case p.PRandomNote != "":
		v.fail(pa+".p_random_note", "is given beside p_random; a run writes it only where p_random is absent")
	case d == 0:
		v.fail(pa+".random_draws_formed", "is 0 beside p_random %g; a p is formed from at least one draw", p.PRandom)
	default:
		k := p.PRandom*float64(d+1) - 1
		if k < -1e-6 || math.Abs(k-math.Round(k)) > 1e-6 {
			v.fail(pa+".p_random", "%g is not (1 + k) / (1 + %d) for a count k of draws, as a Monte Carlo p-value from %d formed draws is", p.PRandom, d, d)
		}
	}
}

// partialEs lists the E of each partial ROC entry.
func partialEs(ps []PartialROC) []float64 {
	es := make([]float64, len(ps))
	for i, p := range ps {
		es[i] = p.E
	}
	return es
}

func (v *validator) fail(at, format string, args ...any) {
	if v.err == nil {
		v.err = fmt.Errorf("report: %s %s: %s; the file was changed or damaged: restore it from a copy, or rerun areasweep run to get a new one", v.file, cutLong(at), cutLong(fmt.Sprintf(format, args...)))
	}
}

// longWord is a run of more than 80 characters without a space: a name,
// id or text of a hand-edited file that a message would repeat in full.
var longWord = regexp.MustCompile(`[^\s,;]{81,}`)

// cutLong shortens each long word of s to its first 60 characters, so
// that a message stays a few lines (a model named with 100,000
// characters made a message of 100 kB).
func cutLong(s string) string {
	return longWord.ReplaceAllStringFunc(s, func(w string) string {
		r := []rune(w)
		if len(r) <= 80 {
			return w
		}
		return fmt.Sprintf("%s... (%d characters)", string(r[:60]), len(r))
	})
}

func (v *validator) finite(at string, x float64) {
	if math.IsNaN(x) || math.IsInf(x, 0) {
		v.fail(at, "%v is not a finite number", x)
	}
}

// maxPartialRatio bounds a partial ROC ratio (metrics.PartialROC): the
// model area is at most 1 - x_E (y <= 1) and the null area is (1 - x_E^2)/2,
// so the ratio is at most 2/(1 + x_E) <= 2. A standard deviation of values
// in [0, 2] is at most 2 (a loose bound: half the range times
// sqrt(n/(n-1)) <= sqrt(2) for the sample SD of n >= 2 values), and an
// AUC's (values in [0, 1]) at most 1.
const maxPartialRatio = 2

// MaxAreaKm2 bounds every area a results file may hold: the surface of
// the WGS84 ellipsoid, 510,065,621.7 km² (S = 2 pi a^2 + pi (b^2/e)
// ln((1+e)/(1-e)), the oblate spheroid's area; TestMaxAreaIsTheEllipsoid
// recomputes it from a and f), rounded up. A larger area is no extent on
// the Earth, and would take the figures' area axes and colour bars out of
// any range they can draw.
const MaxAreaKm2 = 510_065_622.0

// area checks an area in km²: in [0, MaxAreaKm2].
func (v *validator) area(at string, x float64) {
	if !(x >= 0 && x <= MaxAreaKm2) {
		v.fail(at, "%v km² is outside [0, %.0f], the area of the Earth", x, MaxAreaKm2)
	}
}

func (v *validator) between(at string, x, lo, hi float64) {
	if !(x >= lo && x <= hi) {
		v.fail(at, "%v is outside [%g, %g]", x, lo, hi)
	}
}

func (v *validator) unit(at string, x float64) { v.between(at, x, 0, 1) }

func (v *validator) nonNeg(at string, x float64) {
	if !(x >= 0) || math.IsInf(x, 0) {
		v.fail(at, "%v is not a finite number >= 0", x)
	}
}

func (v *validator) nonNegInt(at string, x int64) {
	if x < 0 {
		v.fail(at, "%d is negative", x)
	}
}

func (v *validator) settings(s Settings) {
	// A run scores at least one E, each once (run refuses --e empty or
	// with a value twice); the report would drop partial ROC from its
	// verdicts, or judge one E twice.
	if len(s.E) == 0 {
		v.fail("settings.e", "the list is empty; a run lists every E it scored (at least one)")
	}
	for i, e := range s.E {
		if !(e > 0 && e < 1) {
			v.fail(fmt.Sprintf("settings.e[%d]", i), "%v is outside (0, 1)", e)
		}
		if slices.Contains(s.E[:i], e) {
			v.fail(fmt.Sprintf("settings.e[%d]", i), "%v is given twice; a run scores each E once", e)
		}
	}
	v.E, v.frac, v.iters = s.E, s.ResampleFraction, s.Iterations
	// The verdicts are recomputed against these: a tolerance of 0 or
	// below (one a run refuses) would turn them upside down ("against the
	// tolerance of ±-1").
	for _, t := range []struct {
		name string
		x    float64
	}{{"tolerance_auc", s.ToleranceAUC}, {"tolerance_partial_roc", s.TolerancePartialROC}, {"tolerance_omission", s.ToleranceOmission}, {"tolerance_boyce", s.ToleranceBoyce}} {
		if !(t.x > 0) || math.IsInf(t.x, 0) {
			v.fail("settings."+t.name, "%v is not a positive number; a run writes the positive difference it treats as negligible (as --%s takes it)", t.x, strings.ReplaceAll(t.name, "_", "-"))
		}
	}
	for i, t := range s.FixedThresholds {
		v.finite(fmt.Sprintf("settings.fixed_thresholds[%d]", i), t)
	}
	// A run draws at least one resample of each kind (--iterations is at
	// least 1, and the paired resamples are as many): 0 or fewer, edited
	// in, read in the methods as "a bootstrap of 0 resamples ... p is not
	// resolved below 1/0" and "from -5 full-size resamples".
	if s.Iterations < 1 {
		v.fail("settings.iterations", "%d is below 1; a run draws at least 1 resample (as --iterations takes it)", s.Iterations)
	} else if s.Iterations > metrics.MaxIterations {
		v.fail("settings.iterations", "%d is above %d, the most resamples a run draws (as --iterations takes it)", s.Iterations, metrics.MaxIterations)
	}
	if s.PairedResamples < 1 {
		v.fail("settings.paired_resamples", "%d is below 1; a run draws as many paired resamples as --iterations, at least 1", s.PairedResamples)
	} else if s.PairedResamples > metrics.MaxIterations {
		v.fail("settings.paired_resamples", "%d is above %d; a run draws as many paired resamples as --iterations, at most %d", s.PairedResamples, metrics.MaxIterations, metrics.MaxIterations)
	}
	v.unit("settings.resample_fraction", s.ResampleFraction)
	v.nonNeg("settings.boyce_window", s.BoyceWindow)
	if s.BoyceSteps < 0 {
		v.fail("settings.boyce_steps", "%d is negative", s.BoyceSteps)
	}
}

func (v *validator) score(at string, s Score) {
	v.nonNegInt(at+".cells", s.Cells)
	v.area(at+".area_km2", s.AreaKm2)
	for _, c := range []struct {
		name string
		n    int
	}{{"test_points", s.TestPoints}, {"train_points", s.TrainPoints}, {"test_points_outside", s.TestOutside}, {"train_points_outside", s.TrainOutside}} {
		v.nonNegInt(at+"."+c.name, int64(c.n))
	}
	if !s.Scored {
		return
	}
	if len(s.TestPointIDs) != s.TestPoints || len(s.Placements) != s.TestPoints || len(s.PlacementsUnweighted) != s.TestPoints {
		v.fail(at, "test_points is %d but test_point_ids, placements and placements_unweighted hold %d, %d and %d values",
			s.TestPoints, len(s.TestPointIDs), len(s.Placements), len(s.PlacementsUnweighted))
	}

	v.unit(at+".auc", s.AUC)
	v.unit(at+".auc_unweighted", s.AUCUnweighted)
	v.unit(at+".auc_train", s.AUCTrain)
	v.between(at+".auc_boot_sd", s.AUCBootSD, 0, 1)
	// A scored score holds one partial ROC entry per E of the settings,
	// in their order: an entry removed, or its E changed, would drop a row
	// from the report's tables or add one for an E the run never scored.
	if es := partialEs(s.PartialROC); !slices.Equal(es, v.E) {
		v.fail(at+".partial_roc", "holds E %v, but settings.e is %v; a run scores each E of its settings on every scored extent", es, v.E)
	}
	for k, p := range s.PartialROC {
		pa := fmt.Sprintf("%s.partial_roc[%d]", at, k)
		if !(p.E > 0 && p.E < 1) {
			v.fail(pa+".e", "%v is outside (0, 1)", p.E)
		}
		v.between(pa+".ratio", p.Ratio, 0, maxPartialRatio)
		v.between(pa+".ratio_mean", p.RatioMean, 0, maxPartialRatio)
		v.between(pa+".ratio_sd", p.RatioSD, 0, maxPartialRatio)
		v.between(pa+".ci_low", p.CILow, 0, maxPartialRatio)
		v.between(pa+".ci_high", p.CIHigh, 0, maxPartialRatio)
		v.unit(pa+".p_value", p.PValue)
		v.unit(pa+".p_random", p.PRandom)
		v.randomTest(pa, p)
		if p.Iterations < 0 || p.NotFormed < 0 || p.NotFormed > p.Iterations {
			v.fail(pa, "iterations %d and iterations_not_formed %d do not fit", p.Iterations, p.NotFormed)
		}
		// Whether the report gives the bootstrap's interval and P rests
		// on it (BootstrapReadable).
		if want := metrics.ResampleSize(v.frac, s.TestPoints); p.Iterations > 0 && v.frac > 0 && p.ResampleSize != want {
			v.fail(pa+".resample_size", "is %d, but a resample of %s of the %d test points draws %d", p.ResampleSize, fmtG(v.frac), s.TestPoints, want)
		}
	}
	for k, t := range s.Thresholds {
		ta := fmt.Sprintf("%s.thresholds[%d] (%s)", at, k, t.Name)
		v.finite(ta+".value", t.Value)
		v.unit(ta+".omission", t.Omission)
		v.unit(ta+".area_fraction", t.AreaFraction)
		v.unit(ta+".p_binomial", t.PBinomial)
		if t.N < 0 || t.Successes < 0 || t.Successes > t.N {
			v.fail(ta, "successes %d of n %d do not fit", t.Successes, t.N)
		}
	}
	if b := s.Boyce; b != nil {
		v.between(at+".boyce.index", b.Index, -1, 1)
		if len(b.Mid) != len(b.Ratio) {
			v.fail(at+".boyce", "window_mid has %d values and pe_ratio %d", len(b.Mid), len(b.Ratio))
		}
		for k := range b.Mid {
			v.finite(fmt.Sprintf("%s.boyce.window_mid[%d]", at, k), b.Mid[k])
		}
		for k := range b.Ratio {
			v.nonNeg(fmt.Sprintf("%s.boyce.pe_ratio[%d]", at, k), b.Ratio[k])
		}
		if b.Windows < 0 || b.Used < 0 || b.Used > b.Windows {
			v.fail(at+".boyce", "windows %d and windows_used %d do not fit", b.Windows, b.Used)
		}
	}
}

func (v *validator) preview(pv *Preview, nExt int) {
	if pv.Width <= 0 || pv.Height <= 0 || pv.Width > MaxPreviewSide || pv.Height > MaxPreviewSide {
		v.fail("preview", "size %dx%d is outside 1..%d per side", pv.Width, pv.Height, MaxPreviewSide)
		return
	}
	n := pv.Width * pv.Height
	if vals, err := base64.StdEncoding.DecodeString(pv.Values); err != nil || len(vals) != n {
		v.fail("preview.values", "does not hold %d base64-coded bytes", n)
	}
	if len(pv.Masks) != nExt {
		v.fail("preview.masks", "has %d masks for %d extents", len(pv.Masks), nExt)
	}
	for k, m := range pv.Masks {
		if bits, err := base64.StdEncoding.DecodeString(m); err != nil || len(bits)*8 < n {
			v.fail(fmt.Sprintf("preview.masks[%d]", k), "does not hold %d base64-coded bits", n)
		}
	}
	for i, b := range pv.Bounds {
		v.finite(fmt.Sprintf("preview.bounds[%d]", i), b)
	}
	v.finite("preview.value_min", pv.ValueMin)
	v.finite("preview.value_max", pv.ValueMax)
}
