package metrics

import (
	"math"
	"math/rand/v2"
	"reflect"
	"slices"
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

// TestQuantileSelect: selecting the order statistics gives bit for bit
// what sorting gives (QuantileSorted), for the percentiles the bootstraps
// use and a few more, on random values with many ties (few levels), zeros
// of both signs, all values equal, one or two values, sorted and reversed
// input, and with a NaN (sorted instead).
func TestQuantileSelect(t *testing.T) {
	r := rand.New(rand.NewPCG(5, 6))
	for trial := 0; trial < 2000; trial++ {
		n := 1 + r.IntN(1200)
		if trial%10 == 0 {
			n = 1 + r.IntN(3)
		}
		levels := 1 + r.IntN(3*n)
		v := make([]float64, n)
		for i := range v {
			v[i] = float64(r.IntN(levels)-levels/3) / 7
		}
		switch trial % 6 {
		case 1:
			for i := range v {
				if r.IntN(3) == 0 {
					v[i] = math.Copysign(0, float64(r.IntN(2)*2-1))
				}
			}
		case 2:
			slices.Sort(v)
		case 3:
			slices.Sort(v)
			slices.Reverse(v)
		case 4:
			for i := range v {
				v[i] = 0.5
			}
		case 5:
			v[r.IntN(n)] = math.NaN()
		}
		sorted := slices.Clone(v)
		slices.Sort(sorted)
		for _, p := range []float64{0, 0.025, 0.25, 0.5, 0.975, 1} {
			got, want := quantileSelect(slices.Clone(v), p), QuantileSorted(sorted, p)
			if math.Float64bits(got) != math.Float64bits(want) && !(got != got && want != want) {
				t.Fatalf("trial %d, p %g, n %d: %v (bits %x), want %v (bits %x)", trial, p, n, got, math.Float64bits(got), want, math.Float64bits(want))
			}
		}
	}
}
