package pass

import (
	"fmt"
	"slices"

	"areasweep/extent"
	"areasweep/metrics"
)

// A block is scored in two steps. planBlock finds, row by row, where each
// cell goes: for each group (nested sequence of members) the runs of its
// smallest member holding the cells (targets), and their overlay, the
// segments, runs of cells that go to one same set of members (their
// signature). scoreBlock then locates every cell once and adds each run to
// its accumulators.
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

// target is a run of cells of one block row whose smallest member in its
// group is k; columns are relative to the block.
type target struct{ x0, x1, k int32 }

// segment is a run of cells of one block row that go to the members of
// signature sig; columns are relative to the block.
type segment struct{ x0, x1, sig int32 }

// edge is where a target starts (k >= 0: member k) or ends (k < 0:
// member -1-k) in a row.
type edge struct{ x, k int32 }

// workerState is one worker's scratch for scoring blocks.
type workerState struct {
	buf     []float64
	areas   []float64
	weights []int64
	bins    []int32 // per column of the block row: layout bin, -1 when not scored
	span    extent.SpanScratch
	x0      int32              // the planned block's first column
	emit    func(int, []int32) // addTargets, bound once

	// The block's plan: row y's targets are targets[tRow[y]:tRow[y+1]],
	// its segments segs[sRow[y]:sRow[y+1]] (sorted, disjoint).
	targets []target
	tRow    []int
	segs    []segment
	sRow    []int
	// Signatures: the members of signature i are sigMem[sigOff[i]:sigOff[i+1]]
	// (ascending), sigCells[i] its cells in the block, sigAcc[i] its shared
	// accumulator or nil.
	sigIndex map[string]int32
	sigOff   []int32
	sigMem   []int32
	sigCells []int64
	sigAcc   []*metrics.Shared
	free     []*metrics.Shared // not in use, empty
	dst      []*metrics.Accumulator

	edges  []edge
	active []int32
	key    []byte

	// rowW[row] is 1 + the weight of every cell of row on grids whose
	// rows have one cell area (latitude-longitude and equal-area), 0 until
	// computed; weights holds filled throughout its first wlen entries
	// (filled < 0: no such fill).
	rowW   []int64
	filled int64
	wlen   int
}

// rowWeights returns the integer area weights of cells c0 <= c < c1 of
// row (RowWeights), computed once per row on grids whose rows have one
// cell area, and that one weight, or -1 when they differ.
func (ws *workerState) rowWeights(g *extent.Grid, row, c0, c1 int) ([]int64, int64) {
	if !g.Geographic && !g.EqualArea {
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
		bins: make([]int32, bw), sigIndex: make(map[string]int32), filled: -1}
}

// planBlock fills the block's targets, segments and signatures.
func (ws *workerState) planBlock(fam *extent.Family, groups [][]int, b block) {
	x1 := b.x0 + b.w
	ws.x0 = int32(b.x0)
	if ws.emit == nil {
		ws.emit = ws.addTargets
	}
	ws.targets, ws.segs = ws.targets[:0], ws.segs[:0]
	ws.tRow, ws.sRow = append(ws.tRow[:0], 0), append(ws.sRow[:0], 0)
	clear(ws.sigIndex)
	ws.sigOff, ws.sigMem, ws.sigCells = append(ws.sigOff[:0], 0), ws.sigMem[:0], ws.sigCells[:0]
	prev := 0 // first target of the previous row
	for y := 0; y < b.h; y++ {
		row := b.y0 + y
		t0 := len(ws.targets)
		for _, seq := range groups {
			fam.Rings(seq, row, b.x0, x1, &ws.span, ws.emit)
		}
		ts := ws.targets[t0:]
		if y > 0 && slices.Equal(ts, ws.targets[prev:t0]) {
			// Same targets as the row above (the inside of most blocks):
			// same segments.
			for _, s := range ws.segs[ws.sRow[y-1]:ws.sRow[y]] {
				ws.segs = append(ws.segs, s)
				ws.sigCells[s.sig] += int64(s.x1 - s.x0)
			}
		} else {
			ws.overlay(ts)
		}
		prev = t0
		ws.tRow = append(ws.tRow, len(ws.targets))
		ws.sRow = append(ws.sRow, len(ws.segs))
	}
}

// addTargets appends member k's runs, in block columns, to the row's
// targets (the emit of Family.Rings, bound once as a method value).
func (ws *workerState) addTargets(k int, runs []int32) {
	x0 := ws.x0
	for i := 0; i < len(runs); i += 2 {
		ws.targets = append(ws.targets, target{runs[i] - x0, runs[i+1] - x0, int32(k)})
	}
}

