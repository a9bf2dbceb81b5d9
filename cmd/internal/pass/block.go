package pass

import (
	"fmt"
	"math"
	"slices"
	"sync"
	"sync/atomic"

	"areasweep/extent"
	"areasweep/metrics"
)

// A block is scored in two steps. Its plan says, row by row, where each
// cell goes: the segments, runs of cells that go to one same set of
// members (their signature), the overlay of each group's (nested sequence
// of members) rings, the runs where each member is the smallest of its
// group holding the cells. scoreBlock then locates every cell once and
// adds each segment to its accumulators.
//
// Every block of a block row (the blocks that share grid rows) needs the
// same rows of the family, so the rows are planned once per block row and
// pass, over the whole width of the grid (a band: Family.Rings once per
// group and row, one overlay per row), and each block takes its columns
// of the band's segments (a binary search and the segments inside the
// block): the cost of a block follows the boundaries inside it, not the
// number of members. A band lives while its blocks are scored: memory is
// one block row's runs per block row in flight (at most a few, since
// workers take blocks in order), never the whole raster.
//
// When many cells of the block share a signature of several members (a
// block inside several large extents: the common case), they are added
// once, to a shared accumulator, which is merged into each of those
// members at the end of the block: one addition per cell instead of one
// per member, and a few merges per block. Sums are integers and Merge is
// exact, so the accumulators are the same as when every cell is added to
// every member (TestScoreMatchesCellByCell checks it byte for byte).

// MaxShared caps the shared accumulators (metrics.Shared) a worker uses in
// one block, and so keeps in memory beside its accumulator per member.
const MaxShared = 4

// target is a run of cells of one row whose smallest member in its group
// is k; columns are the grid's.
type target struct{ x0, x1, k int32 }

// segment is a run of cells of one row that go to the members of
// signature sig: in a band, columns are the grid's and sig the band's;
// in a block's plan, columns are relative to the block.
type segment struct{ x0, x1, sig int32 }

// edge is where a target starts (k >= 0: member k) or ends (k < 0:
// member -1-k) in a row.
type edge struct{ x, k int32 }

// band is the plan of one block row over the whole width of the grid:
// row y's segments are segs[sRow[2y]:sRow[2y+1]] (sorted, disjoint; rows
// with the same targets share them), and the members of signature i are
// sigMem[sigOff[i]:sigOff[i+1]] (ascending).
type band struct {
	claimed  atomic.Bool   // a worker plans it
	ready    chan struct{} // closed once planned
	left     atomic.Int32  // blocks of the band not yet scored
	segs     []segment
	sRow     []int32
	sigHash  map[uint64]int32 // signature by hash (see signature)
	sigIndex map[string]int32 // signature by members, for hash collisions
	sigOff   []int32
	sigMem   []int32
}

// members returns the members of signature id.
func (bd *band) members(id int32) []int32 { return bd.sigMem[bd.sigOff[id]:bd.sigOff[id+1]] }

// bands are the bands of one pass: the first worker to reach a block row
// plans it, the last one done with its blocks retires it, for its buffers
// to plan a later block row. A worker that finds its band being planned
// by another plans the next one meanwhile instead of waiting idle, so at
// most one band beyond those being scored is held.
type bands struct {
	fam          *extent.Family
	groups       [][]int
	width, nx    int // grid columns, blocks per block row
	blockH, last int // rows per block row, the last block row of the pass
	rows         RowRange

	mu   sync.Mutex
	live map[int]*band // by block row
	free []*band
}

func newBands(fam *extent.Family, groups [][]int, width, nx, blockH int, rows RowRange) *bands {
	return &bands{fam: fam, groups: groups, width: width, nx: nx, blockH: blockH,
		last: (rows.End - 1) / blockH, rows: rows, live: make(map[int]*band)}
}

