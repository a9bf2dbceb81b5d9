package report

import (
	"encoding/json"
	"math"
	"os"
	"path/filepath"
	"reflect"
	"strings"
	"testing"

	"areasweep/extent/vocab"
)

const sampleDir = "../testdata/report"

// loadSample reads testdata/report/sample_results.json (made by
// gen_sample.py from synthetic raw cells with numpy/scipy).
func loadSample(t testing.TB) *Results {
	t.Helper()
	r, err := Load(filepath.Join(sampleDir, "sample_results.json"))
	if err != nil {
		t.Fatal(err)
	}
	return r
}

func analyzedSample(t testing.TB) *Results {
	t.Helper()
	r := loadSample(t)
	if err := Analyze(r); err != nil {
		t.Fatal(err)
	}
	return r
}

// writtenPage writes r's report into a temporary folder and returns the
// folder and its report.html.
func writtenPage(t *testing.T, r *Results) (dir, page string) {
	t.Helper()
	dir = t.TempDir()
	if err := Write(dir, r); err != nil {
		t.Fatal(err)
	}
	b, err := os.ReadFile(filepath.Join(dir, "report.html"))
	if err != nil {
		t.Fatal(err)
	}
	return dir, string(b)
}

// analyzedJSON loads results.json text data (the sample's, edited by a
// test) through a temporary file, as a report command would read it, and
// analyzes it.
func analyzedJSON(t *testing.T, data []byte) *Results {
	t.Helper()
	p := filepath.Join(t.TempDir(), "results.json")
	if err := os.WriteFile(p, data, 0o644); err != nil {
		t.Fatal(err)
	}
	r, err := Load(p)
	if err != nil {
		t.Fatal(err)
	}
	if err := Analyze(r); err != nil {
		t.Fatal(err)
	}
	return r
}

// golden mirrors golden.json written by testdata/report/golden.py.
type golden struct {
	Spreads []struct {
		Metric, Model         string
		N                     int
		Extents               []string
		Min, Max, Range, Mean float64
		MinExtent             string `json:"min_extent"`
		MaxExtent             string `json:"max_extent"`
		SD                    float64
		SDDefined             bool `json:"sd_defined"`
	}
	BaseExtent    string `json:"base_extent"`
	TestPoints    []int  `json:"test_points"`
	ModelVerdicts []struct {
		Metric, Model string
		Verdict       Judgement
		Largest       int
		Diffs         []struct {
			Extent    string
			Defined   bool
			Diff      float64
			Low, High *float64 // null for a point_difference
			Position  string
		}
	} `json:"model_verdicts"`
	Verdicts []struct {
		Metric                          string
		Verdict                         Judgement
		Sensitive, Robust, Undetermined []string
	}
	Rankings []struct {
		Metric, Model, Other                string
		Extents, Better, Worse, WithinNoise int `json:"-"`
	}
	Decompositions []struct {
		Metric          string
		Extents         []string
		GrandMean       float64 `json:"grand_mean"`
		SSTotal         float64 `json:"ss_total"`
		SSExtent        float64 `json:"ss_extent"`
		SSModel         float64 `json:"ss_model"`
		SSResidual      float64 `json:"ss_residual"`
		ShareExtent     float64 `json:"share_extent"`
		ShareModel      float64 `json:"share_model"`
		ShareResidual   float64 `json:"share_residual"`
		Ranks           [][]float64
		BaseExtent      string   `json:"base_extent"`
		DiffersFromBase []string `json:"differs_from_base"`
		KendallW        float64  `json:"kendall_w"`
	}
	Chains []struct {
		Chain, Model string
		Members      []string
		StartAUC     float64 `json:"start_auc"`
		EndAUC       float64 `json:"end_auc"`
		Change       float64
		Steps        []struct {
			Kind        StepKind
			Outer       string
			Change      float64
			Share       float64
			MixResidual float64 `json:"mix_residual"`
		}
		Slope struct {
			PerDoubling float64 `json:"per_doubling"`
			Intercept   float64
			R2          float64
		}
	}
	Truncation []struct {
		Model     string
		FloorFlag bool `json:"floor_flag"`
		Flag      bool
		Tails     []struct {
			Extent string
			Jump   float64
			YFrom  float64 `json:"y_from"`
		}
	}
	Independence struct {
		N                        int
		Min, Q1, Median, Q3, Max float64
		CellWidthKm              float64 `json:"cell_width_km"`
		NearKm                   float64 `json:"near_km"`
		NearShare                float64 `json:"near_share"`
		Warn                     bool
	}
	Omitted []struct {
		Model, Threshold string
		Count            int
		Share            float64
		IDs              []int
	}
}

