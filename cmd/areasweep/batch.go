package main

import (
	"context"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"runtime"
	"slices"
	"strconv"
	"strings"
	"sync"
	"time"

	"github.com/spf13/cobra"

	"areasweep/cmd/internal/batch"
	"areasweep/cmd/internal/fault"
	"areasweep/cmd/internal/inputs"
	"areasweep/cmd/internal/outdir"
	"areasweep/cmd/internal/pipeline"
	"areasweep/cmd/internal/settings"
	"areasweep/cmd/internal/slurm"
	"areasweep/report"
	"areasweep/report/outfile"
)

// BatchOptions runs every study of a study table.
type BatchOptions struct {
	IO    *IO
	Table string
	Out   string
	// Jobs is the most studies running at once; Memory the budget in
	// bytes they may need together (0: MemoryBudget of this machine).
	Jobs   int
	Memory int64
	// Only restricts the run to these study ids (a scheduler task runs
	// one); the summary is then not written.
	Only []string
	// SummaryOnly writes the summary from the finished study folders and
	// runs nothing but the merges of studies whose shards all finished.
	SummaryOnly bool
	// Shards splits each study into this many shards of grid rows
	// (run --shard), merged into the study's folder (1: whole studies).
	Shards int
	// Shard, with Only naming one study, runs only that shard (a
	// scheduler task); 0: every shard.
	Shard int
	Force bool
	Quiet bool
	// Template prints an example study table and runs nothing.
	Template bool
	// Slurm writes the SLURM job files instead of running; Submit also
	// submits them (see batchslurm.go).
	Slurm SlurmOptions
}

// batchMarker is the folder of the batch's own files inside --out (the
// SLURM plan); ids cannot start with a dot, so it never clashes with a
// study. Its presence also marks --out as a batch's folder.
const batchMarker = ".areasweep-batch"

const batchExample = `  # start from the example table
  areasweep batch --template > studies.csv

  # run every study of the table, two at a time, into runs/<id>/
  areasweep batch studies.csv --out runs --jobs 2

  # after fixing a failed study's input: the same command runs only what is not done
  areasweep batch studies.csv --out runs --jobs 2

  # the same batch on a SLURM cluster: write the job files, submit them
  areasweep batch studies.csv --out /scratch/runs --slurm --submit`

func newBatchCmd(streams *IO, runF func(*BatchOptions) error) *cobra.Command {
	opts := &BatchOptions{IO: streams}
	var memory string
	cmd := &cobra.Command{
		Use:   "batch TABLE",
		Short: "Run every study of a study table, several at once, and summarise across them",
		Long: `batch reads a study table (CSV or YAML: one row per study with its id, models,
occurrences and region, shared settings in one block), checks every row before
anything runs (bad rows are listed by line and column, exit 2), then runs each
study into --out/<id>/ with its full outputs, several at once within --jobs and a
memory budget. A study that fails does not stop the others. Finally it writes the
summary across studies into --out: summary.csv, summary_verdicts.csv, summary.html,
summary_methods.md and summary_figures/.

A finished study's folder holds the completion marker ` + "`.areasweep-done`" + `; running
the same command again skips those studies and runs the others (failed ones
included). A finished study whose table row changed, or one of whose input files
was replaced by other content or removed since, is named and not run again
without --force. Exit status: 0 when every study has results, 1 when at least one failed
(the summary lists each with its error), 2 for a bad table or flags (nothing ran).`,
		Example: batchExample,
		Args:    cobra.MaximumNArgs(1),
		RunE: func(c *cobra.Command, args []string) error {
			if opts.Template {
				return inputs.WriteBatchTemplate(opts.IO.Out)
			}
			if len(args) == 0 {
				return fault.BadInput(errors.New("name the study table: areasweep batch TABLE --out DIR (areasweep batch --template prints an example)"))
			}
			opts.Table = args[0]
			if c.Flags().Changed("only") {
				// A scheduler passes --only "$AREASWEEP_STUDY": empty,
				// it must not mean "every study" (each task would run
				// the whole table).
				for i, id := range opts.Only {
					opts.Only[i] = strings.TrimSpace(id)
				}
				if len(opts.Only) == 0 || (len(opts.Only) == 1 && opts.Only[0] == "") {
					return fault.BadInput(errors.New("--only is empty; name the study ids to run, comma-separated (is the variable that should hold them set?)"))
				}
				if slices.Contains(opts.Only, "") {
					return fault.BadInput(fmt.Errorf("--only %q holds an empty id (a stray comma?); name the study ids, comma-separated", strings.Join(opts.Only, ",")))
				}
			}
			if c.Flags().Changed("memory") {
				m, err := parseBytes(memory)
				if err != nil {
					return fault.BadInput(fmt.Errorf("--memory %q: %w", memory, err))
				}
				opts.Memory = m
			}
			if err := opts.validate(); err != nil {
				return fault.BadInput(err)
			}
			if runF != nil {
				return runF(opts)
			}
			return batchRun(context.Background(), opts)
		},
	}
	f := cmd.Flags()
	f.StringVar(&opts.Out, "out", "", "output `DIR`: one folder per study, and the summary")
	f.IntVar(&opts.Jobs, "jobs", 1, "studies run at once, `N` (each with all cores / N scoring workers; the results do not depend on it)")
	f.StringVar(&memory, "memory", "", "memory `SIZE` the running studies may need together, e.g. 8G or 512M (default: 80% of the available memory)")
	f.StringSliceVar(&opts.Only, "only", nil, "run only these study `IDS` (comma-separated) and write no summary; for scheduler tasks")
	f.BoolVar(&opts.SummaryOnly, "summary-only", false, "run no study: merge the shards of studies whose shards all finished, then write the summary from the finished study folders")
	f.IntVar(&opts.Shards, "shards", 1, "split each study into `N` shards of grid rows (run --shard), merged into the study's folder")
	f.IntVar(&opts.Shard, "shard", 0, "with --only ID and --shards N: run only shard `I` of that study and no merge (a scheduler task)")
	f.BoolVar(&opts.Force, "force", false, "re-run studies whose table row or input files changed since they finished, and run studies into folders that exist without a completion marker (replacing areasweep's files in them, keeping any other file); never past an input file that cannot be read")
	f.BoolVar(&opts.Quiet, "quiet", false, "no progress lines on standard error")
	f.BoolVar(&opts.Template, "template", false, "print an example study table (CSV) and exit")
	bindSlurmFlags(f, &opts.Slurm)
	return cmd
}

