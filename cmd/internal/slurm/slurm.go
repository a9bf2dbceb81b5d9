package slurm

import (
	"bufio"
	"bytes"
	"context"
	"errors"
	"fmt"
	"io"
	"os"
	"os/exec"
	"os/user"
	"path/filepath"
	"regexp"
	"strconv"
	"strings"
	"time"

	"areasweep/report/outfile"
)

// MarkerName is the file whose presence in a task's output folder means the
// task finished successfully.
const MarkerName = ".areasweep-done"

// Task is one unit of an array: a study (or one shard of it) and the folder
// its outputs go to.
type Task struct {
	// Study is the study id.
	Study string
	// Shard and Shards give the share I/N of the study's raster blocks;
	// 1/1 is the whole study.
	Shard, Shards int
	// Out is the task's output folder (absolute, so that it does not depend
	// on the job's working directory).
	Out string
}

// Sentinel errors, wrapped with details.
var (
	// ErrManifest: a manifest line or a task is malformed.
	ErrManifest = errors.New("slurm: bad task manifest")
	// ErrPlan: the plan is incomplete or inconsistent.
	ErrPlan = errors.New("slurm: bad job plan")
	// ErrSubmit: sbatch failed or printed no job id.
	ErrSubmit = errors.New("slurm: submission failed")
)

func (t Task) check() error {
	switch {
	case t.Study == "" || strings.ContainsAny(t.Study, "\t\r\n"):
		return fmt.Errorf("study id %q is empty or holds a tab or line break", t.Study)
	case t.Shards < 1 || t.Shard < 1 || t.Shard > t.Shards:
		return fmt.Errorf("shard %d/%d: want 1 <= I <= N", t.Shard, t.Shards)
	case !filepath.IsAbs(t.Out) || strings.ContainsAny(t.Out, "\t\r\n"):
		return fmt.Errorf("output folder %q is not absolute or holds a tab or line break", t.Out)
	}
	return nil
}

const manifestHeader = "study\tshard\tout"

// WriteManifest writes tasks as a manifest (see the package comment).
func WriteManifest(w io.Writer, tasks []Task) error {
	bw := bufio.NewWriter(w)
	fmt.Fprintln(bw, manifestHeader)
	for i, t := range tasks {
		if err := t.check(); err != nil {
			return fmt.Errorf("%w: task %d: %w", ErrManifest, i+1, err)
		}
		fmt.Fprintf(bw, "%s\t%d/%d\t%s\n", t.Study, t.Shard, t.Shards, t.Out)
	}
	return bw.Flush()
}

// ReadManifest reads a manifest written by WriteManifest; name is used in
// messages ("FILE line N: ...").
func ReadManifest(r io.Reader, name string) ([]Task, error) {
	sc := bufio.NewScanner(r)
	sc.Buffer(nil, 1<<20)
	var tasks []Task
	line := 0
	for sc.Scan() {
		line++
		text := sc.Text()
		if line == 1 {
			if text != manifestHeader {
				return nil, fmt.Errorf("%w: %s line 1: header is %q, want %q", ErrManifest, name, text, manifestHeader)
			}
			continue
		}
		f := strings.Split(text, "\t")
		if len(f) != 3 {
			return nil, fmt.Errorf("%w: %s line %d: %d fields, want 3 (study, shard, out) separated by tabs", ErrManifest, name, line, len(f))
		}
		i, n, ok := parseShard(f[1])
		if !ok {
			return nil, fmt.Errorf("%w: %s line %d: shard %q is not I/N", ErrManifest, name, line, f[1])
		}
		t := Task{Study: f[0], Shard: i, Shards: n, Out: f[2]}
		if err := t.check(); err != nil {
			return nil, fmt.Errorf("%w: %s line %d: %w", ErrManifest, name, line, err)
		}
		tasks = append(tasks, t)
	}
	if err := sc.Err(); err != nil {
		return nil, fmt.Errorf("%w: %s: %w", ErrManifest, name, err)
	}
	if line == 0 {
		return nil, fmt.Errorf("%w: %s is empty", ErrManifest, name)
	}
	return tasks, nil
}

