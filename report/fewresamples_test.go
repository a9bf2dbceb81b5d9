package report

import (
	"encoding/json"
	"strings"
	"testing"

	"areasweep/metrics"
)

// TestPairedJudgedCutOffs: a paired difference is judged on at least
// MinPairedPoints (10) common test points and, for a percentile interval
// from the paired resamples, at least MinPercentileResamples (40) formed
// resamples (Resamples - NotFormed); the AUC's placements do not depend
// on the resamples. Expected values follow from the two cut-offs and the
// counts of each case (no other computation).
func TestPairedJudgedCutOffs(t *testing.T) {
	cases := []struct {
		name                       string
		method                     string
		points, resamples, notForm int
		judged                     bool
		reason                     string
	}{
		{"placements, 10 points, no resamples", "placements", 10, 0, 0, true, ""},
		{"placements, 9 points", "placements", 9, 0, 0, false, "too few common test points: 9, our cut-off 10"},
		{"resamples, 30 points, 40 formed", "paired_resamples", 30, 40, 0, true, ""},
		{"resamples, 29 points", "paired_resamples", 29, 100, 0, false, "too few common test points: 29, our cut-off 30"},
		{"resamples, 10 points", "paired_resamples", 10, 100, 0, false, "too few common test points: 10, our cut-off 30"},
		{"resamples, 39 formed", "paired_resamples", 30, 39, 0, false, "too few resamples: 39 formed, our cut-off 40"},
		{"resamples, 10 drawn", "paired_resamples", 90, 10, 0, false, "too few resamples: 10 formed, our cut-off 40"},
		{"resamples, 45 drawn, 6 not formed", "paired_resamples", 90, 45, 6, false, "too few resamples: 39 formed, our cut-off 40"},
		{"resamples, 46 drawn, 6 not formed", "paired_resamples", 90, 46, 6, true, ""},
		{"few points and few resamples: the points first", "paired_resamples", 5, 10, 0, false, "too few common test points: 5, our cut-off 30"},
		{"exact, 10 points", "exact", 10, 0, 0, true, ""},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			p := Paired{Method: c.method, Defined: true, CommonPoints: c.points, Resamples: c.resamples, NotFormed: c.notForm}
			if got := p.Judged(); got != c.judged {
				t.Errorf("Judged() = %v, want %v", got, c.judged)
			}
			if got := p.NotJudgedReason(); got != c.reason {
				t.Errorf("NotJudgedReason() = %q, want %q", got, c.reason)
			}
			p.Defined = false
			if got := p.NotJudgedReason(); got != "" {
				t.Errorf("undefined: NotJudgedReason() = %q, want none", got)
			}
		})
	}
	// An omission rate between two extents of one model is 0 in every
	// resample: judged from 10 common test points; between two models,
	// or another score between extents, from 30.
	for _, c := range []struct {
		kind   PairKind
		metric string
		judged bool
	}{
		{PairedKindExtent, "omission_minimum_training_presence", true},
		{PairedKindModel, "omission_minimum_training_presence", false},
		{PairedKindNull, "omission_minimum_training_presence", false},
		{PairedKindExtent, "partial_roc_e0.05", false},
	} {
		p := Paired{Kind: c.kind, Metric: c.metric, Method: "paired_resamples", Defined: true, CommonPoints: 10, Resamples: 100}
		if p.Judged() != c.judged {
			t.Errorf("%s %s on 10 points: judged %v (%s)", c.kind, c.metric, p.Judged(), p.NotJudgedReason())
		}
	}
}

// fewResamples returns the sample run with a null's partial ROC and AUC
// records for good and every paired_resamples record drawn from b
// resamples, all of which formed, on at least MinResampledPoints common
// test points (liftResampled).
func fewResamples(t *testing.T, b int) (*Results, string) {
	t.Helper()
	r := withNull(t)
	r.Paired = append(r.Paired, nullPaired(r)...)
	key := MetricKeyPartialROC(r.Settings.E[0])
	for _, p := range nullPaired(r) {
		p.Metric, p.Method = key, "paired_resamples"
		r.Paired = append(r.Paired, p)
	}
	for i := range r.Paired {
		if p := &r.Paired[i]; p.Method == "paired_resamples" {
			p.Resamples, p.NotFormed = b, 0
		}
	}
	r.Settings.PairedResamples = b
	return liftResampled(r), key
}