func loadGolden(t *testing.T) *golden {
	t.Helper()
	data, err := os.ReadFile(filepath.Join(sampleDir, "golden.json"))
	if err != nil {
		t.Fatal(err)
	}
	var g golden
	if err := json.Unmarshal(data, &g); err != nil {
		t.Fatal(err)
	}
	// The independence quartiles are stored under *_km keys.
	var raw struct {
		Independence map[string]float64 `json:"independence"`
	}
	_ = json.Unmarshal(data, &raw)
	g.Independence.Min = raw.Independence["min_km"]
	g.Independence.Q1 = raw.Independence["q1_km"]
	g.Independence.Median = raw.Independence["median_km"]
	g.Independence.Q3 = raw.Independence["q3_km"]
	g.Independence.Max = raw.Independence["max_km"]
	return &g
}

func near(t *testing.T, what string, got, want, tol float64) {
	t.Helper()
	if math.Abs(got-want) > tol*math.Max(1, math.Abs(want)) {
		t.Errorf("%s = %.15g, want %.15g (golden.py)", what, got, want)
	}
}

// TestSpreadsAgainstGolden checks min/max/range/mean/SD against numpy in
// golden.py.
func TestSpreadsAgainstGolden(t *testing.T) {
	r := analyzedSample(t)
	g := loadGolden(t)
	s := r.Sensitivity
	if len(s.Spreads) != len(g.Spreads) {
		t.Fatalf("got %d spreads, golden.py has %d", len(s.Spreads), len(g.Spreads))
	}
	for i, w := range g.Spreads {
		got := s.Spreads[i]
		name := w.Metric + "/" + w.Model
		t.Run(name, func(t *testing.T) {
			if got.Metric != w.Metric || got.Model != w.Model {
				t.Fatalf("spread %d is %s/%s, golden %s", i, got.Metric, got.Model, name)
			}
			if got.N != w.N || !reflect.DeepEqual(got.Extents, w.Extents) {
				t.Fatalf("extents %v, golden %v", got.Extents, w.Extents)
			}
			near(t, "min", got.Min, w.Min, 1e-12)
			near(t, "max", got.Max, w.Max, 1e-12)
			near(t, "range", got.Range, w.Range, 1e-12)
			near(t, "mean", got.Mean, w.Mean, 1e-12)
			near(t, "sd (ddof=1)", got.SD, w.SD, 1e-10)
			if got.MinExtent != w.MinExtent || got.MaxExtent != w.MaxExtent {
				t.Errorf("argmin/argmax %s/%s, golden %s/%s", got.MinExtent, got.MaxExtent, w.MinExtent, w.MaxExtent)
			}
			if got.SDDefined != w.SDDefined {
				t.Errorf("sd defined %v, golden %v", got.SDDefined, w.SDDefined)
			}
		})
	}
}

