package metrics

import (
	"fmt"
	"math"
	"math/rand/v2"
	"slices"
	"sort"
	"sync"
	"sync/atomic"
)

// randomStream is xored with Settings.Seed to form the second PCG seed
// word of the area-random draws (PartialROC.PRandom), a stream apart from
// the published bootstrap's (pcgStream).
const randomStream = 0x6A09E667F3BCC909

// Reasons given in PartialROC.PRandomNote when PRandom is not computed.
const (
	ReasonRandomNotFormed = "the full-sample ratio is undefined"
	ReasonRandomGap       = "the model's values lie too close together for the histogram to tell their areas apart"
	ReasonRandomNoDraw    = "no draw formed a ratio"
)

// MaxRandomDraws caps the draws of the area-random test (PRandom): B =
// min(Settings.Iterations, MaxRandomDraws). Our choice: 10,000 draws
// resolve p down to 1/10,001, far below the 0.025 the report reads it
// at, and keep the shared draws' memory (8 bytes per draw, E and number
// of test points) and a model's own draws' time bounded at --iterations
// up to 1,000,000.
const MaxRandomDraws = 10000

// RandomDraws is the number of area-random draws for b iterations.
func RandomDraws(b int) int { return min(b, MaxRandomDraws) }

// MinorFloorShare is the share of an extent's area, per test point, that
// one value of a model of many values (its minimum, another of its
// smallest values, a value of its long runs: massModel) may hold and
// still be read as part of a continuous spread when no test point takes
// it: at most a tenth of a test point is then expected there under
// random draws (our choice). Above it the value is a point mass: placed
// by the draws where its area is known, else PRandom is not computed.
const MinorFloorShare = 0.1

// areaModel is an extent's area along the curve's x axis (the share of the
// area at or above a value) as the accumulator knows it: atoms, x in
// (lo[k], hi[k]] with hi ascending, where area sits at one value (a layout
// value, or the one value of the model's value set between two layout
// values), and area spread continuously elsewhere.
type areaModel struct{ lo, hi []float64 }

// newAreaModel builds the area model of accumulator a (cumulative c) for n
// test points, or returns why it cannot be known well enough:
//
//   - a model with a value set (SetModelValues: few values, each cell's
//     value one of them) is atoms only: the area at each layout value, and
//     the spread area of each histogram bin at the one set value the bin
//     holds besides the layout values (as the Boyce index reads it), in
//     value order; a bin that holds two or more such values leaves their
//     areas unknown apart (ReasonRandomGap);
//   - a model without one (many values: each cell nearly a value of its
//     own) has atoms at the layout values and its other area spread
//     continuously, but for the values where a large area may sit at one
//     value (massModel): the raster's smallest values with their exact
//     areas (s.ModelLowest; s.ModelMin and s.ModelMinArea when it is
//     empty) and the values of its long runs of equal cells
//     (s.ModelRuns). One that is no layout value and may hold more than
//     MinorFloorShare / n of the extent's area is an atom where its area
//     in the extent and the area below it are known exactly, and is
//     otherwise not known apart from the values near it.
func newAreaModel(a *Accumulator, c *cumulative, s Settings, n int) (areaModel, string) {
	W := c.totalAreaF
	var m areaModel
	if a.values != nil {
		i0, i1 := a.occupied()
		nb := i1 - i0 + 1
		spread, pv, pcum := a.pointMasses(i0, nb)
		point, one := a.binPoints(i0, nb)
		type atom struct {
			v    float64
			area int64
		}
		atoms := make([]atom, 0, len(pv)+nb)
		for q, v := range pv {
			atoms = append(atoms, atom{v, pcum[q+1] - pcum[q]})
		}
		for k := range nb {
			if spread[k] == 0 {
				continue
			}
			if !one[k] {
				return m, ReasonRandomGap
			}
			atoms = append(atoms, atom{point[k], spread[k]})
		}
		sort.Slice(atoms, func(i, j int) bool { return atoms[i].v > atoms[j].v })
		var x int64
		for _, at := range atoms {
			m.lo = append(m.lo, float64(x)/W)
			x += at.area
			m.hi = append(m.hi, float64(x)/W)
		}
		if x != c.w {
			return areaModel{}, ReasonRandomGap
		}
		return m, ""
	}
	d := c.values
	for j := len(d) - 1; j >= 0; j-- {
		if c.eqA[j] > 0 {
			ge := c.geArea(j)
			m.lo, m.hi = append(m.lo, float64(ge-c.eqA[j])/W), append(m.hi, float64(ge)/W)
		}
	}
	why := massModel(a, c, s, n, &m)
	return m, why
}

