package main

import (
	"fmt"
	"runtime"

	"github.com/spf13/cobra"
)

// versionLine is what 'areasweep version' and 'areasweep --version' print.
func versionLine() string {
	return fmt.Sprintf("areasweep %s (%s, %s/%s)", version, runtime.Version(), runtime.GOOS, runtime.GOARCH)
}

func newVersionCmd(streams *IO) *cobra.Command {
	return &cobra.Command{
		Use:     "version",
		Short:   "Print the version",
		Example: "  areasweep version\n  areasweep --version",
		Args:    cobra.NoArgs,
		RunE: func(c *cobra.Command, args []string) error {
			_, err := fmt.Fprintln(streams.Out, versionLine())
			return err
		},
	}
}