// band returns block row by's band, new and not yet planned if no worker
// asked for it before.
func (bs *bands) band(by int) *band {
	bs.mu.Lock()
	defer bs.mu.Unlock()
	bd := bs.live[by]
	if bd == nil {
		if n := len(bs.free); n > 0 {
			bd, bs.free = bs.free[n-1], bs.free[:n-1]
		} else {
			bd = &band{sigHash: make(map[uint64]int32), sigIndex: make(map[string]int32)}
		}
		bd.claimed.Store(false)
		bd.ready = make(chan struct{})
		bd.left.Store(int32(bs.nx))
		bs.live[by] = bd
	}
	return bd
}

// plan plans bd, block row by, with ws's scratch unless another worker
// does; it reports whether it did.
func (bs *bands) plan(by int, bd *band, ws *workerState) bool {
	if !bd.claimed.CompareAndSwap(false, true) {
		return false
	}
	// Closed even if planning panics, so that no worker waits forever (the
	// pass then fails with an InternalError).
	defer close(bd.ready)
	y0, y1 := max(by*bs.blockH, bs.rows.First), min((by+1)*bs.blockH, bs.rows.End)
	ws.planBand(bd, bs.fam, bs.groups, y0, y1-y0, bs.width)
	return true
}

// get returns block row by's band, planned.
func (bs *bands) get(by int, ws *workerState) *band {
	bd := bs.band(by)
	if !bs.plan(by, bd, ws) {
		select {
		case <-bd.ready:
		default:
			if by < bs.last {
				bs.plan(by+1, bs.band(by+1), ws)
			}
			<-bd.ready
		}
	}
	return bd
}

// done says that one block of block row by is scored.
func (bs *bands) done(by int, bd *band) {
	if bd.left.Add(-1) > 0 {
		return
	}
	bs.mu.Lock()
	delete(bs.live, by)
	bs.free = append(bs.free, bd)
	bs.mu.Unlock()
}

// workerState is one worker's scratch for scoring blocks.
type workerState struct {
	// values remembers the values the pass's value set holds
	// (Stats.Values).
	values metrics.ValueCache
	// noMasses: the block's values are not all the cells' own (plan.
	// midpoints), so the pass gathers no Stats.Lowest or Stats.Runs.
	noMasses bool
	buf      []float64
	areas    []float64
	weights  []int64
	bins     []int32 // per column of the block row: layout bin, -1 when not scored
	span     extent.SpanScratch
	emit     func(int, []int32) // addTargets, bound once

	// Planning a band: the targets of the row and of the row before.
	targets, prevTargets []target
	edges                []edge
	active               []int32
	key                  []byte
	hash                 uint64 // of the active members (memberHash)
	// The last overlay: its edges in order (sorted), perm[j] the index
	// in generation order of sorted[j], tie[j] whether sorted[j] is at
	// the column of sorted[j-1], and its segments as runs between
	// edges: spans[i] = {j0, j1, sig} for the segment from sorted[j0].x to
	// sorted[j1].x. Valid for the band being planned only.
	sorted []edge
	keys   []uint64
	tmp    []int32 // countingOrder's scratch
	perm   []int32
	tie    []bool
	spans  []segment

	// The block's plan: row y's segments are segs[sRow[y]:sRow[y+1]]
	// (sorted, disjoint), signatures are band's, sigCells[i] the cells of
	// signature i in the block, sigAcc[i] its shared accumulator or nil.
	band     *band
	segs     []segment
	sRow     []int
	sigCells []int64
	sigAcc   []*metrics.Shared
	free     []*metrics.Shared // not in use, empty
	dst      []*metrics.Accumulator

	// The block's valid cells, when the pass records them (scoreBlock).
	validRuns, validOff []int32

	// rowW[row] is 1 + the weight of every whole cell of row on grids
	// whose rows have one cell area (latitude-longitude and equal-area;
	// cells a world map's outline cuts are weighed one by one), 0 until
	// computed; weights holds filled throughout its first wlen entries
	// (filled < 0: no such fill).
	rowW   []int64
	filled int64
	wlen   int
}

