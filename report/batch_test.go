package report

import (
	"bytes"
	"encoding/csv"
	"errors"
	"fmt"
	"io"
	"io/fs"
	"math"
	"os"
	"path/filepath"
	"slices"
	"strings"
	"testing"

	"gonum.org/v1/plot/vg"

	"areasweep/extent/vocab"
	"areasweep/metrics"
)

// effect is one hand-made paired AUC difference from the base extent.
type effect struct {
	extent          string
	diff, low, high float64
}

// handModel describes one model of a hand-built study: its AUC on each
// extent and its differences from the base extent.
type handModel struct {
	name    string
	aucs    map[string]float64 // extent -> AUC
	effects []effect
	// nullDiff, when set, is the AUC difference from the distance-only
	// null on the base extent, with its interval.
	null *effect
	// points, when set, is the model's test points on the base extent
	// (a score record), and every difference's common test points.
	points int
	// vs, when set, is the null gap's ModelVsRandom, with the model's own
	// interval own.
	vs  string
	own [2]float64
}

// handStudy builds the Results of one study by hand: extents "base" and
// the extents of its models' effects, the AUC spreads, the model verdicts
// judged by the package's own rule (modelVerdict's positions against the
// tolerance, summed by verdictFor) and the model-above-null records.
// Nothing is computed from cells; the summary must only add these up.
func handStudy(tol float64, models ...handModel) *Results {
	r := &Results{SchemaVersion: SchemaVersion, Software: Software{Name: "areasweep", Version: "test"}}
	s := &Sensitivity{BaseExtent: "base"}
	m := MetricInfo{Key: "auc", Label: "AUC", Kind: "auc", HigherIsBetter: true, Tolerance: tol}
	var mvs []ModelVerdict
	for _, hm := range models {
		s.ModelNames = append(s.ModelNames, hm.name)
		sp := Spread{Metric: "auc", Model: hm.name}
		ids := []string{"base"}
		for _, e := range hm.effects {
			ids = append(ids, e.extent)
		}
		for _, id := range ids {
			v := hm.aucs[id]
			if sp.N == 0 || v < sp.Min {
				sp.Min, sp.MinExtent = v, id
			}
			if sp.N == 0 || v > sp.Max {
				sp.Max, sp.MaxExtent = v, id
			}
			sp.N++
		}
		sp.Range = sp.Max - sp.Min
		s.Spreads = append(s.Spreads, sp)
		mv := ModelVerdict{Metric: "auc", Label: "AUC", Model: hm.name, Tolerance: tol, Base: "base", BaseValue: hm.aucs["base"], BaseDefined: true,
			Verdict: JudgementUndetermined, Largest: -1}
		outside, inside := 0, 0
		for i, e := range hm.effects {
			d := ExtentDifference{Extent: e.extent, Defined: true, Diff: e.diff, Low: Float(e.low), High: Float(e.high), Method: "placements",
				Position: position(e.low, e.high, tol), CommonPoints: hm.points}
			if hm.points > 0 && hm.points < MinPairedPoints {
				d.Position = positionTooFew
			}
			mv.Diffs = append(mv.Diffs, d)
			if mv.Largest < 0 || math.Abs(e.diff) > math.Abs(mv.Diffs[mv.Largest].Diff) {
				mv.Largest = i
			}
			switch d.Position {
			case "outside":
				outside++
			case "inside":
				inside++
			}
		}
		switch {
		case outside > 0:
			mv.Verdict = JudgementSensitive
		case len(mv.Diffs) > 0 && inside == len(mv.Diffs):
			mv.Verdict = JudgementRobust
		}
		mvs = append(mvs, mv)
		if hm.points > 0 {
			// Scored as a run records a model with test points on the
			// base extent.
			r.Scores = append(r.Scores, Score{Model: hm.name, Extent: "base", Scored: true, TestPoints: hm.points})
		}
		if hm.null != nil {
			n := hm.null
			reading := gapReading(n.low, n.high)
			if hm.points > 0 && hm.points < MinPairedPoints {
				reading = ReadingTooFew
			}
			an := AboveNull{Metric: "auc", Model: hm.name, Null: DistanceNullName, NullKind: NullDistance, BaseExtent: "base",
				BaseReading: reading,
				Gaps: []NullGap{{Extent: "base", Defined: true, Diff: n.diff, Low: n.low, High: n.high, Method: "placements", Reading: reading, CommonPoints: hm.points,
					ModelValue: hm.aucs["base"], NullValue: hm.aucs["base"] - n.diff, ModelVsRandom: hm.vs, ModelLow: hm.own[0], ModelHigh: hm.own[1]}}}
			s.AboveNull = append(s.AboveNull, an)
		}
	}
	s.ModelVerdicts = mvs
	s.Verdicts = []Verdict{verdictFor(m, mvs)}
	s.ScoredExtents = []string{"base", "wide"}
	r.Sensitivity = s
	return r
}

// handBatch is the batch the tests share. The expected verdicts follow
// from the rule with T = 0.02 (DefaultToleranceAUC): an interval wholly
// beyond ±0.02 makes a model extent-sensitive, all inside makes it robust.
//
//	alpha  m1 +0.080 (0.050..0.110)  outside        -> sensitive
//	beta   m1 +0.005 (-0.004..0.014) inside         -> robust
//	gamma  m1 -0.030 (-0.070..0.010) overlapping    -> undetermined
//	delta  failed
//	eps    m1 +0.060 (0.030..0.090) outside, m2 -0.070 (-0.090..-0.050)
//	       outside; a study with two models         -> sensitive
//	zeta   m2 +0.010 (-0.005..0.015) inside         -> robust
func handBatch() []StudyResult {
	const T = DefaultToleranceAUC
	auc := func(base, other float64) map[string]float64 { return map[string]float64{"base": base, "wide": other} }
	return []StudyResult{
		{ID: "alpha", Report: "alpha/report.html", Results: handStudy(T, handModel{name: "m1", aucs: auc(0.80, 0.88),
			effects: []effect{{"wide", 0.08, 0.05, 0.11}}, null: &effect{"base", 0.12, 0.07, 0.17}, points: 12})},
		{ID: "beta", Report: "beta/report.html", Results: handStudy(T, handModel{name: "m1", aucs: auc(0.70, 0.705),
			effects: []effect{{"wide", 0.005, -0.004, 0.014}}, null: &effect{"base", 0.01, -0.02, 0.04}, points: 500})},
		{ID: "gamma", Report: "gamma/report.html", Results: handStudy(T, handModel{name: "m1", aucs: auc(0.75, 0.72),
			effects: []effect{{"wide", -0.03, -0.07, 0.01}}, points: 60})},
		{ID: "delta", Err: errors.New("pipeline: open <models>/m1.tif: no such file\nsecond line")},
		{ID: "eps", Report: "eps/report.html", Results: handStudy(T,
			handModel{name: "m1", aucs: auc(0.81, 0.87), effects: []effect{{"wide", 0.06, 0.03, 0.09}}, points: 40},
			handModel{name: "m2", aucs: auc(0.79, 0.72), effects: []effect{{"wide", -0.07, -0.09, -0.05}}, null: &effect{"base", -0.05, -0.08, -0.02}, points: 38})},
		{ID: "zeta", Report: "zeta/report.html", Results: handStudy(T, handModel{name: "m2", aucs: auc(0.66, 0.67),
			effects: []effect{{"wide", 0.01, -0.005, 0.015}}})},
	}
}

