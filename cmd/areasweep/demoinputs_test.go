package main

import (
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// TestDemoKeepsUserInputs: demo --force onto a folder whose inputs/ is the
// user's, holding only names the demo writes (occurrences.csv,
// study.yaml), is refused with exit 2 and leaves the files as they were;
// onto a demo's own folder it runs again.
func TestDemoKeepsUserInputs(t *testing.T) {
	out := filepath.Join(t.TempDir(), "project")
	in := filepath.Join(out, "inputs")
	if err := os.MkdirAll(in, 0o755); err != nil {
		t.Fatal(err)
	}
	os.WriteFile(filepath.Join(in, "occurrences.csv"), []byte("lon,lat,role\n1,2,train\n"), 0o644)
	os.WriteFile(filepath.Join(in, "study.yaml"), []byte("model: [m=mine.tif]\n"), 0o644)
	before := treeSums(t, out)
	_, se, code := runBin(t, "demo", "--out", out, "--force", "--quiet")
	if code != 2 || !strings.Contains(se, in+", which the demo did not write") {
		t.Fatalf("exit %d, want 2 naming %s: %s", code, in, se)
	}
	if !sameSums(before, treeSums(t, out)) {
		t.Error("the user's inputs changed")
	}
	if l := leftovers(filepath.Dir(out)); len(l) > 0 {
		t.Errorf("left behind: %v", l)
	}

	demo := filepath.Join(t.TempDir(), "demo")
	for i := 0; i < 2; i++ {
		if _, se, code := runBin(t, "demo", "--out", demo, "--force", "--quiet"); code != 0 {
			t.Fatalf("demo run %d: exit %d: %s", i+1, code, se)
		}
	}
}
