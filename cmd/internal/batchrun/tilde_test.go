package batchrun

import (
	"os"
	"path/filepath"
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

// dirOf is the folder of study st (k = 0) or of its shard k.
func dirOf(out string, st *study, k int) string {
	if k > 0 {
		return shardDir(out, st.id, k)
	}
	return st.dir
}

// TestReadFailureNeverRun: a study (or shard) that never ran, with no
// folder, is named so in the summary (it was "holds no completion marker;
// see the job logs", of a folder that does not exist and a job that never
// was); one whose folder exists keeps that message.
func TestReadFailureNeverRun(t *testing.T) {
	out := t.TempDir()
	st := &study{id: "oak", dir: filepath.Join(out, "oak")}
	for _, k := range []int{0, 2} {
		err := readFailure(out, st, k)
		if err == nil || !strings.Contains(err.Error(), "not finished: "+dirOf(out, st, k)+" does not exist (it has not run, or was stopped") || !strings.Contains(err.Error(), "run the batch command without --summary-only") {
			t.Errorf("shard %d: %v", k, err)
		}
	}
	os.MkdirAll(st.dir, 0o755)
	os.MkdirAll(shardDir(out, "oak", 2), 0o755)
	for _, k := range []int{0, 2} {
		if err := readFailure(out, st, k); err == nil || !strings.Contains(err.Error(), "holds no completion marker") {
			t.Errorf("shard %d with its folder: %v", k, err)
		}
	}
}
