package main

import (
	"fmt"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"testing"

	"areasweep/report"
)

// TestDemoFewResamplesNotJudged: with --iterations 39 the demo's partial
// ROC ratio, omission and Boyce differences (percentile intervals of the
// paired resamples) were still judged: verdicts robust or
// extent-sensitive, model comparisons counted, readings against the null
// told, their intervals printed as inference, with only a warning. Below
// 40 formed resamples (report.MinPercentileResamples) they are now
// reported with their reason (results.json not_judged_reason) and not
// judged; at 40 a record is judged unless some of its resamples did not
// form. The AUC, from the placements, is judged alike at 39 and 40.
func TestDemoFewResamplesNotJudged(t *testing.T) {
	dir := t.TempDir()
	cmd := exec.Command(areasweepBin, "demo", "--out", "demo", "--quiet")
	cmd.Dir = dir
	if out, err := cmd.CombinedOutput(); err != nil {
		t.Fatalf("demo: %v\n%s", err, out)
	}
	res := map[int]*report.Results{}
	for _, b := range []int{39, 40} {
		out := filepath.Join(dir, fmt.Sprintf("it%d", b))
		_, se, code := runBin(t, "run", "--study", filepath.Join(dir, "demo", "inputs", "study.yaml"), "--iterations", fmt.Sprint(b), "--out", out, "--quiet")
		if code != 0 {
			t.Fatalf("--iterations %d: exit %d: %s", b, code, se)
		}
		r := loadResults(t, out)
		res[b] = r
		resampled := map[string]bool{}
		for _, p := range r.Paired {
			formed := p.Resamples - p.NotFormed
			want := ""
			described := p.Metric == report.MetricKeyBoyce || p.Kind == report.PairedKindExtent && strings.HasPrefix(p.Metric, "partial_roc_e")
			if described != (p.Method == "point_difference") {
				t.Errorf("--iterations %d: %s %s %s/%s: method %s", b, p.Metric, p.Kind, p.Model, p.Extent, p.Method)
			}
			switch {
			case p.Defined && p.Method == "paired_resamples" && formed < 40:
				want = fmt.Sprintf("too few resamples: %d formed, our cut-off 40", formed)
			case p.Defined && p.Metric == report.MetricKeyBoyce:
				// Never judged (report.BoyceCoverage), whatever the resamples.
				want = "the Boyce index's paired intervals fall short of their 95% coverage: " + report.BoyceCoverage + " in our simulation check"
			case p.Defined && described:
				// Never judged between extents (the coverage measured at
				// its E: report.PartialROCCoverageClause).
				want = "the partial ROC ratio's paired intervals between extents fall short of their 95% coverage: " + map[string]string{
					"partial_roc_e0.05": "38% to 91%", "partial_roc_e0.1": "58% to 93%"}[p.Metric] + " in our simulation check"
			}
			if p.Method == "paired_resamples" {
				resampled[p.Metric] = true
			}
			if p.NotJudged != want {
				t.Errorf("--iterations %d: %s %s %s/%s: not_judged_reason %q, want %q", b, p.Metric, p.Kind, p.Model, p.Extent, p.NotJudged, want)
			}
		}
		html, err := os.ReadFile(filepath.Join(out, "report.html"))
		if err != nil {
			t.Fatal(err)
		}
		methods, err := os.ReadFile(filepath.Join(out, "methods.md"))
		if err != nil {
			t.Fatal(err)
		}
		log, err := os.ReadFile(filepath.Join(out, "run.log"))
		if err != nil {
			t.Fatal(err)
		}
		few := b < 40
		if got := strings.Contains(string(html), "not judged (too few resamples: 39 formed, our cut-off 40)"); got != few {
			t.Errorf("--iterations %d: report.html says not judged for too few resamples: %v", b, got)
		}
		if got := strings.Contains(string(methods), "or with a percentile interval from fewer than 40 formed resamples (our cut-off"); got != few {
			t.Errorf("--iterations %d: methods.md names the resamples' cut-off: %v", b, got)
		}
		if got := strings.Contains(string(log), "so those differences are reported but not judged"); got != few {
			t.Errorf("--iterations %d: run.log warns: %v", b, got)
		}
		if !few {
			continue
		}
		s := r.Sensitivity
		for _, mv := range s.ModelVerdicts {
			if !resampled[mv.Metric] {
				continue
			}
			if mv.Verdict != report.JudgementUndetermined {
				t.Errorf("--iterations 39: %s of %s is %s: %s", mv.Metric, mv.Model, mv.Verdict, mv.Sentence)
			}
			want := "too_few_resamples"
			if report.NotCalibrated(mv.Metric, report.PairedKindExtent) {
				want = "not_calibrated" // a point_difference: no resamples
			}
			for _, d := range mv.Diffs {
				if d.Defined && d.Position != want {
					t.Errorf("--iterations 39: %s of %s on %s: position %s", mv.Metric, mv.Model, d.Extent, d.Position)
				}
			}
		}
		for _, rk := range s.Rankings {
			if resampled[rk.Metric] && rk.Extents != 0 {
				t.Errorf("--iterations 39: %s: %s", rk.Metric, rk.Sentence)
			}
		}
		for _, an := range s.AboveNull {
			if an.Metric == "auc" {
				continue
			}
			if an.Above+an.NotAbove+an.Below != 0 || (an.BaseReading != report.ReadingTooFewResamples && an.BaseReading != report.ReadingUndefined) {
				t.Errorf("--iterations 39: %s of %s against %s read: %s", an.Metric, an.Model, an.Null, an.Sentence)
			}
		}
	}
	// The AUC does not depend on the resamples.
	for i, mv := range res[39].Sensitivity.ModelVerdicts {
		if mv.Metric == "auc" && mv.Sentence != res[40].Sensitivity.ModelVerdicts[i].Sentence {
			t.Errorf("AUC of %s moved with the resamples: %q, %q", mv.Model, mv.Sentence, res[40].Sensitivity.ModelVerdicts[i].Sentence)
		}
	}
}