func parseShard(s string) (i, n int, ok bool) {
	a, b, found := strings.Cut(s, "/")
	if !found {
		return 0, 0, false
	}
	i, err1 := strconv.Atoi(a)
	n, err2 := strconv.Atoi(b)
	return i, n, err1 == nil && err2 == nil && strconv.Itoa(i) == a && strconv.Itoa(n) == b
}

// Plan describes one batch on the scheduler: the tasks, the command each
// runs, the merge command and the resources.
type Plan struct {
	// Name is the job name (1 to 64 letters, digits, '_', '-', '.').
	Name string
	// Dir is the folder for the manifest, the scripts and the job logs
	// (absolute).
	Dir string
	// Tasks are the array's tasks; task k is array index k (from 1).
	Tasks []Task
	// TaskCommand is a shell command run for each task, with the task in
	// the environment: AREASWEEP_STUDY, AREASWEEP_SHARD (I), AREASWEEP_SHARDS
	// (N) and AREASWEEP_OUT (the output folder, created before the command
	// runs unless CommandMakesOut). A task counts as finished when it
	// exits with status 0.
	TaskCommand string
	// CommandMakesOut: the task command creates its output folder itself,
	// so the script does not make it first. areasweep does, moving its
	// staged outputs (and its marker) onto a new folder in one rename: a
	// task killed at any moment leaves no folder or a finished one, never
	// a folder holding part of them.
	CommandMakesOut bool
	// MergeCommand is a shell command run once after every task succeeded,
	// with AREASWEEP_MANIFEST set to the manifest's path. Empty: no merge
	// job.
	MergeCommand string
	// MemoryMB is the memory per task in MiB (see MemoryMB).
	MemoryMB int
	// CPUs is the number of CPUs per task (at least 1).
	CPUs int
	// TimeLimit is passed to --time when not empty (for example "02:00:00").
	TimeLimit string
	// Partition is passed to --partition when not empty.
	Partition string
	// MaxParallel limits how many array tasks run at once (0: no limit).
	MaxParallel int
	// MergeAfterAny starts the merge job once every task has ended, failed
	// or not (--dependency=afterany), for a merge that reports the tasks
	// that failed; by default it starts only when every task succeeded
	// (afterok).
	MergeAfterAny bool
}

var jobNameRE = regexp.MustCompile(`^[A-Za-z0-9_.\-]{1,64}$`)

// timeRE holds sbatch's forms of a time limit: minutes, minutes:seconds,
// hours:minutes:seconds, days-hours, days-hours:minutes,
// days-hours:minutes:seconds, and UNLIMITED or INFINITE.
var timeRE = regexp.MustCompile(`^([0-9]{1,9}(:[0-9]{1,2}){0,2}|[0-9]{1,6}-[0-9]{1,2}(:[0-9]{1,2}){0,2}|(?i:unlimited|infinite))$`)

// partitionRE is a partition, or a list of them separated by commas
// (sbatch runs the job on the first that can take it).
var partitionRE = regexp.MustCompile(`^[A-Za-z0-9_.\-]+(,[A-Za-z0-9_.\-]+)*$`)

// CheckTime refuses a time limit sbatch's --time does not take.
func CheckTime(s string) error {
	if !timeRE.MatchString(s) {
		return fmt.Errorf("write a time limit as sbatch takes it: minutes (90), hours:minutes:seconds (02:00:00), days-hours:minutes:seconds (1-12:00:00) or UNLIMITED")
	}
	return nil
}

// CheckPartition refuses a partition sbatch's --partition does not take:
// a name of letters, digits, '_', '-' and '.', or several separated by
// commas.
func CheckPartition(s string) error {
	if len(s) > 1024 || !partitionRE.MatchString(s) {
		return fmt.Errorf("write a partition name (letters, digits, '_', '-' or '.'), or several separated by commas (gpu,cpu)")
	}
	return nil
}

// MemoryMB turns a memory estimate in bytes into the --mem figure of one
// task: the estimate plus a quarter plus 256 MiB for the program itself,
// rounded up to whole MiB. The headroom is our own choice: the estimate
// counts the large buffers, not the runtime's and the libraries' overhead.
func MemoryMB(estimateBytes int64) int {
	const mib = 1 << 20
	if estimateBytes < 0 {
		estimateBytes = 0
	}
	need := estimateBytes + estimateBytes/4 + 256*mib
	return int((need + mib - 1) / mib)
}