// massModel adds to m (an area model of a model of many values, atoms at
// the layout values) the values where a large area may sit at one value
// that no test point or threshold takes, or returns why their area is not
// known well enough. Its cut-off is MinorFloorShare / n of the extent's
// area W: a value whose area in the extent may exceed it (its bound U) is
// a point mass the draws must place.
//
//   - The raster's smallest values (s.ModelLowest: every value below the
//     largest listed is listed) have exact areas A over the raster: in the
//     extent a value holds at least A less the raster's area outside the
//     extent (s.ModelArea - W) and at most U = min(A, the spread area of
//     the extent's histogram bin that holds it); where the two meet (an
//     extent that holds every cell of the raster, say) its area is known,
//     and so is the area below the next value while every value below is
//     known. A value above the cut-off with its area and the area below it
//     known is an atom; one whose area is not known is a point mass the
//     draws cannot place, and PRandom is not computed. The first value is
//     the raster's minimum: the floor of a truncated model.
//   - The values of long runs of equal cells (s.ModelRuns; plateaus) have
//     a lower bound of their areas only (the area of their runs, R): one
//     with R above the cut-off (its runs alone could hold a point mass)
//     and the spread area of its histogram bin above it (U) is not known
//     apart from the values near it. Where the run list was cut
//     (ModelRuns.Cut), a value past its last could be such a plateau: the
//     extent's largest bin spread above that value is its bound.
func massModel(a *Accumulator, c *cumulative, s Settings, n int, m *areaModel) string {
	W := c.totalAreaF
	cut := MinorFloorShare / float64(n) * W
	lowest := s.ModelLowest.Masses
	if len(lowest) == 0 && s.ModelMinArea > 0 {
		lowest = []Mass{{s.ModelMin, s.ModelMinArea}}
	}
	d := c.values
	layoutAt := func(v float64) (int, bool) {
		j := sort.SearchFloat64s(d, v)
		return j, j < len(d) && d[j] == v
	}
	// spreadAt is the area of the extent's histogram bin that holds v,
	// less the layout values' areas there.
	spreadAt := func(v float64) int64 {
		if v == 0 {
			v = 0
		}
		spread, _, _ := a.pointMasses(int(gridBin(v, a.he)-a.hbase), 1)
		return spread[0]
	}
	note := func(v float64, bound int64, first bool) string {
		if first {
			return fmt.Sprintf("the model's minimum, which no test point takes, holds up to %.3g%% of the extent's area (more than %g / %d test points, our cut-off), not known apart from the values above it", 100*float64(bound)/W, MinorFloorShare, n)
		}
		return fmt.Sprintf("the model's value %.6g, which no test point takes, holds up to %.3g%% of the extent's area (more than %g / %d test points, our cut-off), not known apart from the values near it", v, 100*float64(bound)/W, MinorFloorShare, n)
	}
	inRange := func(v float64) bool { return a.cells > 0 && v >= a.min && v <= a.max }
	var below int64 // the extent's area below the value at hand, while known
	known := true
	added := false
	for q, ms := range lowest {
		v := ms.Value
		if !inRange(v) {
			continue // no cell of the extent holds it
		}
		if j, ok := layoutAt(v); ok {
			below += c.eqA[j]
			continue
		}
		U := min(ms.Area, spreadAt(v))
		var lo int64 = -1
		if s.ModelArea > 0 {
			lo = max(0, ms.Area-(s.ModelArea-c.w))
		}
		exact := lo == U
		if float64(U) > cut {
			if !(exact && known) {
				return note(v, U, q == 0)
			}
			ge := c.w - below
			m.lo, m.hi = append(m.lo, float64(ge-U)/W), append(m.hi, float64(ge)/W)
			added = true
		}
		if exact {
			below += U
		} else {
			known = false
		}
	}
	bound := math.Inf(-1)
	if len(s.ModelLowest.Masses) > 0 {
		bound = s.ModelLowest.Bound()
	}
	for _, ms := range s.ModelRuns.Masses {
		v := ms.Value
		if v <= bound || !inRange(v) || float64(ms.Area) <= cut {
			continue // listed with its exact area, outside the extent or too small a plateau
		}
		if _, ok := layoutAt(v); ok {
			continue
		}
		if U := spreadAt(v); float64(U) > cut {
			return note(v, U, false)
		}
	}
	if s.ModelRuns.Cut && a.cells > 0 {
		last := s.ModelRuns.Bound()
		if last < a.max {
			i0, i1 := a.occupied()
			if from := int(gridBin(math.Max(last, a.min), a.he) - a.hbase); from > i0 {
				i0 = from
			}
			spread, _, _ := a.pointMasses(i0, i1-i0+1)
			var U int64
			for _, sp := range spread {
				U = max(U, sp)
			}
			if float64(U) > cut {
				return fmt.Sprintf("the model has more values on runs of %d or more equal cells than the pass lists (%d, our cap); one above %.6g may hold up to %.3g%% of the extent's area (more than %g / %d test points, our cut-off), not known apart from the values near it", RunCells, MaxRunValues, last, 100*float64(U)/W, MinorFloorShare, n)
			}
		}
	}
	if added {
		sort.Sort(byHi{m})
	}
	return ""
}

