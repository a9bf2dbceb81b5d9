//go:build crashtest

package main

import (
	"fmt"
	"os"
	"time"
)

// A binary built with -tags crashtest (limits_linux_test.go's) crashes on
// demand before Main, so that the supervisor's handling of a crash under a
// limit of virtual memory (supervise_linux.go) can be tested: the
// environment variable AREASWEEP_CRASHTEST says how.
func init() {
	switch os.Getenv("AREASWEEP_CRASHTEST") {
	case "oom":
		// Reserve until the limit: Go's runtime then stops with its
		// "fatal error: runtime: out of memory" report.
		var keep [][]byte
		for {
			keep = append(keep, make([]byte, 256<<20))
		}
	case "panic":
		go func() { panic("crash test") }()
		time.Sleep(10 * time.Second)
	case "relay":
		// Lines that begin like a crash report's markers without being
		// one, a progress bar redrawn with carriage returns and a line
		// without its end; then exit code 7.
		fmt.Fprint(os.Stderr, "line one\nrunning late\npanic-free\n\rprogress 10%\rprogress 50%\rprogress 100%\nfatal errors: none\nno end")
		os.Exit(7)
	case "ownpanic":
		// The program's own lines that start like a crash report (a
		// model named "panic" logs "panic: ..."), then a refusal of its
		// own: exit 2 ending with an "areasweep: " line.
		fmt.Fprint(os.Stderr, "panic: AUC 0.81 on base\nruntime: 2.1 s\nareasweep: the study is refused\n")
		os.Exit(2)
	case "ownpanic0":
		fmt.Fprint(os.Stderr, "panic: AUC 0.81 on base\nfatal error: none\n")
		os.Exit(0)
	}
}
