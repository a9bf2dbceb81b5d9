package batchrun

import (
	"os"
	"path/filepath"
	"strings"
	"testing"

	"areasweep/cmd/internal/fault"
)

// TestBatchOutRefusedBeforeAnything: an --out whose path holds a line
// break made the folder, ran every study (each refused its own folder
// inside it, exit 1) and wrote the summary into it; with --slurm it, or
// a tab, ended as "slurm: bad job plan ... this is a bug in areasweep"
// (exit 3) after --out was made, and a backslash wrote job scripts
// whose logs sbatch would write nowhere (found by the batch audit of
// 2026-12-05). Each is now refused before anything is made (exit 2).
func TestBatchOutRefusedBeforeAnything(t *testing.T) {
	for _, tc := range []struct {
		name, out string
		slurm     bool
		want      string
	}{
		{"line break", "runs\nold", false, "the path holds a line break"},
		{"line break, slurm", "runs\nold", true, "the path holds a line break"},
		{"tab, slurm", "runs\told", true, "--out runs\told: with --slurm its path cannot hold a tab or a backslash"},
		{"backslash, slurm", `runs\old`, true, `--out runs\old: with --slurm its path cannot hold a tab or a backslash`},
	} {
		t.Run(tc.name, func(t *testing.T) {
			t.Chdir(t.TempDir())
			o := &Options{Out: tc.out, Table: "studies.csv"}
			o.Slurm.Enabled = tc.slurm
			err := preflight(o)
			if err == nil || !fault.IsBadInput(err) || !strings.Contains(err.Error(), tc.want) {
				t.Fatalf("got %v, want a bad input with %q", err, tc.want)
			}
			if ents, _ := os.ReadDir("."); len(ents) > 0 {
				t.Errorf("made %s", filepath.Join(".", ents[0].Name()))
			}
		})
	}
	// A tab or a backslash is a folder name like any other for a local
	// batch (only sbatch's log path cannot hold them).
	t.Chdir(t.TempDir())
	if err := preflight(&Options{Out: `runs\old` + "\tx"}); err != nil && strings.Contains(err.Error(), "--out") {
		t.Errorf("a local batch refused --out: %v", err)
	}
}
