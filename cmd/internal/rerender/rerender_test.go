package rerender

import (
	"maps"
	"os"
	"path/filepath"
	"strings"
	"syscall"
	"testing"

	"areasweep/cmd/internal/fault"
	"areasweep/cmd/internal/outdir"
	"areasweep/report"
)

// TestReportOnFullDisk: Run (areasweep report) on a folder whose disk is full,
// when the staging folder is made or while the report is drawn (as met on
// a tmpfs filled to its last block, and on one a little smaller than the
// report needs), exits 1 saying to free space; the first was refused as
// bad input (exit 2, "re-render the report of a folder you can write to")
// and the second said no space left without what to do. A read-only
// folder stays a refusal. The previous report and results.json are as
// they were, with no staging folder left.
func TestReportOnFullDisk(t *testing.T) {
	full := &os.PathError{Op: "write", Path: "x", Err: syscall.ENOSPC}
	for _, tc := range []struct {
		name     string
		stage    error
		write    error
		badInput bool
	}{
		{"full when staging", full, nil, false},
		{"full while drawing", nil, full, false},
		{"quota while drawing", nil, &os.PathError{Op: "write", Path: "x", Err: syscall.EDQUOT}, false},
		{"read-only", &os.PathError{Op: "mkdirat", Path: "x", Err: syscall.EROFS}, nil, true},
	} {
		t.Run(tc.name, func(t *testing.T) {
			defer func(s func(string) (*outdir.Staged, error), w func(string, *report.Results) error) {
				stage, write = s, w
			}(stage, write)
			if tc.stage != nil {
				stage = func(string) (*outdir.Staged, error) { return nil, tc.stage }
			}
			if tc.write != nil {
				write = func(dir string, _ *report.Results) error {
					os.WriteFile(filepath.Join(dir, "report.html"), []byte("half"), 0o644)
					return tc.write
				}
			}
			dir := t.TempDir()
			sample := sampleResults(t)
			os.WriteFile(filepath.Join(dir, "results.json"), []byte(sample), 0o644)
			os.WriteFile(filepath.Join(dir, "report.html"), []byte("previous report"), 0o644)
			_, err := Run(Options{Dir: dir, Force: true})
			if err == nil {
				t.Fatal("report succeeded")
			}
			if fault.IsBadInput(err) != tc.badInput {
				t.Errorf("%v: bad input %v, want %v", err, fault.IsBadInput(err), tc.badInput)
			}
			if got := strings.Contains(err.Error(), "free some space"); got == tc.badInput {
				t.Errorf("%q: advice on space %v, want %v", err, got, !tc.badInput)
			}
			if !strings.Contains(err.Error(), dir) {
				t.Errorf("%q does not name %s", err, dir)
			}
			entries, _ := os.ReadDir(dir)
			if len(entries) != 2 {
				t.Errorf("%d entries left, want results.json and report.html", len(entries))
			}
			if b, _ := os.ReadFile(filepath.Join(dir, "report.html")); string(b) != "previous report" {
				t.Errorf("report.html holds %q", b)
			}
			if b, _ := os.ReadFile(filepath.Join(dir, "results.json")); string(b) != sample {
				t.Error("results.json changed")
			}
		})
	}
}

// TestReportLineBreak: Run (areasweep report) on a folder whose path holds a line
// break is refused on one line that says so, and the folder is left as it
// was; the message said "cannot write in it (the path holds a line break);
// re-render the report of a folder you can write to" with the line break
// printed raw.
func TestReportLineBreak(t *testing.T) {
	dir := filepath.Join(t.TempDir(), "run\n1")
	os.Mkdir(dir, 0o755)
	os.WriteFile(filepath.Join(dir, "results.json"), []byte(sampleResults(t)), 0o644)
	_, err := Run(Options{Dir: dir, Force: true})
	if err == nil || !fault.IsBadInput(err) {
		t.Fatalf("got %v, want bad input", err)
	}
	if msg := err.Error(); strings.Contains(msg, "\n") || !strings.Contains(msg, "holds a line break") {
		t.Errorf("message %q", msg)
	}
	if entries, _ := os.ReadDir(dir); len(entries) != 1 {
		t.Errorf("%d entries left, want results.json only", len(entries))
	}
}

