package main

import (
	"fmt"
	"os"
	"path/filepath"
	"strings"

	"github.com/spf13/cobra"
	"github.com/spf13/pflag"

	"areasweep/cmd/internal/fault"
	"areasweep/cmd/internal/settings"
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
		RunE: func(c *cobra.Command, args []string) error {
			if err := opts.resolve(c.Flags()); err != nil {
				return fault.BadInput(err)
			}
			if err := keepScoredResults(&opts); err != nil {
				return err
			}
			if given := scoringFlagsGiven(c.Flags()); len(given) > 0 && !opts.Quiet {
				fmt.Fprintln(streams.ErrOut, scoringFlagsNote(given))
			}
			if runF != nil {
				return runF(&opts)
			}
			return opts.fromStudy(sweep(&opts, nil), runFlagRE)
		},
	}
	bindSweepFlags(cmd.Flags(), &opts, false)
	return cmd
}

// keepScoredResults refuses extents --force on an --out that holds a
// scored run's results: --force replaces areasweep's entries as a set,
// whether or not the new run writes them, so the family alone would
// remove results.json, scores.csv and the report without writing any.
func keepScoredResults(o *RunOptions) error {
	if !o.Force {
		return nil // a non-empty --out is refused anyway
	}
	res := filepath.Join(o.Out, "results.json")
	if st, err := os.Lstat(res); err == nil && !st.IsDir() {
		return fault.BadInput(fmt.Errorf("--out %s holds a scored run's results (%s); extents writes only the family, and with --force it would remove them with areasweep's other files there: choose another --out, e.g. %s", o.Out, res, filepath.Clean(o.Out)+"-extents"))
	}
	return nil
}

// scoringFlagsGiven lists, as --name in the table's order, the scoring
// settings given on extents' command line: accepted, so that a run's
// command line works, but they change nothing extents writes. Keys of a
// study file are not listed: the file is written for run.
func scoringFlagsGiven(f *pflag.FlagSet) []string {
	var given []string
	for _, s := range settings.Table {
		if s.Scoring && f.Changed(s.Name) {
			given = append(given, "--"+s.Name)
		}
	}
	return given
}

// scoringFlagsNote tells a user who typed scoring flags for extents that
// they were checked and not used, so that none expects them to change the
// family.
func scoringFlagsNote(given []string) string {
	return fmt.Sprintf("areasweep extents: scoring flags are checked but not used, since extents scores nothing (they take effect in 'areasweep run'): %s", strings.Join(given, ", "))
}
