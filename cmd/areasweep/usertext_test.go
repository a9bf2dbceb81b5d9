package main

import (
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"testing"

	"areasweep/cmd/internal/fault"
)

// TestUserTextEndToEnd: what reaches a user carries none of areasweep's
// package names, and names of the user's own that look like them stay.
func TestUserTextEndToEnd(t *testing.T) {
	s := sharedStudy(t)

	// Two training points: the hull is skipped with a warning, which
	// results.json, run.log and the report show without "extent: ".
	t.Run("hull warning", func(t *testing.T) {
		dir := t.TempDir()
		occ := filepath.Join(dir, "two.csv")
		os.WriteFile(occ, []byte("lon,lat,role\n13.1,42.6,train\n14.7,43.5,train\n13.5,43,test\n14.3,43.9,test\n15.1,44.8,test\n"), 0o644)
		out := filepath.Join(dir, "out")
		_, se, code := runBin(t, "run", "--model", "m="+s.model, "--occurrences", occ, "--region", s.region, "--iterations", "5",
			"--region-buffers", "60", "--point-buffers", "40", "--hull-buffers", "0", "--no-distance-null", "--quiet", "--out", out)
		if code != 0 {
			t.Fatalf("exit %d: %s", code, se)
		}
		found := false
		for _, w := range loadResults(t, out).Warnings {
			if strings.Contains(w, "needs 3 or more training points") {
				found = true
				if w != fault.Warning(w) || strings.HasPrefix(w, "extent: ") {
					t.Errorf("warning carries a package name: %q", w)
				}
			}
		}
		if !found {
			t.Error("no warning that the hull needs 3 training points")
		}
		for _, f := range []string{"run.log", "report.html"} {
			b, _ := os.ReadFile(filepath.Join(out, f))
			if !strings.Contains(string(b), "needs 3 or more training points") || strings.Contains(string(b), "extent: a convex hull") {
				t.Errorf("%s: the hull warning is missing or carries \"extent: \"", f)
			}
		}
	})

	// An occurrence table saved as "pass" in the working folder, given by
	// that relative name: the message names it.
	t.Run("input file named pass", func(t *testing.T) {
		dir := t.TempDir()
		os.WriteFile(filepath.Join(dir, "pass"), []byte("lon,lat,role\n"), 0o644)
		cmd := exec.Command(areasweepBin, "run", "--model", "m="+s.model, "--occurrences", "pass", "--region", s.region, "--quiet", "--out", filepath.Join(dir, "out"))
		cmd.Dir = dir
		b, err := cmd.CombinedOutput()
		if exitCode(err) != 2 || !strings.Contains(string(b), "areasweep: pass: ") {
			t.Errorf("exit %d, want 2 naming the file pass: %s", exitCode(err), b)
		}
	})

	// Studies named "report" and "pass" made from other inputs: the
	// batch's message lists each under its name.
	t.Run("studies named report and pass", func(t *testing.T) {
		dir, table := inputsStudy(t)
		body, _ := os.ReadFile(table)
		body = []byte(strings.NewReplacer("\na,", "\nreport,", "\nb,", "\npass,").Replace(string(body)))
		os.WriteFile(table, body, 0o644)
		out := filepath.Join(t.TempDir(), "runs")
		if _, se, code := runBin(t, "batch", table, "--out", out, "--quiet"); code != 0 {
			t.Fatalf("first run: exit %d: %s", code, se)
		}
		model := filepath.Join(dir, "model.tif")
		b, _ := os.ReadFile(model)
		os.WriteFile(model, append(b, 0), 0o644)
		_, se, code := runBin(t, "batch", table, "--out", out, "--quiet")
		if code != 1 {
			t.Fatalf("model changed: exit %d, want 1: %s", code, se)
		}
		for _, want := range []string{"studies failed: report, pass", "\n  report: " + filepath.Join(out, "report") + " was made from other inputs", "\n  pass: " + filepath.Join(out, "pass") + " was made from other inputs"} {
			if !strings.Contains(se, want) {
				t.Errorf("stderr lacks %q:\n%s", want, se)
			}
		}
	})
}
