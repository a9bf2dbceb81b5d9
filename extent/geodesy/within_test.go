package geodesy

import (
	"math"
	"math/rand/v2"
	"slices"
	"testing"
)

// TestWithin checks Within against a brute-force scan of Distance (PROJ's
// geod_inverse, Karney 2013) on random sites and queries (fixed seed): every
// site within maxDist is listed, and every listed site lies within the
// looseness the Index documentation claims for bound (1), 0.17% of maxDist
// plus the 1 micrometre margin.
func TestWithin(t *testing.T) {
	r := rand.New(rand.NewPCG(3, 4))
	ix, lats, lons := randomIndex(t, r, 300, 40, 10, -5, 20)
	var got []int
	for q := range 200 {
		lat, lon := 38+14*r.Float64(), -8+26*r.Float64()
		maxDist := 1e3 * math.Pow(10, 3*r.Float64()) // 1 to 1000 km
		got = ix.Within(lat, lon, maxDist, got[:0])
		if !slices.IsSorted(got) {
			t.Fatalf("query %d: list not ascending: %v", q, got)
		}
		for i := range lats {
			d := Distance(lat, lon, lats[i], lons[i])
			_, listed := slices.BinarySearch(got, i)
			if d <= maxDist && !listed {
				t.Errorf("query %d: site %d at %.3f m <= %.3f m not listed", q, i, d, maxDist)
			}
			if listed && d > maxDist*1.0017+1e-6 {
				t.Errorf("query %d: site %d at %.3f m listed for %.3f m", q, i, d, maxDist)
			}
		}
	}
	if n := len(ix.Within(91, 0, 1e6, nil)); n != 0 {
		t.Errorf("latitude 91: %d sites listed, want none", n)
	}
}

// TestSortIDs checks sortIDs against slices.Sort on random lists of
// distinct indices, short and long against n (both of its ways), with
// the bitmap reused between calls.
func TestSortIDs(t *testing.T) {
	r := rand.New(rand.NewPCG(9, 10))
	for trial := range 300 {
		n := 1 + r.IntN(20000)
		perm := r.Perm(n)
		ids := perm[:r.IntN(n+1)]
		if trial%3 == 0 {
			ids = perm[:min(n, 128+r.IntN(2000))]
		}
		want := slices.Clone(ids)
		slices.Sort(want)
		got := slices.Clone(ids)
		sortIDs(got, n)
		if !slices.Equal(got, want) {
			t.Fatalf("trial %d (n %d, %d ids): sortIDs differs from slices.Sort", trial, n, len(ids))
		}
	}
}
