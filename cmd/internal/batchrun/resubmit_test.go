package batchrun

import (
	"bytes"
	"context"
	"os"
	"path/filepath"
	"strings"
	"testing"
	"time"

	"areasweep/cmd/internal/fault"
)

// fakeSlurm puts an sbatch and a squeue on PATH that stand in for a
// cluster: sbatch numbers its jobs from 101 (the count is in
// dir/submitted), squeue prints the lines of dir/queue (the jobs "in the
// queue", as squeue -h -o %i prints them), or, when dir/squeue_err
// exists, prints it to standard error and exits 1. It returns dir.
func fakeSlurm(t *testing.T) string {
	t.Helper()
	dir := t.TempDir()
	bin := filepath.Join(dir, "bin")
	if err := os.Mkdir(bin, 0o755); err != nil {
		t.Fatal(err)
	}
	sbatch := `#!/bin/sh
n=$(cat '` + dir + `/submitted' 2>/dev/null || echo 100)
n=$((n + 1))
echo "$n" >'` + dir + `/submitted'
echo "$n"
`
	squeue := `#!/bin/sh
if [ -f '` + dir + `/squeue_err' ]; then cat '` + dir + `/squeue_err' >&2; exit 1; fi
cat '` + dir + `/queue' 2>/dev/null || true
`
	for name, body := range map[string]string{"sbatch": sbatch, "squeue": squeue} {
		if err := os.WriteFile(filepath.Join(bin, name), []byte(body), 0o755); err != nil {
			t.Fatal(err)
		}
	}
	t.Setenv("PATH", bin+string(os.PathListSeparator)+os.Getenv("PATH"))
	return dir
}

// TestSlurmResubmitWhileQueued: running the same --slurm --submit command
// again while the jobs it submitted were still in the queue (to see how
// far they got, as README's "run the same command again" invites)
// submitted every unfinished task a second time, beside the queued ones,
// and a second merge job (found by the batch audit of 2026-12-05: job
// arrays 19 and 21 ran the same six studies). It is now refused (exit 2)
// naming the queued jobs, with nothing submitted; once they have left the
// queue the same command submits again.
func TestSlurmResubmitWhileQueued(t *testing.T) {
	fake := fakeSlurm(t)
	s := newSmallStudy(t)
	table := batchTable(t, s)
	out := filepath.Join(t.TempDir(), "runs")
	o := func() *Options {
		return &Options{Table: table, Out: out, Jobs: 1, Shards: 1, Version: "test", Slurm: SlurmOptions{Enabled: true, Submit: true, CPUs: 1}}
	}
	var so bytes.Buffer
	if err := Run(context.Background(), o(), IO{Out: &so, ErrOut: &so}); err != nil {
		t.Fatalf("first submission: %v\n%s", err, so.String())
	}
	if !strings.Contains(so.String(), "submitted array job 101") || !strings.Contains(so.String(), "submitted merge job 102") {
		t.Fatalf("first submission printed:\n%s", so.String())
	}
	// The array's tasks 2 and 3 wait in the queue, the merge job too.
	os.WriteFile(filepath.Join(fake, "queue"), []byte("101_[2-3]\n102\n"), 0o644)
	so.Reset()
	err := Run(context.Background(), o(), IO{Out: &so, ErrOut: &so})
	want := "jobs 101 and 102 of this batch's previous submission are still in the SLURM queue"
	if err == nil || !fault.IsBadInput(err) || !strings.Contains(err.Error(), want) || !strings.Contains(err.Error(), "scancel 101 102") {
		t.Fatalf("resubmission while queued: %v, want a bad input with %q\n%s", err, want, so.String())
	}
	if b, _ := os.ReadFile(filepath.Join(fake, "submitted")); strings.TrimSpace(string(b)) != "102" {
		t.Errorf("sbatch ran again while the jobs were queued (last job %s)", b)
	}
	// Writing the job files alone (no --submit) is refused too: the
	// queued tasks read their line of manifest.tsv when they start, and a
	// table with a row added above would send them to other studies.
	manifest := filepath.Join(out, OwnDir, "slurm", "manifest.tsv")
	before, _ := os.ReadFile(manifest)
	plan := o()
	plan.Slurm.Submit = false
	err = Run(context.Background(), plan, IO{Out: &so, ErrOut: &so})
	if err == nil || !fault.IsBadInput(err) || !strings.Contains(err.Error(), "writing the job files now would change the manifest the queued tasks read") {
		t.Fatalf("--slurm alone while queued: %v", err)
	}
	if after, _ := os.ReadFile(manifest); string(after) != string(before) {
		t.Errorf("manifest.tsv rewritten while the jobs were queued")
	}
	// squeue cannot reach the controller: not taken for jobs in the
	// queue, but said, and nothing submitted.
	os.WriteFile(filepath.Join(fake, "squeue_err"), []byte("slurm_load_jobs error: Unable to contact slurm controller (connect failure)\n"), 0o644)
	so.Reset()
	err = Run(context.Background(), o(), IO{Out: &so, ErrOut: &so})
	if err == nil || fault.IsBadInput(err) || !strings.Contains(err.Error(), "cannot tell whether the jobs 101, 102 of this batch's previous submission are still queued") || !strings.Contains(err.Error(), "Unable to contact slurm controller") {
		t.Fatalf("squeue failing: %v", err)
	}
	// squeue no longer knows them (purged): gone from the queue, and the
	// same command submits the unfinished tasks.
	os.WriteFile(filepath.Join(fake, "squeue_err"), []byte("slurm_load_jobs error: Invalid job id specified\n"), 0o644)
	so.Reset()
	if err := Run(context.Background(), o(), IO{Out: &so, ErrOut: &so}); err != nil || !strings.Contains(so.String(), "submitted array job 103") {
		t.Fatalf("resubmission once the jobs left the queue: %v\n%s", err, so.String())
	}
	os.Remove(filepath.Join(fake, "squeue_err"))
	os.WriteFile(filepath.Join(fake, "queue"), nil, 0o644)
	so.Reset()
	if err := Run(context.Background(), o(), IO{Out: &so, ErrOut: &so}); err != nil || !strings.Contains(so.String(), "submitted array job 105") {
		t.Fatalf("resubmission with an empty queue: %v\n%s", err, so.String())
	}
}

