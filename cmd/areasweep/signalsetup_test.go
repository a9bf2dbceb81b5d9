package main

import (
	"bytes"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"syscall"
	"testing"
	"time"

	"areasweep/cmd/internal/stopsig"
)

// The test binary links package main, so stopsig's init catches the stop
// signals here too; hand them back, so that Ctrl-C stops the tests as
// usual (each in-process Main catches them again while it runs).
func init() { stopsig.Stop() }

// heldSetUp starts cmd with GDAL's configuration file (GDAL_CONFIG_FILE,
// read while GDAL's drivers are registered, before the command line is
// parsed) set to a FIFO, and returns once the program has opened it: the
// program is then blocked inside its set-up until release is called. This
// holds the program at a known point of its first moments, where a signal
// used to meet the runtime's default (the process killed without the
// exit code and message of a stopped run) or an inherited ignore.
func heldSetUp(t *testing.T, cmd *exec.Cmd) (release func()) {
	t.Helper()
	fifo := filepath.Join(t.TempDir(), "gdal.conf")
	if err := syscall.Mkfifo(fifo, 0o600); err != nil {
		t.Fatal(err)
	}
	cmd.Env = append(os.Environ(), "GDAL_CONFIG_FILE="+fifo)
	if err := cmd.Start(); err != nil {
		t.Fatal(err)
	}
	deadline := time.Now().Add(60 * time.Second)
	for {
		// Opening the write end without blocking succeeds once the
		// program has the read end open; it then waits in read until
		// this end is closed.
		w, err := os.OpenFile(fifo, os.O_WRONLY|syscall.O_NONBLOCK, 0)
		if err == nil {
			return func() { w.Close() }
		}
		if time.Now().After(deadline) {
			cmd.Process.Kill()
			t.Fatal("the program never read GDAL's configuration file")
		}
		time.Sleep(2 * time.Millisecond)
	}
}

// TestSignalDuringSetUp: a signal arriving while the program still sets
// itself up (here: inside GDAL's driver registration, the first ~0.1 s of
// a run) stops it like a signal during the run: exit 128+N, the one-line
// message, nothing created.
func TestSignalDuringSetUp(t *testing.T) {
	s := newSmallStudy(t)
	for _, sig := range []syscall.Signal{syscall.SIGTERM, syscall.SIGINT, syscall.SIGHUP} {
		t.Run(sig.String(), func(t *testing.T) {
			parent := t.TempDir()
			out := filepath.Join(parent, "res")
			cmd := exec.Command(areasweepBin, s.args(out)...)
			var se bytes.Buffer
			cmd.Stderr = &se
			release := heldSetUp(t, cmd)
			cmd.Process.Signal(sig)
			done := make(chan error, 1)
			go func() { done <- cmd.Wait() }()
			var err error
			select {
			case err = <-done:
			case <-time.After(30 * time.Second):
				release() // the signal was lost: let the run go on, to see it
				err = <-done
			}
			release()
			if code := exitCode(err); code != 128+int(sig) {
				t.Errorf("exit %d (%v), want %d; stderr %s", code, err, 128+int(sig), se.String())
			}
			if !strings.Contains(se.String(), "areasweep: stopped by") || forbidden.MatchString(se.String()) {
				t.Errorf("stderr: %q", se.String())
			}
			if entries, _ := os.ReadDir(parent); len(entries) != 0 {
				t.Errorf("%d entries created beside --out by a run stopped in its set-up", len(entries))
			}
		})
	}
}

// TestIgnoredSignalDuringSetUp: a run started with SIGINT ignored (a
// background job of a non-interactive shell) used to ignore a SIGINT
// arriving in its set-up and go on, while one arriving later stopped it;
// now both stop it.
func TestIgnoredSignalDuringSetUp(t *testing.T) {
	s := newSmallStudy(t)
	parent := t.TempDir()
	out := filepath.Join(parent, "res")
	// sh sets SIGINT ignored, then becomes the run (exec keeps an ignored
	// disposition).
	cmd := exec.Command("sh", append([]string{"-c", `trap '' INT; exec "$0" "$@"`, areasweepBin}, slowArgs(s, out)...)...)
	var se bytes.Buffer
	cmd.Stderr = &se
	release := heldSetUp(t, cmd)
	defer release()
	cmd.Process.Signal(syscall.SIGINT)
	done := make(chan error, 1)
	go func() { done <- cmd.Wait() }()
	var err error
	select {
	case err = <-done:
	case <-time.After(10 * time.Second):
		release()
		select {
		case err = <-done:
		case <-time.After(500 * time.Millisecond):
			cmd.Process.Kill()
			t.Fatalf("a SIGINT in the set-up was ignored: the run went on; stderr %s", se.String())
		}
	}
	if code := exitCode(err); code != 128+int(syscall.SIGINT) {
		t.Errorf("exit %d (%v), want %d; stderr %s", code, err, 128+int(syscall.SIGINT), se.String())
	}
	if entries, _ := os.ReadDir(parent); len(entries) != 0 {
		t.Errorf("%d entries created beside --out by a run stopped in its set-up", len(entries))
	}
}
