package extent

import (
	"cmp"
	"fmt"
	"math"
	"slices"

	"areasweep/extent/gdalmsg"
)

// A world map in an equal-area projection (Mollweide, Equal Earth,
// sinusoidal, Eckert IV, a world grid in Albers or in a cylindrical
// equal-area projection) is bounded by an outline: the image of the
// meridians lon0-180 and lon0+180 and of the poles (points on Mollweide,
// lines on Equal Earth). A cell that straddles the outline lies partly off
// the Earth, and its true area is the planar area of its part inside the
// outline (planar area is true area on an equal-area map). mapEdges holds
// those areas for the cells the outline cuts; every other cell keeps its
// planar area bit for bit.

// mapEdges holds, for a grid that a world map's outline crosses, the
// cells the outline cuts: row r's are cols[off[r]:off[r+1]] (ascending),
// and onMap[i] is the planar area (CRS units squared) of the part of cell
// cols[i] inside the outline. Its size follows the outline's length in
// cells (two or three cells a row, a few hundred on the rows along a
// pole), never the grid's area.
type mapEdges struct {
	off   []int32
	cols  []int32
	onMap []float64
	// tol is the outline's tolerance in CRS units (outlineTol), points
	// the number of its vertices.
	tol    float64
	points int
	// inner holds, row by row, the runs of columns [c0, c1) whose cells
	// lie wholly on the map, so that ToLonLat need not check a point in
	// them (see setInner): row r's are inner[innerOff[r]:innerOff[r+1]].
	// Until setInner, the runs of cells no outline edge comes within a
	// cell of, on the map or not.
	innerOff []int32
	inner    [][2]int32
}

// outlineRelTol is the polygonal outline's tolerance as a share of the
// shorter cell side (our choice): every sampled outline point lies within
// it of the chord through its neighbours, so a cut cell's on-map area is
// off by at most about tol times the outline's length inside the cell, a
// few times 1e-5 of the cell's area.
const outlineRelTol = 1e-5

// outlineMinTolM is the floor of that tolerance in metres (our choice):
// on grids of cells under 100 m the outline stays within 1 mm, so it takes
// at most a few hundred thousand PROJ transformations.
const outlineMinTolM = 1e-3

// outlineSteps is the number of equal steps each of the outline's four
// curves (two meridians, two pole lines) is first sampled at, before
// refinement: half a degree of latitude or longitude (our choice).
const outlineSteps = 360

// cut reports whether any cell c0 <= c < c1 of row is cut by the outline.
func (e *mapEdges) cut(row, c0, c1 int) bool {
	if e == nil {
		return false
	}
	cols := e.cols[e.off[row]:e.off[row+1]]
	i, _ := slices.BinarySearch(cols, int32(c0))
	return i < len(cols) && int(cols[i]) < c1
}

// fill sets dst[c-c0] to onMap times scale for the cut cells c0 <= c < c1
// of row.
func (e *mapEdges) fill(row, c0, c1 int, scale float64, dst []float64) {
	lo, hi := int(e.off[row]), int(e.off[row+1])
	cols := e.cols[lo:hi]
	i, _ := slices.BinarySearch(cols, int32(c0))
	for ; i < len(cols) && int(cols[i]) < c1; i++ {
		dst[int(cols[i])-c0] = e.onMap[lo+i] * scale
	}
}

// edgeCache holds the map edges of the last few grid geometries (see
// geometryCache).
var edgeCache geometryCache[*mapEdges]

// setMapEdges sets g.edges on an equal-area grid whose CRS maps the whole
// Earth inside an outline that crosses the grid; nil otherwise.
func (g *Grid) setMapEdges() {
	g.edges = edgeCache.get(g, func() *mapEdges {
		// Tracing the outline transforms points off the map of most
		// CRSs (the antipode of an azimuthal one's centre): PROJ's
		// message for each is expected here, not a fault of the run.
		mark := gdalmsg.Mark()
		xs, ys, tol, ok := g.worldOutline()
		gdalmsg.Forget(mark, gdalmsg.OffDomain)
		if !ok {
			return nil
		}
		e := cutCells(g.GeoTransform, g.Width, g.Height, xs, ys, tol)
		if e != nil {
			e.setInner(g)
		}
		return e
	})
}

