package extent

import (
	"cmp"
	"slices"
	"sort"

	"github.com/paulmach/orb"
)

// Outlines are traced from a member's row runs: no raster of the member
// is made. The boundary between cells inside and outside is a set of
// directed unit-grid edges with the inside on their left:
//
//   - the west side of each run, walked south; the east side, walked north;
//   - on the grid line above row r, the columns inside in r but not in r-1
//     (walked west), and the columns inside in r-1 but not in r (walked
//     east).
//
// Edges are linked into rings; at a vertex where two inside cells touch
// only diagonally the ring turns left, so diagonal neighbours are not
// joined (4-connectivity, as polygonising a raster does by default).
// Rings with the inside on the left and positive turning are outer rings;
// the others are holes. Each ring is given to the connected group of runs
// (4-connected) holding the cell on its left, and each group becomes one
// polygon: its outer ring and its holes.

// gridEdge is a directed edge between grid vertices (x, y) in cell units,
// x east and y south from the grid's top-left corner.
type gridEdge struct {
	x0, y0, x1, y1 int32
}

// vertexIndex finds the edges leaving a vertex: the edges' numbers
// grouped by the grid line of their start (a counting sort on y0), each
// group sorted by x0 and, at one vertex, by number.
type vertexIndex struct {
	edges []gridEdge
	start []int32 // line y's edges are order[start[y]:start[y+1]]
	order []int32
}

// newVertexIndex indexes edges whose starts lie on grid lines 0..height,
// in sc's buffers.
func newVertexIndex(edges []gridEdge, height int, sc *outlineScratch) *vertexIndex {
	sc.start = resize(sc.start, height+2, height+2)
	clear(sc.start)
	sc.order = resize(sc.order, len(edges), len(edges))
	vi := &vertexIndex{edges: edges, start: sc.start, order: sc.order}
	for _, e := range edges {
		vi.start[e.y0+1]++
	}
	for y := 1; y < len(vi.start); y++ {
		vi.start[y] += vi.start[y-1]
	}
	sc.pos = append(sc.pos[:0], vi.start...)
	pos := sc.pos
	for i, e := range edges {
		vi.order[pos[e.y0]] = int32(i)
		pos[e.y0]++
	}
	for y := 0; y+1 < len(vi.start); y++ {
		line := vi.order[vi.start[y]:vi.start[y+1]]
		slices.SortFunc(line, func(a, b int32) int {
			return cmp.Or(cmp.Compare(edges[a].x0, edges[b].x0), cmp.Compare(a, b))
		})
	}
	return vi
}

// leaving returns the numbers of the (at most two) edges leaving vertex
// (x, y), smaller first, -1 for none.
func (vi *vertexIndex) leaving(x, y int32) [2]int32 {
	o := [2]int32{-1, -1}
	if y < 0 || int(y)+1 >= len(vi.start) {
		return o
	}
	line := vi.order[vi.start[y]:vi.start[y+1]]
	// The first edge starting at or east of x (sort.Search, inlined).
	i, j := 0, len(line)
	for i < j {
		if m := int(uint(i+j) >> 1); vi.edges[line[m]].x0 < x {
			i = m + 1
		} else {
			j = m
		}
	}
	for n := 0; n < 2 && i < len(line) && vi.edges[line[i]].x0 == x; i, n = i+1, n+1 {
		o[n] = line[i]
	}
	return o
}

// outlineScratch holds the buffers a tracing of an outline works in,
// reused from member to member by one worker (WriteGeoPackage): on the
// 60-member benchmark family they were three quarters of the bytes it
// allocated, each fresh block cleared before use. What traceOutline
// returns lies in pts, and what Outline returns in ring: both are valid
// until the next tracing with the same scratch.
type outlineScratch struct {
	first             []int
	parent            []int32
	edges             []gridEdge
	start, order, pos []int32
	used              []bool
	buf               [][2]int32
	at                []bool
	pts               [][2]int32 // the rings' corners, one after another
	ring              []orb.Point
}