// TestVerdictsAgainstGolden checks every paired difference from the base
// extent, its position against the tolerance, each model's verdict and
// the per-metric summary against golden.py, which applies the documented
// rule to the sample's paired records (computed there with numpy).
func TestVerdictsAgainstGolden(t *testing.T) {
	r := analyzedSample(t)
	g := loadGolden(t)
	s := r.Sensitivity
	if s.BaseExtent != g.BaseExtent || !reflect.DeepEqual(s.TestPoints, g.TestPoints) || !s.TestPointsVary {
		t.Errorf("base %s test points %v (vary %v), golden %s %v", s.BaseExtent, s.TestPoints, s.TestPointsVary, g.BaseExtent, g.TestPoints)
	}
	if len(s.ModelVerdicts) != len(g.ModelVerdicts) {
		t.Fatalf("%d model verdicts, golden %d", len(s.ModelVerdicts), len(g.ModelVerdicts))
	}
	kinds := map[Judgement]int{}
	for i, w := range g.ModelVerdicts {
		mv := s.ModelVerdicts[i]
		t.Run(w.Metric+"/"+w.Model, func(t *testing.T) {
			if mv.Metric != w.Metric || mv.Model != w.Model || mv.Verdict != w.Verdict || mv.Largest != w.Largest {
				t.Fatalf("%s/%s %s largest %d, golden %s/%s %s %d", mv.Metric, mv.Model, mv.Verdict, mv.Largest, w.Metric, w.Model, w.Verdict, w.Largest)
			}
			if len(mv.Diffs) != len(w.Diffs) {
				t.Fatalf("%d differences, golden %d", len(mv.Diffs), len(w.Diffs))
			}
			for k, d := range mv.Diffs {
				wd := w.Diffs[k]
				if d.Extent != wd.Extent || d.Defined != wd.Defined || d.Position != wd.Position {
					t.Errorf("difference %d: %s defined %v %s, golden %s %v %s", k, d.Extent, d.Defined, d.Position, wd.Extent, wd.Defined, wd.Position)
				}
				near(t, "diff", d.Diff, wd.Diff, 1e-12)
				if (d.Low == nil) != (wd.Low == nil) || (d.High == nil) != (wd.High == nil) {
					t.Errorf("difference %d on %s: interval %v..%v, golden %v..%v (nil: none)", k, d.Extent, d.Low, d.High, wd.Low, wd.High)
				} else if d.Low != nil {
					near(t, "low", *d.Low, *wd.Low, 1e-12)
					near(t, "high", *d.High, *wd.High, 1e-12)
				}
			}
			described := NotCalibrated(mv.Metric, PairedKindExtent) // the Boyce index, a partial ROC ratio
			if described && !strings.Contains(mv.Sentence, "described, not judged") {
				t.Errorf("sentence %q does not say the %s is not judged", mv.Sentence, mv.Metric)
			} else if !described && (mv.Sentence == "" || !strings.Contains(mv.Sentence, string(mv.Verdict))) {
				t.Errorf("sentence %q does not state the verdict %s", mv.Sentence, mv.Verdict)
			}
		})
		kinds[w.Verdict]++
	}
	if kinds[JudgementRobust] == 0 || kinds[JudgementSensitive] == 0 || kinds[JudgementUndetermined] == 0 {
		t.Errorf("the sample meets verdicts %v; want all three kinds", kinds)
	}
	for i, w := range g.Verdicts {
		v := s.Verdicts[i]
		if v.Metric != w.Metric || v.Verdict != w.Verdict || !reflect.DeepEqual(v.Sensitive, nonNilS(w.Sensitive)) ||
			!reflect.DeepEqual(v.Robust, nonNilS(w.Robust)) || !reflect.DeepEqual(v.Undetermined, nonNilS(w.Undetermined)) {
			t.Errorf("verdict %+v, golden %+v", v, w)
		}
	}
}

// TestRankingsAgainstGolden checks the paired model comparisons.
func TestRankingsAgainstGolden(t *testing.T) {
	r := analyzedSample(t)
	data, err := os.ReadFile(filepath.Join(sampleDir, "golden.json"))
	if err != nil {
		t.Fatal(err)
	}
	var g struct {
		Rankings []struct {
			Metric, Model, Other                string
			Extents, Better, Worse, WithinNoise int
		}
	}
	if err := json.Unmarshal(data, &g); err != nil {
		t.Fatal(err)
	}
	// encoding/json matches "within_noise" to WithinNoise only by tag.
	var raw struct {
		Rankings []map[string]any `json:"rankings"`
	}
	_ = json.Unmarshal(data, &raw)
	s := r.Sensitivity
	if len(s.Rankings) != len(g.Rankings) || len(s.Rankings) == 0 {
		t.Fatalf("%d rankings, golden %d", len(s.Rankings), len(g.Rankings))
	}
	for i, w := range g.Rankings {
		rk := s.Rankings[i]
		within := int(raw.Rankings[i]["within_noise"].(float64))
		if rk.Metric != w.Metric || rk.Model != w.Model || rk.Other != w.Other || rk.Extents != w.Extents ||
			rk.Better != w.Better || rk.Worse != w.Worse || rk.WithinNoise != within {
			t.Errorf("ranking %+v, golden %+v (within %d)", rk, w, within)
		}
	}
}

func nonNilS(x []string) []string {
	if x == nil {
		return []string{}
	}
	return x
}