// setInner keeps, of the runs of cells cutCells found no outline edge
// near (e.inner), those on the map: a run's cells are connected and the
// outline comes within a cell of none of them, so they lie wholly on one
// side of it, and the round trip of the run's middle cell's centre
// (dropOffMap) tells which.
func (e *mapEdges) setInner(g *Grid) {
	xs, ys := make([]float64, len(e.inner)), make([]float64, len(e.inner))
	k := 0
	for r := 0; r+1 < len(e.innerOff); r++ {
		for _, run := range e.inner[e.innerOff[r]:e.innerOff[r+1]] {
			xs[k], ys[k] = g.Centre(int(run[0]+run[1])/2, r)
			k++
		}
	}
	lons, lats := make([]float64, len(xs)), make([]float64, len(ys))
	g.toLonLatOnMap(xs, ys, lons, lats, nil)
	kept, off := e.inner[:0], make([]int32, len(e.innerOff))
	k = 0
	for r := 0; r+1 < len(e.innerOff); r++ {
		off[r] = int32(len(kept))
		for _, run := range e.inner[e.innerOff[r]:e.innerOff[r+1]] {
			if !math.IsNaN(lons[k]) {
				kept = append(kept, run)
			}
			k++
		}
	}
	off[len(off)-1] = int32(len(kept))
	e.inner, e.innerOff = slices.Clip(kept), off
}

// surelyOnMap reports whether the point (x, y) of the grid's CRS lies in
// a cell of e.inner (NaN coordinates do not).
func (e *mapEdges) surelyOnMap(gt *[6]float64, w, h int, x, y float64) bool {
	c := math.Floor((x - gt[0]) / gt[1])
	r := math.Floor((y - gt[3]) / gt[5])
	if !(c >= 0 && c < float64(w) && r >= 0 && r < float64(h)) {
		return false
	}
	runs := e.inner[e.innerOff[int(r)]:e.innerOff[int(r)+1]]
	i, _ := slices.BinarySearchFunc(runs, int32(c), func(run [2]int32, c int32) int { return cmp.Compare(run[1], c+1) })
	return i < len(runs) && runs[i][0] <= int32(c)
}

// unitM returns the length in metres of the grid CRS's linear unit.
func (g *Grid) unitM() float64 {
	if g.unitArea != 0 {
		return math.Sqrt(g.unitArea)
	}
	return 1
}

// outlineCurve is one of the outline's four curves: longitude and
// latitude as functions of t in [0, 1].
type outlineCurve func(t float64) (lon, lat float64)