// byHi sorts an area model's atoms by their upper end.
type byHi struct{ m *areaModel }

func (b byHi) Len() int           { return len(b.m.lo) }
func (b byHi) Less(i, j int) bool { return b.m.hi[i] < b.m.hi[j] }
func (b byHi) Swap(i, j int) {
	b.m.lo[i], b.m.lo[j] = b.m.lo[j], b.m.lo[i]
	b.m.hi[i], b.m.hi[j] = b.m.hi[j], b.m.hi[i]
}

// expNeg returns exp(-d) for d >= 0: below 1/64 by its Taylor series to
// the d^6 term (the next, d^7/5040 < 1e-16, is below float64's
// resolution), else by math.Exp. The draws of areaRandom take one per
// point, most of them small (a spacing of n uniforms near 1).
func expNeg(d float64) float64 {
	if d < 1.0/64 {
		return 1 - d*(1-d*0.5*(1-d*(1.0/3)*(1-d*0.25*(1-d*0.2*(1-d*(1.0/6))))))
	}
	return math.Exp(-d)
}

// curveGroup is one group of presences on the curve: count presences
// between x = xa and x = xb (a vertical step when they are equal).
type curveGroup struct {
	xa, xb float64
	count  int
}

// groupRatio is the partial ROC ratio at tau = snapCount((1 - E) n) of n
// presences of which before lie at smaller x than the groups gs, which
// are in ascending x (descending value): the formula of partialAreas (the
// crossing, its interpolation and tie, the model area's trapezoids, the
// null area) on groups given directly. ok is false where the ratio is not
// formed (a crossing inside a group of two or more, or no area left).
func groupRatio(gs []curveGroup, before, n int, tau float64) (ratio float64, ok bool) {
	y := before
	g := 0
	for g < len(gs) && !(float64(y+gs[g].count) >= tau) {
		y += gs[g].count
		g++
	}
	if g == len(gs) {
		return 0, false
	}
	c := gs[g]
	ya, yb := y, y+c.count
	s := (tau - float64(ya)) / float64(c.count)
	xE := c.xb
	if s < 1 {
		xE = c.xa + s*(c.xb-c.xa)
		if c.count >= 2 && s > 0 {
			return 0, false
		}
	}
	m := (c.xb - xE) * (tau + float64(yb)) / 2
	prevX, y := c.xb, yb
	for _, h := range gs[g+1:] {
		yb := y + h.count
		m += (h.xa - prevX) * float64(y)
		m += (h.xb - h.xa) * float64(y+yb) / 2
		prevX, y = h.xb, yb
	}
	m += (1 - prevX) * float64(n)
	null := (1 - xE*xE) / 2
	if !(null > 0) {
		return 0, false
	}
	return (m / float64(n)) / null, true
}

