package nullmodel

import (
	"math"
	"math/rand/v2"
	"testing"

	"areasweep/extent/geodesy"
)

// TestBallLower: ballLower, exact's order and cut, is a lower bound on the
// geodesic distance (geodesy.Distance, PROJ's geodesic inverse) for random
// pairs of points anywhere on the ellipsoid, near-antipodal and
// equatorial ones included, and within 0.4% of it beyond 3,000 km (the
// flattening, 0.34%, bounds the gap; 0.4% is our cut-off). On a far cell
// of a global grid (the antipode of 300 training points clustered within
// 10 degrees) it leaves at most 10 sites whose bound is below the nearest
// one's distance, to be measured; the chord, exact's cut before, left
// more than 50 (a Mollweide grid of 50 km cells took 27 s in the null's
// pass, 5.4 s with ballLower). 10 and 50 are our cut-offs.
func TestBallLower(t *testing.T) {
	rng := rand.New(rand.NewPCG(5, 9))
	point := func() (lat, lon float64) {
		return math.Asin(2*rng.Float64()-1) * 180 / math.Pi, 360*rng.Float64() - 180
	}
	for i := 0; i < 20000; i++ {
		alat, alon := point()
		blat, blon := point()
		switch i % 4 {
		case 1: // near-antipodal
			blat, blon = -alat+rng.NormFloat64(), alon+180+rng.NormFloat64()
		case 2: // both near the equator
			alat, blat = rng.NormFloat64(), rng.NormFloat64()
		}
		s := geodesy.Distance(alat, alon, blat, blon)
		l := ballLower(projECEF(alat, alon), projECEF(blat, blon))
		if l > s {
			t.Fatalf("(%g, %g) to (%g, %g): ballLower %.6f m above the geodesic %.6f m", alat, alon, blat, blon, l, s)
		}
		if s > 3e6 && l < s*(1-0.004) {
			t.Fatalf("(%g, %g) to (%g, %g): ballLower %.0f m, more than 0.4%% below the geodesic %.0f m", alat, alon, blat, blon, l, s)
		}
	}
	lats, lons := make([]float64, 300), make([]float64, 300)
	for k := range lats {
		lats[k], lons[k] = 55+10*rng.Float64(), 170+10*rng.Float64()
	}
	for _, c := range []struct{ lat, lon float64 }{{-60, -5}, {-30, 0}, {0, 20}} {
		p := projECEF(c.lat, c.lon)
		best := math.Inf(1)
		for k := range lats {
			best = min(best, geodesy.Distance(c.lat, c.lon, lats[k], lons[k]))
		}
		ball, chord := 0, 0
		for k := range lats {
			q := projECEF(lats[k], lons[k])
			if ballLower(p, q) <= best {
				ball++
			}
			if lo, _ := chordBracket(dist3(p, q)); lo <= best {
				chord++
			}
		}
		t.Logf("cell (%g, %g): %d by ballLower, %d by the chord", c.lat, c.lon, ball, chord)
		if ball > 10 || chord <= 50 {
			t.Errorf("cell (%g, %g), %.0f km from the nearest site: %d sites left by ballLower (want at most 10), %d by the chord (want more than 50)", c.lat, c.lon, best/1000, ball, chord)
		}
	}
}
