package main

import (
	"bytes"
	"os"
	"os/exec"
	"path/filepath"
	"regexp"
	"strings"
	"syscall"
	"testing"
	"time"

	"areasweep/cmd/internal/fault"
)

func sampleResults(t *testing.T) string {
	t.Helper()
	b, err := os.ReadFile(filepath.Join("..", "..", "testdata", "report", "sample_results.json"))
	if err != nil {
		t.Fatal(err)
	}
	return string(b)
}

// replaceOnce replaces the first match of re in s, failing when none.
func replaceOnce(t *testing.T, s, re, repl string) string {
	t.Helper()
	rx := regexp.MustCompile(re)
	loc := rx.FindStringSubmatchIndex(s)
	if loc == nil {
		t.Fatalf("sample results hold no match of %s", re)
	}
	return s[:loc[0]] + string(rx.ExpandString(nil, repl, s, loc)) + s[loc[1]:]
}

// TestReportRefusesHandEdits: a results file edited by hand in ways that
// decoding alone would let through (a key twice, a field left out or
// null, a value of the wrong kind) or report without its place (NaN) is
// refused as bad input, naming the field's path, and nothing is written.
func TestReportRefusesHandEdits(t *testing.T) {
	sample := sampleResults(t)
	cases := []struct {
		name, body, want string
	}{
		{"key twice", replaceOnce(t, sample, `"auc": ([0-9.]+),`, `"auc": $1, "auc": 0.1,`), `scores[0].auc is given twice`},
		{"field null", replaceOnce(t, sample, `"auc": [0-9.]+,`, `"auc": null,`), `scores[0].auc is null`},
		{"wrong kind", replaceOnce(t, sample, `"auc": ([0-9.]+),`, `"auc": "$1",`), `scores[0].auc holds the string`},
		{"not a whole number", replaceOnce(t, sample, `"cells": ([0-9]+),`, `"cells": 1.5,`), `holds 1.5; a run writes a whole number`},
		{"NaN", replaceOnce(t, sample, `"auc": [0-9.]+,`, `"auc": NaN,`), `scores[0].auc: not valid JSON there`},
		{"nested too deep", replaceOnce(t, sample, `^\{`, `{"x": `+strings.Repeat("[", 100)+strings.Repeat("]", 100)+`,`), `nested more than 32 deep`},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			dir := t.TempDir()
			os.WriteFile(filepath.Join(dir, "results.json"), []byte(c.body), 0o644)
			var out, errOut bytes.Buffer
			err := reportRun(&ReportOptions{IO: &IO{Out: &out, ErrOut: &errOut}, Dir: dir})
			if err == nil || !fault.IsBadInput(err) || !strings.Contains(err.Error(), c.want) {
				t.Fatalf("got %v, want bad input naming %q", err, c.want)
			}
			if entries, _ := os.ReadDir(dir); len(entries) != 1 {
				t.Errorf("%d entries in the folder after a refusal, want results.json only", len(entries))
			}
		})
	}
	// The sample itself passes.
	dir := t.TempDir()
	os.WriteFile(filepath.Join(dir, "results.json"), []byte(sample), 0o644)
	var out bytes.Buffer
	if err := reportRun(&ReportOptions{IO: &IO{Out: &out, ErrOut: &out}, Dir: dir}); err != nil {
		t.Fatalf("sample results refused: %v", err)
	}
}

