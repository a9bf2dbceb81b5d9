package batchrun

import (
	"context"
	"errors"
	"fmt"
	"io/fs"
	"os"
	"path/filepath"
	"strings"

	"areasweep/cmd/internal/batch"
	"areasweep/cmd/internal/fault"
	"areasweep/cmd/internal/inputs"
	"areasweep/cmd/internal/outdir"
	"areasweep/cmd/internal/slurm"
	"areasweep/extent"
	"areasweep/report"
	"areasweep/report/outfile"
)

// Run runs the batch: resolve the table, run what is not done, summarise;
// with o.Slurm.Enabled it writes (and with Submit submits) the SLURM plan
// instead. Its error is classed for the exit status (package fault): a bad
// table or --out, nothing ran; a failed study; an internal error.
func Run(ctx context.Context, o *Options, w IO) error {
	// Until the studies start (runLocal and runSlurm set their own note), a
	// stop signal leaves no study's file: the command's default note spoke
	// of a run's partial results.
	if w.StopNote != nil {
		defer w.StopNote(StartingNote)()
	}
	if err := preflight(o); err != nil {
		return err
	}
	studies, err := resolve(o)
	if err != nil {
		return fault.BadInput(err)
	}
	if o.Slurm.Enabled {
		if err := slurmMissing(studies); err != nil {
			return err
		}
		if o.Memory > 0 { // refused before anything is written
			if _, err := taskMemoryMB(o, studies); err != nil {
				return err
			}
		}
	}
	if err := o.Slurm.clientsPresent(); err != nil {
		return fault.BadInput(err)
	}
	if err := claimDir(o.Out); err != nil {
		return err
	}
	if o.Slurm.Enabled {
		return runSlurm(ctx, o, w, studies)
	}
	return runLocal(ctx, o, w, studies)
}

// preflight refuses, once and before the table is read, what would fail
// every study: a umask that takes the owner's own permissions, a GDAL or
// PROJ the environment left unable to run (not needed to write a summary
// or a SLURM plan), and a temporary folder the studies' figures and the
// summary's cannot use (exit 1, as for run).
func preflight(o *Options) error {
	if err := outdir.CheckUmask(); err != nil {
		return err
	}
	if err := outdir.TildeError("--out", o.Out); err != nil {
		return err
	}
	if err := outPathError(o); err != nil {
		return fault.BadInput(err)
	}
	if !o.SummaryOnly && !o.Slurm.Enabled {
		if err := extent.CheckSetup(); err != nil {
			return fault.BadInput(err)
		}
	}
	if !o.Slurm.Enabled {
		if err := report.CheckTempDir(); err != nil {
			return fmt.Errorf("%w; no study ran", err)
		}
	}
	return nil
}

// outPathError refuses an --out that no study folder could be made in,
// before anything is made: a path holding a line break (run refuses it
// as each study's --out, so every study failed after --out was made and
// the summary was written there), and with --slurm one holding a tab (the
// manifest's separator) or a backslash, which sbatch drops from the job
// logs' path (slurm.Plan refuses both); with --slurm also a study table
// read from a pipe, which the array tasks could not read again.
func outPathError(o *Options) error {
	abs, err := filepath.Abs(o.Out)
	if err != nil {
		abs = o.Out
	}
	if strings.ContainsAny(abs, "\n\r") {
		return outdir.LineBreakError("--out", o.Out, abs)
	}
	if abs == filepath.Dir(abs) {
		// Refused as run refuses it; the table check said each input
		// "lies in /tmp, which this batch writes (--out /)".
		return fmt.Errorf("--out %s is the root folder; name a folder for the batch's study folders and summary", o.Out)
	}
	if o.Slurm.Enabled && inputs.StreamPath(o.Table) {
		return fmt.Errorf("the study table %s is a pipe or standard input; with --slurm each array task reads the table again by its path: save it to a file and name that", o.Table)
	}
	if o.Slurm.Enabled && strings.ContainsAny(abs, "\t\\") {
		return fmt.Errorf("--out %s: with --slurm its path cannot hold a tab or a backslash (the task manifest separates its fields with tabs, and sbatch drops a backslash from the job logs' path); choose a folder whose path has neither", o.Out)
	}
	return nil
}

