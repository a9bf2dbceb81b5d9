package batchrun

import (
	"os"
	"strings"
	"testing"

	"areasweep/cmd/internal/fault"
)

// TestBatchTildeOut: batch --out=~/runs is refused before anything is
// made (a folder named ~ in the current folder was), as run's --out is.
func TestBatchTildeOut(t *testing.T) {
	t.Setenv("HOME", t.TempDir())
	t.Chdir(t.TempDir())
	err := preflight(&Options{Out: "~/runs"})
	if err == nil || !fault.IsBadInput(err) || !strings.Contains(err.Error(), "--out ~/runs: it starts with ~") {
		t.Fatalf("got %v", err)
	}
	if _, err := os.Stat("~"); err == nil {
		t.Error("a folder named ~ was made")
	}
}
