package main

import (
	"context"
	"fmt"
	"math"
	"path/filepath"
	"regexp"
	"sort"
	"strconv"
	"strings"

	"github.com/spf13/cobra"
	"github.com/spf13/pflag"

	"areasweep/cmd/internal/fault"
	"areasweep/cmd/internal/inputs"
	"areasweep/cmd/internal/outdir"
	"areasweep/cmd/internal/pipeline"
	"areasweep/cmd/internal/settings"
	"areasweep/extent"
	"areasweep/report"
)

// RunOptions holds everything a run needs: the streams, the study file
// and the pipeline's options. Flags (bound from settings.Table) and the
// study file fill it; flags given on the command line win over the file.
type RunOptions struct {
	IO    *IO
	Study string
	// Shard is --shard I/N (run only); N = 0 when not given.
	Shard shardFlag
	pipeline.Options
	// fromFile holds the settings the study file gave and the command
	// line did not (resolve), for fromStudy.
	fromFile map[string]bool
}

// maxBuffers bounds each buffer list (our choice); the family holds at
// most extent.MaxMembers members anyway.
const maxBuffers = extent.MaxMembers

// defaultRunOptions are the settings used when neither flag nor file says.
func defaultRunOptions() RunOptions {
	return RunOptions{Options: pipeline.Options{Values: settings.Defaults()}}
}

const runExample = `  # everything from flags (negative buffer distances need the = form)
  areasweep run --model gbm=suit.tif --occurrences points.csv --region m.gpkg \
    --region-buffers=-50,100,250,500 --point-buffers 50,100 --e 0.05,0.1 \
    --iterations 1000 --seed 7 --out sweep1

  # from a study file, overriding one setting
  areasweep run --study study.yaml --iterations 200 --out quick --force`

func newRunCmd(streams *IO, runF func(*RunOptions) error) *cobra.Command {
	opts := defaultRunOptions()
	opts.IO = streams
	cmd := &cobra.Command{
		Use:   "run",
		Short: "Build the extent family, score every model on every extent, write the report",
		Long: `run reads the model rasters once each, block by block, scores every extent of the
family in that one pass, and writes results.json, scores.csv, extents.gpkg, the report
and a run log into --out. Settings come from flags or from a study file (--study) whose
keys are the flag names; flags given on the command line override the file.`,
		Example: runExample,
		Args:    cobra.NoArgs,
		RunE:    sweepE(&opts, runF),
	}
	bindRunFlags(cmd.Flags(), &opts)
	cmd.Flags().Var(&opts.Shard, "shard", "score only shard `I/N` of the grid's rows and write its partial file shard-I-of-N.aspf into --out, for 'areasweep merge'")
	return cmd
}

// sweepE is the RunE of the commands that sweep (run, extents): it merges
// the study file under the flags, validates, and runs runF (tests) or the
// sweep.
func sweepE(opts *RunOptions, runF func(*RunOptions) error) func(*cobra.Command, []string) error {
	return func(c *cobra.Command, args []string) error {
		if err := opts.resolve(c.Flags()); err != nil {
			return fault.BadInput(err)
		}
		if runF != nil {
			return runF(opts)
		}
		return opts.fromStudy(sweep(opts, nil), runFlagRE)
	}
}

// sweep runs the pipeline on o into d (the demo's output folder) or, with
// d nil, into --out, and prints where the results are.
func sweep(o *RunOptions, d *outdir.Dir) error {
	if o.Shard.N > 0 {
		return shardSweep(o)
	}
	log := &pipeline.Log{}
	setRunLog(log)
	defer setRunLog(nil)
	po := o.Options
	po.StudyFile, po.Version = o.Study, version
	res, err := pipeline.RunInto(context.Background(), po, pipeline.IO{ErrOut: o.IO.ErrOut, Terminal: o.IO.Terminal, Log: log}, d)
	if err != nil {
		return err
	}
	if o.ExtentsOnly {
		fmt.Fprint(o.IO.Out, extentsTable(res.Extents))
		fmt.Fprintf(o.IO.Out, "extents written to %s\n", filepath.Join(o.Out, "extents.gpkg"))
	} else {
		fmt.Fprintf(o.IO.Out, "report: %s\n", filepath.Join(o.Out, "report.html"))
	}
	return nil
}