// traceOutline returns member k's cells as polygons in cell units (x east,
// y south from the top-left corner), one per 4-connected group of cells,
// ordered by the group's first cell in row-major order, in sc's buffers.
func (f *Family) traceOutline(k int, sc *outlineScratch) [][][][2]int32 {
	rows := f.cells[k].rows
	groups := newRunGroups(rows, sc)
	if groups.runs() == 0 {
		return nil
	}
	sc.edges = cellEdges(rows, groups.runs(), sc.edges[:0])
	edges := sc.edges
	sc.used = resize(sc.used, len(edges), len(edges))
	clear(sc.used)
	t := ringTracer{edges: edges, out: newVertexIndex(edges, len(rows), sc), used: sc.used, buf: sc.buf, at: sc.at}
	sc.pts = sc.pts[:0]
	var rings []tracedRing
	for start := range edges {
		if t.used[start] {
			continue
		}
		pts, twoWays, pinched := t.trace(start)
		// A ring that passes a vertex twice (cells touching only at a
		// corner) is split there into simple rings, as valid polygons
		// need: an outer ring and a hole touching it at that point. Only
		// a vertex with two ways on can be passed twice; a ring without
		// one is already simple (splitLoops would return it whole).
		var loops [][][2]int32
		if pinched {
			loops = splitLoops(pts, twoWays)
		} else if len(pts) > 3 {
			// Kept in sc.pts (a full slice expression, so that appending
			// to it never writes over the next ring).
			n := len(sc.pts)
			sc.pts = append(sc.pts, pts...)
			loops = [][][2]int32{sc.pts[n:len(sc.pts):len(sc.pts)]}
		}
		for _, loop := range loops {
			var area int64
			for i := 1; i < len(loop); i++ {
				area += int64(loop[i-1][0])*int64(loop[i][1]) - int64(loop[i][0])*int64(loop[i-1][1])
			}
			p0, p1 := loop[0], loop[1]
			group := groups.left(p0[0], p0[1], sign(p1[0]-p0[0]), sign(p1[1]-p0[1]))
			// With x east and y south, the inside on the left makes outer
			// rings turn clockwise on screen: a negative shoelace sum.
			rings = append(rings, tracedRing{pts: loop, group: group, outer: area < 0})
		}
	}
	sc.buf, sc.at = t.buf, t.at
	return outlinePolygons(rings)
}

// runGroups numbers a member's runs in row-major order and groups those
// connected across rows (union-find).
type runGroups struct {
	rows   []rowRuns
	first  []int   // first[r]: the number of row r's first run; first[len(rows)] the count
	parent []int32 // union-find parents of the runs
}

func newRunGroups(rows []rowRuns, sc *outlineScratch) *runGroups {
	sc.first = resize(sc.first, len(rows)+1, len(rows)+1)
	first := sc.first
	first[0] = 0
	for r, rr := range rows {
		first[r+1] = first[r] + len(rr)/2
	}
	sc.parent = resize(sc.parent, first[len(rows)], first[len(rows)])
	g := &runGroups{rows: rows, first: first, parent: sc.parent}
	for i := range g.parent {
		g.parent[i] = int32(i)
	}
	for r := 1; r < len(rows); r++ {
		a, b := rows[r-1], rows[r]
		i, j := 0, 0
		for i < len(a) && j < len(b) {
			if max(a[i], b[j]) < min(a[i+1], b[j+1]) {
				x, y := g.find(int32(first[r-1]+i/2)), g.find(int32(first[r]+j/2))
				if x != y {
					g.parent[max(x, y)] = min(x, y)
				}
			}
			if a[i+1] < b[j+1] {
				i += 2
			} else {
				j += 2
			}
		}
	}
	return g
}

// runs returns the number of runs.
func (g *runGroups) runs() int { return len(g.parent) }

// find returns the group of run i: its smallest run number.
func (g *runGroups) find(i int32) int32 {
	for g.parent[i] != i {
		g.parent[i] = g.parent[g.parent[i]]
		i = g.parent[i]
	}
	return i
}

