package main

import (
	"bytes"
	"errors"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"testing"
)

// TestReportTMPDIRUnusable: the PDF writer prepares its font in a folder
// under TMPDIR; with TMPDIR missing (as with one read-only or full, seen
// on tmpfs mounts) areasweep report printed the library's log lines
// ("2026/12/03 20:29:06 vgpdf: could not generate font data for PDF: ...")
// on the terminal and failed with "internal error". It now exits 1 with one
// line that names TMPDIR and what to do, and leaves the folder as it was.
func TestReportTMPDIRUnusable(t *testing.T) {
	dir := t.TempDir()
	sample := sampleResults(t)
	os.WriteFile(filepath.Join(dir, "results.json"), []byte(sample), 0o644)
	tmp := filepath.Join(t.TempDir(), "gone")
	cmd := exec.Command(areasweepBin, "report", dir, "--quiet")
	cmd.Env = append(os.Environ(), "TMPDIR="+tmp)
	var se bytes.Buffer
	cmd.Stderr = &se
	err := cmd.Run()
	var ee *exec.ExitError
	if !errors.As(err, &ee) || ee.ExitCode() != 1 {
		t.Fatalf("exit %v, want 1; stderr:\n%s", err, se.String())
	}
	lines := strings.Split(strings.TrimSpace(se.String()), "\n")
	if len(lines) != 1 || !strings.HasPrefix(lines[0], "areasweep: ") {
		t.Errorf("stderr is not one areasweep: line:\n%s", se.String())
	}
	for _, want := range []string{"TMPDIR", tmp, "set TMPDIR to a folder you can write to"} {
		if !strings.Contains(se.String(), want) {
			t.Errorf("stderr does not say %q:\n%s", want, se.String())
		}
	}
	for _, raw := range []string{"vgpdf", "internal error", "gofpdf"} {
		if strings.Contains(se.String(), raw) {
			t.Errorf("stderr holds %q:\n%s", raw, se.String())
		}
	}
	entries, _ := os.ReadDir(dir)
	if len(entries) != 1 {
		t.Errorf("%d entries left, want results.json only", len(entries))
	}
}
