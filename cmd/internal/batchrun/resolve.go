package batchrun

import (
	"encoding/json"
	"errors"
	"fmt"
	"maps"
	"os"
	"path/filepath"
	"strings"

	"areasweep/cmd/internal/batch"
	"areasweep/cmd/internal/fault"
	"areasweep/cmd/internal/inputs"
	"areasweep/cmd/internal/outdir"
	"areasweep/cmd/internal/pipeline"
	"areasweep/cmd/internal/settings"
	"areasweep/report"
)

// study is one row of the table, resolved.
type study struct {
	id       string
	line     int
	opts     pipeline.Options
	settings string // batch.SettingsHash of the settings
	// canonical are the settings as hashed (canonicalSettings): the
	// marker keeps them, so that a changed row can be told by its keys.
	canonical []byte
	dir       string // --out/<id>
	// inputs compares the input files a marker records with the files
	// now; one for the whole batch, shared by its studies.
	inputs *batch.Checker
	// missing, when not nil, names an input file of the study that does
	// not exist (with the table's file, line and column): the study
	// fails without running, the others run.
	missing error
}

// resolve reads the table and resolves every row into run options,
// collecting every problem, by line and column, before anything runs.
func resolve(o *Options) ([]*study, error) {
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
	for _, n := range append(report.SummaryNames(), OwnDir) {
		reserved[strings.ToLower(n)] = true
	}
	var studies []*study
	check := &batch.Checker{}
	for _, row := range b.Studies {
		st, rowErrs := resolveRow(o, b.File, row, out, reserved)
		if len(rowErrs) > 0 {
			errs = append(errs, rowErrs...)
			continue
		}
		st.inputs = check
		studies = append(studies, st)
	}
	for _, row := range b.Refused {
		errs = append(errs, refusedProblems(row, filepath.Join(out, "refused"), rowError(b.File, row.BatchStudy))...)
	}
	if len(errs) > 0 {
		errs = mergeShared(errs)
		inputs.SortBatchErrors(errs)
		return nil, errs
	}
	if len(o.Only) > 0 {
		return selectOnly(o, studies)
	}
	return studies, nil
}

// resolveRow lays one row of the table (file) over the defaults into the
// study's settings, its folder in out; the errors are the row's problems.
func resolveRow(o *Options, file string, row inputs.BatchStudy, out string, reserved map[string]bool) (*study, inputs.BatchErrors) {
	bad := rowError(file, row)
	if reserved[strings.ToLower(row.ID)] {
		return nil, inputs.BatchErrors{bad("id", fmt.Errorf("%q is the name of a summary file in --out; rename the study", row.ID))}
	}
	po := rowOptions(row.Study, filepath.Join(out, row.ID))
	if errs := rowProblems(row.Study, po.Out, bad); len(errs) > 0 {
		return nil, errs
	}
	if col, err := inputInOut(&po, out); err != nil {
		return nil, inputs.BatchErrors{bad(col, err)}
	}
	if err := outdir.LengthError(po.Out); err != nil {
		// Run would refuse it only after the studies before it ran.
		return nil, inputs.BatchErrors{bad("id", fmt.Errorf("%s; the study's folder is --out/<id>: shorten --out or the id", fault.UserText(err)))}
	}
	st := &study{id: row.ID, line: row.Line, opts: po, dir: po.Out}
	if col, err := missingInput(&po); err != nil {
		// Not the table's fault alone (a file may be
		// removed or not yet written): this study fails,
		// the others still run. A SLURM plan refuses it
		// (runSlurm), before anything is submitted.
		st.missing = bad(col, err)
	}
	st.canonical = canonicalSettings(po)
	st.settings = batch.SettingsHash(st.canonical)
	return st, nil
}