func (p *Plan) check() error {
	bad := func(format string, a ...any) error { return fmt.Errorf("%w: "+format, append([]any{ErrPlan}, a...)...) }
	switch {
	case !jobNameRE.MatchString(p.Name):
		return bad("job name %q: use 1 to 64 letters, digits, '_', '-' or '.'", p.Name)
	case !filepath.IsAbs(p.Dir):
		return bad("folder %q must be absolute", p.Dir)
	case strings.ContainsAny(p.Dir, "\\\t\n\r"):
		return bad("folder %q holds a backslash, a tab or a line break, which a job's log path cannot hold (sbatch drops a backslash, and ends a #SBATCH line at a line break)", p.Dir)
	case len(p.Tasks) == 0:
		return bad("no tasks")
	case strings.TrimSpace(p.TaskCommand) == "":
		return bad("no task command")
	case p.MemoryMB < 1:
		return bad("memory per task is %d MiB; give the estimate through MemoryMB", p.MemoryMB)
	case p.CPUs < 1:
		return bad("CPUs per task is %d, want at least 1", p.CPUs)
	case p.TimeLimit != "" && CheckTime(p.TimeLimit) != nil:
		return bad("time limit %q: %v", p.TimeLimit, CheckTime(p.TimeLimit))
	case p.Partition != "" && CheckPartition(p.Partition) != nil:
		return bad("partition %q: %v", p.Partition, CheckPartition(p.Partition))
	case p.MaxParallel < 0:
		return bad("at most %d tasks at once: want 0 (no limit) or more", p.MaxParallel)
	}
	seen := map[string]int{}
	for i, t := range p.Tasks {
		if err := t.check(); err != nil {
			return bad("task %d: %v", i+1, err)
		}
		if j, dup := seen[filepath.Clean(t.Out)]; dup {
			return bad("tasks %d and %d write to the same folder %s", j, i+1, t.Out)
		}
		seen[filepath.Clean(t.Out)] = i + 1
	}
	return nil
}

// Files are the paths Plan.Write wrote.
type Files struct {
	Manifest, Array, Merge string // Merge is "" without a merge command
	Logs                   string
}

// Write writes manifest.tsv, array.sh and (with a merge command) merge.sh
// into p.Dir, each atomically (temporary file, then rename), and creates
// p.Dir/logs. It overwrites only those files, so writing the same plan
// again is harmless.
func (p *Plan) Write() (Files, error) {
	if err := p.check(); err != nil {
		return Files{}, err
	}
	f := Files{
		Manifest: filepath.Join(p.Dir, "manifest.tsv"),
		Array:    filepath.Join(p.Dir, "array.sh"),
		Logs:     filepath.Join(p.Dir, "logs"),
	}
	if err := os.MkdirAll(f.Logs, 0o777); err != nil {
		return Files{}, fmt.Errorf("slurm: creating the job folder: %w", err)
	}
	var m bytes.Buffer
	if err := WriteManifest(&m, p.Tasks); err != nil {
		return Files{}, err
	}
	if err := writeAtomic(f.Manifest, m.Bytes(), 0o666); err != nil {
		return Files{}, err
	}
	if err := writeAtomic(f.Array, []byte(p.arrayScript(f)), 0o777); err != nil {
		return Files{}, err
	}
	if p.MergeCommand != "" {
		f.Merge = filepath.Join(p.Dir, "merge.sh")
		if err := writeAtomic(f.Merge, []byte(p.mergeScript(f)), 0o777); err != nil {
			return Files{}, err
		}
	}
	return f, nil
}

// writeAtomic writes one of the plan's files whole or not at all (package
// outfile), with the package prefix on its error.
func writeAtomic(path string, data []byte, mode os.FileMode) error {
	if err := outfile.Write(path, data, mode); err != nil {
		return fmt.Errorf("slurm: %w", err)
	}
	return nil
}