// TestSummaryAboveWithoutSkill: a model above the null beyond noise whose
// own AUC on the base extent is at most 0.5, or above it with its own
// interval reaching 0.5, is counted above, and the sentence says that
// this is no sign of skill, in words that tell the two apart (the
// known-answer batch counted the reverse of a good model, AUC 0.165,
// above a null of AUC 0.110 with nothing said; a model of AUC 0.52 whose
// own interval held 0.5 was counted above with nothing said). Values
// worked by hand: AUC 0.40 on base, +0.10 (0.05 to 0.15) above the null;
// AUC 0.52 (own interval 0.45 to 0.59), +0.12 (0.05 to 0.19).
func TestSummaryAboveWithoutSkill(t *testing.T) {
	const T = DefaultToleranceAUC
	auc := func(base, other float64) map[string]float64 { return map[string]float64{"base": base, "wide": other} }
	studies := []StudyResult{
		{ID: "alpha", Report: "alpha/report.html", Results: handStudy(T, handModel{name: "m1", aucs: auc(0.80, 0.88),
			effects: []effect{{"wide", 0.08, 0.05, 0.11}}, null: &effect{"base", 0.12, 0.07, 0.17}, points: 40})},
		{ID: "rev", Report: "rev/report.html", Results: handStudy(T, handModel{name: "inverse", aucs: auc(0.40, 0.30),
			effects: []effect{{"wide", -0.10, -0.13, -0.07}}, null: &effect{"base", 0.10, 0.05, 0.15}, points: 40})},
		{ID: "weak", Report: "weak/report.html", Results: handStudy(T, handModel{name: "m1", aucs: auc(0.52, 0.60),
			effects: []effect{{"wide", 0.08, 0.05, 0.11}}, null: &effect{"base", 0.12, 0.05, 0.19}, points: 40, vs: VsRandomNotShown, own: [2]float64{0.45, 0.59}})},
	}
	s, err := Summarize(studies)
	if err != nil {
		t.Fatal(err)
	}
	if s.Counts.Above != 3 || s.Counts.AboveNoSkill != 2 {
		t.Errorf("above %d, of them without skill %d; want 3 and 2", s.Counts.Above, s.Counts.AboveNoSkill)
	}
	var b strings.Builder
	for _, sec := range s.methodsSections() {
		b.WriteString(strings.Join(sec.Paragraphs, " "))
	}
	checkWords(t, "summary methods", b.String(),
		[]string{"AUC was above the null beyond noise for 3 of 3 study-model pairs",
			"Of the 3 above, 1 (inverse of study rev) has an AUC at or below 0.5 on the base extent, that of a random ranking: above a null that does worse still; " +
				"and 1 (m1 of study weak) has an AUC above 0.5 on the base extent whose own 95% interval from the placements reaches 0.5: not shown to rank better than random, which is no sign of skill."},
		[]string{"m1 of study alpha"})
	for _, r := range s.Rows {
		want := map[string]string{"alpha": "above", "rev": "above (model at or below 0.5, random: no sign of skill)",
			"weak": "above (model not shown above 0.5, random: no sign of skill)"}[r.Study]
		if got := pageRowOf(r, "").Reading; got != want {
			t.Errorf("study %s: the page reads %q, want %q", r.Study, got, want)
		}
	}
	// summary.csv tells them apart too: "above" alone counted them with
	// the pairs that show skill.
	recs := csvRecords(t, s.WriteCSV)
	col := slices.Index(recs[0], "null_reading")
	for _, rec := range recs[1:] {
		want := map[string]string{"alpha": ReadingAbove, "rev": "above_no_skill", "weak": "above_skill_not_shown"}[rec[0]]
		if rec[col] != want {
			t.Errorf("study %s: summary.csv null_reading %q, want %q", rec[0], rec[col], want)
		}
	}
}

// TestSummarizeCounts checks the counts against the verdicts worked out
// by hand in handBatch's comment.
func TestSummarizeCounts(t *testing.T) {
	s, err := Summarize(handBatch())
	if err != nil {
		t.Fatal(err)
	}
	want := BatchCounts{Studies: 6, Succeeded: 5, Failed: 1,
		Sensitive: 2, Robust: 2, Undetermined: 1, // alpha, eps | beta, zeta | gamma
		Pairs: 6, PairsSensitive: 3, PairsRobust: 2, PairsUndetermined: 1,
		NullPairs: 3, Above: 1, NotAbove: 1, Below: 1, NullDistance: 3} // alpha above, beta includes 0, eps m2 below
	if s.Counts != want {
		t.Errorf("counts %+v\nwant   %+v", s.Counts, want)
	}
	if got, want := s.CountSentence(), "AUC was extent-sensitive for 2 of 5 studies, robust for 2 and undetermined for 1. 1 further study gave no usable results and is not counted."; got != want {
		t.Errorf("count sentence %q\nwant %q", got, want)
	}
	verdicts := map[string]Judgement{}
	for _, st := range s.Studies {
		verdicts[st.ID] = st.Verdict
	}
	for id, v := range map[string]Judgement{"alpha": JudgementSensitive, "beta": JudgementRobust, "gamma": JudgementUndetermined, "eps": JudgementSensitive, "zeta": JudgementRobust, "delta": ""} {
		if verdicts[id] != v {
			t.Errorf("study %s: verdict %q, want %q", id, verdicts[id], v)
		}
	}
	if !slices.Equal(s.Tolerances, []float64{DefaultToleranceAUC}) {
		t.Errorf("tolerances %v", s.Tolerances)
	}
	if got := s.Models(); !slices.Equal(got, []string{"m1", "m2"}) {
		t.Errorf("models %v", got)
	}
	// The magnitudes of the six effects are 0.005, 0.01, 0.03, 0.06, 0.07,
	// 0.08: median (0.03 + 0.06) / 2 = 0.045; two are negative (gamma,
	// eps m2), four positive.
	text := s.MethodsText()
	for _, want := range []string{s.CountSentence(), ExtentSensitiveDefinition,
		"Counted by study and model (6 pairs; the models of one study share its test points, so its pairs are not independent), AUC was extent-sensitive for 3, robust for 2 and undetermined for 1.",
		"above the null beyond noise for 1 of 3 study-model pairs (against the distance-only null), within noise of it for 1 and below it for 1.",
		"- delta: pipeline: open \\<models>/m1.tif: no such file; second line", "Every study used T = 0.02, our own default",
		"ran from -0.070 (study eps, model m2, extent wide, on 38 common test points) to +0.080 (study alpha, model m1, extent wide, on 12 common test points): 2 negative",
		"and 4 positive, their magnitudes of median 0.045 over 6 study-model pairs from 5 studies.",
		// zeta's count is unknown (no score record): 12, 40 (eps: the
		// larger of its models'), 60, 500.
		"The studies held 12 to 500 test points on their base extents (median 50)", hijmans2012} {
		if !strings.Contains(text, want) {
			t.Errorf("methods text lacks %q:\n%s", want, text)
		}
	}
}

