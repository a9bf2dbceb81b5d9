package report

import (
	"encoding/json"
	"fmt"
	"math"
	"os"
	"path/filepath"
	"runtime/debug"
	"strings"
	"testing"
	"time"
)

// TestValidateSample: the synthetic run made with numpy/SciPy
// (testdata/report/sample_results.json, see gen_sample.py) holds only
// values a run can produce, so it passes.
func TestValidateSample(t *testing.T) {
	r := loadSample(t)
	if err := Validate(r); err != nil {
		t.Fatal(err)
	}
}

// TestValidateRefuses: each edit makes one value impossible; Validate must
// name the field and the value.
func TestValidateRefuses(t *testing.T) {
	firstScored := func(r *Results) *Score {
		for i := range r.Scores {
			if r.Scores[i].Scored {
				return &r.Scores[i]
			}
		}
		t.Fatal("sample has no scored score")
		return nil
	}
	cases := []struct {
		name string
		edit func(r *Results)
		want string
	}{
		{"AUC -5", func(r *Results) { firstScored(r).AUC = -5 }, ".auc: -5 is outside [0, 1]"},
		{"AUC above 1", func(r *Results) { firstScored(r).AUCUnweighted = 1.5 }, ".auc_unweighted: 1.5"},
		{"negative area", func(r *Results) { r.Extents[0].AreaKm2 = -1 }, "extents[0]"},
		{"repeated extent id", func(r *Results) { r.Extents[1].ID = r.Extents[0].ID }, "id is empty or repeated"},
		{"unknown model", func(r *Results) { r.Scores[0].Model = "ghost" }, `model "ghost" is not in models`},
		{"omission above 1", func(r *Results) { firstScored(r).Thresholds[0].Omission = 2 }, ".omission: 2"},
		{"successes above n", func(r *Results) { th := &firstScored(r).Thresholds[0]; th.Successes = th.N + 1 }, "do not fit"},
		{"E outside (0,1)", func(r *Results) { r.Settings.E = []float64{1.5} }, "settings.e[0]"},
		{"point role", func(r *Results) { r.Points[0].Role = "both" }, `"both" is not train or test`},
		{"curve lengths", func(r *Results) { r.Curves[0].Y = r.Curves[0].Y[:1] }, "x has"},
		{"grid of no cells", func(r *Results) { r.Grid.Width = 0 }, "grid: size 0x"},
		{"negative point count", func(r *Results) { r.PointCounts.Train = -3 }, "point_counts.train: -3"},
		{"extent status", func(r *Results) { r.Extents[0].Status = "weird" }, `.status: "weird" is not ok`},
		{"score missing", func(r *Results) { r.Scores = r.Scores[1:] }, "hold no score of model"},
		{"no scores", func(r *Results) { r.Scores = nil }, "hold no score of model"},
		{"score twice", func(r *Results) { r.Scores[1].Extent = r.Scores[0].Extent }, "scored twice"},
		{"placements length", func(r *Results) { s := firstScored(r); s.Placements = append(s.Placements, 0.5) }, "placements and placements_unweighted hold"},
		{"paired unknown extent", func(r *Results) { r.Paired[0].OtherExtent = "ghost" }, `extent "ghost" is not in extents`},
		{"boyce index", func(r *Results) {
			for i := range r.Scores {
				if r.Scores[i].Boyce != nil {
					r.Scores[i].Boyce.Index = 3
					return
				}
			}
		}, "boyce.index: 3"},
		{"area above the Earth's", func(r *Results) { r.Extents[1].AreaKm2 = 1e308 }, "area_km2: 1e+308 km² is outside [0, 510065622]"},
		{"score area above the Earth's", func(r *Results) { firstScored(r).AreaKm2 = 6e8 }, "area_km2: 6e+08 km²"},
		{"partial ROC ratio above 2", func(r *Results) { firstScored(r).PartialROC[0].Ratio = 1.7e308 }, "partial_roc[0].ratio: 1.7e+308 is outside [0, 2]"},
		{"partial ROC interval above 2", func(r *Results) { firstScored(r).PartialROC[0].CIHigh = 2.5 }, "ci_high: 2.5 is outside [0, 2]"},
		{"AUC resample SD above 1", func(r *Results) { firstScored(r).AUCBootSD = 3 }, "auc_boot_sd: 3 is outside [0, 1]"},
		// The report gives the bootstrap's interval and P by it.
		{"resample size edited", func(r *Results) { firstScored(r).PartialROC[0].ResampleSize = 40 }, "partial_roc[0].resample_size: is 40, but a resample of 0.5 of the"},
		// The area-random test (found by the p_random audit; accepted
		// before): more formed draws than settings.iterations drew, a p
		// on an undefined ratio (the report would show it, and the
		// model-above-null reading rest on it), a p and a note saying
		// why there is none, a p and no formed draw, a p off the
		// (1 + k) / (1 + draws) grid.
		{"random draws above iterations", func(r *Results) {
			p := &firstScored(r).PartialROC[0]
			p.PRandom, p.RandomFormed = 1e-9, 1_000_000_000
		}, "partial_roc[0].random_draws_formed: 1000000000 is more than the draws a run makes"},
		{"p_random on an undefined ratio", func(r *Results) {
			p := &firstScored(r).PartialROC[0]
			p.Defined, p.PRandom, p.RandomFormed = false, 0.5, 1
		}, "partial_roc[0].p_random: is given on an undefined ratio"},
		{"p_random and a note", func(r *Results) {
			p := &firstScored(r).PartialROC[0]
			p.Defined, p.PRandom, p.RandomFormed, p.PRandomNote = true, 0.5, 1, "no draw formed a ratio"
		}, "partial_roc[0].p_random_note: is given beside p_random"},
		{"p_random without draws", func(r *Results) {
			p := &firstScored(r).PartialROC[0]
			p.Defined, p.PRandom, p.RandomFormed = true, 1, 0
		}, "partial_roc[0].random_draws_formed: is 0 beside p_random"},
		{"p_random off the grid", func(r *Results) {
			p := &firstScored(r).PartialROC[0]
			p.Defined, p.PRandom, p.RandomFormed = true, 0.3, 3
		}, "partial_roc[0].p_random: 0.3 is not (1 + k) / (1 + 3)"},
		{"negative random draws", func(r *Results) { firstScored(r).PartialROC[0].RandomFormed = -3 }, "partial_roc[0].random_draws_formed: -3 is negative"},
		// Accepted before; found by editing results.json at random.
		{"paired negative SE", func(r *Results) { r.Paired[0].SE = Float(-0.1) }, ".se: -0.1"},
		{"paired negative resamples", func(r *Results) { r.Paired[0].Resamples = -4 }, ".resamples: -4"},
		{"paired more not formed than drawn", func(r *Results) { p := &r.Paired[0]; p.NotFormed = p.Resamples + 1 }, ".resamples_not_formed"},
		{"paired unknown method", func(r *Results) { r.Paired[0].Method = "guess" }, `.method: "guess" is not placements, paired_resamples or point_difference`},
		{"paired unknown kind", func(r *Results) { r.Paired[0].Kind = "other" }, `.kind: "other" is not extent`},
		// Schema version 6: a judged difference has its interval, a
		// point_difference has none and is only a described one's.
		{"judged difference without its interval", func(r *Results) {
			for i := range r.Paired {
				if p := &r.Paired[i]; p.Defined && p.Method == "placements" {
					p.Low = nil
					return
				}
			}
		}, ".ci_low: is missing from a defined difference of method placements"},
		{"point difference with an interval", func(r *Results) {
			for i := range r.Paired {
				if p := &r.Paired[i]; p.Defined && p.Method == "point_difference" {
					p.SE = Float(0.01)
					return
				}
			}
		}, "a point_difference has no se, ci_low, ci_high or resamples"},
		{"point difference of the AUC", func(r *Results) {
			p := &r.Paired[0]
			p.Method, p.SE, p.Low, p.High, p.Resamples, p.NotFormed = "point_difference", nil, nil, nil, 0, 0
		}, ".method: point_difference is the method of the differences described, not judged"},
		{"paired infinite difference", func(r *Results) { r.Paired[0].Diff = math.Inf(1) }, ".diff"},
		{"scored point off the grid", func(r *Results) {
			for i := range r.Points {
				if r.Points[i].Status == "scored" {
					r.Points[i].Col = -1
					return
				}
			}
		}, "col -1 is not a cell of the"},
		// A points list emptied or cut by hand dropped the points from
		// the maps and the near-training-point warning without a word
		// (an audit of hand-edited files); the sample's point_counts count its points.
		{"points emptied", func(r *Results) { r.Points = nil }, "point_counts.train: 50, but points lists 0 scored training points"},
		{"a test point removed", func(r *Results) {
			for i := range r.Points {
				if r.Points[i].Status == "scored" && r.Points[i].Role == "test" {
					r.Points = append(r.Points[:i], r.Points[i+1:]...)
					return
				}
			}
		}, "point_counts.test: 22, but points lists 21 scored test points"},
		// Accepted before, found by editing a run's results.json by hand:
		// the verdicts were recomputed against a tolerance of -1 ("against
		// the tolerance of ±-1 set for this run"), an empty or repeated E
		// list dropped or doubled partial ROC, and a score's partial ROC
		// entry removed or given another E dropped a row or added one for
		// an E the run never scored. A run refuses such settings and
		// writes one entry per E of its settings on every scored extent.
		// The maps of a grid edited to a rotation or a cell of no width
		// were drawn without a word; a run writes north-up grids only.
		// Accepted before, found by emptying lists of a run's
		// results.json by hand: "paired": [] re-rendered every verdict
		// as "undetermined (no difference could be formed)", "curves": []
		// drew no ROC curve, "inputs": [] dropped the provenance table,
		// "omissions": [] the omitted test points from the maps,
		// and an unknown model role or extent kind was printed as it
		// stood (a role other than null read as a model). A run writes
		// an AUC difference for every comparison of scored models and
		// extents (PairJobs), one curve per scored model and extent, the
		// inputs it read, and only the roles and kinds listed.
		{"paired emptied", func(r *Results) { r.Paired = nil }, "paired: hold no AUC difference of model good on extent region_b50 minus model good on extent base (kind extent)"},
		{"a paired AUC record removed", func(r *Results) {
			for i, p := range r.Paired {
				if p.Metric == "auc" && p.Kind == PairedKindModel {
					r.Paired = append(r.Paired[:i], r.Paired[i+1:]...)
					return
				}
			}
		}, "(kind model)"},
		{"curves emptied", func(r *Results) { r.Curves = nil }, "curves: hold no ROC curve of model good on extent base, which is scored"},
		{"a curve twice", func(r *Results) { r.Curves = append(r.Curves, r.Curves[0]) }, "curves: hold 2 ROC curves of model"},
		{"inputs emptied", func(r *Results) { r.Inputs = nil }, "inputs: the list is empty"},
		{"omissions emptied", func(r *Results) { r.Omissions = nil }, "omissions: hold no list of the test points model good omits at the threshold minimum_training_presence"},
		{"an omission's threshold value changed", func(r *Results) { r.Omissions[0].Value += 0.125 }, "omissions: hold no list of the test points model good omits at the threshold minimum_training_presence (value "},
		{"model role unknown", func(r *Results) { r.Models[0].Role = "banana" }, `models[0] (good).role: "banana" is not model or null`},
		{"null kind on a model", func(r *Results) { r.Models[0].NullKind = NullRaster }, `models[0] (good).null_kind: "raster" is set on a model`},
		{"null of unknown kind", func(r *Results) { r.Models[2].Role, r.Models[2].NullKind = RoleNull, "guess" }, `models[2] (broad).null_kind: "guess" is not distance_to_training or raster`},
		{"extent kind unknown", func(r *Results) { r.Extents[1].Kind = "banana" }, `extents[1] (region_b50).kind: "banana" is not an extent kind (base, region_buffer,`},
		{"rotated grid", func(r *Results) { r.Grid.GeoTransform[2] = 0.5 }, "grid.geotransform: ["},
		{"cell of no width", func(r *Results) { r.Grid.GeoTransform[1] = 0 }, "is not a north-up grid"},
		{"south-up grid", func(r *Results) { r.Grid.GeoTransform[5] = -r.Grid.GeoTransform[5] }, "is not a north-up grid"},
		{"tolerance of -1", func(r *Results) { r.Settings.ToleranceAUC = -1 }, "settings.tolerance_auc: -1 is not a positive number"},
		{"tolerance of 0", func(r *Results) { r.Settings.ToleranceBoyce = 0 }, "settings.tolerance_boyce: 0 is not a positive number"},
		{"infinite tolerance", func(r *Results) { r.Settings.TolerancePartialROC = math.Inf(1) }, "settings.tolerance_partial_roc: +Inf"},
		{"no E", func(r *Results) { r.Settings.E = nil }, "settings.e: the list is empty"},
		{"an E twice", func(r *Results) { r.Settings.E = []float64{0.05, 0.05} }, "settings.e[1]: 0.05 is given twice"},
		{"an E more in the settings", func(r *Results) { r.Settings.E = append(r.Settings.E, 0.2) }, ".partial_roc: holds E [0.05 0.1], but settings.e is [0.05 0.1 0.2]"},
		{"a partial ROC entry removed", func(r *Results) { s := firstScored(r); s.PartialROC = s.PartialROC[1:] }, ".partial_roc: holds E [0.1], but settings.e is [0.05 0.1]"},
		{"a partial ROC entry's E changed", func(r *Results) { firstScored(r).PartialROC[0].E = 0.07 }, ".partial_roc: holds E [0.07 0.1]"},
		// Accepted before, found by editing a run's results.json by hand:
		// the methods read "a bootstrap of 0 resamples ... p is not
		// resolved below 1/0" and "from -5 full-size resamples"; a run
		// writes both at least 1 (--iterations is at least 1).
		{"no iterations", func(r *Results) { r.Settings.Iterations = 0 }, "settings.iterations: 0 is below 1"},
		{"negative iterations", func(r *Results) { r.Settings.Iterations = -2 }, "settings.iterations: -2 is below 1"},
		{"no paired resamples", func(r *Results) { r.Settings.PairedResamples = 0 }, "settings.paired_resamples: 0 is below 1"},
		{"negative paired resamples", func(r *Results) { r.Settings.PairedResamples = -5 }, "settings.paired_resamples: -5 is below 1"},
		// Accepted before (helper probe of 2026-12-05): more resamples
		// than run takes, and a test point id naming no point, which the
		// report showed.
		{"iterations beyond a run's", func(r *Results) { r.Settings.Iterations = 1_000_000_000_000 }, "settings.iterations: 1000000000000 is above 1000000"},
		{"paired resamples beyond a run's", func(r *Results) { r.Settings.PairedResamples = 1_000_001 }, "settings.paired_resamples: 1000001 is above 1000000"},
		{"a test point id naming no point", func(r *Results) { r.Scores[0].TestPointIDs[0] = 999999 }, ".test_point_ids[0]: 999999 is the id of no test point in points"},
		{"point outside with a cell", func(r *Results) {
			r.Points[0].Status, r.Points[0].Row, r.Points[0].Col = "outside_raster", 2, 3
		}, "a point outside the raster has row -1 and col -1"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			r := loadSample(t)
			c.edit(r)
			err := Validate(r)
			if err == nil || !strings.Contains(err.Error(), c.want) {
				t.Fatalf("Validate = %v, want it to contain %q", err, c.want)
			}
		})
	}
}

