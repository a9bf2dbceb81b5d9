package batch

import (
	"errors"
	"fmt"
	"io/fs"
	"os"
	"slices"
	"strconv"
	"strings"
	"sync"
	"syscall"
)

// InputFile is one input file of a finished study as its completion
// marker records it: the file a run hashed (an input, or a sidecar file
// read with it such as a shapefile's .dbf), its size, modification time
// and SHA-256 when the run read it.
type InputFile struct {
	// Role is that of the input the file belongs to, as results.json
	// names it ("model:NAME", "occurrences", "region", ...).
	Role string
	// Path is absolute.
	Path string
	// Size in bytes; ModTime in nanoseconds since 1970 (Unix time).
	Size, ModTime int64
	// SHA256 is the hex SHA-256 of the file's content.
	SHA256 string
}

// inputKey is the prefix of the marker keys that record input files:
// "input.0001", "input.0002", ... in the run's order of inputs, each
// value "SIZE<TAB>MTIME_NS<TAB>SHA256<TAB>ROLE<TAB>PATH" (the path last,
// so it may hold a tab).
const inputKey = "input."

// SetInputs records files in m, replacing any input lines m held. A file
// whose role or path holds a line break cannot be written on one line
// and is left out (a re-run does not check it).
func (m Marker) SetInputs(files []InputFile) {
	for k := range m {
		if strings.HasPrefix(k, inputKey) {
			delete(m, k)
		}
	}
	n := 0
	for _, f := range files {
		if strings.ContainsAny(f.Role+f.Path, "\n\r") || strings.Contains(f.Role, "\t") {
			continue
		}
		n++
		m[fmt.Sprintf("%s%04d", inputKey, n)] = fmt.Sprintf("%d\t%d\t%s\t%s\t%s", f.Size, f.ModTime, f.SHA256, f.Role, f.Path)
	}
}

// Inputs returns the input files m records, in their order. A marker
// written before the input lines existed records none: it returns nil,
// and such a study counts as finished whatever its inputs hold now, as
// it did when that marker was written (only its settings checksum is
// compared). A line that cannot be read is an error naming it.
func (m Marker) Inputs() ([]InputFile, error) {
	var keys []string
	for k := range m {
		if strings.HasPrefix(k, inputKey) {
			keys = append(keys, k)
		}
	}
	slices.Sort(keys)
	var files []InputFile
	for _, k := range keys {
		f := strings.SplitN(m[k], "\t", 5)
		var err error
		var in InputFile
		if len(f) == 5 {
			in.Role, in.Path, in.SHA256 = f[3], f[4], f[2]
			if in.Size, err = strconv.ParseInt(f[0], 10, 64); err == nil {
				in.ModTime, err = strconv.ParseInt(f[1], 10, 64)
			}
		}
		if len(f) != 5 || err != nil || in.Path == "" || len(in.SHA256) != 64 {
			return nil, fmt.Errorf("batch: the completion marker's line %q is not SIZE, MTIME, SHA256, ROLE and PATH separated by tabs", k)
		}
		files = append(files, in)
	}
	return files, nil
}

// InputChange is a recorded input file that is not as the run read it,
// or a file that was not there when the run read the input it belongs to.
type InputChange struct {
	File InputFile // as recorded; for Added, its role and path only
	// Removed: the file is gone. Added: the file was not recorded (a
	// .prj put beside a shapefile since). Otherwise SHA256 is its
	// content's now.
	Removed, Added bool
	// NotFile, with Removed: a directory or another non-file is at the
	// path now.
	NotFile bool
	SHA256  string
}

// String says what changed, e.g. "the occurrences file /data/occ.csv
// holds other content (SHA-256 0123456789ab then, ba9876543210 now)" or
// "the model m file /data/m.tif.aux.xml was removed".
func (c InputChange) String() string {
	what := "the " + roleText(c.File.Role) + " file " + c.File.Path
	switch {
	case c.Removed && c.NotFile:
		return what + " is no longer a file"
	case c.Removed:
		return what + " was removed"
	case c.Added:
		return what + " was added"
	}
	return fmt.Sprintf("%s holds other content (SHA-256 %s then, %s now)", what, short(c.File.SHA256), short(c.SHA256))
}

// roleText is a role as a user reads it: "model:m" becomes "model m".
func roleText(role string) string { return strings.ReplaceAll(role, ":", " ") }

func short(sum string) string { return sum[:min(12, len(sum))] }

