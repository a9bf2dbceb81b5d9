package main

import (
	"areasweep/cmd/internal/batch"
	"areasweep/cmd/internal/slurm/slurmtest"
	"bytes"
	"context"
	"os"
	"os/exec"
	"path/filepath"
	"regexp"
	"strings"
	"testing"
	"time"
)

// clusterWait bounds one submit-and-wait command of the cluster test: far
// above the 20 to 40 s it takes on an idle 2-core machine, so that a
// cluster that never runs the jobs fails the test instead of hanging it.
const clusterWait = 6 * time.Minute

// runBinEnv is runBin with the environment env, killed (and the test
// failed, with the queue) after clusterWait.
func runBinEnv(t *testing.T, env []string, args ...string) (string, string, int) {
	t.Helper()
	ctx, cancel := context.WithTimeout(context.Background(), clusterWait)
	defer cancel()
	cmd := exec.CommandContext(ctx, areasweepBin, args...)
	cmd.Env = env
	var so, se bytes.Buffer
	cmd.Stdout, cmd.Stderr = &so, &se
	err := cmd.Run()
	if ctx.Err() != nil {
		q := exec.Command("squeue", "-o", "%i %j %T %M %R")
		q.Env = env
		queue, _ := q.CombinedOutput()
		// The jobs this command submitted would wait in the queue for
		// nobody: cancel them.
		for _, m := range regexp.MustCompile(`submitted (?:array|merge) job ([0-9]+)`).FindAllStringSubmatch(so.String(), -1) {
			c := exec.Command("scancel", m[1])
			c.Env = env
			c.Run()
		}
		t.Fatalf("%v did not end within %v: the cluster did not run the jobs (busy with other jobs, or down); queue:\n%s\nstdout %s\nstderr %s", args, clusterWait, queue, so.String(), se.String())
	}
	code := exitCode(err)
	if code < 0 {
		t.Fatalf("run %v: %v", args, err)
	}
	return so.String(), se.String(), code
}

// TestBatchOnCluster submits a batch of three small studies, two shards
// each, to a real one-node SLURM cluster as a job array of six tasks plus
// a merge job (merging each study's shards, then the summary), waits, and
// checks that each study's results.json and scores.csv are byte-identical
// to a plain local run with the same settings and that the merge job
// wrote the summary. Submitting again runs no task (every one is
// finished) and only the merge job, which rewrites the same summary.
func TestBatchOnCluster(t *testing.T) {
	env := slurmtest.Start(t, "../../scripts/slurm-local.sh")
	s := sharedStudy(t)
	table := filepath.Join(s.dir, "cluster.csv")
	body := `# region-buffers: -40,60
# point-buffers: 40
# hull-buffers: 0
# e: 0.05
# iterations: 30
id,model,occurrences,region,seed
alpha,m=model.tif;sq=model2.tif,occ.csv,region.geojson,9
beta,m=model.tif,occ.csv,region.geojson,11
gamma,sq=model2.tif,occ.csv,region.geojson,13
`
	if err := os.WriteFile(table, []byte(body), 0o644); err != nil {
		t.Fatal(err)
	}
	out := filepath.Join(t.TempDir(), "cluster-out")
	so, se, code := runBinEnv(t, env, "batch", table, "--out", out, "--shards", "2", "--slurm", "--submit", "--wait", "--cpus-per-task", "1")
	logs := filepath.Join(out, batchMarker, "slurm", "logs")
	if code != 0 {
		t.Fatalf("exit %d\nstdout %s\nstderr %s\n%s", code, so, se, dumpLogs(logs))
	}
	if !strings.Contains(so, "submitted array job") || !strings.Contains(so, "(tasks 1-6)") || !strings.Contains(so, "every task finished") {
		t.Errorf("stdout:\n%s", so)
	}
	for _, c := range []struct {
		id, seed string
		models   []string
	}{{"alpha", "9", []string{"m=" + s.model, "sq=" + s.model2}}, {"beta", "11", []string{"m=" + s.model}}, {"gamma", "13", []string{"sq=" + s.model2}}} {
		plain := plainRun(t, s, c.seed, c.models...)
		for _, f := range []string{"results.json", "scores.csv"} {
			want, _ := os.ReadFile(filepath.Join(plain, f))
			got, err := os.ReadFile(filepath.Join(out, c.id, f))
			if err != nil || len(want) == 0 || !bytes.Equal(got, want) {
				t.Errorf("%s/%s from the cluster differs from a plain run (%v)\n%s", c.id, f, err, dumpLogs(logs))
			}
		}
	}
	// A shard task's completion marker keeps the batch's settings
	// checksum (a later run compares it with the table's row) beside the
	// task's job line; the study's, written by the merge job, has it too.
	for _, c := range []struct {
		dir string
		job bool
	}{{filepath.Join(out, "alpha"), false}, {filepath.Join(out, batchMarker, "shards", "beta", "2"), true}} {
		m, err := batch.ReadMarker(c.dir)
		if err != nil || m["settings"] == "" || (m["job"] != "") != c.job {
			t.Errorf("marker of %s: %v, %v; want the batch's settings (and the task's job: %v)", c.dir, m, err, c.job)
		}
	}
	summary, err := os.ReadFile(filepath.Join(out, "summary.csv"))
	if err != nil {
		t.Fatalf("the merge job wrote no summary: %v\n%s", err, dumpLogs(logs))
	}
	if rows := readSummary(t, out); len(rows) != 4 || rows[3]["study"] != "gamma" || rows[3]["status"] != "ok" {
		t.Errorf("summary rows %v", rows)
	}

	// Again: nothing left to run, only the merge job.
	if err := os.Remove(filepath.Join(out, "summary.csv")); err != nil {
		t.Fatal(err)
	}
	so, se, code = runBinEnv(t, env, "batch", table, "--out", out, "--shards", "2", "--slurm", "--submit", "--wait")
	if code != 0 || strings.Contains(so, "submitted array job") || !strings.Contains(so, "6 tasks, 0 not finished") {
		t.Fatalf("resubmission: exit %d\nstdout %s\nstderr %s", code, so, se)
	}
	if again, err := os.ReadFile(filepath.Join(out, "summary.csv")); err != nil || !bytes.Equal(again, summary) {
		t.Errorf("the merge job alone wrote another summary (%v)", err)
	}
}