// floatList is a comma-separated list flag. Its help shows LIST and a
// default such as -50,50,100 (pflag's own slice type shows float64Slice
// and [0.050000]). The first use replaces the default; repeating the flag
// appends.
type floatList struct {
	p       *[]float64
	name    string
	changed bool
}

func (f *floatList) String() string {
	if f.p == nil {
		return ""
	}
	parts := make([]string, len(*f.p))
	for i, v := range *f.p {
		parts[i] = strconv.FormatFloat(v, 'g', -1, 64)
	}
	return strings.Join(parts, ",")
}

func (f *floatList) Set(s string) error {
	v, err := inputs.ParseFloatList(f.name, s)
	if err != nil {
		return err
	}
	if !f.changed {
		*f.p = v
	} else {
		*f.p = append(*f.p, v...)
	}
	f.changed = true
	return nil
}

func (f *floatList) Type() string { return "LIST" }

func floatListVar(fs *pflag.FlagSet, p *[]float64, name string, value []float64, usage string) {
	*p = value
	fs.Var(&floatList{p: p, name: name}, name, usage)
}

// wholeFlag is an int flag that takes a whole number as the study file
// takes the same key (inputs.ParseWhole: "1e3" and "1000.0" too). Its
// errors are strconv.ParseInt's, worded by the root's flag error hook.
type wholeFlag struct{ p *int }

func (w wholeFlag) String() string {
	if w.p == nil {
		return "0"
	}
	return strconv.Itoa(*w.p)
}

func (w wholeFlag) Set(s string) error {
	v, err := inputs.ParseWhole(s)
	if err != nil {
		return err
	}
	*w.p = v
	return nil
}

func (w wholeFlag) Type() string { return "int" }

// onceString is a string flag that may be given once: given again with
// another value it is refused, since only the last would be used and
// the other (an occurrence file, a region) left out without a word. The
// same value twice is accepted. Its Type is pflag's "string", so the
// help reads as before.
type onceString struct {
	p    *string
	name string
	set  bool
}

func (o *onceString) String() string {
	if o.p == nil {
		return ""
	}
	return *o.p
}

func (o *onceString) Set(s string) error {
	if o.set && s != *o.p {
		return fmt.Errorf("--%s is given twice (%q, then %q); only one is used: give it once", o.name, *o.p, s)
	}
	*o.p, o.set = s, true
	return nil
}

func (o *onceString) Type() string { return "string" }

// bindRunFlags binds the flags of run.
func bindRunFlags(f *pflag.FlagSet, o *RunOptions) { bindSweepFlags(f, o, true) }

// bindSweepFlags binds --study and one flag per row of settings.Table,
// with the row's type, help and the default already in o. For extents
// (scoring false) the scoring settings are accepted but hidden from its
// help, which shows only the flags that change the family or the files it
// writes.
func bindSweepFlags(f *pflag.FlagSet, o *RunOptions, scoring bool) {
	f.Var(&onceString{p: &o.Study, name: "study"}, "study", "study `FILE` (YAML) whose keys are these flag names")
	for _, s := range settings.Table {
		switch p := s.Field(&o.Values).(type) {
		case *string:
			f.Var(&onceString{p: p, name: s.Name}, s.Name, s.Usage)
		case *[]string:
			f.StringArrayVar(p, s.Name, *p, s.Usage)
		case *bool:
			f.BoolVar(p, s.Name, *p, s.Usage)
		case *int:
			f.Var(wholeFlag{p}, s.Name, s.Usage)
		case *uint64:
			f.Uint64Var(p, s.Name, *p, s.Usage)
		case *float64:
			f.Float64Var(p, s.Name, *p, s.Usage)
		case *[]float64:
			floatListVar(f, p, s.Name, *p, s.Usage)
		default:
			panic(fmt.Sprintf("setting %s: no flag for a %T", s.Name, p))
		}
		if s.Scoring && !scoring {
			// Accepted (a run's command line works for extents) but not
			// shown: extents scores nothing.
			f.MarkHidden(s.Name)
		}
	}
}

