package main

import (
	"context"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"syscall"
	"testing"
	"time"
)

// TestOutRefusedBeforeReading: an --out that Open would refuse before its
// first write (here a non-empty folder without --force) is refused before
// the run reads its points or hashes its inputs: with the occurrences in a
// pipe no one writes, the run exits 2 with the folder's message instead of
// waiting on the pipe (it used to read and hash every input first, found
// by hand: minutes on a large study for a forgotten --force). The time
// limit only ends a run that would wait forever.
func TestOutRefusedBeforeReading(t *testing.T) {
	s := newSmallStudy(t)
	dir := t.TempDir()
	fifo := filepath.Join(dir, "occ.csv")
	if err := syscall.Mkfifo(fifo, 0o600); err != nil {
		t.Fatal(err)
	}
	out := filepath.Join(dir, "out")
	os.Mkdir(out, 0o755)
	os.WriteFile(filepath.Join(out, "notes.txt"), []byte("mine"), 0o644)
	ctx, cancel := context.WithTimeout(context.Background(), 60*time.Second)
	defer cancel()
	cmd := exec.CommandContext(ctx, areasweepBin, "run", "--quiet", "--region", s.region, "--occurrences", fifo, "--model", "m="+s.model, "--out", out)
	var se strings.Builder
	cmd.Stderr = &se
	code := exitCode(cmd.Run())
	if ctx.Err() != nil {
		t.Fatal("the run waited on the occurrences' pipe before refusing --out")
	}
	want := "areasweep: --out " + out + " exists and is not empty; add --force"
	if code != 2 || !strings.HasPrefix(se.String(), want) {
		t.Errorf("exit %d, stderr %q; want exit 2 and %q", code, se.String(), want)
	}
	if entries, _ := os.ReadDir(out); len(entries) != 1 {
		t.Errorf("%s holds %d entries, want only notes.txt", out, len(entries))
	}
}