// TestSummaryCSV reads summary.csv back: header, one row per study and
// model in the table's order, the failed study with its error, and the
// numbers of one row in full precision.
func TestSummaryCSV(t *testing.T) {
	s, err := Summarize(handBatch())
	if err != nil {
		t.Fatal(err)
	}
	recs := csvRecords(t, s.WriteCSV)
	if !slices.Equal(recs[0], summaryColumns) {
		t.Fatalf("header %v", recs[0])
	}
	col := map[string]int{}
	for i, c := range recs[0] {
		col[c] = i
	}
	var keys []string
	for _, rec := range recs[1:] {
		keys = append(keys, rec[col["study"]]+"/"+rec[col["model"]]+"/"+rec[col["status"]])
	}
	if want := []string{"alpha/m1/ok", "beta/m1/ok", "gamma/m1/ok", "delta//failed", "eps/m1/ok", "eps/m2/ok", "zeta/m2/ok"}; !slices.Equal(keys, want) {
		t.Errorf("rows %v, want %v", keys, want)
	}
	failed := recs[4]
	if failed[col["error"]] != "pipeline: open <models>/m1.tif: no such file; second line" || failed[col["auc_base"]] != "" {
		t.Errorf("failed row %q", failed)
	}
	eps2 := recs[6]
	for c, want := range map[string]string{"auc_base": "0.79", "auc_min": "0.72", "auc_min_extent": "wide", "auc_max": "0.79", "auc_range": "0.07000000000000006",
		"effect_extent": "wide", "auc_diff": "-0.07", "auc_diff_ci_low": "-0.09", "auc_diff_ci_high": "-0.05", "auc_verdict": string(JudgementSensitive),
		"null": DistanceNullName, "auc_minus_null": "-0.05", "null_reading": ReadingBelow, "tolerance": "0.02",
		"test_points": "38", "auc_diff_points": "38"} {
		if eps2[col[c]] != want {
			t.Errorf("eps/m2 %s = %q, want %q (hand-built values; range 0.79-0.72 in float64)", c, eps2[col[c]], want)
		}
	}
	// gamma has no null: the null columns stay empty.
	if g := recs[3]; g[col["null"]] != "" || g[col["null_reading"]] != "" || g[col["auc_minus_null"]] != "" {
		t.Errorf("gamma null columns %q", g)
	}
	// zeta has no score record: its test points are unknown, empty.
	if z := recs[7]; z[col["test_points"]] != "" || z[col["auc_diff_points"]] != "0" {
		t.Errorf("zeta test point columns %q", z)
	}
	vr := csvRecords(t, s.WriteVerdictsCSV)
	if len(vr) != 1+6 || vr[6][0] != "zeta" || vr[6][5] != string(JudgementRobust) {
		t.Errorf("verdicts csv %q", vr)
	}
}

// TestEffectOrder checks the figure's order: by each study's effect of
// largest magnitude (eps: m2's -0.07 beats m1's +0.06), ascending, ties by
// id; studies without a defined effect are left out.
func TestEffectOrder(t *testing.T) {
	studies := handBatch()
	// A study whose only model has no difference from the base.
	studies = append(studies, StudyResult{ID: "eta", Results: handStudy(DefaultToleranceAUC, handModel{name: "m1", aucs: map[string]float64{"base": 0.7}})})
	// A tie with alpha's +0.08, sorted by id.
	studies = append(studies, StudyResult{ID: "aardvark", Results: handStudy(DefaultToleranceAUC, handModel{name: "m1", aucs: map[string]float64{"base": 0.7, "wide": 0.78},
		effects: []effect{{"wide", 0.08, 0.07, 0.09}}})})
	s, err := Summarize(studies)
	if err != nil {
		t.Fatal(err)
	}
	want := []string{"eps", "gamma", "beta", "zeta", "aardvark", "alpha"}
	if got := s.EffectOrder(); !slices.Equal(got, want) {
		t.Errorf("order %v, want %v", got, want)
	}
	// Ties among numbered ids: in the order of their numbers.
	var tied []StudyResult
	for _, id := range []string{"sp10", "sp2", "sp1", "sp02b", "sp2a"} {
		tied = append(tied, StudyResult{ID: id, Results: handStudy(DefaultToleranceAUC, handModel{name: "m1", aucs: map[string]float64{"base": 0.7, "wide": 0.78},
			effects: []effect{{"wide", 0.08, 0.07, 0.09}}})})
	}
	if s, err = Summarize(tied); err != nil {
		t.Fatal(err)
	}
	if got, want := s.EffectOrder(), []string{"sp1", "sp2", "sp2a", "sp02b", "sp10"}; !slices.Equal(got, want) {
		t.Errorf("tied order %v, want %v", got, want)
	}
}

// TestIDCompare checks the order of study ids in the effect figure's ties.
func TestIDCompare(t *testing.T) {
	for _, c := range []struct {
		a, b string
		want int
	}{
		{"sp2", "sp10", -1}, {"sp10", "sp2", 1}, {"sp2", "sp2", 0},
		{"sp02", "sp2", -1}, // equal numbers: by bytes
		{"a", "a1", -1}, {"a9b", "a10a", -1}, {"b1", "a2", 1},
		{"x100000000000000000000001", "x99", 1}, // longer than any integer type
		{"", "a", -1}, {"10", "9", 1},
	} {
		if got := idCompare(c.a, c.b); got != c.want {
			t.Errorf("idCompare(%q, %q) = %d, want %d", c.a, c.b, got, c.want)
		}
	}
}

// TestSummarizeMistakes checks the programmer errors.
func TestSummarizeMistakes(t *testing.T) {
	ok := handStudy(DefaultToleranceAUC, handModel{name: "m", aucs: map[string]float64{"base": 0.7}})
	for name, studies := range map[string][]StudyResult{
		"empty id":    {{ID: "", Results: ok}},
		"repeated id": {{ID: "a", Results: ok}, {ID: "A", Err: errors.New("x")}},
		"no result":   {{ID: "a"}},
	} {
		if _, err := Summarize(studies); err == nil {
			t.Errorf("%s: accepted", name)
		}
	}
	s, err := Summarize(nil)
	if err != nil || s.Counts.Studies != 0 || s.CountSentence() != "None of the 0 studies gave usable results." {
		t.Errorf("empty batch: %v %+v %q", err, s.Counts, s.CountSentence())
	}
}

// TestSummaryFromAnalysis summarises the analysed sample run (results
// without a sensitivity analysis are analysed by Summarize) and checks
// each row's AUC minimum and maximum against the scores themselves.
func TestSummaryFromAnalysis(t *testing.T) {
	r, err := Load(filepath.Join(sampleDir, "sample_results.json"))
	if err != nil {
		t.Fatal(err)
	}
	s, err := Summarize([]StudyResult{{ID: "sample", Results: r}})
	if err != nil {
		t.Fatal(err)
	}
	if r.Sensitivity == nil || len(s.Rows) == 0 {
		t.Fatal("sample not analysed")
	}
	ok := map[string]bool{}
	for _, e := range r.Extents {
		ok[e.ID] = e.Status == vocab.StatusOK
	}
	for _, row := range s.Rows {
		lo, hi := math.Inf(1), math.Inf(-1)
		for _, sc := range r.Scores {
			if sc.Model == row.Model && sc.Scored && ok[sc.Extent] {
				lo, hi = math.Min(lo, sc.AUC), math.Max(hi, sc.AUC)
			}
		}
		if row.AUCMin != lo || row.AUCMax != hi || row.AUCRange != hi-lo {
			t.Errorf("%s: AUC %g..%g (range %g), scores give %g..%g", row.Model, row.AUCMin, row.AUCMax, row.AUCRange, lo, hi)
		}
		if row.EffectDefined && (row.EffectLow > row.Effect || row.Effect > row.EffectHigh) {
			t.Errorf("%s: effect %g outside its interval %g..%g", row.Model, row.Effect, row.EffectLow, row.EffectHigh)
		}
	}
}

