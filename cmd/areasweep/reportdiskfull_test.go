package main

import (
	"bytes"
	"os"
	"path/filepath"
	"strings"
	"syscall"
	"testing"

	"areasweep/cmd/internal/fault"
	"areasweep/cmd/internal/outdir"
	"areasweep/report"
)

// TestReportOnFullDisk: areasweep report on a folder whose disk is full,
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
				stageReport, writeReport = s, w
			}(stageReport, writeReport)
			if tc.stage != nil {
				stageReport = func(string) (*outdir.Staged, error) { return nil, tc.stage }
			}
			if tc.write != nil {
				writeReport = func(dir string, _ *report.Results) error {
					os.WriteFile(filepath.Join(dir, "report.html"), []byte("half"), 0o644)
					return tc.write
				}
			}
			dir := t.TempDir()
			sample := sampleResults(t)
			os.WriteFile(filepath.Join(dir, "results.json"), []byte(sample), 0o644)
			os.WriteFile(filepath.Join(dir, "report.html"), []byte("previous report"), 0o644)
			var out bytes.Buffer
			err := reportRun(&ReportOptions{IO: &IO{Out: &out, ErrOut: &out}, Dir: dir, Force: true})
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

// TestReportLineBreak: areasweep report on a folder whose path holds a line
// break is refused on one line that says so, and the folder is left as it
// was; the message said "cannot write in it (the path holds a line break);
// re-render the report of a folder you can write to" with the line break
// printed raw.
func TestReportLineBreak(t *testing.T) {
	dir := filepath.Join(t.TempDir(), "run\n1")
	os.Mkdir(dir, 0o755)
	os.WriteFile(filepath.Join(dir, "results.json"), []byte(sampleResults(t)), 0o644)
	var out bytes.Buffer
	err := reportRun(&ReportOptions{IO: &IO{Out: &out, ErrOut: &out}, Dir: dir, Force: true})
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

// TestReportStoppedNoteFromStart: the message of a signal that stops
// areasweep report while it reads results.json (SIGINT 0.05 s after the
// start) said "this run's partial results were removed and --out was left
// as it was", although report has no --out; it names the report's folder
// from the start.
func TestReportStoppedNoteFromStart(t *testing.T) {
	prev := stoppedNote.Load()
	defer stoppedNote.Store(prev)
	dir := t.TempDir() // no results.json: refused before anything is read
	var out bytes.Buffer
	if err := reportRun(&ReportOptions{IO: &IO{Out: &out, ErrOut: &out}, Dir: dir}); err == nil {
		t.Fatal("report of an empty folder succeeded")
	}
	if note := *stoppedNote.Load(); strings.Contains(note, "--out") || !strings.Contains(note, dir) {
		t.Errorf("note %q", note)
	}
}

// TestPlaceReportNamesWhatFailed: a move of the report's files that fails
// part-way (report.html made immutable with chattr +i, after the figures
// and methods.md were moved) said only "moving the report into im failed:
// operation not permitted", neither the file nor that the files before it
// were already replaced. placeReport now names the file it failed on and
// counts the files it moved. A folder in report.html's place stands in
// for the immutable file.
func TestPlaceReportNamesWhatFailed(t *testing.T) {
	stage, dir := t.TempDir(), t.TempDir()
	os.MkdirAll(filepath.Join(stage, "figures"), 0o755)
	os.WriteFile(filepath.Join(stage, "figures", "roc_curves.svg"), []byte("new"), 0o644)
	os.WriteFile(filepath.Join(stage, "methods.md"), []byte("new"), 0o644)
	os.WriteFile(filepath.Join(stage, "report.html"), []byte("new"), 0o644)
	os.MkdirAll(filepath.Join(dir, "report.html", "x"), 0o755)
	moved := 0
	err := placeReport(stage, dir, &moved)
	if err == nil {
		t.Fatal("placeReport succeeded")
	}
	if want := "cannot replace " + filepath.Join(dir, "report.html") + " ("; !strings.HasPrefix(err.Error(), want) {
		t.Errorf("%q does not start with %q", err, want)
	}
	if moved != 2 {
		t.Errorf("moved %d files, want 2 (the figure and methods.md)", moved)
	}
}