// logPattern is the value of a #SBATCH --output line for the log file
// pattern file (task-%a.log) in folder dir, in sbatch's own quoting:
// sbatch reads a #SBATCH line itself, not through a shell, and splits it
// at blanks, takes double and single quotes as quotes and an unquoted '#' as the
// start of a comment, so a folder "SDM runs" made the submission fail
// ("Invalid directive found in batch script: runs/..."). Each run of
// characters without '"' goes in double quotes and each '"' in single
// quotes (quoted parts next to each other join, as in a shell). sbatch
// then reads %a, %j ... in the whole path as its file name symbols, so a
// '%' of the folder is written %%. A backslash cannot be written (sbatch
// drops it): Plan.check refuses a folder holding one.
func logPattern(dir, file string) string {
	path := strings.ReplaceAll(dir, "%", "%%") + "/" + file
	var b strings.Builder
	for i, part := range strings.Split(path, `"`) {
		if i > 0 {
			b.WriteString(`'"'`)
		}
		if part != "" {
			b.WriteString(`"` + part + `"`)
		}
	}
	return b.String()
}

// Quote returns s quoted for a POSIX shell.
func Quote(s string) string { return "'" + strings.ReplaceAll(s, "'", `'\''`) + "'" }

func (p *Plan) resources(b *strings.Builder) {
	fmt.Fprintf(b, "#SBATCH --mem=%dM\n", p.MemoryMB)
	fmt.Fprintf(b, "#SBATCH --cpus-per-task=%d\n", p.CPUs)
	fmt.Fprintf(b, "#SBATCH --ntasks=1\n")
	if p.TimeLimit != "" {
		fmt.Fprintf(b, "#SBATCH --time=%s\n", p.TimeLimit)
	}
	if p.Partition != "" {
		fmt.Fprintf(b, "#SBATCH --partition=%s\n", p.Partition)
	}
}

// arrayScript is the job script of the array. The array range is given on
// the sbatch command line (Submit), so the same script serves a first
// submission and a resubmission of the unfinished tasks.
func (p *Plan) arrayScript(f Files) string {
	var b strings.Builder
	b.WriteString("#!/bin/bash\n")
	fmt.Fprintf(&b, "#SBATCH --job-name=%s\n", p.Name)
	fmt.Fprintf(&b, "#SBATCH --output=%s\n", logPattern(f.Logs, "task-%a.log"))
	p.resources(&b)
	b.WriteString(`# Written by areasweep. One array task runs line $SLURM_ARRAY_TASK_ID of the
# manifest; it is skipped when its output folder holds the marker, which is
# written last and atomically, only after the command succeeded (keeping the
# lines of a marker the command wrote itself).
set -euo pipefail
`)
	fmt.Fprintf(&b, "manifest=%s\n", Quote(f.Manifest))
	fmt.Fprintf(&b, "marker=%s\n", Quote(MarkerName))
	b.WriteString(`k="${SLURM_ARRAY_TASK_ID:?run this script with sbatch --array}"
line="$(awk -v k="$k" 'NR == k + 1 { print; found = 1 } END { exit !found }' "$manifest")" ||
  { echo "areasweep task $k: no line $k in $manifest" >&2; exit 2; }
IFS=$'\t' read -r study shard out <<<"$line"
if [ -f "$out/$marker" ]; then
  echo "areasweep task $k ($study $shard): already finished, skipped"
  exit 0
fi
created=0
`)
	if p.CommandMakesOut {
		b.WriteString(`# The command makes the output folder itself (with its outputs, in one rename).
[ -d "$out" ] || created=1
`)
	} else {
		b.WriteString(`[ -d "$out" ] || { mkdir -p "$out"; created=1; }
`)
	}
	b.WriteString(`export AREASWEEP_STUDY="$study" AREASWEEP_SHARD="${shard%/*}" AREASWEEP_SHARDS="${shard#*/}" AREASWEEP_OUT="$out"
echo "areasweep task $k ($study $shard): started on $(hostname) at $(date -u +%FT%TZ)"
set +e
(
`)
	b.WriteString(p.TaskCommand)
	b.WriteString(`
)
rc=$?
set -e
if [ "$rc" -ne 0 ]; then
  # A failed task leaves no folder it made and found empty.
  [ "$created" = 0 ] || rmdir "$out" 2>/dev/null || true
  echo "areasweep task $k ($study $shard): failed with status $rc"
  exit "$rc"
fi
tmp="$(mktemp "$out/.$marker.XXXXXX")"
{
  # A marker the command wrote itself (areasweep's, with its settings
  # checksum) is kept; the task adds when and by which job.
  if [ -f "$out/$marker" ]; then
    grep -v -e '^finished'$'\t' -e '^job'$'\t' "$out/$marker" || true
  else
    printf 'study\t%s\nshard\t%s\n' "$study" "$shard"
  fi
  printf 'finished\t%s\njob\t%s_%s\n' "$(date -u +%FT%TZ)" "${SLURM_ARRAY_JOB_ID:-}" "$k"
} >"$tmp"
sync "$tmp" 2>/dev/null || true
mv -f "$tmp" "$out/$marker"
echo "areasweep task $k ($study $shard): finished"
`)
	return b.String()
}