// worldOutline returns the outline of the grid CRS's world map as a
// counter-clockwise ring (xs, ys; the last point not repeated) and its
// tolerance, when the CRS maps the whole Earth inside it and it crosses
// the grid: PROJ's forward transform of the meridian lon0+180 from the
// South Pole to the North Pole, of the North Pole from lon0+180 to
// lon0-180, of the meridian lon0-180 back south and of the South Pole
// back east, each first at outlineSteps equal steps, then halved wherever
// the transformed midpoint of a step lies further than the tolerance from
// its chord. ok is false when PROJ cannot transform a point of it, when
// the ring's area is not that of the whole Earth within 1% (the CRS's
// sphere of its semi-major axis; our margin, wide enough for any
// ellipsoid's authalic sphere, 0.22% smaller on WGS84, and narrow enough
// to refuse an interrupted projection, whose outline leaves gaps inside
// that ring, or an azimuthal one, whose two meridians coincide), or when
// the half-degree ring lies further from the grid than twice its own
// deviation from the finer one (no cell is cut).
func (g *Grid) worldOutline() (xs, ys []float64, tol float64, ok bool) {
	a := sphereRadius(g.srs)
	if a <= 0 {
		return nil, nil, 0, false
	}
	lon0 := 0.0
	if m := centralMeridian.FindStringSubmatch(g.WKT); m != nil {
		fmt.Sscan(m[1], &lon0)
	}
	east, west := lon0+180, lon0-180
	// PROJ takes lon0+180 and lon0-180 to the map's opposite edges on
	// the pseudo-cylindrical projections, but to one edge on a conic one:
	// then the meridians a billionth of a degree inside (1e-4 m off).
	px, py := []float64{east, west}, []float64{0, 0}
	g.FromLonLat(px, py, px, py)
	if math.IsNaN(px[0]) || math.IsNaN(px[1]) {
		return nil, nil, 0, false
	}
	if math.Abs(px[0]-px[1]) <= 1e-9*(math.Abs(px[0])+math.Abs(py[0])+1) {
		east, west = east-1e-9, west+1e-9
	}
	curves := []outlineCurve{
		func(t float64) (float64, float64) { return east, -90 + 180*t },
		func(t float64) (float64, float64) { return east - (east-west)*t, 90 },
		func(t float64) (float64, float64) { return west, 90 - 180*t },
		func(t float64) (float64, float64) { return west + (east-west)*t, -90 },
	}
	gt := g.GeoTransform
	u := g.unitM()
	tol = math.Max(outlineRelTol*math.Min(math.Abs(gt[1]), math.Abs(gt[5])), outlineMinTolM/u)
	// The half-degree ring: is it the whole Earth's, and near the grid?
	coarse := make([][]float64, len(curves))
	var cx, cy []float64
	dev := 0.0
	for i, c := range curves {
		ts, x, y, d, ok := g.sampleCurve(c, math.Inf(1))
		if !ok {
			return nil, nil, 0, false
		}
		coarse[i] = ts
		cx, cy = append(cx, x[:len(x)-1]...), append(cy, y[:len(y)-1]...)
		dev = math.Max(dev, d)
	}
	want := 4 * math.Pi * a * a / (u * u)
	if area := ringArea(cx, cy); !(math.Abs(area/want-1) < 0.01) {
		return nil, nil, 0, false
	}
	b := g.Bounds()
	margin := 2*dev + tol
	near := false
	for i := range cx {
		j := (i + 1) % len(cx)
		if math.Max(cx[i], cx[j]) >= b[0]-margin && math.Min(cx[i], cx[j]) <= b[2]+margin &&
			math.Max(cy[i], cy[j]) >= b[1]-margin && math.Min(cy[i], cy[j]) <= b[3]+margin {
			near = true
			break
		}
	}
	if !near {
		return nil, nil, 0, false
	}
	for _, c := range curves {
		_, x, y, _, ok := g.sampleCurve(c, tol)
		if !ok {
			return nil, nil, 0, false
		}
		for i := 0; i < len(x)-1; i++ {
			if n := len(xs); n > 0 && xs[n-1] == x[i] && ys[n-1] == y[i] {
				continue
			}
			xs, ys = append(xs, x[i]), append(ys, y[i])
		}
	}
	if ringArea(xs, ys) < 0 {
		slices.Reverse(xs)
		slices.Reverse(ys)
	}
	return xs, ys, tol, true
}

