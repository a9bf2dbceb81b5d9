package scenario

import (
	"cmp"
	"math"
	"slices"
)

// pt is a planar point; here x is longitude and y latitude in degrees.
type pt struct{ x, y float64 }

func cross(o, a, b pt) float64 { return (a.x-o.x)*(b.y-o.y) - (a.y-o.y)*(b.x-o.x) }

// convexHull returns the convex hull of ps counter-clockwise, without the
// closing vertex and without collinear points, by Andrew's monotone chain
// (Andrew 1979, Another efficient algorithm for convex hulls in two
// dimensions, Inf. Process. Lett. 9:216-219).
func convexHull(ps []pt) []pt {
	s := slices.Clone(ps)
	slices.SortFunc(s, func(a, b pt) int {
		if c := cmp.Compare(a.x, b.x); c != 0 {
			return c
		}
		return cmp.Compare(a.y, b.y)
	})
	s = slices.Compact(s)
	if len(s) < 3 {
		return s
	}
	h := make([]pt, 0, 2*len(s))
	for _, p := range s {
		for len(h) >= 2 && cross(h[len(h)-2], h[len(h)-1], p) <= 0 {
			h = h[:len(h)-1]
		}
		h = append(h, p)
	}
	lower := len(h) + 1
	for i := len(s) - 2; i >= 0; i-- {
		p := s[i]
		for len(h) >= lower && cross(h[len(h)-2], h[len(h)-1], p) <= 0 {
			h = h[:len(h)-1]
		}
		h = append(h, p)
	}
	return h[:len(h)-1]
}

// polygonArea is the signed shoelace area (positive when counter-clockwise).
//
//	A = 1/2 sum_i (x_i y_{i+1} - x_{i+1} y_i)
func polygonArea(p []pt) float64 {
	a := 0.0
	for i := range p {
		j := (i + 1) % len(p)
		a += p[i].x*p[j].y - p[j].x*p[i].y
	}
	return a / 2
}

// clipHalfPlane keeps the part of polygon p where a x + b y <= c, one stage
// of Sutherland-Hodgman clipping (Sutherland & Hodgman 1974, Reentrant polygon
// clipping, Commun. ACM 17:32-42). For a convex p the result is convex.
func clipHalfPlane(p []pt, a, b, c float64) []pt {
	out := make([]pt, 0, len(p)+1)
	for i := range p {
		cur, nxt := p[i], p[(i+1)%len(p)]
		fc := a*cur.x + b*cur.y - c
		fn := a*nxt.x + b*nxt.y - c
		if fc <= 0 {
			out = append(out, cur)
		}
		if (fc < 0 && fn > 0) || (fc > 0 && fn < 0) {
			t := fc / (fc - fn)
			out = append(out, pt{cur.x + t*(nxt.x-cur.x), cur.y + t*(nxt.y-cur.y)})
		}
	}
	return out
}

// clipBox clips a convex polygon to the rectangle [x0, x1] x [y0, y1].
func clipBox(p []pt, x0, y0, x1, y1 float64) []pt {
	p = clipHalfPlane(p, -1, 0, -x0)
	p = clipHalfPlane(p, 1, 0, x1)
	p = clipHalfPlane(p, 0, -1, -y0)
	return clipHalfPlane(p, 0, 1, y1)
}

// voronoiCells returns, for every seed, its planar Voronoi cell clipped to the
// rectangle: the rectangle cut by the half-plane nearer to seed i than to
// seed j, for every j,
//
//	|q - s_i|^2 <= |q - s_j|^2  <=>  2 (s_j - s_i) . q <= |s_j|^2 - |s_i|^2
func voronoiCells(seeds []pt, x0, y0, x1, y1 float64) [][]pt {
	cells := make([][]pt, len(seeds))
	for i, si := range seeds {
		cell := []pt{{x0, y0}, {x1, y0}, {x1, y1}, {x0, y1}}
		for j, sj := range seeds {
			if i == j || len(cell) == 0 {
				continue
			}
			cell = clipHalfPlane(cell, 2*(sj.x-si.x), 2*(sj.y-si.y),
				sj.x*sj.x+sj.y*sj.y-si.x*si.x-si.y*si.y)
		}
		cells[i] = cell
	}
	return cells
}

// growHull returns a smooth convex polygon around ps: the convex hull of
// circles of radius km (36 vertices each, radius converted to degrees at each
// centre's latitude) around the hull vertices of ps. It approximates the hull
// buffered by km.
func growHull(ps []pt, km float64) []pt {
	h := convexHull(ps)
	ring := make([]pt, 0, 36*len(h))
	dLat := km / kmPerDegree
	for _, v := range h {
		dLon := dLat / math.Cos(v.y*math.Pi/180)
		for k := range 36 {
			th := 2 * math.Pi * float64(k) / 36
			ring = append(ring, pt{v.x + dLon*math.Cos(th), v.y + dLat*math.Sin(th)})
		}
	}
	return convexHull(ring)
}

// inRing reports whether q lies inside the ring p by the even-odd ray-cast rule.
func inRing(p []pt, q pt) bool {
	in := false
	for i, j := 0, len(p)-1; i < len(p); j, i = i, i+1 {
		a, b := p[i], p[j]
		if (a.y > q.y) != (b.y > q.y) && q.x < (b.x-a.x)*(q.y-a.y)/(b.y-a.y)+a.x {
			in = !in
		}
	}
	return in
}