// resolve merges the study file under the flags and validates the result.
func (o *RunOptions) resolve(f *pflag.FlagSet) error {
	if o.Study != "" {
		st, err := inputs.LoadStudy(o.Study)
		if err != nil {
			return err
		}
		st.Apply(&o.Values, f.Changed)
		o.fromFile = map[string]bool{}
		for k := range *st {
			if !f.Changed(k) {
				o.fromFile[k] = true
			}
		}
		if err := o.validate(); err != nil {
			if e := o.fromStudy(err, flagNameRE); e != err {
				return e
			}
			if len(*st) == 0 && strings.HasPrefix(err.Error(), "no ") && strings.Contains(err.Error(), " given: add --") {
				// An empty file (not saved, or the wrong one) sets
				// nothing: the message about a missing input must say so.
				return fmt.Errorf("%w; the study file %s sets nothing (it is empty, or holds only comments and keys without values): is it the right file, and saved?", err, o.Study)
			}
			return err
		}
		return nil
	}
	return o.validate()
}

// flagNameRE finds the first flag a validation message names.
var flagNameRE = regexp.MustCompile(`--([a-z][a-z-]*)`)

// runFlagRE finds the flag a message of the run names first, at its start
// ("--occurrences-crs "3035" is not a CRS PROJ knows"): later in a
// message of the run a flag is more often advice than the culprit.
var runFlagRE = regexp.MustCompile(`^--([a-z][a-z-]*)`)

// fromStudy returns err saying where the setting it names by its flag
// (the first match of re) came from when the study file gave it and the
// command line did not: a user who wrote "occurrences-crs: 3035" in the
// file is told about the file and key, not only about a flag never typed.
// Any other err (nil included) is returned as it is.
func (o *RunOptions) fromStudy(err error, re *regexp.Regexp) error {
	if err == nil || len(o.fromFile) == 0 {
		return err
	}
	if m := re.FindStringSubmatch(err.Error()); m != nil && o.fromFile[m[1]] {
		return fmt.Errorf("%w (the value comes from the study file %s, key %s)", err, o.Study, m[1])
	}
	return err
}

// validate checks the settings that need no file access: the names, the
// inputs given, then the numbers, and --out; the first problem is
// reported.
func (o *RunOptions) validate() error {
	for _, check := range []func() error{o.validateNames, o.validateInputs, o.validateNumbers, o.validateLists} {
		if err := check(); err != nil {
			return err
		}
	}
	if o.Out == "" {
		return fmt.Errorf("--out is empty; name an output directory")
	}
	return nil
}

// validateNames checks that a model is given and that the names of the
// models, nulls and extra layers are well formed and distinct.
func (o *RunOptions) validateNames() error {
	if len(o.Models) == 0 && !o.ExtentsOnly {
		return fmt.Errorf("no model given: add --model NAME=PATH (or 'model:' in the study file)")
	}
	// Names are compared ignoring case: they become column names of
	// omitted_points.gpkg, which SQLite compares ignoring case, so "A" and
	// "a" would fail the run only when its outputs are written.
	seen := map[string]string{}
	for _, m := range o.Models {
		name, prev, err := namedOnce("--model", m, seen)
		switch {
		case err != nil:
			return err
		case prev == name:
			return fmt.Errorf("--model: name %q is given twice; give each model its own name", name)
		case prev != "":
			return fmt.Errorf("--model: names %q and %q differ only in case, which output tables do not tell apart; give each model its own name", prev, name)
		}
	}
	for _, m := range o.Nulls {
		name, prev, err := namedOnce("--null", m, seen)
		switch {
		case err != nil:
			return err
		case prev == name:
			return fmt.Errorf("--null: name %q is already used by a model or null; give each its own name", name)
		case prev != "":
			return fmt.Errorf("--null: name %q differs only in case from the model or null %q, which output tables do not tell apart; give each its own name", name, prev)
		}
	}
	if _, ok := seen[report.DistanceNullName]; ok && !o.NoDistanceNull {
		return fmt.Errorf("the name %q is kept for the distance-only null; rename that model (or add --no-distance-null)", report.DistanceNullName)
	}
	// Extra layers' names become extent names (user_NAME), compared
	// ignoring case for the same reason: "Lake" and "lake" could not be
	// told apart in a case-insensitive table or file system.
	extras := map[string]string{}
	for _, m := range o.Extra {
		name, prev, err := namedOnce("--extra", m, extras)
		switch {
		case err != nil:
			return err
		case prev == name:
			return fmt.Errorf("--extra: name %q is given twice; give each extra layer its own name", name)
		case prev != "":
			return fmt.Errorf("--extra: names %q and %q differ only in case, which output tables do not tell apart; give each extra layer its own name", prev, name)
		}
	}
	return nil
}

