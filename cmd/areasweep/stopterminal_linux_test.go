package main

import (
	"bytes"
	"fmt"
	"io"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"sync"
	"syscall"
	"testing"
	"unsafe"
)

// openPty returns a new pseudo-terminal's controlling side and its
// terminal (what a program is given as its standard error).
func openPty(t *testing.T) (ptmx, pts *os.File) {
	t.Helper()
	ptmx, err := os.OpenFile("/dev/ptmx", os.O_RDWR, 0)
	if err != nil {
		t.Skipf("no pseudo-terminal: %v", err)
	}
	var unlock, n int32
	if _, _, e := syscall.Syscall(syscall.SYS_IOCTL, ptmx.Fd(), syscall.TIOCSPTLCK, uintptr(unsafe.Pointer(&unlock))); e != 0 {
		t.Skipf("no pseudo-terminal: %v", e)
	}
	if _, _, e := syscall.Syscall(syscall.SYS_IOCTL, ptmx.Fd(), syscall.TIOCGPTN, uintptr(unsafe.Pointer(&n))); e != 0 {
		t.Skipf("no pseudo-terminal: %v", e)
	}
	pts, err = os.OpenFile(fmt.Sprintf("/dev/pts/%d", n), os.O_RDWR|syscall.O_NOCTTY, 0)
	if err != nil {
		t.Skipf("no pseudo-terminal: %v", err)
	}
	return ptmx, pts
}

// TestStopMessageOnTerminal: Ctrl-C while a progress bar was drawn on a
// terminal printed the message on the bar's line, after it ("scoring m
// 38% |███ | (27/70) [0s:0s]areasweep: stopped by SIGINT ..."; seen with
// and without a limit of virtual memory, whose supervisor relays the
// bar), and a log line or the bar's redraw could follow the message. On a
// terminal the message now clears the line first and is the last thing
// written, with the supervisor (ulimit -v) and without.
func TestStopMessageOnTerminal(t *testing.T) {
	s := newSmallStudy(t)
	for _, limited := range []bool{false, true} {
		t.Run(fmt.Sprintf("limit=%v", limited), func(t *testing.T) {
			ptmx, pts := openPty(t)
			defer ptmx.Close()
			out := filepath.Join(t.TempDir(), "res")
			args := slowArgs(s, out)
			args = append(args[:len(args)-3], "--out", out) // without --quiet: the bar is drawn
			cmd := exec.Command(areasweepBin, args...)
			if limited {
				cmd = exec.Command("sh", append([]string{"-c", `ulimit -v 3000000 && exec "$0" "$@"`, areasweepBin}, args...)...)
			}
			cmd.Stderr = pts
			if err := cmd.Start(); err != nil {
				t.Fatal(err)
			}
			pts.Close()
			var seen bytes.Buffer
			var wg sync.WaitGroup
			wg.Add(1)
			go func() { defer wg.Done(); io.Copy(&seen, ptmx) }() // ends with EIO once the program has exited
			waitForStage(t, out)
			cmd.Process.Signal(syscall.SIGINT)
			err := cmd.Wait()
			wg.Wait()
			if code := exitCode(err); code != 130 {
				t.Errorf("exit %d, want 130; terminal: %q", code, seen.String())
			}
			// The terminal turns "\n" into "\r\n".
			got := strings.TrimRight(seen.String(), "\r\n")
			i := strings.LastIndex(got, "\r\x1b[Kareasweep: stopped by SIGINT")
			if i < 0 || strings.ContainsAny(got[i+4:], "\r\n") {
				t.Errorf("the message does not clear its line, or is not the last: %q", got[max(0, len(got)-400):])
			}
		})
	}
}

func (g *stopGate) isClosed() bool {
	g.mu.Lock()
	defer g.mu.Unlock()
	return g.closed
}

// TestStopGateDropsLaterLines: a run's goroutines go on writing (a log
// line of the pass, a progress bar) between the stop message and the
// process's exit; a run stopped by SIGTERM during its pass ended its
// standard error with "m2: read once, block by block ..." after the
// message (1 of 100 signalled runs). What is written after closeWith is
// dropped, and reported written (the writers go on as before).
func TestStopGateDropsLaterLines(t *testing.T) {
	var b bytes.Buffer
	g := &stopGate{w: &b}
	started := make(chan struct{})
	done := make(chan struct{})
	go func() {
		defer close(done)
		for i := 0; ; i++ {
			if n, err := g.Write([]byte("a log line\n")); n != 11 || err != nil {
				t.Errorf("write %d: %d, %v", i, n, err)
			}
			if i == 10 {
				close(started)
			}
			if i > 10 && g.isClosed() {
				for j := 0; j < 100; j++ {
					g.Write([]byte("after the message\n"))
				}
				return
			}
		}
	}()
	<-started
	g.closeWith("areasweep: stopped by SIGTERM; ...\n")
	<-done
	if got := b.String(); !strings.HasSuffix(got, "a log line\nareasweep: stopped by SIGTERM; ...\n") {
		t.Errorf("standard error ends %q", got[max(0, len(got)-100):])
	}
}
