package main

import (
	"fmt"
	"os"
	"os/exec"
	"path/filepath"
	"regexp"
	"strings"
	"syscall"
	"testing"
	"time"
)

// TestAddressSpaceFloor: under a limit of virtual memory below
// minAddressSpace the binary stops before Go's runtime starts, with exit
// code 2, our message alone (no crash report) and nothing written; at the
// floor it starts. Without the check, the demo's run under ulimit -v
// 1,700,000 KiB ended with a crash report (see minAddressSpace).
func TestAddressSpaceFloor(t *testing.T) {
	if _, err := exec.LookPath("sh"); err != nil {
		t.Fatal("sh is needed to set the limit: ", err)
	}
	dir := t.TempDir()
	out := filepath.Join(dir, "out")
	under := func(kib int64, args ...string) (string, int) {
		cmd := exec.Command("sh", append([]string{"-c", fmt.Sprintf(`ulimit -v %d && exec "$0" "$@"`, kib), areasweepBin}, args...)...)
		var se strings.Builder
		cmd.Stderr = &se
		code := exitCode(cmd.Run())
		return se.String(), code
	}
	for _, kib := range []int64{500_000, 1_700_000, minAddressSpace/1024 - 1} {
		msg, code := under(kib, "run", "--region", "r.geojson", "--occurrences", "o.csv", "--model", "m=m.tif", "--out", out)
		if code != 2 {
			t.Errorf("ulimit -v %d: exit %d, want 2; stderr %q", kib, code, msg)
		}
		want := fmt.Sprintf("areasweep: the process may reserve at most %d MiB of address space (its limit of virtual memory: ulimit -v, or a cluster job's such as h_vmem), and areasweep needs at least %d MiB to start", kib/1024, minAddressSpace>>20)
		if !strings.HasPrefix(msg, want) || strings.Count(msg, "\n") != 1 || !strings.Contains(msg, fmt.Sprintf("ulimit -v %d", minAddressSpace>>10)) {
			t.Errorf("ulimit -v %d: stderr %q, want one line starting %q and naming ulimit -v %d", kib, msg, want, minAddressSpace>>10)
		}
		if _, err := os.Stat(out); !os.IsNotExist(err) {
			t.Errorf("ulimit -v %d: %s exists (%v)", kib, out, err)
		}
	}
	if msg, code := under(minAddressSpace/1024, "--help"); code != 0 {
		t.Errorf("ulimit -v %d (the floor): --help exit %d, stderr %q", minAddressSpace/1024, code, msg)
	}
}

// TestFileSizeLimit: a run under a limit of file size too small for its
// outputs (sh's ulimit -f 60 and 400, in blocks of 512 bytes: POSIX's
// unit, where bash's own is 1024) stops with exit 1, names the limit and
// what to do, and leaves --out without any output. Without the advice
// the message said only "disk I/O error" (the GeoPackage) or "file too
// large".
func TestFileSizeLimit(t *testing.T) {
	s := newSmallStudy(t)
	for _, blocks := range []int{60, 400} {
		kib := blocks / 2
		out := filepath.Join(t.TempDir(), "out")
		cmd := exec.Command("sh", "-c", fmt.Sprintf(`ulimit -f %d && exec "$0" "$@"`, blocks), areasweepBin, "run", "--quiet", "--region", s.region, "--occurrences", s.occ, "--model", "m="+s.model, "--out", out, "--iterations", "50")
		var se strings.Builder
		cmd.Stderr = &se
		code := exitCode(cmd.Run())
		// The GeoPackage's failure (SQLite's words) names no file; the
		// system's "file too large" comes with the file's name.
		limit := fmt.Sprintf("(this process may not write a file larger than %d KiB", kib)
		if strings.Contains(se.String(), "file too large") {
			limit = regexp.MustCompile(`\(this process may not write a file larger than \d+ KiB, and [^ /]+ needs more`).FindString(se.String())
		}
		const rest = ": its limit of file size, ulimit -f, is set; raise it, for example with ulimit -f unlimited); nothing in it was changed"
		if code != 1 || !strings.HasPrefix(se.String(), "areasweep: writing the results into "+out+" failed: ") || limit == "" || !strings.Contains(se.String(), limit+rest) {
			t.Errorf("ulimit -f %d: exit %d, stderr %q; want exit 1, the limit of %d KiB (and the file when the system names it) and %q", kib, code, se.String(), kib, rest)
		}
		if entries, err := os.ReadDir(out); err == nil && len(entries) > 0 {
			var names []string
			for _, e := range entries {
				names = append(names, e.Name())
			}
			t.Errorf("ulimit -f %d: %s holds %v", kib, out, names)
		}
	}
}

