//go:build !linux

package main

// stderrTerminal reports whether the program's standard error was a
// terminal before a supervisor piped it: there is none outside Linux.
func stderrTerminal() bool { return false }
