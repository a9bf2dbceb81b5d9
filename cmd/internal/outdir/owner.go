package outdir

import (
	"bufio"
	"bytes"
	"errors"
	"fmt"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"syscall"
)

// The owner record (OwnerName) inside a staging or set-aside folder says
// whose folder it is, one "key<TAB>value" line each:
//
//	out	/abs/path/of/--out
//	host	the machine's name (os.Hostname)
//	boot	the kernel's boot id (/proc/sys/kernel/random/boot_id), or empty
//	pid	the process id
//	start	the process's start time in clock ticks since boot (/proc/PID/stat, field 22), or empty
//
// It makes the folder provably areasweep's, for that --out: a folder of
// the same name without it (the user's, or left by an areasweep from
// before the record) is never removed. The host, boot id, process id and
// start time tell whether the owner still runs on this machine, process
// ids being reused: alive is true only when all four match a living
// process (on another machine nothing can be asked: the lock on --out is
// the proof there).

// owner is a parsed owner record.
type owner struct {
	out, host, boot, start string
	pid                    int
}

// writeOwner writes this process's owner record into dir, the staging or
// set-aside folder of the --out at the absolute path out.
func writeOwner(dir, out string) error {
	if strings.ContainsAny(out, "\n\r") {
		return errors.New("the path holds a line break")
	}
	host, _ := os.Hostname()
	pid := os.Getpid()
	var b bytes.Buffer
	fmt.Fprintf(&b, "out\t%s\nhost\t%s\nboot\t%s\npid\t%d\nstart\t%s\n", out, host, bootID(), pid, startTime(pid))
	return writeFile(filepath.Join(dir, OwnerName), b.Bytes(), 0o666&^Umask)
}

// writeFile is os.WriteFile; tests replace it to meet a full disk.
var writeFile = os.WriteFile

// readOwner reads the owner record in dir; an error when there is none or
// it does not read as one (then the folder is not provably ours).
func readOwner(dir string) (owner, error) {
	f, err := os.Open(filepath.Join(dir, OwnerName))
	if err != nil {
		return owner{}, err
	}
	defer f.Close()
	var o owner
	sc := bufio.NewScanner(f)
	for sc.Scan() {
		k, v, _ := strings.Cut(sc.Text(), "\t")
		switch k {
		case "out":
			o.out = v
		case "host":
			o.host = v
		case "boot":
			o.boot = v
		case "pid":
			o.pid, _ = strconv.Atoi(v)
		case "start":
			o.start = v
		}
	}
	if err := sc.Err(); err != nil {
		return owner{}, err
	}
	if o.out == "" || o.pid <= 0 {
		return owner{}, errors.New("not an owner record")
	}
	return o, nil
}

// alive reports whether the record's process still runs on this machine:
// the same host and boot, and a process of that id started at the same
// time. A record from another machine is not alive as far as this machine
// can tell.
func (o owner) alive() bool {
	host, _ := os.Hostname()
	if o.host != host || o.boot != bootID() {
		return false
	}
	if err := syscall.Kill(o.pid, 0); errors.Is(err, syscall.ESRCH) {
		return false
	}
	if exited(o.pid) {
		return false
	}
	return o.start == "" || o.start == startTime(o.pid)
}

// exited reports whether process pid has ended but is still listed, a
// zombie its parent has not reaped yet (state Z, or X while it goes;
// /proc/PID/stat, field 3): a run killed by a parent that reruns it
// before waiting for it (a Python script's Popen.kill) left its staging
// folder to a later run.
func exited(pid int) bool {
	b, err := os.ReadFile("/proc/" + strconv.Itoa(pid) + "/stat")
	if err != nil {
		return false
	}
	i := bytes.LastIndexByte(b, ')')
	if i < 0 {
		return false
	}
	f := strings.Fields(string(b[i+1:]))
	return len(f) > 0 && (f[0] == "Z" || f[0] == "X")
}

// bootID is the kernel's boot id, or "" where there is none.
func bootID() string {
	b, err := os.ReadFile("/proc/sys/kernel/random/boot_id")
	if err != nil {
		return ""
	}
	return strings.TrimSpace(string(b))
}

// startTime is the start time of process pid in clock ticks since boot
// (/proc/PID/stat, field 22), or "" when it cannot be read. The command
// name (field 2, in parentheses) may hold spaces, so the fields are
// counted after its closing parenthesis.
func startTime(pid int) string {
	b, err := os.ReadFile("/proc/" + strconv.Itoa(pid) + "/stat")
	if err != nil {
		return ""
	}
	i := bytes.LastIndexByte(b, ')')
	if i < 0 {
		return ""
	}
	f := strings.Fields(string(b[i+1:]))
	// f[0] is field 3 (state), so field 22 is f[19].
	if len(f) < 20 {
		return ""
	}
	return f[19]
}
