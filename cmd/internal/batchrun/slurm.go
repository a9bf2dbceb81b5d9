package batchrun

import (
	"context"
	"errors"
	"fmt"
	"io"
	"os"
	"os/exec"
	"path/filepath"
	"regexp"
	"strconv"
	"strings"
	"time"

	"areasweep/cmd/internal/batch"
	"areasweep/cmd/internal/fault"
	"areasweep/cmd/internal/inputs"
	"areasweep/cmd/internal/outdir"
	"areasweep/cmd/internal/pipeline"
	"areasweep/cmd/internal/slurm"
	"areasweep/report"
	"areasweep/report/outfile"
)

// clientsPresent checks, before anything is written, that the SLURM
// commands --submit (sbatch) and --wait (squeue) run are on PATH.
func (o *SlurmOptions) clientsPresent() error {
	var need [][2]string
	if o.Submit {
		need = append(need, [2]string{"--submit", "sbatch"})
	}
	if o.Wait {
		need = append(need, [2]string{"--wait", "squeue"})
	}
	for _, n := range need {
		flag, c := n[0], n[1]
		if _, err := exec.LookPath(c); err != nil {
			return fmt.Errorf("%s: %s is not on PATH, so this machine cannot submit SLURM jobs (on a cluster, run this on a login node, after loading SLURM's module if the site uses modules); "+
				"without --submit, --slurm writes the job files and prints the sbatch commands to run where SLURM is", flag, c)
		}
	}
	return nil
}

var jobNameUnsafe = regexp.MustCompile(`[^A-Za-z0-9_.\-]+`)

// slurmPlan builds the plan of a batch: one task per study (the whole
// study, shard 1/1) running this executable's batch command on that
// study alone, and a merge job writing the summary; memory per task from
// the largest study's estimate, or --memory (refused below that estimate).
func slurmPlan(o *Options, studies []*study) (*slurm.Plan, error) {
	exe, err := os.Executable()
	if err != nil {
		return nil, fmt.Errorf("cannot find the areasweep executable for the job scripts: %w", err)
	}
	table, err := filepath.Abs(o.Table)
	if err != nil {
		return nil, err
	}
	out, err := filepath.Abs(o.Out)
	if err != nil {
		return nil, err
	}
	name := "areasweep-" + jobNameUnsafe.ReplaceAllString(filepath.Base(out), "_")
	if len(name) > 64 {
		name = name[:64]
	}
	p := &slurm.Plan{Name: name, Dir: slurmDir(out), CPUs: o.Slurm.CPUs, TimeLimit: o.Slurm.TimeLimit,
		Partition: o.Slurm.Partition, MaxParallel: o.Slurm.MaxParallel, MergeAfterAny: true, CommandMakesOut: true}
	for _, st := range studies {
		if o.Shards <= 1 {
			p.Tasks = append(p.Tasks, slurm.Task{Study: st.id, Shard: 1, Shards: 1, Out: st.dir})
		} else {
			for k := 1; k <= o.Shards; k++ {
				p.Tasks = append(p.Tasks, slurm.Task{Study: st.id, Shard: k, Shards: o.Shards, Out: shardDir(out, st.id, k)})
			}
		}
	}
	if p.MemoryMB, err = taskMemoryMB(o, studies); err != nil {
		return nil, err
	}
	base := slurm.Quote(exe) + " batch " + slurm.Quote(table) + " --out " + slurm.Quote(out) + " --quiet"
	if o.Force {
		base += " --force"
	}
	p.TaskCommand = base + ` --jobs 1 --only "$AREASWEEP_STUDY"`
	p.MergeCommand = base + " --summary-only"
	if o.Shards > 1 {
		n := strconv.Itoa(o.Shards)
		p.TaskCommand = base + " --jobs 1 --shards " + n + ` --only "$AREASWEEP_STUDY" --shard "$AREASWEEP_SHARD"`
		p.MergeCommand = base + " --shards " + n + " --summary-only"
	}
	return p, nil
}

// taskMemoryMB is the memory each task asks for, in MiB: the largest
// study's estimate with headroom (slurm.MemoryMB), or --memory, which is
// refused below that estimate (a bad input), since each task's own run
// would refuse it.
func taskMemoryMB(o *Options, studies []*study) (int, error) {
	var need int64
	var needs string // the study of the largest need
	for _, st := range studies {
		so := st.opts
		so.Workers = o.Slurm.CPUs
		// A study whose inputs cannot be read still gets its task: it
		// fails there and the summary lists it.
		if n, err := pipeline.Estimate(so); err == nil && n > need {
			need, needs = n, st.id
		}
	}
	if o.Memory <= 0 {
		return slurm.MemoryMB(need), nil
	}
	const mib = 1 << 20
	if o.Memory < need {
		return 0, fault.BadInput(fmt.Errorf("--memory is less than a task needs: study %s needs about %d MiB (its memory estimate, which its run checks), and with --slurm --memory is what each task asks for; give at least %dM, or leave --memory out to ask for the estimate plus headroom (%d MiB); nothing was written or submitted",
			needs, (need+mib-1)/mib, (need+mib-1)/mib, slurm.MemoryMB(need)))
	}
	return int((o.Memory + mib - 1) / mib), nil // sbatch's unit, rounded up
}

