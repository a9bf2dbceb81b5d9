package slurm

import (
	"areasweep/cmd/internal/slurm/slurmtest"
	"context"
	"os"
	"os/exec"
	"path/filepath"
	"reflect"
	"strconv"
	"strings"
	"testing"
	"time"
)

// TestClusterArray runs a real one-node SLURM cluster (munged, slurmctld,
// slurmd) through scripts/slurm-local.sh, which installs Debian's packages
// when they are missing. It never skips: without sbatch and a way to
// install it the test fails, in CI and elsewhere (scripts/setup.sh --test
// installs the packages).
//
// It submits a 4-task array whose tasks write a result and count their runs,
// plus a dependent merge job that checks every marker and result; then it
// resubmits the whole array (every task must skip), removes one marker and
// resubmits only the pending task, and finally checks that a failing task
// leaves no marker and keeps the afterok merge job from running.
func TestClusterArray(t *testing.T) {
	env := slurmtest.Start(t, "../../../scripts/slurm-local.sh")
	if _, err := exec.LookPath("sbatch"); err != nil {
		t.Fatalf("sbatch is not on PATH after starting the cluster: %v", err)
	}
	s := Submitter{Env: env}
	ctx, cancel := context.WithTimeout(context.Background(), 180*time.Second) // generous: a loaded machine schedules slowly; the test normally ends in about 15 s
	defer cancel()

	dir := t.TempDir()
	runs := filepath.Join(dir, "runs")
	if err := os.Mkdir(runs, 0o755); err != nil {
		t.Fatal(err)
	}
	p := testPlan(dir, 4, `echo "$AREASWEEP_STUDY $AREASWEEP_SHARD/$AREASWEEP_SHARDS" >"$AREASWEEP_OUT/result.txt"
echo "$SLURM_ARRAY_JOB_ID" >>`+Quote(runs)+`/"$AREASWEEP_STUDY-$AREASWEEP_SHARD"`)
	merged := filepath.Join(dir, "merged.txt")
	// The merge job checks every task's marker and result, in manifest order.
	p.MergeCommand = `tail -n +2 "$AREASWEEP_MANIFEST" | while IFS=$'\t' read -r study shard out; do
  [ -f "$out/` + MarkerName + `" ] || { echo "no marker in $out" >&2; exit 1; }
  [ "$(cat "$out/result.txt")" = "$study $shard" ] || { echo "bad result in $out" >&2; exit 1; }
  echo "$study $shard"
done >` + Quote(merged) + `.tmp
mv ` + Quote(merged) + `.tmp ` + Quote(merged)
	f, err := p.Write()
	if err != nil {
		t.Fatal(err)
	}
	wait := func(sub Submission) {
		t.Helper()
		start := time.Now()
		if err := s.Wait(ctx, 250*time.Millisecond, sub.ArrayJob, sub.MergeJob); err != nil {
			t.Fatal(err)
		}
		t.Logf("jobs %s and %s done in %v", sub.ArrayJob, sub.MergeJob, time.Since(start).Round(time.Millisecond))
	}
	runCount := func() map[string]int {
		out := map[string]int{}
		for _, tk := range p.Tasks {
			b, _ := os.ReadFile(filepath.Join(runs, tk.Study+"-"+strconv.Itoa(tk.Shard)))
			out[tk.Study+"-"+strconv.Itoa(tk.Shard)] = len(strings.Fields(string(b)))
		}
		return out
	}

	// 1. First submission: every task runs once, the merge job sees them all.
	sub, err := s.Submit(ctx, p, f, p.Pending())
	if err != nil {
		t.Fatal(err)
	}
	if sub.ArrayJob == "" || sub.MergeJob == "" || !reflect.DeepEqual(sub.Tasks, []int{1, 2, 3, 4}) {
		t.Fatalf("submission %+v", sub)
	}
	wait(sub)
	if got := p.Pending(); len(got) != 0 {
		t.Fatalf("unfinished tasks %v; logs in %s", got, f.Logs)
	}
	want := map[string]int{"s0-1": 1, "s0-2": 1, "s1-1": 1, "s1-2": 1}
	if got := runCount(); !reflect.DeepEqual(got, want) {
		t.Fatalf("runs %v, want %v", got, want)
	}
	b, err := os.ReadFile(merged)
	if err != nil || string(b) != "s0 1/2\ns0 2/2\ns1 1/2\ns1 2/2\n" {
		t.Fatalf("merge output %q, %v; logs in %s", b, err, f.Logs)
	}
	os.Remove(merged)

	// 2. Resubmitting the whole array: every task is skipped by its marker.
	sub, err = s.Submit(ctx, p, f, []int{1, 2, 3, 4})
	if err != nil {
		t.Fatal(err)
	}
	wait(sub)
	if got := runCount(); !reflect.DeepEqual(got, want) {
		t.Fatalf("after resubmission runs %v, want %v (finished tasks must be skipped)", got, want)
	}
	for k := 1; k <= 4; k++ {
		log, _ := os.ReadFile(filepath.Join(f.Logs, "task-"+strconv.Itoa(k)+".log"))
		if !strings.Contains(string(log), "already finished, skipped") {
			t.Fatalf("task %d log does not say it was skipped:\n%s", k, log)
		}
	}
	if _, err := os.Stat(merged); err != nil {
		t.Fatalf("the merge job did not run after the resubmission: %v", err)
	}

	// 3. A lost marker: only that task is pending and resubmitted.
	if err := os.Remove(filepath.Join(p.Tasks[2].Out, MarkerName)); err != nil {
		t.Fatal(err)
	}
	ids := p.Pending()
	if !reflect.DeepEqual(ids, []int{3}) {
		t.Fatalf("pending %v, want [3]", ids)
	}
	sub, err = s.Submit(ctx, p, f, ids)
	if err != nil {
		t.Fatal(err)
	}
	wait(sub)
	want["s1-1"] = 2
	if got := runCount(); !reflect.DeepEqual(got, want) || len(p.Pending()) != 0 {
		t.Fatalf("after resuming task 3: runs %v, want %v; pending %v", got, want, p.Pending())
	}

	// 4. A failing task: no marker, and the afterok merge job never runs.
	fdir := filepath.Join(dir, "failing")
	fp := testPlan(fdir, 2, `[ "$AREASWEEP_SHARD" = 1 ] || exit 7
touch "$AREASWEEP_OUT/ok"`)
	fp.MergeCommand = "touch " + Quote(filepath.Join(fdir, "merged"))
	ff, err := fp.Write()
	if err != nil {
		t.Fatal(err)
	}
	sub, err = s.Submit(ctx, fp, ff, fp.Pending())
	if err != nil {
		t.Fatal(err)
	}
	wait(sub)
	if got := fp.Pending(); !reflect.DeepEqual(got, []int{2}) {
		t.Fatalf("failing plan: pending %v, want [2]", got)
	}
	if _, err := os.Stat(filepath.Join(fdir, "merged")); err == nil {
		t.Fatal("the merge job ran although a task failed")
	}
}