// rowWeights returns the integer area weights of cells c0 <= c < c1 of
// row (RowWeights), computed once per row on grids whose rows have one
// cell area, and that one weight, or -1 when they differ (on projections
// that are not equal-area, and where a world map's outline cuts one of
// the cells: extent.Grid.RowCellsEqual).
func (ws *workerState) rowWeights(g *extent.Grid, row, c0, c1 int) ([]int64, int64) {
	if !g.RowCellsEqual(row, c0, c1) {
		ws.filled = -1
		ws.areas, ws.weights = RowWeights(g, row, c0, c1, ws.areas, ws.weights)
		return ws.weights, -1
	}
	if ws.rowW == nil {
		ws.rowW = make([]int64, g.Height)
	}
	if ws.rowW[row] == 0 {
		ws.filled = -1 // RowWeights writes into weights
		var one []int64
		ws.areas, one = RowWeights(g, row, c0, c0+1, ws.areas, ws.weights)
		ws.rowW[row] = 1 + one[0]
	}
	w := ws.rowW[row] - 1
	weights := ws.weights[:c1-c0]
	if w != ws.filled || len(weights) > ws.wlen {
		for i := range weights {
			weights[i] = w
		}
		ws.filled, ws.wlen = w, len(weights)
	}
	return weights, w
}

func newWorkerState(bw, bh int) *workerState {
	return &workerState{buf: make([]float64, bw*bh), weights: make([]int64, bw),
		bins: make([]int32, bw), filled: -1}
}

// planBand fills bd with the segments and signatures of rows y0 <= row <
// y0+h over the grid's width.
func (ws *workerState) planBand(bd *band, fam *extent.Family, groups [][]int, y0, h, width int) {
	if ws.emit == nil {
		ws.emit = ws.addTargets
	}
	bd.segs, bd.sRow = bd.segs[:0], bd.sRow[:0]
	ws.sorted, ws.perm = ws.sorted[:0], ws.perm[:0] // signatures are the band's
	clear(bd.sigHash)
	clear(bd.sigIndex)
	bd.sigOff, bd.sigMem = append(bd.sigOff[:0], 0), bd.sigMem[:0]
	for y := 0; y < h; y++ {
		ws.prevTargets, ws.targets = ws.targets, ws.prevTargets[:0]
		for _, seq := range groups {
			fam.Rings(seq, y0+y, 0, width, &ws.span, ws.emit)
		}
		if y > 0 && slices.Equal(ws.targets, ws.prevTargets) {
			// Same targets as the row above: same segments.
			bd.sRow = append(bd.sRow, bd.sRow[2*y-2], bd.sRow[2*y-1])
			continue
		}
		s0 := int32(len(bd.segs))
		ws.overlay(bd, ws.targets)
		bd.sRow = append(bd.sRow, s0, int32(len(bd.segs)))
	}
}

// addTargets appends member k's runs to the row's targets (the emit of
// Family.Rings, bound once as a method value).
func (ws *workerState) addTargets(k int, runs []int32) {
	for i := 0; i < len(runs); i += 2 {
		ws.targets = append(ws.targets, target{runs[i], runs[i+1], int32(k)})
	}
}

