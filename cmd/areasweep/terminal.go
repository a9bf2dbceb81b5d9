package main

import (
	"io"
	"os"

	"golang.org/x/term"
)

// isTerminal reports whether w is a terminal: standard error is when it
// was before a supervisor (supervise_linux.go) made it a pipe.
func isTerminal(w io.Writer) bool {
	f, ok := w.(*os.File)
	if ok && f == os.Stderr && stderrTerminal() {
		return true
	}
	return ok && term.IsTerminal(int(f.Fd()))
}
