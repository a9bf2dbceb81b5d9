package metrics

import (
	"math"
	"reflect"
	"testing"
)

// TestRanks checks mid-ranks and the tie term (hand computation; the same
// convention as scipy.stats.rankdata's "average" method, from memory).
func TestRanks(t *testing.T) {
	cases := []struct {
		name string
		v    []float64
		want []float64
		ties float64
	}{
		{"no ties", []float64{3, 1, 2}, []float64{3, 1, 2}, 0},
		// 0.9 twice spans ranks 3 and 4: 3.5 each; T = 2^3 - 2 = 6.
		{"one pair", []float64{0.9, 0.7, 0.9, 0.5}, []float64{3.5, 2, 3.5, 1}, 6},
		// Three equal values span ranks 1-3: 2 each; T = 27 - 3 = 24.
		{"all tied", []float64{1, 1, 1}, []float64{2, 2, 2}, 24},
		// -0 and +0 are equal; two pairs: T = 6 + 6.
		{"two pairs", []float64{0, 5, math.Copysign(0, -1), 5}, []float64{1.5, 3.5, 1.5, 3.5}, 12},
		{"empty", nil, []float64{}, 0},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			got, ties := Ranks(c.v)
			if !reflect.DeepEqual(got, c.want) || ties != c.ties {
				t.Errorf("Ranks(%v) = %v, ties %v; want %v, ties %v", c.v, got, ties, c.want, c.ties)
			}
		})
	}
}

// TestMeanSD checks the mean and the sample SD (divisor n-1) by hand
// computation.
func TestMeanSD(t *testing.T) {
	cases := []struct {
		name     string
		v        []float64
		mean, sd float64
	}{
		// Deviations from 5: -3 -1 -1 -1 0 0 2 4, squares sum to 32.
		{"eight", []float64{2, 4, 4, 4, 5, 5, 7, 9}, 5, math.Sqrt(32.0 / 7)},
		{"one", []float64{3}, 3, 0},
		{"empty", nil, 0, 0},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			m, sd := MeanSD(c.v)
			if m != c.mean || math.Abs(sd-c.sd) > 1e-15 {
				t.Errorf("MeanSD(%v) = %v, %v; want %v, %v", c.v, m, sd, c.mean, c.sd)
			}
			if got := Mean(c.v); got != m {
				t.Errorf("Mean = %v, MeanSD's mean %v", got, m)
			}
		})
	}
}

// TestQuantileSorted checks type 7 at a few points on 1..5 (hand
// computation: h = 4p, Q = 1 + h); numpy's convention is checked in
// TestQuantileGolden.
func TestQuantileSorted(t *testing.T) {
	xs := []float64{1, 2, 3, 4, 5}
	for _, c := range []struct{ p, want float64 }{{0, 1}, {0.1, 1.4}, {0.25, 2}, {0.5, 3}, {1, 5}} {
		if got := QuantileSorted(xs, c.p); math.Abs(got-c.want) > 1e-12 {
			t.Errorf("QuantileSorted(1..5, %v) = %v, want %v", c.p, got, c.want)
		}
	}
	if got := QuantileSorted([]float64{7}, 0.3); got != 7 {
		t.Errorf("one value: %v, want 7", got)
	}
}