// TestWriteSummary writes the summary twice (same bytes), then checks the
// page: links to each study's report, the failed study with its error
// escaped, the figure inline, and the figure's axes and print sizes.
func TestWriteSummary(t *testing.T) {
	s, err := Summarize(handBatch())
	if err != nil {
		t.Fatal(err)
	}
	dirs := []string{t.TempDir(), t.TempDir()}
	for _, d := range dirs {
		if err := WriteSummary(d, s); err != nil {
			t.Fatal(err)
		}
	}
	names := []string{SummaryCSV, SummaryVerdicts, SummaryHTML, SummaryMethods}
	for _, f := range figureFormats {
		names = append(names, filepath.Join(SummaryFigures, EffectFigure+"."+f))
	}
	for _, n := range names {
		a, err := os.ReadFile(filepath.Join(dirs[0], n))
		if err != nil {
			t.Fatal(err)
		}
		b, err := os.ReadFile(filepath.Join(dirs[1], n))
		if err != nil {
			t.Fatal(err)
		}
		if !bytes.Equal(a, b) {
			t.Errorf("%s differs between two writes", n)
		}
	}
	page, _ := os.ReadFile(filepath.Join(dirs[0], SummaryHTML))
	html := string(page)
	for _, want := range []string{`<a href="./alpha/report.html">alpha</a>`, `<a href="./zeta/report.html">zeta</a>`,
		`<strong>delta</strong>: <code>pipeline: open &lt;models&gt;/m1.tif: no such file; second line</code>`,
		`<svg id="fig-extent_effect" class="figure"`, "AUC was extent-sensitive for 2 of 5 studies"} {
		if !strings.Contains(html, want) {
			t.Errorf("summary.html lacks %q", want)
		}
	}
	if strings.Contains(html, "<models>") || strings.Contains(html, "delta/report.html") {
		t.Error("summary.html holds the raw error or a link to the failed study")
	}
	svg, err := os.ReadFile(filepath.Join(dirs[0], SummaryFigures, EffectFigure+".svg"))
	if err != nil {
		t.Fatal(err)
	}
	probs, n := checkAxisLabels(t, EffectFigure, svg)
	for _, p := range probs {
		t.Error(p)
	}
	if n < 1 {
		t.Errorf("no labelled numeric axis found")
	}
	texts, _ := parseSVG(t, svg)
	labels := map[string]bool{}
	for _, tx := range texts {
		labels[tx.s] = true
		if tx.size < minFontPt {
			t.Errorf("%q at %g pt", tx.s, tx.size)
		}
	}
	// A row is labelled with its study and, when known, the study's test
	// points on its base extent (zeta's are not).
	for _, id := range s.EffectOrder() {
		want := id
		if n, ok := s.TestPoints(id); ok {
			want = fmt.Sprintf("%s (n = %d)", id, n)
		}
		if !labels[want] {
			t.Errorf("figure has no row label %q", want)
		}
	}
	if !labels["alpha (n = 12)"] || !labels["beta (n = 500)"] || !labels["zeta"] {
		t.Errorf("row labels %v", labels)
	}
	if labels["delta"] {
		t.Error("the failed study has a row in the figure")
	}
}

// TestEffectLayout checks that the figure stays on a page and drops the
// row names once they would be under effectMinLabelPitch apart: with a
// 230 mm page and a 38 mm frame, (230 - 38) / 3.5 = 54.9, so 54 rows are
// named and 55 are not (arithmetic on our own layout constants).
func TestEffectLayout(t *testing.T) {
	mm := float64(vg.Millimeter)
	for _, c := range []struct {
		n      int
		hMM    float64
		labels bool
	}{
		{1, 70, true},    // 38 + 4.5 = 42.5 mm, raised to the 70 mm minimum
		{10, 83, true},   // 38 + 45
		{42, 227, true},  // 38 + 189
		{54, 230, true},  // capped at the page
		{55, 230, false}, // 192 / 55 = 3.49 mm per row
		{400, 230, false},
	} {
		h, labels := effectLayout(c.n)
		if math.Abs(float64(h)/mm-c.hMM) > 1e-9 || labels != c.labels {
			t.Errorf("n=%d: height %.2f mm labels %v, want %.0f mm labels %v", c.n, float64(h)/mm, labels, c.hMM, c.labels)
		}
	}
}

// standIn rewrites a hand-built study as one whose base extent held no
// test point: ref stands in as the reference (Sensitivity.BaseExtent, the
// scores, verdicts and null gaps named "base" are renamed) and the base's
// scores are recorded as unscored for reason.
func standIn(r *Results, ref, reason string) *Results {
	s := r.Sensitivity
	s.BaseExtent = ref
	for i := range r.Scores {
		if r.Scores[i].Extent == "base" {
			r.Scores[i].Extent = ref
		}
	}
	for i := range s.ModelVerdicts {
		s.ModelVerdicts[i].Base = ref
	}
	for i := range s.AboveNull {
		s.AboveNull[i].BaseExtent = ref
		for j := range s.AboveNull[i].Gaps {
			if s.AboveNull[i].Gaps[j].Extent == "base" {
				s.AboveNull[i].Gaps[j].Extent = ref
			}
		}
	}
	for _, m := range s.ModelNames {
		s.Unscored = append(s.Unscored, UnscoredScore{Model: m, Extent: "base", Reason: reason})
	}
	r.Extents = append(r.Extents, Extent{ID: ref, AreaKm2: 10375})
	return r
}

// withOccurrences records the SHA-256 of a study's occurrence file.
func withOccurrences(r *Results, sha string) *Results {
	r.Inputs = append(r.Inputs, Input{Role: "occurrences", Path: "/x/occ.csv", SHA256: sha})
	return r
}

// oddBatch is a batch of the cases a reader can misread, with T = 0.02:
//
//	few     6 test points: its difference -0.24 (-0.37..-0.11) lies wholly
//	        beyond ±T but rests on 6 < 10 common points: not judged,
//	        undetermined; its null reading too_few
//	nobase  the base held no test point: region_50km stands in; m1
//	        -0.16 (-0.20..-0.13) outside -> sensitive
//	open    one model, -0.03 (-0.07..0.01) straddles T: undetermined,
//	        but judged (40 points)
//	twin1, twin2 the same occurrence file (same SHA-256), robust
func oddBatch() []StudyResult {
	const T = DefaultToleranceAUC
	auc := func(base, other float64) map[string]float64 { return map[string]float64{"base": base, "wide": other} }
	return []StudyResult{
		{ID: "few", Results: withOccurrences(handStudy(T, handModel{name: "m1", aucs: auc(0.85, 0.61),
			effects: []effect{{"wide", -0.24, -0.37, -0.11}}, null: &effect{"base", 0.08, -0.06, 0.22}, points: 6}), "aaa")},
		{ID: "nobase", Results: withOccurrences(standIn(handStudy(T, handModel{name: "m1", aucs: auc(0.95, 0.79),
			effects: []effect{{"wide", -0.16, -0.20, -0.13}}, null: &effect{"base", 0.07, 0.04, 0.10}, points: 33}),
			"region_50km", "no test points inside this extent"), "bbb")},
		{ID: "open", Results: withOccurrences(handStudy(T, handModel{name: "m1", aucs: auc(0.75, 0.72),
			effects: []effect{{"wide", -0.03, -0.07, 0.01}}, points: 40}), "ccc")},
		{ID: "twin1", Results: withOccurrences(handStudy(T, handModel{name: "m1", aucs: auc(0.70, 0.705),
			effects: []effect{{"wide", 0.005, -0.004, 0.014}}, points: 500}), "ddd")},
		{ID: "twin2", Results: withOccurrences(handStudy(T, handModel{name: "m1", aucs: auc(0.70, 0.705),
			effects: []effect{{"wide", 0.005, -0.004, 0.014}}, points: 500}), "ddd")},
	}
}

