package batchrun

import (
	"fmt"
	"slices"
	"strings"
	"testing"
)

// TestSkippedLines: a rerun of a batch of dozens printed one line for
// every finished study; past maxSkipLines one line counts them, naming
// the first three and the last, and a few are still named one per line.
func TestSkippedLines(t *testing.T) {
	ids := func(n int) []string {
		var out []string
		for i := 1; i <= n; i++ {
			out = append(out, fmt.Sprintf("sp%02d", i))
		}
		return out
	}
	for _, c := range []struct {
		n     int
		lines []string
	}{
		{2, []string{"areasweep batch: sp01: already finished, skipped", "areasweep batch: sp02: already finished, skipped"}},
		{maxSkipLines, nil},
		{49, []string{"areasweep batch: 49 studies already finished, skipped (sp01, sp02, sp03, ... sp49; summary.csv lists them)"}},
	} {
		var b strings.Builder
		p := &progress{w: &b}
		p.skipped(ids(c.n))
		got := strings.Split(strings.TrimSuffix(b.String(), "\n"), "\n")
		if c.lines == nil {
			if len(got) != c.n {
				t.Errorf("%d skipped: %d lines, want one each", c.n, len(got))
			}
			continue
		}
		if !slices.Equal(got, c.lines) {
			t.Errorf("%d skipped: %q, want %q", c.n, got, c.lines)
		}
	}
	var b strings.Builder
	(&progress{w: &b, quiet: true}).skipped(ids(49))
	if b.Len() != 0 {
		t.Errorf("--quiet printed %q", b.String())
	}
}
