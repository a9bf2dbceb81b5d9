package main

import (
	"path/filepath"
	"strings"
	"testing"
)

// TestFewIterationsWarned: with --iterations below 40 the percentile
// intervals of the paired resamples were read into verdicts, model
// comparisons and readings against a null without a word (an audit of edge cases:
// --iterations 2 judged the partial ROC ratio extent-sensitive from the
// 2.5th and 97.5th percentiles of two resampled differences). The run
// warns, on the terminal and in results.json; from 40 on it does not.
func TestFewIterationsWarned(t *testing.T) {
	s := newSmallStudy(t)
	const words = "come from 5 resamples; with fewer than 40 a 2.5th and a 97.5th percentile do not lie inside the resampled values"
	for _, c := range []struct {
		iterations string
		warned     bool
	}{{"5", true}, {"40", false}} {
		out := filepath.Join(t.TempDir(), "out")
		_, se, code := runBin(t, "run", "--model", "m="+s.model, "--occurrences", s.occ, "--region", s.region, "--iterations", c.iterations,
			"--region-buffers", "60", "--point-buffers", "40", "--hull-buffers", "0", "--out", out)
		if code != 0 {
			t.Fatalf("--iterations %s: exit %d: %s", c.iterations, code, se)
		}
		inResults := false
		for _, w := range loadResults(t, out).Warnings {
			inResults = inResults || strings.Contains(w, "--iterations "+c.iterations+":")
		}
		if got := strings.Contains(se, "warning: --iterations "+c.iterations+":"); got != c.warned || inResults != c.warned {
			t.Errorf("--iterations %s: warned on the terminal %v, in results.json %v, want %v:\n%s", c.iterations, got, inResults, c.warned, se)
		}
		if c.warned && !strings.Contains(se, words) {
			t.Errorf("--iterations %s: the warning does not say %q:\n%s", c.iterations, words, se)
		}
	}
}
