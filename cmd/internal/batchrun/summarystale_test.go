package batchrun

import (
	"encoding/json"
	"os"
	"path/filepath"
	"testing"

	"areasweep/report"
)

// TestSummaryRecomputesVerdicts: the summary took each study's verdicts
// from its results.json as written, so a study run by an areasweep from
// before the partial ROC ratio's differences between extents were
// described rather than judged kept "extent-sensitive" for the ratio in
// summary_verdicts.csv (seen with areasweep batch --summary-only over the
// demo's studies run by the build of commit 6d067e5), while its report,
// re-rendered by areasweep report, described it. The summary now
// recomputes the analysis from the scores, as areasweep report does.
func TestSummaryRecomputesVerdicts(t *testing.T) {
	r, err := report.Load(filepath.Join("..", "..", "..", "testdata", "report", "sample_results.json"))
	if err != nil {
		t.Fatal(err)
	}
	if err := report.Analyze(r); err != nil {
		t.Fatal(err)
	}
	key := report.MetricKeyPartialROC(r.Settings.E[0])
	// As an earlier areasweep wrote it: the ratio judged between extents.
	stale := 0
	for i := range r.Sensitivity.ModelVerdicts {
		if mv := &r.Sensitivity.ModelVerdicts[i]; mv.Metric == key {
			mv.Verdict = report.JudgementSensitive
			mv.Sentence = "Partial ROC ratio of " + mv.Model + " at E = 0.05 is extent-sensitive."
			stale++
		}
	}
	if stale == 0 {
		t.Fatal("no partial ROC verdict in the sample")
	}
	data, err := json.Marshal(r)
	if err != nil {
		t.Fatal(err)
	}
	out := t.TempDir()
	dir := filepath.Join(out, "s1")
	if err := os.Mkdir(dir, 0o755); err != nil {
		t.Fatal(err)
	}
	if err := os.WriteFile(filepath.Join(dir, "results.json"), data, 0o644); err != nil {
		t.Fatal(err)
	}
	var got *report.BatchSummary
	defer func(f func(string, *report.BatchSummary) error) { writeSummaryFiles = f }(writeSummaryFiles)
	writeSummaryFiles = func(_ string, s *report.BatchSummary) error { got = s; return nil }
	errs := []error{nil}
	if _, err := writeSummary(&Options{Out: out}, []*study{{id: "s1", dir: dir}}, errs); err != nil || errs[0] != nil {
		t.Fatal(err, errs[0])
	}
	n := 0
	for _, v := range got.Verdicts {
		if v.Metric != key {
			continue
		}
		n++
		if v.Verdict != report.JudgementUndetermined || (v.Defined && v.NotJudged == "") {
			t.Errorf("%s: verdict %s, reason %q: the stored verdict, not the recomputed one", v.Model, v.Verdict, v.NotJudged)
		}
	}
	if n != stale {
		t.Errorf("%d partial ROC verdicts in the summary, want %d", n, stale)
	}
}