// validate checks the flags that need no file access.
func (o *BatchOptions) validate() error {
	switch {
	case o.Out == "":
		return errors.New("--out is missing; name the folder that receives one folder per study and the summary")
	case o.Jobs < 1 || o.Jobs > settings.MaxWorkers:
		return fmt.Errorf("--jobs is %d; give 1 to %d", o.Jobs, settings.MaxWorkers)
	case o.Memory < 0:
		return fmt.Errorf("--memory is negative")
	case o.SummaryOnly && len(o.Only) > 0:
		return errors.New("--summary-only and --only exclude each other: --only runs studies and writes no summary")
	case o.Slurm.Enabled && (o.SummaryOnly || len(o.Only) > 0):
		return errors.New("--slurm writes job files for the whole table; it does not combine with --summary-only or --only")
	case o.Shards < 1 || o.Shards > maxShards:
		return fmt.Errorf("--shards is %d; give 1 to %d", o.Shards, maxShards)
	case o.Shard != 0 && (o.Shard < 1 || o.Shard > o.Shards || len(o.Only) != 1):
		return fmt.Errorf("--shard %d needs --only with one study and 1 <= I <= --shards (%d)", o.Shard, o.Shards)
	case o.Slurm.Submit && !o.Slurm.Enabled:
		return errors.New("--submit needs --slurm")
	}
	return o.Slurm.validate()
}

// parseBytes reads a size such as 512M, 8G, 1.5GiB or a plain byte count.
func parseBytes(s string) (int64, error) {
	t := strings.ToUpper(strings.TrimSpace(s))
	t = strings.TrimSuffix(strings.TrimSuffix(t, "IB"), "B")
	mult := int64(1)
	for _, u := range []struct {
		suffix string
		m      int64
	}{{"K", 1 << 10}, {"M", 1 << 20}, {"G", 1 << 30}, {"T", 1 << 40}} {
		if strings.HasSuffix(t, u.suffix) {
			t, mult = strings.TrimSuffix(t, u.suffix), u.m
			break
		}
	}
	v, err := strconv.ParseFloat(strings.TrimSpace(t), 64)
	if err != nil || !(v > 0) || v*float64(mult) > 1<<62 {
		return 0, errors.New("give a positive size such as 512M, 8G or 16GiB")
	}
	return int64(v * float64(mult)), nil
}

// batchStudy is one row of the table, resolved.
type batchStudy struct {
	id       string
	line     int
	opts     RunOptions
	settings string // batch.SettingsHash of the settings
	dir      string // --out/<id>
	// inputs compares the input files a marker records with the files
	// now; one for the whole batch, shared by its studies.
	inputs *batch.Checker
	// missing, when not nil, names an input file of the study that does
	// not exist (with the table's file, line and column): the study
	// fails without running, the others run.
	missing error
}

