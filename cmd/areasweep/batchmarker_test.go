package main

import (
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// TestBatchDamagedMarker: a finished study whose completion marker was
// emptied or overwritten with other text is not skipped as finished (a
// changed row would go unnoticed, and its old results would enter the
// summary): the rerun names the study and the marker, lists it as failed
// (exit 1) and runs nothing; --force runs it again, with the same results
// and a marker that records the settings. An untouched study beside it
// stays skipped.
func TestBatchDamagedMarker(t *testing.T) {
	table, out, res, good := finishedPair(t)
	marker := filepath.Join(out, "two", ".areasweep-done")
	for _, body := range []string{"", "garbage\n", "study\ttwo\nresults\tabc\n"} {
		if err := os.WriteFile(marker, []byte(body), 0o644); err != nil {
			t.Fatal(err)
		}
		so, se, code := runBin(t, "batch", table, "--out", out)
		if code != 1 {
			t.Errorf("marker %q: exit %d, want 1: %s", body, code, se)
		}
		for _, want := range []string{"1 of 2 studies failed: two", marker, "empty or damaged", "add --force", "or its completion marker is damaged)"} {
			if !strings.Contains(se, want) {
				t.Errorf("marker %q: stderr lacks %q: %s", body, want, se)
			}
		}
		if !strings.Contains(so+se, "one: already finished, skipped") {
			t.Errorf("marker %q: the untouched study was not skipped: %s%s", body, so, se)
		}
		if b, _ := os.ReadFile(marker); string(b) != body {
			t.Errorf("marker %q: the refused rerun changed the marker to %q", body, b)
		}
	}
	if _, se, code := runBin(t, "batch", table, "--out", out, "--quiet", "--force"); code != 0 {
		t.Fatalf("--force: exit %d: %s", code, se)
	}
	if b, _ := os.ReadFile(res); string(b) != string(good) {
		t.Error("the study run again wrote other results")
	}
	if b, _ := os.ReadFile(marker); !strings.Contains(string(b), "settings\t") {
		t.Errorf("the rerun's marker records no settings: %q", b)
	}
}
