// Package rerender draws the report of a finished run again from its
// results.json: it checks the folder, reads and checks the results,
// recomputes the sensitivity analysis (report.Analyze), draws the report
// into a staging folder inside the run's folder and moves it into place
// all or nothing. The scores themselves are not recomputed.
//
// The command (areasweep report) parses flags and calls Run; the folder's
// own guard (locking, journals) is outdir's.
package rerender

import (
	"errors"
	"fmt"
	"io/fs"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"time"

	"areasweep/cmd/internal/batchrun"
	"areasweep/cmd/internal/fault"
	"areasweep/cmd/internal/outdir"
	"areasweep/report"
	"areasweep/report/outfile"
)

// maxResultsBytes bounds the results.json that Run reads (our choice).
// The file grows with models x extents (scores, curves, paired records),
// not with cells: the demo's 3 models x 13 extents write about 1.5 MB, so
// even 1024 extents stay under it for a handful of models.
const maxResultsBytes = 1 << 30

// Options says which run's report to draw again.
type Options struct {
	// Dir is the --out folder of a finished run, or its results.json.
	Dir string
	// Force replaces the report files already in Dir.
	Force bool
	// Logf writes one progress line (nil: none).
	Logf func(format string, args ...any)
}

// stage and write are outdir.Stage and report.Write; tests replace them
// to meet a full disk.
var (
	stage = outdir.Stage
	write = report.Write
)