// overlay appends the segments of one row's targets to bd: the runs
// between consecutive edges (starts and ends of targets, sorted by column)
// where some member is active, each with the signature of the active
// members. Consecutive rows mostly differ in where their edges are, not in
// their order: when the previous row's order of the edges, applied to
// this row's, is sorted and gives the same members in the same order and
// the same ties, the sweep would find the same signatures between the
// same edges, so only the columns are taken anew (no sort, no lookup).
func (ws *workerState) overlay(bd *band, ts []target) {
	if len(ts) == 0 {
		ws.sorted = ws.sorted[:0]
		return
	}
	ws.edges = ws.edges[:0]
	for _, t := range ts {
		ws.edges = append(ws.edges, edge{t.x0, t.k}, edge{t.x1, -1 - t.k})
	}
	n := len(ws.edges)
	if n == len(ws.sorted) && n == len(ws.perm) {
		prev, ok := ws.sorted, true
		for j, i := range ws.perm {
			e := ws.edges[i]
			if e.k != prev[j].k || j > 0 && (e.x < prev[j-1].x || (e.x == prev[j-1].x) != ws.tie[j]) {
				ok = false
				break
			}
			prev[j].x = e.x // prev[:j] is this row's order now
		}
		if ok {
			for _, sp := range ws.spans {
				bd.segs = append(bd.segs, segment{prev[sp.x0].x, prev[sp.x1].x, sp.sig})
			}
			return
		}
	}
	// The edges' order: ends before starts at the same column, so that a
	// member never appears twice in the active set.
	ws.perm = ws.perm[:0]
	if ws.countingOrder() {
		// Many edges on a narrow row: ordered by counting.
	} else if n < 1<<28 {
		// Sorted as integers x<<40 | (k+2048)<<28 | i, for columns below
		// 2^24 (k+2048 is in [1024, 3072) since -MaxMembers <= k <
		// MaxMembers): by column, then member (ends first); i, the edge's
		// index, rides along.
		ws.keys = ws.keys[:0]
		for i, e := range ws.edges {
			if e.x >= 1<<24 {
				ws.keys = ws.keys[:0]
				break
			}
			ws.keys = append(ws.keys, uint64(e.x)<<40|uint64(e.k+2048)<<28|uint64(i))
		}
		slices.Sort(ws.keys)
		for _, key := range ws.keys {
			ws.perm = append(ws.perm, int32(key&(1<<28-1)))
		}
	}
	if len(ws.perm) == 0 {
		for i := range n {
			ws.perm = append(ws.perm, int32(i))
		}
		slices.SortFunc(ws.perm, func(a, b int32) int {
			ea, eb := ws.edges[a], ws.edges[b]
			if ea.x != eb.x {
				return int(ea.x - eb.x)
			}
			return int(ea.k - eb.k)
		})
	}
	ws.sorted, ws.tie = ws.sorted[:0], ws.tie[:0]
	for j, i := range ws.perm {
		e := ws.edges[i]
		ws.tie = append(ws.tie, j > 0 && e.x == ws.sorted[j-1].x)
		ws.sorted = append(ws.sorted, e)
	}
	ws.spans = ws.spans[:0]
	ws.active, ws.hash = ws.active[:0], 0
	es := ws.sorted
	for i := 0; i < n; {
		i0 := i
		x := es[i].x
		for ; i < n && es[i].x == x; i++ {
			if k := es[i].k; k >= 0 {
				j, _ := slices.BinarySearch(ws.active, k)
				ws.active = slices.Insert(ws.active, j, k)
				ws.hash ^= memberHash(k)
			} else {
				j, _ := slices.BinarySearch(ws.active, -1-k)
				ws.active = slices.Delete(ws.active, j, j+1)
				ws.hash ^= memberHash(-1 - k)
			}
		}
		if i < n && len(ws.active) > 0 {
			sig := ws.signature(bd)
			bd.segs = append(bd.segs, segment{x, es[i].x, sig})
			ws.spans = append(ws.spans, segment{int32(i0), int32(i), sig})
		}
	}
}

// countingOrder puts in ws.perm the order of ws.edges by column, then
// member (ends first: k ascending), as the sort of overlay does, by a
// radix sort of the columns (least significant byte first, one counting
// pass per byte of the largest column: stable, so each column's edges
// stay in generation order) when the row has enough edges for that to
// beat a comparison sort, then sorts each column's edges by member among
// themselves (a column rarely holds more than two, and no two edges share
// both column and member: a member's runs are disjoint and do not touch).
// It reports whether it did.
func (ws *workerState) countingOrder() bool {
	n := len(ws.edges)
	if n < minCountingEdges {
		return false
	}
	hi := int32(0)
	for _, e := range ws.edges {
		if e.x < 0 {
			return false
		}
		hi = max(hi, e.x)
	}
	ws.perm = slices.Grow(ws.perm[:0], n)[:n]
	ws.tmp = slices.Grow(ws.tmp[:0], n)[:n]
	src, dst := ws.tmp, ws.perm
	for i := range src {
		src[i] = int32(i)
	}
	passes := 0
	for shift := uint(0); shift == 0 || hi>>shift > 0; shift += 8 {
		var cnt [257]int32
		for _, i := range src {
			cnt[(ws.edges[i].x>>shift)&0xff+1]++
		}
		for b := 1; b < len(cnt); b++ {
			cnt[b] += cnt[b-1]
		}
		for _, i := range src {
			b := (ws.edges[i].x >> shift) & 0xff
			dst[cnt[b]] = i
			cnt[b]++
		}
		src, dst = dst, src
		passes++
	}
	perm := src
	for j := 1; j < n; j++ {
		// Insertion sort by member within each column.
		for m := j; m > 0; m-- {
			a, b := ws.edges[perm[m-1]], ws.edges[perm[m]]
			if a.x != b.x || a.k < b.k {
				break
			}
			perm[m-1], perm[m] = perm[m], perm[m-1]
		}
	}
	if passes%2 == 0 {
		ws.perm, ws.tmp = ws.tmp, ws.perm
	}
	return true
}