// resolveBatch reads the table and resolves every row into run options,
// collecting every problem, by line and column, before anything runs.
func resolveBatch(o *BatchOptions) ([]*batchStudy, error) {
	// A table with problems still gives its good rows, checked below
	// too, so that every problem is listed in one round.
	b, err := inputs.LoadBatch(o.Table)
	var errs inputs.BatchErrors
	if err != nil && (b == nil || !errors.As(err, &errs)) {
		return nil, err
	}
	out, err := filepath.Abs(o.Out)
	if err != nil {
		return nil, fmt.Errorf("--out %s: %w", o.Out, err)
	}
	reserved := map[string]bool{}
	for _, n := range append(report.SummaryNames(), batchMarker) {
		reserved[strings.ToLower(n)] = true
	}
	var studies []*batchStudy
	check := &batch.Checker{}
	for _, row := range b.Studies {
		bad := func(column string, err error) {
			errs = append(errs, &inputs.BatchError{File: b.File, Line: row.Line, Column: column, Study: row.ID, Err: err})
		}
		if reserved[strings.ToLower(row.ID)] {
			bad("id", fmt.Errorf("%q is the name of a summary file in --out; rename the study", row.ID))
			continue
		}
		ro := defaultRunOptions()
		row.Study.Apply(&ro.Values, func(string) bool { return false }) // no flag: the row and the shared block say all
		ro.Out = filepath.Join(out, row.ID)
		if err := ro.validate(); err != nil {
			bad(flagColumn(err.Error()), err)
			continue
		}
		st := &batchStudy{id: row.ID, line: row.Line, opts: ro, dir: ro.Out, inputs: check}
		if col, err := missingInput(&ro.Options); err != nil {
			// Not the table's fault alone (a file may be
			// removed or not yet written): this study fails,
			// the others still run. A SLURM plan refuses it
			// (batchSlurm), before anything is submitted.
			st.missing = &inputs.BatchError{File: b.File, Line: row.Line, Column: col, Study: row.ID, Err: err}
		}
		st.settings = batch.SettingsHash(canonicalSettings(ro.Options))
		studies = append(studies, st)
	}
	if len(errs) > 0 {
		inputs.SortBatchErrors(errs)
		return nil, errs
	}
	if len(o.Only) > 0 {
		keep := map[string]bool{}
		for _, id := range o.Only {
			keep[strings.ToLower(id)] = true
		}
		var sel []*batchStudy
		for _, st := range studies {
			if keep[strings.ToLower(st.id)] {
				sel = append(sel, st)
				delete(keep, strings.ToLower(st.id))
			}
		}
		if len(keep) > 0 {
			var ids []string
			for _, id := range o.Only {
				if keep[strings.ToLower(id)] {
					ids = append(ids, id)
				}
			}
			return nil, fmt.Errorf("--only names %s, not in %s", strings.Join(ids, ", "), o.Table)
		}
		studies = sel
	}
	return studies, nil
}

// flagColumn turns a validation message about "--name" into the table's
// column "name" ("" when the message names no flag).
func flagColumn(msg string) string {
	for _, k := range inputs.StudyKeys() {
		if strings.Contains(msg, "--"+k+" ") || strings.Contains(msg, "--"+k+":") || strings.HasSuffix(msg, "--"+k) {
			return k
		}
	}
	for _, w := range []struct{ word, col string }{{"no model", "model"}, {"no occurrences", "occurrences"}, {"no base region", "region"}} {
		if strings.Contains(msg, w.word) {
			return w.col
		}
	}
	return ""
}

// missingInput names the first input file of o that does not exist, with
// its column.
func missingInput(o *pipeline.Options) (string, error) {
	check := func(col, path string) error {
		if strings.HasPrefix(path, "/vsi") || strings.Contains(path, "://") {
			return fmt.Errorf("%s is a GDAL virtual path or a URL; areasweep reads local files only: download or unzip the file and give its path", path)
		}
		st, err := os.Stat(path)
		if err != nil {
			return fmt.Errorf("%s does not exist or cannot be read; check the path", path)
		}
		if st.IsDir() && !strings.HasSuffix(strings.ToLower(path), ".gdb") {
			return fmt.Errorf("%s is a folder, not a file", path)
		}
		return nil
	}
	for _, l := range []struct {
		col   string
		items []string
	}{{"model", o.Models}, {"null", o.Nulls}, {"extra", o.Extra}} {
		for _, m := range l.items {
			_, path, _ := inputs.ParseNamedPath(m)
			if err := check(l.col, path); err != nil {
				return l.col, err
			}
		}
	}
	for _, p := range []struct{ col, path string }{{"occurrences", o.Occurrences}, {"region", o.Region}, {"ecoregions", o.Ecoregions}} {
		if p.path != "" {
			if err := check(p.col, p.path); err != nil {
				return p.col, err
			}
		}
	}
	return "", nil
}