// areaRandom sets PRandom (or PRandomNote) of each formed ratio of out:
// the Monte Carlo p-value of the full-sample ratio under the hypothesis
// that the test points were drawn at random over the extent's area, the
// model knowing nothing of where they are (each test point's value then
// follows the area's distribution of values; the ratio's distribution is
// that of n such draws). Each of B = RandomDraws(s.Iterations) draws
// places n points
// at x uniform on (0, 1] (the share of area at or above a random cell's
// value is uniform where the values are continuous; a point in an atom
// takes the atom's value, tied with the others there; areaModel); only
// the largest x matter (the curve crosses 1 - E at the ceil((1-E)n)-th
// point), so the draws are the descending order statistics of n
// uniforms, -log x_(n-i) = E_0/n + E_1/(n-1) + ... + E_i/(n-i) with E_l
// standard exponential (Renyi's representation; Devroye 1986, ch. V.2),
// taken down to the crossing of the smallest 1 - E and on through the
// atom it lies in. PRandom = (1 + #{draws with ratio >=
// the observed}) / (1 + formed draws) (Davison & Hinkley 1997, eq. 4.11),
// a one-sided test of the ratio against those of random test points.
// Draws whose ratio is not formed are left out. An area whose atoms are
// negligible (nearlyContinuous: a model of many values, whose atoms are
// the test points' own cells) takes the draws of continuous values for
// its n, drawn once per process and shared by every model and extent
// (sharedRatios); another draws its own from s.Seed (drawRatios).
//
// Devroye, L. (1986) Non-Uniform Random Variate Generation. Springer.
// Davison, A.C. & Hinkley, D.V. (1997) Bootstrap Methods and their
// Application. Cambridge University Press.
func areaRandom(a *Accumulator, c *cumulative, n int, s Settings, out []PartialROC) {
	any := false
	for i := range out {
		if out[i].Formed {
			any = true
		} else {
			out[i].PRandomNote = ReasonRandomNotFormed
		}
	}
	if !any || n == 0 {
		return
	}
	am, why := newAreaModel(a, c, s, n)
	if why != "" {
		for i := range out {
			if out[i].Formed {
				out[i].PRandomNote = why
			}
		}
		return
	}
	es := make([]float64, len(out))
	for i, pr := range out {
		es[i] = pr.E
	}
	var ratios [][]float64
	if am.nearlyContinuous(n) {
		ratios = sharedRatios(n, RandomDraws(s.Iterations), es)
	} else {
		ratios = drawRatios(am, n, RandomDraws(s.Iterations), s.Seed^randomStream, es)
	}
	for i := range out {
		if !out[i].Formed {
			continue
		}
		rs := ratios[i]
		out[i].RandomFormed = len(rs)
		if len(rs) == 0 {
			out[i].PRandomNote = ReasonRandomNoDraw
			continue
		}
		atLeast := len(rs) - sort.SearchFloat64s(rs, out[i].Ratio)
		out[i].PRandom = float64(1+atLeast) / float64(1+len(rs))
	}
}

// nearlyContinuous tells whether n draws over m would almost never tie:
// the expected number of pairs of the n draws in one atom, n(n-1)/2 times
// the sum of the atoms' squared shares, is below 0.01 (our cut-off), as
// for a model of many values whose atoms are the test points' own cells.
// Its ratios are then those of continuous values (sharedRatios).
func (m areaModel) nearlyContinuous(n int) bool {
	var s2 float64
	for k := range m.lo {
		d := m.hi[k] - m.lo[k]
		s2 += d * d
	}
	return float64(n)*float64(n-1)/2*s2 < 0.01
}

// sharedEntry is one entry of sharedDraws, computed once.
type sharedEntry struct {
	once   sync.Once
	ratios [][]float64
}

var (
	sharedDraws  sync.Map // "n B es" -> *sharedEntry
	sharedCount  atomic.Int64
	maxSharedKey = int64(1024) // entries kept (our choice; 8 KB per E each at B = 1000, 80 KB at the cap)
)