// TestSlurmStopWhileWaiting: a signal while --slurm --submit --wait waits
// for the jobs said "this run's partial results were removed and --out
// was left as it was", although the jobs went on running on the cluster
// and writing into --out (found by the batch audit of 2026-12-05). While
// it waits, the note names the jobs and how to see or cancel them.
func TestSlurmStopWhileWaiting(t *testing.T) {
	fake := fakeSlurm(t)
	s := newSmallStudy(t)
	table := batchTable(t, s)
	out := filepath.Join(t.TempDir(), "runs")
	os.WriteFile(filepath.Join(fake, "queue"), []byte("101_[1-3]\n102\n"), 0o644) // they never leave
	o := &Options{Table: table, Out: out, Jobs: 1, Shards: 1, Version: "test", Slurm: SlurmOptions{Enabled: true, Submit: true, Wait: true, CPUs: 1}}
	var notes []string
	var so bytes.Buffer
	ctx, cancel := context.WithTimeout(context.Background(), 1500*time.Millisecond)
	defer cancel()
	err := Run(ctx, o, IO{Out: &so, ErrOut: &so, StopNote: func(note string) func() {
		notes = append(notes, note)
		return func() {}
	}})
	if err == nil {
		t.Fatalf("the wait ended although the jobs stayed queued:\n%s", so.String())
	}
	if len(notes) == 0 || notes[0] != StartingNote {
		t.Errorf("stop notes %q, want the first %q (while the table is read)", notes, StartingNote)
	}
	want := "the submitted jobs keep running on the cluster (array job 101, merge job 102: squeue -j 101,102 shows them, scancel 101 102 cancels them)"
	if len(notes) == 0 || !strings.Contains(notes[len(notes)-1], want) {
		t.Errorf("stop notes %q, want the last with %q", notes, want)
	}
}