// namedOnce parses the NAME=PATH value v of flag and records its name in
// seen (keyed by the name in lower case): prev is the name seen before
// that equals it ignoring case, "" when there is none.
func namedOnce(flag, v string, seen map[string]string) (name, prev string, err error) {
	name, _, err = inputs.ParseNamedPath(v)
	if err != nil {
		return "", "", fmt.Errorf("%s %q: %w", flag, v, err)
	}
	key := strings.ToLower(name)
	prev = seen[key]
	if prev == "" {
		seen[key] = name
	}
	return name, prev, nil
}

// validateInputs checks that the inputs every run needs are named.
func (o *RunOptions) validateInputs() error {
	if o.Occurrences == "" {
		return fmt.Errorf("no occurrences given: add --occurrences FILE.csv")
	}
	if o.Region == "" {
		return fmt.Errorf("no base region given: add --region FILE (GeoPackage, Shapefile or GeoJSON)")
	}
	if o.Ecoregions != "" && o.EcoregionField == "" {
		return fmt.Errorf("--ecoregions needs --ecoregion-field NAME")
	}
	return nil
}

// validateNumbers checks the single numbers: counts, shares, E values,
// the worker count and the tolerances.
func (o *RunOptions) validateNumbers() error {
	if o.EcoregionMinPoints < 1 {
		return fmt.Errorf("--ecoregion-min-points is %d; it must be 1 or more", o.EcoregionMinPoints)
	}
	for _, e := range o.E {
		if !(e > 0 && e < 1) {
			return fmt.Errorf("--e value %g is outside (0,1); E is a share of test points, e.g. 0.05", e)
		}
	}
	if len(o.E) == 0 {
		return fmt.Errorf("--e is empty; give at least one allowable omission, e.g. 0.05")
	}
	if o.Iterations < 1 || o.Iterations > settings.MaxIterations {
		return fmt.Errorf("--iterations is %d; it must be between 1 and %d", o.Iterations, settings.MaxIterations)
	}
	if !(o.Fraction > 0 && o.Fraction <= 1) {
		return fmt.Errorf("--fraction %g is outside (0,1]", o.Fraction)
	}
	if o.Workers < 0 || o.Workers > settings.MaxWorkers {
		return fmt.Errorf("--workers is %d; give 1 to %d, or leave it out to use every core", o.Workers, settings.MaxWorkers)
	}
	for _, t := range []struct {
		name string
		v    float64
	}{{"tolerance-auc", o.ToleranceAUC}, {"tolerance-partial-roc", o.TolerancePartialROC}, {"tolerance-omission", o.ToleranceOmission}, {"tolerance-boyce", o.ToleranceBoyce}} {
		if !(t.v > 0) || math.IsInf(t.v, 0) {
			return fmt.Errorf("--%s is %g; give a positive difference you would treat as negligible", t.name, t.v)
		}
	}
	return nil
}

