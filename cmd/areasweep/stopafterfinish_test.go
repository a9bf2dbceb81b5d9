package main

import (
	"os"
	"path/filepath"
	"strings"
	"syscall"
	"testing"

	"areasweep/cmd/internal/outdir"
)

// TestStoppedAfterFinish: a stop signal that arrives after a run moved
// its results into --out (its last moments: printing the report's path,
// exiting) used to say "this run's partial results were removed and
// --out was left as it was", while --out held the new run whole (found
// with timeout -s TERM 0.7 on the demo's study with --force onto a
// previous run). The message now says that the new outputs are in place;
// a signal while a run is still staged keeps the old message, and a
// batch keeps its own note.
func TestStoppedAfterFinish(t *testing.T) {
	for _, tc := range []struct {
		name   string
		finish bool
		batch  bool
		want   string
		not    string
	}{
		{"staged", false, false, "partial results were removed and --out was left as it was", "holds them whole"},
		{"finished", true, false, "it had already moved its complete new outputs into OUT, which holds them whole", "left as it was"},
		{"finished in a batch", true, true, "BATCH NOTE", "holds them whole"},
	} {
		t.Run(tc.name, func(t *testing.T) {
			out := filepath.Join(t.TempDir(), "out")
			d, err := outdir.Open(out, false, nil)
			if err != nil {
				t.Fatal(err)
			}
			if err := os.WriteFile(filepath.Join(d.Stage, "results.json"), []byte("{}"), 0o644); err != nil {
				t.Fatal(err)
			}
			if tc.finish {
				if err := d.Finish(); err != nil {
					t.Fatal(err)
				}
			}
			// The run's note, as at start (another test may have left
			// the report's).
			note := "this run's partial results were removed and --out was left as it was"
			defer stoppedNote.Store(stoppedNote.Swap(&note))
			if tc.batch {
				defer swapStoppedNote("BATCH NOTE")()
			}
			msg := stoppedMessage(syscall.SIGTERM)
			outdir.ResetStopping()
			want := strings.ReplaceAll(tc.want, "OUT", out)
			if !strings.HasPrefix(msg, "stopped by SIGTERM; ") || !strings.Contains(msg, want) || strings.Contains(msg, tc.not) {
				t.Errorf("message %q, want it to hold %q and not %q", msg, want, tc.not)
			}
			_, err = os.Stat(filepath.Join(out, "results.json"))
			if tc.finish != (err == nil) {
				t.Errorf("results.json in --out: %v, want it there %v", err, tc.finish)
			}
		})
	}
}