// canonicalSettings encodes the settings that change a study's numbers or
// files: everything but the output folder, --force, --quiet, the worker
// count (results do not depend on it) and the recorded version. Input
// paths are made absolute: the table's relative paths are joined to the
// table's folder as the user named it, so the same table read from
// another working directory (or by a scheduler task, which names it by
// its absolute path) must give the same checksum.
func canonicalSettings(o pipeline.Options) []byte {
	o.Out, o.Force, o.Quiet, o.Workers, o.Version, o.StudyFile = "", false, false, 0, "", ""
	abs := func(p string) string {
		if p == "" {
			return p
		}
		if a, err := filepath.Abs(p); err == nil {
			return a
		}
		return p
	}
	named := func(items []string) []string {
		out := make([]string, len(items))
		for i, it := range items {
			out[i] = it
			if name, path, err := inputs.ParseNamedPath(it); err == nil {
				out[i] = name + "=" + abs(path)
			}
		}
		return out
	}
	o.Occurrences, o.Region, o.Ecoregions = abs(o.Occurrences), abs(o.Region), abs(o.Ecoregions)
	o.Models, o.Nulls, o.Extra = named(o.Models), named(o.Nulls), named(o.Extra)
	data, err := json.Marshal(o)
	if err != nil {
		panic("batch: settings cannot be encoded: " + err.Error()) // plain fields only: a programmer's error
	}
	return data
}

// studyState is what is known of one study before the batch runs it.
type studyState int

const (
	statePending studyState = iota // to run
	stateDone                      // finished earlier (marker): skipped
	stateStale                     // finished earlier from other settings or inputs
)

// staleness says why a study or shard is stale and what to do.
type staleness struct {
	// why completes "<folder> was made ...".
	why string
	// remedy is the way out besides --force.
	remedy string
}

// state reads a study folder's marker (see markerState).
func (st *batchStudy) state() (studyState, staleness, error) {
	return st.markerState(st.dir)
}

// markerState reads the marker in dir, the folder of the study or of one
// of its shards: none, pending; another settings checksum (the table row
// changed), stale; no settings checksum at all (an empty or damaged
// marker), stale too; an input file recorded in it removed or holding other
// content than when the study finished (batch.Checker: only files whose
// size or time changed are hashed), stale too; else done. A marker
// without input lines (an older areasweep's) is done when its settings
// match, as before. When some input was only touched (same content), the
// marker is rewritten with the files' new times, best effort, so that the
// next re-run needs no hashing.
func (st *batchStudy) markerState(dir string) (studyState, staleness, error) {
	m, err := batch.ReadMarker(dir)
	switch {
	case err != nil:
		return statePending, staleness{}, err
	case m == nil:
		return statePending, staleness{}, nil
	case m["settings"] == "":
		// Every marker areasweep writes (batch's, a shard task's, an
		// older version's) records the settings checksum: one without it
		// is empty or damaged and vouches for nothing in the folder.
		return stateStale, staleness{"by a run its completion marker " + batch.MarkerPath(dir) + " does not tell (the marker is empty or damaged: it records no settings)", "remove the folder"}, nil
	case m["settings"] != st.settings:
		return stateStale, staleness{"from other settings (the table row changed since it finished)", "remove the folder"}, nil
	}
	files, err := m.Inputs()
	if err != nil {
		return stateStale, staleness{fmt.Sprintf("from inputs its completion marker does not tell (%s)", fault.UserText(err)), "remove the folder"}, nil
	}
	c, err := st.inputs.Check(files)
	if err != nil {
		return statePending, staleness{}, err
	}
	c.Changed = append(c.Changed, addedSidecars(files)...)
	if len(c.Changed) > 0 {
		var what []string
		for i, ch := range c.Changed {
			if i == 3 {
				what = append(what, fmt.Sprintf("and %d more", len(c.Changed)-i))
				break
			}
			what = append(what, ch.String())
		}
		remedy := "restore the file"
		if len(c.Changed) > 1 {
			remedy = "restore the files"
		}
		if c.Changed[0].Added {
			remedy = "remove the file again"
		}
		return stateStale, staleness{"from other inputs (since it finished, " + strings.Join(what, "; ") + ")", remedy}, nil
	}
	if c.Refreshed != nil {
		m.SetInputs(c.Refreshed)
		batch.WriteMarker(dir, m) // best effort: without it the next check hashes the file again
	}
	return stateDone, staleness{}, nil
}

