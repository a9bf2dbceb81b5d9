package batchrun

import (
	"os"
	"path/filepath"
	"strings"
	"syscall"
	"testing"

	"areasweep/cmd/internal/fault"
)

// TestClaimDirCannotCreate: a batch --out that cannot be created (on a
// read-only mount: "cannot create --out X: mkdir X: read-only file
// system", exit 1) is refused as run refuses it, exit 2, naming the cause
// once and what to do. A dangling link on its path stands in for the
// read-only mount here (mkdir fails, with "file exists").
func TestClaimDirCannotCreate(t *testing.T) {
	dir := t.TempDir()
	link := filepath.Join(dir, "gone")
	if err := os.Symlink(filepath.Join(dir, "nowhere"), link); err != nil {
		t.Fatal(err)
	}
	out := filepath.Join(link, "runs")
	err := claimDir(out)
	if err == nil || !fault.IsBadInput(err) {
		t.Fatalf("claimDir: %v, want bad input", err)
	}
	msg := err.Error()
	if !strings.Contains(msg, "choose a folder you can write to") || strings.Count(msg, out) != 2 || strings.Contains(msg, "mkdir ") {
		t.Errorf("message %q", msg)
	}
	// A full disk is an outside failure with what to do.
	full := cannotCreate(out, out, &os.PathError{Op: "mkdir", Path: out, Err: syscall.ENOSPC})
	if fault.IsBadInput(full) || !strings.Contains(full.Error(), "free some space") {
		t.Errorf("full disk: %v", full)
	}
}