// TestFewResamplesNotJudged: with fewer than 40 formed resamples a paired
// difference's percentile interval was still read into verdicts, model
// comparisons and readings against a null, and printed as inference (the
// run only warned). At 39 every resampled difference is reported, with
// its reason, and not judged, and its interval is not shown in the
// sentences and tables; at 40 the analysis is the sample's own (its
// records formed 89 to 100 of 100 resamples). AUC, from the placements,
// is the same either way.
func TestFewResamplesNotJudged(t *testing.T) {
	plain, _ := fewResamples(t, 100)
	want := analyzed(t, plain)
	r40, key := fewResamples(t, 40)
	s40 := analyzed(t, r40)
	r39, _ := fewResamples(t, 39)
	s39 := analyzed(t, r39)
	const reason = "too few resamples: 39 formed, our cut-off 40"
	// The Boyce index is left out: its differences are never judged
	// (TestBoyceDescribedNotJudged), so they read the same at 39 and 40.
	resampled := map[string]bool{}
	for _, p := range r39.Paired {
		if p.Method == "paired_resamples" && p.Metric != MetricKeyBoyce {
			resampled[p.Metric] = true
		}
	}
	// The headline describes the partial ROC ratio between extents, never
	// judged (partialROCExtentCoverage), the same at 39 resamples and 40.
	for _, h := range []string{s39.Headline, s40.Headline} {
		if !strings.Contains(h, "The partial ROC ratio at E = 0.05 is described, not judged, across extents") || strings.Contains(h, "not judged: its differences come from") {
			t.Errorf("headline: %s", h)
		}
	}
	for i, mv := range s39.ModelVerdicts {
		if mv40, w := s40.ModelVerdicts[i], want.ModelVerdicts[i]; mv40.Verdict != w.Verdict || mv40.Sentence != w.Sentence {
			t.Errorf("%s of %s at 40: %s %q, want the sample's %s %q", mv.Metric, mv.Model, mv40.Verdict, mv40.Sentence, w.Verdict, w.Sentence)
		}
		if !resampled[mv.Metric] {
			if mv.Verdict != s40.ModelVerdicts[i].Verdict || mv.Sentence != s40.ModelVerdicts[i].Sentence {
				t.Errorf("%s of %s moved with the resamples: %q", mv.Metric, mv.Model, mv.Sentence)
			}
			continue
		}
		if mv.Verdict != JudgementUndetermined {
			t.Errorf("%s of %s: %s from 39 resamples: %s", mv.Metric, mv.Model, mv.Verdict, mv.Sentence)
		}
		judged := 0
		for _, d := range mv.Diffs {
			switch {
			case !d.Defined:
			case NotCalibrated(mv.Metric, PairedKindExtent):
				// Described (a point_difference): no resamples, its own reason.
				if d.Position != positionNotCalibrated || d.NotJudged != notCalibratedWhy(mv.Metric) {
					t.Errorf("%s of %s on %s: position %q, reason %q", mv.Metric, mv.Model, d.Extent, d.Position, d.NotJudged)
				}
			case d.Position != positionTooFewResamples || d.NotJudged != reason:
				t.Errorf("%s of %s on %s: position %q, reason %q", mv.Metric, mv.Model, d.Extent, d.Position, d.NotJudged)
			default:
				judged++
			}
		}
		if NotCalibrated(mv.Metric, PairedKindExtent) {
			// Described whatever the resamples (a partial ROC ratio).
			if !strings.Contains(mv.Sentence, "described, not judged") || strings.Contains(mv.Sentence, "95% interval") {
				t.Errorf("%s of %s: %s", mv.Metric, mv.Model, mv.Sentence)
			}
			continue
		}
		if judged > 0 && (strings.Contains(mv.Sentence, "95% interval") || !strings.Contains(mv.Sentence, "Not judged, on fewer than 40 formed resamples (our cut-off; 39 formed on each)") ||
			!(strings.Contains(mv.Sentence, "not judged ("+reason+")") || strings.Contains(mv.Sentence, "although every difference from base is 0")) ||
			!strings.Contains(mv.Sentence, "too few resamples to tell")) {
			t.Errorf("%s of %s: %s", mv.Metric, mv.Model, mv.Sentence)
		}
	}
	for i, v := range s39.Verdicts {
		if resampled[v.Metric] && v.Verdict != JudgementUndetermined {
			t.Errorf("%s: %s from 39 resamples", v.Metric, v.Verdict)
		}
		if v40 := s40.Verdicts[i]; v40.Verdict != want.Verdicts[i].Verdict {
			t.Errorf("%s at 40: %s, want %s", v.Metric, v40.Verdict, want.Verdicts[i].Verdict)
		}
	}
	for i, rk := range s39.Rankings {
		if rk40 := s40.Rankings[i]; rk40.Sentence != want.Rankings[i].Sentence {
			t.Errorf("ranking at 40: %q, want %q", rk40.Sentence, want.Rankings[i].Sentence)
		}
		if !resampled[rk.Metric] {
			continue
		}
		if rk.Extents != 0 || rk.Better+rk.Worse+rk.WithinNoise != 0 {
			t.Errorf("%s: %s and %s compared from 39 resamples: %+v", rk.Metric, rk.Model, rk.Other, rk)
		}
		if defined := len(definedDiffs(rk.Diffs)); defined > 0 && !strings.Contains(rk.Sentence, "fewer than 40 formed resamples") {
			t.Errorf("%s: %s", rk.Metric, rk.Sentence)
		}
	}
	for _, c := range []struct {
		s    *Sensitivity
		want string
	}{{s40, ReadingAbove}, {s39, ReadingTooFewResamples}} {
		found := false
		for _, an := range c.s.AboveNull {
			if an.Metric != key {
				continue
			}
			found = true
			if an.BaseReading != c.want {
				t.Errorf("%s of %s against the null: reading %s, want %s: %s", key, an.Model, an.BaseReading, c.want, an.Sentence)
			}
			if c.want == ReadingTooFewResamples && (an.Above+an.NotAbove+an.Below != 0 || !strings.Contains(an.Sentence, "its interval from 39 formed resamples") ||
				!strings.Contains(an.Sentence, "whether it beats the null is not told") || strings.Contains(an.Sentence, "95% interval")) {
				t.Errorf("against the null from 39 resamples: %+v", an)
			}
		}
		if !found {
			t.Fatalf("no %s comparison with the null", key)
		}
	}
	// results.json: a reason beside the position only where not judged.
	j40, _ := json.Marshal(s40)
	j39, _ := json.Marshal(s39)
	if strings.Contains(string(j40), `"not_judged_reason":"too few resamples`) || !strings.Contains(string(j39), `"position":"too_few_resamples","not_judged_reason":"`+reason+`"`) ||
		!strings.Contains(string(j39), `"reading":"too_few_resamples","not_judged_reason":"`+reason+`"`) {
		t.Errorf("results.json: too few resamples at 40 %v, at 39 %v", strings.Contains(string(j40), `"not_judged_reason":"too few resamples`), strings.Contains(string(j39), "not_judged_reason"))
	}
	// methods.md names the cut-off only when it left something unjudged.
	if m39, m40 := methodsText(r39), methodsText(r40); !strings.Contains(m39, "or with a percentile interval from fewer than 40 formed resamples (our cut-off") ||
		strings.Contains(m40, "formed resamples") || strings.Contains(m39, "the test records cannot tell") {
		t.Errorf("methods at 39:\n%s\nat 40:\n%s", m39, m40)
	}
	// The tables: a dash for the interval and the reason in words.
	label := map[string]string{}
	_, tbl := differencesSection(s39, label)
	shown := 0
	for _, row := range tbl.Rows {
		last := row[len(row)-1].text
		if strings.HasPrefix(last, "not judged") && !strings.Contains(last, "not calibrated") {
			shown++
			if last != "not judged ("+reason+")" || row[6].text != dash.text {
				t.Errorf("differences row %v", row)
			}
		}
	}
	if shown == 0 {
		t.Error("no difference shown as not judged in the table")
	}
	for _, row := range aboveNullRows(r39) {
		if row[0].text == key && (row[9].text != dash.text || row[11].text != "not judged ("+reason+")") {
			t.Errorf("model minus null row %v", row)
		}
	}
	// The batch summary carries the reason beside the numbers.
	for _, mv := range s39.ModelVerdicts {
		if bv := batchVerdict(r39, "s", mv); resampled[mv.Metric] && !NotCalibrated(mv.Metric, PairedKindExtent) && bv.Defined && bv.NotJudged != reason {
			t.Errorf("batch verdict %s of %s: reason %q", mv.Metric, mv.Model, bv.NotJudged)
		}
	}
}