// addedSidecars lists the files that inputs.Sidecars finds now beside a
// recorded input and that the marker does not record: put there since
// the study ran (a .prj beside a shapefile changes its coordinates). The
// first file recorded for a role is the input itself (pipeline.IO.Inputs
// gives each input before its sidecars); the occurrence table has none.
// A few stat calls per input; the files GDAL lists itself (a virtual
// raster's sources) are recorded and checked, but a new one is not looked
// for (that would open every dataset).
func addedSidecars(files []batch.InputFile) []batch.InputChange {
	recorded := map[string]bool{}
	for _, f := range files {
		recorded[filepath.Clean(f.Path)] = true
	}
	var added []batch.InputChange
	seen := map[string]bool{}
	for _, f := range files {
		if seen[f.Role] {
			continue
		}
		seen[f.Role] = true
		kind := inputs.VectorSidecars
		switch {
		case f.Role == "occurrences":
			continue
		case strings.HasPrefix(f.Role, "model:") || strings.HasPrefix(f.Role, "null:"):
			kind = inputs.RasterSidecars
		}
		for _, p := range inputs.Sidecars(f.Path, kind) {
			if !recorded[filepath.Clean(p)] {
				added = append(added, batch.InputChange{File: batch.InputFile{Role: f.Role, Path: p}, Added: true})
			}
		}
	}
	return added
}

// markerInputs converts the files a run hashed into the marker's records,
// their paths made absolute (a sidecar's path may be relative as GDAL
// gave it; the next check may run from another folder).
func markerInputs(files []pipeline.InputFile) []batch.InputFile {
	out := make([]batch.InputFile, len(files))
	for i, f := range files {
		out[i] = batch.InputFile{Role: f.Role, Path: f.Path, Size: f.Size, ModTime: f.ModTime, SHA256: f.SHA256}
		if a, err := filepath.Abs(f.Path); err == nil {
			out[i].Path = a
		}
	}
	return out
}

// batchRun runs the batch: resolve, run what is not done, summarise.
func batchRun(ctx context.Context, o *BatchOptions) error {
	studies, err := resolveBatch(o)
	if err != nil {
		return fault.BadInput(err)
	}
	if o.Slurm.Enabled {
		if err := slurmMissing(studies); err != nil {
			return err
		}
	}
	if err := o.Slurm.clientsPresent(); err != nil {
		return fault.BadInput(err)
	}
	if err := claimBatchDir(o.Out); err != nil {
		return err
	}
	if o.Slurm.Enabled {
		return batchSlurm(ctx, o, studies)
	}
	note := "the running studies' partial results were removed; the studies that had finished keep their folders, and running the same command again runs the others"
	defer stoppedNote.Store(stoppedNote.Swap(&note))
	p := &progress{o: o, total: len(studies)}
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
	if len(o.Only) == 0 {
		if err := writeBatchSummary(o, studies, errs); err != nil {
			return err
		}
		fmt.Fprintf(o.IO.Out, "summary: %s\n", filepath.Join(o.Out, report.SummaryHTML))
	}
	failed := 0
	for _, err := range errs {
		if err != nil {
			failed++
		}
	}
	if failed > 0 {
		return failedStudies(o, studies, errs, failed)
	}
	return nil
}

// maxFailuresShown is how many failed studies' errors the batch's final
// message lists.
const maxFailuresShown = 20