// sharedRatios are drawRatios of continuous values (no atom): they depend
// on n, B and E alone, so every model and extent with n test points
// shares them, drawn once per process from a seed of n (PCG(n, n xor
// randomStream)) and kept (at most maxSharedKey sets).
func sharedRatios(n, B int, es []float64) [][]float64 {
	key := fmt.Sprint(n, " ", B, " ", es)
	if v, ok := sharedDraws.Load(key); ok {
		e := v.(*sharedEntry)
		e.once.Do(func() { e.ratios = drawRatios(areaModel{}, n, B, uint64(n)^randomStream, es) })
		return e.ratios
	}
	if sharedCount.Load() >= maxSharedKey {
		return drawRatios(areaModel{}, n, B, uint64(n)^randomStream, es)
	}
	v, loaded := sharedDraws.LoadOrStore(key, &sharedEntry{})
	if !loaded {
		sharedCount.Add(1)
	}
	e := v.(*sharedEntry)
	e.once.Do(func() { e.ratios = drawRatios(areaModel{}, n, B, uint64(n)^randomStream, es) })
	return e.ratios
}

// drawRatios draws B sets of n points at random over the area m (set i
// from PCG seeded with splitmix64 of seed xor i times the golden ratio's
// 64 bits and of seed xor randomStream xor i) and returns, per E of es,
// the ratios of the sets that formed one, ascending.
func drawRatios(m areaModel, n, B int, seed uint64, es []float64) [][]float64 {
	taus := make([]float64, len(es))
	need := 1
	for i, e := range es {
		taus[i] = snapCount((1 - e) * float64(n))
		need = max(need, n-int(math.Ceil(taus[i]))+1)
	}
	need = min(need, n)
	// Each set has a stream of its own (PCG seeded with splitmix64 of the
	// seed and the set's number), so how deep a set is drawn (which
	// depends on the largest E of es) does not move the draws of the
	// next: the ratios at one E do not depend on the other E of es.
	src := rand.NewPCG(0, 0)
	rng := rand.New(src)
	type pt struct {
		x    float64
		atom int
	}
	pts := make([]pt, 0, need+8)
	inv := make([]float64, n)
	for i := range inv {
		inv[i] = 1 / float64(n-i)
	}
	gs := make([]curveGroup, 0, need+8)
	out := make([][]float64, len(es))
	for i := range out {
		out[i] = make([]float64, 0, B)
	}
	for it := 0; it < B; it++ {
		src.Seed(splitmix64(seed^uint64(it)*0x9E3779B97F4A7C15), splitmix64(seed^randomStream^uint64(it)))
		pts = pts[:0]
		// -log x_(n-i) = sum of E_l / (n - l) for l <= i, E_l standard
		// exponential (Renyi's representation): x is multiplied by
		// exp(-E_i / (n - i)) at each step; x falls, so the atom that may
		// hold it (the last with lo < x) is found by walking down from
		// the top.
		x, k := 1.0, len(m.lo)-1
		for i := 0; i < n; i++ {
			x *= expNeg(rng.ExpFloat64() * inv[i])
			for k >= 0 && m.lo[k] >= x {
				k--
			}
			at := -1
			if k >= 0 && x <= m.hi[k] {
				at = k
			}
			if len(pts) >= need && !(at >= 0 && at == pts[len(pts)-1].atom) {
				break
			}
			pts = append(pts, pt{x, at})
		}
		// Groups in ascending x: the drawn points from the smallest x.
		gs = gs[:0]
		for q := len(pts) - 1; q >= 0; q-- {
			p := pts[q]
			if p.atom >= 0 && len(gs) > 0 && q+1 < len(pts) && pts[q+1].atom == p.atom {
				gs[len(gs)-1].count++
				continue
			}
			g := curveGroup{xa: p.x, xb: p.x, count: 1}
			if p.atom >= 0 {
				g.xa, g.xb = m.lo[p.atom], m.hi[p.atom]
			}
			gs = append(gs, g)
		}
		for i := range es {
			if r, ok := groupRatio(gs, n-len(pts), n, taus[i]); ok {
				out[i] = append(out[i], r)
			}
		}
	}
	for i := range out {
		slices.Sort(out[i])
	}
	return out
}

// splitmix64 is the output function of Steele, Lea & Flood's SplitMix64
// (2014): a bijective mix of x, used to seed each area-random set's
// stream from the seed and the set's number.
func splitmix64(x uint64) uint64 {
	x += 0x9E3779B97F4A7C15
	x = (x ^ (x >> 30)) * 0xBF58476D1CE4E5B9
	x = (x ^ (x >> 27)) * 0x94D049BB133111EB
	return x ^ (x >> 31)
}