func (p *Plan) mergeScript(f Files) string {
	var b strings.Builder
	b.WriteString("#!/bin/bash\n")
	fmt.Fprintf(&b, "#SBATCH --job-name=%s-merge\n", p.Name)
	fmt.Fprintf(&b, "#SBATCH --output=%s\n", logPattern(f.Logs, "merge-%j.log"))
	p.resources(&b)
	if p.MergeAfterAny {
		b.WriteString("# Written by areasweep. Runs after every array task ended, failed or not (afterany).\nset -euo pipefail\n")
	} else {
		b.WriteString("# Written by areasweep. Runs after every array task succeeded (afterok).\nset -euo pipefail\n")
	}
	fmt.Fprintf(&b, "export AREASWEEP_MANIFEST=%s\n", Quote(f.Manifest))
	b.WriteString(p.MergeCommand)
	b.WriteString("\n")
	return b.String()
}

// Finished reports whether the task's output folder holds the marker.
func Finished(t Task) bool {
	fi, err := os.Stat(filepath.Join(t.Out, MarkerName))
	return err == nil && fi.Mode().IsRegular()
}

// Pending returns the array indices (from 1) of the tasks not finished.
func (p *Plan) Pending() []int {
	var out []int
	for i, t := range p.Tasks {
		if !Finished(t) {
			out = append(out, i+1)
		}
	}
	return out
}

// ArraySpec writes ascending indices as an --array list of ranges, for
// example [1 2 3 5 7 8] as "1-3,5,7-8"; max > 0 appends "%max" (at most
// that many tasks at once).
func ArraySpec(ids []int, max int) string {
	var parts []string
	for i := 0; i < len(ids); {
		j := i
		for j+1 < len(ids) && ids[j+1] == ids[j]+1 {
			j++
		}
		if j == i {
			parts = append(parts, strconv.Itoa(ids[i]))
		} else {
			parts = append(parts, fmt.Sprintf("%d-%d", ids[i], ids[j]))
		}
		i = j + 1
	}
	s := strings.Join(parts, ",")
	if max > 0 && s != "" {
		s += "%" + strconv.Itoa(max)
	}
	return s
}

// Submission is what Submit started. MergeJob is "" when there was no merge
// job; ArrayJob is "" when no task was pending.
type Submission struct {
	ArrayJob, MergeJob string
	// Tasks are the array indices submitted.
	Tasks []int
}

// Submitter runs sbatch. Env, when not nil, replaces the environment of
// the commands (for example to set SLURM_CONF).
type Submitter struct {
	Env []string
	// Accepted, when not nil, is called by Submit with the submission so
	// far each time sbatch accepts a job (the array's, then the merge
	// job's), before the next sbatch runs: a caller records the array's
	// id there, so that a stop signal while the merge job is submitted
	// does not lose it.
	Accepted func(Submission)
}

// Submit submits the array for the given task indices (normally
// p.Pending()) and, when files has a merge script, the merge job with
// --dependency=afterok on the array. With no index given it submits the
// merge job alone (every task is finished), without a dependency.
func (s Submitter) Submit(ctx context.Context, p *Plan, f Files, ids []int) (Submission, error) {
	sub := Submission{Tasks: ids}
	if len(ids) > 0 {
		jid, err := s.sbatch(ctx, "--array="+ArraySpec(ids, p.MaxParallel), f.Array)
		if err != nil {
			return sub, err
		}
		sub.ArrayJob = jid
		if s.Accepted != nil {
			s.Accepted(sub)
		}
	}
	if f.Merge != "" {
		args := []string{f.Merge}
		if sub.ArrayJob != "" {
			dep := "afterok"
			if p.MergeAfterAny {
				dep = "afterany"
			}
			args = []string{"--dependency=" + dep + ":" + sub.ArrayJob, "--kill-on-invalid-dep=yes", f.Merge}
		}
		jid, err := s.sbatch(ctx, args...)
		if err != nil {
			return sub, err
		}
		sub.MergeJob = jid
		if s.Accepted != nil {
			s.Accepted(sub)
		}
	}
	return sub, nil
}

