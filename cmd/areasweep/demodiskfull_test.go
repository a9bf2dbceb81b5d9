package main

import (
	"errors"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"areasweep/cmd/internal/scenario"
)

// TestDemoInputsOnFullDisk: a disk that fills up while the demo writes
// its inputs is reported as for a run's outputs (exit 1, naming --out and
// saying what to do), not in GDAL's and SQLite's words with the hidden
// staging folder's path: the error below is the one a demo met with
// --out on a 300 KB tmpfs (GDAL 3.6). Nothing is left.
func TestDemoInputsOnFullDisk(t *testing.T) {
	defer func(f func(string, uint64) (scenario.Files, error)) { writeScenario = f }(writeScenario)
	writeScenario = func(dir string, _ uint64) (scenario.Files, error) {
		return scenario.Files{}, errors.New("create GeoPackage " + filepath.Join(dir, "ecoregions.gpkg") + ": sqlite3_exec(COMMIT) failed: database or disk is full")
	}
	dir := t.TempDir()
	out := filepath.Join(dir, "d")
	var se strings.Builder
	code := Main([]string{"demo", "--out", out, "--quiet"}, nil, &strings.Builder{}, &se)
	msg := se.String()
	want := "areasweep: writing the results into " + out + " failed: no space left on device (free some space on that disk, or give --out a folder on another one); nothing in it was changed\n"
	if code != exitFailed || msg != want {
		t.Errorf("exit %d, %q; want %d, %q", code, msg, exitFailed, want)
	}
	if ents, _ := os.ReadDir(dir); len(ents) > 0 {
		t.Errorf("left %v", ents)
	}
}
