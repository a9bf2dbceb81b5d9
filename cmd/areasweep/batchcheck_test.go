package main

import (
	"bytes"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"syscall"
	"testing"
	"time"
)

// TestBatchForceIntoFolderWithoutMarker: a study folder that exists
// without a completion marker (here holding a file of the user's) is
// refused without --force, with advice that works (the study's line and
// the batch's closing line both name --force): the batch's --force then
// runs the study into it and keeps the user's file.
func TestBatchForceIntoFolderWithoutMarker(t *testing.T) {
	s := sharedStudy(t)
	table := batchTable(t, s)
	out := filepath.Join(t.TempDir(), "runs")
	mine := filepath.Join(out, "beta", "notes.txt")
	for _, d := range []string{filepath.Join(out, batchMarker), filepath.Dir(mine)} {
		if err := os.MkdirAll(d, 0o755); err != nil {
			t.Fatal(err)
		}
	}
	if err := os.WriteFile(mine, []byte("mine"), 0o644); err != nil {
		t.Fatal(err)
	}
	_, se, code := runBin(t, "batch", table, "--out", out, "--only", "beta", "--quiet")
	if code != 1 || !strings.Contains(se, "--force") {
		t.Fatalf("without --force: exit %d, want 1 with advice to add --force: %s", code, se)
	}
	// The closing line too: it said that running the same command again
	// retries the study, which fails the same way.
	if !strings.Contains(se, "--force runs it again (its folder holds files but no completion marker") ||
		strings.Contains(se, "running the same command again retries it") {
		t.Errorf("without --force: the closing line does not say --force runs it again:\n%s", se)
	}
	_, se, code = runBin(t, "batch", table, "--out", out, "--only", "beta", "--quiet", "--force")
	if code != 0 {
		t.Fatalf("with --force: exit %d, want 0: %s", code, se)
	}
	if b, err := os.ReadFile(mine); err != nil || string(b) != "mine" {
		t.Errorf("the user's file: %q, %v; want it kept", b, err)
	}
	for _, f := range []string{"results.json", ".areasweep-done"} {
		if _, err := os.Stat(filepath.Join(out, "beta", f)); err != nil {
			t.Errorf("no %s after batch --force: %v", f, err)
		}
	}
}

// TestBatchStoppedBySignal stops a batch while its second study scores:
// exit 128+N, the message says that finished studies stay, the first
// study's folder is complete, the stopped one left nothing, and the same
// command run again (its slow row made quick) skips the first and runs
// the second.
func TestBatchStoppedBySignal(t *testing.T) {
	s := sharedStudy(t)
	dir := t.TempDir()
	table := filepath.Join(dir, "studies.csv")
	write := func(iterations string) {
		body := "# region-buffers: 60\n# point-buffers: 40\n# hull-buffers: 0\n# e: 0.05\n" +
			"id,model,occurrences,region,iterations\n" +
			"quick,m=" + s.model + "," + s.occ + "," + s.region + ",30\n" +
			"slow,m=" + s.model + "," + s.occ + "," + s.region + "," + iterations + "\n"
		if err := os.WriteFile(table, []byte(body), 0o644); err != nil {
			t.Fatal(err)
		}
	}
	write("1000000")
	out := filepath.Join(dir, "runs")
	for _, sig := range []syscall.Signal{syscall.SIGINT, syscall.SIGTERM} {
		cmd := exec.Command(areasweepBin, "batch", table, "--out", out, "--quiet")
		var se bytes.Buffer
		cmd.Stderr = &se
		if err := cmd.Start(); err != nil {
			t.Fatal(err)
		}
		waitForStage(t, filepath.Join(out, "slow"))
		time.Sleep(100 * time.Millisecond)
		cmd.Process.Signal(sig)
		code := exitCode(cmd.Wait())
		if code != 128+int(sig) {
			t.Errorf("%v: exit %d, want %d; stderr %s", sig, code, 128+int(sig), se.String())
		}
		if msg := se.String(); !strings.Contains(msg, "studies that had finished keep their folders") || strings.Contains(msg, "--out was left as it was") || forbidden.MatchString(msg) {
			t.Errorf("%v: stderr: %s", sig, msg)
		}
		if _, err := os.Stat(filepath.Join(out, "quick", ".areasweep-done")); err != nil {
			t.Errorf("%v: the finished study lost its marker: %v", sig, err)
		}
		if _, err := os.Stat(filepath.Join(out, "slow")); !os.IsNotExist(err) {
			t.Errorf("%v: the stopped study left its folder (%v)", sig, err)
		}
		if l := leftovers(out); len(l) > 0 {
			t.Errorf("%v: left behind: %v", sig, l)
		}
	}
	write("30")
	_, se, code := runBin(t, "batch", table, "--out", out)
	if code != 0 || !strings.Contains(se, "quick: already finished, skipped") {
		t.Fatalf("rerun: exit %d: %s", code, se)
	}
}