// TestDecompositionsAgainstGolden checks the two-way SS split, the ranks
// and Kendall's W (explicit formula with ties in golden.py, ranks from
// scipy.stats.rankdata).
func TestDecompositionsAgainstGolden(t *testing.T) {
	r := analyzedSample(t)
	g := loadGolden(t)
	s := r.Sensitivity
	if len(s.Decompositions) != len(g.Decompositions) {
		t.Fatalf("got %d decompositions, golden.py has %d", len(s.Decompositions), len(g.Decompositions))
	}
	for i, w := range g.Decompositions {
		d := s.Decompositions[i]
		t.Run(w.Metric, func(t *testing.T) {
			if d.Metric != w.Metric || !reflect.DeepEqual(d.Extents, w.Extents) {
				t.Fatalf("%s on %v, golden %s on %v", d.Metric, d.Extents, w.Metric, w.Extents)
			}
			if !d.Defined {
				t.Fatalf("undefined: %s", d.Note)
			}
			near(t, "grand mean", d.GrandMean, w.GrandMean, 1e-12)
			near(t, "SS total", d.SSTotal, w.SSTotal, 1e-9)
			near(t, "SS extent", d.SSExtent, w.SSExtent, 1e-9)
			near(t, "SS model", d.SSModel, w.SSModel, 1e-9)
			near(t, "SS residual", d.SSResidual, w.SSResidual, 1e-9)
			near(t, "share extent", d.ShareExtent, w.ShareExtent, 1e-9)
			near(t, "share model", d.ShareModel, w.ShareModel, 1e-9)
			near(t, "share residual", d.ShareResidual, w.ShareResidual, 1e-9)
			near(t, "shares sum", d.ShareExtent+d.ShareModel+d.ShareResidual, 1, 1e-12)
			for j, er := range d.Rankings {
				if !reflect.DeepEqual(er.Ranks, w.Ranks[j]) {
					t.Errorf("ranks on %s = %v, rankdata gives %v", er.Extent, er.Ranks, w.Ranks[j])
				}
			}
			if d.BaseExtent != w.BaseExtent {
				t.Errorf("base %s, golden %s", d.BaseExtent, w.BaseExtent)
			}
			if !reflect.DeepEqual(d.DiffersFromBase, w.DiffersFromBase) {
				t.Errorf("differs from base %v, golden %v", d.DiffersFromBase, w.DiffersFromBase)
			}
			if !d.KendallWDefined {
				t.Fatal("W undefined")
			}
			near(t, "Kendall's W", d.KendallW, w.KendallW, 1e-12)
		})
	}
}

// TestChainsAgainstGolden checks the chain steps and shares, that shares
// sum to 1, and that each ring's AUCOuter equals the area-weighted mix of
// inner and ring AUCs to 1e-12 on the sample (gen_sample.py computes the
// three AUCs separately from raw cells).
func TestChainsAgainstGolden(t *testing.T) {
	r := analyzedSample(t)
	g := loadGolden(t)
	s := r.Sensitivity
	if len(s.Chains) != len(g.Chains) {
		t.Fatalf("got %d chains, golden.py has %d", len(s.Chains), len(g.Chains))
	}
	for i, w := range g.Chains {
		cs := s.Chains[i]
		t.Run(w.Chain+"/"+w.Model, func(t *testing.T) {
			if !reflect.DeepEqual(cs.Members, w.Members) {
				t.Fatalf("members %v, golden %v", cs.Members, w.Members)
			}
			near(t, "start", cs.StartAUC, w.StartAUC, 1e-12)
			near(t, "end", cs.EndAUC, w.EndAUC, 1e-12)
			near(t, "change", cs.Change, w.Change, 1e-12)
			if len(cs.Steps) != len(w.Steps) {
				t.Fatalf("%d steps, golden %d", len(cs.Steps), len(w.Steps))
			}
			var sum float64
			for k, st := range cs.Steps {
				ws := w.Steps[k]
				if st.Kind != ws.Kind || st.Outer != ws.Outer {
					t.Errorf("step %d %s/%s, golden %s/%s", k, st.Kind, st.Outer, ws.Kind, ws.Outer)
				}
				near(t, "step change", st.Change, ws.Change, 1e-12)
				near(t, "step share", st.Share, ws.Share, 1e-10)
				if math.Abs(st.MixResidual) > 1e-12 {
					t.Errorf("ring %s: AUCOuter - mix = %g, want |.| <= 1e-12", st.Outer, st.MixResidual)
				}
				sum += st.Share
			}
			near(t, "sum of shares", sum, 1, 1e-12)
			if !cs.Slope.Defined {
				t.Fatalf("chain slope undefined")
			}
			near(t, "chain slope (linregress)", cs.Slope.PerDoubling, w.Slope.PerDoubling, 1e-9)
			near(t, "chain intercept", cs.Slope.Intercept, w.Slope.Intercept, 1e-9)
			// r^2 of scipy's linregress; on a chain of two members it is 1
			// by construction, which we do not report as a description.
			if cs.Slope.N >= 3 {
				near(t, "chain r^2", cs.Slope.R2, w.Slope.R2, 1e-9)
			} else if cs.Slope.R2Defined {
				t.Errorf("chain of %d members: r^2 %g given, want not defined", cs.Slope.N, cs.Slope.R2)
			}
			if !cs.SharesDefined || cs.Largest < 0 || cs.Sentence == "" {
				t.Errorf("summary incomplete: %+v", cs)
			}
		})
	}
	// The mix identity straight from the rings.
	for _, rg := range r.Rings {
		mix := (rg.InnerAreaKm2*rg.AUCInner + rg.RingAreaKm2*rg.AUCRing) / (rg.InnerAreaKm2 + rg.RingAreaKm2)
		if math.Abs(mix-rg.AUCOuter) > 1e-12 {
			t.Errorf("ring %s/%s %s-%s: mix %.15f, AUCOuter %.15f", rg.Chain, rg.Model, rg.Inner, rg.Outer, mix, rg.AUCOuter)
		}
	}
}

