package pass

import (
	"slices"
	"sync"

	"areasweep/extent"
	"areasweep/extent/nullmodel"
)

// tallyScratch is one goroutine's row buffers for the sorting-bias tally.
type tallyScratch struct {
	row   nullmodel.Row
	span  extent.SpanScratch
	runs  []int32 // the runs of the batch
	batch []int   // members whose ring has those runs in the row
}

// NullTally returns an Options.Rows hook that tallies the distance-only
// null's distances (minus its values) into bg, the sorting-bias
// background of every ok member of fam: each row is prepared once
// (nullmodel.Row), and each cell goes to the smallest member of each
// nested group holding it (its ring, from Family.Span), the rings added up
// when bg is read (Background.Nest), as the pass does with its
// accumulators. Members whose ring has the same runs in a row (several
// extents covering the same cells) are added in one walk of the cells.
func NullTally(fam *extent.Family, bg *nullmodel.Background) func(row, c0 int, vals []float64, w []int64) {
	groups := fam.Groups()
	bg.Nest(groups)
	pool := sync.Pool{New: func() any { return new(tallyScratch) }}
	return func(row, c0 int, vals []float64, w []int64) {
		sc := pool.Get().(*tallyScratch)
		defer pool.Put(sc)
		sc.row.SetValues(vals, w)
		t := bg.Tally()
		defer t.Done()
		flush := func() {
			for i := 0; i < len(sc.runs); i += 2 {
				t.AddAll(sc.batch, &sc.row, int(sc.runs[i])-c0, int(sc.runs[i+1])-c0)
			}
			sc.batch = sc.batch[:0]
		}
		sc.batch = sc.batch[:0]
		add := func(k int, runs []int32) {
			if len(runs) == 0 {
				return
			}
			if len(sc.batch) > 0 && !slices.Equal(runs, sc.runs) {
				flush()
			}
			if len(sc.batch) == 0 {
				sc.runs = append(sc.runs[:0], runs...)
			}
			sc.batch = append(sc.batch, k)
		}
		for _, seq := range groups {
			fam.Rings(seq, row, c0, c0+len(vals), &sc.span, add)
		}
		flush()
	}
}

// Tally makes the passes of v tally the distance-only null's distances
// (minus its values) into bg, the sorting-bias background of every ok
// member of fam, as NullTally's row hook would: the same cells, values
// (the midpoints of each cell's own bounds) and weights, each cell to its
// ring in each nested group (bg.Nest is called now). On the bounded path
// each worker's source adds a block's rows segment by segment in the walk
// of the block's plan that finds the block's extremes (see
// exactExtremes): each segment's cells once to the members of its
// signature, which are the members whose ring holds them (integer sums:
// the totals of a walk of each member's ring); otherwise the pass calls
// NullTally's hook. fam must be the family the passes score.
func (v *Virtual) Tally(fam *extent.Family, bg *nullmodel.Background) {
	bg.Nest(fam.Groups())
	v.bg = bg
}

// rowTally is one worker's sorting-bias tally inside a Virtual's source:
// begin a row, add each segment with its signature's members, end the
// block. A row's weights are taken only when it has a segment, as the
// pass calls its row hook only for those rows, and a partial sum is held
// from the first segment of the block to its end. Each segment's cells
// are added in one walk (Tally.AddValues: no prepared Row, whose prefix
// sums would be those of the whole row when the segments, disjoint,
// visit each cell once).
type rowTally struct {
	g       *extent.Grid
	bg      *nullmodel.Background
	ws      *workerState // the worker's, for its row weights
	row, c0 int
	vals    []float64
	weighed bool // the row's weights are taken
	held    bool // t is held
	t       nullmodel.Tally
	w       []int64 // the row's weights, nil when every one is w0
	w0      int64
}

// begin starts a row of the block: its first column c0 and its values.
func (tl *rowTally) begin(ws *workerState, row, c0 int, vals []float64) {
	tl.ws, tl.row, tl.c0, tl.vals, tl.weighed = ws, row, c0, vals, false
}

// add adds cells a <= x < b of the row (columns relative to c0) to each
// member of ms.
func (tl *rowTally) add(ms []int32, a, b int) {
	if !tl.weighed {
		// The weights the pass adds (the worker's, as scoreBlock takes
		// them).
		w, rowW := tl.ws.rowWeights(tl.g, tl.row, tl.c0, tl.c0+len(tl.vals))
		tl.w, tl.w0 = nil, rowW
		if rowW < 0 {
			tl.w = w
		}
		tl.weighed = true
	}
	if !tl.held {
		tl.t = tl.bg.Tally()
		tl.held = true
	}
	var w []int64
	if tl.w != nil {
		w = tl.w[a:b]
	}
	tl.t.AddValues(ms, tl.vals[a:b], w, tl.w0)
}

// end releases the partial sum at the end of a block.
func (tl *rowTally) end() {
	if tl.held {
		tl.t.Done()
		tl.held = false
	}
}