// TestSlurmSubmitWithoutSbatch: --submit on a machine without sbatch is
// refused before anything is written (exit 2), saying what to do; --slurm
// alone still writes the job files and prints the commands.
func TestSlurmSubmitWithoutSbatch(t *testing.T) {
	s := sharedStudy(t)
	table := batchTable(t, s)
	bin := t.TempDir() // a PATH without sbatch
	env := []string{"PATH=" + bin, "HOME=" + t.TempDir()}
	out := filepath.Join(t.TempDir(), "runs")
	_, se, code := runBinEnv(t, env, "batch", table, "--out", out, "--slurm", "--submit")
	if code != 2 || !strings.Contains(se, "sbatch is not on PATH") || !strings.Contains(se, "without --submit") || strings.Contains(se, "exec:") {
		t.Fatalf("exit %d, want 2 with advice: %s", code, se)
	}
	if _, err := os.Stat(out); !os.IsNotExist(err) {
		t.Errorf("the refused submission wrote %s (%v)", out, err)
	}
	so, se, code := runBinEnv(t, env, "batch", table, "--out", out, "--slurm")
	if code != 0 || !strings.Contains(so, "sbatch --parsable --array=1-3") {
		t.Fatalf("--slurm alone: exit %d\n%s\n%s", code, so, se)
	}
}

// TestBatchListsEveryProblemInOneRound: a table with a bad id and a
// reserved one lists both, in line order, in one run (the rows without a
// table problem are checked too; a row whose input file does not exist
// is not a table problem: its study alone fails), exit 2, nothing
// created.
func TestBatchListsEveryProblemInOneRound(t *testing.T) {
	s := sharedStudy(t)
	table := filepath.Join(t.TempDir(), "studies.csv")
	body := "# iterations: 30\nid,model,occurrences,region\n" +
		"gone,m=" + filepath.Join(s.dir, "nope.tif") + "," + s.occ + "," + s.region + "\n" +
		"Quercus robur,m=" + s.model + "," + s.occ + "," + s.region + "\n" +
		"summary.csv,m=" + s.model + "," + s.occ + "," + s.region + "\n"
	if err := os.WriteFile(table, []byte(body), 0o644); err != nil {
		t.Fatal(err)
	}
	out := filepath.Join(t.TempDir(), "runs")
	_, se, code := runBin(t, "batch", table, "--out", out)
	// The missing input of line 3 fails its study alone (see
	// TestBatchMissingInputOneStudy): the table's problems are lines 4, 5.
	if code != 2 || !strings.Contains(se, "2 problem(s)") {
		t.Fatalf("exit %d, want 2 with 2 problems: %s", code, se)
	}
	i4, i5 := strings.Index(se, "line 4,"), strings.Index(se, "line 5,")
	if i4 < 0 || i5 < i4 || strings.Contains(se, "nope.tif") || !strings.Contains(se, `for example "Quercus_robur"`) {
		t.Errorf("problems not all listed in line order: %s", se)
	}
	if _, err := os.Stat(out); !os.IsNotExist(err) {
		t.Errorf("%s was created (%v)", out, err)
	}
}

