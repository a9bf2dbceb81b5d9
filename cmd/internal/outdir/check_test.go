package outdir

import (
	"errors"
	"os"
	"path/filepath"
	"strings"
	"syscall"
	"testing"

	"areasweep/cmd/internal/fault"
)

// TestCheckWritesNothing: Check refuses, without writing anything (no lock
// file, no staging folder, no missing folder made), what Open would
// refuse before its first write: a non-empty --out without --force, and
// folders the user cannot write in, which the system tells (access, made
// to say EACCES here since the tests run as root): --out's own folder,
// the folder its lock file goes in (its parent, or the nearest folder
// above that exists when --out's parents are missing), each named; and it
// passes a new or empty --out in a folder that can be written.
func TestCheckWritesNothing(t *testing.T) {
	defer func(f func(string, uint32) error) { access = f }(access)
	var denied string // access says EACCES for this folder
	access = func(p string, mode uint32) error {
		if p == denied {
			return syscall.EACCES
		}
		return nil
	}
	dir := t.TempDir()
	full := filepath.Join(dir, "full")
	os.Mkdir(full, 0o755)
	os.WriteFile(filepath.Join(full, "notes.txt"), []byte("mine"), 0o644)
	empty := filepath.Join(dir, "empty")
	os.Mkdir(empty, 0o755)
	for _, tc := range []struct {
		name, out, denied, want string
	}{
		{"non-empty without --force", full, "", "--out " + full + " "},
		{"its own folder denied", empty, empty, "--out " + empty + ": cannot write in " + empty + " (permission denied)"},
		{"its parent denied, --out writable", empty, dir, "--out " + empty + ": cannot write the lock file .empty.areasweep-lock beside it, in " + dir + " (permission denied)"},
		{"missing parents, the nearest folder denied", filepath.Join(dir, "a", "b", "out"), dir, "--out " + filepath.Join(dir, "a", "b", "out") + ": cannot write in " + dir + " (permission denied)"},
		{"new, in a folder that can be written", filepath.Join(dir, "a", "new"), "", ""},
		{"empty", empty, "", ""},
	} {
		denied = tc.denied
		before := leftovers(dir)
		err := Check(tc.out, false, nil, nil)
		switch {
		case tc.want == "" && err != nil:
			t.Errorf("%s: %v", tc.name, err)
		case tc.want != "" && (err == nil || !fault.IsBadInput(err) || !strings.HasPrefix(err.Error(), tc.want)):
			t.Errorf("%s: %v; want a refusal (exit 2) starting %q", tc.name, err, tc.want)
		}
		if tc.name == "non-empty without --force" {
			var ne *NotEmptyError
			if !errors.As(err, &ne) {
				t.Errorf("%s: %v is not a NotEmptyError", tc.name, err)
			}
		}
		if after := leftovers(dir); strings.Join(after, ",") != strings.Join(before, ",") {
			t.Errorf("%s: Check wrote %v (had %v)", tc.name, after, before)
		}
		if _, err := os.Stat(filepath.Join(dir, "a")); !os.IsNotExist(err) {
			t.Errorf("%s: Check made the missing folder %s", tc.name, filepath.Join(dir, "a"))
		}
	}
}