var jobIDRE = regexp.MustCompile(`^[0-9]+$`)

// sbatch runs "sbatch --parsable ARGS" and returns the job id.
func (s Submitter) sbatch(ctx context.Context, args ...string) (string, error) {
	cmd := exec.CommandContext(ctx, "sbatch", append([]string{"--parsable"}, args...)...)
	cmd.Env = s.Env
	var stderr bytes.Buffer
	cmd.Stderr = &stderr
	out, err := cmd.Output()
	if err != nil {
		msg := strings.TrimSpace(stderr.String())
		if msg == "" {
			msg = err.Error()
		}
		return "", fmt.Errorf("%w: sbatch --parsable %s: %s", ErrSubmit, strings.Join(args, " "), msg)
	}
	// --parsable prints "JID" or "JID;CLUSTER".
	id, _, _ := strings.Cut(strings.TrimSpace(string(out)), ";")
	if !jobIDRE.MatchString(id) {
		return "", fmt.Errorf("%w: sbatch printed %q, not a job id", ErrSubmit, strings.TrimSpace(string(out)))
	}
	return id, nil
}

// Wait polls squeue every interval until none of the jobs is queued or
// running any more, or ctx ends. It does not say whether the jobs
// succeeded: look at the markers (Pending) and the logs.
func (s Submitter) Wait(ctx context.Context, interval time.Duration, jobs ...string) error {
	var ids []string
	for _, j := range jobs {
		if j != "" {
			ids = append(ids, j)
		}
	}
	if len(ids) == 0 {
		return nil
	}
	for {
		queued, err := s.Queued(ctx, ids...)
		switch {
		case err == nil && len(queued) == 0:
			return nil
		case err != nil && !isExit(err) && ctx.Err() == nil:
			return err // squeue cannot run; one that answered with a complaint is asked again
		}
		select {
		case <-ctx.Done():
			return fmt.Errorf("slurm: waiting for jobs %s: %w", strings.Join(ids, ","), ctx.Err())
		case <-time.After(interval):
		}
	}
}

// Queued returns the jobs of jobs (ids as sbatch gave them) that squeue
// still lists, pending, running or completing: an array job counts while
// any of its tasks is listed ("101_[2-3]", "101_4"). squeue's refusal of
// an id the controller no longer knows ("Invalid job id") means that the
// job left the queue; a squeue that exits with another complaint (the
// controller cannot be reached) gives an error wrapping its
// *exec.ExitError, with what it said, as does one that cannot run.
func (s Submitter) Queued(ctx context.Context, jobs ...string) ([]string, error) {
	if len(jobs) == 0 {
		return nil, nil
	}
	args := []string{"-h", "-o", "%i", "-j", strings.Join(jobs, ",")}
	if u, err := user.Current(); err == nil && u.Username != "" {
		args = append(args, "-u", u.Username) // this user's: an id may come round again for another's
	}
	cmd := exec.CommandContext(ctx, "squeue", args...)
	cmd.Env = s.Env
	var stderr bytes.Buffer
	cmd.Stderr = &stderr
	out, err := cmd.Output()
	switch {
	case err != nil && isExit(err) && strings.Contains(stderr.String(), "Invalid job id"):
		return nil, nil
	case err != nil && isExit(err):
		msg := strings.TrimSpace(stderr.String())
		if msg == "" {
			msg = "no message"
		}
		return nil, fmt.Errorf("slurm: squeue -j %s: %s (%w)", strings.Join(jobs, ","), msg, err)
	case err != nil:
		return nil, fmt.Errorf("slurm: running squeue: %w", err)
	}
	listed := map[string]bool{}
	for _, line := range strings.Fields(string(out)) {
		id, _, _ := strings.Cut(line, "_")
		listed[id] = true
	}
	var queued []string
	for _, j := range jobs {
		if listed[j] {
			queued = append(queued, j)
		}
	}
	return queued, nil
}

func isExit(err error) bool {
	var ee *exec.ExitError
	return errors.As(err, &ee)
}
