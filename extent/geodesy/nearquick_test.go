package geodesy

import (
	"math/rand/v2"
	"testing"
)

// TestNearQuickBounds: for points x within rho of a centre c, QuickBounds
// over the sites NearSites lists within hi(c) + 2 rho brackets x's exact
// nearest distance (Nearest), its lower bound is never above Bounds' and
// its interval is, for most points, at most a metre wider than Bounds',
// with sites scattered and close
// enough that a few points have two near-equal nearest sites, at
// distances up to about 1000 km, and beyond 3000 km (sectionUpper's
// limit) for a few.
func TestNearQuickBounds(t *testing.T) {
	far, tight := 0, 0
	nearQueries(t, 5, 9, func(ix *Index, c *Point, r float64, n *Near) { ix.NearSites(c, r, n) }, func(n *Near, x *Point, d float64) {
		lo, hi, ok := n.QuickBounds(x)
		if !ok || d < lo || d > hi {
			t.Fatalf("(%v, %v): distance %v, QuickBounds [%v, %v] (ok %v)", x.Lat(), x.Lon(), d, lo, hi, ok)
		}
		blo, bhi, _ := n.Bounds(x)
		if lo > blo {
			t.Fatalf("(%v, %v): QuickBounds' lower bound %v above Bounds' %v", x.Lat(), x.Lon(), lo, blo)
		}
		if d > 3000e3 {
			far++
		} else if hi-lo <= bhi-blo+1 {
			tight++
		}
	})
	if far == 0 {
		t.Error("no point beyond 3000 km")
	}
	if tight < 400*20*9/10-far {
		t.Errorf("only %d of %d intervals at most 1 m wider than Bounds'", tight, 400*20-far)
	}
	var empty Near
	if _, _, ok := empty.QuickBounds(&Point{}); ok {
		t.Error("an empty list gave bounds")
	}
}

// TestNearStraightBounds: for points x within rho of a centre c,
// StraightBounds over the sites NearSitesUpTo lists within hi(c) + 2 rho
// brackets x's exact nearest distance (Nearest); its upper bound is
// QuickBounds' (the same straight distance) and its interval, up to
// 1000 km, at most s^3 / (12 R^2) + 1 m wider than the exact distance
// (the shortfall of bound (2)); beyond 3000 km it is QuickBounds'
// interval.
func TestNearStraightBounds(t *testing.T) {
	far, near := 0, 0
	list := func(ix *Index, c *Point, r float64, n *Near) {
		if !ix.NearSitesUpTo(c, r, 1000, n) {
			t.Fatal("list incomplete with a limit above the number of sites")
		}
	}
	nearQueries(t, 6, 10, list, func(n *Near, x *Point, d float64) {
		lo, hi, ok := n.StraightBounds(x)
		if !ok || d < lo || d > hi {
			t.Fatalf("(%v, %v): distance %v, StraightBounds [%v, %v] (ok %v)", x.Lat(), x.Lon(), d, lo, hi, ok)
		}
		qlo, qhi, _ := n.QuickBounds(x)
		switch {
		case d > 3000e3:
			far++
			if lo != qlo || hi != qhi {
				t.Fatalf("(%v, %v) at %v m: StraightBounds [%v, %v], QuickBounds [%v, %v]", x.Lat(), x.Lon(), d, lo, hi, qlo, qhi)
			}
		case d < 1000e3:
			near++
			const R = 6371e3
			if hi != qhi || hi-lo > d*d*d/(12*R*R)+1 {
				t.Fatalf("(%v, %v) at %v m: StraightBounds [%v, %v], QuickBounds [%v, %v]", x.Lat(), x.Lon(), d, lo, hi, qlo, qhi)
			}
		}
	})
	if far == 0 || near < 400*20/2 {
		t.Errorf("%d points beyond 3000 km, %d within 1000 km", far, near)
	}
	var empty Near
	if _, _, ok := empty.StraightBounds(&Point{}); ok {
		t.Error("an empty list gave bounds")
	}
}

// nearQueries draws 200 sites (randomIndex, seeded by s1 and s2), then
// 400 centres c (one in 40 thousands of km away), has list fill n with
// the sites within hi(c) + 2 rho of c (rho = 20 km, hi(c) the upper end of
// c's NearestBounds), and calls check for 20 points x within about 7 km
// of each c with x's exact nearest distance d (Nearest).
func nearQueries(t *testing.T, s1, s2 uint64, list func(ix *Index, c *Point, r float64, n *Near), check func(n *Near, x *Point, d float64)) {
	t.Helper()
	rng := rand.New(rand.NewPCG(s1, s2))
	ix, _, _ := randomIndex(t, rng, 200, 40, 15, -5, 25)
	var n Near
	for q := 0; q < 400; q++ {
		clat, clon := 30+35*rng.Float64(), -15+45*rng.Float64()
		if q%40 == 0 {
			clat, clon = -40*rng.Float64(), 100+20*rng.Float64() // thousands of km away
		}
		c := NewPoint(clat, clon)
		const rho = 20e3
		_, hi, _ := ix.BoundsAt(&c, 0, -1)
		list(ix, &c, hi+2*rho, &n)
		for range 20 {
			x := NewPoint(clat+0.09*(rng.Float64()-0.5), clon+0.12*(rng.Float64()-0.5))
			_, d := ix.Nearest(x.Lat(), x.Lon(), 0)
			check(&n, &x, d)
		}
	}
}