// left names the group of the cell on the left of the unit step from
// (x, y) in direction (dx, dy).
func (g *runGroups) left(x, y, dx, dy int32) int32 {
	cx, cy := x, y // south: the cell to the east is (x, y)
	switch {
	case dy < 0: // north: cell to the west
		cx, cy = x-1, y-1
	case dx < 0: // west: cell to the south
		cx = x - 1
	case dx > 0: // east: cell to the north
		cy = y - 1
	}
	rr := g.rows[cy]
	ri := sort.Search(len(rr)/2, func(i int) bool { return rr[2*i+1] > cx })
	return g.find(int32(g.first[cy] + ri))
}

// cellEdges returns the unit-cell boundary of a member's runs as directed
// edges with the inside on their left: for each row line, the horizontal
// edges where the rows above and below differ, then each run's two
// vertical edges, appended to edges. Each run gives two vertical edges;
// horizontal ones are about as many on smooth members (the slice grows
// beyond when not).
func cellEdges(rows []rowRuns, nRuns int, edges []gridEdge) []gridEdge {
	edges = slices.Grow(edges, 4*nRuns)
	var scratch rowRuns
	for r := 0; r <= len(rows); r++ {
		var above, below rowRuns
		if r > 0 {
			above = rows[r-1]
		}
		if r < len(rows) {
			below = rows[r]
		}
		y := int32(r)
		scratch = minus(scratch[:0], below, above)
		for i := 0; i < len(scratch); i += 2 {
			edges = append(edges, gridEdge{scratch[i+1], y, scratch[i], y})
		}
		scratch = minus(scratch[:0], above, below)
		for i := 0; i < len(scratch); i += 2 {
			edges = append(edges, gridEdge{scratch[i], y, scratch[i+1], y})
		}
		for i := 0; i < len(below); i += 2 {
			edges = append(edges, gridEdge{below[i], y, below[i], y + 1}, gridEdge{below[i+1], y + 1, below[i+1], y})
		}
	}
	return edges
}

// tracedRing is a simple ring of a member's outline: its corners (the
// first repeated at the end), the group of runs it bounds and whether it
// is that group's outer ring.
type tracedRing struct {
	pts   [][2]int32
	group int32
	outer bool
}

// ringTracer follows a member's cell edges into rings (see trace). The
// corners of the ring being traced are gathered in buf (reused), with
// whether the ring reached each by a vertex with two ways on (at).
type ringTracer struct {
	edges []gridEdge
	out   *vertexIndex
	used  []bool
	buf   [][2]int32
	at    []bool
}

// trace follows the unused edges from edges[start] until it comes back,
// turning left where a vertex has two ways on, and returns the ring's
// corners (its first corner repeated at the end), whether the ring
// reached each by a vertex with two ways on, and whether it passed such a
// vertex at all (pinched). The slices are valid until the next call.
func (t *ringTracer) trace(start int) (pts [][2]int32, twoWays []bool, pinched bool) {
	edges := t.edges
	pts, twoWays = t.buf[:0], t.at[:0]
	cur := start
	dx, dy := int32(0), int32(0)
	arrived := false // the current edge starts at a vertex with two ways on
	for {
		t.used[cur] = true
		e := edges[cur]
		ndx, ndy := sign(e.x1-e.x0), sign(e.y1-e.y0)
		if ndx != dx || ndy != dy {
			pts = append(pts, [2]int32{e.x0, e.y0})
			twoWays = append(twoWays, arrived)
		}
		dx, dy = ndx, ndy
		o := t.out.leaving(e.x1, e.y1)
		next := o[0]
		arrived = o[1] >= 0
		if o[1] >= 0 {
			pinched = true
			// Two ways on: turn left, i.e. towards (dy, -dx).
			n := edges[o[0]]
			if sign(n.x1-n.x0) != dy || sign(n.y1-n.y0) != -dx {
				next = o[1]
			}
		}
		if t.used[next] {
			break
		}
		cur = int(next)
	}
	// The start is no corner when the last edge runs straight into it.
	if f0 := edges[start]; len(pts) > 1 && sign(f0.x1-f0.x0) == dx && sign(f0.y1-f0.y0) == dy {
		pts, twoWays = pts[1:], twoWays[1:]
	}
	pts = append(pts, pts[0])
	twoWays = append(twoWays, true)
	twoWays[0] = true
	t.buf, t.at = pts[:0], twoWays[:0]
	return pts, twoWays, pinched
}

