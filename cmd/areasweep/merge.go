package main

import (
	"context"
	"errors"
	"fmt"
	"path/filepath"

	"github.com/spf13/cobra"

	"areasweep/cmd/internal/fault"
	"areasweep/cmd/internal/pipeline"
	"areasweep/cmd/internal/settings"
)

// MergeOptions merges the partial files of a run's shards.
type MergeOptions struct {
	IO      *IO
	Files   []string
	Out     string
	Force   bool
	Quiet   bool
	Workers int
}

func newMergeCmd(streams *IO, runF func(*MergeOptions) error) *cobra.Command {
	opts := &MergeOptions{IO: streams, Out: "areasweep-out"}
	cmd := &cobra.Command{
		Use:   "merge --out DIR SHARD...",
		Short: "Combine the partial files of 'run --shard I/N' into the outputs of the whole run",
		Long: `merge reads the partial files (shard-I-of-N.aspf) that 'run --shard I/N' wrote, given
as files or as the folders holding them, checks that they are exactly the shards 1..N
of one run (same areasweep version and build, input files, settings and seed; none
missing or given twice), prepares that run again from the inputs and settings the
shards recorded, adds up the shards' sums and writes the run's outputs into --out:
results.json and scores.csv are byte for byte those of a single run. Run the shards
and the merge with one executable (or copies of it): a build of the same sources
elsewhere is another build, and its shards are refused.`,
		Example: `  areasweep run --study study.yaml --shard 1/2 --out shards/1
  areasweep run --study study.yaml --shard 2/2 --out shards/2
  areasweep merge --out results shards/1 shards/2`,
		Args: func(c *cobra.Command, args []string) error {
			if len(args) == 0 {
				return errors.New("no partial file given: name the shards' .aspf files or the folders holding them (see 'areasweep merge --help')")
			}
			return nil
		},
		RunE: func(c *cobra.Command, args []string) error {
			opts.Files = args
			if err := checkWorkers(opts.Workers); err != nil {
				return err
			}
			if opts.Out == "" {
				// Said before the run is prepared again from the inputs,
				// as run says it.
				return fault.BadInput(errors.New("--out is empty; name an output directory"))
			}
			if runF != nil {
				return runF(opts)
			}
			return mergeRun(opts)
		},
	}
	f := cmd.Flags()
	f.Var(&onceString{p: &opts.Out, name: "out"}, "out", "output directory `DIR` (an existing non-empty one needs --force)")
	f.BoolVar(&opts.Force, "force", false, "replace areasweep's files in an existing output directory (other files are kept)")
	f.BoolVar(&opts.Quiet, "quiet", false, "no progress bars, no log lines and no answer line on standard error")
	wholeVar(f, &opts.Workers, "workers", 0, fmt.Sprintf("goroutines `N`, 1 to %d (default, or 0: all cores); results do not depend on it", settings.MaxWorkers))
	return cmd
}

func mergeRun(o *MergeOptions) error {
	log := &pipeline.Log{}
	setRunLog(log)
	defer setRunLog(nil)
	mo := pipeline.MergeOptions{Files: o.Files, Out: o.Out, Force: o.Force, Quiet: o.Quiet, Workers: o.Workers, Version: version, Build: buildID()}
	res, err := pipeline.Merge(context.Background(), mo, pipeline.IO{ErrOut: o.IO.ErrOut, Terminal: o.IO.Terminal, Log: log})
	if err != nil {
		return err
	}
	if !o.Quiet {
		printAnswer(o.IO.ErrOut, res)
	}
	fmt.Fprintf(o.IO.Out, "report: %s\n", filepath.Join(o.Out, "report.html"))
	return nil
}
