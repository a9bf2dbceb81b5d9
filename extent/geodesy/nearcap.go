package geodesy

import "math"

// NearSitesUpTo is NearSites that gives up once more than limit sites are
// found: it reports whether the list is complete (at most limit sites).
// When it is not, n holds some of the sites only and must not be used.
// Callers that use a list only when it is short (a long one costs more
// per bound than the tree) so skip most of the search for long ones.
func (ix *Index) NearSitesUpTo(pt *Point, radius float64, limit int, n *Near) bool {
	n.ecef = n.ecef[:0]
	if !ix.nearSitesUpTo(pt, radius, limit, n) {
		return false
	}
	for _, s := range n.slots {
		n.ecef = append(n.ecef, ix.ecef[s])
	}
	return true
}

// nearSitesUpTo is NearSitesUpTo without the list's ECEF positions (for
// CoverSites, which keeps the slots only).
func (ix *Index) nearSitesUpTo(pt *Point, radius float64, limit int, n *Near) bool {
	n.ix, n.slots, n.ecef = ix, n.slots[:0], n.ecef[:0]
	if !pt.ok || math.IsNaN(radius) || radius < 0 {
		return true
	}
	st := query{lat: pt.lat, lon: pt.lon, q: pt.q, p: pt.p, skip: -1, cap: math.Inf(1), s: radius}
	st.setLimits()
	return ix.collectUpTo(0, len(ix.pts), &st, limit, n)
}

// collectUpTo appends to n the slots in [lo, hi) that pass bounds (1) and
// (2) for st's limits, as collect does, and returns false as soon as n
// holds more than limit.
func (ix *Index) collectUpTo(lo, hi int, st *query, limit int, n *Near) bool {
	if hi <= lo {
		return true
	}
	mid := (lo + hi) / 2
	if ix.boxD2(mid, &st.q) > st.limit {
		return true
	}
	if hi-lo <= leafSize {
		for i := lo; i < hi; i++ {
			if !ix.considerUpTo(i, st, limit, n) {
				return false
			}
		}
		return true
	}
	return ix.considerUpTo(mid, st, limit, n) &&
		ix.collectUpTo(lo, mid, st, limit, n) &&
		ix.collectUpTo(mid+1, hi, st, limit, n)
}

func (ix *Index) considerUpTo(i int, st *query, limit int, n *Near) bool {
	if d2(&ix.pts[i], &st.q) > st.limit || d2(&ix.ecef[i], &st.p) > st.ecef2 {
		return true
	}
	n.slots = append(n.slots, int32(i))
	return len(n.slots) <= limit
}
