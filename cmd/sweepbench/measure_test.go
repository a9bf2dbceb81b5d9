package main

import (
	"math"
	"testing"
)

// TestOrSkipped: the baseline's columns read "skipped" where it did not
// run (they printed NaN), and its figures with the given decimals.
func TestOrSkipped(t *testing.T) {
	for _, tc := range []struct {
		v    float64
		prec int
		want string
	}{
		{math.NaN(), 2, "skipped"},
		{4.2649, 2, "4.26"},
		{6.46, 1, "6.5"},
	} {
		if got := orSkipped(tc.v, tc.prec); got != tc.want {
			t.Errorf("orSkipped(%v, %d) = %q, want %q", tc.v, tc.prec, got, tc.want)
		}
	}
}