// maxFuzzResults bounds the inputs FuzzResults looks at.
const maxFuzzResults = 64 << 10

// FuzzResults feeds arbitrary results.json files through what `areasweep
// report` does before writing: decode, Validate, and for files that pass,
// Analyze and the figure and methods text builders. Nothing may panic.
func FuzzResults(f *testing.F) {
	data, err := os.ReadFile(filepath.Join(sampleDir, "sample_results.json"))
	if err != nil {
		f.Fatal(err)
	}
	// A small seed cut from the sample (one model, three extents, no
	// points or curves), so that the mutator spends its time on structure
	// rather than on 350 kB of numbers.
	var small Results
	if err := json.Unmarshal(data, &small); err != nil {
		f.Fatal(err)
	}
	small.Models = small.Models[:1]
	small.Extents = small.Extents[:3]
	var scores []Score
	for _, sc := range small.Scores {
		if sc.Model == small.Models[0].Name && (sc.Extent == small.Extents[0].ID || sc.Extent == small.Extents[1].ID || sc.Extent == small.Extents[2].ID) {
			scores = append(scores, sc)
		}
	}
	small.Scores, small.Points, small.Curves, small.Rings, small.Omissions, small.Preview = scores, nil, nil, nil, nil, nil
	// Boyce windows make the seed long without adding structure.
	for i := range small.Scores {
		if b := small.Scores[i].Boyce; b != nil {
			n := min(2, len(b.Mid), len(b.Ratio))
			b.Mid, b.Ratio = b.Mid[:n], b.Ratio[:n]
		}
	}
	if b, err := json.Marshal(&small); err == nil {
		f.Add(b)
	}
	f.Add([]byte(`{"schema_version":1}`))
	f.Add([]byte(`{"schema_version":1,"models":[{"name":"m"}],"extents":[{"id":"a"}],"scores":[{"model":"m","extent":"a","scored":true,"auc":0.5}]}`))
	f.Fuzz(func(t *testing.T, b []byte) {
		if len(b) > maxFuzzResults {
			return // large files only slow the mutator; Validate's checks do not depend on size
		}
		// A hang is a failure too: after 20 s the worker dies with every
		// goroutine's stack.
		stop := time.AfterFunc(20*time.Second, func() {
			debug.SetTraceback("all")
			panic("FuzzResults: one input took over 20 s")
		})
		defer stop.Stop()
		var r Results
		if json.Unmarshal(b, &r) != nil || r.SchemaVersion != SchemaVersion {
			return
		}
		if Validate(&r) != nil {
			return
		}
		if Analyze(&r) != nil {
			return
		}
		_ = figures(&r)
		_ = methodsText(&r)
	})
}

