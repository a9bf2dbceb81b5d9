package main

import (
	"bufio"
	"crypto/sha256"
	"encoding/hex"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"testing"
)

// TestDemoOutputsUnchanged runs the demo as testdata/demo_golden.sh does
// (from an empty folder, --out demo) and compares the SHA-256 of its
// results.json and scores.csv with testdata/demo.sha256, which that script
// wrote (its first line, a comment, names the tree it was built from; the
// script's header gives the file's history). A change that alters these
// outputs on purpose regenerates the file with the script and says why in
// its commit.
func TestDemoOutputsUnchanged(t *testing.T) {
	f, err := os.Open(filepath.Join("testdata", "demo.sha256"))
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	want := map[string]string{}
	sc := bufio.NewScanner(f)
	for sc.Scan() {
		if strings.HasPrefix(sc.Text(), "#") {
			continue
		}
		if fs := strings.Fields(sc.Text()); len(fs) == 2 {
			want[fs[1]] = fs[0]
		}
	}
	if len(want) != 2 {
		t.Fatalf("testdata/demo.sha256 holds %d sums, want 2 (results.json, scores.csv)", len(want))
	}
	dir := t.TempDir()
	cmd := exec.Command(areasweepBin, "demo", "--out", "demo", "--quiet")
	cmd.Dir = dir
	if out, err := cmd.CombinedOutput(); err != nil {
		t.Fatalf("demo: %v\n%s", err, out)
	}
	for name, sum := range want {
		b, err := os.ReadFile(filepath.Join(dir, "demo", name))
		if err != nil {
			t.Fatal(err)
		}
		h := sha256.Sum256(b)
		if got := hex.EncodeToString(h[:]); got != sum {
			t.Errorf("demo %s: SHA-256 %s, testdata/demo.sha256 says %s: the outputs changed (regenerate with testdata/demo_golden.sh only if the change is intended)", name, got, sum)
		}
	}
}
