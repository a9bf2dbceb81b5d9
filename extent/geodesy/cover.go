package geodesy

import (
	"math"
)

// Cover is a list of sites around a point P, those within some radius of
// it (a superset, as NearSites), from which NearestBounds and Within at
// points near P are answered without a walk of the kd-tree, with the same
// results bit for bit, whenever a bound shows that the list holds every
// site the tree would consider (see Bounds and Within). Fill it with
// Index.CoverSites; the zero value covers nothing.
type Cover struct {
	ix      *Index
	q, p    [3]float64 // P's rectifying unit vector and ECEF position
	rl, el  float64    // square roots of the list's limits (bounds (1) and (2))
	slots   []int32
	covered bool
}

// CoverSites fills c with every site that may lie within radius metres of
// pt (bounds (1) and (2) of Index with its margin, as Within), unless more
// than limit sites do: it then reports false and c covers nothing (every
// query answers ok = false). A list of many sites costs more per query
// than the tree.
func (ix *Index) CoverSites(pt *Point, radius float64, limit int, c *Cover) bool {
	c.ix, c.covered = ix, false
	var n Near
	n.slots = c.slots[:0]
	if !pt.ok || !(radius >= 0) || !ix.nearSitesUpTo(pt, radius, limit, &n) {
		c.slots = n.slots[:0]
		return false
	}
	st := query{s: radius, cap: math.Inf(1)}
	st.setLimits()
	c.slots, c.q, c.p = n.slots, pt.q, pt.p
	c.rl, c.el = math.Sqrt(st.limit), math.Sqrt(st.ecef2)
	c.covered = true
	return true
}

// reach returns A and B such that every site whose squared rectifying
// chord to pt is at most A and whose squared ECEF chord is at most B is
// in the list: with P's limits L and E, a site x passes P's bounds when
//
//	|x - q_pt| <= sqrt(L) - |q_pt - q_P|  and  |x - p_pt| <= sqrt(E) - |p_pt - p_P|
//
// (triangle inequality), shrunk by 1e-9 relative and 1e-12 (unit
// vectors), 1e-6 m (ECEF) absolute for the rounding of the squared
// chords (relative error a few 1e-16 on values up to 4, and 6.4e6 m
// coordinates). ok is false when the list covers no neighbourhood of pt.
func (c *Cover) reach(pt *Point) (A, B float64, ok bool) {
	if !c.covered || !pt.ok {
		return 0, 0, false
	}
	a := c.rl*(1-1e-9) - 1e-12 - math.Sqrt(d2(&pt.q, &c.q))*(1+1e-9)
	b := c.el*(1-1e-9) - 1e-6 - math.Sqrt(d2(&pt.p, &c.p))*(1+1e-9)
	if !(a > 0 && b > 0) {
		return 0, 0, false
	}
	return a * a * (1 - 1e-9), b * b * (1 - 1e-9), true
}

// Bounds returns NearestBounds(pt's latitude, longitude, 0), bit for bit,
// from the list, and ok; ok is false when the list cannot show that it
// holds the site of smallest rectifying chord to pt (then ask the Index).
// With r the smallest squared rectifying chord over the list, every site
// whose chord is at most r lies at most
//
//	G = withMargin(R_r k_max sigma(r) (1 + 1e-9)) + margin
//
// from pt (NearestBounds' upper bound with the largest stretch, for any
// site), so its ECEF chord is at most G too: when r <= A and G^2 <= B
// (reach) it is in the list, and the list's smallest chord is the
// tree's. The interval depends on the site of that chord only through its
// hemisphere and stretch: a tie of sites that differ there gives ok =
// false, since the tree's pick among them depends on its walk.
func (c *Cover) Bounds(pt *Point) (lo, hi float64, ok bool) {
	A, B, ok := c.reach(pt)
	if !ok || len(c.slots) == 0 {
		return 0, 0, false
	}
	ix := c.ix
	// The smallest chord r at slot at, and whether a tie at r differs
	// from at in hemisphere or stretch (reset when r falls).
	r, at, differ := 5.0, -1, false
	for _, s := range c.slots {
		d := d2(&ix.pts[s], &pt.q)
		if d < r {
			r, at, differ = d, int(s), false
		} else if d == r && at >= 0 &&
			((ix.lat[ix.ids[s]]*pt.lat >= 0) != (ix.lat[ix.ids[at]]*pt.lat >= 0) || ix.stretch[s] != ix.stretch[at]) {
			differ = true
		}
	}
	if at < 0 || differ || !(r <= A) {
		return 0, 0, false
	}
	sigma := 2 * math.Asin(math.Min(1, math.Sqrt(r)/2))
	if g := withMargin(sigma*rectRadius*stretchMax*(1+1e-9)) + marginAbs; !(g*g <= B) {
		return 0, 0, false
	}
	st := query{lat: pt.lat, lon: pt.lon, q: pt.q, bestD2: r, bestAt: at}
	lo, hi = ix.chordBounds(&st, pt.k)
	return lo, hi, true
}

// Within appends to dst what Index.Within(pt's latitude, longitude,
// maxDist, ...) appends, bit for bit (the sites that pass bounds (1) and
// (2) for maxDist, in ascending order), and reports ok; ok is false, and
// dst unchanged, when the list cannot show that it holds all of them
// (their limits exceed reach's): then ask the Index.
func (c *Cover) Within(pt *Point, maxDist float64, dst []int) ([]int, bool) {
	if !pt.ok || math.IsNaN(maxDist) || maxDist < 0 {
		return dst, true // Within returns dst unchanged
	}
	A, B, ok := c.reach(pt)
	if !ok {
		return dst, false
	}
	st := query{s: maxDist, cap: math.Inf(1)}
	st.setLimits()
	if !(st.limit <= A && st.ecef2 <= B) {
		return dst, false
	}
	ix := c.ix
	n := len(dst)
	for _, s := range c.slots {
		if d2(&ix.pts[s], &pt.q) > st.limit || d2(&ix.ecef[s], &pt.p) > st.ecef2 {
			continue
		}
		dst = append(dst, int(ix.ids[s]))
	}
	sortIDs(dst[n:], ix.Len())
	return dst, true
}
