package geodesy

import (
	"math"
	"slices"
)

// Within appends to dst, in ascending order, the index of every site that
// may lie within maxDist metres (geodesic) of (lat, lon), and returns dst.
// The list is a superset drawn from the two lower bounds of Index alone,
// (1) s >= R_r sigma (1 - 1e-9) and (2) s >= ECEF chord, with the Index's
// safety margin: no site within maxDist is ever left out, and a listed site
// may be slightly farther. It makes no geodesic computation, so it costs a
// kd-tree walk. A query outside [-90, 90] latitude or with a non-finite
// longitude or a NaN maxDist returns dst unchanged. Safe for concurrent use.
func (ix *Index) Within(lat, lon, maxDist float64, dst []int) []int {
	if !(math.Abs(lat) <= 90) || math.IsInf(lon, 0) || math.IsNaN(lon) || math.IsNaN(maxDist) || maxDist < 0 {
		return dst
	}
	st := query{lat: lat, lon: lon, skip: -1, cap: math.Inf(1), s: maxDist}
	st.q, st.p = siteVectors(lat, lon)
	st.setLimits()
	bp := candPool.Get().(*[]cand)
	buf := (*bp)[:0]
	ix.collect(0, len(ix.pts), &st, &buf)
	n := len(dst)
	for _, c := range buf {
		dst = append(dst, int(ix.ids[c.slot]))
	}
	slices.Sort(dst[n:])
	if cap(buf) <= maxPooledCands {
		*bp = buf[:0]
		candPool.Put(bp)
	}
	return dst
}