// TestChecksAgainstGolden checks truncation flags, the independence
// quartiles (numpy.percentile, linear) and the omitted points.
func TestChecksAgainstGolden(t *testing.T) {
	r := analyzedSample(t)
	g := loadGolden(t)
	s := r.Sensitivity
	if len(s.Truncation) != len(g.Truncation) {
		t.Fatalf("%d truncation checks, golden %d", len(s.Truncation), len(g.Truncation))
	}
	for i, w := range g.Truncation {
		tc := s.Truncation[i]
		if tc.Model != w.Model || tc.FloorFlag != w.FloorFlag || tc.Flag != w.Flag || len(tc.Tails) != len(w.Tails) {
			t.Errorf("truncation %s: floor=%v flag=%v tails=%d, golden %v %v %d", tc.Model, tc.FloorFlag, tc.Flag, len(tc.Tails), w.FloorFlag, w.Flag, len(w.Tails))
			continue
		}
		for k, tj := range tc.Tails {
			if tj.Extent != w.Tails[k].Extent {
				t.Errorf("tail %d extent %s, golden %s", k, tj.Extent, w.Tails[k].Extent)
			}
			near(t, "tail jump", tj.Jump, w.Tails[k].Jump, 1e-12)
			near(t, "tail y", tj.YFrom, w.Tails[k].YFrom, 1e-12)
		}
	}
	ind, wi := s.Independence, g.Independence
	if !ind.Defined || ind.N != wi.N || ind.Warn != wi.Warn {
		t.Errorf("independence defined=%v n=%d warn=%v, golden n=%d warn=%v", ind.Defined, ind.N, ind.Warn, wi.N, wi.Warn)
	}
	near(t, "min", ind.Min, wi.Min, 1e-12)
	near(t, "q1", ind.Q1, wi.Q1, 1e-12)
	near(t, "median", ind.Median, wi.Median, 1e-12)
	near(t, "q3", ind.Q3, wi.Q3, 1e-12)
	near(t, "max", ind.Max, wi.Max, 1e-12)
	near(t, "cell width", ind.CellWidthKm, wi.CellWidthKm, 1e-12)
	near(t, "near km", ind.NearKm, wi.NearKm, 1e-12)
	near(t, "near share", ind.NearShare, wi.NearShare, 1e-12)
	if len(s.OmittedPoints) != len(g.Omitted) {
		t.Fatalf("%d omitted lists, golden %d", len(s.OmittedPoints), len(g.Omitted))
	}
	for i, w := range g.Omitted {
		o := s.OmittedPoints[i]
		if o.Model != w.Model || string(o.Threshold) != w.Threshold || o.Count != w.Count || !reflect.DeepEqual(o.IDs, nonNil(w.IDs)) {
			t.Errorf("omitted %s/%s: %d %v, golden %d %v", o.Model, o.Threshold, o.Count, o.IDs, w.Count, w.IDs)
		}
		near(t, "omitted share", o.Share, w.Share, 1e-12)
	}
}

func nonNil(x []int) []int {
	if x == nil {
		return []int{}
	}
	return x
}

