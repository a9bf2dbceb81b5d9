package batchrun

import (
	"os"
	"path/filepath"
	"strings"
	"syscall"
	"testing"

	"areasweep/cmd/internal/fault"
	"areasweep/report"
)

// TestSummaryOnFullDisk: a batch whose summary meets a full disk (a 6 MB
// tmpfs: one study finished, two failed for want of space, then the
// summary's PDF) said only "writing the summary: write
// DIR/summary_figures/extent_effect.pdf: write
// DIR/summary_figures/.extent_effect.pdf.tmp-1868789779: no space left on
// device": neither the studies that failed nor what to do. It now names
// the folder, says to free space and run again, and still lists the
// failed studies (exit 1).
func TestSummaryOnFullDisk(t *testing.T) {
	s := newSmallStudy(t)
	table := batchTable(t, s) // its study "broken" fails
	out := filepath.Join(t.TempDir(), "out")
	defer func(f func(string, *report.BatchSummary) error) { writeSummaryFiles = f }(writeSummaryFiles)
	writeSummaryFiles = func(dir string, _ *report.BatchSummary) error {
		tmp := filepath.Join(dir, "summary_figures", ".extent_effect.pdf.tmp-1868789779")
		return &os.PathError{Op: "write", Path: tmp, Err: syscall.ENOSPC}
	}
	err := runBatch(&Options{Table: table, Out: out, Quiet: true})
	if err == nil || fault.IsBadInput(err) || fault.IsInternal(err) {
		t.Fatalf("got %v, want an outside failure", err)
	}
	msg := fault.UserText(err)
	for _, want := range []string{"writing the summary into " + out + " failed: no space left on device", "free some space", "running the same command again", "1 of 3 studies failed: broken"} {
		if !strings.Contains(msg, want) {
			t.Errorf("message does not say %q:\n%s", want, msg)
		}
	}
	if strings.Contains(msg, ".tmp-") || strings.Contains(msg, "summary.html lists") {
		t.Errorf("message names a temporary file or the unwritten summary:\n%s", msg)
	}
}