// minCountingEdges is the fewest edges of a row that countingOrder
// orders (each of its passes costs about 512 steps plus two per edge,
// a comparison sort log2(n) comparisons per edge).
const minCountingEdges = 64

// memberHash is member k's term of a signature's hash: the XOR of its
// members' terms (kept up to date as members enter and leave the active
// set), a splitmix64 mix of k.
func memberHash(k int32) uint64 {
	z := uint64(k) + 0x9e3779b97f4a7c15
	z = (z ^ z>>30) * 0xbf58476d1ce4e5b9
	z = (z ^ z>>27) * 0x94d049bb133111eb
	return z ^ z>>31
}

// signature returns the id in bd of the active members' signature, added
// if new. Signatures are found by their hash (ws.hash); the first one of
// each hash owns it, and a different set with the same hash (a collision)
// is looked up by its members instead.
func (ws *workerState) signature(bd *band) int32 {
	id, ok := bd.sigHash[ws.hash]
	if ok && slices.Equal(bd.members(id), ws.active) {
		return id
	}
	if ok {
		ws.key = ws.key[:0]
		for _, k := range ws.active {
			ws.key = append(ws.key, byte(k), byte(k>>8))
		}
		if id, ok := bd.sigIndex[string(ws.key)]; ok {
			return id
		}
	}
	id = int32(len(bd.sigOff) - 1)
	if ok {
		bd.sigIndex[string(ws.key)] = id
	} else {
		bd.sigHash[ws.hash] = id
	}
	bd.sigMem = append(bd.sigMem, ws.active...)
	bd.sigOff = append(bd.sigOff, int32(len(bd.sigMem)))
	return id
}

// planBlock fills the block's plan from its band: each row's segments
// inside the block's columns, and the cells of each signature.
func (ws *workerState) planBlock(bd *band, b block) {
	ws.band = bd
	x0, x1 := int32(b.x0), int32(b.x0+b.w)
	ws.segs, ws.sRow = ws.segs[:0], append(ws.sRow[:0], 0)
	nsig := len(bd.sigOff) - 1
	if cap(ws.sigCells) < nsig {
		ws.sigCells = make([]int64, nsig)
	}
	ws.sigCells = ws.sigCells[:nsig]
	clear(ws.sigCells)
	for y := 0; y < b.h; y++ {
		s0, s1 := bd.sRow[2*y], bd.sRow[2*y+1]
		if y > 0 && s0 == bd.sRow[2*y-2] && s1 == bd.sRow[2*y-1] {
			// The row above's segments.
			for _, s := range ws.segs[ws.sRow[y-1]:ws.sRow[y]] {
				ws.segs = append(ws.segs, s)
				ws.sigCells[s.sig] += int64(s.x1 - s.x0)
			}
		} else {
			row := bd.segs[s0:s1]
			i, _ := slices.BinarySearchFunc(row, x0, func(s segment, x int32) int {
				if s.x1 <= x {
					return -1
				}
				return 1
			})
			for _, s := range row[i:] {
				if s.x0 >= x1 {
					break
				}
				s.x0, s.x1 = max(s.x0, x0)-x0, min(s.x1, x1)-x0
				ws.segs = append(ws.segs, s)
				ws.sigCells[s.sig] += int64(s.x1 - s.x0)
			}
		}
		ws.sRow = append(ws.sRow, len(ws.segs))
	}
}