// TestStatsWorkedExamples checks the helpers on hand-computable cases.
func TestStatsWorkedExamples(t *testing.T) {
	// Kendall's W without ties, 3 judges x 3 objects in perfect agreement:
	// W = 1 (definition). Reversed second judge: R = (5, 6, 7), S = 2,
	// W = 12*2 / (9*24) = 1/9 (hand computation).
	cases := []struct {
		name  string
		ranks [][]float64
		ties  []float64
		want  float64
	}{
		{"agreement", [][]float64{{1, 2, 3}, {1, 2, 3}, {1, 2, 3}}, []float64{0, 0, 0}, 1},
		{"one reversed", [][]float64{{1, 2, 3}, {3, 2, 1}, {1, 2, 3}}, []float64{0, 0, 0}, 1.0 / 9},
		// Ties: judge 3 ties objects 1 and 2 (ranks 1.5, 1.5, 3), T_3 = 2^3-2 = 6.
		// R = (3.5, 5.5, 9), mean 6, S = 6.25+0.25+9 = 15.5,
		// W = 12*15.5 / (9*24 - 3*6) = 186/198 (hand computation).
		{"ties", [][]float64{{1, 2, 3}, {1, 2, 3}, {1.5, 1.5, 3}}, []float64{0, 0, 6}, 186.0 / 198},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			w, ok := kendallW(c.ranks, c.ties)
			if !ok || math.Abs(w-c.want) > 1e-12 {
				t.Errorf("W = %v (ok=%v), want %v", w, ok, c.want)
			}
		})
	}
	r, tie := ranksBestFirst([]float64{0.9, 0.7, 0.9, 0.5}, true)
	if !reflect.DeepEqual(r, []float64{1.5, 3, 1.5, 4}) || tie != 6 {
		t.Errorf("ranksBestFirst = %v tie %v, want [1.5 3 1.5 4] tie 6 (hand computation)", r, tie)
	}
	r, tie = ranksBestFirst([]float64{0.9, 0.7, 0.9, 0.5}, false)
	if !reflect.DeepEqual(r, []float64{3.5, 2, 3.5, 1}) || tie != 6 {
		t.Errorf("ranksBestFirst (lower better) = %v tie %v, want [3.5 2 3.5 1] tie 6 (hand computation)", r, tie)
	}
	// OLS through (0,1), (1,3), (2,5): slope 2 exactly, r^2 = 1.
	f, ok := ols([]float64{0, 1, 2}, []float64{1, 3, 5})
	if !ok || math.Abs(f.b-2) > 1e-12 || math.Abs(f.a-1) > 1e-12 || math.Abs(f.r2-1) > 1e-12 {
		t.Errorf("ols = %+v", f)
	}
	if !f.r2Defined {
		t.Errorf("ols through 3 points: r^2 not defined")
	}
	// Through two points the line passes exactly: r^2 would be 1 whatever
	// they are, so it is not defined (the slope is: (0.2 - 0.7) / 1 = -0.5, by
	// hand).
	if f, ok := ols([]float64{0, 1}, []float64{0.7, 0.2}); !ok || f.r2Defined || math.Abs(f.b+0.5) > 1e-12 {
		t.Errorf("ols through 2 points = %+v, %v; want slope -0.5 and r^2 not defined", f, ok)
	}
	// p-values from resamples are not printed below 1/B (our rule).
	for _, c := range []struct {
		p    float64
		b    int
		want string
	}{{0, 500, "< 0.002"}, {0, 1000, "< 0.001"}, {0.001, 1000, "0.001"}, {0.0004, 5000, "< 0.001"}, {0.25, 200, "0.250"},
		// The bound 1/b rounded up to two significant digits (1/184 =
		// 0.0054348, 1/997 = 0.0010030, 1/3 = 0.333: by hand), never below
		// it: "< 0.0054" claimed a resolution the 184 formed resamples of
		// the audit of edge cases did not have.
		{0, 184, "< 0.0055"}, {0, 997, "< 0.0011"}, {0, 3, "< 0.34"}, {0, 200, "< 0.005"}, {0, 10, "< 0.1"}, {0, 1, "< 1"}} {
		if got := fmtPResampled(c.p, c.b); got != c.want {
			t.Errorf("fmtPResampled(%v, %d) = %q, want %q", c.p, c.b, got, c.want)
		}
	}
}