// Run draws the report of the finished run in o.Dir again and returns
// the path of its report.html. Bad input (no results.json, a damaged or
// hand-edited one, a folder or file in the way of a report file, existing
// report files without Force, a folder it cannot write in) is a
// fault.BadInput error naming the path; nothing in o.Dir changes unless
// the whole new report moves in.
func Run(o Options) (string, error) {
	logf := o.Logf
	if logf == nil {
		logf = func(string, ...any) {}
	}
	if st, err := os.Stat(o.Dir); err == nil && st.Mode().IsRegular() {
		if filepath.Base(o.Dir) != "results.json" {
			return "", fault.BadInput(fmt.Errorf("%s is a file; give the --out directory of a finished run (the folder holding results.json)", o.Dir))
		}
		o.Dir = filepath.Dir(o.Dir) // the results file itself: its folder is the run's
	}
	path := filepath.Join(o.Dir, "results.json")
	st, err := os.Stat(path)
	if err != nil {
		if shards, _ := filepath.Glob(filepath.Join(o.Dir, "shard-*-of-*.aspf")); len(shards) > 0 {
			return "", fault.BadInput(fmt.Errorf("%s holds the partial file(s) of a sharded run (%s), not its results: merge the shards first (areasweep merge --out DIR SHARD...), then the report is in DIR", o.Dir, filepath.Base(shards[0])))
		}
		if st, err := os.Stat(filepath.Join(o.Dir, batchrun.OwnDir)); err == nil && st.IsDir() {
			example := filepath.Join(o.Dir, "ID")
			if found, _ := filepath.Glob(filepath.Join(o.Dir, "*", "results.json")); len(found) > 0 {
				example = filepath.Dir(found[0])
			}
			return "", fault.BadInput(fmt.Errorf("%s is the --out folder of a batch, which holds no results.json of its own: each study's report is in its folder (areasweep report %s --force); the summary is rewritten by areasweep batch TABLE --out %s --summary-only", o.Dir, example, o.Dir))
		}
		if _, err := os.Stat(filepath.Join(o.Dir, "extents.csv")); err == nil {
			// The folder of `areasweep extents`: it scores nothing.
			return "", fault.BadInput(fmt.Errorf("%s holds the extent family that areasweep extents wrote (extents.csv), not a scored run's results.json: the report needs a run; score the study with areasweep run (its --out is then the folder to give)", o.Dir))
		}
		if _, err := os.Stat(o.Dir); errors.Is(err, fs.ErrNotExist) {
			return "", fault.BadInput(fmt.Errorf("%s does not exist: give the --out directory of a finished run", o.Dir))
		}
		return "", fault.BadInput(fmt.Errorf("%s not found: give the --out directory of a finished run", path))
	}
	if !st.Mode().IsRegular() {
		return "", fault.BadInput(fmt.Errorf("%s is not a regular file: give the --out directory of a finished run", path))
	}
	if st.Size() > maxResultsBytes {
		return "", fault.BadInput(fmt.Errorf("%s is larger than %d MiB, more than a run writes; is this the right folder?", path, maxResultsBytes>>20))
	}
	if !o.Force {
		for _, f := range []string{"report.html", "methods.md", "figures"} {
			if _, err := os.Stat(filepath.Join(o.Dir, f)); err == nil {
				return "", fault.BadInput(fmt.Errorf("%s already holds %s; add --force to re-render the report in place", o.Dir, f))
			}
		}
	}
	if st, err := os.Lstat(filepath.Join(o.Dir, "figures")); err == nil && !st.IsDir() {
		what := "a file"
		if st.Mode()&fs.ModeSymlink != 0 {
			what = "a link" // the report does not write through it, into another folder
		}
		return "", fault.BadInput(fmt.Errorf("%s is %s; the report writes its figures into a folder of that name: move the %s, then run again", filepath.Join(o.Dir, "figures"), what, strings.TrimPrefix(what, "a ")))
	}
	if err := notFileInTheWay(o.Dir, "report.html", "methods.md"); err != nil {
		return "", err
	}
	start := time.Now()
	r, err := report.Load(path) // shape, required fields, schema version, values
	if err != nil {
		if errors.Is(err, fs.ErrNotExist) || errors.Is(err, fs.ErrPermission) {
			return "", fault.BadInput(fmt.Errorf("%s cannot be read: %v", path, outdir.Cause(err)))
		}
		return "", fault.BadInput(err)
	}
	logf("results.json read and checked in %.2f s", time.Since(start).Seconds())
	start = time.Now()
	if err := report.Analyze(r); err != nil {
		return "", fault.BadInput(err)
	}
	logf("analysis in %.2f s", time.Since(start).Seconds())
	if abs, err := filepath.Abs(o.Dir); err == nil && strings.ContainsAny(abs, "\n\r") {
		return "", fault.BadInput(outdir.LineBreakError("the folder", o.Dir, abs))
	}
	if err := outdir.CheckUmask(); err != nil {
		return "", err
	}
	st2, err := stage(o.Dir)
	if err != nil && outdir.DiskFull(err) {
		return "", fmt.Errorf("%s: cannot write in it (%v): free some space on that disk, or re-render the report of a copy of the folder on another one; the report files in it were left as they were", o.Dir, outdir.Cause(err))
	}
	if err != nil {
		return "", fault.BadInput(fmt.Errorf("%s: cannot write in it (%v); re-render the report of a folder you can write to, e.g. a copy of it", o.Dir, outdir.Cause(err)))
	}
	defer st2.Abort()
	start = time.Now()
	if err := write(st2.Path, r); err != nil {
		what := outdir.Cause(err).Error()
		if outdir.DiskFull(err) {
			what += " (free some space on that disk, or re-render the report of a copy of the folder on another one)"
		} else {
			what += outdir.FileSizeAdvice(err)
		}
		return "", fmt.Errorf("writing the report failed: %s; the report files in %s were not changed", what, o.Dir)
	}
	logf("report written in %.2f s", time.Since(start).Seconds())
	// A folder where a figure file goes (the names are known once
	// drawn) would stop the move half-way: refuse it before moving.
	figs, err := os.ReadDir(filepath.Join(st2.Path, "figures"))
	if err != nil {
		return "", fmt.Errorf("reading the drawn figures: %s; the report files in %s were not changed", outdir.Cause(err), o.Dir)
	}
	names := make([]string, len(figs))
	for i, f := range figs {
		names[i] = f.Name()
	}
	if err := notFileInTheWay(filepath.Join(o.Dir, "figures"), names...); err != nil {
		return "", err
	}
	moved := 0
	if err := st2.Finish(func() error { return place(st2.Path, o.Dir, &moved) }); err != nil {
		state := "the report files in it were left as they were"
		if moved > 0 {
			state = fmt.Sprintf("%d report files before it were replaced by the new ones, the others not", moved)
		}
		todo := "fix what stops it (its permissions, or an immutable attribute: lsattr), then run the same command again"
		if outdir.DiskFull(err) {
			todo = "free some space on that disk, then run the same command again"
		}
		return "", fmt.Errorf("moving the report into %s failed: %v; %s: %s", o.Dir, err, state, todo)
	}
	return filepath.Join(o.Dir, "report.html"), nil
}