// failedStudies is the batch's final error: the failed studies' ids, then
// each with its error, one per line (--quiet drops the progress lines,
// and with --only, as in a scheduler task's log, no summary lists them).
func failedStudies(o *BatchOptions, studies []*batchStudy, errs []error, failed int) error {
	var ids, lines []string
	stale, damaged := 0, 0
	for i, err := range errs {
		if err == nil {
			continue
		}
		var se *staleError
		var de *damagedError
		var ue *batch.UnreadableError
		switch {
		case errors.As(err, &se):
			stale++
		case errors.As(err, &de), errors.As(err, &ue):
			damaged++ // the user's to fix first: see its line
		}
		ids = append(ids, studies[i].id)
		if len(lines) < maxFailuresShown {
			lines = append(lines, "\n  "+studies[i].id+": "+oneLine(fault.UserText(err)))
		}
	}
	if len(ids) > maxFailuresShown {
		lines = append(lines, fmt.Sprintf("\n  ... and %d more", len(ids)-maxFailuresShown))
	}
	where := ""
	if len(o.Only) == 0 {
		where = filepath.Join(o.Out, report.SummaryHTML) + " lists each with its error, and "
	}
	again := "running the same command again retries them"
	switch {
	case damaged == failed:
		again = "each line says what to do"
	case stale == failed:
		again = "--force runs them again (they were made from other settings or inputs)"
	case stale > 0 || damaged > 0:
		again = "running the same command again retries them, but not those made from other settings or inputs (--force) or with a damaged results.json or an input that cannot be read (see their lines)"
	}
	// Shown: each line went through UserText; the ids are the user's own
	// (a study named "report" or "pass" keeps its name).
	return fault.Shown(fmt.Errorf("%d of %d studies failed: %s; %s%s:%s",
		failed, len(studies), strings.Join(ids, ", "), where, again, strings.Join(lines, "")))
}