// TestSummaryNotJudged checks that a study whose differences all rest on
// fewer than MinPairedPoints common test points is counted neither robust
// nor extent-sensitive and is said to be not judged (although its
// interval lies wholly beyond ±T), that a study whose base extent was
// replaced says so, that studies sharing an occurrence file are named as
// not independent, and that a null reading on too few points is counted
// as not read, apart from the undefined ones.
func TestSummaryNotJudged(t *testing.T) {
	s, err := Summarize(oddBatch())
	if err != nil {
		t.Fatal(err)
	}
	want := BatchCounts{Studies: 5, Succeeded: 5, Sensitive: 1, Robust: 2, Undetermined: 2, NotJudged: 1, StandIn: 1,
		Pairs: 5, PairsSensitive: 1, PairsRobust: 2, PairsUndetermined: 2, PairsNotJudged: 1,
		NullPairs: 2, Above: 1, TooFew: 1, NullDistance: 2}
	if s.Counts != want {
		t.Errorf("counts %+v\nwant   %+v", s.Counts, want)
	}
	if got, want := s.CountSentence(), "AUC was extent-sensitive for 1 of 5 studies, robust for 2 and undetermined for 2, 1 of which was not judged "+
		"(no difference from the base extent on 10 or more common test points, our cut-off)."; got != want {
		t.Errorf("count sentence %q\nwant %q", got, want)
	}
	text := s.MethodsText()
	for _, want := range []string{
		"Not judged, so counted neither robust nor extent-sensitive: few.",
		"nobase (region_50km stands in; base extent left out: no test points inside this extent)",
		"These studies use one and the same occurrence file, so their verdicts rest on the same test points and are not independent: twin1 and twin2.",
		"Of these, 1 rests on fewer than 10 common test points and was not judged (our cut-off).",
		"above the null beyond noise for 1 of 2 study-model pairs (against the distance-only null), within noise of it for 0 and below it for 0; 1 rests on fewer than 10 common test points and was not read (our cut-off).",
		"a difference on fewer than 10 common test points is not judged (our cut-off).",
		// What the verdicts rest on, said where a reader weighs the counts.
		"the intervals were not adjusted for the number of extents compared",
		"a study with more models or extents has more chances to count as extent-sensitive and fewer to count as robust",
		"no test across studies is made",
		"Each reading is a test within its study, not adjusted for the number of models or studies",
	} {
		if !strings.Contains(text, want) {
			t.Errorf("methods text lacks %q:\n%s", want, text)
		}
	}
	if strings.Contains(text, "could not be formed") && !strings.Contains(text, "a difference could not be formed") {
		t.Errorf("a too-few null reading is called not formed:\n%s", text)
	}
	f, ok := effectFigure(s)
	if !ok {
		t.Fatal("no figure")
	}
	for _, want := range []string{"Drawn with a dashed bar and not judged, on fewer than 10 common test points: few (m1, 6).",
		"In nobase the base extent could not be scored", "(our default tolerance, not a published standard)",
		"A bar across or inside the band does not settle the verdict"} {
		if !strings.Contains(f.Caption, want) {
			t.Errorf("caption lacks %q:\n%s", want, f.Caption)
		}
	}
	// The effect not judged was drawn like the judged ones: its bar is now
	// dashed (the only dashed stroke of the figure) and the key says so.
	svg, err := render(f, "svg")
	if err != nil {
		t.Fatal(err)
	}
	if !bytes.Contains(svg, []byte("dashed bar: not judged (fewer than 10 common test points)")) || !bytes.Contains(svg, []byte("stroke-dasharray")) {
		t.Error("the figure has no dashed bar or no key for the effect not judged")
	}
	page, err := s.page(nil)
	if err != nil {
		t.Fatal(err)
	}
	for _, want := range []string{"<td>region_50km (stands in for the base extent: no test points inside this extent)</td>",
		`<span class="badge undetermined">undetermined</span> (not judged)`} {
		if !bytes.Contains(page, []byte(want)) {
			t.Errorf("summary.html lacks %q", want)
		}
	}
	// open is undetermined on a judged difference: not marked.
	if bytes.Count(page, []byte("(not judged)")) != 1 {
		t.Errorf("summary.html marks %d rows not judged, want 1 (few)", bytes.Count(page, []byte("(not judged)")))
	}
}

