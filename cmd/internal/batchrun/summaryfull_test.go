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

// TestSummaryFolderInTheWay: a folder summary.csv/ of the user's (or a
// file named summary_figures) in --out stopped the summary with "file
// exists", and the message said that running the same command again would
// write it, which failed the same way. It is now named, with what to do,
// and kept; the finished studies keep their folders.
func TestSummaryFolderInTheWay(t *testing.T) {
	s := newSmallStudy(t)
	table := batchTable(t, s)
	out := filepath.Join(t.TempDir(), "out")
	if err := runBatch(&Options{Table: table, Out: out, Quiet: true}); err == nil {
		t.Fatal("the batch's broken study did not fail") // it must, for exit 1
	}
	for _, c := range []struct{ name, want string }{
		{"summary.csv/keep.txt", "summary.csv is a folder, and the summary writes a file of that name"},
		{"summary_figures", "summary_figures is a file, and the summary writes a folder of that name"},
	} {
		t.Run(c.name, func(t *testing.T) {
			top := filepath.Join(out, strings.Split(c.name, "/")[0])
			if err := os.RemoveAll(top); err != nil {
				t.Fatal(err)
			}
			p := filepath.Join(out, c.name)
			os.MkdirAll(filepath.Dir(p), 0o755)
			if err := os.WriteFile(p, []byte("mine"), 0o644); err != nil {
				t.Fatal(err)
			}
			defer os.RemoveAll(top)
			err := runBatch(&Options{Table: table, Out: out, Quiet: true})
			msg := fault.UserText(err)
			for _, want := range []string{c.want, "move or rename it, then run the same command again"} {
				if !strings.Contains(msg, want) {
					t.Errorf("message lacks %q:\n%s", want, msg)
				}
			}
			if b, _ := os.ReadFile(p); string(b) != "mine" {
				t.Errorf("%s was deleted or changed", p)
			}
			if _, err := os.Stat(filepath.Join(out, "alpha", "results.json")); err != nil {
				t.Errorf("the finished study lost its results: %v", err)
			}
		})
	}
}