// rowError returns the function that words a problem of row's setting
// column (its key) in the table file: at the row's line, or, when the row
// takes that setting from the shared settings, at the shared line that
// gives it (inputs.BatchError.Shared), so that a bad shared value is not
// sent to look for a column the table may not have.
func rowError(file string, row inputs.BatchStudy) func(column string, err error) *inputs.BatchError {
	return func(column string, err error) *inputs.BatchError {
		if line, shared := row.SharedLines[column]; shared && column != "" {
			return &inputs.BatchError{File: file, Line: line, Column: column, Shared: true, Studies: []string{row.ID}, Err: err}
		}
		return &inputs.BatchError{File: file, Line: row.Line, Column: column, Study: row.ID, Err: err}
	}
}

// mergeShared makes the problems of one shared setting that several rows
// meet alike (the same line, key and message) one problem naming their
// studies, in table order: "# e: 1.5" gave one line per study.
func mergeShared(errs inputs.BatchErrors) inputs.BatchErrors {
	var out inputs.BatchErrors
	first := map[string]*inputs.BatchError{}
	for _, e := range errs {
		if !e.Shared {
			out = append(out, e)
			continue
		}
		k := fmt.Sprintf("%d\x00%s\x00%s", e.Line, e.Column, e.Err.Error())
		if f, seen := first[k]; seen {
			f.Studies = append(f.Studies, e.Studies...)
			continue
		}
		c := *e
		c.Studies = append([]string(nil), e.Studies...)
		first[k] = &c
		out = append(out, &c)
	}
	return out
}

// rowOptions lays a row's settings (the shared block's and its own) over
// the defaults, with the study's folder as its --out.
func rowOptions(row *inputs.Study, out string) pipeline.Options {
	po := pipeline.Options{Values: settings.Defaults()}
	row.Apply(&po.Values, func(string) bool { return false }) // no flag: the row and the shared block say all
	po.Out = out
	return po
}

// rowProblems checks a row as run checks its flags (the message names the
// setting as a flag, "--e ...", which gives the table's column) and lists
// every problem of it, not the first only: after each, the setting it
// names is taken back to its default and the row checked again, so that a
// row with a bad --e and a bad --fraction names both in one round. A
// problem that names no column, or one already named, ends the list (its
// default would only repeat or hide it).
func rowProblems(row *inputs.Study, out string, bad func(string, error) *inputs.BatchError) inputs.BatchErrors {
	return settingProblems(row, out, nil, bad)
}

// placeholders stand in for a refused row's required keys that were
// refused or left out (already reported), so that the row's other
// settings are checked too rather than stopping at "no model given".
// They are only checked, never run or opened.
var placeholders = map[string]any{"model": []string{"m=refused"}, "occurrences": "refused", "region": "refused"}

// refusedProblems lists the problems of a row the table's reading already
// refused (a cell that does not read, a missing required key) that its
// other settings give: a row with iterations "abc" and e 1.5 named the
// first only, so the second came to light only once it was fixed. The
// keys already reported are not reported again.
func refusedProblems(row inputs.RefusedStudy, out string, bad func(string, error) *inputs.BatchError) inputs.BatchErrors {
	left := inputs.Study{}
	if row.Study != nil {
		maps.Copy(left, *row.Study)
	}
	named := maps.Clone(row.Reported)
	for k, v := range placeholders {
		if _, set := left[k]; !set || named[k] {
			left[k] = v
			named[k] = true
		}
	}
	return settingProblems(&left, out, named, bad)
}

// settingProblems is rowProblems with the keys in named already reported:
// a problem on one of them ends the list unreported.
func settingProblems(row *inputs.Study, out string, named map[string]bool, bad func(string, error) *inputs.BatchError) inputs.BatchErrors {
	var errs inputs.BatchErrors
	left := inputs.Study{}
	if row != nil {
		maps.Copy(left, *row)
	}
	named = maps.Clone(named)
	if named == nil {
		named = map[string]bool{}
	}
	for range len(inputs.StudyKeys()) + 1 {
		po := rowOptions(&left, out)
		err := po.Validate()
		if err == nil {
			break
		}
		col := flagColumn(err.Error())
		if named[col] {
			break
		}
		errs = append(errs, bad(col, err))
		if _, set := left[col]; col == "" || !set {
			break
		}
		named[col] = true
		delete(left, col)
	}
	return errs
}