// runLocal runs the studies on this machine, records each study's
// failure, writes the summary (not with --only) and returns the failed
// studies as one error.
func runLocal(ctx context.Context, o *Options, w IO, studies []*study) error {
	note := "the running studies' partial results were removed; the studies that had finished keep their folders, and running the same command again runs the others"
	if w.StopNote != nil {
		defer w.StopNote(note)()
	}
	p := &progress{quiet: o.Quiet, w: w.ErrOut}
	errs := runStudies(ctx, o, studies, p)
	// Another batch on the same --out (or a scheduler task) may have
	// finished a study that failed here (its folder was in use, or already
	// held its outputs): the summary and the exit status go by the
	// folders as they are now.
	for i, st := range studies {
		if errs[i] != nil {
			if s, _, _ := st.state(); s == stateDone {
				p.line(st.id, "finished by another run meanwhile")
				errs[i] = nil
			}
		}
	}
	if !o.SummaryOnly || o.Shards > 1 {
		for i, st := range studies {
			recordFailure(o.Out, st.id, o.Shard, errs[i])
		}
	}
	countFailed := func() int {
		n := 0
		for _, err := range errs {
			if err != nil {
				n++
			}
		}
		return n
	}
	if len(o.Only) == 0 {
		answer, err := writeSummary(o, studies, errs)
		if err != nil {
			if failed := countFailed(); failed > 0 && !fault.IsInternal(err) {
				// The studies that failed are named all the same.
				return fault.Shown(fmt.Errorf("%s; and %s", fault.UserText(err), fault.UserText(failedStudies(o, studies, errs, failed, false))))
			}
			return err
		}
		if !o.Quiet {
			// The summary's count sentence, as a run ends on its
			// headline.
			fmt.Fprintf(w.ErrOut, "answer: %s\n", answer)
		}
		fmt.Fprintf(w.Out, "summary: %s\n", filepath.Join(o.Out, report.SummaryHTML))
	}
	if failed := countFailed(); failed > 0 { // writeSummary may add a damaged results.json
		return failedStudies(o, studies, errs, failed, len(o.Only) == 0)
	}
	return nil
}

// StartingNote is what a stop signal's message says while the batch reads
// its table and checks its studies, before any study starts.
const StartingNote = "no study had started (the batch was reading its table and checking the studies), so no study's file was written; --out holds at most the batch's own folder " + OwnDir + ", and running the same command again starts afresh"

// claimDir creates --out or checks that it is empty or a batch's folder,
// and marks it as one.
func claimDir(out string) error {
	ents, err := os.ReadDir(out)
	switch {
	case errors.Is(err, os.ErrNotExist):
		if err := os.MkdirAll(out, 0o777); err != nil {
			return cannotCreate(out, out, err)
		}
	case err != nil:
		if st, serr := os.Stat(out); serr == nil && !st.IsDir() {
			return fault.BadInput(fmt.Errorf("--out %s exists and is not a directory; name a folder for the studies", out))
		}
		return fault.BadInput(fmt.Errorf("--out %s cannot be read (%w); choose a folder you can read and write", out, outdir.Cause(err)))
	case len(ents) > 0:
		if _, err := os.Stat(filepath.Join(out, OwnDir)); err != nil {
			return fault.BadInput(fmt.Errorf("--out %s exists and is not a batch's folder (no %s in it); choose a new or empty folder", out, OwnDir))
		}
	}
	if err := os.MkdirAll(filepath.Join(out, OwnDir), 0o777); err != nil {
		return cannotCreate(out, filepath.Join(out, OwnDir), err)
	}
	return nil
}

