package pipeline

import (
	"errors"
	"os"
	"strings"
	"syscall"
	"testing"
)

// TestWriteFailedNamesFolder: a failure while writing the outputs names the
// output folder as the user gave it, not the staging file's path, and a
// full disk or quota says what to do; other causes get no such advice.
func TestWriteFailedNamesFolder(t *testing.T) {
	stage := "/data/out/.areasweep-stage-123/results.json"
	for _, tc := range []struct {
		name   string
		err    error
		advice bool
	}{
		{"disk full", &os.PathError{Op: "write", Path: stage, Err: syscall.ENOSPC}, true},
		{"quota", &os.PathError{Op: "write", Path: stage, Err: syscall.EDQUOT}, true},
		{"rename", &os.LinkError{Op: "rename", Old: stage, New: "out/results.json", Err: syscall.ENOSPC}, true},
		{"input/output", &os.PathError{Op: "write", Path: stage, Err: syscall.EIO}, false},
		{"other", errors.New("short write"), false},
	} {
		t.Run(tc.name, func(t *testing.T) {
			msg := writeFailedIn("results/sp1", tc.err).Error()
			if !strings.HasPrefix(msg, "writing the results into results/sp1 failed: ") || !strings.HasSuffix(msg, "; nothing in it was changed") {
				t.Fatalf("message %q does not name the output folder", msg)
			}
			if strings.Contains(msg, "stage") {
				t.Errorf("message %q names the staging path", msg)
			}
			if got := strings.Contains(msg, "free some space"); got != tc.advice {
				t.Errorf("message %q: advice on space %v, want %v", msg, got, tc.advice)
			}
		})
	}
}
