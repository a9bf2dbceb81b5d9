package outdir

import (
	"os"
	"path/filepath"
	"strings"
	"syscall"
	"testing"

	"areasweep/cmd/internal/fault"
)

// TestOpenOnFullDisk: a disk too full for the staging folder's owner record
// (as a run met on a tmpfs filled to its last block) is an outside failure,
// exit 1, that says to free space; it was refused as bad input (exit 2)
// with "choose a folder you can write to". A read-only disk stays a
// refusal. Either way nothing is left: no --out, lock or staging folder,
// and a previous run's file is as it was.
func TestOpenOnFullDisk(t *testing.T) {
	for _, tc := range []struct {
		name     string
		cause    syscall.Errno
		badInput bool
	}{
		{"disk full", syscall.ENOSPC, false},
		{"quota", syscall.EDQUOT, false},
		{"read-only", syscall.EROFS, true},
	} {
		for _, exists := range []bool{false, true} {
			t.Run(tc.name, func(t *testing.T) {
				defer func(f func(string, []byte, os.FileMode) error) { writeFile = f }(writeFile)
				writeFile = func(name string, _ []byte, _ os.FileMode) error {
					return &os.PathError{Op: "open", Path: name, Err: tc.cause}
				}
				dir := t.TempDir()
				out := filepath.Join(dir, "sp1")
				prev := filepath.Join(out, "results.json")
				if exists {
					if err := os.Mkdir(out, 0o755); err != nil {
						t.Fatal(err)
					}
					if err := os.WriteFile(prev, []byte("previous run"), 0o644); err != nil {
						t.Fatal(err)
					}
					earlierRun(t, out, "results.json")
				}
				_, err := Open(out, true, nil)
				if err == nil {
					t.Fatal("Open succeeded")
				}
				if fault.IsBadInput(err) != tc.badInput {
					t.Errorf("%v: bad input %v, want %v", err, fault.IsBadInput(err), tc.badInput)
				}
				if got := strings.Contains(err.Error(), "free some space"); got == tc.badInput {
					t.Errorf("%q: advice on space %v, want %v", err, got, !tc.badInput)
				}
				if !strings.Contains(err.Error(), out) {
					t.Errorf("%q does not name %s", err, out)
				}
				if l := leftovers(dir); len(l) > 0 {
					t.Errorf("left %v", l)
				}
				if exists {
					if b, err := os.ReadFile(prev); err != nil || string(b) != "previous run" {
						t.Errorf("previous results.json: %q, %v", b, err)
					}
				} else if _, err := os.Lstat(out); err == nil {
					t.Errorf("%s was created", out)
				}
			})
		}
	}
}

// TestMoveFailedSaysWhatToDo: a move into --out that fails at the end of
// a run (a results.json made immutable with chattr +i: "cannot replace
// im/results.json: operation not permitted", exit 1) says that --out was
// left as it was and what to do. A folder that takes the place of an
// output while the outputs move stands in for the immutable file here.
// The user's files stay, and no staging or set-aside folder is left.
func TestMoveFailedSaysWhatToDo(t *testing.T) {
	dir := t.TempDir()
	out := filepath.Join(dir, "out")
	os.Mkdir(out, 0o755)
	os.WriteFile(filepath.Join(out, "notes.txt"), []byte("mine"), 0o644)
	d, err := Open(out, true, nil)
	if err != nil {
		t.Fatal(err)
	}
	for _, n := range []string{"extents.gpkg", "results.json"} {
		os.WriteFile(filepath.Join(d.Stage, n), []byte("new"), 0o644)
	}
	movedHook = func(n string) {
		if n == "extents.gpkg" {
			os.MkdirAll(filepath.Join(out, "results.json", "x"), 0o755)
		}
	}
	defer func() { movedHook = nil }()
	err = d.Finish()
	if err == nil {
		t.Fatal("Finish succeeded")
	}
	msg := err.Error()
	for _, want := range []string{"cannot move results.json into " + out, "nothing in " + out + " was changed", "then run again"} {
		if !strings.Contains(msg, want) {
			t.Errorf("%q lacks %q", msg, want)
		}
	}
	if b, _ := os.ReadFile(filepath.Join(out, "notes.txt")); string(b) != "mine" {
		t.Error("notes.txt changed")
	}
	if _, err := os.Stat(filepath.Join(out, "extents.gpkg")); err == nil {
		t.Error("extents.gpkg was left in --out")
	}
	if l := leftovers(dir); len(l) > 0 {
		t.Errorf("left %v", l)
	}
}

// TestOpenLockParentNotWritable: an --out you can write to, in a folder
// you cannot (a folder made for you in a shared one), is refused because
// the lock file goes beside it; the message said only "cannot write in
// PARENT (permission denied); choose a folder you can write to", which
// reads as wrong when --out is yours (found with a writable tmpfs mounted
// inside a read-only one). It now names the lock file and offers a folder
// inside --out. An --out that does not exist keeps the plain message.
func TestOpenLockParentNotWritable(t *testing.T) {
	defer func(f func(string, int, os.FileMode) (*os.File, error)) { openLock = f }(openLock)
	openLock = func(name string, _ int, _ os.FileMode) (*os.File, error) {
		return nil, &os.PathError{Op: "open", Path: name, Err: syscall.EACCES}
	}
	for _, exists := range []bool{true, false} {
		dir := t.TempDir()
		out := filepath.Join(dir, "alice")
		if exists {
			os.Mkdir(out, 0o755)
		}
		_, err := Open(out, false, nil)
		if err == nil || !fault.IsBadInput(err) {
			t.Fatalf("exists %v: %v", exists, err)
		}
		want := "--out " + out + ": cannot write the lock file .alice.areasweep-lock beside it, in " + dir + " (permission denied); areasweep writes there to guard --out: give a folder inside it, such as " + filepath.Join(out, "run1")
		if got := strings.HasPrefix(err.Error(), want); got != exists {
			t.Errorf("exists %v: %q; names the lock file and a folder inside: %v", exists, err, got)
		}
		if l := leftovers(dir); len(l) > 0 {
			t.Errorf("exists %v: left %v", exists, l)
		}
	}
}
