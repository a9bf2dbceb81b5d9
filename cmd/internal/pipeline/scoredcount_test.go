package pipeline

import (
	"testing"

	"areasweep/report"
)

// TestScoredCount: run.log's "m: scores on ..." line counts the extents a
// model was scored on; it gave the number of members, duplicates and
// extents without test points included ("scores on 12 extents" where 10
// were scored).
func TestScoredCount(t *testing.T) {
	mk := func(scored ...bool) []extentScore {
		var out []extentScore
		for _, s := range scored {
			out = append(out, extentScore{sc: report.Score{Scored: s}})
		}
		return out
	}
	for _, tc := range []struct {
		scores []extentScore
		want   string
	}{
		{mk(true, true, true), "3 extents"},
		{mk(true), "1 extent"},
		{mk(true, false, true, false), "2 of 4 extents"},
		{mk(false), "0 of 1 extent"},
	} {
		if got := scoredCount(tc.scores); got != tc.want {
			t.Errorf("scoredCount = %q, want %q", got, tc.want)
		}
	}
}