// TestNullFigureNamesNotRead: the model-minus-null figure drew the bar of
// a difference on 3 common test points and its caption read every bar as
// a test ("wholly above 0: the model beats the null"); it now names the
// differences drawn but not read, and names none when all are read.
func TestNullFigureNamesNotRead(t *testing.T) {
	r := withNull(t)
	r.Paired = append(r.Paired, nullPaired(r)...)
	analyzed(t, r)
	if f := nullGapFigures(r); len(f) != 1 || strings.Contains(f[0].Caption, "not read") {
		t.Fatalf("every difference read: %+v", f)
	}
	setPaired(r, "auc", PairedKindNull, "good", "hull", func(p *Paired) { p.CommonPoints = 3 })
	analyzed(t, r)
	f := nullGapFigures(r)
	if len(f) != 1 || !strings.Contains(f[0].Caption, "Drawn but not read, on fewer than 10 common test points (our cut-off): good − "+DistanceNullName+" on hull (3).") {
		t.Errorf("caption: %+v", f)
	}
}

// TestBatchNotJudgedReason: the batch summary printed the interval of an
// extent effect, or of a comparison with the null, that was not judged as
// if it were inference, and its CSV files carried no word that it was
// not judged. The page now gives "not judged (reason)" in place of the
// interval, and summary.csv and summary_verdicts.csv keep the numbers
// with the reason in a column of their own (empty where judged).
func TestBatchNotJudgedReason(t *testing.T) {
	r, key := fewResamples(t, 39)
	for i := range r.Paired {
		if p := &r.Paired[i]; p.Metric == "auc" && (p.Model == "good" || p.OtherModel == "good") {
			p.CommonPoints = 3
		}
	}
	s, err := Summarize([]StudyResult{{ID: "few", Results: r}})
	if err != nil {
		t.Fatal(err)
	}
	const points = "too few common test points: 3, our cut-off 10"
	recs := csvRecords(t, s.WriteCSV)
	col := map[string]int{}
	for i, c := range recs[0] {
		col[c] = i
	}
	seen := false
	for _, rec := range recs[1:] {
		want := ""
		if rec[col["model"]] == "good" {
			want, seen = points, true
		}
		if rec[col["auc_diff_not_judged_reason"]] != want || rec[col["auc_diff_ci_low"]] == "" {
			t.Errorf("%s: auc_diff_not_judged_reason %q, want %q (ci_low %q kept)", rec[col["model"]], rec[col["auc_diff_not_judged_reason"]], want, rec[col["auc_diff_ci_low"]])
		}
		if rec[col["model"]] == "good" && (rec[col["null_not_judged_reason"]] != points || rec[col["null_reading"]] != ReadingTooFew) {
			t.Errorf("good against the null: %q", rec)
		}
	}
	if !seen {
		t.Fatal("no row of good")
	}
	for _, row := range s.Rows {
		pr := pageRowOf(row, "")
		if row.Model == "good" && (pr.Interval != "not judged ("+points+")" || pr.NullInterval != "not judged ("+points+")") {
			t.Errorf("page row of good: interval %q, null interval %q", pr.Interval, pr.NullInterval)
		}
		if row.Model != "good" && strings.Contains(pr.Interval, "not judged") {
			t.Errorf("page row of %s: %q", row.Model, pr.Interval)
		}
	}
	recs = csvRecords(t, s.WriteVerdictsCSV)
	col = map[string]int{}
	for i, c := range recs[0] {
		col[c] = i
	}
	// The partial ROC ratio between extents is described (a
	// point_difference: no interval, its own reason); an omission rate's
	// difference between extents comes from the 39 resamples.
	n, no := 0, 0
	for _, rec := range recs[1:] {
		if rec[col["diff"]] == "" {
			continue
		}
		switch m := rec[col["metric"]]; {
		case m == key:
			n++
			if rec[col["not_judged_reason"]] != notCalibratedWhy(key) || rec[col["ci_low"]] != "" || rec[col["ci_high"]] != "" || rec[col["method"]] != "point_difference" {
				t.Errorf("summary_verdicts.csv %q", rec)
			}
		case strings.HasPrefix(m, "omission_"):
			no++
			if rec[col["not_judged_reason"]] != "too few resamples: 39 formed, our cut-off 40" || rec[col["ci_low"]] == "" {
				t.Errorf("summary_verdicts.csv %q", rec)
			}
		}
	}
	if n == 0 || no == 0 {
		t.Errorf("%d %s and %d omission differences in summary_verdicts.csv", n, key, no)
	}
}

