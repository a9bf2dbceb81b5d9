package main

import (
	"bytes"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"io/fs"
	"os"
	"path/filepath"
	"reflect"
	"strconv"
	"strings"

	"github.com/spf13/cobra"

	"areasweep/cmd/internal/fault"
	"areasweep/cmd/internal/outdir"
	"areasweep/report"
	"areasweep/report/outfile"
)

// maxResultsBytes bounds the results.json that report reads (our choice).
// The file grows with models x extents (scores, curves, paired records),
// not with cells: the demo's 3 models x 13 extents write about 1.5 MB, so
// even 1024 extents stay under it for a handful of models.
const maxResultsBytes = 1 << 30

// ReportOptions re-renders a finished run's report.
type ReportOptions struct {
	IO    *IO
	Dir   string
	Force bool
}

func newReportCmd(streams *IO, runF func(*ReportOptions) error) *cobra.Command {
	opts := &ReportOptions{IO: streams}
	cmd := &cobra.Command{
		Use:   "report DIR",
		Short: "Re-render the report of a finished run from its results.json",
		Long: `report reads DIR/results.json, recomputes the sensitivity analysis and rewrites
DIR/report.html, DIR/methods.md and DIR/figures/ (each file replaced atomically).
The scores themselves are not recomputed. Existing report files are replaced only
with --force.`,
		Example: "  areasweep report areasweep-out --force",
		Args:    cobra.ExactArgs(1),
		RunE: func(c *cobra.Command, args []string) error {
			opts.Dir = args[0]
			if runF != nil {
				return runF(opts)
			}
			return reportRun(opts)
		},
	}
	cmd.Flags().BoolVar(&opts.Force, "force", false, "replace the report files already in DIR")
	return cmd
}

func reportRun(o *ReportOptions) error {
	if st, err := os.Stat(o.Dir); err == nil && st.Mode().IsRegular() {
		if filepath.Base(o.Dir) != "results.json" {
			return fault.BadInput(fmt.Errorf("%s is a file; give the --out directory of a finished run (the folder holding results.json)", o.Dir))
		}
		o.Dir = filepath.Dir(o.Dir) // the results file itself: its folder is the run's
	}
	path := filepath.Join(o.Dir, "results.json")
	st, err := os.Stat(path)
	if err != nil {
		if shards, _ := filepath.Glob(filepath.Join(o.Dir, "shard-*-of-*.aspf")); len(shards) > 0 {
			return fault.BadInput(fmt.Errorf("%s holds the partial file(s) of a sharded run (%s), not its results: merge the shards first (areasweep merge --out DIR SHARD...), then the report is in DIR", o.Dir, filepath.Base(shards[0])))
		}
		return fault.BadInput(fmt.Errorf("%s not found: give the --out directory of a finished run", path))
	}
	if !st.Mode().IsRegular() {
		return fault.BadInput(fmt.Errorf("%s is not a regular file: give the --out directory of a finished run", path))
	}
	if st.Size() > maxResultsBytes {
		return fault.BadInput(fmt.Errorf("%s is larger than %d MiB, more than a run writes; is this the right folder?", path, maxResultsBytes>>20))
	}
	if !o.Force {
		for _, f := range []string{"report.html", "methods.md", "figures"} {
			if _, err := os.Stat(filepath.Join(o.Dir, f)); err == nil {
				return fault.BadInput(fmt.Errorf("%s already holds %s; add --force to re-render the report in place", o.Dir, f))
			}
		}
	}
	if st, err := os.Lstat(filepath.Join(o.Dir, "figures")); err == nil && !st.IsDir() {
		return fault.BadInput(fmt.Errorf("%s is a file; the report writes its figures into a folder of that name: move the file, then run again", filepath.Join(o.Dir, "figures")))
	}
	data, err := os.ReadFile(path)
	if err != nil {
		return fault.BadInput(fmt.Errorf("%s cannot be read: %v", path, outdir.Cause(err)))
	}
	shapeErr := checkShape(data)
	data = nil
	r, err := report.Load(path)
	if err != nil && (shapeErr == nil || strings.Contains(err.Error(), "schema_version") || strings.HasPrefix(shapeErr.Error(), shapePath(""))) {
		return fault.BadInput(err) // not a JSON object at all, or of another schema
	}
	if shapeErr != nil {
		return fault.BadInput(fmt.Errorf("report: %s is not a results file written by areasweep as it stands (%v); the file was changed or damaged: rerun areasweep run to get a new one", path, shapeErr))
	}
	if err := report.Validate(r); err != nil {
		return fault.BadInput(err)
	}
	if err := report.Analyze(r); err != nil {
		return fault.BadInput(err)
	}
	note := fmt.Sprintf("the report files in %s were left as they were", o.Dir)
	stoppedNote.Store(&note)
	st2, err := outdir.Stage(o.Dir)
	if err != nil {
		return fault.BadInput(fmt.Errorf("%s: cannot write in it (%v); re-render the report of a folder you can write to, e.g. a copy of it", o.Dir, outdir.Cause(err)))
	}
	defer st2.Abort()
	if err := report.Write(st2.Path, r); err != nil {
		return fmt.Errorf("writing the report failed: %s; the report files in %s were not changed", outdir.Cause(err), o.Dir)
	}
	if err := st2.Finish(func() error { return placeReport(st2.Path, o.Dir) }); err != nil {
		return fmt.Errorf("moving the report into %s failed: %s", o.Dir, outdir.Cause(err))
	}
	fmt.Fprintf(o.IO.Out, "report: %s\n", filepath.Join(o.Dir, "report.html"))
	return nil
}

