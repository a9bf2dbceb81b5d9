package main

import (
	"fmt"
	"strings"
	"text/tabwriter"

	"areasweep/report"
)

// extentsTable renders the family summary for a terminal.
func extentsTable(ex []report.Extent) string {
	var sb strings.Builder
	tw := tabwriter.NewWriter(&sb, 2, 4, 2, ' ', tabwriter.AlignRight)
	fmt.Fprintln(tw, "id\tkind\tcells\tarea km2\tshare\ttrain\ttest\tstatus\t")
	for _, e := range ex {
		st := string(e.Status)
		if e.DuplicateOf != "" {
			st += " of " + e.DuplicateOf
		}
		fmt.Fprintf(tw, "%s\t%s\t%d\t%.1f\t%.3f\t%d\t%d\t%s\t\n", e.ID, e.Kind, e.Cells, e.AreaKm2, e.ShareOfRaster, e.TrainPoints, e.TestPoints, st)
	}
	tw.Flush()
	return sb.String()
}
