package batchrun

import (
	"bytes"
	"context"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"areasweep/cmd/internal/fault"
	"areasweep/cmd/internal/pipeline"
	"areasweep/cmd/internal/slurm"
)

// TestSlurmMemoryPerTask: --memory given with --slurm was ignored without
// a word (found by the batch audit of 2026-12-05): each task asked for
// the largest study's estimate plus headroom, and a user whose tasks were
// killed for want of memory had no way to ask for more. It is now each
// task's --mem; below the largest study's estimate (the need a local
// batch checks against its budget) it is refused, naming the study.
func TestSlurmMemoryPerTask(t *testing.T) {
	s := newSmallStudy(t)
	table := batchTable(t, s)
	o := &Options{Table: table, Out: t.TempDir(), Jobs: 1, Shards: 1, Slurm: SlurmOptions{Enabled: true, CPUs: 1}}
	studies, err := resolve(o)
	if err != nil {
		t.Fatal(err)
	}
	var need int64
	for _, st := range studies {
		so := st.opts
		so.Workers = 1
		if n, err := pipeline.Estimate(so); err == nil {
			need = max(need, n)
		}
	}
	p, err := slurmPlan(o, studies)
	if err != nil || p.MemoryMB != slurm.MemoryMB(need) {
		t.Fatalf("no --memory: %d MiB, %v; want %d (the estimate with headroom)", p.MemoryMB, err, slurm.MemoryMB(need))
	}
	o.Memory = 3 << 30
	if p, err = slurmPlan(o, studies); err != nil || p.MemoryMB != 3072 {
		t.Fatalf("--memory 3G: %d MiB, %v; want 3072 (worked by hand: 3 x 1024)", p.MemoryMB, err)
	}
	o.Memory = need - 1
	_, err = slurmPlan(o, studies)
	if err == nil || !fault.IsBadInput(err) || !strings.Contains(err.Error(), "--memory is less than a task needs: study ") {
		t.Fatalf("--memory below the estimate: %v", err)
	}
	// The whole command: refused before --out is made.
	o.Out = filepath.Join(t.TempDir(), "runs")
	var so bytes.Buffer
	if err := Run(context.Background(), o, IO{Out: &so, ErrOut: &so}); err == nil || !fault.IsBadInput(err) {
		t.Fatalf("Run with --memory below the estimate: %v", err)
	}
	if _, err := os.Stat(o.Out); err == nil {
		t.Errorf("%s was made", o.Out)
	}
}