// overlay appends the segments of one row's targets.
func (ws *workerState) overlay(ts []target) {
	if len(ts) == 0 {
		return
	}
	same := true
	for _, t := range ts[1:] {
		same = same && t.x0 == ts[0].x0 && t.x1 == ts[0].x1
	}
	if same {
		ws.active = ws.active[:0]
		for _, t := range ts {
			ws.active = append(ws.active, t.k)
		}
		slices.Sort(ws.active)
		ws.segment(ts[0].x0, ts[0].x1)
		return
	}
	ws.edges = ws.edges[:0]
	for _, t := range ts {
		ws.edges = append(ws.edges, edge{t.x0, t.k}, edge{t.x1, -1 - t.k})
	}
	// Ends before starts at the same column, so that a member never
	// appears twice in the active set.
	slices.SortFunc(ws.edges, func(a, b edge) int {
		if a.x != b.x {
			return int(a.x - b.x)
		}
		return int(a.k - b.k)
	})
	ws.active = ws.active[:0]
	for i := 0; i < len(ws.edges); {
		x := ws.edges[i].x
		for ; i < len(ws.edges) && ws.edges[i].x == x; i++ {
			if k := ws.edges[i].k; k >= 0 {
				j, _ := slices.BinarySearch(ws.active, k)
				ws.active = slices.Insert(ws.active, j, k)
			} else {
				j, _ := slices.BinarySearch(ws.active, -1-k)
				ws.active = slices.Delete(ws.active, j, j+1)
			}
		}
		if i < len(ws.edges) && len(ws.active) > 0 && ws.edges[i].x > x {
			ws.segment(x, ws.edges[i].x)
		}
	}
}

// segment appends the segment [x0, x1) of the active members' signature.
func (ws *workerState) segment(x0, x1 int32) {
	ws.key = ws.key[:0]
	for _, k := range ws.active {
		ws.key = append(ws.key, byte(k), byte(k>>8))
	}
	id, ok := ws.sigIndex[string(ws.key)]
	if !ok {
		id = int32(len(ws.sigCells))
		ws.sigIndex[string(ws.key)] = id
		ws.sigMem = append(ws.sigMem, ws.active...)
		ws.sigOff = append(ws.sigOff, int32(len(ws.sigMem)))
		ws.sigCells = append(ws.sigCells, 0)
	}
	ws.segs = append(ws.segs, segment{x0, x1, id})
	ws.sigCells[id] += int64(x1 - x0)
}

// members returns the members of signature id.
func (ws *workerState) members(id int32) []int32 { return ws.sigMem[ws.sigOff[id]:ws.sigOff[id+1]] }

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
// the smallest member of each group holding it.
func scoreBlock(g *extent.Grid, fam *extent.Family, groups [][]int, layout *metrics.Layout, b block, accs []*metrics.Accumulator, st *Stats, ws *workerState, opt Options) error {
	ws.planBlock(fam, groups, b)
	ws.share(layout, accs)
	pv, validCells := opt.Preview, opt.Valid
	x1 := b.x0 + b.w
	bins := ws.bins[:b.w]
	for y := 0; y < b.h; y++ {
		row := b.y0 + y
		base := row*g.Width + b.x0
		vals := b.buf[y*b.w : (y+1)*b.w]
		shown := vals
		if b.shown != nil {
			shown = b.shown[y*b.w : (y+1)*b.w]
		}
		if pv != nil {
			if prow := pv.srcRow[row]; prow >= 0 {
				for x, v := range shown {
					if pc := pv.srcCol[b.x0+x]; pc >= 0 && valid(v) {
						pv.Values[prow*pv.Width+pc] = v
					}
				}
			}
		}
		segs := ws.segs[ws.sRow[y]:ws.sRow[y+1]]
		if len(segs) == 0 {
			continue
		}
		weights, rowW := ws.rowWeights(g, row, b.x0, x1)
		if opt.Rows != nil {
			opt.Rows(row, b.x0, shown, weights)
		}
		vword, vbits := -1, uint64(0)
		shared := false
		// The statistics in locals: st is written back once per row.
		mn, mx, floorArea, area := st.Min, st.Max, st.FloorArea, st.Area
		for _, s := range segs {
			shared = shared || ws.sigAcc[s.sig] != nil
			sb, sv, sw := bins[s.x0:s.x1], vals[s.x0:s.x1], weights[s.x0:s.x1]
			n, lo, hi := layout.LocateRow(sv, sb)
			if n == 0 {
				continue
			}
			if validCells != nil {
				// Bits are gathered per 64-bit word and set with one
				// atomic OR per word (blocks of other workers may share
				// the word at their edges).
				for x, bin := range sb {
					if bin < 0 {
						continue
					}
					i := base + int(s.x0) + x
					if i>>6 != vword {
						if vbits != 0 {
							validCells.OrAtomic(vword, vbits)
						}
						vword, vbits = i>>6, 0
					}
					vbits |= 1 << (uint(i) & 63)
				}
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
		}
		st.Min, st.Max, st.FloorArea, st.Area = mn, mx, floorArea, area
		if vbits != 0 {
			validCells.OrAtomic(vword, vbits)
		}
		if !shared {
			for _, t := range ws.targets[ws.tRow[y]:ws.tRow[y+1]] {
				accs[t.k].AddRow(bins[t.x0:t.x1], vals[t.x0:t.x1], weights[t.x0:t.x1])
			}
			continue
		}
		for _, s := range segs {
			if a := ws.sigAcc[s.sig]; a != nil {
				a.AddRow(bins[s.x0:s.x1], vals[s.x0:s.x1], weights[s.x0:s.x1])
				continue
			}
			for _, k := range ws.members(s.sig) {
				accs[k].AddRow(bins[s.x0:s.x1], vals[s.x0:s.x1], weights[s.x0:s.x1])
			}
		}
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
