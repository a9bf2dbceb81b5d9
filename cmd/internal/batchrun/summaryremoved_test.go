package batchrun

import (
	"errors"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"areasweep/cmd/internal/batch"
)

// TestSummaryStudyRemovedAfterFinishing: a finished study whose folder
// (or whose results.json and completion marker) was removed before the
// summary read it used to be named as damaged, "the study counts as
// finished: restore the file, or remove DIR/.areasweep-done and run the
// same command with --force", while no marker was left to remove and
// the study no longer counted as finished (found by deleting a study's
// folder during a batch with --jobs 2). The message now says what
// happened and what runs it again; a plain failure, which the same
// command retries, not a damaged one.
func TestSummaryStudyRemovedAfterFinishing(t *testing.T) {
	for _, tc := range []struct {
		name      string
		keepEmpty bool // the folder stays, emptied
		want      string
	}{
		{"folder removed", false, "DIR was removed after the study finished; running the same command again runs it again"},
		{"files removed", true, "DIR lost its results.json and its completion marker (DIR/.areasweep-done) after the study finished; running the same command with --force runs it again"},
	} {
		t.Run(tc.name, func(t *testing.T) {
			out := t.TempDir()
			dir := filepath.Join(out, "s1")
			if tc.keepEmpty {
				os.Mkdir(dir, 0o755)
			}
			errs := []error{nil}
			if _, err := writeSummary(&Options{Out: out}, []*study{{id: "s1", dir: dir}}, errs); err != nil {
				t.Fatal(err)
			}
			var de *damagedError
			want := strings.ReplaceAll(tc.want, "DIR", dir)
			if errs[0] == nil || errs[0].Error() != want || errors.As(errs[0], &de) {
				t.Errorf("error %v, want %q (not a damaged study)", errs[0], want)
			}
		})
	}
}

// TestSummaryVersionWithoutResults: a batch none of whose studies gave
// results wrote "Each study of the batch was to be run with areasweep
// into its own folder", without the version that every other summary
// takes from the studies' results: it now gives the version of the
// areasweep that wrote the summary.
func TestSummaryVersionWithoutResults(t *testing.T) {
	out := t.TempDir()
	errs := []error{errors.New("model m: m.tif is not a raster GDAL can read")}
	if _, err := writeSummary(&Options{Out: out, Version: "9.8.7"}, []*study{{id: "s1", dir: filepath.Join(out, "s1")}}, errs); err != nil {
		t.Fatal(err)
	}
	b, err := os.ReadFile(filepath.Join(out, "summary_methods.md"))
	if err != nil {
		t.Fatal(err)
	}
	if want := "Each study of the batch was to be run with areasweep 9.8.7 into its own folder"; !strings.Contains(string(b), want) {
		t.Errorf("summary_methods.md lacks %q:\n%s", want, b)
	}
}

// TestSummaryResultsRemovedMarkerLeft: a finished study whose results.json
// alone was removed (its completion marker left, so the same command skips
// it) was named with Go's words, "read DIR/results.json: open
// DIR/results.json: no such file or directory", the path twice. The
// message now says what happened and what runs the study again; still a
// damaged study.
func TestSummaryResultsRemovedMarkerLeft(t *testing.T) {
	out := t.TempDir()
	dir := filepath.Join(out, "s1")
	if err := os.Mkdir(dir, 0o755); err != nil {
		t.Fatal(err)
	}
	if err := os.WriteFile(batch.MarkerPath(dir), []byte("{}\n"), 0o644); err != nil {
		t.Fatal(err)
	}
	errs := []error{nil}
	if _, err := writeSummary(&Options{Out: out}, []*study{{id: "s1", dir: dir}}, errs); err != nil {
		t.Fatal(err)
	}
	var de *damagedError
	want := filepath.Join(dir, "results.json") + " was removed after the study finished, and its completion marker " + batch.MarkerPath(dir) +
		" is still there, so the same command skips the study: restore the file from a copy, or remove " + batch.MarkerPath(dir) +
		" and run the same command with --force to run the study again"
	if errs[0] == nil || errs[0].Error() != want || !errors.As(errs[0], &de) {
		t.Errorf("error %v, want %q (a damaged study)", errs[0], want)
	}
}
