package main

import (
	"os"
	"path/filepath"
	"strings"
	"testing"

	"areasweep/cmd/internal/fault"
)

// h27Table writes a study table in its own folder (the shared inputs named
// absolutely) with the rows given after the shared settings.
func h27Table(t *testing.T, s *smallStudy, rows ...string) string {
	t.Helper()
	body := "# region-buffers: -40,60\n# point-buffers: 40\n# hull-buffers: 0\n# e: 0.05\n# iterations: 30\n# seed: 9\n" +
		"id,model,occurrences,region\n"
	r := strings.NewReplacer("MODEL", s.model, "OCC", s.occ, "REGION", s.region, "DIR", s.dir)
	for _, row := range rows {
		body += r.Replace(row) + "\n"
	}
	table := filepath.Join(t.TempDir(), "studies.csv")
	if err := os.WriteFile(table, []byte(body), 0o644); err != nil {
		t.Fatal(err)
	}
	return table
}

// TestBatchMissingInputOneStudy: a study whose input file does not exist
// fails alone, named by the table's file, line and column, without
// running; the studies before and after it run (exit 1, the summary
// lists it). A scheduler task for another study (--only) is not held up
// by it. A SLURM plan is refused before anything is written.
func TestBatchMissingInputOneStudy(t *testing.T) {
	s := sharedStudy(t)
	table := h27Table(t, s,
		"first,m=MODEL,OCC,REGION",
		"gone,m=DIR/no-such-model.tif,OCC,REGION",
		"last,m=MODEL,OCC,REGION")
	out := filepath.Join(t.TempDir(), "runs")
	_, se, code := runBin(t, "batch", table, "--out", out, "--quiet")
	if code != 1 {
		t.Fatalf("exit %d, want 1 (one study failed): %s", code, se)
	}
	for _, want := range []string{"1 of 3 studies failed: gone", `studies.csv line 9, study "gone", column "model"`, "no-such-model.tif does not exist"} {
		if !strings.Contains(se, want) {
			t.Errorf("stderr lacks %q: %s", want, se)
		}
	}
	if forbidden.MatchString(se) {
		t.Errorf("raw text in stderr: %s", se)
	}
	for _, id := range []string{"first", "last"} {
		if _, err := os.Stat(filepath.Join(out, id, "results.json")); err != nil {
			t.Errorf("study %s did not run: %v", id, err)
		}
	}
	if _, err := os.Stat(filepath.Join(out, "gone")); err == nil {
		t.Error("the study with a missing input left a folder")
	}
	sum, err := os.ReadFile(filepath.Join(out, "summary.csv"))
	if err != nil || !strings.Contains(string(sum), "no-such-model.tif") {
		t.Errorf("summary.csv does not name the missing file (%v): %s", err, sum)
	}

	// A task for another study runs, on a new --out.
	out2 := filepath.Join(t.TempDir(), "task")
	if _, se, code := runBin(t, "batch", table, "--out", out2, "--only", "last", "--quiet"); code != 0 {
		t.Errorf("--only last: exit %d, want 0: %s", code, se)
	}
	// A SLURM plan: nothing written.
	out3 := filepath.Join(t.TempDir(), "cluster")
	if _, se, code := runBin(t, "batch", table, "--out", out3, "--slurm"); code != 2 || !strings.Contains(se, "no-such-model.tif") || !strings.Contains(se, "nothing was written") {
		t.Errorf("--slurm: exit %d, want 2 naming the file: %s", code, se)
	}
	if _, err := os.Stat(out3); err == nil {
		t.Error("--slurm with a missing input created --out")
	}
}

// TestBatchStudyFolderIsFile: a file where a study's folder goes fails
// that study with a message naming it and what to do (not the system's
// "not a directory"), and is kept, with --force too.
func TestBatchStudyFolderIsFile(t *testing.T) {
	s := sharedStudy(t)
	table := h27Table(t, s, "one,m=MODEL,OCC,REGION", "two,m=MODEL,OCC,REGION")
	out := filepath.Join(t.TempDir(), "runs")
	if err := os.MkdirAll(filepath.Join(out, batchMarker), 0o755); err != nil {
		t.Fatal(err)
	}
	mine := filepath.Join(out, "two")
	if err := os.WriteFile(mine, []byte("mine"), 0o644); err != nil {
		t.Fatal(err)
	}
	for _, force := range []bool{false, true} {
		args := []string{"batch", table, "--out", out, "--quiet"}
		if force {
			args = append(args, "--force")
		}
		_, se, code := runBin(t, args...)
		if code != 1 || !strings.Contains(se, mine+" is a file, not a folder") || !strings.Contains(se, "move or rename the file") {
			t.Errorf("--force %v: exit %d, want 1 naming the file: %s", force, code, se)
		}
		if strings.Contains(se, "not a directory") || forbidden.MatchString(se) {
			t.Errorf("--force %v: raw system text: %s", force, se)
		}
		if b, err := os.ReadFile(mine); err != nil || string(b) != "mine" {
			t.Errorf("--force %v: the user's file: %q, %v; want it kept", force, b, err)
		}
		if _, err := os.Stat(filepath.Join(out, "one", "results.json")); err != nil {
			t.Errorf("--force %v: the other study did not run: %v", force, err)
		}
	}
}

