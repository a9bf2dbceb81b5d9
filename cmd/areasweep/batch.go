package main

import (
	"context"
	"errors"
	"fmt"
	"slices"
	"strings"

	"github.com/spf13/cobra"
	"github.com/spf13/pflag"

	"areasweep/cmd/internal/batch"
	"areasweep/cmd/internal/batchrun"
	"areasweep/cmd/internal/fault"
	"areasweep/cmd/internal/inputs"
	"areasweep/cmd/internal/settings"
	"areasweep/cmd/internal/slurm"
)

// BatchOptions runs every study of a study table: the command's streams,
// then the flags' values (batchrun.Options holds the batch's own).
type BatchOptions struct {
	IO *IO
	// Template prints an example study table and runs nothing.
	Template bool
	// cpusGiven says --cpus-per-task was given: its default, 1, cannot
	// tell a value given without --slurm from none (validateSlurm).
	cpusGiven bool
	// jobsGiven says --jobs was given, which --slurm refuses.
	jobsGiven bool
	batchrun.Options
}

const batchLong = `batch reads a study table (CSV or YAML: one row per study with its id, models,
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
(the summary lists each with its error), 2 for a bad table or flags (nothing ran).`

const batchExample = `  # start from the example table
  areasweep batch --template > studies.csv

  # run every study of the table, two at a time, into runs/<id>/
  areasweep batch studies.csv --out runs --jobs 2

  # after fixing a failed study's input: the same command runs only what is not done
  areasweep batch studies.csv --out runs --jobs 2

  # the same batch on a SLURM cluster: write the job files, submit them
  areasweep batch studies.csv --out /scratch/runs --slurm --submit`

func newBatchCmd(streams *IO, runF func(*BatchOptions) error) *cobra.Command {
	opts := &BatchOptions{IO: streams, Options: batchrun.Options{Version: version}}
	var memory string
	cmd := &cobra.Command{
		Use:     "batch TABLE",
		Short:   "Run every study of a study table, several at once, and summarise across them",
		Long:    batchLong,
		Example: batchExample,
		Args:    cobra.MaximumNArgs(1),
		RunE: func(c *cobra.Command, args []string) error {
			if opts.Template {
				if len(args) > 0 {
					return fault.BadInput(fmt.Errorf("--template prints an example table and takes no table, got %q: write it into a file with areasweep batch --template > %s", args[0], args[0]))
				}
				return inputs.WriteBatchTemplate(opts.IO.Out)
			}
			if len(args) == 0 {
				return fault.BadInput(errors.New("name the study table: areasweep batch TABLE --out DIR (areasweep batch --template prints an example)"))
			}
			opts.Table = args[0]
			if c.Flags().Changed("only") {
				if err := trimOnly(opts.Only); err != nil {
					return fault.BadInput(err)
				}
			}
			if c.Flags().Changed("shard") && opts.Shard == 0 {
				// 0 is also "not given": it would run every shard of
				// the study and merge them, in each task of an array
				// counted from 0 at once.
				return fault.BadInput(errors.New("--shard 0: shards are counted from 1 (1 <= I <= --shards); a scheduler array counted from 0 needs its task number plus 1"))
			}
			if c.Flags().Changed("memory") {
				m, err := batch.ParseBytes(memory)
				if err != nil {
					return fault.BadInput(fmt.Errorf("--memory %q: %w", memory, err))
				}
				if m < 1<<20 {
					// Budgets are counted in MiB: a smaller one would
					// refuse every study as needing more than 0 MiB.
					return fault.BadInput(fmt.Errorf("--memory %q is less than 1 MiB; it is the memory the studies running at once may use together (a study needs a few hundred MiB or more): give a size such as 8G", memory))
				}
				opts.Memory = m
			}
			opts.cpusGiven = c.Flags().Changed("cpus-per-task")
			opts.jobsGiven = c.Flags().Changed("jobs")
			if err := opts.validate(); err != nil {
				return fault.BadInput(err)
			}
			if runF != nil {
				return runF(opts)
			}
			opts.Build = buildID() // hashed only when a batch runs
			return batchRun(context.Background(), opts)
		},
	}
	f := cmd.Flags()
	f.StringVar(&opts.Out, "out", "", "output `DIR`: one folder per study, and the summary")
	wholeVar(f, &opts.Jobs, "jobs", 1, "studies run at once, `N` (each with all cores / N scoring workers; the results do not depend on it)")
	f.StringVar(&memory, "memory", "", "memory `SIZE` the running studies may need together, e.g. 8G or 512M (default: 80% of the available memory); with --slurm, the memory each task asks for (default: the largest study's estimate plus headroom)")
	f.StringSliceVar(&opts.Only, "only", nil, "run only these study `IDS` (comma-separated) and write no summary; for scheduler tasks")
	f.BoolVar(&opts.SummaryOnly, "summary-only", false, "run no study: merge the shards of studies whose shards all finished, then write the summary from the finished study folders")
	wholeVar(f, &opts.Shards, "shards", 1, "split each study into `N` shards of grid rows (run --shard), merged into the study's folder")
	wholeVar(f, &opts.Shard, "shard", 0, "with --only ID and --shards N: run only shard `I` of that study and no merge (a scheduler task)")
	f.BoolVar(&opts.Force, "force", false, "re-run studies whose table row or input files changed since they finished, and run studies into folders that exist without a completion marker (replacing areasweep's files in them, keeping any other file); never past an input file that cannot be read")
	f.BoolVar(&opts.Quiet, "quiet", false, "no progress lines on standard error")
	f.BoolVar(&opts.Template, "template", false, "print an example study table (CSV) and exit")
	bindSlurmFlags(f, &opts.Slurm)
	return cmd
}