// slurmMissing refuses a SLURM plan for a table with a missing input
// file, before anything is written: that study's task would fail, and
// the plan is made again in a moment once the path is fixed.
func slurmMissing(studies []*study) error {
	var missing inputs.BatchErrors
	for _, st := range studies {
		var be *inputs.BatchError
		if errors.As(st.missing, &be) {
			missing = append(missing, be)
		}
	}
	if len(missing) == 0 {
		return nil
	}
	missing = mergeShared(missing) // a shared input missing: once, with its studies
	return fault.BadInput(fmt.Errorf("%w\nnothing was written or submitted: fix the paths (or remove the rows), then run this command again", missing))
}

// runSlurm writes the plan and, with --submit, submits the unfinished
// tasks and the merge job; it prints to w.Out what it wrote and did.
// Before it writes, it refuses while the jobs of the batch's previous
// submission are still queued (queuedBefore); after, it records the new
// jobs (recordSubmitted), and a stop signal's message says that they keep
// running.
func runSlurm(ctx context.Context, o *Options, streams IO, studies []*study) error {
	w := streams.Out
	note := func(string) func() { return func() {} }
	if streams.StopNote != nil {
		note = streams.StopNote
	}
	defer note("the job files written so far are in " + slurmDir(o.Out) + "; nothing was submitted")()
	if err := queuedBefore(ctx, o); err != nil {
		return err
	}
	p, err := slurmPlan(o, studies)
	if err != nil {
		return err
	}
	files, err := p.Write()
	switch {
	case errors.Is(err, slurm.ErrPlan), errors.Is(err, slurm.ErrManifest):
		return fault.Internal(err) // the plan areasweep made is wrong
	case err != nil:
		// An outside failure: a full disk or quota, a folder in the way.
		what := strings.TrimPrefix(err.Error(), "slurm: ") // names the file
		if outdir.DiskFull(err) {
			what += " (free some space on that disk)"
		}
		return fmt.Errorf("writing the SLURM job files into %s failed: %s; nothing was submitted: fix that, then run this command again", slurmDir(o.Out), what)
	}
	pending, stale, err := slurmPending(o, p, studies)
	if err != nil {
		return err
	}
	var staleIDs, unreadableIDs []string
	for _, s := range stale {
		if s.err != nil {
			fmt.Fprintf(w, "not submitted: %s: %s\n", s.st.id, oneLine(fault.UserText(s.err)))
			unreadableIDs = append(unreadableIDs, s.st.id)
			continue
		}
		fmt.Fprintf(w, "not submitted: %s: %s was made %s; add --force to run it again, or %s\n", s.st.id, s.st.dir, s.why.why, s.why.remedy)
		staleIDs = append(staleIDs, s.st.id)
	}
	fmt.Fprintf(w, "job array: %s (%d tasks, %d not finished; %d MiB and %d CPU%s per task)\n", files.Array, len(p.Tasks), len(pending), p.MemoryMB, p.CPUs, report.Plural(p.CPUs))
	fmt.Fprintf(w, "merge job: %s\nmanifest:  %s\nlogs:      %s\n", files.Merge, files.Manifest, files.Logs)
	if !o.Slurm.Submit {
		if len(pending) > 0 {
			fmt.Fprintf(w, "submit with:\n  sbatch --parsable --array=%s %s\n  sbatch --dependency=afterany:<array job id> %s\n(or run this command again with --submit)\n",
				slurm.ArraySpec(pending, p.MaxParallel), slurm.Quote(files.Array), slurm.Quote(files.Merge))
		} else {
			fmt.Fprintf(w, "every task is finished; submit the merge job alone: sbatch %s\n", slurm.Quote(files.Merge))
		}
		return nil
	}
	defer note("the job files are in " + slurmDir(o.Out) + "; a job sbatch accepted before the signal is in the queue (squeue shows it) and runs: see squeue before running this command again")()
	// Each job is recorded as soon as sbatch accepts it: a stop signal
	// ends the process at once, and one arriving while the merge job was
	// submitted lost the array's id (the next --submit then could not
	// see its tasks queued).
	sub, err := (slurm.Submitter{Accepted: func(sub slurm.Submission) { recordSubmitted(o, sub) }}).Submit(ctx, p, files, pending)
	if err != nil {
		return submitFailed(err, sub, files)
	}
	if sub.ArrayJob != "" {
		fmt.Fprintf(w, "submitted array job %s (tasks %s)\n", sub.ArrayJob, slurm.ArraySpec(sub.Tasks, 0))
	}
	fmt.Fprintf(w, "submitted merge job %s; the summary will be %s\n", sub.MergeJob, filepath.Join(o.Out, "summary.html"))
	defer note(keepRunning(o, sub))()
	if !o.Slurm.Wait {
		return nil
	}
	if err := (slurm.Submitter{}).Wait(ctx, time.Second, sub.ArrayJob, sub.MergeJob); err != nil {
		return err
	}
	return waited(o, w, studies, files.Logs, staleIDs, unreadableIDs)
}

