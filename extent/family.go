package extent

import (
	"fmt"
	"sort"

	"areasweep/extent/vocab"
)

// MaxMembers is the largest family. Membership is held as row runs per
// member, so the limit is not a word size: it bounds the memory of the
// scoring pass, which keeps one accumulator per member and worker.
const MaxMembers = 1024

// Chain names of the built-in kinds.
const (
	chainRegion     = "region"
	chainPoints     = "points"
	chainHull       = "hull"
	chainEcoregions = "ecoregions"
)

// ErrTooManyMembers is returned when the settings ask for more than
// MaxMembers extents.
var ErrTooManyMembers = fmt.Errorf("extent: more than %d extents requested; use fewer buffer distances", MaxMembers)

// LonLat is a point in WGS84 degrees.
type LonLat struct{ Lon, Lat float64 }

// Named is a user polygon file with the member id it should get.
type Named struct{ Name, Path string }

// Spec says which members to build.
type Spec struct {
	// Region is the base study region file (required).
	Region string
	// RegionBuffersKm grows (positive) or shrinks (negative) the base by
	// geodesic distances.
	RegionBuffersKm []float64
	// Train and Test are the occurrence points in WGS84.
	Train, Test []LonLat
	// ThinnedTrain is the number of training records left out of Train
	// by thinning (one record per cell): the hull's refusal of too few
	// points names them.
	ThinnedTrain int
	// PointBuffersKm are radii of discs around the training points (or all
	// points when PointBuffersAll).
	PointBuffersKm  []float64
	PointBuffersAll bool
	// HullBuffersKm lists geodesic buffers of the training points' convex
	// hull; 0 is the hull itself. Empty means no hull members.
	HullBuffersKm []float64
	// Ecoregions is an optional polygon layer with id field EcoregionField.
	Ecoregions         string
	EcoregionField     string
	EcoregionMinPoints int
	// EcoregionClip adds variants of the ecoregion members clipped to base.
	EcoregionClip bool
	// Extra are user polygon files, each a member.
	Extra []Named
}

// Member is one extent of the family.
type Member struct {
	ID     string
	Kind   vocab.Kind
	Params string
	// Chain names the nested chain the member belongs to, if any; members of
	// a chain are listed in Family.Chains from smallest to largest.
	Chain       string
	Status      vocab.Status
	DuplicateOf string
	Cells       int64
	AreaKm2     float64
	TrainPoints int
	TestPoints  int
	// Share is AreaKm2 over the area of all valid cells.
	Share float64
	// DistanceKm is the buffer distance for buffer members.
	DistanceKm float64
}

// Family is the set of extents on the grid. Each member's cells are held
// as runs of columns per row (see Runs and Has), so memory follows the
// members' boundaries rather than the number of cells. Only valid cells,
// and only members with Status vocab.StatusOK, have cells.
type Family struct {
	Grid     *Grid
	Members  []Member
	Chains   map[string][]int
	Warnings []string
	Base     Shape
	cells    []cellRuns // per member
}

// nested reports whether every cell of member a is in member b.
func (f *Family) nested(a, b int) bool {
	ra, rb := f.cells[a].rows, f.cells[b].rows
	for row := range ra {
		if !subset(ra[row], rb[row]) {
			return false
		}
	}
	return true
}

// Has reports whether cell (row*Width + column) belongs to member k.
func (f *Family) Has(k, cell int) bool {
	w := f.Grid.Width
	return f.cells[k].rows[cell/w].has(cell % w)
}

// Runs returns member k's cells in row as pairs c0, c1 of half-open column
// runs [c0,c1), ascending, disjoint and not touching. The slice belongs to
// the family and must not be modified.
func (f *Family) Runs(k, row int) []int32 { return f.cells[k].rows[row] }

// SpanScratch is reusable scratch memory for Span, one per goroutine.
type SpanScratch struct{ a, b, c, out []int32 }