// TestAnalyzeEdgeCases covers degenerate inputs.
func TestAnalyzeEdgeCases(t *testing.T) {
	cases := []struct {
		name  string
		build func(r *Results)
		check func(t *testing.T, r *Results, err error)
	}{
		{"nil", nil, func(t *testing.T, _ *Results, err error) {
			if err == nil || !strings.HasPrefix(err.Error(), "report: ") {
				t.Errorf("err = %v", err)
			}
		}},
		{"NaN AUC rejected", func(r *Results) { r.Scores[0].AUC = math.NaN() }, func(t *testing.T, _ *Results, err error) {
			if err == nil || !strings.Contains(err.Error(), "not finite") {
				t.Errorf("err = %v", err)
			}
		}},
		{"single model has no decomposition", func(r *Results) {
			r.Models = r.Models[:1]
			var sc []Score
			for _, s := range r.Scores {
				if s.Model == r.Models[0].Name {
					sc = append(sc, s)
				}
			}
			r.Scores = sc
		}, func(t *testing.T, r *Results, err error) {
			if err != nil {
				t.Fatal(err)
			}
			if len(r.Sensitivity.Decompositions) != 0 {
				t.Errorf("decompositions with one model")
			}
			if !strings.Contains(r.Sensitivity.Headline, "within 3 cells") {
				t.Errorf("headline lacks independence warning: %s", r.Sensitivity.Headline)
			}
			if len(r.Sensitivity.Rankings) != 0 {
				t.Errorf("rankings with one model")
			}
		}},
		{"no scores at all", func(r *Results) {
			for i := range r.Scores {
				r.Scores[i].Scored = false
			}
		}, func(t *testing.T, r *Results, err error) {
			if err != nil {
				t.Fatal(err)
			}
			s := r.Sensitivity
			if len(s.ScoredExtents) != 0 || !strings.HasPrefix(s.Headline, "No model could be scored on any extent") {
				t.Errorf("scored %v headline %q", s.ScoredExtents, s.Headline)
			}
			for _, mv := range s.ModelVerdicts {
				if mv.Verdict != "undetermined" {
					t.Errorf("%s/%s: %s", mv.Metric, mv.Model, mv.Verdict)
				}
			}
			if _, err := r.Encode(); err != nil {
				t.Errorf("encode: %v", err)
			}
		}},
		{"flat chain has no shares", func(r *Results) {
			for i := range r.Rings {
				r.Rings[i].AUCInner, r.Rings[i].AUCRing, r.Rings[i].AUCOuter = 0.8, 0.8, 0.8
			}
			for i := range r.Scores {
				r.Scores[i].AUC = 0.8
			}
		}, func(t *testing.T, r *Results, err error) {
			if err != nil {
				t.Fatal(err)
			}
			for _, c := range r.Sensitivity.Chains {
				if c.SharesDefined || c.Largest != -1 {
					t.Errorf("%s/%s: shares defined on a flat chain", c.Chain, c.Model)
				}
			}
		}},
		{"broken mix identity warns", func(r *Results) { r.Rings[0].AUCOuter += 0.01 }, func(t *testing.T, r *Results, err error) {
			if err != nil {
				t.Fatal(err)
			}
			found := false
			for _, w := range r.Sensitivity.Warnings {
				found = found || strings.Contains(w, "area-weighted mix")
			}
			if !found {
				t.Errorf("no mix warning in %v", r.Sensitivity.Warnings)
			}
		}},
		{"undefined partial ROC on base leaves the verdict undetermined", func(r *Results) {
			for i := range r.Scores {
				sc := &r.Scores[i]
				if sc.Model == "good" && sc.Extent == "base" {
					sc.PartialROC[0].Defined, sc.PartialROC[0].Ratio = false, 0
					sc.PartialROC[0].Reason = "the 1 - E crossing falls among test points tied at one value"
					sc.PartialROC[0].TiedAtCrossing, sc.PartialROC[0].DiscreteDefined = 3, true
					sc.PartialROC[0].DiscreteXE, sc.PartialROC[0].DiscreteRatio = 0.5, 1.25
				}
			}
			for i := range r.Paired {
				p := &r.Paired[i]
				if p.Metric == "partial_roc_e0.05" && p.Kind == PairedKindExtent && p.Model == "good" {
					p.Defined, p.Diff, p.Low, p.High = false, 0, Float(0), Float(0)
				}
			}
		}, func(t *testing.T, r *Results, err error) {
			if err != nil {
				t.Fatal(err)
			}
			mv := r.Sensitivity.findModelVerdict("partial_roc_e0.05", "good")
			if mv == nil || mv.Verdict != "undetermined" || mv.BaseDefined || mv.Largest != -1 ||
				!strings.Contains(mv.Sentence, "tied at one value") || !strings.Contains(mv.Sentence, "the ratio is 1.250") {
				t.Errorf("verdict %+v", mv)
			}
		}},
		{"a flat run at y = 1 is not truncation, a tie below it is", func(r *Results) {
			for i := range r.Models {
				r.Models[i].FloorShare = 0
			}
			for i := range r.Curves {
				c := &r.Curves[i]
				switch {
				case c.Model == "good" && c.Extent == "whole":
					c.X, c.Y = []float64{0, 0.3, 0.5, 1}, []float64{0, 0.8, 1, 1} // flat from 0.5 to 1 at y = 1
				case c.Model == "broad" && c.Extent == "whole":
					c.X, c.Y = []float64{0, 0.3, 0.5, 1}, []float64{0, 0.8, 0.9, 1} // tie from y = 0.9
				default:
					c.X, c.Y = []float64{0, 0.9, 1}, []float64{0, 1, 1}
				}
			}
		}, func(t *testing.T, r *Results, err error) {
			if err != nil {
				t.Fatal(err)
			}
			for _, tc := range r.Sensitivity.Truncation {
				want := tc.Model == "broad"
				if tc.Flag != want || (want && (len(tc.Tails) != 1 || tc.Tails[0].Extent != "whole" || tc.Tails[0].Jump != 0.5)) {
					t.Errorf("%s: flag %v tails %+v, want flag %v", tc.Model, tc.Flag, tc.Tails, want)
				}
			}
		}},
		{"distances not computed", func(r *Results) {
			// The run measures them whenever a training point is scored
			// (all 0 with training points is every test point on one).
			for i := range r.Points {
				r.Points[i].NearestTrainKm = 0
				if r.Points[i].Role == vocab.RoleTrain {
					r.Points[i].Status = vocab.PointOutsideRaster
				}
			}
		}, func(t *testing.T, r *Results, err error) {
			if err != nil {
				t.Fatal(err)
			}
			if r.Sensitivity.Independence.Defined || r.Sensitivity.Independence.Warn {
				t.Errorf("independence defined without distances")
			}
		}},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			var r *Results
			if c.build != nil {
				r = loadSample(t)
				c.build(r)
			}
			err := Analyze(r)
			c.check(t, r, err)
		})
	}
}