// TestBatchOnlyEmpty: --only given empty (a scheduler's unset variable)
// or with an empty item is refused; it used to mean "every study", so
// each task of an array would have run the whole table. Spaces around
// ids are dropped.
func TestBatchOnlyEmpty(t *testing.T) {
	for _, c := range []struct {
		only, want string
	}{
		{"", "--only is empty"},
		{" ", "--only is empty"},
		{"a,", `--only "a," holds an empty id`},
		{",a", `--only ",a" holds an empty id`},
	} {
		ran := false
		cmd := newBatchCmd(&IO{Out: &strings.Builder{}, ErrOut: &strings.Builder{}}, func(*BatchOptions) error { ran = true; return nil })
		cmd.SetArgs([]string{"t.csv", "--out", "o", "--only", c.only})
		cmd.SilenceErrors, cmd.SilenceUsage = true, true
		err := cmd.Execute()
		if ran || err == nil || !strings.Contains(err.Error(), c.want) {
			t.Errorf("--only %q: ran %v, error %v; want %q", c.only, ran, err, c.want)
		}
	}
	var got []string
	cmd := newBatchCmd(&IO{Out: &strings.Builder{}, ErrOut: &strings.Builder{}}, func(o *BatchOptions) error { got = o.Only; return nil })
	cmd.SetArgs([]string{"t.csv", "--out", "o", "--only", "a, b"})
	if err := cmd.Execute(); err != nil || strings.Join(got, "|") != "a|b" {
		t.Errorf(`--only "a, b": %q, %v; want a and b`, got, err)
	}
}

// TestBatchShardZero: --shard 0 (a scheduler's task number counted from
// 0) is refused, exit 2. Before, 0 read as "--shard not given": the task
// ran every shard of the study and merged them, while the tasks 1 to N-1
// of the same array ran shards of it into the same folders.
func TestBatchShardZero(t *testing.T) {
	for _, c := range []struct {
		shard   string
		wantRun bool
		want    string
	}{
		{"0", false, "--shard 0: shards are counted from 1"},
		{"1", true, ""},
	} {
		checkBatchFlags(t, []string{"--only", "a", "--shards", "2", "--shard", c.shard}, c.wantRun, c.want)
	}
}

// finishedPair runs a batch of two studies, "one" and "two", on the
// shared small study and returns its table, its --out, study two's
// results.json and that file's content.
func finishedPair(t *testing.T) (table, out, res string, good []byte) {
	t.Helper()
	table = h27Table(t, sharedStudy(t), "one,m=MODEL,OCC,REGION", "two,m=MODEL,OCC,REGION")
	out = filepath.Join(t.TempDir(), "runs")
	if _, se, code := runBin(t, "batch", table, "--out", out, "--quiet"); code != 0 {
		t.Fatalf("first batch: exit %d: %s", code, se)
	}
	res = filepath.Join(out, "two", "results.json")
	good, err := os.ReadFile(res)
	if err != nil {
		t.Fatal(err)
	}
	return table, out, res, good
}

// TestBatchDamagedResults: a finished study whose results.json was edited
// since (a field deleted) is not summarised from wrong numbers: running
// the batch again lists it as failed (exit 1) with the file, the field
// and what to do; once its completion marker is removed it runs again.
func TestBatchDamagedResults(t *testing.T) {
	table, out, res, good := finishedPair(t)
	os.WriteFile(res, deleteField(t, good, "scores", 0, "auc"), 0o644)
	_, se, code := runBin(t, "batch", table, "--out", out, "--quiet")
	marker := filepath.Join(out, "two", ".areasweep-done")
	for _, want := range []string{"1 of 2 studies failed: two", res, "scores[0].auc is missing", "remove " + marker} {
		if !strings.Contains(se, want) {
			t.Errorf("stderr lacks %q: %s", want, se)
		}
	}
	if code != 1 {
		t.Errorf("exit %d, want 1", code)
	}
	sum, _ := os.ReadFile(filepath.Join(out, "summary.csv"))
	if !strings.Contains(string(sum), "scores[0].auc is missing") {
		t.Errorf("summary.csv does not list the damaged study: %s", sum)
	}
	os.Remove(marker)
	if _, se, code := runBin(t, "batch", table, "--out", out, "--quiet", "--force"); code != 0 {
		t.Errorf("after removing the marker: exit %d: %s", code, se)
	}
	if b, _ := os.ReadFile(res); string(b) != string(good) {
		t.Error("the study run again wrote other results")
	}
}

