package geodesy

import (
	"math"
	"math/rand/v2"
	"testing"
)

// TestPointQueries: a point prepared with NewPoint or on a Parallel has
// siteVectors' vectors bit for bit; NearestAt gives Nearest's site and
// distance bit for bit; BoundsAt, with no hint, a right hint or a wrong
// one, brackets that distance like NearestBounds and reports (maxDist,
// +Inf) exactly when NearestBounds does.
func TestPointQueries(t *testing.T) {
	rng := rand.New(rand.NewPCG(11, 3))
	ix, lats, _ := randomIndex(t, rng, 400, -70, 140, -40, 80)
	hint := -1
	for q := 0; q < 4000; q++ {
		lat, lon := -89+178*rng.Float64(), -180+360*rng.Float64()
		pl := NewParallel(lat)
		s, c := math.Sincos(lon * math.Pi / 180)
		a, b := NewPoint(lat, lon), pl.Point(lon, s, c)
		v, p := siteVectors(lat, lon)
		if a.q != v || a.p != p || b.q != v || b.p != p {
			t.Fatalf("(%v, %v): prepared vectors differ from siteVectors", lat, lon)
		}
		maxD := []float64{0, 5e5, 3e6}[q%3]
		id, d := ix.Nearest(lat, lon, maxD)
		id2, d2 := ix.NearestAt(&b, maxD)
		if id != id2 || !(d == d2 || math.IsInf(d, 1) && math.IsInf(d2, 1)) {
			t.Fatalf("(%v, %v): NearestAt (%d, %v), Nearest (%d, %v)", lat, lon, id2, d2, id, d)
		}
		lo0, hi0 := ix.NearestBounds(lat, lon, maxD)
		for _, h := range []int{-1, hint, rng.IntN(len(lats))} {
			lo, hi, slot := ix.BoundsAt(&b, maxD, h)
			if math.IsInf(hi0, 1) != math.IsInf(hi, 1) || (slot < 0) != math.IsInf(hi, 1) {
				t.Fatalf("(%v, %v) hint %d: BoundsAt (%v, %v, %d), NearestBounds (%v, %v)", lat, lon, h, lo, hi, slot, lo0, hi0)
			}
			if math.IsInf(hi, 1) {
				if lo != maxD {
					t.Fatalf("(%v, %v): no site but lo %v", lat, lon, lo)
				}
				continue
			}
			if lo != lo0 {
				t.Fatalf("(%v, %v) hint %d: lo %v, NearestBounds %v (same smallest chord)", lat, lon, h, lo, lo0)
			}
			if !math.IsInf(d, 1) && (d < lo || d > hi) {
				t.Fatalf("(%v, %v) hint %d: %v outside [%v, %v]", lat, lon, h, d, lo, hi)
			}
			hint = slot
		}
	}
	bad := NewPoint(95, 0)
	if id, d := ix.NearestAt(&bad, 0); id != -1 || !math.IsNaN(d) {
		t.Errorf("NearestAt at latitude 95: (%d, %v), want (-1, NaN)", id, d)
	}
	if lo, hi, slot := ix.BoundsAt(&bad, 0, 0); !math.IsNaN(lo) || !math.IsNaN(hi) || slot != -1 {
		t.Errorf("BoundsAt at latitude 95: (%v, %v, %d), want (NaN, NaN, -1)", lo, hi, slot)
	}
}

// TestNearBounds: for points x within rho of a centre c, the sites
// NearSites lists within hi(c) + 2 rho hold x's nearest site, and
// Near.Bounds brackets x's exact nearest distance (Nearest), with a lower
// bound never below NearestBounds' and often much closer.
func TestNearBounds(t *testing.T) {
	rng := rand.New(rand.NewPCG(21, 4))
	ix, _, _ := randomIndex(t, rng, 300, 40, 15, -5, 25)
	var n Near
	listed, tighter := 0, 0
	for q := 0; q < 300; q++ {
		clat, clon := 35+25*rng.Float64(), -10+35*rng.Float64()
		c := NewPoint(clat, clon)
		const rho = 20e3 // metres; x below lies within about 14 km of c
		_, hi, _ := ix.BoundsAt(&c, 0, -1)
		ix.NearSites(&c, hi+2*rho, &n)
		if n.Len() == 0 {
			t.Fatalf("(%v, %v): no site listed within %v m", clat, clon, hi+2*rho)
		}
		listed += n.Len()
		for range 20 {
			x := NewPoint(clat+0.09*(rng.Float64()-0.5), clon+0.12*(rng.Float64()-0.5))
			_, d := ix.Nearest(x.Lat(), x.Lon(), 0)
			lo, hi, ok := n.Bounds(&x)
			if !ok || d < lo || d > hi {
				t.Fatalf("(%v, %v): distance %v, Near bounds [%v, %v] (ok %v)", x.Lat(), x.Lon(), d, lo, hi, ok)
			}
			// The ECEF chord can only tighten NearestBounds' lower bound.
			lo0, _ := ix.NearestBounds(x.Lat(), x.Lon(), 0)
			if lo < lo0 {
				t.Fatalf("(%v, %v): Near lower bound %v below NearestBounds' %v", x.Lat(), x.Lon(), lo, lo0)
			}
			if lo > lo0+0.1*(d-lo0) {
				tighter++
			}
		}
	}
	if listed >= 300*300 {
		t.Errorf("NearSites listed every site every time")
	}
	if tighter < 300*20/4 {
		t.Errorf("the lower bound closed a tenth of NearestBounds' gap for only %d of %d points", tighter, 300*20)
	}
	var empty Near
	if _, _, ok := empty.Bounds(&Point{}); ok {
		t.Error("an empty list gave bounds")
	}
}

// randomIndex returns the index of n sites drawn from rng, each at a
// latitude uniform in [lat0, lat0+dlat) and then a longitude uniform in
// [lon0, lon0+dlon) (degrees), and the sites' coordinates.
func randomIndex(t testing.TB, rng *rand.Rand, n int, lat0, dlat, lon0, dlon float64) (ix *Index, lats, lons []float64) {
	lats = make([]float64, n)
	lons = make([]float64, n)
	for i := range lats {
		lats[i] = lat0 + dlat*rng.Float64()
		lons[i] = lon0 + dlon*rng.Float64()
	}
	ix, err := NewIndex(lats, lons)
	if err != nil {
		t.Fatal(err)
	}
	return ix, lats, lons
}