// forceNote adds to the error of a study whose recorded input cannot be
// read (batch.UnreadableError) that --force, when given, does not get past
// it: --force runs studies again and replaces areasweep's own files; it
// never skips a check of an input.
func forceNote(o *BatchOptions, err error) error {
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

// failurePath is where a study's last error is kept, so that a summary
// written later (by the scheduler's merge job) can show it.
// Shard k > 0 has its own record: the shards of a study run as separate
// scheduler tasks, and one's success must not erase another's failure.
func failurePath(out, id string, k int) string {
	if k > 0 {
		id += ".shard-" + strconv.Itoa(k)
	}
	return filepath.Join(out, batchMarker, "failed", id+".txt")
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
func readFailure(out string, st *batchStudy, k int) error {
	if b, err := os.ReadFile(failurePath(out, st.id, k)); err == nil && len(b) > 0 {
		return errors.New(strings.TrimSpace(string(b)))
	}
	if k > 0 {
		return fmt.Errorf("shard %d not finished: %s holds no completion marker (%s); see the job logs", k, shardDir(out, st.id, k), slurm.MarkerName)
	}
	return fmt.Errorf("not finished: %s holds no completion marker (%s); see the job logs", st.dir, slurm.MarkerName)
}

// claimBatchDir creates --out or checks that it is empty or a batch's
// folder, and marks it as one.
func claimBatchDir(out string) error {
	ents, err := os.ReadDir(out)
	switch {
	case errors.Is(err, os.ErrNotExist):
		if err := os.MkdirAll(out, 0o777); err != nil {
			return fmt.Errorf("cannot create --out %s: %w", out, err)
		}
	case err != nil:
		if st, serr := os.Stat(out); serr == nil && !st.IsDir() {
			return fault.BadInput(fmt.Errorf("--out %s exists and is not a directory; name a folder for the studies", out))
		}
		return fault.BadInput(fmt.Errorf("--out %s cannot be read (%w); choose a folder you can read and write", out, outdir.Cause(err)))
	case len(ents) > 0:
		if _, err := os.Stat(filepath.Join(out, batchMarker)); err != nil {
			return fault.BadInput(fmt.Errorf("--out %s exists and is not a batch's folder (no %s in it); choose a new or empty folder", out, batchMarker))
		}
	}
	if err := os.MkdirAll(filepath.Join(out, batchMarker), 0o777); err != nil {
		return fmt.Errorf("cannot create %s: %w", filepath.Join(out, batchMarker), err)
	}
	return nil
}

// unit is one piece of a batch run by batch.Run: a whole study, one
// shard of it (shard > 0) or the merge of its shards (merge).
type unit struct {
	study int
	shard int
	merge bool
}

// shardDir is the folder of shard i of study id: inside the batch's own
// folder, so that the study folder (the merge's --out) holds no input.
func shardDir(out, id string, i int) string {
	return filepath.Join(out, batchMarker, "shards", id, strconv.Itoa(i))
}

// runStudies runs every study not yet done within the limits and returns
// each study's error in table order: whole, or with --shards N as N
// shards each followed by the merge of its shards. With --shard I (a
// scheduler task) only that shard runs; with --summary-only nothing runs
// but the merges of studies whose shards are all finished.
func runStudies(ctx context.Context, o *BatchOptions, studies []*batchStudy, p *progress) []error {
	errs := make([]error, len(studies))
	workers := max(1, runtime.GOMAXPROCS(0)/o.Jobs)
	var todo []int
	for i, st := range studies {
		if st.missing != nil {
			errs[i] = st.missing
			p.line(st.id, "not run: "+oneLine(fault.UserText(st.missing)))
			continue
		}
		s, why, err := st.state()
		switch {
		case err != nil:
			errs[i] = forceNote(o, err)
			continue
		case s == stateDone:
			p.line(st.id, "already finished, skipped")
			continue
		case s == stateStale && !o.Force:
			errs[i] = &staleError{fmt.Sprintf("%s was made %s; add --force to run it again, or %s", st.dir, why.why, why.remedy)}
			continue
		case s == stateStale || o.Force:
			// --force also lets a study run into a folder left without
			// a marker (the user's, or one given areasweep's files by
			// hand): run --force replaces areasweep's files only.
			st.opts.Force = true
		}
		if st.opts.Workers == 0 {
			st.opts.Workers = workers
		}
		todo = append(todo, i)
	}
	if o.Shards <= 1 {
		var units []unit
		for _, i := range todo {
			if o.SummaryOnly {
				errs[i] = readFailure(o.Out, studies[i], 0)
				continue
			}
			units = append(units, unit{study: i})
		}
		runUnits(ctx, o, studies, units, errs, p)
		return errs
	}
	var units []unit
	for _, i := range todo {
		st := studies[i]
		for k := 1; k <= o.Shards; k++ {
			if o.SummaryOnly || (o.Shard > 0 && k != o.Shard) {
				continue
			}
			switch s, _, err := shardState(o.Out, st, k); {
			case err != nil:
				errs[i] = err
			case s == stateDone:
				p.line(st.id, fmt.Sprintf("shard %d/%d already finished, skipped", k, o.Shards))
			default:
				units = append(units, unit{study: i, shard: k})
			}
		}
	}
	runUnits(ctx, o, studies, units, errs, p)
	if o.Shard > 0 {
		return errs
	}
	var merges []unit
	for _, i := range todo {
		if errs[i] != nil {
			continue
		}
		var missing []int
		var stale error
		for k := 1; k <= o.Shards; k++ {
			s, why, _ := shardState(o.Out, studies[i], k)
			if s != stateDone {
				missing = append(missing, k)
			}
			if s == stateStale && stale == nil {
				stale = fmt.Errorf("shard %d/%d was made %s; running the same command again runs it again", k, o.Shards, why.why)
			}
		}
		if len(missing) > 0 {
			if errs[i] = stale; stale == nil {
				errs[i] = readFailure(o.Out, studies[i], missing[0])
			}
			continue
		}
		merges = append(merges, unit{study: i, merge: true})
	}
	runUnits(ctx, o, studies, merges, errs, p)
	return errs
}

// shardState reads the marker of shard k of st (see markerState). A
// shard's folder is the batch's own: a stale shard runs again without
// --force.
func shardState(out string, st *batchStudy, k int) (studyState, staleness, error) {
	return st.markerState(shardDir(out, st.id, k))
}

// runUnits runs units within the limits (each needs its study's memory
// estimate) and stores the first error of each study in errs.
func runUnits(ctx context.Context, o *BatchOptions, studies []*batchStudy, units []unit, errs []error, p *progress) {
	var jobs []batch.Job
	var run []unit
	for _, u := range units {
		st := studies[u.study]
		if errs[u.study] != nil {
			continue
		}
		need, err := pipeline.Estimate(st.opts.Options)
		if err != nil {
			errs[u.study] = err
			continue
		}
		jobs = append(jobs, batch.Job{ID: st.id, Need: need})
		run = append(run, u)
	}
	budget := o.Memory
	if budget == 0 {
		if budget = pipeline.MemoryBudget(); budget == 0 {
			budget = 1 << 62 // unknown: the job count alone limits
		}
	}
	runErrs := batch.Run(ctx, jobs, batch.Limits{Jobs: o.Jobs, Budget: budget}, func(ctx context.Context, k int) error {
		u := run[k]
		st := studies[u.study]
		what := ""
		switch {
		case u.shard > 0:
			what = fmt.Sprintf("shard %d/%d", u.shard, o.Shards)
		case u.merge:
			what = fmt.Sprintf("merge of %d shards", o.Shards)
		}
		p.line(st.id, strings.TrimSpace(what+" started"))
		t0 := time.Now()
		err := runUnit(ctx, o, st, u)
		if err != nil {
			p.line(st.id, strings.TrimSpace(what+" failed: ")+" "+oneLine(fault.UserText(err)))
			return err
		}
		p.line(st.id, strings.TrimSpace(fmt.Sprintf("%s finished in %.1f s", what, time.Since(t0).Seconds())))
		return nil
	})
	for k, err := range runErrs {
		u := run[k]
		if err == nil || errs[u.study] != nil {
			continue
		}
		if errors.Is(err, batch.ErrTooLarge) {
			err = fmt.Errorf("%w; give more with --memory, or make the study smaller (coarser or clipped rasters, fewer extents or workers)", err)
		}
		if u.shard > 0 {
			err = fmt.Errorf("shard %d/%d: %w", u.shard, o.Shards, err)
		}
		errs[u.study] = err
	}
}

// runUnit runs one unit and writes its completion marker: the study's
// folder for a whole study or a merge, the shard's folder for a shard.
// The marker is written into the run's staging folder (pipeline.IO.Seal)
// and moved into place with the outputs, after them: a unit killed at any
// moment (SIGKILL at a scheduler's time limit) leaves either its folder
// as it was, to be run again, or every output with its marker, never
// finished outputs without a marker (which a re-run would refuse as a
// folder it did not make) nor a marker beside half-moved outputs.
func runUnit(ctx context.Context, o *BatchOptions, st *batchStudy, u unit) error {
	po := st.opts.Options
	po.Quiet, po.Version = true, version
	var read []pipeline.InputFile
	var m batch.Marker
	pio := pipeline.IO{ErrOut: io.Discard, Log: &pipeline.Log{}, Inputs: func(f []pipeline.InputFile) { read = f },
		Seal: func(stage string) error {
			if u.shard == 0 {
				sum, err := batch.FileSHA256(filepath.Join(stage, "results.json"))
				if err != nil {
					return err
				}
				m["results"] = sum
			}
			m.SetInputs(markerInputs(read))
			return batch.WriteMarker(stage, m)
		}}
	if u.shard > 0 {
		po.Out = shardDir(o.Out, st.id, u.shard)
		// The shard's folder is the batch's own, and a shard replaces
		// only its own partial file and log: a folder left without a
		// marker (a shard stopped before it could write one, or made
		// from other settings) is run into again without --force.
		po.Force = true
		m = batch.Marker{"study": st.id, "shard": fmt.Sprintf("%d/%d", u.shard, o.Shards), "settings": st.settings}
		return pipeline.RunShard(ctx, po, pio, u.shard, o.Shards)
	}
	m = batch.Marker{"study": st.id, "settings": st.settings}
	if u.merge {
		files := make([]string, o.Shards)
		for k := range files {
			files[k] = shardDir(o.Out, st.id, k+1)
		}
		mo := pipeline.MergeOptions{Files: files, Out: st.dir, Force: po.Force, Quiet: true, Workers: po.Workers, Version: version}
		_, err := pipeline.Merge(ctx, mo, pio)
		return err
	}
	_, err := pipeline.Run(ctx, po, pio)
	return err
}

// writeBatchSummary loads each finished study's results.json (the same
// bytes whether it ran now or earlier, so the summary does not depend on
// --jobs or on resuming) and writes the summary into --out. A finished
// study whose results.json cannot be read as a run wrote it (edited or
// damaged since) gets its error in errs: the summary and the exit status
// count it as failed.
func writeBatchSummary(o *BatchOptions, studies []*batchStudy, errs []error) error {
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
		if err != nil {
			// Finished (its completion marker is there), so the same
			// command would skip it again: say how to run it again.
			errs[i] = &damagedError{fmt.Sprintf("%s; the study counts as finished: restore the file, or remove %s and run the same command with --force to run the study again", strings.TrimSuffix(fault.UserText(err), "."), batch.MarkerPath(st.dir))}
			rs[i].Err = errors.New(fault.UserText(errs[i]))
			continue
		}
		rs[i].Results, rs[i].Report = r, st.id+"/report.html"
	}
	s, err := report.Summarize(rs)
	if err != nil {
		return fault.Internal(err)
	}
	if err := report.WriteSummary(o.Out, s); err != nil {
		return fmt.Errorf("writing the summary: %w", err)
	}
	return nil
}

// progress prints one line per study event to standard error.
type progress struct {
	o     *BatchOptions
	total int
	mu    sync.Mutex
}

func (p *progress) line(id, what string) {
	if p.o.Quiet {
		return
	}
	p.mu.Lock()
	defer p.mu.Unlock()
	fmt.Fprintf(p.o.IO.ErrOut, "areasweep batch: %s: %s\n", id, what)
}

// oneLine joins an error message's lines.
func oneLine(s string) string { return strings.Join(strings.Fields(s), " ") }
