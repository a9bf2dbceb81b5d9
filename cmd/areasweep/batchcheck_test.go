package main

import (
	"bytes"
	"fmt"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"syscall"
	"testing"
	"time"

	"areasweep/cmd/internal/batch"
)

// TestBatchSettingsHashIgnoresHowTableIsNamed: the studies' input paths
// and the completion marker's settings checksum must not depend on whether the table was named by a
// relative or an absolute path (a scheduler task names it absolutely; a
// user resumes from another folder), or every finished study would be
// taken as made from other settings.
func TestBatchSettingsHashIgnoresHowTableIsNamed(t *testing.T) {
	s := sharedStudy(t)
	table := batchTable(t, s)
	wd, err := os.Getwd()
	if err != nil {
		t.Fatal(err)
	}
	rel, err := filepath.Rel(wd, table)
	if err != nil {
		t.Fatal(err)
	}
	out := filepath.Join(t.TempDir(), "out")
	byAbs, err := resolveBatch(&BatchOptions{Table: table, Out: out})
	if err != nil {
		t.Fatal(err)
	}
	byRel, err := resolveBatch(&BatchOptions{Table: rel, Out: out})
	if err != nil {
		t.Fatal(err)
	}
	// The table's relative paths resolve to absolute ones either way, so
	// the studies record the same inputs in results.json.
	for i := range byAbs {
		if o := byRel[i].opts.Occurrences; o != byAbs[i].opts.Occurrences || !filepath.IsAbs(o) {
			t.Errorf("study %s: occurrences %s with %s, %s with %s", byAbs[i].id, byAbs[i].opts.Occurrences, table, o, rel)
		}
	}
	for i := range byAbs {
		if byAbs[i].settings != byRel[i].settings {
			t.Errorf("study %s: settings checksum %s with %s, %s with %s", byAbs[i].id, byAbs[i].settings, table, byRel[i].settings, rel)
		}
	}
	// Another input must still change it.
	byAbs[1].opts.Occurrences = s.far
	if h := batch.SettingsHash(canonicalSettings(byAbs[1].opts.Options)); h == byRel[1].settings {
		t.Error("another occurrence file gave the same settings checksum")
	}
}

// TestBatchForceIntoFolderWithoutMarker: a study folder that exists
// without a completion marker (here holding a file of the user's) is
// refused without --force, with advice that works: the batch's --force
// then runs the study into it and keeps the user's file.
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
	_, se, code = runBin(t, "batch", table, "--out", out, "--only", "beta", "--quiet", "--force")
	if code != 0 {
		t.Fatalf("with --force: exit %d, want 0: %s", code, se)
	}
	if b, err := os.ReadFile(mine); err != nil || string(b) != "mine" {
		t.Errorf("the user's file: %q, %v; want it kept", b, err)
	}
	if _, err := os.Stat(filepath.Join(out, "beta", "results.json")); err != nil {
		t.Errorf("no results after batch --force: %v", err)
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

// TestSlurmPendingStale: a study finished from another row (here another
// seed) is not submitted again without --force and is named; with
// --force its marker is removed (else the array script would skip the
// task as finished) and its task submitted. Finished studies whose row
// did not change stay finished.
func TestSlurmPendingStale(t *testing.T) {
	s := sharedStudy(t)
	table := batchTable(t, s)
	out := filepath.Join(t.TempDir(), "runs")
	if _, se, code := runBin(t, "batch", table, "--out", out, "--only", "alpha,beta", "--quiet"); code != 0 {
		t.Fatalf("batch: exit %d: %s", code, se)
	}
	body, err := os.ReadFile(table)
	if err != nil {
		t.Fatal(err)
	}
	changed := strings.Replace(string(body), "occ.csv,region.geojson,11", "occ.csv,region.geojson,12", 1)
	if changed == string(body) {
		t.Fatal("the test table has no row with seed 11")
	}
	table2 := filepath.Join(filepath.Dir(table), "studies-seed12.csv")
	if err := os.WriteFile(table2, []byte(changed), 0o644); err != nil {
		t.Fatal(err)
	}
	for _, force := range []bool{false, true} {
		pending, stale := slurmPendingOf(t, &BatchOptions{Table: table2, Out: out, Shards: 1, Force: force, Slurm: SlurmOptions{Enabled: true, CPUs: 1}})
		// Tasks: 1 alpha (finished, same row), 2 beta (finished, row
		// changed), 3 broken (never finished).
		wantPending, wantStale := []int{3}, []string{"beta"}
		if force {
			wantPending, wantStale = []int{2, 3}, nil
		}
		var ids []string
		for _, s := range stale {
			ids = append(ids, s.st.id)
			if !strings.Contains(s.why.why, "from other settings") {
				t.Errorf("force %v: %s stale because %q; want the row named", force, s.st.id, s.why.why)
			}
		}
		if fmt.Sprint(pending) != fmt.Sprint(wantPending) || fmt.Sprint(ids) != fmt.Sprint(wantStale) {
			t.Errorf("force %v: pending %v, stale %v; want %v, %v", force, pending, ids, wantPending, wantStale)
		}
		_, err = os.Stat(filepath.Join(out, "beta", ".areasweep-done"))
		if force == (err == nil) {
			t.Errorf("force %v: beta's marker: %v", force, err)
		}
	}
	if _, err := os.Stat(filepath.Join(out, "alpha", ".areasweep-done")); err != nil {
		t.Errorf("alpha's marker: %v", err)
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
		"slow,m=" + s.model + "," + s.occ + "," + s.region + ",60000\n" +
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

// slurmPendingOf resolves the batch of o and returns the tasks --slurm
// would submit and the studies it finds stale (slurmPending).
func slurmPendingOf(t *testing.T, o *BatchOptions) ([]int, []staleStudy) {
	t.Helper()
	studies, err := resolveBatch(o)
	if err != nil {
		t.Fatal(err)
	}
	p, err := slurmPlan(o, studies)
	if err != nil {
		t.Fatal(err)
	}
	pending, stale, err := slurmPending(o, p, studies)
	if err != nil {
		t.Fatal(err)
	}
	return pending, stale
}
