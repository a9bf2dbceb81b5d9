package batchrun

import (
	"errors"
	"fmt"
	"io/fs"
	"os"
	"path/filepath"
	"strings"

	"areasweep/cmd/internal/batch"
	"areasweep/cmd/internal/fault"
	"areasweep/cmd/internal/outdir"
	"areasweep/extent/gdalmsg"
	"areasweep/report"
)

// writeSummaryFiles is report.WriteSummary; tests replace it to meet a
// full disk.
var writeSummaryFiles = report.WriteSummary

// writeSummary loads each finished study's results.json (the same
// bytes whether it ran now or earlier, so the summary does not depend on
// --jobs or on resuming) and writes the summary into --out. A finished
// study whose results.json cannot be read as a run wrote it (edited or
// damaged since) gets its error in errs: the summary and the exit status
// count it as failed. It returns the summary's count sentence.
func writeSummary(o *Options, studies []*study, errs []error) (string, error) {
	rs := make([]report.StudyResult, len(studies))
	for i, st := range studies {
		rs[i] = report.StudyResult{ID: st.id}
		if errs[i] != nil {
			// summary.csv and summary.html show it as the batch's
			// message does, without areasweep's package names.
			rs[i].Err = errors.New(fault.UserText(errs[i]))
			continue
		}
		// The checksum the study's marker recorded spares the shape
		// walk of an unchanged file (report.LoadWritten).
		sum := ""
		if m, err := batch.ReadMarker(st.dir); err == nil && m != nil {
			sum = m["results"]
		}
		r, err := report.LoadWritten(filepath.Join(st.dir, "results.json"), sum)
		if _, serr := os.Stat(batch.MarkerPath(st.dir)); err != nil && errors.Is(serr, fs.ErrNotExist) {
			// Removed since it finished, marker and all: the same
			// command runs it again (with --force when files of it
			// are left), so the advice below would be wrong.
			if _, derr := os.Stat(st.dir); errors.Is(derr, fs.ErrNotExist) {
				errs[i] = fmt.Errorf("%s was removed after the study finished; running the same command again runs it again", st.dir)
			} else {
				errs[i] = fmt.Errorf("%s lost its results.json and its completion marker (%s) after the study finished; running the same command with --force runs it again", st.dir, batch.MarkerPath(st.dir))
			}
			rs[i].Err = errors.New(fault.UserText(errs[i]))
			continue
		}
		if err != nil && errors.Is(err, fs.ErrNotExist) {
			// Removed, marker left: the same command skips it.
			errs[i] = &damagedError{fmt.Sprintf("%s was removed after the study finished, and its completion marker %s is still there, so the same command skips the study: restore the file from a copy, or remove %s and run the same command with --force to run the study again",
				filepath.Join(st.dir, "results.json"), batch.MarkerPath(st.dir), batch.MarkerPath(st.dir))}
			rs[i].Err = errors.New(fault.UserText(errs[i]))
			continue
		}
		if err != nil {
			// Finished (its completion marker is there), so the same
			// command would skip it again: say how to run it again.
			errs[i] = &damagedError{fmt.Sprintf("%s; the study counts as finished: restore the file, or remove %s and run the same command with --force to run the study again", strings.TrimSuffix(fault.UserText(err), "."), batch.MarkerPath(st.dir))}
			rs[i].Err = errors.New(fault.UserText(errs[i]))
			continue
		}
		// The sensitivity analysis is recomputed from the scores, as
		// areasweep report does: a results.json written by an earlier
		// areasweep keeps that version's verdicts (one from before the
		// partial ROC ratio's differences between extents were described
		// rather than judged calls them extent-sensitive), and the
		// summary must say what the studies' re-rendered reports say.
		r.Sensitivity = nil
		rs[i].Results, rs[i].Report = r, st.id+"/report.html"
	}
	s, err := report.Summarize(rs)
	if err != nil {
		return "", fault.Internal(err)
	}
	if s.Software == (report.Software{}) {
		// No study gave results to take the version from: the one
		// writing the summary, which ran them (or was to).
		s.Software = report.Software{Name: "areasweep", Version: o.Version}
	}
	if err := summaryInTheWay(o.Out); err != nil {
		return "", err
	}
	if err := writeSummaryFiles(o.Out, s); err != nil {
		// The summary's files are each replaced whole; the studies'
		// folders are not touched.
		what := gdalmsg.Cause(outdir.Cause(err).Error())
		if outdir.DiskFull(err) {
			what += " (free some space on that disk)"
		} else {
			what += outdir.FileSizeAdvice(err)
		}
		return "", fmt.Errorf("writing the summary into %s failed: %s; finished studies keep their folders, and running the same command again skips them and writes it", o.Out, what)
	}
	return s.CountSentence(), nil
}

// summaryInTheWay refuses, before any summary file is written, a folder
// where the summary writes a file (summary.csv/ of the user's) or a file
// where it writes its folder of figures: the move onto it failed with
// "file exists", and running the command again, as the message advised,
// failed the same way.
func summaryInTheWay(out string) error {
	for _, n := range report.SummaryNames() {
		st, err := os.Lstat(filepath.Join(out, n))
		if err != nil {
			continue
		}
		folder := n == report.SummaryFigures
		if st.IsDir() != folder {
			what, writes := "a folder", "a file"
			if folder {
				what, writes = "a file", "a folder"
			}
			return fmt.Errorf("writing the summary into %s: %s is %s, and the summary writes %s of that name; move or rename it, then run the same command again (finished studies keep their folders and are skipped)", out, filepath.Join(out, n), what, writes)
		}
	}
	return nil
}