// TestMaxAreaIsTheEllipsoid: MaxAreaKm2 is the surface of the WGS84
// ellipsoid rounded up, S = 2 pi a^2 + pi (b^2/e) ln((1+e)/(1-e)) (the
// oblate spheroid's area, any geodesy handbook), with a = 6378137 m and
// 1/f = 298.257223563 (the WGS84 definition).
func TestMaxAreaIsTheEllipsoid(t *testing.T) {
	a, f := 6378137.0, 1/298.257223563
	b := a * (1 - f)
	e := math.Sqrt(1 - b*b/(a*a))
	s := (2*math.Pi*a*a + math.Pi*b*b/e*math.Log((1+e)/(1-e))) / 1e6
	if !(MaxAreaKm2 >= s && MaxAreaKm2-s < 1) {
		t.Fatalf("MaxAreaKm2 = %.1f, the ellipsoid's area is %.3f km²", MaxAreaKm2, s)
	}
}

// TestExtremeValuesRender: values a results file may hold, however far
// from a real run's (an area of 1e-300 km² or the whole Earth, a Boyce P/E
// ratio of 1.7e308), pass Validate and draw every figure without an
// error, a panic or a hang. A P/E ratio of 1.7e308 once made the tick
// code loop for ever, and an area of 1e308 (now refused) indexed the
// colour bar out of range.
func TestExtremeValuesRender(t *testing.T) {
	r := loadSample(t)
	r.Extents[1].AreaKm2 = 1e-300
	r.Extents[2].AreaKm2 = MaxAreaKm2
	for i := range r.Scores {
		sc := &r.Scores[i]
		switch sc.Extent {
		case r.Extents[1].ID:
			sc.AreaKm2 = 1e-300
		case r.Extents[2].ID:
			sc.AreaKm2 = MaxAreaKm2
		}
		if b := sc.Boyce; b != nil && len(b.Ratio) > 0 {
			b.Ratio[0] = 1.7e308
		}
	}
	if err := Validate(r); err != nil {
		t.Fatal(err)
	}
	r.Sensitivity = nil
	if err := Analyze(r); err != nil {
		t.Fatal(err)
	}
	done := make(chan error, 1)
	go func() {
		for _, f := range figures(r) {
			if _, err := render(f, "svg"); err != nil {
				done <- fmt.Errorf("figure %s: %w", f.Name, err)
				return
			}
		}
		done <- nil
	}()
	select {
	case err := <-done:
		if err != nil {
			t.Fatal(err)
		}
	case <-time.After(2 * time.Minute):
		t.Fatal("the figures took over 2 minutes: a loop without end")
	}
}

