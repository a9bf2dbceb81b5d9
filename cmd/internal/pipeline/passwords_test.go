package pipeline

import "testing"

// TestPassLogWords: the log line of a pass counts its blocks and extents
// in the singular for one ("block by block (1 blocks)" was logged for the
// distance-only null of a 160 x 120 grid). Expected strings written by
// hand.
func TestPassLogWords(t *testing.T) {
	cases := []struct {
		n, reused int
		want      string
	}{
		{1, 0, "block by block (1 block)"},
		{10, 0, "block by block (10 blocks)"},
		{10, 7, "block by block (10 blocks, 7 of them decoded when the points were sampled)"},
	}
	for _, c := range cases {
		if got := blocksText(c.n, c.reused); got != c.want {
			t.Errorf("blocksText(%d, %d) = %q, want %q", c.n, c.reused, got, c.want)
		}
	}
	for n, want := range map[int]string{1: "its 1 extent", 12: "all 12 extents"} {
		if got := allExtentsText(n); got != want {
			t.Errorf("allExtentsText(%d) = %q, want %q", n, got, want)
		}
	}
}
