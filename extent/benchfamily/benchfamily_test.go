package benchfamily

import (
	"slices"
	"testing"
)

// TestBuffers: the schedule the benchmark's README tables were measured
// with (13 extents: 5 region and 5 point buffers).
func TestBuffers(t *testing.T) {
	r, p := Buffers(13)
	if !slices.Equal(r, []float64{20, -20, 40, -40, 60}) || !slices.Equal(p, []float64{25, 50, 75, 100, 125}) {
		t.Errorf("Buffers(13) = %v, %v", r, p)
	}
	if r, p := Buffers(3); r != nil || p != nil {
		t.Errorf("Buffers(3) = %v, %v, want none", r, p)
	}
	if r, p := Buffers(60); len(r)+len(p) != 57 {
		t.Errorf("Buffers(60) gives %d buffers, want 57", len(r)+len(p))
	}
}