// sign returns -1, 0 or 1 as v is negative, zero or positive.
func sign(v int32) int32 {
	switch {
	case v > 0:
		return 1
	case v < 0:
		return -1
	}
	return 0
}

// outlinePolygons makes one polygon per outer ring, with the holes of its
// group, in order of the group's first run.
func outlinePolygons(rings []tracedRing) [][][][2]int32 {
	byGroup := map[int32]int{}
	var polys [][][][2]int32
	var order []int32
	for _, rg := range rings {
		if rg.outer {
			byGroup[rg.group] = len(polys)
			polys = append(polys, [][][2]int32{rg.pts})
			order = append(order, rg.group)
		}
	}
	for _, rg := range rings {
		if !rg.outer {
			i := byGroup[rg.group]
			polys[i] = append(polys[i], rg.pts)
		}
	}
	// Sort polygons by group (the smallest run number of the group).
	idx := make([]int, len(polys))
	for i := range idx {
		idx[i] = i
	}
	sort.Slice(idx, func(a, b int) bool { return order[idx[a]] < order[idx[b]] })
	sorted := make([][][][2]int32, len(polys))
	for i, j := range idx {
		sorted[i] = polys[j]
	}
	return sorted
}

// Outline returns member k as polygons in the grid CRS: the union of its
// cells, traced along cell edges from its row runs.
func (f *Family) Outline(k int) orb.MultiPolygon {
	return f.outline(k, &outlineScratch{})
}

// outline is Outline in sc's buffers: its rings lie in sc.ring, valid
// until the next tracing with sc.
func (f *Family) outline(k int, sc *outlineScratch) orb.MultiPolygon {
	gt := f.Grid.GeoTransform
	polys := f.traceOutline(k, sc)
	n := 0
	for _, p := range polys {
		for _, r := range p {
			n += len(r)
		}
	}
	sc.ring = resize(sc.ring, n, n)
	var mp orb.MultiPolygon
	at := 0
	for _, p := range polys {
		var poly orb.Polygon
		for _, r := range p {
			ring := orb.Ring(sc.ring[at : at+len(r) : at+len(r)])
			at += len(r)
			for i, v := range r {
				x, y := float64(v[0]), float64(v[1])
				ring[i] = orb.Point{gt[0] + x*gt[1] + y*gt[2], gt[3] + x*gt[4] + y*gt[5]}
			}
			poly = append(poly, ring)
		}
		mp = append(mp, poly)
	}
	return mp
}

// splitLoops splits a closed vertex list (first vertex repeated last) at
// every vertex it passes twice, returning closed simple loops. may[i]
// tells whether pts[i] may be passed twice: only those vertices are
// looked up (a ring passes twice only its first vertex and vertices with
// two ways on), the others are kept in order.
func splitLoops(pts [][2]int32, may []bool) [][][2]int32 {
	var loops [][][2]int32
	stack := make([][2]int32, 0, len(pts))
	stackMay := make([]bool, 0, len(pts))
	at := map[[2]int32]int{}
	for n, p := range pts {
		if !may[n] {
			stack, stackMay = append(stack, p), append(stackMay, false)
			continue
		}
		if i, ok := at[p]; ok {
			loop := append([][2]int32{}, stack[i:]...)
			loop = append(loop, p)
			if len(loop) > 3 {
				loops = append(loops, loop)
			}
			for j, q := range stack[i+1:] {
				if stackMay[i+1+j] {
					delete(at, q)
				}
			}
			stack, stackMay = stack[:i+1], stackMay[:i+1]
			continue
		}
		at[p] = len(stack)
		stack, stackMay = append(stack, p), append(stackMay, true)
	}
	return loops
}
