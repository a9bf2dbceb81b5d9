package main

import (
	"errors"
	"fmt"
	"io"

	"github.com/spf13/cobra"
)

// Exit codes, defined once.
const (
	exitOK       = 0
	exitInternal = 1
	exitBadInput = 2
)

// version is the software version, set at build time with
// -ldflags "-X main.version=...".
var version = "0.1.0-dev"

// inputError marks an error caused by the user's input or flags: exit 2.
type inputError struct{ err error }

func (e inputError) Error() string { return e.err.Error() }
func (e inputError) Unwrap() error { return e.err }

// badInput wraps err as an input error (nil stays nil).
func badInput(err error) error {
	if err == nil {
		return nil
	}
	var ie inputError
	if errors.As(err, &ie) {
		return err
	}
	return inputError{err}
}

// IO holds the streams commands use; tests pass buffers.
type IO struct {
	In     io.Reader
	Out    io.Writer
	ErrOut io.Writer
	// Terminal is true when ErrOut is a terminal (progress bars are drawn).
	Terminal bool
}

// Main runs the command line args and returns the exit code.
func Main(args []string, in io.Reader, out, errOut io.Writer) int {
	streams := &IO{In: in, Out: out, ErrOut: errOut, Terminal: isTerminal(errOut)}
	root := newRootCmd(streams)
	root.SetArgs(args)
	root.SetOut(out)
	root.SetErr(errOut)
	err := root.Execute()
	if err == nil {
		return exitOK
	}
	fmt.Fprintf(errOut, "areasweep: %v\n", err)
	var ie inputError
	if errors.As(err, &ie) {
		return exitBadInput
	}
	return exitInternal
}

func newRootCmd(streams *IO) *cobra.Command {
	root := &cobra.Command{
		Use:   "areasweep",
		Short: "Rescore a distribution model on a family of extents: is the score the model's or the extent's?",
		Long: `areasweep builds a family of alternative calibration/evaluation extents from a base
study region (geodesic buffers in and out, buffers around occurrences, convex hulls,
occupied ecoregion units, the whole raster), recomputes full ROC AUC, partial ROC,
threshold omission with binomial tests and the continuous Boyce index on each, and
reports how much of each score comes from the extent rather than from the model.`,
		SilenceUsage:  true,
		SilenceErrors: true,
	}
	root.SetFlagErrorFunc(func(c *cobra.Command, err error) error {
		return badInput(fmt.Errorf("%v (see 'areasweep %s --help')", err, c.Name()))
	})
	root.AddCommand(
		newRunCmd(streams, nil),
		newExtentsCmd(streams, nil),
		newReportCmd(streams, nil),
		newDemoCmd(streams, nil),
		newVersionCmd(streams),
	)
	for _, c := range root.Commands() {
		c.Args = wrapArgs(c.Args)
	}
	return root
}

// wrapArgs marks argument-count errors as bad input.
func wrapArgs(a cobra.PositionalArgs) cobra.PositionalArgs {
	if a == nil {
		return nil
	}
	return func(c *cobra.Command, args []string) error { return badInput(a(c, args)) }
}
