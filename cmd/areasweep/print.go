package main

import (
	"fmt"
	"io"
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

// printAnswer writes the run's headline (results.json's
// sensitivity.headline, the report's first paragraph) on one line to w
// after "answer: ", so that the answer is on the terminal without opening
// the report; nothing when the results have no headline.
func printAnswer(w io.Writer, res *report.Results) {
	if res == nil || res.Sensitivity == nil || res.Sensitivity.Headline == "" {
		return
	}
	fmt.Fprintf(w, "answer: %s\n", res.Sensitivity.Headline)
}