// TestSummaryEdgeSentences checks the summary's sentences on batches found
// wrong by running `areasweep batch` on small generated studies and
// checking every number against the studies' results.json (an audit of the summary):
// one study only, a failed study, base extents of one area, and a study
// that scored no extent at all (a constant model: Analyze leaves
// Sensitivity.BaseExtent empty, and no extent stands in for the base).
func TestSummaryEdgeSentences(t *testing.T) {
	const T = DefaultToleranceAUC
	auc := func(base, other float64) map[string]float64 { return map[string]float64{"base": base, "wide": other} }
	one := func() *Results {
		return handStudy(T, handModel{name: "m1", aucs: auc(0.80, 0.88),
			effects: []effect{{"wide", 0.08, 0.05, 0.11}}, null: &effect{"base", 0.12, 0.07, 0.17}, points: 12})
	}
	withArea := func(r *Results, km2 float64) *Results {
		r.Extents = append(r.Extents, Extent{ID: "base", AreaKm2: km2})
		return r
	}
	// nothingScored is a study none of whose extents could be scored, as
	// results.json records it for a constant model (sensitivity:
	// base_extent "", scored_extents [], the base extent unscored).
	nothingScored := func() *Results {
		r := handStudy(T, handModel{name: "flat", aucs: map[string]float64{}})
		s := r.Sensitivity
		s.BaseExtent, s.ScoredExtents, s.Spreads = "", []string{}, nil
		s.ModelVerdicts[0].Base, s.ModelVerdicts[0].BaseDefined = "", false
		s.Unscored = []UnscoredScore{{Model: "flat", Extent: "base", Reason: "constant suitability (minimum equals maximum on this extent)"}}
		s.SkippedExtents = []SkippedExtent{{ID: "base", Reason: "no model could be scored"}}
		return r
	}
	for _, c := range []struct {
		name      string
		studies   []StudyResult
		want, not []string
	}{
		{name: "one study", studies: []StudyResult{{ID: "only", Results: one()}},
			want: []string{"The one study of the batch was run with areasweep test into its own folder",
				"above the null beyond noise for 1 of 1 study-model pair (against the distance-only null)",
				"AUC was extent-sensitive for the one study."},
			not: []string{"Each of the 1 study", "1 of 1 study-model pairs", "1 of 1 study,"}},
		// A single study's verdict is one word, not "1 of 1 study, robust
		// for 0 and undetermined for 0"; a table of one failed study is not
		// "None of the 1 study", nor left out of counts that are not there.
		{name: "one study of two with results", studies: []StudyResult{{ID: "a", Results: one()}, {ID: "gone", Err: errors.New("missing model")}},
			want: []string{"AUC was extent-sensitive for the one study that gave usable results. 1 further study gave no usable results and is not counted.",
				"and is left out of every count above:"},
			not: []string{"1 of 1 study,"}},
		{name: "one study, not judged", studies: []StudyResult{{ID: "flat", Results: nothingScored()}},
			want: []string{"AUC was undetermined for the one study, which was not judged (no difference from the base extent on 10 or more common test points, our cut-off)."},
			not:  []string{"1 of 1 study,", "robust for 0"}},
		// A study that scored no null (no-distance-null) left its pair out
		// of the null counts without a word: "0 of 1 study-model pair" of a
		// batch of two pairs.
		{name: "a study without a null", studies: []StudyResult{{ID: "a", Results: one()}, {ID: "nonull", Results: handStudy(T, handModel{name: "m1", aucs: auc(0.80, 0.88),
			effects: []effect{{"wide", 0.08, 0.05, 0.11}}, points: 12})}},
			want: []string{"above the null beyond noise for 1 of 1 study-model pair (against the distance-only null), within noise of it for 0 and below it for 0. " +
				"1 study-model pair has no comparison with a null and is not counted there: nonull (m1)."}},
		{name: "every pair with a null", studies: []StudyResult{{ID: "a", Results: one()}, {ID: "b", Results: one()}},
			not: []string{"no comparison with a null"}},
		// Three studies of one verdict and one effect to three decimals:
		// "for all 3 studies", and the effects do not "run from +0.080 to
		// +0.080".
		{name: "three alike", studies: []StudyResult{{ID: "a", Results: one()}, {ID: "b", Results: one()}, {ID: "c", Results: one()}},
			want: []string{"AUC was extent-sensitive for all 3 studies.",
				"The extent effects all read +0.080 as printed here (the smallest: study a, model m1, extent wide, on 12 common test points; the largest: study c, model m1, extent wide, on 12 common test points): 0 negative"},
			not: []string{"of 3 studies", "ran from +0.080"}},
		// Two studies of one verdict are "both", not "0 of 2 ... 2 ... 0".
		{name: "two studies not judged", studies: []StudyResult{{ID: "a", Results: nothingScored()}, {ID: "b", Results: nothingScored()}},
			want: []string{"AUC was undetermined for both studies, neither of which was judged (no difference from the base extent on 10 or more common test points, our cut-off)."},
			not:  []string{"of 2 studies", "none of which"}},
		{name: "two studies of two verdicts", studies: []StudyResult{{ID: "a", Results: one()}, {ID: "flat", Results: nothingScored()}},
			want: []string{"AUC was extent-sensitive for 1 of 2 studies, robust for 0 and undetermined for 1, which was not judged"},
			not:  []string{"both studies"}},
		{name: "the one study failed", studies: []StudyResult{{ID: "z1", Err: errors.New("bad longitude")}},
			want: []string{"The one study gave no usable results.", "1 study gave no usable results (each line says why: a failure, or results that no longer match the table):"},
			not:  []string{"None of the 1 study", "left out of every count above"}},
		{name: "a failed study", studies: []StudyResult{{ID: "a", Results: one()}, {ID: "b", Results: one()}, {ID: "gone", Err: errors.New("missing model")}},
			want: []string{"Each of the 2 studies of the batch that gave usable results was run with areasweep test into its own folder",
				"AUC was extent-sensitive for both studies that gave usable results. 1 further study gave no usable results and is not counted."},
			not: []string{"Each of the 3 studies"}},
		{name: "every study failed", studies: []StudyResult{{ID: "a", Err: errors.New("x")}, {ID: "b", Err: errors.New("y")}},
			want: []string{"Each study of the batch was to be run with areasweep into its own folder", "None of the 2 studies gave usable results.",
				"2 studies gave no usable results (each line says why: a failure, or results that no longer match the table):"},
			not: []string{"Each of the 2 studies", "left out of every count above"}},
		// 427570.46 and 427610.0 km² both print as 428,000 (fmtArea's three
		// significant digits): the span would name two ends that read alike.
		{name: "base extents of one area", studies: []StudyResult{{ID: "a", Results: withArea(one(), 427570.46)}, {ID: "b", Results: withArea(one(), 427610.0)}},
			want: []string{"Every base extent covered 428,000 km²."},
			not:  []string{"The base extents ran from"}},
		{name: "no extent scored", studies: []StudyResult{{ID: "a", Results: one()}, {ID: "flat", Results: nothingScored()}},
			want: []string{"Not judged, so counted neither robust nor extent-sensitive: flat."},
			not:  []string{"flat ( stands in", "(stands in for the base extent:", "In flat the base extent could not be scored", "In 1 study the base extent could not be scored"}},
	} {
		t.Run(c.name, func(t *testing.T) {
			s, err := Summarize(c.studies)
			if err != nil {
				t.Fatal(err)
			}
			var caption string
			if f, ok := effectFigure(s); ok {
				caption = f.Caption
			}
			page, err := s.page(nil)
			if err != nil {
				t.Fatal(err)
			}
			text := s.MethodsText()
			for _, w := range c.want {
				if !strings.Contains(text, w) {
					t.Errorf("methods text lacks %q:\n%s", w, text)
				}
			}
			for _, w := range c.not {
				for name, got := range map[string]string{"methods text": text, "caption": caption, "page": string(page)} {
					if strings.Contains(got, w) {
						t.Errorf("%s holds %q", name, w)
					}
				}
			}
			if c.name == "no extent scored" && s.Counts.StandIn != 0 {
				t.Errorf("StandIn = %d, want 0: no extent stands in", s.Counts.StandIn)
			}
		})
	}
}

// TestSummaryNoDifferenceReason: a model none of whose differences from
// the base extent could be formed (as on one common test point) is
// undetermined and counted as not judged; its reason columns in
// summary.csv and summary_verdicts.csv used to stay empty, as for a judged
// model, so filtering on them missed it. They now say why, and that the
// metric is undefined on the base extent when it is (undef, as a partial
// ROC ratio can be). beta (judged, from handBatch) keeps empty reasons.
func TestSummaryNoDifferenceReason(t *testing.T) {
	studies := []StudyResult{handBatch()[1],
		{ID: "lone", Report: "lone/report.html", Results: handStudy(DefaultToleranceAUC, handModel{name: "m1", aucs: map[string]float64{"base": 0.9}, points: 1})},
		{ID: "undef", Report: "undef/report.html", Results: handStudy(DefaultToleranceAUC, handModel{name: "m1", aucs: map[string]float64{"base": 0.9}, points: 30})}}
	studies[2].Results.Sensitivity.ModelVerdicts[0].BaseDefined = false
	s, err := Summarize(studies)
	if err != nil {
		t.Fatal(err)
	}
	if s.Counts.NotJudged != 2 {
		t.Fatalf("not judged count %d, want 2 (lone, undef)", s.Counts.NotJudged)
	}
	checkNotJudgedReasons(t, s, map[string]string{"beta": "", "lone": "no paired difference from the base extent could be formed",
		"undef": "no paired difference from the base extent could be formed: the metric is undefined on the base extent"})
}

// checkNotJudgedReasons checks the reason columns of summary.csv and
// summary_verdicts.csv on every row of the studies in want (study id ->
// reason); every row must belong to one of them.
func checkNotJudgedReasons(t *testing.T, s *BatchSummary, want map[string]string) {
	t.Helper()
	for _, c := range []struct {
		name   string
		write  func(io.Writer) error
		column string
	}{
		{"summary.csv", s.WriteCSV, "auc_diff_not_judged_reason"},
		{"summary_verdicts.csv", s.WriteVerdictsCSV, "not_judged_reason"},
	} {
		recs := csvRecords(t, c.write)
		col := slices.Index(recs[0], c.column)
		for _, rec := range recs[1:] {
			w, ok := want[rec[0]]
			if got := rec[col]; !ok || got != w {
				t.Errorf("%s %s %s = %q, want %q", c.name, rec[0], c.column, got, w)
			}
		}
	}
}