// sampleCurve samples curve c at outlineSteps equal steps of t and halves
// each step, level by level (each level's midpoints transformed together),
// whose transformed midpoint lies further than tol from the chord (steps
// below 1e-12 of the curve are not halved: PROJ's own rounding near the
// poles is then all that is left). It returns the parameters and points,
// first to last, and the largest distance of a midpoint from its chord
// among the steps it kept; ok is false when PROJ cannot transform a point.
// With tol +Inf it keeps the equal steps, measuring their midpoints.
func (g *Grid) sampleCurve(c outlineCurve, tol float64) (ts, xs, ys []float64, dev float64, ok bool) {
	n := outlineSteps
	ts = make([]float64, n+1)
	for i := range ts {
		ts[i] = float64(i) / float64(n)
	}
	xs, ys, ok = g.curvePoints(c, ts)
	if !ok {
		return nil, nil, nil, 0, false
	}
	for level := 0; level < 48; level++ {
		// Midpoints of every step.
		mt := make([]float64, len(ts)-1)
		for i := range mt {
			mt[i] = ts[i] + (ts[i+1]-ts[i])/2
		}
		mx, my, ok := g.curvePoints(c, mt)
		if !ok {
			return nil, nil, nil, 0, false
		}
		split := false
		nts, nxs, nys := ts[:1:1], xs[:1:1], ys[:1:1]
		nts, nxs, nys = append([]float64(nil), nts...), append([]float64(nil), nxs...), append([]float64(nil), nys...)
		dev = 0
		for i := range mt {
			d := chordDistance(xs[i], ys[i], xs[i+1], ys[i+1], mx[i], my[i])
			if d > tol && ts[i+1]-ts[i] > 1e-12 {
				nts, nxs, nys = append(nts, mt[i]), append(nxs, mx[i]), append(nys, my[i])
				split = true
			} else {
				dev = math.Max(dev, d)
			}
			nts, nxs, nys = append(nts, ts[i+1]), append(nxs, xs[i+1]), append(nys, ys[i+1])
		}
		if !split {
			return ts, xs, ys, dev, true
		}
		ts, xs, ys = nts, nxs, nys
	}
	return ts, xs, ys, dev, true
}

// curvePoints transforms the points of curve c at parameters ts to the
// grid CRS; ok is false when one cannot be.
func (g *Grid) curvePoints(c outlineCurve, ts []float64) (xs, ys []float64, ok bool) {
	xs, ys = make([]float64, len(ts)), make([]float64, len(ts))
	for i, t := range ts {
		xs[i], ys[i] = c(t)
	}
	g.FromLonLat(xs, ys, xs, ys)
	for i := range xs {
		if math.IsNaN(xs[i]) || math.IsNaN(ys[i]) || math.IsInf(xs[i], 0) || math.IsInf(ys[i], 0) {
			return nil, nil, false
		}
	}
	return xs, ys, true
}

// chordDistance returns the distance of point (px, py) from the segment
// (x0, y0)-(x1, y1).
func chordDistance(x0, y0, x1, y1, px, py float64) float64 {
	dx, dy := x1-x0, y1-y0
	l2 := dx*dx + dy*dy
	t := 0.0
	if l2 > 0 {
		t = math.Max(0, math.Min(1, ((px-x0)*dx+(py-y0)*dy)/l2))
	}
	return math.Hypot(px-(x0+t*dx), py-(y0+t*dy))
}

// ringArea returns the signed (counter-clockwise positive) area of the
// ring xs, ys (the last point not repeated), the shoelace formula about
// its first point.
func ringArea(xs, ys []float64) float64 {
	n := len(xs)
	if n < 3 {
		return 0
	}
	s := 0.0
	for i := 1; i < n-1; i++ {
		s += (xs[i]-xs[0])*(ys[i+1]-ys[0]) - (xs[i+1]-xs[0])*(ys[i]-ys[0])
	}
	return s / 2
}

