package main

import (
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// TestReportOnBatchFolder: `areasweep report` given a batch's --out
// (which holds the studies' folders and the summary, no results.json of
// its own) says so and names a study's folder to give instead; it said
// only "results.json not found". A figures/ that is a link to another
// folder is named as a link (it was called "a file"). Both exit 2 and
// change nothing.
func TestReportOnBatchFolder(t *testing.T) {
	dir := t.TempDir()
	batch := filepath.Join(dir, "runs")
	study := filepath.Join(batch, "oak")
	for _, d := range []string{filepath.Join(batch, ".areasweep-batch"), study} {
		if err := os.MkdirAll(d, 0o755); err != nil {
			t.Fatal(err)
		}
	}
	os.WriteFile(filepath.Join(study, "results.json"), []byte(sampleResults(t)), 0o644)
	os.WriteFile(filepath.Join(batch, "summary.csv"), []byte("study\n"), 0o644)
	before := treeSums(t, batch)
	var so, se strings.Builder
	code := Main([]string{"report", batch, "--quiet"}, nil, &so, &se)
	if msg := se.String(); code != 2 || !strings.Contains(msg, batch+" is the --out folder of a batch") || !strings.Contains(msg, "areasweep report "+study+" --force") || !strings.Contains(msg, "--summary-only") {
		t.Errorf("batch folder: exit %d: %s", code, msg)
	}
	if !sameSums(before, treeSums(t, batch)) {
		t.Error("the batch folder changed")
	}

	other := filepath.Join(dir, "elsewhere")
	os.Mkdir(other, 0o755)
	if err := os.Symlink(other, filepath.Join(study, "figures")); err != nil {
		t.Fatal(err)
	}
	se.Reset()
	code = Main([]string{"report", study, "--force", "--quiet"}, nil, &so, &se)
	if msg := se.String(); code != 2 || !strings.Contains(msg, filepath.Join(study, "figures")+" is a link") || !strings.Contains(msg, "move the link") {
		t.Errorf("figures a link: exit %d: %s", code, msg)
	}
	if l, _ := os.ReadDir(other); len(l) != 0 {
		t.Errorf("the report wrote into the linked folder: %v", l)
	}
}

// TestArgCountInOurWords: report given no folder or two, and batch two
// tables, say what the command takes and what it got; cobra's "accepts 1
// arg(s), received 2" reached the user.
func TestArgCountInOurWords(t *testing.T) {
	for _, c := range []struct {
		args []string
		want string
	}{
		{[]string{"report"}, "'areasweep report' takes one argument, DIR (got none)"},
		{[]string{"report", "a", "b"}, `'areasweep report' takes one argument, DIR (got 2: "a", "b")`},
		{[]string{"batch", "a.csv", "b.csv"}, `'areasweep batch' takes at most one argument, TABLE (got 2: "a.csv", "b.csv")`},
	} {
		var so, se strings.Builder
		code := Main(c.args, nil, &so, &se)
		if msg := se.String(); code != 2 || !strings.Contains(msg, c.want) || strings.Contains(msg, "arg(s)") {
			t.Errorf("%v: exit %d: %s", c.args, code, msg)
		}
	}
}