// TestSummaryWarnings: a study that finished but warned (its region holds
// none of its test points, its test points lie on training points, ...)
// showed nothing of it in the batch's summary, so among dozens of studies
// it went unnoticed. summary.csv gives each row its study's number of
// warnings, and summary.html lists the warnings of each study that has
// any (escaped), and nothing for a batch without warnings. One study
// that warned, or one failed study, is spoken of as one (the sections
// said "These studies ... their runs warned" of one).
func TestSummaryWarnings(t *testing.T) {
	batch := handBatch()
	batch[1].Results.Warnings = []string{"the base extent holds none of the test points: <check the region>", "2 duplicate presence(s) thinned"}
	s, err := Summarize(batch)
	if err != nil {
		t.Fatal(err)
	}
	recs := csvRecords(t, s.WriteCSV)
	col := slices.Index(recs[0], "warnings")
	if col < 0 {
		t.Fatalf("summary.csv has no warnings column: %v", recs[0])
	}
	for _, rec := range recs[1:] {
		want := "0"
		switch rec[0] {
		case "beta":
			want = "2"
		case "delta":
			want = "" // failed: no results, no warnings known
		}
		if rec[col] != want {
			t.Errorf("%s: warnings %q, want %q", rec[0], rec[col], want)
		}
	}
	page, err := s.page(nil)
	if err != nil {
		t.Fatal(err)
	}
	for _, want := range []string{`<a href="#warnings">Warnings</a>`, "<strong>beta</strong> (2):", "<li>the base extent holds none of the test points: &lt;check the region&gt;</li>", "<li>2 duplicate presence(s) thinned</li>"} {
		if !bytes.Contains(page, []byte(want)) {
			t.Errorf("summary.html lacks %q", want)
		}
	}
	if bytes.Contains(page, []byte("<strong>alpha</strong> (")) {
		t.Error("summary.html lists alpha, which has no warnings")
	}
	// One study warned and one failed (delta): each section speaks of one
	// study, not "These studies ... their runs".
	for _, want := range []string{"<p>This study finished, and its numbers are in every count, but its run warned:",
		"<p>This study gave no usable results and is left out of every count. Fix the cause its line names"} {
		if !bytes.Contains(page, []byte(want)) {
			t.Errorf("summary.html lacks %q", want)
		}
	}
	if bytes.Contains(page, []byte("These studies")) {
		t.Error("summary.html says 'These studies' of one study")
	}
	batch[0].Results.Warnings = []string{"1 duplicate presence(s) thinned"}
	two, err := Summarize(batch)
	if err != nil {
		t.Fatal(err)
	}
	if page, err := two.page(nil); err != nil || !bytes.Contains(page, []byte("<p>These studies finished, and their numbers are in every count, but their runs warned:")) {
		t.Errorf("two studies that warned are not 'These studies' (err %v)", err)
	}
	quiet, err := Summarize(handBatch())
	if err != nil {
		t.Fatal(err)
	}
	if page, err := quiet.page(nil); err != nil || bytes.Contains(page, []byte(`id="warnings"`)) {
		t.Errorf("a batch without warnings has a warnings section (err %v)", err)
	}
}

// csvRecords writes one of the summary's CSV files with write and reads
// it back as records.
func csvRecords(t *testing.T, write func(io.Writer) error) [][]string {
	t.Helper()
	var b bytes.Buffer
	if err := write(&b); err != nil {
		t.Fatal(err)
	}
	recs, err := csv.NewReader(&b).ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	return recs
}

// TestEffectSentenceNamesReference: where another extent stands in for a
// study's base extent (it held no test point), the summary's extent-effect
// sentence names that reference extent, as the study's own report does,
// rather than saying "lower on the extent than on the base extent" of a
// difference not taken from it. Studies from oddBatch: nobase's m1 has
// -0.16 on wide against region_50km (33 points), open's -0.03 (40
// points), twin1's +0.005 (500 points).
func TestEffectSentenceNamesReference(t *testing.T) {
	odd := map[string]StudyResult{}
	for _, st := range oddBatch() {
		odd[st.ID] = st
	}
	cases := []struct {
		name          string
		studies       []string
		want, notWant []string
	}{
		{name: "stand-in at the low end",
			studies: []string{"nobase", "open", "twin1"},
			want: []string{"-0.160 (study nobase, model m1, extent wide against the reference extent region_50km, on 33 common test points)",
				"(AUC lower on the extent than on its study's base extent, or on the reference extent that stands in for it, on their common test points)",
				"+0.005 (study twin1, model m1, extent wide, on 500 common test points)"}},
		{name: "stand-in between the ends",
			studies: []string{"few", "nobase", "twin1"},
			want:    []string{"or on the reference extent that stands in for it"},
			notWant: []string{"extent wide against"}},
		{name: "no stand-in",
			studies: []string{"open", "twin1"},
			want:    []string{"(AUC lower on the extent than on the base extent, on their common test points)"},
			notWant: []string{"reference extent"}},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			var batch []StudyResult
			for _, st := range oddBatch() {
				if slices.Contains(c.studies, st.ID) {
					batch = append(batch, st)
				}
			}
			s, err := Summarize(batch)
			if err != nil {
				t.Fatal(err)
			}
			checkWords(t, "effect sentence", s.effectSentence(), c.want, c.notWant)
		})
	}
}

// TestBatchSmallDifferences: the summary table printed an extent effect of
// -0.0003 (95% interval -0.0004 to -0.0002) and a gap to the null of
// +0.0004 as "-0.000" and "+0.000 to +0.000", which read as no difference
// at all; they keep their digits and sign, as in each study's report, and
// an interval's end near the tolerance shows its side of it. The numbers
// are set by hand (by construction): the expected texts are their
// formatting, not values computed elsewhere.
func TestBatchSmallDifferences(t *testing.T) {
	r := BatchRow{Study: "s", Model: "m", EffectDefined: true, EffectExtent: "hull", Effect: -0.0003, EffectLow: -0.0004, EffectHigh: -0.0002,
		EffectPoints: 40, EffectJudged: true, Tolerance: 0.02, Null: "distance_null", NullDefined: true, NullDiff: 0.0004, NullLow: 0.0001, NullHigh: 0.0007}
	pr := pageRowOf(r, "")
	for _, c := range []struct{ got, want string }{
		{pr.Effect, "-0.0003 (hull, 40 common)"},
		{pr.Interval, "-0.0004 to -0.0002"},
		{pr.Null, "+0.0004 (distance_null)"},
		{pr.NullInterval, "+0.0001 to +0.001"}, // three decimals where they tell it from 0
	} {
		if c.got != c.want {
			t.Errorf("got %q, want %q", c.got, c.want)
		}
	}
	r.Effect, r.EffectLow, r.EffectHigh = 0.05, 0.0201, 0.08
	if got, want := pageRowOf(r, "").Interval, "+0.0201 to +0.080"; got != want {
		t.Errorf("interval against the tolerance %q, want %q", got, want)
	}
}

// TestSummaryDropsStaleFigure reruns a batch into the same folder: the
// first summary draws the extent effects, the second has none to draw
// (every study failed this time). The first summary's figure must go with
// it, or summary_figures would show studies and effects the new summary
// does not hold; a file of the user's in summary_figures stays, and with
// it the folder.
func TestSummaryDropsStaleFigure(t *testing.T) {
	first, err := Summarize(handBatch())
	if err != nil {
		t.Fatal(err)
	}
	none, err := Summarize([]StudyResult{{ID: "alpha", Err: errors.New("occurrences.csv line 3: bad longitude")}})
	if err != nil {
		t.Fatal(err)
	}
	for _, keep := range []bool{false, true} {
		dir := t.TempDir()
		figDir := filepath.Join(dir, SummaryFigures)
		if err := WriteSummary(dir, first); err != nil {
			t.Fatal(err)
		}
		mine := filepath.Join(figDir, "my_notes.txt")
		if keep {
			if err := os.WriteFile(mine, []byte("mine"), 0o666); err != nil {
				t.Fatal(err)
			}
		}
		if err := WriteSummary(dir, none); err != nil {
			t.Fatal(err)
		}
		for _, f := range figureFormats {
			if _, err := os.Stat(filepath.Join(figDir, EffectFigure+"."+f)); !errors.Is(err, fs.ErrNotExist) {
				t.Errorf("user file %v: the first summary's %s.%s is still there (stat: %v)", keep, EffectFigure, f, err)
			}
		}
		_, err := os.Stat(mine)
		switch {
		case keep && err != nil:
			t.Errorf("the user's file in %s is gone: %v", SummaryFigures, err)
		case !keep:
			if _, err := os.Stat(figDir); !errors.Is(err, fs.ErrNotExist) {
				t.Errorf("the emptied %s is still there (stat: %v)", SummaryFigures, err)
			}
		}
	}
}

