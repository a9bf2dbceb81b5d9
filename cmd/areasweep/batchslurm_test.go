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
	"strconv"
	"strings"
	"syscall"
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

// TestBatchOnClusterKilledTask: on the cluster, a study's task killed
// with SIGKILL while it runs (scancel --full --signal=KILL, what SLURM
// sends at the time limit once the grace time after SIGTERM is over)
// leaves its staging folder and no completion marker; the merge job's
// summary lists the study as not finished, and the same command run
// again, without --force and without cleaning by hand, submits its task
// alone, which removes the killed run's staging folder and finishes.
func TestBatchOnClusterKilledTask(t *testing.T) {
	env := slurmtest.Start(t, "../../scripts/slurm-local.sh")
	dir, _ := inputsStudy(t)
	table := filepath.Join(dir, "slow.csv")
	body := "# region-buffers: 60\n# point-buffers: 40\n# hull-buffers: 0\n# e: 0.05\n" +
		"id,model,occurrences,region,iterations\n" +
		"a,m=model.tif,occ.csv,region.geojson,1000000\n" +
		"b,m=model.tif,occ_b.csv,region.geojson,30\n"
	if err := os.WriteFile(table, []byte(body), 0o644); err != nil {
		t.Fatal(err)
	}
	out := filepath.Join(t.TempDir(), "cluster-out")
	logs := filepath.Join(out, batchMarker, "slurm", "logs")
	so, se, code := runBinEnv(t, env, "batch", table, "--out", out, "--slurm", "--submit")
	m := regexp.MustCompile(`submitted array job ([0-9]+)`).FindStringSubmatch(so)
	mj := regexp.MustCompile(`submitted merge job ([0-9]+)`).FindStringSubmatch(so)
	if code != 0 || m == nil || mj == nil {
		t.Fatalf("submit: exit %d\nstdout %s\nstderr %s", code, so, se)
	}
	scancel := func(args ...string) {
		c := exec.Command("scancel", args...)
		c.Env = env
		if b, err := c.CombinedOutput(); err != nil {
			t.Errorf("scancel %v: %v %s", args, err, b)
		}
	}
	// SIGKILL to the task's areasweep process, found by its staging
	// folder's owner record (the one-node cluster runs it here): scancel
	// --signal=KILL would cancel the job, which sends SIGTERM first, and
	// areasweep then removes its staging folder itself (exit 143).
	stage := waitForStage(t, filepath.Join(out, "a"))
	var rec []byte
	var pm [][]byte
	var err error
	for try := 0; try < 400 && pm == nil; try++ { // the record follows the folder by a moment
		time.Sleep(5 * time.Millisecond)
		rec, err = os.ReadFile(filepath.Join(stage, ".areasweep-owner"))
		pm = regexp.MustCompile(`(?m)^pid\t([0-9]+)$`).FindSubmatch(rec)
	}
	if pm == nil {
		scancel(m[1], mj[1])
		t.Fatalf("the task's staging folder %s holds no owner record with its pid: %v %q", stage, err, rec)
	}
	pid, _ := strconv.Atoi(string(pm[1]))
	if err := syscall.Kill(pid, syscall.SIGKILL); err != nil {
		t.Fatalf("kill -9 %d: %v", pid, err)
	}
	// The merge job (afterany) runs once the array is over.
	deadline := time.Now().Add(clusterWait)
	for {
		q := exec.Command("squeue", "-h", "-j", m[1]+","+mj[1], "-o", "%i")
		q.Env = env
		b, err := q.CombinedOutput()
		if (err == nil && strings.TrimSpace(string(b)) == "") || strings.Contains(string(b), "Invalid job id") {
			break // left the queue (or forgotten since)
		}
		if time.Now().After(deadline) {
			scancel(m[1], mj[1])
			t.Fatalf("the jobs did not end within %v: %s", clusterWait, b)
		}
		time.Sleep(500 * time.Millisecond)
	}
	if _, err := os.Stat(stage); err != nil {
		t.Fatalf("the killed task left no staging folder (%v): the kill came too late to test anything\n%s", err, dumpLogs(logs))
	}
	rows := readSummary(t, out)
	if len(rows) != 2 || rows[0]["status"] != "failed" || rows[1]["status"] != "ok" {
		t.Errorf("the merge job's summary rows %v; want a failed (killed), b ok\n%s", rows, dumpLogs(logs))
	}
	// Again, a cheaper a: the same table would take as long; the row's
	// iterations change its settings, which a study without a marker
	// does not care about.
	if err := os.WriteFile(table, []byte(strings.Replace(body, "1000000", "30", 1)), 0o644); err != nil {
		t.Fatal(err)
	}
	so, se, code = runBinEnv(t, env, "batch", table, "--out", out, "--slurm", "--submit", "--wait")
	if code != 0 || !strings.Contains(so, "(tasks 1)") {
		t.Fatalf("again: exit %d, want 0 with a's task alone\nstdout %s\nstderr %s\n%s", code, so, se, dumpLogs(logs))
	}
	if _, err := os.Stat(stage); err == nil {
		t.Errorf("the killed task's staging folder %s kept", stage)
	}
	if l := leftovers(out); len(l) > 0 {
		t.Errorf("left behind: %v", l)
	}
	for _, r := range readSummary(t, out) {
		if r["status"] != "ok" {
			t.Errorf("summary row %v after the rerun", r)
		}
	}
}
