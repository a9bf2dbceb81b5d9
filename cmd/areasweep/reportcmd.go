package main

import (
	"fmt"
	"os"
	"path/filepath"

	"github.com/spf13/cobra"

	"areasweep/cmd/internal/fault"
	"areasweep/cmd/internal/pipeline"
	"areasweep/report"
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
	r, err := report.Load(path)
	if err != nil {
		return fault.BadInput(err)
	}
	if err := report.Validate(r); err != nil {
		return fault.BadInput(err)
	}
	if err := report.Analyze(r); err != nil {
		return fault.BadInput(err)
	}
	if err := report.Write(o.Dir, r); err != nil {
		return pipeline.WriteFailed(err)
	}
	fmt.Fprintf(o.IO.Out, "report: %s\n", filepath.Join(o.Dir, "report.html"))
	return nil
}
