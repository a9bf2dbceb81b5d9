package main

import (
	"path/filepath"
	"strings"
	"testing"
)

// TestExtentsKeepsScoredRun: extents --force onto a finished run's folder
// is refused (exit 2) and leaves every file as it was; it used to remove
// results.json, scores.csv and the report, writing only the family. Onto
// a folder of an earlier extents it replaces the family as before.
func TestExtentsKeepsScoredRun(t *testing.T) {
	s := newSmallStudy(t)
	out := filepath.Join(t.TempDir(), "res")
	if _, se, code := runBin(t, s.args(out)...); code != 0 {
		t.Fatalf("run: exit %d: %s", code, se)
	}
	before := treeSums(t, out)
	ext := []string{"extents", "--model", "m=" + s.model, "--occurrences", s.occ, "--region", s.region, "--quiet", "--force", "--out"}
	_, se, code := runBin(t, append(ext, out)...)
	if code != 2 || !strings.Contains(se, "holds a scored run's results") || !strings.Contains(se, out+"-extents") {
		t.Errorf("exit %d, want 2 naming the results: %s", code, se)
	}
	if !sameSums(before, treeSums(t, out)) {
		t.Error("the run's folder changed")
	}
	fam := filepath.Join(t.TempDir(), "fam")
	for i := 0; i < 2; i++ {
		if _, se, code := runBin(t, append(ext, fam)...); code != 0 {
			t.Fatalf("extents %d: exit %d: %s", i+1, code, se)
		}
	}
}