// TestAddressSpaceFloorHardLimit: with the hard limit of virtual memory
// below minAddressSpace too (sh's ulimit -v sets both; -S the soft one
// alone), the message says so, since ulimit -v cannot raise a hard limit
// (root aside) and the advice to raise it alone would fail; a soft limit
// below the floor under a higher hard one keeps the plain advice.
func TestAddressSpaceFloorHardLimit(t *testing.T) {
	// The hard limits in MiB: 1,700,000 and 1,800,000 KiB >> 10.
	for _, tc := range []struct {
		set, hard string // hard: "" when the message must not name it
	}{
		{"ulimit -v 1700000", "its hard limit (ulimit -Hv) is 1660 MiB"},
		{"ulimit -S -v 1700000 && ulimit -H -v 1800000", "its hard limit (ulimit -Hv) is 1757 MiB"},
		{"ulimit -S -v 1700000", ""},
		{"ulimit -S -v 1700000 && ulimit -H -v 3000000", ""},
	} {
		cmd := exec.Command("sh", "-c", tc.set+` && exec "$0" "$@"`, areasweepBin, "--help")
		var se strings.Builder
		cmd.Stderr = &se
		code := exitCode(cmd.Run())
		msg := se.String()
		if code != 2 || strings.Count(msg, "\n") != 1 || !strings.Contains(msg, "ulimit -v 2097152") {
			t.Errorf("%s: exit %d, stderr %q; want exit 2 and one line naming ulimit -v 2097152", tc.set, code, msg)
		}
		if got := strings.Contains(msg, "hard limit"); got != (tc.hard != "") || !strings.Contains(msg, tc.hard) {
			t.Errorf("%s: stderr %q, want it to name the hard limit as %q", tc.set, msg, tc.hard)
		}
	}
}

// TestSupervisedCrash: under a limit of virtual memory (ulimit -v
// 3,000,000 KiB, above minAddressSpace) the program runs watched by a
// supervisor (supervise_linux.go). A binary built with -tags crashtest
// crashes on demand: Go's runtime out of memory ends with exit code 1 and
// one line saying what to raise (twice the limit) and where the runtime's
// report is, which holds it; a goroutine's panic ends with exit 3 and
// one line naming the report; neither report reaches standard error.
// Lines that only begin like a report's first line are relayed unchanged
// (carriage returns included) with the program's own exit code, and so
// are lines starting exactly as a report does when the program then ends
// as it does by itself (exit 0, or 2 after an "areasweep: " line); and a
// stop signal sent to the supervisor reaches the program, which stops as
// it does unsupervised (exit 143, its message).
func TestSupervisedCrash(t *testing.T) {
	dir := t.TempDir()
	bin := filepath.Join(dir, "areasweep-crashtest")
	if out, err := exec.Command("go", "build", "-tags", "crashtest", "-o", bin, ".").CombinedOutput(); err != nil {
		t.Fatalf("go build -tags crashtest: %v\n%s", err, out)
	}
	const kib = 3_000_000
	tmp := t.TempDir()
	start := func(mode string, args ...string) *exec.Cmd {
		cmd := exec.Command("sh", append([]string{"-c", fmt.Sprintf(`ulimit -v %d && exec "$0" "$@"`, kib), bin}, args...)...)
		cmd.Env = append(os.Environ(), "AREASWEEP_CRASHTEST="+mode, "TMPDIR="+tmp)
		return cmd
	}
	run := func(mode string) (string, int) {
		cmd := start(mode, "--help")
		var se strings.Builder
		cmd.Stderr = &se
		code := exitCode(cmd.Run())
		return se.String(), code
	}
	report := regexp.MustCompile(`report is in (\S+/run\.log)\n$|please report it with (\S+/run\.log)\n$`)
	for _, tc := range []struct {
		mode, begins, inReport string
		code                   int
	}{
		{"oom", fmt.Sprintf("areasweep: stopped: it ran out of the address space its limit of virtual memory allows (%d MiB", kib/1024), "out of memory", 1},
		{"panic", "areasweep: internal error (the program crashed); this is a bug, please report it with ", "panic: crash test", 3},
	} {
		msg, code := run(tc.mode)
		m := report.FindStringSubmatch(msg)
		if code != tc.code || !strings.HasPrefix(msg, tc.begins) || strings.Count(msg, "\n") != 1 || m == nil {
			t.Errorf("%s: exit %d, stderr %q; want exit %d and one line starting %q and naming the report", tc.mode, code, msg, tc.code, tc.begins)
			continue
		}
		if tc.mode == "oom" && !strings.Contains(msg, fmt.Sprintf("ulimit -v %d", 2*kib)) {
			t.Errorf("oom: %q does not advise ulimit -v %d", msg, 2*kib)
		}
		if b, err := os.ReadFile(m[1] + m[2]); err != nil || !strings.Contains(string(b), tc.inReport) || !strings.Contains(string(b), "goroutine ") {
			t.Errorf("%s: the report %s (%v) lacks %q or the goroutines' stacks", tc.mode, m[1]+m[2], err, tc.inReport)
		}
	}
	const relayed = "line one\nrunning late\npanic-free\n\rprogress 10%\rprogress 50%\rprogress 100%\nfatal errors: none\nno end"
	if msg, code := run("relay"); msg != relayed || code != 7 {
		t.Errorf("relay: exit %d, stderr %q; want exit 7 and %q", code, msg, relayed)
	}
	// The program's own lines that begin exactly like a report's first
	// line (a model named "panic") are held, then relayed unchanged when
	// the program ends as it does by itself: exit 0, or exit 2 with an
	// "areasweep: " line last.
	for mode, want := range map[string]struct {
		text string
		code int
	}{
		"ownpanic":  {"panic: AUC 0.81 on base\nruntime: 2.1 s\nareasweep: the study is refused\n", 2},
		"ownpanic0": {"panic: AUC 0.81 on base\nfatal error: none\n", 0},
	} {
		if msg, code := run(mode); msg != want.text || code != want.code {
			t.Errorf("%s: exit %d, stderr %q; want exit %d and %q", mode, code, msg, want.code, want.text)
		}
	}
	// A stop signal to the supervisor: the program waits for its
	// occurrences from a pipe nobody writes.
	fifo := filepath.Join(dir, "occ.csv")
	if err := syscall.Mkfifo(fifo, 0o600); err != nil {
		t.Fatal(err)
	}
	s := newSmallStudy(t)
	cmd := start("", "run", "--quiet", "--region", s.region, "--occurrences", fifo, "--model", "m="+s.model, "--out", filepath.Join(dir, "out"))
	var se strings.Builder
	cmd.Stderr = &se
	if err := cmd.Start(); err != nil {
		t.Fatal(err)
	}
	time.Sleep(2 * time.Second) // until it waits on the pipe (it can only wait longer)
	cmd.Process.Signal(syscall.SIGTERM)
	code := exitCode(cmd.Wait())
	if code != 143 || !strings.HasPrefix(se.String(), "areasweep: stopped by SIGTERM") {
		t.Errorf("SIGTERM to the supervisor: exit %d, stderr %q; want 143 and the program's message", code, se.String())
	}
}