// Span returns the cells of member k in row and columns [c0,c1), minus
// the cells of member inner (none when inner < 0), as runs c0, c1, ...
// A scoring pass uses it to walk one block of one row. The result lives
// in s and is valid until the next call with s.
func (f *Family) Span(k, inner, row, c0, c1 int, s *SpanScratch) []int32 {
	s.a = clipWindow(s.a[:0], f.cells[k].rows[row], int32(c0), int32(c1))
	if inner < 0 {
		return s.a
	}
	s.b = clipWindow(s.b[:0], f.cells[inner].rows[row], int32(c0), int32(c1))
	s.out = minus(s.out[:0], s.a, s.b)
	return s.out
}

// Rings calls emit(k, runs) for each member k of seq in order, seq
// nested and listed from smallest to largest (a sequence of Groups), with
// the cells of k in row and columns [c0,c1) minus those of the member
// before it in seq: Span(k, previous, ...) for each, but each member's row
// is clipped once, none when the largest member has no cell there (every
// runs is then empty), and none after the first member that holds the
// whole window (the larger ones hold it too: their runs are empty). runs
// lives in s and is valid during the call only.
func (f *Family) Rings(seq []int, row, c0, c1 int, s *SpanScratch, emit func(k int, runs []int32)) {
	outer := seq[len(seq)-1]
	s.c = clipWindow(s.c[:0], f.cells[outer].rows[row], int32(c0), int32(c1))
	if len(s.c) == 0 {
		for _, k := range seq {
			emit(k, nil)
		}
		return
	}
	prev := s.a[:0]
	for i, k := range seq {
		cur := s.c
		if k != outer {
			cur = clipWindow(s.b[:0], f.cells[k].rows[row], int32(c0), int32(c1))
		}
		ring := cur
		if len(prev) > 0 {
			s.out = minus(s.out[:0], cur, prev)
			ring = s.out
		}
		emit(k, ring)
		if k == outer {
			return
		}
		if len(cur) == 2 && cur[0] == int32(c0) && cur[1] == int32(c1) {
			// k holds the whole window, and so does every larger member.
			for _, k := range seq[i+1:] {
				emit(k, nil)
			}
			return
		}
		// k's runs are the next member's inner ones; the buffer of the
		// previous ones takes the next clip.
		s.a, s.b = cur, prev[:0]
		prev = cur
	}
}

// clipWindow appends the runs of r intersected with [c0,c1) to dst.
func clipWindow(dst []int32, r rowRuns, c0, c1 int32) []int32 {
	n := len(r) / 2
	lo, hi := 0, n
	for lo < hi {
		m := (lo + hi) / 2
		if r[2*m+1] <= c0 {
			lo = m + 1
		} else {
			hi = m
		}
	}
	for i := lo; i < n && r[2*i] < c1; i++ {
		dst = append(dst, max(r[2*i], c0), min(r[2*i+1], c1))
	}
	return dst
}

// Groups returns the ok members as nested sequences, each listed from
// smallest to largest: the family's chains (checked nested again here) and
// one sequence per other member. A pass that adds each cell only to the
// smallest member of each sequence that holds it, then merges the
// accumulators up each sequence, adds a cell once per sequence instead of
// once per member.
func (f *Family) Groups() [][]int {
	var out [][]int
	used := make([]bool, len(f.Members))
	for _, name := range f.ChainNames() {
		var seq []int
		for _, k := range f.Chains[name] {
			if used[k] || f.Members[k].Status != vocab.StatusOK {
				continue
			}
			if len(seq) > 0 && !f.nested(seq[len(seq)-1], k) {
				out = append(out, seq)
				seq = nil
			}
			seq = append(seq, k)
			used[k] = true
		}
		if len(seq) > 0 {
			out = append(out, seq)
		}
	}
	for k, m := range f.Members {
		if !used[k] && m.Status == vocab.StatusOK {
			out = append(out, []int{k})
		}
	}
	return out
}

// Chain returns the member indices of the named chain, smallest first.
func (f *Family) Chain(name string) []int { return f.Chains[name] }

// ChainNames returns the chain names in sorted order.
func (f *Family) ChainNames() []string {
	names := make([]string, 0, len(f.Chains))
	for n := range f.Chains {
		names = append(names, n)
	}
	sort.Strings(names)
	return names
}
