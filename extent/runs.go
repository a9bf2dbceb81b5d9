package extent

import (
	"math"
	"slices"
)

// rowRuns is the cells of one member in one grid row: sorted, disjoint,
// non-adjacent half-open column runs [c0,c1), stored as pairs
// c0, c1, c0, c1, ... This canonical form makes two equal cell sets equal
// slices, so duplicate and nesting checks compare runs, never cells.
type rowRuns []int32

// cellRuns is one member's cells, row by row. Memory follows the length of
// the member's boundary (two int32 per run), not its area or the raster's
// size.
type cellRuns struct {
	rows []rowRuns
}

func newCellRuns(height int) cellRuns { return cellRuns{rows: make([]rowRuns, height)} }

// has reports whether column c is in r (binary search over runs).
func (r rowRuns) has(c int) bool {
	n := len(r) / 2
	// First run whose end is beyond c.
	lo, hi := 0, n
	for lo < hi {
		m := (lo + hi) / 2
		if int(r[2*m+1]) <= c {
			lo = m + 1
		} else {
			hi = m
		}
	}
	return lo < n && int(r[2*lo]) <= c
}

// cells returns the number of cells of r.
func (r rowRuns) cells() int64 {
	var n int64
	for i := 0; i < len(r); i += 2 {
		n += int64(r[i+1] - r[i])
	}
	return n
}

// appendRun appends [c0,c1) to dst, merging with the last run when they
// touch or overlap; runs must come in ascending order of c0.
func appendRun(dst rowRuns, c0, c1 int32) rowRuns {
	if c1 <= c0 {
		return dst
	}
	if n := len(dst); n > 0 && c0 <= dst[n-1] {
		if c1 > dst[n-1] {
			dst[n-1] = c1
		}
		return dst
	}
	return append(dst, c0, c1)
}

// canonical drops empty runs of r, sorts the others and merges
// overlapping or touching ones, in place.
func canonical(r rowRuns) rowRuns {
	r = dropEmpty(r)
	n := len(r) / 2
	sorted := true
	for i := 1; i < n; i++ {
		if r[2*i] <= r[2*i-1] {
			sorted = false
			break
		}
	}
	if sorted {
		return r
	}
	pairs := make([][2]int32, n)
	for i := range pairs {
		pairs[i] = [2]int32{r[2*i], r[2*i+1]}
	}
	slices.SortFunc(pairs, func(a, b [2]int32) int { return int(a[0]) - int(b[0]) })
	out := r[:0]
	for _, p := range pairs {
		out = appendRun(out, p[0], p[1])
	}
	return out
}

// union appends a | b to dst.
func union(dst, a, b rowRuns) rowRuns {
	i, j := 0, 0
	for i < len(a) || j < len(b) {
		if j >= len(b) || i < len(a) && a[i] <= b[j] {
			dst = appendRun(dst, a[i], a[i+1])
			i += 2
		} else {
			dst = appendRun(dst, b[j], b[j+1])
			j += 2
		}
	}
	return dst
}

// intersect appends a & b to dst.
func intersect(dst, a, b rowRuns) rowRuns {
	i, j := 0, 0
	for i < len(a) && j < len(b) {
		lo, hi := max(a[i], b[j]), min(a[i+1], b[j+1])
		if lo < hi {
			dst = append(dst, lo, hi)
		}
		if a[i+1] < b[j+1] {
			i += 2
		} else {
			j += 2
		}
	}
	return dst
}

// minus appends a &^ b to dst.
func minus(dst, a, b rowRuns) rowRuns {
	j := 0
	for i := 0; i < len(a); i += 2 {
		c0, c1 := a[i], a[i+1]
		for j < len(b) && b[j+1] <= c0 {
			j += 2
		}
		for k := j; k < len(b) && b[k] < c1; k += 2 {
			if b[k] > c0 {
				dst = append(dst, c0, b[k])
			}
			c0 = max(c0, b[k+1])
		}
		if c0 < c1 {
			dst = append(dst, c0, c1)
		}
	}
	return dst
}

// subset reports whether every cell of a is in b.
func subset(a, b rowRuns) bool {
	j := 0
	for i := 0; i < len(a); i += 2 {
		for j < len(b) && b[j+1] <= a[i] {
			j += 2
		}
		if j >= len(b) || b[j] > a[i] || b[j+1] < a[i+1] {
			return false
		}
	}
	return true
}

// NewFamilyFromRuns makes a family on g from members (Status as given) and
// their cells: runs(k, row) returns member k's cells in row as pairs c0, c1
// of half-open column runs, in any order (they are sorted and merged). It
// does no clipping, measuring or checking: tests and callers that hold
// memberships computed elsewhere use it.
func NewFamilyFromRuns(g *Grid, members []Member, runs func(k, row int) []int32) *Family {
	f := &Family{Grid: g, Members: append([]Member(nil), members...), Chains: map[string][]int{}}
	for k := range f.Members {
		c := newCellRuns(g.Height)
		for row := range c.rows {
			r := append(rowRuns(nil), runs(k, row)...)
			for i := 0; i < len(r); i += 2 {
				r[i], r[i+1] = max(r[i], 0), min(r[i+1], int32(g.Width))
				if r[i+1] <= r[i] {
					r[i], r[i+1] = 0, 0
				}
			}
			c.rows[row] = canonical(r)
		}
		f.cells = append(f.cells, c)
	}
	return f
}

func dropEmpty(r rowRuns) rowRuns {
	out := r[:0]
	for i := 0; i < len(r); i += 2 {
		if r[i+1] > r[i] {
			out = append(out, r[i], r[i+1])
		}
	}
	return out
}

// repeatAdd returns the float64 result of adding a to s n times in a row
// (s += a, n times, each sum rounded), for s >= 0 and a > 0, without
// doing every addition. While s stays in one binade [2^(e-1), 2^e) and the
// sum stays below its top, each rounded sum adds the same multiple of the
// binade's ulp (a rounded to that grid; exact halves, which round to even
// and so depend on s, are done one by one), so whole stretches of additions
// are one exact multiplication. The result is bit for bit the loop's.
func repeatAdd(s, a float64, n int) float64 {
	for n > 0 {
		if s == 0 || math.IsInf(s, 0) || math.IsNaN(s) || !(a > 0) {
			s += a
			n--
			continue
		}
		_, e := math.Frexp(s)    // s in [2^(e-1), 2^e)
		A := math.Ldexp(a, 53-e) // a in units of the ulp 2^(e-53)
		S := math.Ldexp(s, 53-e) // an integer in [2^52, 2^53)
		frac := A - math.Floor(A)
		if frac == 0.5 || A >= 1<<52 {
			s += a
			n--
			continue
		}
		d := math.Floor(A)
		if frac > 0.5 {
			d++
		}
		if d == 0 {
			return s // a is below half an ulp: s no longer changes
		}
		// Steps j = 0..k-1 keep S + j d + A at least two ulps below 2^53,
		// so each rounded sum is S + (j+1) d, inside the binade.
		k := math.Floor((1<<53 - 2 - S - A) / d)
		if k < 1 {
			s += a
			n--
			continue
		}
		k = math.Min(k, float64(n))
		s = math.Ldexp(S+k*d, e-53)
		n -= int(k)
	}
	return s
}
