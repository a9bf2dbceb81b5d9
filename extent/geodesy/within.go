package geodesy

import (
	"math"
	"math/bits"
	"slices"
	"sync"
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
	sortIDs(dst[n:], ix.Len())
	if cap(buf) <= maxPooledCands {
		*bp = buf[:0]
		candPool.Put(bp)
	}
	return dst
}

// sortIDs sorts ids, distinct integers in [0, n) (site indices), in
// ascending order, as slices.Sort would: when the list is long against n
// (dense training points give lists of thousands) by marking them in a
// bitmap of n bits and reading it back, a pass over n/64 words instead of
// a comparison sort; otherwise with slices.Sort. The cut-offs are our
// choice.
func sortIDs(ids []int, n int) {
	if len(ids) < 128 || n > 64*len(ids) {
		slices.Sort(ids)
		return
	}
	bp := bitmapPool.Get().(*[]uint64)
	words := *bp
	if nw := (n + 63) / 64; cap(words) < nw {
		words = make([]uint64, nw)
	} else {
		words = words[:nw]
	}
	for _, id := range ids {
		words[id>>6] |= 1 << (uint(id) & 63)
	}
	k := 0
	for w, x := range words {
		for x != 0 {
			ids[k] = w<<6 | bits.TrailingZeros64(x)
			k++
			x &= x - 1
		}
		words[w] = 0
	}
	*bp = words
	bitmapPool.Put(bp)
}

var bitmapPool = sync.Pool{New: func() any { return new([]uint64) }}