// TestClusterLogFolderNamed: a batch --out with a space in its path (a
// folder "SDM runs") made every submission fail, sbatch saying "Invalid
// directive found in batch script: runs/..." (found by the batch audit of
// 2026-12-05): sbatch splits a #SBATCH line at spaces and reads quotes,
// '#' and '%' of its own, so the job's log path must be written in its
// quoting. The folder here holds a space, both quotes, '#' and '%';
// the task's and the merge job's logs must land in it under their names.
func TestClusterLogFolderNamed(t *testing.T) {
	env := slurmtest.Start(t, "../../../scripts/slurm-local.sh")
	s := Submitter{Env: env}
	ctx, cancel := context.WithTimeout(context.Background(), 180*time.Second)
	defer cancel()
	dir := filepath.Join(t.TempDir(), `SDM runs 'a' "b" #1 100%`)
	p := testPlan(dir, 1, `echo done >"$AREASWEEP_OUT/result.txt"`)
	p.Tasks[0].Shards, p.Tasks[0].Shard = 1, 1
	f, err := p.Write()
	if err != nil {
		t.Fatal(err)
	}
	sub, err := s.Submit(ctx, p, f, p.Pending())
	if err != nil {
		t.Fatal(err)
	}
	if err := s.Wait(ctx, 250*time.Millisecond, sub.ArrayJob, sub.MergeJob); err != nil {
		t.Fatal(err)
	}
	for _, name := range []string{"task-1.log", "merge-" + sub.MergeJob + ".log"} {
		if _, err := os.Stat(filepath.Join(f.Logs, name)); err != nil {
			t.Errorf("log %s not in %s: %v", name, f.Logs, err)
		}
	}
	if got := p.Pending(); len(got) != 0 {
		t.Errorf("unfinished tasks %v", got)
	}
}