// TestReportKeepsUserFigures: re-rendering replaces the figure files,
// removes a stale page and an earlier temporary file, and keeps a file of
// the user's in figures/; no staging folder is left.
func TestReportKeepsUserFigures(t *testing.T) {
	dir := t.TempDir()
	os.WriteFile(filepath.Join(dir, "results.json"), []byte(sampleResults(t)), 0o644)
	fig := filepath.Join(dir, "figures")
	os.Mkdir(fig, 0o755)
	for name, body := range map[string]string{"my_notes.txt": "mine", "ring_steps_9.png": "stale", "roc_curves.svg": "old", ".roc_curves.png.tmp-123": "killed"} {
		os.WriteFile(filepath.Join(fig, name), []byte(body), 0o644)
	}
	var out bytes.Buffer
	if err := reportRun(&ReportOptions{IO: &IO{Out: &out, ErrOut: &out}, Dir: dir, Force: true}); err != nil {
		t.Fatal(err)
	}
	if b, err := os.ReadFile(filepath.Join(fig, "my_notes.txt")); err != nil || string(b) != "mine" {
		t.Errorf("the user's file in figures/: %q, %v", b, err)
	}
	for _, gone := range []string{"ring_steps_9.png", ".roc_curves.png.tmp-123"} {
		if _, err := os.Stat(filepath.Join(fig, gone)); err == nil {
			t.Errorf("figures/%s is still there", gone)
		}
	}
	if b, _ := os.ReadFile(filepath.Join(fig, "roc_curves.svg")); string(b) == "old" {
		t.Error("roc_curves.svg was not replaced")
	}
	entries, _ := os.ReadDir(dir)
	for _, e := range entries {
		if strings.HasPrefix(e.Name(), ".") {
			t.Errorf("left in the folder: %s", e.Name())
		}
	}
}

// TestReportStoppedLeavesNoTemporaryFiles: a SIGINT while the report is
// drawn exits 130 and leaves the folder as it was, without the staging
// folder or any temporary file.
func TestReportStoppedLeavesNoTemporaryFiles(t *testing.T) {
	dir := t.TempDir()
	os.WriteFile(filepath.Join(dir, "results.json"), []byte(sampleResults(t)), 0o644)
	cmd := exec.Command(areasweepBin, "report", dir)
	var se bytes.Buffer
	cmd.Stderr = &se
	if err := cmd.Start(); err != nil {
		t.Fatal(err)
	}
	staged := false
	for deadline := time.Now().Add(60 * time.Second); !staged && time.Now().Before(deadline); {
		m, _ := filepath.Glob(filepath.Join(dir, ".areasweep-staged-*", "figures"))
		staged = len(m) > 0
		time.Sleep(time.Millisecond)
	}
	cmd.Process.Signal(syscall.SIGINT)
	if !staged {
		cmd.Wait()
		t.Fatal("the report drew no figure in a staging folder inside DIR")
	}
	err := cmd.Wait()
	ee, ok := err.(*exec.ExitError)
	if err == nil {
		t.Skip("the report finished before the signal") // nothing to check
	}
	if !ok || ee.ExitCode() != 130 {
		t.Fatalf("exit %v, want 130\n%s", err, se.String())
	}
	if !strings.Contains(se.String(), "report files in") {
		t.Errorf("message does not speak of the report files: %s", se.String())
	}
	var left []string
	filepath.WalkDir(dir, func(p string, d os.DirEntry, err error) error {
		if p != dir {
			left = append(left, strings.TrimPrefix(p, dir))
		}
		return nil
	})
	if len(left) != 1 || left[0] != "/results.json" {
		t.Errorf("the stopped report left %v, want results.json only", left)
	}
}

// TestStoppedAsStagingStarts: a signal that arrives as soon as the
// staging folder appears, before the run has finished opening --out,
// still removes the staging folder and the lock (repeated, as the window
// is a few microseconds).
func TestStoppedAsStagingStarts(t *testing.T) {
	for i := 0; i < 15; i++ {
		parent := t.TempDir()
		out := filepath.Join(parent, "demo")
		cmd := exec.Command(areasweepBin, "demo", "--out", out, "--quiet")
		if err := cmd.Start(); err != nil {
			t.Fatal(err)
		}
		for deadline := time.Now().Add(30 * time.Second); time.Now().Before(deadline); {
			if m, _ := filepath.Glob(filepath.Join(parent, ".demo.areasweep-partial-*")); len(m) > 0 {
				break
			}
		}
		cmd.Process.Signal(syscall.SIGTERM)
		cmd.Wait()
		if _, err := os.Stat(out); err == nil {
			continue // finished before the signal
		}
		if entries, _ := os.ReadDir(parent); len(entries) > 0 {
			t.Fatalf("try %d: the stopped demo left %s", i, entries[0].Name())
		}
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
