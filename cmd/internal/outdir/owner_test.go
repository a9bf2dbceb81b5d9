package outdir

import (
	"os"
	"os/exec"
	"path/filepath"
	"slices"
	"strconv"
	"strings"
	"testing"
	"time"
)

// deadPID is the id of a process that has ended (a `true` run and waited
// for), for owner records of dead runs.
func deadPID(t *testing.T) int {
	t.Helper()
	c := exec.Command("true")
	if err := c.Run(); err != nil {
		t.Fatal(err)
	}
	return c.Process.Pid
}

// TestCleanDeadOnlyProvablyOurs: the next run of an --out removes a
// folder named like its staging or set-aside folders only when the folder
// is provably a dead run's of this --out: it holds an owner record naming
// this --out whose process is not alive on this machine, or it is empty.
// Each case is a folder as a killed run (SIGKILL at a scheduler's time
// limit), a user or another --out would leave it.
func TestCleanDeadOnlyProvablyOurs(t *testing.T) {
	host, _ := os.Hostname()
	dead := deadPID(t)
	me := os.Getpid()
	record := func(out, host, boot string, pid int, start string) string {
		return "out\t" + out + "\nhost\t" + host + "\nboot\t" + boot + "\npid\t" + strconv.Itoa(pid) + "\nstart\t" + start + "\n"
	}
	for _, c := range []struct {
		name    string
		inside  bool   // inside an existing --out, else beside it
		folder  string // its name
		owner   func(out string) string
		empty   bool
		removed bool
	}{
		{"killed run's stage beside a new --out", false, ".res.areasweep-partial-77-1", func(o string) string { return record(o, host, bootID(), dead, "1") }, false, true},
		{"killed run's stage inside --out", true, ".areasweep-partial-77-1", func(o string) string { return record(o, host, bootID(), dead, "1") }, false, true},
		{"killed run's set-aside folder", true, ".areasweep-old-1", func(o string) string { return record(o, host, bootID(), dead, "1") }, false, true},
		{"stage of a run on another machine (the lock proves it dead)", false, ".res.areasweep-partial-77-2", func(o string) string { return record(o, "node-b", "x", me, startTime(me)) }, false, true},
		{"stage from before a reboot", false, ".res.areasweep-partial-77-3", func(o string) string { return record(o, host, "another-boot", me, startTime(me)) }, false, true},
		{"stage whose pid was reused by a living process", false, ".res.areasweep-partial-77-4", func(o string) string { return record(o, host, bootID(), me, "1") }, false, true},
		{"killed before its record was written (empty)", false, ".res.areasweep-partial-77-5", nil, true, true},
		{"stage of a run alive on this machine", false, ".res.areasweep-partial-77-6", func(o string) string { return record(o, host, bootID(), me, startTime(me)) }, false, false},
		{"a user's folder of that name", false, ".res.areasweep-partial-mine", nil, false, false},
		{"an earlier version's stage, no record", false, ".res.partial-456", nil, false, false},
		{"stage of another --out whose name extends this one", false, ".res.areasweep-partial-x.areasweep-partial-77-1", func(o string) string {
			return record(filepath.Join(filepath.Dir(o), "res.areasweep-partial-x"), host, bootID(), dead, "1")
		}, false, false},
		{"a record that does not read as one", false, ".res.areasweep-partial-77-7", func(string) string { return "garbage\n" }, false, false},
	} {
		t.Run(c.name, func(t *testing.T) {
			parent := t.TempDir()
			out := filepath.Join(parent, "res")
			where := parent
			if c.inside {
				where = out
				os.MkdirAll(out, 0o755)
				os.WriteFile(filepath.Join(out, "results.json"), []byte("old"), 0o644)
				earlierRun(t, out, "results.json")
			}
			p := filepath.Join(where, c.folder)
			os.MkdirAll(p, 0o755)
			if !c.empty {
				os.WriteFile(filepath.Join(p, "results.json"), []byte("half"), 0o644)
			}
			if c.owner != nil {
				os.WriteFile(filepath.Join(p, OwnerName), []byte(c.owner(RealPath(out))), 0o644)
			}
			d, err := Open(out, c.inside, nil)
			if err != nil {
				t.Fatal(err)
			}
			defer d.Abort()
			_, err = os.Stat(p)
			if gone := os.IsNotExist(err); gone != c.removed {
				t.Errorf("removed %v, want %v", gone, c.removed)
			}
			if kept := slices.Contains(d.Kept, p); kept == c.removed {
				t.Errorf("Kept %v: listed %v, want %v", d.Kept, kept, !c.removed)
			}
		})
	}
}

