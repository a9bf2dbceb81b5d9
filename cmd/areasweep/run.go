package main

import (
	"context"
	"fmt"
	"path/filepath"
	"regexp"
	"strconv"
	"strings"

	"github.com/spf13/cobra"
	"github.com/spf13/pflag"

	"areasweep/cmd/internal/fault"
	"areasweep/cmd/internal/inputs"
	"areasweep/cmd/internal/outdir"
	"areasweep/cmd/internal/pipeline"
	"areasweep/cmd/internal/settings"
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
		if !o.Quiet {
			printAnswer(o.IO.ErrOut, res)
		}
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

// wholeFlag is a whole-number flag read as the study file reads the
// same key, in decimal digits (inputs.ParseWhole for an int, which takes
// "1e3" and "1000.0" too, inputs.ParseWholeUint for a uint64): pflag's
// own int flags read "0701" as octal 449. Its errors are strconv's,
// worded by the root's flag error hook.
type wholeFlag[T int | uint64] struct {
	p     *T
	parse func(string) (T, error)
	typ   string
}

func (w wholeFlag[T]) String() string {
	if w.p == nil {
		return "0"
	}
	return fmt.Sprint(*w.p)
}

func (w wholeFlag[T]) Set(s string) error {
	v, err := w.parse(s)
	if err != nil {
		return err
	}
	*w.p = v
	return nil
}

func (w wholeFlag[T]) Type() string { return w.typ }

// wholeVar binds an int flag read by wholeFlag, with its default.
func wholeVar(fs *pflag.FlagSet, p *int, name string, value int, usage string) {
	*p = value
	fs.Var(wholeFlag[int]{p, inputs.ParseWhole, "int"}, name, usage)
}

// wholeUintVar binds a uint64 flag read by wholeFlag, with its default.
func wholeUintVar(fs *pflag.FlagSet, p *uint64, name string, value uint64, usage string) {
	*p = value
	fs.Var(wholeFlag[uint64]{p, inputs.ParseWholeUint, "uint"}, name, usage)
}

// onceString is a string flag that may be given once: given again with
// another value it is refused, since only the last would be used and
// the other (an occurrence file, a region) left out without a word. The
// same value twice is accepted. Its Type is pflag's "string", so the
// help reads as before.
type onceString struct {
	p    *string
	name string
	set  bool
	// empty, when set, refuses an empty value with these words after the
	// flag's name: a path flag given "" (a shell variable left unset)
	// would otherwise read as not given, and a study file's value would
	// be dropped or taken without a word.
	empty string
}

func (o *onceString) String() string {
	if o.p == nil {
		return ""
	}
	return *o.p
}

func (o *onceString) Set(s string) error {
	if s == "" && o.empty != "" {
		return fmt.Errorf("--%s is empty; %s", o.name, o.empty)
	}
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
	f.Var(&onceString{p: &o.Study, name: "study", empty: "name a study file, or leave the flag out"}, "study", "study `FILE` (YAML) whose keys are these flag names")
	for _, s := range settings.Table {
		switch p := s.Field(&o.Values).(type) {
		case *string:
			of := &onceString{p: p, name: s.Name}
			switch {
			case s.Name == "out":
				of.empty = "name an output directory"
			case s.Kind == settings.Path:
				of.empty = "name a file, or leave the flag out (a study file's value is then used)"
			}
			f.Var(of, s.Name, s.Usage)
		case *[]string:
			f.StringArrayVar(p, s.Name, *p, s.Usage)
		case *bool:
			f.BoolVar(p, s.Name, *p, s.Usage)
		case *int:
			wholeVar(f, p, s.Name, *p, s.Usage)
		case *uint64:
			wholeUintVar(f, p, s.Name, *p, s.Usage)
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
		if err := o.Validate(); err != nil {
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
	return o.Validate()
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