// TestMethodsBootstrapFewFormed: with fewer than 40 formed resamples the
// report gives no percentiles or P of the published partial ROC bootstrap
// (BootstrapReadable), but the methods text said "with its own interval
// and p-value from the published bootstrap of 39 resamples" with no word
// that neither is given (seen on a run of the demo with --iterations 39,
// whose Scores table shows "–" in both columns on every row). The cases
// set the resamples drawn and formed; the expected words follow from the
// two cut-offs (10 test records, 40 formed resamples) and the counts of
// each case (no other computation).
func TestMethodsBootstrapFewFormed(t *testing.T) {
	const (
		onFormed = "; neither is given where fewer than 40 resamples formed a ratio, our cut-off)"
		onPoints = "; neither is given where a resample draws fewer than 10 test records (an extent with fewer than 19 at 50%), our cut-off)"
		onBoth   = "; neither is given where a resample draws fewer than 10 test records (an extent with fewer than 19 at 50%) or where fewer than 40 resamples formed a ratio, our cut-offs)"
	)
	cases := []struct {
		name            string
		iterations      int
		notFormedOnBase int
		basePoints      int
		want            string
		notWant         []string
	}{
		{"39 drawn, all formed", 39, 0, 0, "p is not resolved below 1/39" + onFormed, nil},
		{"10 drawn, all formed", 10, 0, 0, "p is not resolved below 1/10" + onFormed, nil},
		{"40 drawn, all formed", 40, 0, 0, "p is not resolved below 1/40)", []string{"neither is given"}},
		{"40 drawn, 1 not formed on base", 40, 1, 0, "p is not resolved below 1/40" + onFormed, nil},
		{"200 drawn, base on 5 test records", 200, 0, 5, "p is not resolved below 1/200" + onPoints, []string{"resamples formed a ratio"}},
		{"39 drawn, base on 5 test records", 39, 0, 5, "p is not resolved below 1/39" + onBoth, nil},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			r := loadSample(t)
			r.Settings.Iterations = c.iterations
			for i := range r.Scores {
				sc := &r.Scores[i]
				for j := range sc.PartialROC {
					sc.PartialROC[j].Iterations, sc.PartialROC[j].NotFormed = c.iterations, 0
					if sc.Extent == "base" && sc.Model == "good" {
						sc.PartialROC[j].NotFormed = c.notFormedOnBase
					}
				}
				if c.basePoints > 0 && sc.Extent == "base" && sc.Model == "good" {
					sc.TestPoints = c.basePoints
					for j := range sc.PartialROC {
						sc.PartialROC[j].ResampleSize = metrics.ResampleSize(r.Settings.ResampleFraction, c.basePoints)
					}
				}
			}
			analyzed(t, r)
			checkWords(t, "methods", methodsText(r), []string{c.want}, c.notWant)
		})
	}
}

