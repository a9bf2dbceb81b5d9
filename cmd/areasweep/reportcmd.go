package main

import (
	"errors"
	"fmt"
	"strings"

	"github.com/spf13/cobra"

	"areasweep/cmd/internal/fault"
	"areasweep/cmd/internal/rerender"
)

// ReportOptions re-renders a finished run's report.
type ReportOptions struct {
	IO    *IO
	Dir   string
	Force bool
	// Quiet drops the log lines on standard error, as run's --quiet does.
	Quiet bool
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
	cmd.Flags().BoolVar(&opts.Quiet, "quiet", false, "no progress bars and no log lines on standard error")
	return cmd
}

func reportRun(o *ReportOptions) error {
	if strings.TrimSpace(o.Dir) == "" {
		// 'areasweep report ""' (a shell variable left unset) said
		// "areasweep:  does not exist".
		return fault.BadInput(errors.New("the folder to report on is empty; name the --out directory of a finished run (areasweep report DIR)"))
	}
	// From the start: a signal while results.json is read said "this
	// run's partial results were removed and --out was left as it was".
	note := fmt.Sprintf("the report files in %s were left as they were", o.Dir)
	stoppedNote.Store(&note)
	html, err := rerender.Run(rerender.Options{Dir: o.Dir, Force: o.Force, Logf: o.logf})
	if err != nil {
		return err
	}
	fmt.Fprintf(o.IO.Out, "report: %s\n", html)
	return nil
}

// logf writes one log line on standard error, unless --quiet.
func (o *ReportOptions) logf(format string, args ...any) {
	if !o.Quiet {
		fmt.Fprintf(o.IO.ErrOut, format+"\n", args...)
	}
}
