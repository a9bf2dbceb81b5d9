package main

import (
	"bytes"
	"errors"
	"os/exec"
	"path/filepath"
	"strings"
	"testing"
)

// TestCurrentFolderRemoved: run from a current folder that was removed, a
// relative --out was refused with Go's raw "--out o: getwd: no such file or
// directory", and a relative input with "does not exist; check the path"
// alone. Both now say that the current folder is gone and what to do (exit
// 2, one line); nothing is written.
func TestCurrentFolderRemoved(t *testing.T) {
	root := t.TempDir()
	for _, args := range [][]string{
		{"demo", "--out", "o", "--quiet"},
		{"run", "--study", "in/study.yaml", "--out", filepath.Join(root, "o"), "--quiet"},
		{"report", "rel", "--quiet"},
	} {
		dir := filepath.Join(root, "gone")
		script := `mkdir "$1" && cd "$1" && rmdir "$1" && shift && exec "$@"`
		cmd := exec.Command("sh", append([]string{"-c", script, "sh", dir, areasweepBin}, args...)...)
		var se bytes.Buffer
		cmd.Stderr = &se
		err := cmd.Run()
		var ee *exec.ExitError
		if !errors.As(err, &ee) || ee.ExitCode() != 2 {
			t.Fatalf("%v: exit %v, want 2; stderr:\n%s", args, err, se.String())
		}
		msg := strings.TrimSpace(se.String())
		if strings.Contains(msg, "\n") || !strings.Contains(msg, "the current folder no longer exists") || !strings.Contains(msg, "cd to an existing folder") || strings.Contains(msg, "getwd") {
			t.Errorf("%v: stderr:\n%s", args, msg)
		}
		if matches, _ := filepath.Glob(filepath.Join(root, "*")); len(matches) != 0 {
			t.Errorf("%v: left %v", args, matches)
		}
	}
}
