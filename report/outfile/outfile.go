// Package outfile writes areasweep's output files whole or not at all:
// through a temporary file in the same folder, synced, given its mode and
// renamed over the path, so a reader (or a run stopped half-way) never
// sees half a file. It is the one such writer of the program (the report,
// the pipeline's tables and logs, the scheduler's scripts), pure Go.
package outfile

import (
	"errors"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"strings"
	"syscall"
)

// Umask is the process umask, read once at start: files are created with
// perm &^ Umask, like touch(1) does.
var Umask = readUmask()

func readUmask() os.FileMode {
	m := syscall.Umask(0)
	syscall.Umask(m)
	return os.FileMode(m)
}

// tempInfix is what names Write's temporary file: "." + the file's name +
// tempInfix + digits (os.CreateTemp's random part), beside the file.
const tempInfix = ".tmp-"

// IsTemp tells whether name is a temporary file Write creates, which a
// process killed while writing can leave behind.
func IsTemp(name string) bool {
	i := strings.LastIndex(name, tempInfix)
	if !strings.HasPrefix(name, ".") || i < 1 {
		return false
	}
	digits := name[i+len(tempInfix):]
	return digits != "" && strings.Trim(digits, "0123456789") == ""
}

// Write writes data to path atomically with mode perm &^ Umask (0o666 for
// a data file, 0o777 for a script).
func Write(path string, data []byte, perm os.FileMode) error {
	return WriteFrom(path, perm, func(w io.Writer) error {
		_, err := w.Write(data)
		return err
	})
}

// WriteFrom is Write of what fill writes to the writer it is given (the
// temporary file, unbuffered), for a file made in pieces without holding
// it whole. When fill fails nothing is left, and its error is returned
// with the path.
func WriteFrom(path string, perm os.FileMode, fill func(w io.Writer) error) error {
	tmp, err := writeTemp(path, perm, fill)
	if err == nil {
		err = os.Rename(tmp, path)
	}
	if err != nil {
		if tmp != "" {
			os.Remove(tmp)
		}
		return writeError(path, err)
	}
	return nil
}

// writeError is err, a failure to write the file at path, naming path:
// a failure on the temporary file (a path error, as a full disk or the
// limit of file size gives) becomes one on path itself, so that the
// temporary file's name, which the user never sees, is never reported.
func writeError(path string, err error) error {
	var pe *os.PathError
	if errors.As(err, &pe) && IsTemp(filepath.Base(pe.Path)) {
		return &os.PathError{Op: pe.Op, Path: path, Err: pe.Err}
	}
	return fmt.Errorf("write %s: %w", path, err)
}

// writeTemp writes what fill writes into a temporary file beside path,
// synced and with mode perm &^ Umask, and returns its name; on an error
// nothing is left and the name is "".
func writeTemp(path string, perm os.FileMode, fill func(w io.Writer) error) (string, error) {
	tmp, err := os.CreateTemp(filepath.Dir(path), "."+filepath.Base(path)+tempInfix+"*")
	if err != nil {
		return "", err
	}
	err = fill(tmp)
	if err == nil {
		err = tmp.Sync()
	}
	if err == nil {
		err = tmp.Chmod(perm &^ Umask)
	}
	if cerr := tmp.Close(); err == nil {
		err = cerr
	}
	if err != nil {
		os.Remove(tmp.Name())
		return "", err
	}
	return tmp.Name(), nil
}

// File is one file of a set that WriteAll writes.
type File struct {
	Path string
	Data []byte
}

// WriteAll writes a set of files together: every one is written and
// synced to its temporary file first, and only when all are written are
// they renamed over their paths, in order. A failure while writing (a full
// disk) leaves every path as it was, with no temporary file; a rename
// that fails (rare: the folder changed meanwhile) leaves the files before
// it replaced, and the error says how many.
func WriteAll(files []File, perm os.FileMode) error {
	tmps := make([]string, 0, len(files))
	removeTmps := func(from int) {
		for _, t := range tmps[from:] {
			os.Remove(t)
		}
	}
	for _, f := range files {
		tmp, err := writeTemp(f.Path, perm, func(w io.Writer) error {
			_, err := w.Write(f.Data)
			return err
		})
		if err != nil {
			removeTmps(0)
			return writeError(f.Path, err)
		}
		tmps = append(tmps, tmp)
	}
	for i, f := range files {
		if err := os.Rename(tmps[i], f.Path); err != nil {
			removeTmps(i)
			return fmt.Errorf("write %s (after %d of the %d files were replaced): %w", f.Path, i, len(files), err)
		}
	}
	return nil
}