// TestHeadlineFewResamplesNamesModels: at 39 resamples the headline gave
// every model undetermined on the partial ROC ratio the reason "not
// judged: its differences come from 39 resamples", also a model undefined
// on the base extent, which has no difference to judge (seen on the demo
// with --iterations 39: coarse's ratio at E = 0.05 is undefined on base,
// the methods text says so). The partial ROC ratio between extents is now
// described, not judged, whatever the resamples
// (partialROCExtentCoverage): the headline describes the models with a
// difference and names apart those without one. The cases follow from
// which model's differences are formed (no other computation).
func TestHeadlineFewResamplesNamesModels(t *testing.T) {
	const described = "The partial ROC ratio at E = 0.05 is described, not judged, across extents"
	cases := []struct {
		name      string
		undefined string // model whose partial ROC differences are not formed
		want      []string
		notWant   []string
	}{
		{"every model's differences formed", "", []string{described, "for good ", "for truncated ", "for broad "}, []string{"could be formed", "its differences come from 39 resamples"}},
		{"broad's differences not formed", "broad", []string{described, "for good ", "for truncated ", "; no difference from base could be formed for broad."}, []string{"for broad ", "its differences come from 39 resamples"}},
		{"good's differences not formed", "good", []string{described, "for truncated ", "for broad ", "; no difference from base could be formed for good."}, []string{"for good ", "its differences come from 39 resamples"}},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			r, key := fewResamples(t, 39)
			for i := range r.Paired {
				if p := &r.Paired[i]; p.Metric == key && p.Kind == "extent" && p.Model == c.undefined {
					p.Defined = false
				}
			}
			s := analyzed(t, r)
			checkWords(t, "headline", s.Headline, c.want, c.notWant)
		})
	}
}