// TestRingClause: what a ring sentence says follows the ring's AUC
// (hand-made steps).
func TestRingClause(t *testing.T) {
	cases := []struct {
		ring, inner float64
		want        string
	}{
		{0.95, 0.80, "raises the score"},
		{0.71, 0.80, "adding it lowers the score"},
		{0.40, 0.45, "more often than not"},
		{0.40, 0.30, "so adding the ring raises the score"}, // below 0.5 but above the inner AUC
		{0.80, 0.80, "unchanged"},
	}
	for _, c := range cases {
		got := ringClause(ChainStep{Inner: "a", AUCRing: c.ring, AUCInner: c.inner})
		if !strings.Contains(got, c.want) || strings.Contains(got, "far-away") {
			t.Errorf("ring %v inner %v: %q, want it to say %q", c.ring, c.inner, got, c.want)
		}
	}
}

// TestAnalyzeSampleSummary checks skipped extents, unscored scores and the
// wording that the report relies on.
func TestAnalyzeSampleSummary(t *testing.T) {
	r := analyzedSample(t)
	s := r.Sensitivity
	wantSkipped := []string{"ecoregions_min5", "points_b400"}
	var got []string
	for _, e := range s.SkippedExtents {
		got = append(got, e.ID)
	}
	if !reflect.DeepEqual(got, wantSkipped) {
		t.Errorf("skipped %v, want %v (sample: one empty, one duplicate)", got, wantSkipped)
	}
	if len(s.Unscored) != 2 {
		t.Errorf("unscored %v, want truncated on region_b200 and whole", s.Unscored)
	}
	for _, w := range []string{"Across 8 evaluation extents", "20 to 22 test points per extent", "AUC of good ranged", "extent-sensitive (largest difference from base", "against our tolerance of ±0.02", "beyond noise on"} {
		if !strings.Contains(s.Headline, w) {
			t.Errorf("headline lacks %q: %s", w, s.Headline)
		}
	}
	if strings.Contains(s.Headline, "sum of squares") || strings.Contains(s.Headline, "explains") {
		t.Errorf("headline quotes the sums-of-squares split: %s", s.Headline)
	}
	if n := strings.Count(s.Headline, ". "); n < 1 || n > 3 {
		t.Errorf("headline has %d sentence breaks: %s", n, s.Headline)
	}
	// Encoding must succeed (no NaN/Inf) and be deterministic.
	a, err := r.Encode()
	if err != nil {
		t.Fatal(err)
	}
	r2 := analyzedSample(t)
	b, _ := r2.Encode()
	if string(a) != string(b) {
		t.Error("Analyze is not deterministic")
	}
}

func BenchmarkAnalyze_3models10extents(b *testing.B) {
	base := loadSample(b)
	b.ReportAllocs()
	for b.Loop() {
		r := *base
		if err := Analyze(&r); err != nil {
			b.Fatal(err)
		}
	}
}
