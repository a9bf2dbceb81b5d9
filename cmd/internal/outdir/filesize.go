package outdir

import (
	"errors"
	"fmt"
	"os"
	"path/filepath"
	"strings"
	"syscall"
)

// sqliteIOError is SQLite's text for a write that failed (SQLITE_IOERR),
// which GDAL's GeoPackage driver reports for a write past the limit of
// file size ("sqlite3_exec(COMMIT) failed: disk I/O error", GDAL 3.6
// under ulimit -f 50).
const sqliteIOError = "disk I/O error"

// FileSizeAdvice returns what to add to the words of err, a failed write,
// when it may come from the process's limit of file size (RLIMIT_FSIZE:
// ulimit -f, or a cluster job's): the limit, the file's name when err
// holds it, and how to raise it; "" when
// the process has no such limit or err is of another kind. A write past
// the limit fails with "file too large" (EFBIG), and GDAL's GeoPackage
// driver reports it as SQLite's "disk I/O error", neither of which names
// the limit.
func FileSizeAdvice(err error) string {
	c := Cause(err)
	if !errors.Is(c, syscall.EFBIG) && !strings.Contains(c.Error(), sqliteIOError) {
		return ""
	}
	var r syscall.Rlimit
	if err := syscall.Getrlimit(syscall.RLIMIT_FSIZE, &r); err != nil || r.Cur > 1<<62 { // RLIM_INFINITY is all ones
		return ""
	}
	// The file, when the error names it (the system's "file too large"
	// does not; Cause drops the path): its name alone, since the path
	// may be the run's hidden staging folder.
	which := ""
	var pe *os.PathError
	if errors.As(err, &pe) && pe.Path != "" {
		which = fmt.Sprintf(", and %s needs more", filepath.Base(pe.Path))
	}
	return fmt.Sprintf(" (this process may not write a file larger than %s%s: its limit of file size, ulimit -f, is set; raise it, for example with ulimit -f unlimited)", sizeWords(int64(r.Cur)), which)
}

// sizeWords is n bytes in KiB, MiB or GiB, whichever reads best.
func sizeWords(n int64) string {
	switch {
	case n >= 1<<30:
		return fmt.Sprintf("%.1f GiB", float64(n)/(1<<30))
	case n >= 1<<20:
		return fmt.Sprintf("%.1f MiB", float64(n)/(1<<20))
	}
	return fmt.Sprintf("%d KiB", n>>10)
}