// TestResampledPointsCutOff: a difference from the paired resamples (the
// partial ROC ratio, omission, Boyce) on fewer than MinResampledPoints
// common test points is not judged, while an AUC difference from the
// placements on as many is. The sample holds 20 to 22 test points per
// extent: its AUC verdicts stand, its partial ROC ratio's are
// undetermined, no model comparison is made by the partial ROC ratio or
// an omission rate, and every sentence, the headline and the page name
// the cut-off of 30; an omission rate between two extents of one model,
// 0 in every resample, keeps the cut-off of 10.
func TestResampledPointsCutOff(t *testing.T) {
	r := withNull(t)
	r.Paired = append(r.Paired, nullPaired(r)...)
	key := MetricKeyPartialROC(r.Settings.E[0])
	for _, p := range nullPaired(r) {
		p.Metric, p.Method = key, "paired_resamples"
		r.Paired = append(r.Paired, p)
	}
	s := analyzed(t, r)
	for _, mv := range s.ModelVerdicts {
		switch {
		case mv.Metric == "auc":
			if mv.Verdict != JudgementSensitive {
				t.Errorf("AUC of %s on 20 to 22 points: %s", mv.Model, mv.Sentence)
			}
		case strings.HasPrefix(mv.Metric, "omission_"):
			// Between extents of one model an omission rate differs by 0
			// in every resample (one threshold per model): the cut-off of
			// 10 holds, and the sample's are robust.
			if mv.Verdict != JudgementRobust {
				t.Errorf("%s of %s: %s %s", mv.Metric, mv.Model, mv.Verdict, mv.Sentence)
			}
		case mv.Metric == key:
			// Described between extents (partialROCExtentCoverage); each
			// difference on fewer than 30 points says so.
			if mv.Verdict != JudgementUndetermined || !strings.Contains(mv.Sentence, "described, not judged") {
				t.Errorf("%s of %s: %s %s", mv.Metric, mv.Model, mv.Verdict, mv.Sentence)
			}
			for _, d := range mv.Diffs {
				if d.Defined && (d.Position != positionTooFew || !strings.HasSuffix(d.NotJudged, "our cut-off 30")) {
					t.Errorf("%s of %s on %s: %q %q", mv.Metric, mv.Model, d.Extent, d.Position, d.NotJudged)
				}
			}
		}
	}
	ranked := 0
	for _, rk := range s.Rankings {
		if rk.Metric == key || strings.HasPrefix(rk.Metric, "omission_") {
			ranked++
			if rk.Extents != 0 || !strings.Contains(rk.Sentence, "share fewer than 30 test points (our cut-off)") {
				t.Errorf("ranking: %+v", rk)
			}
		}
	}
	if ranked == 0 {
		t.Error("no ranking by the partial ROC ratio or an omission rate")
	}
	found := false
	for _, an := range s.AboveNull {
		if an.Metric == key {
			found = true
			if an.BaseReading != ReadingTooFew || !strings.Contains(an.Sentence, "fewer than the 30 we judge a difference on (our cut-off)") {
				t.Errorf("against the null: %s: %s", an.BaseReading, an.Sentence)
			}
		}
		if an.Metric == "auc" && an.BaseReading == ReadingTooFew {
			t.Errorf("AUC against the null not read on 20 to 22 points: %s", an.Sentence)
		}
	}
	if !found {
		t.Fatal("no partial ROC comparison with the null")
	}
	// Between extents the partial ROC ratio is described, whatever the
	// common test points (partialROCExtentCoverage).
	described := "The partial ROC ratio at E = 0.05 is described, not judged, across extents"
	checkWords(t, "headline", s.Headline, []string{described}, []string{"is undetermined for good, truncated and broad"})
	page, err := htmlPage(r, nil, methodsDoc{})
	if err != nil {
		t.Fatal(err)
	}
	checkWords(t, "page", string(page), []string{"(30 for a difference from the resamples, whose percentile intervals our simulation check found misleading on fewer; none for an omission rate between extents, which is 0 on the test points both hold by construction, its threshold not depending on the extent)"}, nil)
	// One model's differences lifted to 30 points: still described, for
	// every model.
	for i := range r.Paired {
		if p := &r.Paired[i]; p.Method == "paired_resamples" && p.Model == "good" && p.Kind == PairedKindExtent {
			p.CommonPoints = MinResampledPoints
		}
	}
	s = analyzed(t, r)
	checkWords(t, "headline", s.Headline, []string{described}, []string{"(not judged for truncated and broad"})
}
