package geodesy

import (
	"math/rand/v2"
	"slices"
	"testing"
)

// TestCoverSameAsIndex: wherever a Cover answers (ok), Bounds gives
// NearestBounds' interval and Within Index.Within's list, bit for bit, at
// points around the cover's centre out to beyond its radius, for radii
// of Within up to beyond what the cover holds; both answer at many
// points and refuse at many (so that the bound is exercised on both
// sides); a cover over more sites than its limit answers nothing. The
// sites include duplicates (ties of chords) and sites on both sides of
// the equator.
func TestCoverSameAsIndex(t *testing.T) {
	rng := rand.New(rand.NewPCG(5, 17))
	lats, lons := make([]float64, 0, 700), make([]float64, 0, 700)
	for range 600 {
		lats = append(lats, -8+16*rng.Float64())
		lons = append(lons, 10+20*rng.Float64())
	}
	for i := range 100 {
		lats, lons = append(lats, lats[i]), append(lons, lons[i])
	}
	ix, err := NewIndex(lats, lons)
	if err != nil {
		t.Fatal(err)
	}
	var c Cover
	var boundsHit, boundsMiss, withinHit, withinMiss int
	var got, want []int
	for range 300 {
		plat, plon := -6+12*rng.Float64(), 12+16*rng.Float64()
		p := NewPoint(plat, plon)
		radius := 1e3 + 3e5*rng.Float64()
		if !ix.CoverSites(&p, radius, len(lats), &c) {
			t.Fatalf("CoverSites at (%g, %g), radius %g: refused with no limit", plat, plon, radius)
		}
		for range 40 {
			// Points up to about the radius away.
			f := radius / 111e3 * rng.Float64()
			lat, lon := plat+f*(2*rng.Float64()-1), plon+f*(2*rng.Float64()-1)
			pt := NewPoint(lat, lon)
			lo, hi, ok := c.Bounds(&pt)
			wlo, whi := ix.NearestBounds(lat, lon, 0)
			if ok {
				boundsHit++
				if lo != wlo || hi != whi {
					t.Fatalf("Cover.Bounds at (%g, %g), cover (%g, %g) radius %g: [%v, %v], NearestBounds [%v, %v]", lat, lon, plat, plon, radius, lo, hi, wlo, whi)
				}
			} else {
				boundsMiss++
			}
			m := radius * 1.2 * rng.Float64()
			var wok bool
			got, wok = c.Within(&pt, m, got[:0])
			want = ix.Within(lat, lon, m, want[:0])
			if wok {
				withinHit++
				if !slices.Equal(got, want) {
					t.Fatalf("Cover.Within at (%g, %g), %g m, cover (%g, %g) radius %g: %v, Index.Within %v", lat, lon, m, plat, plon, radius, got, want)
				}
			} else {
				withinMiss++
				if len(got) != 0 {
					t.Fatalf("Cover.Within refused but appended %v", got)
				}
			}
		}
	}
	t.Logf("Bounds: %d answered, %d refused; Within: %d answered, %d refused", boundsHit, boundsMiss, withinHit, withinMiss)
	if boundsHit < 1000 || boundsMiss < 500 || withinHit < 1000 || withinMiss < 500 {
		t.Errorf("Bounds: %d answered, %d refused; Within: %d answered, %d refused: want at least 1000 answered and 500 refused of each",
			boundsHit, boundsMiss, withinHit, withinMiss)
	}
	// A limit below the list's length: no answer.
	p := NewPoint(0, 20)
	if ix.CoverSites(&p, 5e5, 10, &c) {
		t.Fatal("CoverSites with limit 10 around (0, 20), 500 km: accepted")
	}
	if _, _, ok := c.Bounds(&p); ok {
		t.Error("Bounds answered from a refused cover")
	}
	if _, ok := c.Within(&p, 1e3, nil); ok {
		t.Error("Within answered from a refused cover")
	}
	if _, _, ok := (&Cover{}).Bounds(&p); ok {
		t.Error("Bounds answered from the zero Cover")
	}
}
