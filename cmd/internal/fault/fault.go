// Package fault classifies the errors of a run by whose fault they are, so
// that the command maps them to exit codes in one place: an error the
// user's input or settings caused (exit 2, nothing written), a broken
// internal contract, that is a bug (exit 3), or anything else, such as a
// full disk (exit 1).
//
// Libraries below the command (pipeline, outdir) wrap what they return with
// BadInput or Internal; the command reads the class with errors.As.
package fault

import (
	"errors"
	"os"
	"regexp"
	"strings"
)

// InputError marks an error caused by the user's input or flags.
type InputError struct{ Err error }

func (e InputError) Error() string { return e.Err.Error() }

// Unwrap returns the wrapped error.
func (e InputError) Unwrap() error { return e.Err }

// BadInput wraps err as an input error (nil stays nil; an input error is
// not wrapped twice, nor is an error that is never the input's fault).
func BadInput(err error) error {
	if err == nil {
		return nil
	}
	var ie InputError
	var ni notInput
	if errors.As(err, &ie) || errors.As(err, &ni) {
		return err
	}
	return InputError{err}
}

// notInput is met by errors that are never the input's fault although a
// library below returns them where input errors arise, such as the pass's
// *pass.MemoryError (the machine's memory ran out reading a raster):
// BadInput leaves them as they are (exit 1).
type notInput interface{ NotInput() }

// InternalError marks a broken internal contract (a bug).
type InternalError struct{ Err error }

func (e InternalError) Error() string { return e.Err.Error() }

// Unwrap returns the wrapped error.
func (e InternalError) Unwrap() error { return e.Err }

// Internal wraps err as an internal error (nil stays nil).
func Internal(err error) error {
	if err == nil {
		return nil
	}
	return InternalError{err}
}

// IsBadInput reports whether err is, or wraps, an input error.
func IsBadInput(err error) bool {
	var ie InputError
	return errors.As(err, &ie)
}

// IsInternal reports whether err is, or wraps, an internal error.
func IsInternal(err error) bool {
	var ne InternalError
	return errors.As(err, &ne)
}

// packagePrefix is the "name: " with which areasweep's own packages begin
// their errors (Go's convention for a library), at the start of a message
// or after another part's ": ".
var packagePrefix = regexp.MustCompile(`(?m)(^|: |^\s+)(batch|extent|geodesy|inputs|metrics|nullmodel|pass|place|report|scenario|shardfile|slurm): `)

// shownError is an error whose text is already as a user reads it.
type shownError struct{ err error }

func (e shownError) Error() string { return e.err.Error() }
func (e shownError) Unwrap() error { return e.err }

// Shown marks err as already in a user's words, put together from parts
// that went through UserText and names of the user's own (study ids) that
// UserText would take for package names: UserText returns its text whole.
// The class of err (BadInput, Internal) is kept.
func Shown(err error) error {
	if err == nil {
		return nil
	}
	return shownError{err}
}

// UserText returns an error message as a user reads it: without the names
// of areasweep's packages that the layers below the command put in front
// of their parts ("region: extent: F feature 1 is ..." becomes "region: F
// feature 1 is ..."). What names a file, a flag, a model or a study is
// kept: "model pass: ..." (the name follows a word), and "pass: ..." when
// a file or folder named pass is in the working folder (an input given by
// that relative name). A bug's message (Internal) is shown as it is, with
// its package names, for the report; so is a Shown error's.
func UserText(err error) string {
	var se shownError
	if IsInternal(err) || errors.As(err, &se) {
		return err.Error()
	}
	return strip(err.Error(), true)
}

// Text is UserText of a message that is not an error.
func Text(msg string) string { return strip(msg, true) }

// Warning is a warning that a run writes into its results (results.json,
// run.log, the report) as a user reads it: without package names, as
// Text, but the same whatever files the working folder holds, so that the
// results stay byte-identical wherever the run is started. Warnings begin
// with a path followed by a space, never by ": ", so no user's name is
// lost ("extent: training points are collinear; ..." becomes "training
// points are collinear; ...").
func Warning(msg string) string { return strip(msg, false) }

func strip(msg string, keepFiles bool) string {
	for {
		out := stripPackages(msg, keepFiles)
		if out == msg {
			return out
		}
		msg = out
	}
}

// stripPackages drops each package name packagePrefix finds in msg once,
// with keepFiles keeping those that are also the name of a file in the
// working folder.
func stripPackages(msg string, keepFiles bool) string {
	var b strings.Builder
	last := 0
	for _, m := range packagePrefix.FindAllStringSubmatchIndex(msg, -1) {
		if _, err := os.Lstat(msg[m[4]:m[5]]); keepFiles && err == nil {
			continue // a file of that name: it may be the user's input
		}
		b.WriteString(msg[last:m[3]])
		last = m[1]
	}
	b.WriteString(msg[last:])
	return b.String()
}
