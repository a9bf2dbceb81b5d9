package outdir

import (
	"os"
	"path/filepath"
	"strings"
	"testing"

	"areasweep/cmd/internal/fault"
)

// TestOpenLineBreak: an --out whose path holds a line break (in its own
// name, or in the folder it is relative to) is refused as bad input on one
// line that says so; it was refused with "cannot write in PARENT (the path
// holds a line break); choose a folder you can write to", the line break
// printed raw, splitting the message. Nothing is created.
func TestOpenLineBreak(t *testing.T) {
	dir := t.TempDir()
	odd := filepath.Join(dir, "a\nb")
	if err := os.Mkdir(odd, 0o755); err != nil {
		t.Fatal(err)
	}
	for _, out := range []string{filepath.Join(dir, "new\nline"), filepath.Join(odd, "out"), filepath.Join(dir, "cr\r")} {
		_, err := Open(out, false, nil)
		if err == nil {
			t.Fatalf("Open(%q) succeeded", out)
		}
		if !fault.IsBadInput(err) {
			t.Errorf("%v is not bad input", err)
		}
		if msg := err.Error(); strings.ContainsAny(msg, "\n\r") || !strings.Contains(msg, "holds a line break") || strings.Contains(msg, "you can write to") {
			t.Errorf("message %q", msg)
		}
		if _, err := os.Lstat(out); err == nil {
			t.Errorf("%q was created", out)
		}
	}
	if l := leftovers(dir); len(l) > 0 {
		t.Errorf("left %q", l)
	}
}

// TestOpenPathTooLong: an --out whose path would give a GeoPackage written
// in its staging folder a path longer than SQLite opens is refused before
// the run (exit 2, nothing created), with the lengths. It ran to the end
// and then failed with "writing the results into ... failed: create
// /tmp/...", the cause (SQLite's "unable to open database file") cut off
// past 240 characters (extents --out of 460 bytes). One of 70 bytes less
// than the limit is taken.
func TestOpenPathTooLong(t *testing.T) {
	dir := t.TempDir()
	seg := strings.Repeat("d", 200)
	long := filepath.Join(dir, seg, seg, seg[:100], "out")
	_, err := Open(long, false, nil)
	if err == nil || !fault.IsBadInput(err) || !strings.Contains(err.Error(), "too long") || !strings.Contains(err.Error(), "504 bytes") {
		t.Fatalf("Open of a %d-byte --out: %v, want bad input saying it is too long", len(long), err)
	}
	if _, err := os.Lstat(filepath.Join(dir, seg)); err == nil {
		t.Errorf("created folders for a refused --out")
	}
	short := filepath.Join(dir, seg, strings.Repeat("s", (maxSQLitePath-70)-len(dir)-len(seg)-2))
	d, err := Open(short, false, nil)
	if err != nil {
		t.Fatalf("Open of a %d-byte --out: %v", len(short), err)
	}
	d.Abort()
}

// TestOpenNameTooLong: an --out whose last name is close to the 255 bytes
// a file name may have is refused before the run (exit 2, nothing
// created), with the lengths: the lock file and the staging folder beside
// it add a suffix that passes the limit, which was refused as "cannot
// write in PARENT (file name too long); choose a folder you can write
// to". A name 60 bytes shorter is taken.
func TestOpenNameTooLong(t *testing.T) {
	dir := t.TempDir()
	_, err := Open(filepath.Join(dir, strings.Repeat("n", 240)), false, nil)
	if err == nil || !fault.IsBadInput(err) || !strings.Contains(err.Error(), "last name is 240 bytes") || !strings.Contains(err.Error(), "255 bytes a file name may have") {
		t.Fatalf("Open of a 240-byte name: %v, want bad input giving the lengths", err)
	}
	if entries, _ := os.ReadDir(dir); len(entries) != 0 {
		t.Errorf("left %d entries for a refused --out", len(entries))
	}
	d, err := Open(filepath.Join(dir, strings.Repeat("n", 180)), false, nil)
	if err != nil {
		t.Fatalf("Open of a 180-byte name: %v", err)
	}
	d.Abort()
}