// submittedPath is the file that records the jobs of the batch's last
// submission, one id per line.
func submittedPath(out string) string { return filepath.Join(slurmDir(out), "submitted") }

// submittedJobs are the ids of the jobs sub holds: the array's, then the
// merge job's.
func submittedJobs(sub slurm.Submission) []string {
	var ids []string
	for _, j := range []string{sub.ArrayJob, sub.MergeJob} {
		if j != "" {
			ids = append(ids, j)
		}
	}
	return ids
}

// recordSubmitted records the jobs of sub, when sbatch accepted any, so
// that the next --submit can tell whether they are still queued. Best
// effort: without the record that check is not made.
func recordSubmitted(o *Options, sub slurm.Submission) {
	if ids := submittedJobs(sub); len(ids) > 0 {
		outfile.Write(submittedPath(o.Out), []byte(strings.Join(ids, "\n")+"\n"), 0o666)
	}
}

// queuedBefore refuses to submit while a job of the batch's previous
// submission (recordSubmitted) is still in the queue: its unfinished
// tasks would be submitted a second time, to run beside the queued ones
// into the same folders, and a second merge job with them. Without
// --submit it refuses too: the plan's files would be written again, and
// a queued task reads its line of manifest.tsv only when it starts.
// Without a record, or without squeue on PATH to ask, nothing is refused.
func queuedBefore(ctx context.Context, o *Options) error {
	b, err := os.ReadFile(submittedPath(o.Out))
	if err != nil {
		return nil
	}
	var ids []string
	for _, id := range strings.Fields(string(b)) {
		if jobIDRE.MatchString(id) {
			ids = append(ids, id)
		}
	}
	if _, err := exec.LookPath("squeue"); err != nil || len(ids) == 0 {
		return nil
	}
	queued, err := (slurm.Submitter{}).Queued(ctx, ids...)
	if err != nil {
		return fmt.Errorf("cannot tell whether the jobs %s of this batch's previous submission are still queued (%w); nothing was submitted", strings.Join(ids, ", "), err)
	}
	if len(queued) == 0 {
		return nil
	}
	what := "job " + queued[0] + " of this batch's previous submission is"
	if len(queued) > 1 {
		what = "jobs " + strings.Join(queued[:len(queued)-1], ", ") + " and " + queued[len(queued)-1] + " of this batch's previous submission are"
	}
	why := "submitting now would submit the unfinished tasks a second time, to run beside the queued ones"
	if !o.Slurm.Submit {
		why = "writing the job files now would change the manifest the queued tasks read when they start (a row added or removed would send them to other studies)"
	}
	return fault.BadInput(fmt.Errorf("%s still in the SLURM queue (squeue -j %s shows them): %s; wait until they have left the queue, or cancel them (scancel %s), then run this command again; nothing was written or submitted",
		what, strings.Join(queued, ","), why, strings.Join(queued, " ")))
}

var jobIDRE = regexp.MustCompile(`^[0-9]+$`)

// keepRunning is what a stop signal's message says once jobs were
// submitted: they keep running and writing into --out.
func keepRunning(o *Options, sub slurm.Submission) string {
	var named []string
	if sub.ArrayJob != "" {
		named = append(named, "array job "+sub.ArrayJob)
	}
	if sub.MergeJob != "" {
		named = append(named, "merge job "+sub.MergeJob)
	}
	ids := submittedJobs(sub)
	return fmt.Sprintf("the submitted jobs keep running on the cluster (%s: squeue -j %s shows them, scancel %s cancels them) and write into %s; running this command again while they are in the queue is refused",
		strings.Join(named, ", "), strings.Join(ids, ","), strings.Join(ids, " "), o.Out)
}

