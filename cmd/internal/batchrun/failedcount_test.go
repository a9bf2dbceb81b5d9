package batchrun

import (
	"errors"
	"strings"
	"testing"

	"areasweep/cmd/internal/fault"
)

// TestFailedStudiesCount checks the count that opens the batch's last
// message: "2 of 3 studies failed", and for a table of one study "the one
// study failed" (it read "1 of 1 studies failed"), and the summary lists
// one failed study as "it" (it read "lists each").
func TestFailedStudiesCount(t *testing.T) {
	for _, c := range []struct {
		ids       []string
		failed    []bool
		want, not string
	}{
		{ids: []string{"z1"}, failed: []bool{true}, want: "the one study failed: z1; runs/summary.html lists it with its error", not: "1 of 1 studies"},
		{ids: []string{"a", "b", "c"}, failed: []bool{true, false, true}, want: "2 of 3 studies failed: a, c; runs/summary.html lists each with its error"},
		{ids: []string{"a", "b"}, failed: []bool{false, true}, want: "1 of 2 studies failed: b; runs/summary.html lists it with its error"},
	} {
		var studies []*study
		errs := make([]error, len(c.ids))
		n := 0
		for i, id := range c.ids {
			studies = append(studies, &study{id: id})
			if c.failed[i] {
				errs[i], n = errors.New("occurrences.csv line 3: bad longitude"), n+1
			}
		}
		msg := fault.UserText(failedStudies(&Options{Out: "runs"}, studies, errs, n, true))
		if !strings.Contains(msg, c.want) || (c.not != "" && strings.Contains(msg, c.not)) {
			t.Errorf("%v: message %q, want %q", c.ids, msg, c.want)
		}
	}
}