// members returns the members of signature id.
func (ws *workerState) members(id int32) []int32 { return ws.band.members(id) }

// share gives a shared accumulator to the signatures (at most MaxShared)
// where it saves the most additions, if it saves more than it costs: a
// signature of m members and c cells saves c*(m-1) additions and costs m
// merges and a reset, each about (exact bins + histogram bins)/4 cell
// additions.
func (ws *workerState) share(layout *metrics.Layout, accs []*metrics.Accumulator) {
	ws.sigAcc = ws.sigAcc[:0]
	for range ws.sigCells {
		ws.sigAcc = append(ws.sigAcc, nil)
	}
	cost := int64(layout.Bins()+layout.HistBins()) / 4
	for n := 0; n < MaxShared; n++ {
		best, saving := -1, int64(0)
		for id, c := range ws.sigCells {
			if c == 0 {
				continue
			}
			m := int64(len(ws.members(int32(id))))
			if s := c*(m-1) - (m+1)*cost; m > 1 && ws.sigAcc[id] == nil && s > saving {
				best, saving = id, s
			}
		}
		if best < 0 {
			return
		}
		if len(ws.free) == 0 {
			ws.free = append(ws.free, layout.NewShared())
		}
		sh := ws.free[len(ws.free)-1]
		ws.free = ws.free[:len(ws.free)-1]
		ws.dst = ws.dst[:0]
		for _, k := range ws.members(int32(best)) {
			ws.dst = append(ws.dst, accs[k])
		}
		sh.Begin(ws.dst)
		ws.sigAcc[best] = sh
	}
}

// scoreBlock adds every valid cell of b (decoded) to the accumulators of
// the smallest member of each group holding it, by the block's plan
// (planBlock, called before).
func scoreBlock(g *extent.Grid, layout *metrics.Layout, b block, accs []*metrics.Accumulator, st *Stats, ws *workerState, opt Options) error {
	ws.share(layout, accs)
	x1 := b.x0 + b.w
	bins := ws.bins[:b.w]
	// With opt.Valid, row y's runs of valid cells are
	// ws.validRuns[ws.validOff[y]:ws.validOff[y+1]].
	var validRuns *[]int32
	if opt.Valid != nil {
		ws.validRuns, ws.validOff = ws.validRuns[:0], ws.validOff[:0]
		validRuns = &ws.validRuns
	}
	for y := 0; y < b.h; y++ {
		row := b.y0 + y
		if validRuns != nil {
			ws.validOff = append(ws.validOff, int32(len(ws.validRuns)))
		}
		vals := b.buf[y*b.w : (y+1)*b.w]
		shown := vals
		if b.shown != nil {
			shown = b.shown[y*b.w : (y+1)*b.w]
		}
		if opt.Preview != nil {
			opt.Preview.copyRow(row, b.x0, shown)
		}
		segs := ws.segs[ws.sRow[y]:ws.sRow[y+1]]
		if len(segs) == 0 {
			continue
		}
		weights, rowW := ws.rowWeights(g, row, b.x0, x1)
		if opt.Rows != nil {
			opt.Rows(row, b.x0, shown, weights)
		}
		locateSegments(layout, segs, bins, vals, weights, rowW, st, &ws.values, validRuns, len(ws.validRuns), b.x0, !ws.noMasses)
		ws.addSegments(accs, segs, bins, vals, weights)
	}
	if validRuns != nil {
		ws.validOff = append(ws.validOff, int32(len(ws.validRuns)))
	}
	// The shared sums into each of their members.
	for _, sh := range ws.sigAcc {
		if sh == nil {
			continue
		}
		if err := sh.Drain(); err != nil {
			return &InternalError{fmt.Errorf("pass: adding a block's shared sums: %w", err)}
		}
		ws.free = append(ws.free, sh)
	}
	return nil
}