// submitFailed says what a failed submission left and what to do. When
// the array job went in and the merge job did not, running the command
// again would submit the unfinished tasks a second time beside the
// running ones: the message names the array job and gives the merge job's
// sbatch command instead.
func submitFailed(err error, sub slurm.Submission, files slurm.Files) error {
	if sub.ArrayJob == "" {
		return fmt.Errorf("%w; nothing was submitted (the job files are written): fix what sbatch says, then run this command again", err)
	}
	return fmt.Errorf("%w; the array job %s was submitted (tasks %s) but not the merge job: do not run this command again while it runs (it would submit the unfinished tasks again); fix what sbatch says, then submit the merge job by hand: sbatch --dependency=afterany:%s %s",
		err, sub.ArrayJob, slurm.ArraySpec(sub.Tasks, 0), sub.ArrayJob, slurm.Quote(files.Merge))
}

// waited reports, once the submitted jobs left the queue, the studies that
// did not finish and those not submitted (staleIDs, unreadableIDs) as the
// error, or that every task finished.
func waited(o *Options, w io.Writer, studies []*study, logs string, staleIDs, unreadableIDs []string) error {
	var notDone []string
	for _, st := range studies {
		if s, _, err := st.state(); s == statePending && err == nil {
			notDone = append(notDone, st.id)
		}
	}
	switch {
	case len(notDone) > 0 || len(unreadableIDs) > 0:
		also := ""
		if len(staleIDs) > 0 {
			also = fmt.Sprintf(" (and add --force for %s, made from other settings or inputs or with a damaged completion marker)", strings.Join(staleIDs, ", "))
		}
		if len(unreadableIDs) > 0 {
			also += fmt.Sprintf("; not submitted, each with an input file that cannot be read (named above): %s; make the files readable first",
				strings.Join(unreadableIDs, ", "))
		}
		if len(notDone) == 0 {
			return fmt.Errorf("every submitted task finished; %s", strings.TrimPrefix(also, "; "))
		}
		return fmt.Errorf("%d of %d studies did not finish (%s): see %s and the logs in %s; run the same command again to resubmit only their unfinished tasks%s",
			len(notDone), len(studies), strings.Join(notDone, ", "), filepath.Join(o.Out, "summary.html"), logs, also)
	case len(staleIDs) > 0:
		return fmt.Errorf("%d of %d studies were made from other settings or inputs (or their results changed since, or their completion marker is damaged) and not run again (%s, each named above): add --force to run them again",
			len(staleIDs), len(studies), strings.Join(staleIDs, ", "))
	}
	fmt.Fprintf(w, "every task finished; summary: %s\n", filepath.Join(o.Out, "summary.html"))
	return nil
}

// staleStudy is a finished study made from other settings or inputs,
// or (err set) one whose recorded input files cannot be read to tell.
type staleStudy struct {
	st  *study
	why staleness
	err error
}

// slurmPending lists the array indices (from 1) of the tasks to submit:
// those of studies not finished, except shards already finished. A study
// made from other settings or inputs (its marker records another settings
// checksum, the row changed since, or an input file that was replaced or
// removed since) is submitted only with --force, its marker removed first
// so that the array script does not skip it as finished; without --force
// it is listed in stale instead, in table order. A shard made from other
// settings or inputs runs again (its marker removed), as in a local batch.
func slurmPending(o *Options, p *slurm.Plan, studies []*study) (pending []int, stale []staleStudy, err error) {
	byID := map[string]*study{}
	for _, st := range studies {
		byID[st.id] = st
	}
	isStale := map[string]bool{}
	unmark := func(dir string) error {
		if err := os.Remove(batch.MarkerPath(dir)); err != nil && !errors.Is(err, os.ErrNotExist) {
			return fmt.Errorf("--force: cannot remove the completion marker of %s made from other settings or inputs: %w", dir, err)
		}
		return nil
	}
	for i, t := range p.Tasks {
		st := byID[t.Study]
		switch s, why, err := st.state(); {
		case err != nil:
			// A recorded input that cannot be read: its task would
			// fail on the same check, with or without --force (see
			// forceNote); the study is named and left out.
			if !isStale[st.id] {
				stale = append(stale, staleStudy{st: st, err: forceNote(o, err)})
			}
			isStale[st.id] = true
			continue
		case s == stateDone:
			continue // a study already merged needs none of its shards again
		case s == stateStale && !o.Force:
			if !isStale[st.id] {
				stale = append(stale, staleStudy{st: st, why: why})
			}
			isStale[st.id] = true
			continue
		case s == stateStale:
			if err := unmark(st.dir); err != nil {
				return nil, nil, err
			}
		}
		if t.Shards > 1 {
			// A shard's folder is the batch's own: one made from other
			// settings runs again, as in a local batch.
			switch ss, _, _ := shardState(o, st, t.Shard, t.Shards); ss {
			case stateDone:
				continue
			case stateStale:
				if err := unmark(t.Out); err != nil {
					return nil, nil, err
				}
			}
		}
		if !slurm.Finished(t) {
			pending = append(pending, i+1)
		}
	}
	return pending, stale, nil
}
