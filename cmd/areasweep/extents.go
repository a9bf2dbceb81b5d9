package main

import (
	"github.com/spf13/cobra"
)

func newExtentsCmd(streams *IO, runF func(*RunOptions) error) *cobra.Command {
	opts := defaultRunOptions()
	opts.IO = streams
	opts.ExtentsOnly = true
	cmd := &cobra.Command{
		Use:   "extents",
		Short: "Build and export the extent family only (extents.gpkg and a summary table)",
		Long: `extents builds the same family of extents as run, on the grid of the first --model,
and writes extents.gpkg (layer "extents": id, kind, params, status, cells, area_km2),
extents.csv and a run log into --out, without scoring. Open extents.gpkg in a GIS to
check the family before a full run. It takes the same flags and study file as run; the scoring settings
are checked but not used, and its help lists only the flags that shape the family.`,
		Example: `  areasweep extents --model m=suit.tif --occurrences points.csv --region m.gpkg \
    --region-buffers=-50,100,500 --out family-check
  areasweep extents --study study.yaml --out family-check --force`,
		Args: cobra.NoArgs,
		RunE: sweepE(&opts, runF),
	}
	bindSweepFlags(cmd.Flags(), &opts, false)
	return cmd
}