// placeReport moves the report rendered into stage into dir: each figure
// file into dir/figures (made if missing), then methods.md, then
// report.html. Figure files of an earlier report that this one does not
// draw (pages of ring_steps it no longer has) and temporary files left by
// a killed earlier version are removed; any other file in figures/ is the
// user's and stays.
func placeReport(stage, dir string) error {
	figDir := filepath.Join(dir, "figures")
	if err := os.Mkdir(figDir, outdir.MkdirPerm()); err != nil && !errors.Is(err, fs.ErrExist) {
		return err
	}
	figs, err := os.ReadDir(filepath.Join(stage, "figures"))
	if err != nil {
		return err
	}
	drawn := map[string]bool{}
	for _, f := range figs {
		drawn[f.Name()] = true
		if err := os.Rename(filepath.Join(stage, "figures", f.Name()), filepath.Join(figDir, f.Name())); err != nil {
			return err
		}
	}
	old, err := os.ReadDir(figDir)
	if err != nil {
		return err
	}
	for _, f := range old {
		if n := f.Name(); f.Type().IsRegular() && !drawn[n] && (report.IsFigureFile(n) || outfile.IsTemp(n)) {
			if err := os.Remove(filepath.Join(figDir, n)); err != nil {
				return err
			}
		}
	}
	for _, n := range []string{"methods.md", "report.html"} {
		if err := os.Rename(filepath.Join(stage, n), filepath.Join(dir, n)); err != nil {
			return err
		}
	}
	return nil
}

// checkShape walks a results file's JSON against the type of
// report.Results before it is decoded, because decoding alone accepts what
// a hand edit can break silently: a key given twice (the last wins), a
// field left out or null (it reads as 0), a value of the wrong kind or
// not JSON (NaN) reported without its place. Each problem names the
// field's path, e.g. scores[4].auc. Absent fields and unknown keys are
// let through (see walkObject).
func checkShape(data []byte) error {
	dec := json.NewDecoder(bytes.NewReader(data))
	dec.UseNumber()
	if err := walkShape(dec, "", reflect.TypeOf(report.Results{}), 0); err != nil {
		return err
	}
	if _, err := dec.Token(); err != io.EOF {
		return errors.New("more JSON follows the results object")
	}
	return nil
}

func shapePath(path string) string {
	if path == "" {
		return "the top level"
	}
	return cut(path)
}