// TestSummaryUnscoredModel: a study whose one model is scored on no
// extent (one value on every cell) was counted "not judged (no difference
// from the base extent on 10 or more common test points, our cut-off)",
// true but not why: its model ranks nothing. The counts, the sentences
// and both tables now give the model's own reason; a study not judged for
// too few points keeps the cut-off's wording beside it.
func TestSummaryUnscoredModel(t *testing.T) {
	flat := handStudy(DefaultToleranceAUC, handModel{name: "flat", aucs: map[string]float64{}})
	for _, e := range []string{"base", "wide"} {
		flat.Scores = append(flat.Scores, Score{Model: "flat", Extent: e, NotScored: metrics.ReasonConstant, TestPoints: 90})
	}
	lone := handStudy(DefaultToleranceAUC, handModel{name: "m1", aucs: map[string]float64{"base": 0.9}, points: 1})
	studies := []StudyResult{handBatch()[1], {ID: "const", Report: "const/report.html", Results: flat}}
	s, err := Summarize(studies)
	if err != nil {
		t.Fatal(err)
	}
	if c := s.Counts; c.NotJudged != 1 || c.NotJudgedUnscored != 1 || c.PairsNotJudgedUnscored != 1 {
		t.Fatalf("counts %+v: want 1 study and 1 pair not judged, unscored", c)
	}
	why := "scored on no extent; on extent base: " + metrics.ReasonConstant
	md := s.MethodsText()
	for _, want := range []string{
		"undetermined for 1, which was not judged (no model of it is scored on any extent).",
		"Not judged, so counted neither robust nor extent-sensitive: const (flat: " + why + ").",
	} {
		if !strings.Contains(md, want) {
			t.Errorf("methods text lacks %q:\n%s", want, md)
		}
	}
	if strings.Contains(md, "not judged (no difference from the base extent on") {
		t.Errorf("methods text gives the cut-off as the reason of a model scored nowhere:\n%s", md)
	}
	checkNotJudgedReasons(t, s, map[string]string{"beta": "", "const": "the model is " + why})

	// Mixed: one study not judged for too few points, one for a model
	// scored nowhere.
	s, err = Summarize(append(studies, StudyResult{ID: "lone", Report: "lone/report.html", Results: lone}))
	if err != nil {
		t.Fatal(err)
	}
	if want := "undetermined for 2, none of which was judged (no difference from the base extent on 10 or more common test points, our cut-off; in 1, no model is scored on any extent)"; !strings.Contains(s.MethodsText(), want) {
		t.Errorf("methods text lacks %q:\n%s", want, s.MethodsText())
	}
}

// TestEffectLargestMagnitude: a study's extent effect is its model's
// difference from the base extent of largest magnitude, judged or not,
// as summary.csv, summary_verdicts.csv and the methods text define it
// ("Each is the largest by magnitude of its model's differences"). For an
// extent-sensitive verdict the summary took the verdict's largest judged
// difference instead (a batch gave -0.107 on points_50km beside -0.161 on
// points_25km on 9 common test points). Here the sample's points_b25
// difference of good is set to -0.300 on 5 common test points (numbers of
// our choice); +0.138 on whole is the sample's largest judged one.
func TestEffectLargestMagnitude(t *testing.T) {
	r := loadSample(t)
	if setPaired(r, "auc", PairedKindExtent, "good", "points_b25", func(p *Paired) {
		p.CommonPoints, p.Diff, p.Low, p.High = 5, -0.3, Float(-0.5), Float(-0.1)
	}) != 1 {
		t.Fatal("no record of good on points_b25")
	}
	s, err := Summarize([]StudyResult{{ID: "sample", Results: r}})
	if err != nil {
		t.Fatal(err)
	}
	if mv := r.Sensitivity.findModelVerdict("auc", "good"); mv.Verdict != JudgementSensitive || mv.Diffs[mv.Largest].Extent != "whole" {
		t.Fatalf("verdict %s, largest judged %+v", mv.Verdict, mv.Diffs[mv.Largest])
	}
	for _, row := range s.Rows {
		if row.Model == "good" && (row.EffectExtent != "points_b25" || row.Effect != -0.3 || row.EffectPoints != 5 || row.EffectJudged) {
			t.Errorf("good's effect: %s %g on %d points, judged %v; want points_b25 -0.3 on 5, not judged", row.EffectExtent, row.Effect, row.EffectPoints, row.EffectJudged)
		}
	}
	for _, v := range s.Verdicts {
		if v.Model == "good" && v.Metric == "auc" && (v.Extent != "points_b25" || v.Diff != -0.3 || v.NotJudged == "") {
			t.Errorf("good's AUC verdict row: %s %g (%q)", v.Extent, v.Diff, v.NotJudged)
		}
	}
	checkWords(t, "methods", s.MethodsText(), []string{"-0.300 (study sample, model good, extent points_b25, on 5 common test points"}, nil)
}

// TestSummaryNullSame: a study whose model scores as its null does (the
// difference and its interval 0 on the base extent) is counted "the
// same", not "within noise", in the summary's sentence and page, as the
// study's own text says it (sentence audit of 2026-12-05).
func TestSummaryNullSame(t *testing.T) {
	const T = DefaultToleranceAUC
	auc := func(base, other float64) map[string]float64 { return map[string]float64{"base": base, "wide": other} }
	studies := []StudyResult{
		{ID: "alpha", Report: "alpha/report.html", Results: handStudy(T, handModel{name: "m1", aucs: auc(0.80, 0.88),
			effects: []effect{{"wide", 0.08, 0.05, 0.11}}, null: &effect{"base", 0.01, -0.03, 0.05}, points: 40})},
		{ID: "copy", Report: "copy/report.html", Results: handStudy(T, handModel{name: "m1", aucs: auc(0.70, 0.78),
			effects: []effect{{"wide", 0.08, 0.05, 0.11}}, null: &effect{"base", 0, 0, 0}, points: 40})},
	}
	s, err := Summarize(studies)
	if err != nil {
		t.Fatal(err)
	}
	if s.Counts.NotAbove != 1 || s.Counts.Same != 1 {
		t.Errorf("within noise %d, the same %d; want 1 and 1", s.Counts.NotAbove, s.Counts.Same)
	}
	var b strings.Builder
	for _, sec := range s.methodsSections() {
		b.WriteString(strings.Join(sec.Paragraphs, " "))
	}
	checkWords(t, "summary methods", b.String(), []string{"within noise of it for 1, the same as it (every paired difference 0) for 1 and below it for 0"}, nil)
	for _, r := range s.Rows {
		want := map[string]string{"alpha": "not above", "copy": "the same (every paired difference 0)"}[r.Study]
		if got := pageRowOf(r, "").Reading; got != want {
			t.Errorf("study %s: the page reads %q, want %q", r.Study, got, want)
		}
	}
}
