package report

import (
	"math"
	"testing"
)

// TestPreviewRoundTrip packs values and masks with NewPreview and reads
// them back with decodePreview: each byte is the value scaled to 0..254
// over [lo, hi] and rounded (worked out by hand below), NaN is 255, values
// outside the range are clamped, and every mask bit comes back.
func TestPreviewRoundTrip(t *testing.T) {
	vals := []float64{0, 1, 0.5, math.NaN(), -3, 7, 0.25, 0.75, 1.0 / 254}
	// 0.5*254 = 127; 0.25*254 = 63.5 -> 64; 0.75*254 = 190.5 -> 191.
	want := []byte{0, 254, 127, 255, 0, 254, 64, 191, 1}
	masks := [][]bool{
		{true, false, true, false, true, false, true, false, true},
		{false, false, false, false, false, false, false, false, true},
	}
	pv := NewPreview(3, 3, [4]float64{0, 0, 3, 3}, vals, 0, 1, masks)
	got, gotMasks, err := decodePreview(pv)
	if err != nil {
		t.Fatal(err)
	}
	for i := range want {
		if got[i] != want[i] {
			t.Errorf("value %d (%v): byte %d, want %d", i, vals[i], got[i], want[i])
		}
	}
	for k := range masks {
		for i := range masks[k] {
			if gotMasks[k][i] != masks[k][i] {
				t.Errorf("mask %d cell %d: %v, want %v", k, i, gotMasks[k][i], masks[k][i])
			}
		}
	}
	// A constant copy (hi <= lo) scales every value to 0.
	flat := NewPreview(1, 2, [4]float64{}, []float64{5, math.NaN()}, 5, 5, nil)
	if b, _, err := decodePreview(flat); err != nil || b[0] != 0 || b[1] != 255 {
		t.Errorf("constant preview: %v %v", b, err)
	}
}
