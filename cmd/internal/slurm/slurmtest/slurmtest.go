// Package slurmtest starts the one-node SLURM cluster of
// scripts/slurm-local.sh for the tests that submit real jobs (the
// scheduler's own test and the batch command's), so that both start, lock
// and stop it the same way.
package slurmtest

import (
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"syscall"
	"testing"
)

// Start takes the cluster lock, starts the cluster with script (the path
// of scripts/slurm-local.sh; it installs the packages when missing) and
// returns the environment for the client commands (os.Environ plus
// SLURM_CONF). It never skips: a machine that cannot run the cluster fails
// the test, in CI and elsewhere. A cluster the test started is stopped at
// its end, before the lock is released.
func Start(t testing.TB, script string) []string {
	t.Helper()
	lock(t)
	script, err := filepath.Abs(script)
	if err != nil {
		t.Fatal(err)
	}
	wasRunning := exec.Command(script, "status").Run() == nil
	if out, err := exec.Command(script, "start").CombinedOutput(); err != nil {
		t.Fatalf("starting the local cluster with %s start failed (CI=%q): %v\n%s", script, os.Getenv("CI"), err, out)
	}
	if !wasRunning {
		t.Cleanup(func() {
			if out, err := exec.Command(script, "stop").CombinedOutput(); err != nil {
				t.Errorf("stopping the cluster: %v\n%s", err, out)
			}
		})
	}
	line, err := exec.Command(script, "env").Output()
	if err != nil {
		t.Fatal(err)
	}
	conf := strings.TrimPrefix(strings.TrimSpace(string(line)), "export ")
	if !strings.HasPrefix(conf, "SLURM_CONF=") {
		t.Fatalf("%s env printed %q", script, line)
	}
	return append(os.Environ(), conf)
}

// lock holds an exclusive lock on a file shared by every test that uses
// the local cluster, until the test ends, so that tests of different
// packages (run in parallel by go test ./...) never stop the cluster under
// one another.
func lock(t testing.TB) {
	t.Helper()
	f, err := os.OpenFile(filepath.Join(os.TempDir(), "areasweep-slurm-test.lock"), os.O_CREATE|os.O_RDWR, 0o644)
	if err != nil {
		t.Fatal(err)
	}
	if err := syscall.Flock(int(f.Fd()), syscall.LOCK_EX); err != nil {
		t.Fatal(err)
	}
	t.Cleanup(func() { f.Close() }) // registered first, so it runs after the cluster's stop
}
