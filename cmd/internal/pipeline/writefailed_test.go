package pipeline

import (
	"errors"
	"os"
	"path/filepath"
	"strings"
	"syscall"
	"testing"
)

// TestWriteFailedNamesFolder: a failure while writing the outputs names the
// output folder as the user gave it, not the staging file's path, and a
// full disk or quota (ENOSPC, EDQUOT, or SQLite's "database or disk is
// full" as GDAL's GeoPackage driver reports it) says what to do, without
// the library's words; other causes get no such advice.
func TestWriteFailedNamesFolder(t *testing.T) {
	stage := "/data/out/.areasweep-stage-123/results.json"
	// The staging folder exists, as while a run writes (one removed
	// meanwhile is TestWriteFailedStageRemoved's case).
	staged := filepath.Join(t.TempDir(), ".sp1.areasweep-stage-7")
	if err := os.Mkdir(staged, 0o755); err != nil {
		t.Fatal(err)
	}
	for _, tc := range []struct {
		name   string
		err    error
		advice bool
	}{
		{"disk full", &os.PathError{Op: "write", Path: stage, Err: syscall.ENOSPC}, true},
		{"quota", &os.PathError{Op: "write", Path: stage, Err: syscall.EDQUOT}, true},
		{"rename", &os.LinkError{Op: "rename", Old: stage, New: "out/results.json", Err: syscall.ENOSPC}, true},
		// GDAL's GeoPackage driver on a full disk: SQLite's words, not
		// ENOSPC (each copied from a run on a full tmpfs, GDAL 3.6).
		{"geopackage commit", errors.New("extent: write /data/.out.areasweep-partial-1-2/extents.gpkg: sqlite3_exec(COMMIT) failed: database or disk is full"), true},
		{"geopackage create", errors.New("extent: create /data/.out.areasweep-partial-1-2/omitted_points.gpkg: sqlite3_exec(COMMIT) failed: database or disk is full"), true},
		{"geopackage insert", errors.New("extent: write feature 1 of extents to /data/.out.areasweep-partial-1-2/extents.gpkg: sqlite3_exec(INSERT INTO gpkg_geometry_columns (table_name,column_name,geometry_type_name,srs_id,z,m) VALUES ('extents','geom','MULTIPOLYGON',4326,0,0)) failed: database or disk is full"), true},
		{"input/output", &os.PathError{Op: "write", Path: stage, Err: syscall.EIO}, false},
		{"other", errors.New("short write"), false},
		// Another library error naming a file in the staging folder: the
		// file is named in --out instead.
		{"library error", errors.New("extent: write " + staged + "/extents.gpkg: I/O error"), false},
	} {
		t.Run(tc.name, func(t *testing.T) {
			msg := WriteFailedIn("results/sp1", staged, tc.err).Error()
			if !strings.HasPrefix(msg, "writing the results into results/sp1 failed: ") || !strings.HasSuffix(msg, "; nothing in it was changed") {
				t.Fatalf("message %q does not name the output folder", msg)
			}
			if strings.Contains(msg, "stage") || strings.Contains(msg, "areasweep-partial") || strings.Contains(msg, "sqlite") || strings.Contains(msg, ") failed") {
				t.Errorf("message %q names the staging path", msg)
			}
			if tc.name == "library error" && !strings.Contains(msg, "results/sp1/extents.gpkg: I/O error") {
				t.Errorf("message %q does not name the file in the output folder", msg)
			}
			if got := strings.Contains(msg, "free some space"); got != tc.advice {
				t.Errorf("message %q: advice on space %v, want %v", msg, got, tc.advice)
			}
		})
	}
}

// TestWriteFailedStageRemoved: when the staging folder was removed while
// the run wrote in it (the --out that held it deleted by hand, or a
// batch's study folder), the message says so instead of passing on
// SQLite's "unable to open database file" for the next GeoPackage (the
// message of every one of 6 runs whose --out or staging folder was
// deleted 0.5 to 1.5 s in).
func TestWriteFailedStageRemoved(t *testing.T) {
	staged := filepath.Join(t.TempDir(), "out", ".areasweep-partial-7-8")
	for _, err := range []error{
		errors.New("extent: create " + staged + "/extents.gpkg: failed: unable to open database file"),
		&os.PathError{Op: "open", Path: staged + "/scores.csv", Err: syscall.ENOENT},
	} {
		msg := WriteFailedIn("results/sp1", staged, err).Error()
		want := "writing the results into results/sp1 failed: the folder the run was writing in (" + staged + ") was removed while it worked, by another program or by hand; run again"
		if !strings.HasPrefix(msg, want) || strings.Contains(msg, "database") {
			t.Errorf("message %q, want it to begin %q", msg, want)
		}
	}
}