// validateLists checks the number lists: finite values, at most so many,
// E values and thresholds each given once, and the buffers' signs.
func (o *RunOptions) validateLists() error {
	for _, lst := range []struct {
		name string
		v    []float64
	}{{"region-buffers", o.RegionBuffers}, {"point-buffers", o.PointBuffers}, {"hull-buffers", o.HullBuffers}, {"thresholds", o.Thresholds}} {
		for _, v := range lst.v {
			if math.IsNaN(v) || math.IsInf(v, 0) {
				return fmt.Errorf("--%s holds %v; give finite numbers", lst.name, v)
			}
		}
	}
	for _, lst := range []struct {
		name string
		v    []float64
		max  int
		dups bool
	}{{"region-buffers", o.RegionBuffers, maxBuffers, true}, {"point-buffers", o.PointBuffers, maxBuffers, true},
		{"hull-buffers", o.HullBuffers, maxBuffers, true}, {"e", o.E, settings.MaxE, false}, {"thresholds", o.Thresholds, settings.MaxThresholds, false}} {
		if len(lst.v) > lst.max {
			return fmt.Errorf("--%s has %d values; at most %d are allowed", lst.name, len(lst.v), lst.max)
		}
		if lst.dups {
			continue // buffer lists are sorted and de-duplicated, as documented
		}
		sorted := append([]float64(nil), lst.v...)
		sort.Float64s(sorted)
		for i := 1; i < len(sorted); i++ {
			if sorted[i] == sorted[i-1] {
				return fmt.Errorf("--%s gives %g twice; give each value once", lst.name, sorted[i])
			}
		}
	}
	for _, lst := range []struct {
		name string
		v    []float64
	}{{"region-buffers", o.RegionBuffers}, {"point-buffers", o.PointBuffers}, {"hull-buffers", o.HullBuffers}} {
		for _, d := range lst.v {
			if math.Abs(d) > settings.MaxBufferKm {
				return fmt.Errorf("--%s value %g km: no two places on Earth lie more than %d km apart; give distances in km (e.g. 50 for 50,000 m); a buffer that large takes every cell (or, shrinking, none), and the family's whole_raster already holds every cell", lst.name, d, settings.MaxBufferKm)
			}
		}
	}
	for _, d := range o.PointBuffers {
		if d <= 0 {
			return fmt.Errorf("--point-buffers value %g must be positive (km)", d)
		}
	}
	for _, d := range o.HullBuffers {
		if d < 0 {
			return fmt.Errorf("--hull-buffers value %g must be 0 (the hull) or positive (km)", d)
		}
	}
	return o.validateOmitColumns()
}

// maxOmitFields is the most fields a layer of omitted_points.gpkg may
// have: SQLite holds at most 2,000 columns in a table (SQLITE_MAX_COLUMN),
// and a GeoPackage layer's table spends two on the feature id and the
// geometry.
const maxOmitFields = 2000 - 2

// validateOmitColumns refuses settings whose omitted_points.gpkg would
// need more columns than a GeoPackage table holds: line and
// nearest_train_km, and one per model or null and threshold (the two
// training-presence ones and each fixed one). Two models, the distance-only
// null and 1000 --thresholds (3,008 columns) ran to the end and failed
// there, exit 1, with SQLite's "too many columns on test_points".
func (o *RunOptions) validateOmitColumns() error {
	if o.ExtentsOnly {
		return nil
	}
	passes := len(o.Models) + len(o.Nulls)
	if !o.NoDistanceNull {
		passes++
	}
	cols := 2 + passes*(2+len(o.Thresholds))
	if passes == 0 || cols <= maxOmitFields {
		return nil
	}
	what := fmt.Sprintf("%d model(s) and null(s)", passes)
	if !o.NoDistanceNull {
		what += " (the distance-only null included)"
	}
	fix := fmt.Sprintf("give at most %d --thresholds", (maxOmitFields-2)/passes-2)
	if most := (maxOmitFields-2)/passes - 2; most < 0 {
		fix = fmt.Sprintf("give at most %d models and nulls together", (maxOmitFields-2)/2)
	} else if !o.NoDistanceNull {
		fix += ", or add --no-distance-null"
	}
	return fmt.Errorf("--thresholds has %d value(s): with %s, omitted_points.gpkg would need %d columns (one per model or null and threshold, the two training-presence thresholds included), more than the %d a GeoPackage table holds; %s",
		len(o.Thresholds), what, cols, maxOmitFields, fix)
}