// TestTwoBatchesOnOneFolder: a second batch started on the same --out
// while the first scores its slow study finds that study's folder in use
// (failed, for now) and runs the quick one; the first then finds the
// quick one finished by the other. The batch that ends last reports every
// study as finished, exit 0, and its summary lists no failure.
func TestTwoBatchesOnOneFolder(t *testing.T) {
	s := sharedStudy(t)
	dir := t.TempDir()
	table := filepath.Join(dir, "studies.csv")
	body := "# region-buffers: 60\n# point-buffers: 40\n# hull-buffers: 0\n# e: 0.05\n" +
		"id,model,occurrences,region,iterations\n" +
		"slow,m=" + s.model + "," + s.occ + "," + s.region + ",500000\n" +
		"quick,m=" + s.model + "," + s.occ + "," + s.region + ",30\n"
	if err := os.WriteFile(table, []byte(body), 0o644); err != nil {
		t.Fatal(err)
	}
	out := filepath.Join(dir, "runs")
	first := exec.Command(areasweepBin, "batch", table, "--out", out)
	var se1 bytes.Buffer
	first.Stderr = &se1
	if err := first.Start(); err != nil {
		t.Fatal(err)
	}
	waitForStage(t, filepath.Join(out, "slow"))
	t0 := time.Now()
	_, se2, code2 := runBin(t, "batch", table, "--out", out)
	if code2 != 1 || !strings.Contains(se2, "slow: --out") || !strings.Contains(se2, "is in use") {
		t.Errorf("second batch: exit %d, want 1 with slow's folder in use: %s", code2, se2)
	}
	err := first.Wait()
	t.Logf("first batch ended %v after the second", time.Since(t0))
	if err != nil || !strings.Contains(se1.String(), "quick: finished by another run meanwhile") {
		t.Fatalf("first batch: %v: %s", err, se1.String())
	}
	for _, row := range readSummary(t, out) {
		if row["status"] != "ok" {
			t.Errorf("summary row %v", row)
		}
	}
}

// TestSlurmSubmitFailureSaysWhatToDo: an sbatch that refuses the job
// (a bad partition, a cluster it cannot reach) is named with its message
// and what to do, exit 1. When the array went in and the merge job did
// not, the message names the array job and gives the merge job's sbatch
// command: before, it said only "submission failed", and running the
// command again, the natural next step, submitted the unfinished tasks a
// second time beside the running ones.
func TestSlurmSubmitFailureSaysWhatToDo(t *testing.T) {
	s := sharedStudy(t)
	table := batchTable(t, s)
	for _, c := range []struct {
		name, script string
		want         []string
	}{
		{"merge job refused", `case "$*" in *--array=*) echo 4242 ;; *) echo "sbatch: error: invalid partition" >&2; exit 1 ;; esac`,
			[]string{"sbatch: error: invalid partition", "the array job 4242 was submitted (tasks 1-3) but not the merge job", "do not run this command again while it runs", "sbatch --dependency=afterany:4242 ", "merge.sh"}},
		{"array refused", `echo "sbatch: error: invalid partition" >&2; exit 1`,
			[]string{"sbatch: error: invalid partition", "nothing was submitted (the job files are written): fix what sbatch says, then run this command again"}},
	} {
		t.Run(c.name, func(t *testing.T) {
			bin := t.TempDir()
			if err := os.WriteFile(filepath.Join(bin, "sbatch"), []byte("#!/bin/sh\n"+c.script+"\n"), 0o755); err != nil {
				t.Fatal(err)
			}
			env := []string{"PATH=" + bin + ":/usr/bin:/bin", "HOME=" + t.TempDir()}
			out := filepath.Join(t.TempDir(), "runs")
			_, se, code := runBinEnv(t, env, "batch", table, "--out", out, "--slurm", "--submit")
			if code != 1 {
				t.Fatalf("exit %d, want 1: %s", code, se)
			}
			for _, w := range c.want {
				if !strings.Contains(se, w) {
					t.Errorf("message lacks %q: %s", w, se)
				}
			}
		})
	}
}