// cutCells finds the cells of the grid (geotransform gt, w x h cells) that
// the outline ring (xs, ys, counter-clockwise, within tol of the true
// outline) cuts, and the planar area of each one's part inside it. Row by
// row: the ring's edges are bucketed by the rows they cross; a row's cells
// under an edge's span of x inside the row are its candidates (no other
// cell has the outline through it: it is wholly inside or wholly outside);
// the row is split into slabs at every vertex inside it, where the edges
// crossing a slab are straight and do not cross, so the map inside the
// slab is a set of trapezoids between pairs of them (in order of x), and a
// candidate's on-map area is the sum of the exact areas of those
// trapezoids within its columns. A candidate within tol times its
// perimeter of its full area is whole (and keeps its planar area bit for
// bit); within that of nothing it lies off the map (and keeps its planar
// area, as every cell off the map does).
func cutCells(gt [6]float64, w, h int, xs, ys []float64, tol float64) *mapEdges {
	n := len(xs)
	cw, ch := gt[1], -gt[5]
	rowOf := func(y float64) int { return int(math.Floor((gt[3] - y) / ch)) }
	// Edges bucketed by row (CSR): edge i runs from point i to i+1.
	count := make([]int32, h+1)
	span := func(i int) (int, int) {
		j := (i + 1) % n
		r0, r1 := rowOf(math.Max(ys[i], ys[j])), rowOf(math.Min(ys[i], ys[j]))
		return max(r0, 0), min(r1, h-1)
	}
	for i := 0; i < n; i++ {
		r0, r1 := span(i)
		for r := r0; r <= r1; r++ {
			count[r+1]++
		}
	}
	for r := 0; r < h; r++ {
		count[r+1] += count[r]
	}
	bucket := make([]int32, count[h])
	fillAt := slices.Clone(count[:h])
	for i := 0; i < n; i++ {
		r0, r1 := span(i)
		for r := r0; r <= r1; r++ {
			bucket[fillAt[r]] = int32(i)
			fillAt[r]++
		}
	}
	e := &mapEdges{off: make([]int32, h+1), tol: tol, points: n, innerOff: make([]int32, h+1)}
	touched := make([]int32, w) // row r+1 where an edge comes within a cell
	full := cw * ch
	snap := tol * 2 * (cw + ch)
	stamp := make([]int32, w)
	var (
		segs  []clipSeg
		cands []int32
		area  []float64
		cuts  []float64
		cross []slabEdge
	)
	for r := 0; r < h; r++ {
		e.off[r] = int32(len(e.cols))
		e.innerOff[r] = int32(len(e.inner))
		yt := gt[3] + float64(r)*gt[5]
		yb := yt + gt[5]
		segs, cands, cuts = segs[:0], cands[:0], cuts[:0]
		for _, i := range bucket[count[r]:count[r+1]] {
			j := (int(i) + 1) % n
			s, ok := clipToBand(xs[i], ys[i], xs[j], ys[j], yb, yt)
			if !ok {
				continue
			}
			segs = append(segs, s)
			cuts = append(cuts, s.ya, s.yb)
			c0 := int(math.Floor((math.Min(s.xa, s.xb) - gt[0]) / cw))
			c1 := int(math.Ceil((math.Max(s.xa, s.xb)-gt[0])/cw)) - 1
			for c := max(c0, 0); c <= min(c1, w-1); c++ {
				if stamp[c] != int32(r+1) {
					stamp[c] = int32(r + 1)
					cands = append(cands, int32(c))
				}
			}
			// A cell either side too: an edge along a column's edge
			// makes no candidate, and must still part the runs.
			for c := max(c0-1, 0); c <= min(max(c1, c0)+1, w-1); c++ {
				touched[c] = int32(r + 1)
			}
		}
		e.inner = appendRuns(e.inner, touched, int32(r+1))
		if len(cands) == 0 {
			continue
		}
		slices.Sort(cands)
		area = slices.Grow(area[:0], len(cands))[:len(cands)]
		clear(area)
		cuts = append(cuts, yb, yt)
		slices.Sort(cuts)
		cuts = slices.Compact(cuts)
		for k := 0; k+1 < len(cuts); k++ {
			s0, s1 := cuts[k], cuts[k+1]
			if !(s1 > s0) || s0 < yb || s1 > yt {
				continue
			}
			cross = cross[:0]
			for _, s := range segs {
				if s.ya < s.yb && s.ya <= s0 && s.yb >= s1 {
					cross = append(cross, slabEdge{s.at(s0), s.at(s1)})
				}
			}
			slices.SortFunc(cross, func(p, q slabEdge) int {
				return cmp.Compare(p.x0+p.x1, q.x0+q.x1)
			})
			for p := 0; p+1 < len(cross); p += 2 {
				L, R := cross[p], cross[p+1]
				lo := math.Min(L.x0, L.x1)
				hi := math.Max(R.x0, R.x1)
				c0 := int(math.Floor((lo - gt[0]) / cw))
				i, _ := slices.BinarySearch(cands, int32(c0))
				for ; i < len(cands); i++ {
					c := int(cands[i])
					xa := gt[0] + float64(c)*cw
					if xa >= hi {
						break
					}
					area[i] += trapezoidStrip(s1-s0, L.x0, L.x1, R.x0, R.x1, xa, xa+cw)
				}
			}
		}
		for i, c := range cands {
			a := math.Min(area[i], full)
			if a >= full-snap || a <= snap {
				continue
			}
			e.cols = append(e.cols, c)
			e.onMap = append(e.onMap, a)
		}
	}
	e.off[h] = int32(len(e.cols))
	e.innerOff[h] = int32(len(e.inner))
	if len(e.cols) == 0 {
		return nil
	}
	return e
}