// walkShape reads one value at path and checks it against t (nil: any).
func walkShape(dec *json.Decoder, path string, t reflect.Type, depth int) error {
	if depth > maxShapeDepth {
		return fmt.Errorf("%s: lists and objects nested more than %d deep; a run writes at most a few levels", shapePath(path), maxShapeDepth)
	}
	tok, err := dec.Token()
	if err != nil {
		return jsonBroken(dec, path, err)
	}
	for t != nil && t.Kind() == reflect.Pointer {
		if tok == nil {
			return nil
		}
		t = t.Elem()
	}
	want := ""
	switch {
	case t == nil:
	case tok == nil:
		if t.Kind() == reflect.Slice {
			return nil // a nil list, as a run may write it
		}
		return fmt.Errorf("%s is null; a run writes a value there", shapePath(path))
	case t.Kind() == reflect.Struct:
		want = "an object"
	case t.Kind() == reflect.Slice || t.Kind() == reflect.Array:
		want = "a list"
	case t.Kind() == reflect.String:
		want = "a string"
	case t.Kind() == reflect.Bool:
		want = "true or false"
	case t.Kind() >= reflect.Int && t.Kind() <= reflect.Uint64:
		want = "a whole number"
	case t.Kind() == reflect.Float32 || t.Kind() == reflect.Float64:
		want = "a number"
	}
	switch v := tok.(type) {
	case json.Delim:
		if v == '{' {
			if want != "" && want != "an object" {
				return fmt.Errorf("%s holds an object; a run writes %s there", shapePath(path), want)
			}
			_, err := walkObject(dec, path, t, depth)
			return err
		}
		if want != "" && want != "a list" {
			return fmt.Errorf("%s holds a list; a run writes %s there", shapePath(path), want)
		}
		var elem reflect.Type
		if t != nil {
			elem = t.Elem()
		}
		for i := 0; dec.More(); i++ {
			at := fmt.Sprintf("%s[%d]", path, i)
			if err := walkShape(dec, at, elem, depth+1); err != nil {
				return err
			}
		}
		return closeShape(dec, path)
	case string:
		if want != "" && want != "a string" {
			return fmt.Errorf("%s holds the string %q; a run writes %s there", shapePath(path), cut(v), want)
		}
	case bool:
		if want != "" && want != "true or false" {
			return fmt.Errorf("%s holds %v; a run writes %s there", shapePath(path), v, want)
		}
	case json.Number:
		switch want {
		case "", "a number":
			if _, err := strconv.ParseFloat(string(v), 64); err != nil {
				return fmt.Errorf("%s: %s is out of range", shapePath(path), cut(string(v)))
			}
		case "a whole number":
			if _, err := strconv.ParseInt(string(v), 10, 64); err != nil {
				return fmt.Errorf("%s holds %s; a run writes a whole number there", shapePath(path), cut(string(v)))
			}
		default:
			return fmt.Errorf("%s holds the number %s; a run writes %s there", shapePath(path), cut(string(v)), want)
		}
	}
	return nil
}

// walkObject reads the members of an object after its '{' and returns
// its keys. A field left out is not refused: files of earlier builds of
// the same schema lack fields later ones write, and an unscored score
// may lack its placements.
func walkObject(dec *json.Decoder, path string, t reflect.Type, depth int) (map[string]bool, error) {
	fields := map[string]reflect.Type{}
	if t != nil {
		for i := 0; i < t.NumField(); i++ {
			f := t.Field(i)
			tag := f.Tag.Get("json")
			name, _, _ := strings.Cut(tag, ",")
			if !f.IsExported() || name == "-" {
				continue
			}
			if name == "" {
				name = f.Name
			}
			fields[name] = f.Type
		}
	}
	seen := map[string]bool{}
	for dec.More() {
		tok, err := dec.Token()
		if err != nil {
			return nil, jsonBroken(dec, path, err)
		}
		key := tok.(string)
		at := key
		if path != "" {
			at = path + "." + key
		}
		if seen[key] {
			return nil, fmt.Errorf("%s is given twice; keep one", at)
		}
		seen[key] = true
		var ft reflect.Type
		if f, ok := fields[key]; ok {
			ft = f
		}
		if err := walkShape(dec, at, ft, depth+1); err != nil {
			return nil, err
		}
	}
	if err := closeShape(dec, path); err != nil {
		return nil, err
	}
	return seen, nil
}

// maxShapeDepth bounds the nesting of a results file (a run writes 4
// levels at most; our bound).
const maxShapeDepth = 32

// closeShape reads the ']' or '}' that ends the list or object at path.
func closeShape(dec *json.Decoder, path string) error {
	if _, err := dec.Token(); err != nil {
		return jsonBroken(dec, path, err)
	}
	return nil
}

// jsonBroken says where the JSON of a results file stops being JSON.
func jsonBroken(dec *json.Decoder, path string, err error) error {
	if err == io.EOF || errors.Is(err, io.ErrUnexpectedEOF) {
		return fmt.Errorf("%s: the file is cut short there", shapePath(path))
	}
	return fmt.Errorf("%s: not valid JSON there (at byte %d: %v; JSON has no NaN or Infinity)", shapePath(path), dec.InputOffset(), err)
}

// cut shortens a quoted value to 60 characters.
func cut(s string) string {
	if len(s) > 60 {
		return s[:60] + "..."
	}
	return s
}