// cannotCreate words a failure to create the batch's folder what in --out
// out, before any study ran: a full disk says to free space (exit 1);
// anything else (a read-only disk, a folder of another user) refuses
// --out (exit 2), as run does.
func cannotCreate(out, what string, err error) error {
	if outdir.DiskFull(err) {
		return fmt.Errorf("--out %s: cannot create %s (%v): free some space on that disk, or give --out a folder on another one; no study ran", out, what, outdir.Cause(err))
	}
	return fault.BadInput(fmt.Errorf("--out %s: cannot create %s (%v); choose a folder you can write to", out, what, outdir.Cause(err)))
}

// recordFailure keeps err as the study's last error, or removes the
// record when err is nil. Best effort: the summary names the study as
// unfinished without it.
func recordFailure(out, id string, k int, err error) {
	p := failurePath(out, id, k)
	if err == nil {
		os.Remove(p)
		return
	}
	if os.MkdirAll(filepath.Dir(p), 0o777) == nil {
		outfile.Write(p, []byte(oneLine(fault.UserText(err))+"\n"), 0o666)
	}
}

// readFailure is the error of a study that did not finish (k = 0) or of
// its shard k that did not: the one its run recorded, else a note that
// it did not finish.
func readFailure(out string, st *study, k int) error {
	if b, err := os.ReadFile(failurePath(out, st.id, k)); err == nil && len(b) > 0 {
		return errors.New(strings.TrimSpace(string(b)))
	}
	dir, what := st.dir, "not finished"
	if k > 0 {
		dir, what = shardDir(out, st.id, k), fmt.Sprintf("shard %d not finished", k)
	}
	if _, err := os.Stat(dir); errors.Is(err, fs.ErrNotExist) {
		// Never run (--summary-only on a batch that did not run it, a
		// scheduler task that has not started) or stopped before its
		// outputs moved in: no folder, and often no job log to see.
		return fmt.Errorf("%s: %s does not exist (it has not run, or was stopped before its outputs were in place); run the batch command without --summary-only, or with --slurm wait for its job, then write the summary again", what, dir)
	}
	return fmt.Errorf("%s: %s holds no completion marker (%s); see the job logs", what, dir, slurm.MarkerName)
}

// maxFailuresShown is how many failed studies' errors the batch's final
// message lists.
const maxFailuresShown = 20