// InputCheck is what Checker.Check found.
type InputCheck struct {
	// Changed lists the files removed or with other content.
	Changed []InputChange
	// Refreshed, when not nil, are the records with the size and time
	// found now, every file's content being the same as recorded but some
	// file's time (or size record) changed, e.g. by touch: a marker
	// rewritten with them spares the next check from hashing the file
	// again.
	Refreshed []InputFile
}

// Checker compares recorded input files with the files on disk. It hashes
// a file only when its size or modification time differs from the
// recorded ones, and a file with the same path, size and time once per
// Checker (a batch checks a study several times, and studies share
// inputs). A file replaced by other content of the same size within the
// same modification time is not seen (the file system's time resolution:
// nanoseconds on ext4, xfs and tmpfs). Safe for concurrent use.
type Checker struct {
	mu   sync.Mutex
	sums map[fileKey]string
}

type fileKey struct {
	path          string
	size, modTime int64
}

// Check stats every file of files: a file of the recorded size and
// modification time is taken as unchanged without reading it; any other
// is hashed and compared with its recorded SHA-256, so that a file
// touched or rewritten with the same bytes counts as unchanged. A
// removed file is a change, not an error; an error is a file that cannot
// be examined (no permission), named.
func (c *Checker) Check(files []InputFile) (InputCheck, error) {
	var r InputCheck
	fresh := slices.Clone(files)
	touched := false
	for i, f := range files {
		st, err := os.Stat(f.Path)
		if errors.Is(err, fs.ErrNotExist) || errors.Is(err, syscall.ENOTDIR) {
			// ENOTDIR: a folder on the path is a file now.
			r.Changed = append(r.Changed, InputChange{File: f, Removed: true})
			continue
		}
		if err != nil {
			return InputCheck{}, unreadable(f, err)
		}
		if !st.Mode().IsRegular() {
			r.Changed = append(r.Changed, InputChange{File: f, Removed: true, NotFile: true})
			continue
		}
		if st.Size() == f.Size && st.ModTime().UnixNano() == f.ModTime {
			continue
		}
		sum, err := c.sum(f.Path, st)
		if err != nil {
			return InputCheck{}, unreadable(f, err)
		}
		if sum != f.SHA256 {
			r.Changed = append(r.Changed, InputChange{File: f, SHA256: sum})
			continue
		}
		fresh[i].Size, fresh[i].ModTime = st.Size(), st.ModTime().UnixNano()
		touched = true
	}
	if touched && len(r.Changed) == 0 {
		r.Refreshed = fresh
	}
	return r, nil
}

// UnreadableError is a recorded input file of a finished study that
// cannot be examined or read, so that nobody can tell whether the study's
// results still stand for it. --force does not get past it: GDAL skips a
// sidecar file it cannot open (a mask, an overview) without a word, so a
// run made then could silently differ from the one recorded.
type UnreadableError struct {
	File InputFile
	// Err is the system's reason (the path error's cause).
	Err error
}

func (e *UnreadableError) Error() string {
	return fmt.Sprintf("batch: the %s file %s cannot be read to check that it is the one the study was made from (%v); "+
		"make it readable, or, if the study should no longer use it, move it away (the study then counts as made from other inputs, which --force runs again)",
		roleText(e.File.Role), e.File.Path, e.Err)
}

func (e *UnreadableError) Unwrap() error { return e.Err }

// unreadable is the error of a recorded file that cannot be examined or
// read: its role and path once, the system's reason (not the path again),
// and what to do.
func unreadable(f InputFile, err error) error {
	var pe *fs.PathError
	if errors.As(err, &pe) {
		err = pe.Err
	}
	return &UnreadableError{File: f, Err: err}
}

// sum is the SHA-256 of the file at path, st its stat taken before. It
// is kept for the next file of the same path, size and time only when
// the file's size and time are still st's after it was read.
func (c *Checker) sum(path string, st fs.FileInfo) (string, error) {
	k := fileKey{path, st.Size(), st.ModTime().UnixNano()}
	c.mu.Lock()
	s, ok := c.sums[k]
	c.mu.Unlock()
	if ok {
		return s, nil
	}
	s, err := FileSHA256(path)
	if err != nil {
		return "", err
	}
	if after, err := os.Stat(path); err == nil && after.Size() == k.size && after.ModTime().UnixNano() == k.modTime {
		c.mu.Lock()
		if c.sums == nil {
			c.sums = map[fileKey]string{}
		}
		c.sums[k] = s
		c.mu.Unlock()
	}
	return s, nil
}
