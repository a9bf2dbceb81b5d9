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
	"regexp"
)

// InputError marks an error caused by the user's input or flags.
type InputError struct{ Err error }

func (e InputError) Error() string { return e.Err.Error() }

// Unwrap returns the wrapped error.
func (e InputError) Unwrap() error { return e.Err }

// BadInput wraps err as an input error (nil stays nil; an input error is
// not wrapped twice).
func BadInput(err error) error {
	if err == nil {
		return nil
	}
	var ie InputError
	if errors.As(err, &ie) {
		return err
	}
	return InputError{err}
}

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
var packagePrefix = regexp.MustCompile(`(?m)(^|: |^\s+)(?:batch|extent|geodesy|inputs|metrics|nullmodel|pass|place|report|scenario|shardfile|slurm): `)

// UserText returns an error message as a user reads it: without the names
// of areasweep's packages that the layers below the command put in front
// of their parts ("region: extent: F feature 1 is ..." becomes "region: F
// feature 1 is ..."). What names a file, a flag, a model or a study is
// kept; a bug's message (Internal) is shown as it is, with its package
// names, for the report.
func UserText(err error) string {
	msg := err.Error()
	if IsInternal(err) {
		return msg
	}
	for {
		out := packagePrefix.ReplaceAllString(msg, "$1")
		if out == msg {
			return out
		}
		msg = out
	}
}