// dumpLogs returns the job logs, for a failure message.
func dumpLogs(dir string) string {
	var b strings.Builder
	ents, _ := os.ReadDir(dir)
	for _, e := range ents {
		data, _ := os.ReadFile(filepath.Join(dir, e.Name()))
		b.WriteString("--- " + e.Name() + "\n" + string(data))
	}
	return b.String()
}

// TestBatchOnClusterInputReplaced: on the cluster, a finished study whose
// occurrence file was replaced is not submitted again: named with the
// file, no array job, exit 1 with --wait, and the merge job's summary
// lists it as failed; with --force its task alone is submitted and it
// finishes with other results.
func TestBatchOnClusterInputReplaced(t *testing.T) {
	env := slurmtest.Start(t, "../../scripts/slurm-local.sh")
	dir, table := inputsStudy(t)
	out := filepath.Join(t.TempDir(), "cluster-out")
	if _, se, code := runBin(t, "batch", table, "--out", out, "--quiet"); code != 0 {
		t.Fatalf("local batch: exit %d: %s", code, se)
	}
	results := filepath.Join(out, "a", "results.json")
	first, _ := os.ReadFile(results)
	occ := filepath.Join(dir, "occ.csv")
	b, _ := os.ReadFile(occ)
	if err := os.WriteFile(occ, bytes.Replace(b, []byte("10.6,47.6,test\n"), nil, 1), 0o644); err != nil {
		t.Fatal(err)
	}
	laterTime(t, occ)
	logs := filepath.Join(out, batchMarker, "slurm", "logs")
	so, se, code := runBinEnv(t, env, "batch", table, "--out", out, "--slurm", "--submit", "--wait")
	if code != 1 || strings.Contains(so, "submitted array job") || !strings.Contains(so, "not submitted: a: ") ||
		!strings.Contains(so, "the occurrences file "+occ+" holds other content") || !strings.Contains(se, "add --force") {
		t.Fatalf("input replaced: exit %d, want 1, no array job, a named with %s\nstdout %s\nstderr %s\n%s", code, occ, so, se, dumpLogs(logs))
	}
	rows := readSummary(t, out)
	if len(rows) != 2 || rows[0]["status"] != "failed" || !strings.Contains(rows[0]["error"], occ) || rows[1]["status"] != "ok" {
		t.Errorf("the merge job's summary rows %v; want a failed naming %s, b ok", rows, occ)
	}
	so, se, code = runBinEnv(t, env, "batch", table, "--out", out, "--slurm", "--submit", "--wait", "--force")
	if code != 0 || !strings.Contains(so, "(tasks 1)") {
		t.Fatalf("--force: exit %d, want 0 with a's task alone\nstdout %s\nstderr %s\n%s", code, so, se, dumpLogs(logs))
	}
	if got, _ := os.ReadFile(results); len(got) == 0 || bytes.Equal(got, first) {
		t.Errorf("--force: a's results.json is missing or the old one\n%s", dumpLogs(logs))
	}
	// The array script kept the batch's input lines beside its job line,
	// so the next run finds the study finished.
	m, err := batch.ReadMarker(filepath.Join(out, "a"))
	files, ferr := m.Inputs()
	if err != nil || ferr != nil || len(files) == 0 || m["job"] == "" {
		t.Errorf("a's marker after the task: %v (%v, %v); want input lines and the task's job line", m, err, ferr)
	}
	so, se, code = runBinEnv(t, env, "batch", table, "--out", out, "--slurm")
	if code != 0 || !strings.Contains(so, "2 tasks, 0 not finished") || strings.Contains(so, "not submitted") {
		t.Errorf("after --force: exit %d\nstdout %s\nstderr %s", code, so, se)
	}
}