// TestOpenFilesFloor: under a hard limit of open files below minOpenFiles
// (sh's ulimit -n sets both limits) the binary stops before Go's runtime
// starts, with exit 2, one line naming the limit and nothing written;
// under 8, Go's runtime crashed at start and under 12 the run blamed
// PROJ's database. A soft limit as low (ulimit -Sn 12) is raised by Go's
// runtime to the hard one, and the run finishes.
func TestOpenFilesFloor(t *testing.T) {
	s := newSmallStudy(t)
	dir := t.TempDir()
	under := func(limit string, out string) (string, int) {
		cmd := exec.Command("sh", "-c", fmt.Sprintf(`ulimit %s && exec "$0" "$@"`, limit), areasweepBin, "run", "--quiet", "--region", s.region, "--occurrences", s.occ, "--model", "m="+s.model, "--out", out, "--iterations", "50")
		var se strings.Builder
		cmd.Stderr = &se
		code := exitCode(cmd.Run())
		return se.String(), code
	}
	for _, n := range []int{8, 12, minOpenFiles - 1} {
		out := filepath.Join(dir, fmt.Sprintf("out%d", n))
		msg, code := under(fmt.Sprintf("-n %d", n), out)
		want := fmt.Sprintf("areasweep: the process may have at most %d files open at once (its hard limit of open files, ulimit -Hn), and areasweep needs at least %d", n, minOpenFiles)
		if code != 2 || !strings.HasPrefix(msg, want) || strings.Count(msg, "\n") != 1 {
			t.Errorf("ulimit -n %d: exit %d, stderr %q; want exit 2 and one line starting %q", n, code, msg, want)
		}
		if _, err := os.Stat(out); !os.IsNotExist(err) {
			t.Errorf("ulimit -n %d: %s exists (%v)", n, out, err)
		}
	}
	if msg, code := under("-Sn 12", filepath.Join(dir, "soft")); code != 0 {
		t.Errorf("ulimit -Sn 12: exit %d, stderr %q; want 0", code, msg)
	}
}
