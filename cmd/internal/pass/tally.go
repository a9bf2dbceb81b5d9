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
