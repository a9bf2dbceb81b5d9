package main

import (
	"fmt"
	"os"
	"path/filepath"

	"github.com/spf13/cobra"
	"github.com/spf13/pflag"

	"areasweep/cmd/internal/fault"
	"areasweep/cmd/internal/outdir"
	"areasweep/cmd/internal/pipeline"
	"areasweep/cmd/internal/scenario"
	"areasweep/cmd/internal/settings"
	"areasweep/extent"
)

// DemoOptions runs the built-in demo.
type DemoOptions struct {
	IO      *IO
	Out     string
	Force   bool
	Quiet   bool
	Workers int
	Seed    uint64
}

func newDemoCmd(streams *IO, runF func(*DemoOptions) error) *cobra.Command {
	opts := &DemoOptions{IO: streams, Out: "areasweep-demo", Seed: 20261201}
	cmd := &cobra.Command{
		Use:   "demo",
		Short: "Write the invented demo scenario into DIR/inputs and run the whole analysis on it",
		Long: `demo generates an invented species on an invented landscape (EPSG:4326, with cell
areas that shrink towards the pole), writes its inputs (two models, occurrences, a base
region, ecoregion units and a study file) into --out/inputs, and runs the analysis with
the study file, writing the results into --out. Nothing in it is real data.`,
		Example: "  areasweep demo --out /tmp/demo\n  xdg-open /tmp/demo/report.html",
		Args:    cobra.NoArgs,
		RunE: func(c *cobra.Command, args []string) error {
			if runF != nil {
				return runF(opts)
			}
			return demoRun(opts)
		},
	}
	f := cmd.Flags()
	f.StringVar(&opts.Out, "out", opts.Out, "output directory `DIR`")
	f.BoolVar(&opts.Force, "force", false, "replace areasweep's files (inputs/ included) in an existing output directory")
	f.BoolVar(&opts.Quiet, "quiet", false, "no progress bars, no log lines and no answer line on standard error")
	wholeVar(f, &opts.Workers, "workers", 0, fmt.Sprintf("scoring goroutines `N`, 1 to %d (default, or 0: all cores)", settings.MaxWorkers))
	wholeUintVar(f, &opts.Seed, "scenario-seed", opts.Seed, "seed `N` of the invented landscape")
	return cmd
}

// demoRun generates the scenario inside the run's staging folder, so the
// generated inputs are removed with it on every exit path (an error, a
// signal, a crash) and arrive in --out/inputs with the results.
// writeScenario is scenario.Write; tests replace it to meet a full disk.
var writeScenario = scenario.Write

func demoRun(o *DemoOptions) error {
	if o.Workers < 0 || o.Workers > settings.MaxWorkers {
		return fault.BadInput(fmt.Errorf("--workers is %d; give 1 to %d, or leave it out to use every core", o.Workers, settings.MaxWorkers))
	}
	// --force replaces inputs/ as a whole (OpenDemo refuses names the
	// demo does not write there); a folder of the user's that holds only
	// such names (an occurrences.csv, a study.yaml) is theirs all the same.
	in := filepath.Join(o.Out, "inputs")
	if ents, err := os.ReadDir(in); err == nil && len(ents) > 0 && !scenario.IsDemoInputs(in) {
		return fault.BadInput(fmt.Errorf("--out %s holds %s, which the demo did not write (its study.yaml is not the demo's); the demo replaces that folder as a whole, --force or not: move it, or choose another --out", o.Out, in))
	}
	if err := extent.CheckSetup(); err != nil {
		return fault.BadInput(err) // the scenario's layers need it too
	}
	d, err := outdir.OpenDemo(o.Out, o.Force, scenario.FileNames())
	if err != nil {
		return err
	}
	defer d.Abort()
	d.Demo = true
	inDir := filepath.Join(d.Stage, "inputs")
	files, err := writeScenario(inDir, o.Seed)
	if err != nil {
		// A full disk says so, with what to do, naming --out rather than
		// the hidden staging folder (it said "demo: generate scenario:
		// create GeoPackage .../.d.areasweep-partial-.../inputs/ecoregions.gpkg:
		// sqlite3_exec(COMMIT) failed: database or disk is full").
		return pipeline.WriteFailedIn(o.Out, d.Stage, err)
	}
	if !o.Quiet {
		fmt.Fprintf(o.IO.ErrOut, "demo: invented species %s written to %s\n", scenario.Species, filepath.Join(o.Out, "inputs"))
	}
	run := defaultRunOptions()
	fs := pflag.NewFlagSet("demo", pflag.ContinueOnError)
	bindRunFlags(fs, &run)
	run.IO = o.IO
	run.Study = files.Study
	run.Force = o.Force
	run.Quiet = o.Quiet
	run.Workers = o.Workers
	if err := run.resolve(fs); err != nil {
		return fault.Internal(fmt.Errorf("demo: the generated study file is wrong: %w", err))
	}
	run.Out = o.Out
	run.InputsDir = inDir
	return sweep(&run, d)
}