// TestPlaceAllOrNothing: a move of the report's files that failed
// part-way (report.html made immutable with chattr +i, after the figures
// and methods.md were moved) said only "moving the report into im failed:
// operation not permitted"; it then named the file and counted the files
// already replaced; now nothing is replaced unless everything is.
// Moving a report into its folder replaces
// every file or none. A target that is a folder is refused before
// anything moves (it said "cannot replace DIR/report.html" after the
// figure and methods.md were replaced); a move that fails half-way (here
// methods.md missing from the stage, after the figure was moved) puts
// the replaced figure and the stale page it removed back; a success
// replaces the files and removes the stale page, and leaves the user's
// own file in figures/.
func TestPlaceAllOrNothing(t *testing.T) {
	setup := func(t *testing.T) (stage, dir string) {
		stage, dir = t.TempDir(), t.TempDir()
		os.MkdirAll(filepath.Join(stage, "figures"), 0o755)
		os.MkdirAll(filepath.Join(dir, "figures"), 0o755)
		for p, data := range map[string]string{
			filepath.Join(stage, "figures", "roc_curves.svg"): "new",
			filepath.Join(stage, "methods.md"):                "new",
			filepath.Join(stage, "report.html"):               "new",
			filepath.Join(dir, "figures", "roc_curves.svg"):   "old",
			filepath.Join(dir, "figures", "ring_steps_2.svg"): "old",
			filepath.Join(dir, "figures", "mine.txt"):         "user",
			filepath.Join(dir, "methods.md"):                  "old",
		} {
			if err := os.WriteFile(p, []byte(data), 0o644); err != nil {
				t.Fatal(err)
			}
		}
		return stage, dir
	}
	read := func(dir string) map[string]string {
		got := map[string]string{}
		for _, n := range []string{"figures/roc_curves.svg", "figures/ring_steps_2.svg", "figures/mine.txt", "methods.md", "report.html"} {
			if b, err := os.ReadFile(filepath.Join(dir, n)); err == nil {
				got[n] = string(b)
			}
		}
		return got
	}
	before := map[string]string{"figures/roc_curves.svg": "old", "figures/ring_steps_2.svg": "old", "figures/mine.txt": "user", "methods.md": "old"}
	t.Run("folder in the way", func(t *testing.T) {
		stage, dir := setup(t)
		os.MkdirAll(filepath.Join(dir, "report.html", "x"), 0o755)
		moved := -1
		err := place(stage, dir, &moved)
		if err == nil || !strings.HasPrefix(err.Error(), "cannot replace "+filepath.Join(dir, "report.html")+" (") {
			t.Fatalf("error %v, want it to name report.html", err)
		}
		if moved != -1 && moved != 0 {
			t.Errorf("moved %d files, want none", moved)
		}
		if got := read(dir); !maps.Equal(got, before) {
			t.Errorf("files %v, want them as they were %v", got, before)
		}
	})
	t.Run("failure half-way", func(t *testing.T) {
		stage, dir := setup(t)
		os.Remove(filepath.Join(stage, "methods.md"))
		moved := 0
		if err := place(stage, dir, &moved); err == nil || !strings.Contains(err.Error(), "methods.md") {
			t.Fatalf("error %v, want it to name methods.md", err)
		}
		if moved != 0 {
			t.Errorf("moved %d files, want 0 after putting everything back", moved)
		}
		if got := read(dir); !maps.Equal(got, before) {
			t.Errorf("files %v, want them as they were %v", got, before)
		}
	})
	t.Run("success", func(t *testing.T) {
		stage, dir := setup(t)
		moved := 0
		if err := place(stage, dir, &moved); err != nil {
			t.Fatal(err)
		}
		want := map[string]string{"figures/roc_curves.svg": "new", "figures/mine.txt": "user", "methods.md": "new", "report.html": "new"}
		if got := read(dir); !maps.Equal(got, want) || moved != 3 {
			t.Errorf("files %v after moving %d, want %v after 3", got, moved, want)
		}
		if entries, _ := os.ReadDir(stage); len(entries) != 1 {
			t.Errorf("stage holds %d entries, want only figures/ (the set-aside folder removed)", len(entries))
		}
	})
}

// sampleResults returns the report's sample results.json
// (testdata/report/sample_results.json, made by gen_sample.py).
func sampleResults(t *testing.T) string {
	t.Helper()
	b, err := os.ReadFile(filepath.Join("..", "..", "..", "testdata", "report", "sample_results.json"))
	if err != nil {
		t.Fatal(err)
	}
	return string(b)
}