// selectOnly keeps the studies o.Only names, in table order, and refuses
// an id that is not in the table.
func selectOnly(o *Options, studies []*study) ([]*study, error) {
	keep := map[string]bool{}
	for _, id := range o.Only {
		keep[strings.ToLower(id)] = true
	}
	var sel []*study
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
	return sel, nil
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
		if err != nil && pipeline.WindowsPath(path) {
			return fmt.Errorf("%s does not exist: %s", path, pipeline.BackslashAdvice(path))
		}
		if err != nil {
			return fmt.Errorf("%s does not exist or cannot be read; check the path", path)
		}
		if st.IsDir() && !strings.HasSuffix(strings.ToLower(path), ".gdb") {
			return fmt.Errorf("%s is a folder, not a file", path)
		}
		return nil
	}
	for _, in := range inputColumns(o) {
		if err := check(in.col, in.path); err != nil {
			return in.col, err
		}
	}
	return "", nil
}

// columnPath is an input file of a study and the table column naming it.
type columnPath struct{ col, path string }

// inputColumns lists the input files of o, each with its column: models,
// nulls and extra layers, then occurrences, the file --occurrences-crs
// names (when it names one), region and ecoregions.
func inputColumns(o *pipeline.Options) []columnPath {
	var out []columnPath
	for _, l := range []struct {
		col   string
		items []string
	}{{"model", o.Models}, {"null", o.Nulls}, {"extra", o.Extra}} {
		for _, m := range l.items {
			_, path, _ := inputs.ParseNamedPath(m)
			out = append(out, columnPath{l.col, path})
		}
	}
	for _, p := range []columnPath{{"occurrences", o.Occurrences}, {"occurrences-crs", o.CRSFile()}, {"region", o.Region}, {"ecoregions", o.Ecoregions}} {
		if p.path != "" {
			out = append(out, p)
		}
	}
	return out
}

// inputInOut refuses an input file of o that lies inside the batch's
// --out folder out: in a study's folder (another study's outputs, which
// may not be written yet when this study starts, and which that study's
// rerun replaces), in the batch's own folder, or beside the summary. The
// study's numbers would depend on the order the studies run in; the
// message names the column and says to copy the file out.
func inputInOut(o *pipeline.Options, out string) (string, error) {
	for _, in := range inputColumns(o) {
		if in.path == "" || !outdir.Inside(in.path, out) {
			continue
		}
		where := out
		if rel, err := filepath.Rel(outdir.RealPath(out), outdir.RealPath(in.path)); err == nil {
			if first, _, nested := strings.Cut(filepath.ToSlash(rel), "/"); nested {
				where = filepath.Join(out, first) // a study's folder, or the batch's own
			}
		}
		return in.col, fmt.Errorf("%s lies in %s, which this batch writes (--out %s): a study's input cannot be what the batch writes, since another study's outputs may not exist yet when it starts and a rerun replaces them; copy the file to a folder outside %s and name the copy", in.path, where, out, out)
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

// markerValues is the marker key holding the study's settings as hashed
// (canonicalSettings' JSON, one line), from which settingsDiff names what
// changed; markers written before it have none.
const markerValues = "settings.values"

// maxDiffShown is how many changed settings settingsDiff names.
const maxDiffShown = 3

// settingsDiff names the settings (by their flags and study-file keys,
// in the settings table's order) whose values differ between the
// canonical settings a marker recorded (was) and the row's now,
// "iterations 200 then, 250 now", at most maxDiffShown of them; "" when
// was is empty or does not decode, or no setting of the table differs.
func settingsDiff(was string, now []byte) string {
	var a, b pipeline.Options
	if was == "" || json.Unmarshal([]byte(was), &a) != nil || json.Unmarshal(now, &b) != nil {
		return ""
	}
	var out []string
	ch := settings.Changes(&a.Values, &b.Values)
	for i, c := range ch {
		if i == maxDiffShown {
			out = append(out, fmt.Sprintf("and %d more", len(ch)-i))
			break
		}
		out = append(out, fmt.Sprintf("%s %s then, %s now", c.Name, c.A, c.B))
	}
	return strings.Join(out, "; ")
}
