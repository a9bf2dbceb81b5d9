package main

import (
	"context"
	"fmt"
	"math"
	"path/filepath"
	"sort"
	"strconv"
	"strings"

	"github.com/spf13/cobra"
	"github.com/spf13/pflag"

	"areasweep/cmd/internal/fault"
	"areasweep/cmd/internal/inputs"
	"areasweep/cmd/internal/outdir"
	"areasweep/cmd/internal/pipeline"
	"areasweep/extent"
	"areasweep/report"
)

// RunOptions holds everything a run needs: the streams, the study file
// and the pipeline's settings. Flags and the study file fill it; flags
// given on the command line win over the file.
type RunOptions struct {
	IO    *IO
	Study string
	// Shard is --shard I/N (run only); N = 0 when not given.
	Shard shardFlag
	pipeline.Options
}

// Bounds on settings, so that a typo cannot ask for hours or for more
// memory than a machine has. Each is our own choice, far above real use.
const (
	// maxIterations bounds the bootstrap.
	maxIterations = 1_000_000
	// maxThresholds bounds --thresholds (each is an exact layout value and
	// a row per model and extent).
	maxThresholds = 1000
	// maxE bounds --e (one partial ROC bootstrap per value).
	maxE = 100
	// maxBuffers bounds each buffer list; the family holds at most
	// extent.MaxMembers members anyway.
	maxBuffers = extent.MaxMembers
	// maxWorkers bounds --workers: more goroutines than this only add
	// accumulators to merge.
	maxWorkers = 256
)