// failedStudies is the batch's final error: the failed studies' ids, then
// each with its error, one per line (--quiet drops the progress lines,
// and with --only, as in a scheduler task's log, no summary lists them).
func failedStudies(o *Options, studies []*study, errs []error, failed int, summary bool) error {
	var ids, lines []string
	stale, occupied, damaged := 0, 0, 0
	for i, err := range errs {
		if err == nil {
			continue
		}
		var se *staleError
		var de *damagedError
		var ue *batch.UnreadableError
		var ne *outdir.NotEmptyError
		// row: the study's table line is named, but not for a folder
		// that --force gets past or another run holds (nothing in the
		// row to fix).
		row := ""
		var iu *outdir.InUseError
		switch {
		case errors.As(err, &se):
			stale++
		case errors.As(err, &ne):
			occupied++ // its folder holds files but no completion marker
		case errors.As(err, &iu):
		case errors.As(err, &de), errors.As(err, &ue):
			damaged++ // the user's to fix first: see its line
			row = tableLine(o, studies[i], err)
		default:
			row = tableLine(o, studies[i], err)
		}
		ids = append(ids, studies[i].id)
		if len(lines) < maxFailuresShown {
			lines = append(lines, "\n  "+studies[i].id+": "+row+oneLine(fault.UserText(err)))
		}
	}
	if len(ids) > maxFailuresShown {
		lines = append(lines, fmt.Sprintf("\n  ... and %d more", len(ids)-maxFailuresShown))
	}
	where := ""
	if summary {
		where = filepath.Join(o.Out, report.SummaryHTML) + " lists each with its error, and "
		if failed == 1 {
			where = filepath.Join(o.Out, report.SummaryHTML) + " lists it with its error, and "
		}
	}
	// What --force gets past: a stale study, or a folder that holds files
	// but no completion marker (run --force replaces areasweep's files
	// only).
	var forced []string
	if stale > 0 {
		forced = append(forced, "made from other settings or inputs or with a damaged completion marker")
	}
	if occupied > 0 {
		forced = append(forced, "whose folder holds files but no completion marker")
	}
	// --summary-only runs no study, so the command that retries them (or
	// runs them with --force) is the batch command without it.
	rerun, force := "running the same command again", "--force"
	if o.SummaryOnly {
		rerun, force = "running the batch command again without --summary-only", "the batch command with --force and without --summary-only"
	}
	// One failed study is "it" (the cases below the first four need two).
	again := rerun + " retries them, once what their lines name is fixed"
	if failed == 1 {
		again = rerun + " retries it, once what its line names is fixed"
	}
	switch {
	case damaged == failed && failed == 1:
		again = "its line says what to do"
	case damaged == failed:
		again = "each line says what to do"
	case stale == failed && failed == 1:
		again = force + " runs it again (it was made from other settings or inputs, its results changed since, or its completion marker is damaged)"
	case stale == failed:
		again = force + " runs them again (they were made from other settings or inputs, their results changed since, or their completion marker is damaged)"
	case occupied == failed && failed == 1:
		again = force + " runs it again (its folder holds files but no completion marker; it replaces areasweep's files only)"
	case occupied == failed:
		again = force + " runs them again (their folders hold files but no completion marker; it replaces areasweep's files only)"
	case stale+occupied == failed:
		again = force + " runs them again (they were made from other settings or inputs, their completion marker is damaged, or their folder holds files but no completion marker)"
	case stale+occupied > 0:
		again = rerun + " retries them, but not those " + strings.Join(forced, ", or ") + " (--force)"
		if damaged > 0 {
			again += ", or with a damaged results.json or an input that cannot be read (see their lines)"
		}
	case damaged > 0:
		again = rerun + " retries them, but not those with a damaged results.json or an input that cannot be read (see their lines)"
	}
	// Shown: each line went through UserText; the ids are the user's own
	// (a study named "report" or "pass" keeps its name).
	count := fmt.Sprintf("%d of %d studies failed", failed, len(studies))
	if len(studies) == 1 {
		count = "the one study failed" // not "1 of 1 studies"
	}
	return fault.Shown(fmt.Errorf("%s: %s; %s%s:%s",
		count, strings.Join(ids, ", "), where, again, strings.Join(lines, "")))
}

// tableLine is "TABLE line N: ", the study's row in the study table, for
// the final message's line of a failed study, so that the row to fix is
// found in a table of hundreds; "" when the error names it already (an
// input missing when the table was read, inputs.BatchError) or the line
// is not known.
func tableLine(o *Options, st *study, err error) string {
	var be *inputs.BatchError
	if st.line <= 0 || errors.As(err, &be) {
		return ""
	}
	return fmt.Sprintf("%s line %d: ", o.Table, st.line)
}

// forceNote adds to the error of a study whose recorded input cannot be
// read (batch.UnreadableError) that --force, when given, does not get past
// it: --force runs studies again and replaces areasweep's own files; it
// never skips a check of an input.
func forceNote(o *Options, err error) error {
	var ue *batch.UnreadableError
	if o.Force && errors.As(err, &ue) {
		return fmt.Errorf("%w; --force does not get past this: it runs studies again and replaces areasweep's own files, never skips reading an input", err)
	}
	return err
}

// staleError is the error of a finished study made from other settings or
// inputs than the table's now, not run again without --force.
type staleError struct{ msg string }

func (e *staleError) Error() string { return e.msg }

// damagedError is the error of a finished study whose results.json no
// longer reads as a run wrote it: running the batch again skips it.
type damagedError struct{ msg string }

func (e *damagedError) Error() string { return e.msg }

// oneLine joins an error message's lines.
func oneLine(s string) string { return strings.Join(strings.Fields(s), " ") }