// TestValidateTwoFixedThresholds: fixed thresholds share the name "fixed"
// and differ by value; a run with --thresholds 0.5,0.7 writes an omission
// list for each, and the check that every threshold has its list
// (omissionsComplete) must tell them apart by value, not refuse the file.
func TestValidateTwoFixedThresholds(t *testing.T) {
	r := loadSample(t)
	r.Settings.FixedThresholds = append(r.Settings.FixedThresholds, 0.7)
	for i := range r.Scores {
		s := &r.Scores[i]
		for _, th := range s.Thresholds {
			if th.Name == "fixed" {
				th.Value = 0.7
				s.Thresholds = append(s.Thresholds, th)
				break
			}
		}
	}
	for _, m := range r.Models {
		r.Omissions = append(r.Omissions, Omission{Model: m.Name, Threshold: "fixed", Value: 0.7, Omitted: []int{}})
	}
	if err := Validate(r); err != nil {
		t.Fatal(err)
	}
	// Without the list at 0.7 of one model, it is refused.
	r.Omissions = r.Omissions[:len(r.Omissions)-1]
	if err := Validate(r); err == nil || !strings.Contains(err.Error(), "omits at the threshold fixed (value 0.7") {
		t.Errorf("Validate = %v, want the list at 0.7 missing", err)
	}
}
