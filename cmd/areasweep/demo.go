package main

import (
	"fmt"
	"os"
	"path/filepath"

	"github.com/spf13/cobra"
	"github.com/spf13/pflag"

	"areasweep/cmd/scenario"
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
	f.StringVar(&opts.Out, "out", opts.Out, "output directory")
	f.BoolVar(&opts.Force, "force", false, "replace an existing output directory")
	f.BoolVar(&opts.Quiet, "quiet", false, "no progress output")
	f.IntVar(&opts.Workers, "workers", 0, "scoring goroutines (default: all cores)")
	f.Uint64Var(&opts.Seed, "scenario-seed", opts.Seed, "seed of the invented landscape")
	return cmd
}

func demoRun(o *DemoOptions) error {
	if st, err := os.Stat(o.Out); err == nil && st.IsDir() {
		if entries, _ := os.ReadDir(o.Out); len(entries) > 0 && !o.Force {
			return badInput(fmt.Errorf("--out %s exists and is not empty; add --force to replace it", o.Out))
		}
	}
	// Inputs are generated outside --out first, then moved in with the results.
	tmp, err := os.MkdirTemp(filepath.Dir(filepath.Clean(o.Out)), ".areasweep-demo-inputs-")
	if err != nil {
		return fmt.Errorf("demo: %w", err)
	}
	defer os.RemoveAll(tmp)
	inDir := filepath.Join(tmp, "inputs")
	files, err := scenario.Write(inDir, o.Seed)
	if err != nil {
		return fmt.Errorf("demo: generate scenario: %w", err)
	}
	if !o.Quiet {
		fmt.Fprintf(o.IO.ErrOut, "demo: invented species %s written to %s\n", scenario.Species, inDir)
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
		return fmt.Errorf("demo: the generated study file is wrong: %w", err)
	}
	run.Out = o.Out
	run.inputsDir = inDir
	return sweep(&run)
}