// copyRow copies the valid values of a block row (grid row, from column
// x0) into the preview cells that take their value from it.
func (pv *Preview) copyRow(row, x0 int, vals []float64) {
	prow := pv.srcRow[row]
	if prow < 0 {
		return
	}
	for x, v := range vals {
		if pc := pv.srcCol[x0+x]; pc >= 0 && valid(v) {
			pv.Values[prow*pv.Width+pc] = v
		}
	}
}

// locateSegments locates the values of a block row's segments in the
// layout's bins (bins), adds their cells to the statistics st (minimum,
// maximum, the area at the minimum, the area; rowW the row's one cell
// weight, or negative when its cells differ) and their values to its
// value set (vc: the worker's cache of it) and, with validRuns, appends
// the runs of valid cells to it (its runs of this row begin at from; x0:
// the grid column of the block's first cell).
func locateSegments(layout *metrics.Layout, segs []segment, bins []int32, vals []float64, weights []int64, rowW int64, st *Stats, vc *metrics.ValueCache, validRuns *[]int32, from, x0 int, masses bool) {
	// The statistics in locals: st is written back once per row.
	mn, mx, floorArea, area := st.Min, st.Max, st.FloorArea, st.Area
	for j := 0; j < len(segs); {
		// Segments that touch are located as one run when the row's
		// cells have one positive weight: the statistics are then
		// those of the same cells (the area grows with every run
		// that has a cell, so no run is taken for the first).
		s := segs[j]
		for j++; rowW > 0 && j < len(segs) && segs[j].x0 == s.x1; j++ {
			s.x1 = segs[j].x1
		}
		sb, sv, sw := bins[s.x0:s.x1], vals[s.x0:s.x1], weights[s.x0:s.x1]
		n, lo, hi := layout.LocateRow(sv, sb)
		if n == 0 {
			continue
		}
		st.Values.AddRow(sv, sb, vc)
		if validRuns != nil {
			*validRuns = appendValidRuns(*validRuns, from, sb, int32(x0+int(s.x0)))
		}
		segArea := int64(n) * rowW
		if rowW < 0 {
			segArea = 0
			for x, bin := range sb {
				if bin >= 0 {
					segArea += sw[x]
				}
			}
		}
		switch {
		case area == 0 || lo < mn:
			if area == 0 {
				mx = hi
			}
			mn, floorArea = lo, areaAt(sb, sv, sw, lo)
		case lo == mn:
			floorArea += areaAt(sb, sv, sw, lo)
		}
		if hi > mx {
			mx = hi
		}
		area += segArea
		if !masses {
			continue
		}
		addLowest(&st.Lowest, sb, sv, sw, lo, hi)
		addRuns(&st.Runs, sb, sv, sw)
	}
	st.Min, st.Max, st.FloorArea, st.Area = mn, mx, floorArea, area
}

// addLowest adds to l each valid cell (bins[i] >= 0) whose value may be
// among the metrics.LowestValues smallest, with its weight; lo and hi are
// the least and largest values of the valid cells (Layout.LocateRow's).
// The list is the same in any order of the cells, so they are taken from
// the end whose value is smaller: on a row whose values fall along it,
// every cell would otherwise be a new smallest value and be inserted.
// Cells above a full list's largest are not added (all of them when lo
// is): the list is cut where hi is above its largest at the end, as
// adding them would have cut it (a list of more values than it keeps is
// cut however the cells came, metrics.MassList.Bound).
func addLowest(l *metrics.MassList, bins []int32, vals []float64, weights []int64, lo, hi float64) {
	n := len(bins)
	if k := len(l.Masses); n > 0 && (k < metrics.LowestValues || lo <= l.Masses[k-1].Value) {
		walkLowest(l, bins, vals, weights)
	}
	if k := len(l.Masses); k >= metrics.LowestValues && hi > l.Masses[k-1].Value {
		l.Cut = true
	}
}

