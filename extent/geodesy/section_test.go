package geodesy

import (
	"math"
	"math/rand/v2"
	"testing"
)

// TestSectionUpper: on random pairs up to 3000 km apart (anywhere, along
// the equator, along meridians, near the poles, across the antimeridian),
// sectionUpper of the ECEF chord is never below PROJ's geodesic distance
// and exceeds it by at most twice D^3/24 (1/rho^2 - 1/R^2) with R = a^2/b,
// the largest radius of curvature on WGS84 (its doc comment's estimate,
// which is 562 m at 3000 km, 7 m at 700 km), plus the margin.
func TestSectionUpper(t *testing.T) {
	rng := rand.New(rand.NewPCG(7, 11))
	rMax := SemiMajor * SemiMajor / SemiMinor
	slack := 1/(sectionRadius*sectionRadius) - 1/(rMax*rMax)
	n := 0
	for n < 20000 {
		lat1, lon1 := math.Asin(2*rng.Float64()-1)*180/math.Pi, 360*rng.Float64()-180
		switch rng.IntN(5) {
		case 0:
			lat1 = 0
		case 1:
			lat1 = 89 + rng.Float64()
		case 2:
			lon1 = 179.5 + rng.Float64()/2
		}
		az, s := 360*rng.Float64(), 3e6*math.Pow(rng.Float64(), 2)
		switch rng.IntN(4) {
		case 0:
			if lat1 == 0 {
				az = 90
			}
		case 1:
			az = 0
		}
		lat2, lon2 := Direct(lat1, lon1, az, s)
		d := Distance(lat1, lon1, lat2, lon2)
		_, p1 := siteVectors(lat1, lon1)
		_, p2 := siteVectors(lat2, lon2)
		chord := math.Sqrt(d2(&p1, &p2))
		if chord > sectionMaxChord {
			continue
		}
		n++
		up := sectionUpper(chord)
		if up < d {
			t.Fatalf("(%v, %v)-(%v, %v): geodesic %v m above the bound %v m", lat1, lon1, lat2, lon2, d, up)
		}
		if up-d > 2*chord*chord*chord/24*slack+1e-5 {
			t.Fatalf("(%v, %v)-(%v, %v): bound %v m is %v m above the geodesic %v m", lat1, lon1, lat2, lon2, up, up-d, d)
		}
	}
	if !math.IsInf(sectionUpper(3.1e6), 1) || !math.IsInf(sectionUpper(math.NaN()), 1) {
		t.Error("sectionUpper bounds a chord beyond 3000 km or NaN")
	}
}

// TestTightBoundsAt: TightBoundsAt brackets the exact nearest distance,
// its upper bound is never above BoundsAt's, and 300 to 1000 km from the
// sites it is much closer to the distance (below a third of BoundsAt's
// excess for two points in three; the others' chord-nearest site is not
// their nearest, and both bounds are then above by the difference).
func TestTightBoundsAt(t *testing.T) {
	rng := rand.New(rand.NewPCG(3, 5))
	lats, lons := make([]float64, 200), make([]float64, 200)
	for i := range lats {
		lats[i] = 40 + 10*rng.Float64()
		lons[i] = 5 * rng.Float64()
	}
	ix, err := NewIndex(lats, lons)
	if err != nil {
		t.Fatal(err)
	}
	far, closer := 0, 0
	for range 3000 {
		x := NewPoint(20+50*rng.Float64(), -30+60*rng.Float64())
		_, d := ix.NearestAt(&x, 0)
		lo, hi, slot := ix.TightBoundsAt(&x, 0, -1)
		lo0, hi0, slot0 := ix.BoundsAt(&x, 0, -1)
		if lo != lo0 || slot != slot0 || hi > hi0 {
			t.Fatalf("(%v, %v): TightBoundsAt (%v, %v, %d), BoundsAt (%v, %v, %d)", x.Lat(), x.Lon(), lo, hi, slot, lo0, hi0, slot0)
		}
		if d < lo || d > hi {
			t.Fatalf("(%v, %v): distance %v outside [%v, %v]", x.Lat(), x.Lon(), d, lo, hi)
		}
		if d > 300e3 && d < 1000e3 {
			far++
			if hi-d < (hi0-d)/3 {
				closer++
			}
		}
	}
	if far < 500 || closer < far*2/3 {
		t.Errorf("upper bound a third as far above the distance for %d of %d points 300 to 1000 km away", closer, far)
	}
}

// TestAsinUpper: asinUpper is never below math.Asin on [0, 0.25] by more
// than rounding (1e-15 relative, far inside sectionUpper's 1e-9) and
// within 1e-7 relative above it there (within 1e-11 up to 0.025, chords
// of 300 km).
func TestAsinUpper(t *testing.T) {
	for i := 0; i <= 250000; i++ {
		x := float64(i) * 1e-6
		a, u := math.Asin(x), asinUpper(x)
		tol := 1e-7
		if x <= 0.025 {
			tol = 1e-11
		}
		if u < a*(1-1e-15) || u > a*(1+tol) {
			t.Fatalf("x = %v: asinUpper %v, asin %v", x, u, a)
		}
	}
}

// TestChordUpper: ECEF is the position the Index keeps for a site, bit for
// bit, and ChordUpper of two positions is never below PROJ's geodesic
// between them, above it by at most TestSectionUpper's allowance (under
// 0.1 mm up to 10 km, the steps walkTile takes on projected grids), and
// +Inf for a NaN position or a chord beyond 3000 km.
func TestChordUpper(t *testing.T) {
	rng := rand.New(rand.NewPCG(3, 5))
	rMax := SemiMajor * SemiMajor / SemiMinor
	slack := 1/(sectionRadius*sectionRadius) - 1/(rMax*rMax)
	for range 5000 {
		lat1, lon1 := 180*rng.Float64()-90, 360*rng.Float64()-180
		if _, p := siteVectors(lat1, lon1); p != ECEF(lat1, lon1) {
			t.Fatalf("ECEF(%v, %v) = %v, the index keeps %v", lat1, lon1, ECEF(lat1, lon1), p)
		}
		s := math.Pow(10, 6*rng.Float64()) // 1 m to 1000 km
		lat2, lon2 := Direct(lat1, lon1, 360*rng.Float64(), s)
		a, b := ECEF(lat1, lon1), ECEF(lat2, lon2)
		d := Distance(lat1, lon1, lat2, lon2)
		up := ChordUpper(&a, &b)
		if up < d {
			t.Fatalf("(%v, %v)-(%v, %v): geodesic %v m above ChordUpper %v m", lat1, lon1, lat2, lon2, d, up)
		}
		if chord := math.Sqrt(d2(&a, &b)); up-d > 2*chord*chord*chord/24*slack+1e-5 {
			t.Fatalf("(%v, %v)-(%v, %v): ChordUpper %v m is %v m above the geodesic %v m", lat1, lon1, lat2, lon2, up, up-d, d)
		}
	}
	nan := ECEF(math.NaN(), 10)
	far1, far2 := ECEF(0, 0), ECEF(0, 90)
	o := ECEF(0, 0)
	if !math.IsInf(ChordUpper(&nan, &o), 1) || !math.IsInf(ChordUpper(&far1, &far2), 1) {
		t.Error("ChordUpper bounds a NaN position or a chord beyond 3000 km")
	}
}