// TestBatchSlurmResourcesNeedSlurm: the SLURM job resources given without
// --slurm are refused (exit 2) and nothing runs. Before, --cpus-per-task
// alone was ignored without a word (its default, 1, hid it), so a batch
// meant for the cluster ran every study on the machine it was typed on.
func TestBatchSlurmResourcesNeedSlurm(t *testing.T) {
	for _, c := range []struct {
		args    []string
		wantRun bool
		want    string
	}{
		{[]string{"--cpus-per-task", "4"}, false, "--cpus-per-task sets a resource of the SLURM jobs and needs --slurm"},
		{[]string{"--cpus-per-task", "1"}, false, "--cpus-per-task sets a resource"},
		{[]string{"--partition", "gpu"}, false, "--partition sets a resource"},
		{[]string{"--time", "02:00:00", "--max-parallel", "3"}, false, "--time and --max-parallel set resources of the SLURM jobs and need --slurm"},
		{[]string{"--partition", "p", "--time", "1:00:00", "--cpus-per-task", "2"}, false, "--partition, --time and --cpus-per-task set resources"},
		{[]string{"--cpus-per-task", "4", "--slurm"}, true, ""},
		{[]string{"--jobs", "2"}, true, ""},
	} {
		checkBatchFlags(t, c.args, c.wantRun, c.want)
	}
}

// checkBatchFlags runs the batch command on "t.csv --out o" and args
// (without running any study) and fails t unless it ran the batch exactly
// when wantRun, and refused with an error holding want, a bad input
// (exit 2), exactly when want is not "".
func checkBatchFlags(t *testing.T, args []string, wantRun bool, want string) {
	t.Helper()
	ran := false
	cmd := newBatchCmd(&IO{Out: &strings.Builder{}, ErrOut: &strings.Builder{}}, func(*BatchOptions) error { ran = true; return nil })
	cmd.SetArgs(append([]string{"t.csv", "--out", "o"}, args...))
	cmd.SilenceErrors, cmd.SilenceUsage = true, true
	err := cmd.Execute()
	if ran != wantRun || (want == "") != (err == nil) || (err != nil && !strings.Contains(err.Error(), want)) {
		t.Errorf("%v: ran %v, error %v; want ran %v and %q", args, ran, err, wantRun, want)
	}
	if err != nil && !fault.IsBadInput(err) {
		t.Errorf("%v: %v is not a bad input (exit 2)", args, err)
	}
}

// TestBatchJobsWithSlurmRefused: --jobs given with --slurm was ignored
// without a word (each array task runs one study; found by the batch
// audit of 2026-12-05), so a user who meant to limit the cluster to N
// studies at once ran them all at once: it is refused (exit 2), pointing
// to --max-parallel. --memory with --slurm is each task's memory, so it
// is accepted.
func TestBatchJobsWithSlurmRefused(t *testing.T) {
	for _, c := range []struct {
		args    []string
		wantRun bool
		want    string
	}{
		{[]string{"--slurm", "--jobs", "4"}, false, "--jobs sets how many studies this machine runs at once; with --slurm each array task runs one study: use --max-parallel 4"},
		{[]string{"--slurm", "--jobs", "1"}, false, "--jobs sets how many studies"},
		{[]string{"--slurm", "--memory", "8G"}, true, ""},
		// A --time or --partition sbatch would not take made a bad
		// plan, reported as a bug (exit 3) after --out was made.
		{[]string{"--slurm", "--time", "2h"}, false, `--time "2h": write a time limit as sbatch takes it`},
		{[]string{"--slurm", "--partition", "a b"}, false, `--partition "a b": `},
		{[]string{"--slurm", "--time", "UNLIMITED", "--partition", "gpu,cpu"}, true, ""},
	} {
		checkBatchFlags(t, c.args, c.wantRun, c.want)
	}
}