// walkLowest is addLowest's walk over the cells.
func walkLowest(l *metrics.MassList, bins []int32, vals []float64, weights []int64) {
	n := len(bins)
	vals, weights = vals[:n], weights[:n]
	top := math.Inf(1) // the list's largest once it is full
	if k := len(l.Masses); k >= metrics.LowestValues {
		top = l.Masses[k-1].Value
	}
	if vals[n-1] < vals[0] {
		for i := n - 1; i >= 0; i-- {
			if v := vals[i]; v <= top && bins[i] >= 0 {
				top = addLow(l, v, weights[i])
			}
		}
		return
	}
	for i, v := range vals {
		if v <= top && bins[i] >= 0 {
			top = addLow(l, v, weights[i])
		}
	}
}

// addLow adds area w at v to the smallest values l and returns the bound
// past which a value cannot enter it (the largest, once it is full).
func addLow(l *metrics.MassList, v float64, w int64) float64 {
	l.Add(v, w, metrics.LowestValues)
	if k := len(l.Masses); k >= metrics.LowestValues {
		return l.Masses[k-1].Value
	}
	return math.Inf(1)
}

// addRuns adds to l each maximal run of at least metrics.RunCells equal
// valid cells of a row's stretch of cells (bins, vals, weights), with
// the run's area. A run of 2s or more cells (s = RunCells/2) holds two
// cells s apart at p and p + s for some multiple p of s, so only those
// pairs are compared: one test per s cells where no run is (most rows of
// a model of many values).
func addRuns(l *metrics.MassList, bins []int32, vals []float64, weights []int64) {
	const s = metrics.RunCells / 2
	n := len(vals)
	for p := 0; p+s < n; p += s {
		v := vals[p]
		if vals[p+s] != v || bins[p] < 0 {
			continue
		}
		b := p + 1
		for b < n && vals[b] == v {
			b++
		}
		if b <= p+s {
			continue // a cell between them differs
		}
		a := p
		for a > 0 && vals[a-1] == v {
			a--
		}
		if b-a >= metrics.RunCells {
			// Equal values are all valid or all not (a cell's bin
			// depends on its value), but count only the valid.
			var area int64
			for i := a; i < b; i++ {
				if bins[i] >= 0 {
					area += weights[i]
				}
			}
			l.Add(v, area, metrics.MaxRunValues)
		}
		// The next run begins at b or after: the first multiple of s
		// from b, less the step.
		p = (b+s-1)/s*s - s
	}
}

// appendValidRuns appends to runs (this row's from runs[from:]) the runs
// of cells with a bin (bins[x] >= 0) of a segment whose first cell is grid
// column c0, joining a run to the row's last one when they meet (segments
// of a row come in column order).
func appendValidRuns(runs []int32, from int, bins []int32, c0 int32) []int32 {
	for x := 0; x < len(bins); {
		if bins[x] < 0 {
			x++
			continue
		}
		start := x
		for x < len(bins) && bins[x] >= 0 {
			x++
		}
		runs = appendCells(runs, from, c0+int32(start), c0+int32(x))
	}
	return runs
}

// addSegments adds a block row's segments (their bins, values and
// weights) to the sums of their members: to the signature's shared sums
// when it has them, else to each member's.
func (ws *workerState) addSegments(accs []*metrics.Accumulator, segs []segment, bins []int32, vals []float64, weights []int64) {
	for _, s := range segs {
		if a := ws.sigAcc[s.sig]; a != nil {
			a.AddRow(bins[s.x0:s.x1], vals[s.x0:s.x1], weights[s.x0:s.x1])
			continue
		}
		if ms := ws.members(s.sig); len(ms) == 1 {
			accs[ms[0]].AddRow(bins[s.x0:s.x1], vals[s.x0:s.x1], weights[s.x0:s.x1])
		} else {
			ws.dst = ws.dst[:0]
			for _, k := range ms {
				ws.dst = append(ws.dst, accs[k])
			}
			metrics.AddRowTo(ws.dst, bins[s.x0:s.x1], vals[s.x0:s.x1], weights[s.x0:s.x1])
		}
	}
}

// areaAt returns the total weight of the cells of a run with bins[i] >= 0
// and value v.
func areaAt(bins []int32, vals []float64, weights []int64, v float64) int64 {
	var a int64
	for i, bin := range bins {
		if bin >= 0 && vals[i] == v {
			a += weights[i]
		}
	}
	return a
}
