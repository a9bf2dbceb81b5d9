package outdir

import (
	"errors"
	"fmt"
	"os"
	"strings"
	"syscall"
	"testing"
)

// TestFileSizeAdvice: under a limit of file size, a write that failed
// with EFBIG (bare, or in a PathError, wrapped or not, which also names
// the file) or with SQLite's "disk I/O error" gets the limit and what to
// do; a full disk or any other failure, and
// any failure without a limit, gets nothing. The test sets a large soft
// limit (1 TiB, far above what it writes) and puts the old one back.
func TestFileSizeAdvice(t *testing.T) {
	var old syscall.Rlimit
	if err := syscall.Getrlimit(syscall.RLIMIT_FSIZE, &old); err != nil {
		t.Fatal(err)
	}
	defer syscall.Setrlimit(syscall.RLIMIT_FSIZE, &old)
	efbig := &os.PathError{Op: "write", Path: "/x/results.json", Err: syscall.EFBIG}
	sqlite := errors.New("create /x/extents.gpkg: failed: disk I/O error")
	enospc := &os.PathError{Op: "write", Path: "/x/results.json", Err: syscall.ENOSPC}
	const lim = 1 << 40
	if old.Max < lim {
		t.Fatalf("the hard limit %d is below the test's %d", old.Max, uint64(lim))
	}
	if err := syscall.Setrlimit(syscall.RLIMIT_FSIZE, &syscall.Rlimit{Cur: lim, Max: old.Max}); err != nil {
		t.Fatal(err)
	}
	want := " (this process may not write a file larger than 1024.0 GiB: its limit of file size, ulimit -f, is set; raise it, for example with ulimit -f unlimited)"
	named := " (this process may not write a file larger than 1024.0 GiB, and results.json needs more: its limit of file size, ulimit -f, is set; raise it, for example with ulimit -f unlimited)"
	for _, tc := range []struct {
		err  error
		want string
	}{
		{efbig, named},
		{fmt.Errorf("writing: %w", efbig), named},
		{syscall.EFBIG, want},
		{sqlite, want},
		{enospc, ""},
		{errors.New("permission denied"), ""},
	} {
		if got := FileSizeAdvice(tc.err); got != tc.want {
			t.Errorf("limit 1 TiB, %v: %q, want %q", tc.err, got, tc.want)
		}
	}
	if err := syscall.Setrlimit(syscall.RLIMIT_FSIZE, &syscall.Rlimit{Cur: ^uint64(0), Max: old.Max}); err == nil {
		if got := FileSizeAdvice(efbig); got != "" {
			t.Errorf("no limit: %q, want none", got)
		}
	} else if old.Max == ^uint64(0) {
		t.Fatal(err)
	}
	if s := sizeWords(500 << 10); !strings.Contains(s, "500 KiB") {
		t.Errorf("500 KiB reads %q", s)
	}
}