// trimOnly trims the ids given to --only and refuses an empty one. A
// scheduler passes --only "$AREASWEEP_STUDY": empty, it must not mean
// "every study" (each task would run the whole table).
func trimOnly(only []string) error {
	for i, id := range only {
		only[i] = strings.TrimSpace(id)
	}
	if len(only) == 0 || (len(only) == 1 && only[0] == "") {
		return errors.New("--only is empty; name the study ids to run, comma-separated (is the variable that should hold them set?)")
	}
	if slices.Contains(only, "") {
		return fmt.Errorf("--only %q holds an empty id (a stray comma?); name the study ids, comma-separated", strings.Join(only, ","))
	}
	return nil
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
	case o.Slurm.Enabled && o.jobsGiven:
		// Ignored, it let every task of the array run at once.
		return fmt.Errorf("--jobs sets how many studies this machine runs at once; with --slurm each array task runs one study: use --max-parallel %d to run at most %d tasks at once, or leave --jobs out", o.Jobs, o.Jobs)
	}
	return validateSlurm(&o.Slurm, o.cpusGiven)
}

// bindSlurmFlags binds the flags of batch --slurm.
func bindSlurmFlags(f *pflag.FlagSet, o *batchrun.SlurmOptions) {
	f.BoolVar(&o.Enabled, "slurm", false, "write a SLURM job array (one task per study, or per study and shard with --shards) and a merge job that merges the shards and writes the summary, instead of running")
	f.BoolVar(&o.Submit, "submit", false, "with --slurm: submit the unfinished tasks and the merge job with sbatch")
	f.BoolVar(&o.Wait, "wait", false, "with --submit: wait until the jobs have left the queue and report the tasks that did not finish")
	f.StringVar(&o.Partition, "partition", "", "with --slurm: SLURM `PARTITION` of the jobs (default: the cluster's)")
	f.StringVar(&o.TimeLimit, "time", "", "with --slurm: time limit `TIME` per task, e.g. 02:00:00 (default: the partition's)")
	wholeVar(f, &o.CPUs, "cpus-per-task", 1, "with --slurm: CPUs per task `N` (each study uses them all)")
	wholeVar(f, &o.MaxParallel, "max-parallel", 0, "with --slurm: at most `K` tasks at once (0: no limit)")
}

// validateSlurm checks the flags of batch --slurm; cpusGiven says
// --cpus-per-task was given. A job resource given without --slurm is
// refused rather than ignored: the batch would run every study on this
// machine (a cluster's login node, say) instead of as the job asked for.
func validateSlurm(o *batchrun.SlurmOptions, cpusGiven bool) error {
	if !o.Enabled {
		var given []string
		for _, f := range []struct {
			name string
			set  bool
		}{{"--partition", o.Partition != ""}, {"--time", o.TimeLimit != ""}, {"--cpus-per-task", cpusGiven}, {"--max-parallel", o.MaxParallel != 0}} {
			if f.set {
				given = append(given, f.name)
			}
		}
		switch len(given) {
		case 0:
		case 1:
			return fmt.Errorf("%s sets a resource of the SLURM jobs and needs --slurm; without it the studies run on this machine, --jobs at a time: add --slurm, or leave it out", given[0])
		default:
			return fmt.Errorf("%s set resources of the SLURM jobs and need --slurm; without it the studies run on this machine, --jobs at a time: add --slurm, or leave them out",
				strings.Join(given[:len(given)-1], ", ")+" and "+given[len(given)-1])
		}
	}
	if o.TimeLimit != "" {
		if err := slurm.CheckTime(o.TimeLimit); err != nil {
			return fmt.Errorf("--time %q: %w", o.TimeLimit, err)
		}
	}
	if o.Partition != "" {
		if err := slurm.CheckPartition(o.Partition); err != nil {
			return fmt.Errorf("--partition %q: %w", o.Partition, err)
		}
	}
	switch {
	case o.Wait && !o.Submit:
		return errors.New("--wait needs --submit")
	case o.CPUs < 1 || o.CPUs > settings.MaxWorkers:
		return fmt.Errorf("--cpus-per-task is %d; give 1 to %d", o.CPUs, settings.MaxWorkers)
	case o.MaxParallel < 0:
		return fmt.Errorf("--max-parallel is %d; give 0 (no limit) or more", o.MaxParallel)
	}
	return nil
}

// batchRun runs the batch (package batchrun) with the command's streams;
// while its studies run, a stop signal's message says what they leave.
func batchRun(ctx context.Context, o *BatchOptions) error {
	return batchrun.Run(ctx, &o.Options, batchrun.IO{Out: o.IO.Out, ErrOut: o.IO.ErrOut, StopNote: swapStoppedNote})
}

// swapStoppedNote makes note what a stop signal's message says of the
// outputs and returns the function that puts the previous one back.
func swapStoppedNote(note string) (restore func()) {
	prev := stoppedNote.Swap(&note)
	was := inBatch.Swap(true)
	return func() { stoppedNote.Store(prev); inBatch.Store(was) }
}