// TestStageHoldsOwnerRecord: a run's staging folder holds its owner record
// from the start, and the record never reaches --out (moved onto a new
// --out, or left behind when entries are moved into an existing one).
func TestStageHoldsOwnerRecord(t *testing.T) {
	for _, exists := range []bool{false, true} {
		out := filepath.Join(t.TempDir(), "res")
		if exists {
			os.MkdirAll(out, 0o755)
		}
		d, err := Open(out, false, nil)
		if err != nil {
			t.Fatal(err)
		}
		o, err := readOwner(d.Stage)
		if err != nil || o.out != d.abs || o.pid != os.Getpid() || !o.alive() {
			t.Fatalf("exists=%v: owner record %+v, %v", exists, o, err)
		}
		os.WriteFile(filepath.Join(d.Stage, "results.json"), []byte("new"), 0o644)
		if err := d.Finish(); err != nil {
			t.Fatal(err)
		}
		if _, err := os.Stat(filepath.Join(out, OwnerName)); err == nil {
			t.Errorf("exists=%v: the owner record reached --out", exists)
		}
		if l := leftovers(filepath.Dir(out)); len(l) > 0 {
			t.Errorf("exists=%v: left behind: %v", exists, l)
		}
	}
}

// TestRecordsMovedLast: moving staged results into an existing --out, the
// entries are moved before areasweep's own records (a batch's completion
// marker), so that a run killed while it moves never leaves the marker
// beside half-moved outputs.
func TestRecordsMovedLast(t *testing.T) {
	out := filepath.Join(t.TempDir(), "res")
	os.MkdirAll(filepath.Join(out, "figures"), 0o755)
	os.WriteFile(filepath.Join(out, "results.json"), []byte("old"), 0o644)
	earlierRun(t, out, "figures", "results.json")
	d, err := Open(out, true, nil)
	if err != nil {
		t.Fatal(err)
	}
	for _, n := range []string{".areasweep-done", "results.json", "scores.csv", "run.log"} {
		os.WriteFile(filepath.Join(d.Stage, n), []byte("new"), 0o644)
	}
	os.MkdirAll(filepath.Join(d.Stage, "figures"), 0o755)
	var order []string
	movedHook = func(n string) { order = append(order, n) }
	defer func() { movedHook = nil }()
	if err := d.Finish(); err != nil {
		t.Fatal(err)
	}
	// The record of what runs wrote (recordName) goes in with the marker,
	// after every output.
	if len(order) != 6 || order[4] != ".areasweep-done" || order[5] != recordName || slices.Contains(order, OwnerName) {
		t.Errorf("moved %v; want the marker and the record last and no owner record", order)
	}
	if b, _ := os.ReadFile(filepath.Join(out, ".areasweep-done")); string(b) != "new" {
		t.Error("marker not moved in")
	}
	if strings.Contains(strings.Join(leftovers(filepath.Dir(out)), ","), "areasweep") {
		t.Errorf("left behind: %v", leftovers(filepath.Dir(out)))
	}
}

// TestZombieOwnerNotAlive: the record of a run that was killed but not
// yet reaped by its parent (a zombie, which kill(pid, 0) and
// /proc/PID/stat still find) is not alive, so that a rerun at once
// removes its staging folder. It was kept, and left to a later run
// (found killing `merge` with SIGKILL from a Python script that reran it
// before calling wait).
func TestZombieOwnerNotAlive(t *testing.T) {
	cmd := exec.Command("sleep", "30")
	if err := cmd.Start(); err != nil {
		t.Skip("no sleep command:", err)
	}
	pid := cmd.Process.Pid
	start := startTime(pid)
	host, _ := os.Hostname()
	o := owner{out: "/x", host: host, boot: bootID(), pid: pid, start: start}
	if !o.alive() {
		t.Fatalf("a running process: not alive")
	}
	cmd.Process.Kill()
	for i := 0; i < 200; i++ { // until the kernel has it as a zombie
		if b, _ := os.ReadFile("/proc/" + strconv.Itoa(pid) + "/stat"); strings.Contains(string(b), ") Z ") {
			break
		}
		time.Sleep(10 * time.Millisecond)
	}
	if o.alive() {
		t.Errorf("a killed process not yet reaped (a zombie): alive")
	}
	cmd.Wait()
}