// appendRuns appends to runs the maximal runs [c0, c1) of columns whose
// touched mark is not mark.
func appendRuns(runs [][2]int32, touched []int32, mark int32) [][2]int32 {
	start := -1
	for c, t := range touched {
		switch {
		case t != mark && start < 0:
			start = c
		case t == mark && start >= 0:
			runs = append(runs, [2]int32{int32(start), int32(c)})
			start = -1
		}
	}
	if start >= 0 {
		runs = append(runs, [2]int32{int32(start), int32(len(touched))})
	}
	return runs
}

// clipSeg is an outline edge clipped to a row: from (xa, ya) to (xb, yb)
// with ya <= yb.
type clipSeg struct{ xa, ya, xb, yb float64 }

// at returns the segment's x at height y (ya <= y <= yb; xa when it is
// horizontal).
func (s clipSeg) at(y float64) float64 {
	if s.yb == s.ya {
		return s.xa
	}
	switch y {
	case s.ya:
		return s.xa
	case s.yb:
		return s.xb
	}
	return s.xa + (y-s.ya)*(s.xb-s.xa)/(s.yb-s.ya)
}

// slabEdge is an edge across a slab: its x at the slab's bottom and top.
type slabEdge struct{ x0, x1 float64 }

// clipToBand clips the segment (x0, y0)-(x1, y1) to yb <= y <= yt; ok is
// false when no part of it lies there.
func clipToBand(x0, y0, x1, y1, yb, yt float64) (clipSeg, bool) {
	if y0 > y1 {
		x0, y0, x1, y1 = x1, y1, x0, y0
	}
	if y1 < yb || y0 > yt {
		return clipSeg{}, false
	}
	s := clipSeg{x0, y0, x1, y1}
	if y0 < yb {
		s.xa, s.ya = x0+(yb-y0)*(x1-x0)/(y1-y0), yb
	}
	if y1 > yt {
		s.xb, s.yb = x0+(yt-y0)*(x1-x0)/(y1-y0), yt
	}
	return s, true
}

// trapezoidStrip returns the area of the part between the columns xa <= x
// <= xb of the trapezoid of height hgt between the lines L (from l0 at its
// bottom to l1 at its top) and R (r0 to r1), L left of R: the integral
// over the height of max(0, min(R, xb) - max(L, xa)), piecewise linear
// between the heights where L or R crosses xa or xb, so exact by the
// trapezoid rule between them.
func trapezoidStrip(hgt, l0, l1, r0, r1, xa, xb float64) float64 {
	if math.Max(r0, r1) <= xa || math.Min(l0, l1) >= xb {
		return 0
	}
	var ts [6]float64
	k := 0
	ts[k], k = 0, k+1
	for _, p := range [4][3]float64{{l0, l1, xa}, {l0, l1, xb}, {r0, r1, xa}, {r0, r1, xb}} {
		if p[0] != p[1] {
			if t := (p[2] - p[0]) / (p[1] - p[0]); t > 0 && t < 1 {
				ts[k], k = t, k+1
			}
		}
	}
	ts[k], k = 1, k+1
	slices.Sort(ts[:k])
	f := func(t float64) float64 {
		l, r := l0+t*(l1-l0), r0+t*(r1-r0)
		return math.Max(0, math.Min(r, xb)-math.Max(l, xa))
	}
	s := 0.0
	prev := f(ts[0])
	for i := 1; i < k; i++ {
		cur := f(ts[i])
		s += (ts[i] - ts[i-1]) * (prev + cur) / 2
		prev = cur
	}
	return s * hgt
}