// notFileInTheWay refuses when one of names in dir exists and is not a
// regular file or a link (a folder, a FIFO, ...): the report replaces a
// file of that name, and renaming onto a folder fails half-way through
// the report's files.
func notFileInTheWay(dir string, names ...string) error {
	for _, n := range names {
		p := filepath.Join(dir, n)
		if st, err := os.Lstat(p); err == nil && !st.Mode().IsRegular() && st.Mode()&fs.ModeSymlink == 0 {
			what := "a folder"
			if !st.IsDir() {
				what = "not a regular file"
			}
			return fault.BadInput(fmt.Errorf("%s is %s; the report writes a file of that name: move it out of the way, then run again (nothing was changed)", p, what))
		}
	}
	return nil
}

// place moves the report rendered into stage into dir: each figure
// file into dir/figures (made if missing), then methods.md, then
// report.html. Figure files of an earlier report that this one does not
// draw (pages of ring_steps it no longer has) and temporary files left by
// a killed earlier version are removed; any other file in figures/ is the
// user's and stays.
//
// It is all or nothing: the files it replaces or removes are first set
// aside in a folder inside stage, and only then are the new ones moved
// in; a move that fails (an immutable file, a folder that changed
// meanwhile) puts everything back. A target that is a folder or another
// non-file is refused before anything moves. moved counts the report
// files in place when it returns: every one on success, 0 after a
// failure put back, and those it could not put back otherwise; an error
// names the path it failed on and its cause.
func place(stage, dir string, moved *int) error {
	figDir := filepath.Join(dir, "figures")
	made := false
	if err := os.Mkdir(figDir, outdir.MkdirPerm()); err == nil {
		made = true
	} else if !errors.Is(err, fs.ErrExist) {
		return fmt.Errorf("cannot create %s (%w)", figDir, outdir.Cause(err))
	}
	figs, err := os.ReadDir(filepath.Join(stage, "figures"))
	if err != nil {
		return err
	}
	type move struct{ from, to string }
	var moves []move
	drawn := map[string]bool{}
	for _, f := range figs {
		drawn[f.Name()] = true
		moves = append(moves, move{filepath.Join(stage, "figures", f.Name()), filepath.Join(figDir, f.Name())})
	}
	for _, n := range []string{"methods.md", "report.html"} {
		moves = append(moves, move{filepath.Join(stage, n), filepath.Join(dir, n)})
	}
	// What goes aside: every target there is, and the stale figures.
	var aside []string
	for _, m := range moves {
		st, err := os.Lstat(m.to)
		if errors.Is(err, fs.ErrNotExist) {
			continue
		} else if err != nil {
			return fmt.Errorf("cannot replace %s (%w)", m.to, outdir.Cause(err))
		}
		if !st.Mode().IsRegular() && st.Mode()&fs.ModeSymlink == 0 {
			return fmt.Errorf("cannot replace %s (it is not a file)", m.to)
		}
		aside = append(aside, m.to)
	}
	old, err := os.ReadDir(figDir)
	if err != nil {
		return err
	}
	for _, f := range old {
		if n := f.Name(); f.Type().IsRegular() && !drawn[n] && (report.IsFigureFile(n) || outfile.IsTemp(n)) {
			aside = append(aside, filepath.Join(figDir, n))
		}
	}
	// In the staging folder, which is in dir (so each file is only
	// renamed) and is removed after, or by the next report should this
	// process be killed.
	hold, err := os.MkdirTemp(stage, ".replaced-")
	if err != nil {
		return fmt.Errorf("cannot write in %s (%w)", dir, outdir.Cause(err))
	}
	held, placed := 0, 0
	// back undoes what was done; it reports whether all was put back.
	back := func() bool {
		ok := true
		for i := placed - 1; i >= 0; i-- {
			if err := os.Rename(moves[i].to, moves[i].from); err != nil {
				ok = false
			}
		}
		for i := held - 1; i >= 0; i-- {
			if err := os.Rename(filepath.Join(hold, strconv.Itoa(i)), aside[i]); err != nil {
				ok = false
			}
		}
		if ok {
			os.Remove(hold)
			if made {
				os.Remove(figDir)
			}
		}
		return ok
	}
	fail := func(err error) error {
		if back() {
			*moved = 0
		} else {
			*moved = placed
		}
		return err
	}
	for _, p := range aside {
		if err := os.Rename(p, filepath.Join(hold, strconv.Itoa(held))); err != nil {
			return fail(fmt.Errorf("cannot replace %s (%w)", p, outdir.Cause(err)))
		}
		held++
	}
	for _, m := range moves {
		if err := os.Rename(m.from, m.to); err != nil {
			return fail(fmt.Errorf("cannot replace %s (%w)", m.to, outdir.Cause(err)))
		}
		placed++
		*moved = placed
	}
	os.RemoveAll(hold)
	return nil
}
