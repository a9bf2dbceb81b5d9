package main

import (
	"bytes"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"testing"
)

// otherBuild returns a copy of the areasweep executable with one byte
// appended: it runs exactly as the original (the loader ignores bytes past
// the program) but is another build, as one rebuilt from another commit of
// the same version number would be.
func otherBuild(t *testing.T) string {
	t.Helper()
	b, err := os.ReadFile(areasweepBin)
	if err != nil {
		t.Fatal(err)
	}
	p := filepath.Join(t.TempDir(), "areasweep")
	if err := os.WriteFile(p, append(b, 0), 0o755); err != nil {
		t.Fatal(err)
	}
	return p
}

// runExe runs the executable exe (runBin: the built areasweep) and returns
// stdout, stderr and exit code.
func runExe(t *testing.T, exe string, args ...string) (string, string, int) {
	t.Helper()
	cmd := exec.Command(exe, args...)
	var so, se bytes.Buffer
	cmd.Stdout, cmd.Stderr = &so, &se
	code := exitCode(cmd.Run())
	if code < 0 {
		t.Fatalf("run %s %v: did not start or was not waited for", exe, args)
	}
	return so.String(), se.String(), code
}

// TestMergeRefusesOtherBuild: shards written by two builds of one version
// number are refused by the merge (exit 2, both files named, nothing
// written), and so are shards of another build than the merging one.
// Before, the partial file recorded the version number alone, so shards of
// a development version rebuilt from another commit between two tasks were
// merged without a word.
func TestMergeRefusesOtherBuild(t *testing.T) {
	s := newSmallStudy(t)
	other := otherBuild(t)
	shard := func(exe, dir, which string) string {
		out := filepath.Join(s.dir, dir)
		if _, se, code := runExe(t, exe, s.shardArgs(t, out, "--shard", which)...); code != 0 {
			t.Fatalf("shard %s: exit %d: %s", which, code, se)
		}
		return out
	}
	mine1, mine2 := shard(areasweepBin, "mine-1", "1/2"), shard(areasweepBin, "mine-2", "2/2")
	theirs1, theirs2 := shard(other, "theirs-1", "1/2"), shard(other, "theirs-2", "2/2")
	for _, c := range []struct {
		name  string
		files []string
		want  []string
	}{
		{"mixed builds", []string{mine1, theirs2}, []string{"differ in areasweep version or build (0.1.0-dev (build ", filepath.Join(mine1, "shard-1-of-2.aspf"), filepath.Join(theirs2, "shard-2-of-2.aspf")}},
		{"another build's shards", []string{theirs1, theirs2}, []string{"the shards were written by areasweep 0.1.0-dev (build ", "merge them with the areasweep that wrote them"}},
	} {
		t.Run(c.name, func(t *testing.T) {
			out := filepath.Join(s.dir, "out-"+strings.ReplaceAll(c.name, " ", "-"))
			_, se, code := runBin(t, append([]string{"merge", "--quiet", "--out", out}, c.files...)...)
			if code != 2 {
				t.Fatalf("exit %d, want 2: %s", code, se)
			}
			for _, w := range c.want {
				if !strings.Contains(se, w) {
					t.Errorf("message lacks %q: %s", w, se)
				}
			}
			if _, err := os.Stat(out); err == nil {
				t.Errorf("%s was created", out)
			}
		})
	}
	// The shards of one build merge, as before.
	out := filepath.Join(s.dir, "out-same")
	if _, se, code := runBin(t, "merge", "--quiet", "--out", out, mine1, mine2); code != 0 {
		t.Fatalf("merge of one build's shards: exit %d: %s", code, se)
	}
}

// TestBatchRerunsShardOfOtherBuild: a batch study's shard finished by
// another build (a scheduler task that ran before the executable was
// rebuilt) is run again by the next batch, which then merges the study.
// Before, it was skipped as finished, and its sums merged with those of
// the other build.
func TestBatchRerunsShardOfOtherBuild(t *testing.T) {
	s := sharedStudy(t)
	table := batchTable(t, s)
	out := filepath.Join(t.TempDir(), "runs")
	if _, se, code := runExe(t, otherBuild(t), "batch", table, "--out", out, "--shards", "2", "--only", "beta", "--shard", "1"); code != 0 {
		t.Fatalf("shard 1 by the other build: exit %d: %s", code, se)
	}
	_, se, code := runBin(t, "batch", table, "--out", out, "--shards", "2", "--only", "beta")
	if code != 0 {
		t.Fatalf("exit %d, want 0: %s", code, se)
	}
	if !strings.Contains(se, "beta: shard 1/2 started") || strings.Contains(se, "shard 1/2 already finished") {
		t.Errorf("shard 1 of the other build was not run again:\n%s", se)
	}
	plain := plainRun(t, s, "11", "m="+s.model)
	want, _ := os.ReadFile(filepath.Join(plain, "results.json"))
	got, err := os.ReadFile(filepath.Join(out, "beta", "results.json"))
	if err != nil || len(want) == 0 || !bytes.Equal(got, want) {
		t.Errorf("beta/results.json from the shards differs from a plain run (%v)", err)
	}
}
