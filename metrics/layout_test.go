package metrics

import (
	"fmt"
	"math"
	"math/rand/v2"
	"slices"
	"sort"
	"strings"
	"testing"
)

// refLocate is the plain binary-search definition of the exact bin.
func refLocate(d []float64, v float64) int {
	j := sort.SearchFloat64s(d, v) // first d_j >= v
	if j < len(d) && d[j] == v {
		return 2*j + 1
	}
	return 2 * j
}

func TestLocate(t *testing.T) {
	r := rand.New(rand.NewPCG(1, 2))
	clustered := make([]float64, 0, 300)
	for i := 0; i < 200; i++ {
		clustered = append(clustered, 0.999+float64(i)*1e-7) // crowd one bucket
	}
	clustered = append(clustered, 0, 0.5)
	uniform := make([]float64, 1000)
	for i := range uniform {
		uniform[i] = r.Float64()
	}
	ints := make([]float64, 500)
	for i := range ints {
		ints[i] = float64(r.IntN(100)) // many duplicates
	}
	tests := []struct {
		name   string
		values []float64
	}{
		{"empty", nil},
		{"single", []float64{0.25}},
		{"two", []float64{0.75, 0.25}},
		{"uniform", uniform},
		{"integers with duplicates", ints},
		{"clustered", clustered},
		{"signed zeros", []float64{math.Copysign(0, -1), 0, 1, -1}}, // Go reads the constant -0.0 as +0
		{"huge span", []float64{-math.MaxFloat64, 0, math.MaxFloat64}},
		{"tiny span", []float64{1, math.Nextafter(1, 2), math.Nextafter(math.Nextafter(1, 2), 2)}},
		{"subnormal span", []float64{0, 5e-324, 1e-323}},
	}
	for _, bins := range []int{16, 4096} {
		for _, tc := range tests {
			t.Run(fmt.Sprintf("bins=%d/%s", bins, tc.name), func(t *testing.T) {
				l, err := NewLayout(tc.values, bins)
				if err != nil {
					t.Fatal(err)
				}
				d := l.Values()
				if !slices.IsSorted(d) || len(slices.Compact(slices.Clone(d))) != len(d) || l.Bins() != 2*len(d)+1 {
					t.Fatalf("values not sorted distinct: %v", d)
				}
				probe := slices.Clone(d)
				for _, v := range d {
					probe = append(probe, math.Nextafter(v, math.Inf(-1)), math.Nextafter(v, math.Inf(1)))
				}
				for i := 0; i < 2000; i++ {
					probe = append(probe, r.Float64()*2.2-0.6)
				}
				probe = append(probe, math.Inf(1), math.Inf(-1), -2, 3, 1.5, -0.5, 0, math.MaxFloat64, -math.MaxFloat64, 5e-324, -5e-324)
				for _, v := range probe {
					if bin, want := l.Locate(v), refLocate(d, v); bin != want {
						t.Fatalf("Locate(%v) bin %d, want %d", v, bin, want)
					}
				}
				if bin := l.Locate(math.NaN()); bin != 0 {
					t.Errorf("Locate(NaN) = %d, want 0", bin)
				}
				// LocateRow gives the same bins, and -1 for NaN.
				probe = append(probe, math.NaN())
				row := make([]int32, len(probe))
				n, lo, hi := l.LocateRow(probe, row)
				wantN, wantLo, wantHi := 0, math.Inf(1), math.Inf(-1)
				for i, v := range probe {
					want := -1
					if !math.IsNaN(v) {
						want = refLocate(d, v)
						wantN, wantLo, wantHi = wantN+1, math.Min(wantLo, v), math.Max(wantHi, v)
					}
					if int(row[i]) != want {
						t.Fatalf("LocateRow: %v in bin %d, want %d", v, row[i], want)
					}
				}
				if n != wantN || lo != wantLo || hi != wantHi || math.Signbit(lo) && lo == 0 {
					t.Errorf("LocateRow: %d values in [%v, %v], want %d in [%v, %v] (zero as +0)", n, lo, hi, wantN, wantLo, wantHi)
				}
			})
		}
	}
}

func TestNewLayoutErrors(t *testing.T) {
	tests := []struct {
		name     string
		values   []float64
		bins     int
		wantPart string
	}{
		{"NaN value", []float64{1, math.NaN()}, 16, "value 1"},
		{"Inf value", []float64{math.Inf(-1)}, 16, "value 0"},
		{"too few bins", nil, 15, "histBins"},
		{"too many bins", nil, maxHistBins + 1, "histBins"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			_, err := NewLayout(tc.values, tc.bins)
			if err == nil || !strings.Contains(err.Error(), tc.wantPart) || !strings.HasPrefix(err.Error(), "metrics: ") {
				t.Errorf("err = %v, want one mentioning %q", err, tc.wantPart)
			}
		})
	}
}

func TestAccumulatorBasics(t *testing.T) {
	l, _ := NewLayout([]float64{1, 2}, 16)
	a := l.NewAccumulator()
	if a.Min() != 0 || a.Max() != 0 || a.Cells() != 0 || !a.RangeExact() {
		t.Error("empty accumulator")
	}
	a.Add(math.NaN(), 3)
	a.Add(math.Inf(1), 3)
	a.Add(1.5, -1)
	a.Add(2, 5)
	a.Add(0.5, 7)
	a.Add(9, 1) // widens the histogram's grid
	if a.Skipped() != 3 || a.Cells() != 3 || a.Area() != 13 || a.Min() != 0.5 || a.Max() != 9 {
		t.Errorf("skipped %d cells %d area %d range [%v,%v]", a.Skipped(), a.Cells(), a.Area(), a.Min(), a.Max())
	}
	below, equal, above, ok := a.AreaAt(2)
	if !ok || below != 7 || equal != 5 || above != 1 {
		t.Errorf("AreaAt(2) = %d %d %d %v", below, equal, above, ok)
	}
	if _, _, _, ok := a.AreaAt(1.5); ok {
		t.Error("AreaAt accepted a non-layout value")
	}
	if i0, i1 := a.occupied(); a.hist[i0].area != 7 || a.hist[i1].area != 1 {
		t.Errorf("histogram ends hold %d and %d, want 7 and 1", a.hist[i0].area, a.hist[i1].area)
	}
	a.Reset()
	if a.Cells() != 0 || a.Area() != 0 || a.Skipped() != 0 || a.bins[3].area != 0 {
		t.Error("Reset left data")
	}
}