// defaultRunOptions are the settings used when neither flag nor file says.
func defaultRunOptions() RunOptions {
	return RunOptions{Options: pipeline.Options{
		EcoregionMinPoints: 1,
		RegionBuffers:      []float64{-50, 50, 100, 250, 500},
		PointBuffers:       []float64{50, 100, 200},
		HullBuffers:        []float64{0, 100},
		E:                  []float64{0.05},
		Iterations:         1000,
		Fraction:           0.5,
		Seed:               1,
		Out:                "areasweep-out",

		ToleranceAUC:        report.DefaultToleranceAUC,
		TolerancePartialROC: report.DefaultTolerancePartialROC,
		ToleranceOmission:   report.DefaultToleranceOmission,
		ToleranceBoyce:      report.DefaultToleranceBoyce,
	}}
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
		return sweep(opts, nil)
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

// bindRunFlags binds the flags of run. For extents (scoring false) the
// scoring flags are accepted but hidden from its help, which shows only the
// flags that change the family or the files it writes.
func bindRunFlags(f *pflag.FlagSet, o *RunOptions) { bindSweepFlags(f, o, true) }

func bindSweepFlags(f *pflag.FlagSet, o *RunOptions, scoring bool) {
	f.StringVar(&o.Study, "study", "", "study `FILE` (YAML) whose keys are these flag names")
	f.StringArrayVar(&o.Models, "model", nil, "model raster as `NAME=PATH` (repeatable; all on one grid)")
	f.StringArrayVar(&o.Nulls, "null", nil, "raster scored as a null, not a model, as `NAME=PATH` (repeatable; same grid): shown beside the models, never ranked")
	f.BoolVar(&o.NoDistanceNull, "no-distance-null", false, "skip the distance-only null (minus the distance to the nearest training point) and the sorting-bias ratios")
	f.StringVar(&o.Occurrences, "occurrences", "", "CSV `FILE` of occurrences: longitude, latitude and role (train/test) columns")
	f.StringVar(&o.OccurrencesCRS, "occurrences-crs", "", "`CRS` of the occurrence coordinates, e.g. EPSG:3035 (default WGS84 lon/lat)")
	f.StringVar(&o.Region, "region", "", "`FILE` of base study region polygons (GeoPackage, Shapefile, GeoJSON, any OGR format)")
	f.StringVar(&o.Ecoregions, "ecoregions", "", "optional ecoregion/unit polygon layer `FILE`")
	f.StringVar(&o.EcoregionField, "ecoregion-field", "", "id field `NAME` of the ecoregion layer")
	f.IntVar(&o.EcoregionMinPoints, "ecoregion-min-points", o.EcoregionMinPoints, "units with at least `K` training points are occupied")
	f.BoolVar(&o.EcoregionClip, "ecoregion-clip", false, "also add the ecoregion extents clipped to the base region")
	f.StringArrayVar(&o.Extra, "extra", nil, "extra extent polygons as `NAME=PATH` (repeatable)")
	floatListVar(f, &o.RegionBuffers, "region-buffers", o.RegionBuffers, "geodesic buffers of the base region in km, comma-separated; negative shrinks (write --region-buffers=-50,100)")
	floatListVar(f, &o.PointBuffers, "point-buffers", o.PointBuffers, "radii in km of discs around the training points, comma-separated")
	f.BoolVar(&o.PointBuffersAll, "point-buffers-all", false, "draw point buffers around all points, not only training points")
	floatListVar(f, &o.HullBuffers, "hull-buffers", o.HullBuffers, "buffers in km of the training points' convex hull, comma-separated (0 = the hull itself)")
	{
		floatListVar(f, &o.E, "e", o.E, "allowable omission E for partial ROC, each in (0,1), comma-separated")
		f.IntVar(&o.Iterations, "iterations", o.Iterations, fmt.Sprintf("resamples `B`: of the published partial ROC bootstrap and of the paired full-size resamples (1 to %d)", maxIterations))
		f.Float64Var(&o.Fraction, "fraction", o.Fraction, "share `F` of test points drawn (with replacement) in each bootstrap iteration, in (0,1]")
		floatListVar(f, &o.Thresholds, "thresholds", nil, fmt.Sprintf("fixed suitability thresholds to test besides the training-presence ones, comma-separated (at most %d)", maxThresholds))
		f.Uint64Var(&o.Seed, "seed", o.Seed, "random seed `N` of the bootstrap")
		f.IntVar(&o.Workers, "workers", 0, fmt.Sprintf("scoring goroutines `N`, 1 to %d (default: all cores); results do not depend on it", maxWorkers))
		f.Float64Var(&o.ToleranceAUC, "tolerance-auc", o.ToleranceAUC, "AUC difference `D` from the base extent you treat as negligible (our default)")
		f.Float64Var(&o.TolerancePartialROC, "tolerance-partial-roc", o.TolerancePartialROC, "partial ROC ratio difference `D` you treat as negligible (our default)")
		f.Float64Var(&o.ToleranceOmission, "tolerance-omission", o.ToleranceOmission, "omission-rate and predicted-area difference `D` you treat as negligible (our default)")
		f.Float64Var(&o.ToleranceBoyce, "tolerance-boyce", o.ToleranceBoyce, "Boyce index difference `D` you treat as negligible (our default)")
	}
	if !scoring {
		// Accepted (a run's command line works for extents) but not shown:
		// extents scores nothing.
		for _, n := range []string{"e", "iterations", "fraction", "thresholds", "seed", "workers", "tolerance-auc", "tolerance-partial-roc", "tolerance-omission", "tolerance-boyce", "null", "no-distance-null"} {
			f.MarkHidden(n)
		}
	}
	f.StringVar(&o.Out, "out", o.Out, "output directory `DIR` (an existing non-empty one needs --force)")
	f.BoolVar(&o.Force, "force", false, "replace areasweep's files in an existing output directory (other files are kept)")
	f.BoolVar(&o.Quiet, "quiet", false, "no progress bars and no log lines on standard error")
	f.BoolVar(&o.NoThin, "no-thin", false, "keep several presences of one role in one cell (default: one per cell)")
	f.BoolVar(&o.MembershipTIFF, "membership-tif", false, "also write extents.tif, one band per extent")
}

// resolve merges the study file under the flags and validates the result.
func (o *RunOptions) resolve(f *pflag.FlagSet) error {
	if o.Study != "" {
		st, err := inputs.LoadStudy(o.Study)
		if err != nil {
			return err
		}
		o.applyStudy(st, f)
	}
	return o.validate()
}

// applyStudy copies every setting of st whose flag was not given.
func (o *RunOptions) applyStudy(st *inputs.Study, f *pflag.FlagSet) {
	set := func(name string) bool { return !f.Changed(name) }
	slice := func(name string, dst *[]string, v []string) {
		if v != nil && set(name) {
			*dst = v
		}
	}
	slice("model", &o.Models, st.Model)
	slice("null", &o.Nulls, st.Null)
	slice("extra", &o.Extra, st.Extra)
	fromStudy(f, "occurrences", &o.Occurrences, st.Occurrences)
	fromStudy(f, "occurrences-crs", &o.OccurrencesCRS, st.OccurrencesCRS)
	fromStudy(f, "region", &o.Region, st.Region)
	fromStudy(f, "ecoregions", &o.Ecoregions, st.Ecoregions)
	fromStudy(f, "ecoregion-field", &o.EcoregionField, st.EcoregionField)
	fromStudy(f, "out", &o.Out, st.Out)
	fromStudy(f, "ecoregion-min-points", &o.EcoregionMinPoints, st.EcoregionMinPoints)
	fromStudy(f, "ecoregion-clip", &o.EcoregionClip, st.EcoregionClip)
	fromStudy(f, "point-buffers-all", &o.PointBuffersAll, st.PointBuffersAll)
	fromStudy(f, "no-thin", &o.NoThin, st.NoThin)
	fromStudy(f, "membership-tif", &o.MembershipTIFF, st.MembershipTIFF)
	fromStudy(f, "no-distance-null", &o.NoDistanceNull, st.NoDistanceNull)
	list := func(name string, dst *[]float64, v []float64) {
		if v != nil && set(name) {
			*dst = v
		}
	}
	list("region-buffers", &o.RegionBuffers, st.RegionBuffers)
	list("point-buffers", &o.PointBuffers, st.PointBuffers)
	list("hull-buffers", &o.HullBuffers, st.HullBuffers)
	list("e", &o.E, st.E)
	list("thresholds", &o.Thresholds, st.Thresholds)
	fromStudy(f, "iterations", &o.Iterations, st.Iterations)
	fromStudy(f, "fraction", &o.Fraction, st.Fraction)
	fromStudy(f, "seed", &o.Seed, st.Seed)
	fromStudy(f, "tolerance-auc", &o.ToleranceAUC, st.ToleranceAUC)
	fromStudy(f, "tolerance-partial-roc", &o.TolerancePartialROC, st.TolerancePartialROC)
	fromStudy(f, "tolerance-omission", &o.ToleranceOmission, st.ToleranceOmission)
	fromStudy(f, "tolerance-boyce", &o.ToleranceBoyce, st.ToleranceBoyce)
}

// fromStudy sets *dst to the study file's value v when the file gives one
// (v != nil) and the flag name was not given on the command line.
func fromStudy[T any](f *pflag.FlagSet, name string, dst *T, v *T) {
	if v != nil && !f.Changed(name) {
		*dst = *v
	}
}

// validate checks the settings that need no file access.
func (o *RunOptions) validate() error {
	if len(o.Models) == 0 && !o.ExtentsOnly {
		return fmt.Errorf("no model given: add --model NAME=PATH (or 'model:' in the study file)")
	}
	seen := map[string]bool{}
	for _, m := range o.Models {
		name, _, err := inputs.ParseNamedPath(m)
		if err != nil {
			return fmt.Errorf("--model %q: %w", m, err)
		}
		if seen[name] {
			return fmt.Errorf("--model: name %q is given twice; give each model its own name", name)
		}
		seen[name] = true
	}
	for _, m := range o.Nulls {
		name, _, err := inputs.ParseNamedPath(m)
		if err != nil {
			return fmt.Errorf("--null %q: %w", m, err)
		}
		if seen[name] {
			return fmt.Errorf("--null: name %q is already used by a model or null; give each its own name", name)
		}
		seen[name] = true
	}
	if seen[report.DistanceNullName] && !o.NoDistanceNull {
		return fmt.Errorf("the name %q is kept for the distance-only null; rename that model (or add --no-distance-null)", report.DistanceNullName)
	}
	for _, m := range o.Extra {
		if _, _, err := inputs.ParseNamedPath(m); err != nil {
			return fmt.Errorf("--extra %q: %w", m, err)
		}
	}
	if o.Occurrences == "" {
		return fmt.Errorf("no occurrences given: add --occurrences FILE.csv")
	}
	if o.Region == "" {
		return fmt.Errorf("no base region given: add --region FILE (GeoPackage, Shapefile or GeoJSON)")
	}
	if o.Ecoregions != "" && o.EcoregionField == "" {
		return fmt.Errorf("--ecoregions needs --ecoregion-field NAME")
	}
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
	if o.Iterations < 1 || o.Iterations > maxIterations {
		return fmt.Errorf("--iterations is %d; it must be between 1 and %d", o.Iterations, maxIterations)
	}
	if !(o.Fraction > 0 && o.Fraction <= 1) {
		return fmt.Errorf("--fraction %g is outside (0,1]", o.Fraction)
	}
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
		{"hull-buffers", o.HullBuffers, maxBuffers, true}, {"e", o.E, maxE, false}, {"thresholds", o.Thresholds, maxThresholds, false}} {
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
	if o.Workers < 0 || o.Workers > maxWorkers {
		return fmt.Errorf("--workers is %d; give 1 to %d, or leave it out to use every core", o.Workers, maxWorkers)
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
	for _, t := range []struct {
		name string
		v    float64
	}{{"tolerance-auc", o.ToleranceAUC}, {"tolerance-partial-roc", o.TolerancePartialROC}, {"tolerance-omission", o.ToleranceOmission}, {"tolerance-boyce", o.ToleranceBoyce}} {
		if !(t.v > 0) || math.IsInf(t.v, 0) {
			return fmt.Errorf("--%s is %g; give a positive difference you would treat as negligible", t.name, t.v)
		}
	}
	if o.Out == "" {
		return fmt.Errorf("--out is empty; name an output directory")
	}
	return nil
}
