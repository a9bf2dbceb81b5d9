package geodesy

import (
	"math/rand/v2"
	"slices"
	"testing"
)

// TestNearSitesUpTo: NearSitesUpTo gives NearSites' list, in the same
// order, when that list has at most limit sites, and reports false
// otherwise, with both short and long lists among the queries.
func TestNearSitesUpTo(t *testing.T) {
	rng := rand.New(rand.NewPCG(3, 17))
	ix, _, _ := randomIndex(t, rng, 400, 40, 15, -5, 25)
	var all, capped Near
	short, long := 0, 0
	for q := 0; q < 500; q++ {
		pt := NewPoint(35+25*rng.Float64(), -10+35*rng.Float64())
		radius := 400e3 * rng.Float64()
		limit := rng.IntN(40)
		ix.NearSites(&pt, radius, &all)
		ok := ix.NearSitesUpTo(&pt, radius, limit, &capped)
		if ok != (all.Len() <= limit) {
			t.Fatalf("query %d: %d sites within %v m, limit %d: complete %v", q, all.Len(), radius, limit, ok)
		}
		if ok {
			short++
			if !slices.Equal(all.slots, capped.slots) {
				t.Fatalf("query %d: NearSitesUpTo listed %v, NearSites %v", q, capped.slots, all.slots)
			}
		} else {
			long++
		}
	}
	if short < 50 || long < 50 {
		t.Errorf("%d short and %d long lists: the test does not probe both", short, long)
	}
}
