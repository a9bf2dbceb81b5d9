package main

import (
	"fmt"
	"runtime"

	"github.com/spf13/cobra"
)

func newVersionCmd(streams *IO) *cobra.Command {
	return &cobra.Command{
		Use:     "version",
		Short:   "Print the version",
		Example: "  areasweep version",
		Args:    cobra.NoArgs,
		RunE: func(c *cobra.Command, args []string) error {
			_, err := fmt.Fprintf(streams.Out, "areasweep %s (%s, %s/%s)\n", version, runtime.Version(), runtime.GOOS, runtime.GOARCH)
			return err
		},
	}
}
