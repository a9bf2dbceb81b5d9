package extent

import (
	"errors"
	"fmt"
	"math"
	"runtime"
	"slices"
	"sort"
	"strconv"
	"sync"
	"sync/atomic"

	"github.com/airbusgeo/godal"

	"github.com/paulmach/orb"

	"areasweep/extent/gdalmsg"
	"areasweep/extent/geodesy"
)

// MaxMembers is the largest family. Membership is held as row runs per
// member, so the limit is not a word size: it bounds the memory of the
// scoring pass, which keeps one accumulator per member and worker.
const MaxMembers = 1024

// Kinds of family member.
const (
	KindBase         = "base"
	KindRegionBuffer = "region_buffer"
	KindPointBuffer  = "point_buffer"
	KindHull         = "hull"
	KindEcoregions   = "ecoregions"
	KindWholeRaster  = "whole_raster"
	KindUser         = "user"
	chainRegion      = "region"
	chainPoints      = "points"
	chainHull        = "hull"
	chainEcoregions  = "ecoregions"
)

// MemberStatus says whether a member is used: StatusOK, or StatusEmpty (no
// valid cell) or StatusDuplicate (the cells of an earlier member). The
// values are those of report.ExtentStatus, written to results.json.
type MemberStatus string

// The member statuses.
const (
	StatusOK        MemberStatus = "ok"
	StatusEmpty     MemberStatus = "empty"
	StatusDuplicate MemberStatus = "duplicate"
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
	Kind   string
	Params string
	// Chain names the nested chain the member belongs to, if any; members of
	// a chain are listed in Family.Chains from smallest to largest.
	Chain       string
	Status      MemberStatus
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
// and only members with Status "ok", have cells.
type Family struct {
	Grid     *Grid
	Members  []Member
	Chains   map[string][]int
	Warnings []string
	Base     Shape
	cells    []cellRuns // per member
}

// Valid is a per-cell bitset of the cells with data in the reference model.
type Valid []uint64

// NewValid returns an empty bitset for n cells.
func NewValid(n int) Valid { return make(Valid, (n+63)/64) }

// Set marks cell i valid.
func (v Valid) Set(i int) { v[i>>6] |= 1 << (uint(i) & 63) }

// Has reports whether cell i is valid. A nil Valid holds every cell.
func (v Valid) Has(i int) bool { return v == nil || v[i>>6]>>(uint(i)&63)&1 == 1 }

// SetAtomic marks cell i valid; safe when goroutines mark cells that share
// a word.
func (v Valid) SetAtomic(i int) { atomic.OrUint64(&v[i>>6], 1<<(uint(i)&63)) }

// OrAtomic sets the bits of word (cells 64*word to 64*word+63 from the
// least significant bit) atomically.
func (v Valid) OrAtomic(word int, bits uint64) { atomic.OrUint64(&v[word], bits) }

// builder accumulates members while the family is built.
type builder struct {
	g     *Grid
	valid Valid
	f     *Family
}

// add appends a member with no cells and returns its index.
func (b *builder) add(m Member) (int, error) {
	if len(b.f.Members) >= MaxMembers {
		return 0, ErrTooManyMembers
	}
	m.Status = StatusOK
	b.f.Members = append(b.f.Members, m)
	b.f.cells = append(b.f.cells, newCellRuns(b.g.Height))
	return len(b.f.Members) - 1, nil
}

// fillRuns adds the cells Fill finds inside mp to member k.
func (b *builder) fillRuns(k int, mp orb.MultiPolygon) {
	rows := b.f.cells[k].rows
	Fill(b.g, mp, func(row, c0, c1 int) {
		rows[row] = append(rows[row], int32(c0), int32(c1))
	})
	for r := range rows {
		rows[r] = canonical(rows[r])
	}
}

// Build makes the family on grid g, clipped to the valid cells (nil: every
// cell). trainCells and testCells are the grid cell index of each point (or
// -1 outside). A run that learns the valid cells only in its first scoring
// pass builds with nil and calls Clip afterwards; with nil, cells, points,
// statuses and chains are found but areas (AreaKm2, Share) are left 0 for
// Clip to measure.
func Build(g *Grid, valid Valid, spec Spec, trainCells, testCells []int) (*Family, error) {
	f := &Family{Grid: g, Chains: map[string][]int{}}
	b := &builder{g: g, valid: valid, f: f}
	if spec.Region == "" {
		return nil, errors.New("extent: no base region given (--region FILE)")
	}
	base, warns, err := ReadShape(spec.Region, g)
	f.Warnings = append(f.Warnings, warns...)
	if err != nil {
		return nil, err
	}
	f.Base = base
	baseK, err := b.add(Member{ID: "base", Kind: KindBase, Params: "file=" + baseName(spec.Region)})
	if err != nil {
		return nil, err
	}
	b.fillRuns(baseK, base.Grid)
	if err := b.regionBuffers(base, baseK, spec.RegionBuffersKm); err != nil {
		return nil, err
	}
	if len(spec.PointBuffersKm) > 0 {
		pts := spec.Train
		which := "training points"
		if spec.PointBuffersAll {
			pts = append(append([]LonLat{}, spec.Train...), spec.Test...)
			which = "all points"
		}
		if err := b.pointBuffers(pts, which, spec.PointBuffersKm); err != nil {
			return nil, err
		}
	}
	if len(spec.HullBuffersKm) > 0 {
		if err := b.hull(spec.Train, spec.HullBuffersKm); err != nil {
			return nil, err
		}
	}
	if spec.Ecoregions != "" {
		if err := b.ecoregions(spec, baseK, trainCells); err != nil {
			return nil, err
		}
	}
	for _, x := range spec.Extra {
		s, warns, err := ReadShape(x.Path, g)
		f.Warnings = append(f.Warnings, warns...)
		if err != nil {
			return nil, err
		}
		k, err := b.add(Member{ID: "user_" + x.Name, Kind: KindUser, Params: "file=" + baseName(x.Path)})
		if err != nil {
			return nil, err
		}
		b.fillRuns(k, s.Grid)
	}
	wholeK, err := b.add(Member{ID: "whole_raster", Kind: KindWholeRaster, Params: "all valid cells"})
	if err != nil {
		return nil, err
	}
	for r := range f.cells[wholeK].rows {
		f.cells[wholeK].rows[r] = rowRuns{0, int32(g.Width)}
	}
	f.Chains[chainRegion] = append(f.Chains[chainRegion], len(f.Members)-1)
	b.finish(trainCells, testCells)
	return f, nil
}

func baseName(p string) string {
	for i := len(p) - 1; i >= 0; i-- {
		if p[i] == '/' || p[i] == '\\' {
			return p[i+1:]
		}
	}
	return p
}

// kmID formats a distance for a member id: 50 -> "50km", -50 -> "minus50km".
func kmID(d float64) string {
	s := strconv.FormatFloat(math.Abs(d), 'f', -1, 64)
	if d < 0 {
		return "minus" + s + "km"
	}
	return s + "km"
}

// regionBuffers adds the base grown or shrunk by each distance. A cell
// belongs to a grown member when its centre is inside the base or within d
// of the base boundary, and to a shrunk member when its centre is inside
// and farther than |d| from the boundary; distances are geodesic on WGS84
// to the boundary densified every cell side (boundaryLonLat).
func (b *builder) regionBuffers(base Shape, baseK int, ds []float64) error {
	if len(ds) == 0 {
		b.f.Chains[chainRegion] = []int{0}
		return nil
	}
	ds = sortedUnique(ds)
	lats, lons := boundaryLonLat(b.g, base)
	if len(lats) == 0 {
		return fmt.Errorf("extent: the base region has no boundary off the antimeridian and poles; region buffers are not defined")
	}
	ix, err := geodesy.NewIndex(lats, lons)
	if err != nil {
		return fmt.Errorf("extent: base region boundary: %w", err)
	}
	type buf struct {
		k   int
		d   float64 // metres, signed
		cut int     // index of |d| in cuts
	}
	var bufs []buf
	var chain []int
	maxD := 0.0
	for _, d := range ds {
		if d == 0 {
			continue
		}
		k, err := b.add(Member{ID: "region_" + kmID(d), Kind: KindRegionBuffer, Params: fmt.Sprintf("d_km=%g", d), DistanceKm: d, Chain: chainRegion})
		if err != nil {
			return err
		}
		bufs = append(bufs, buf{k: k, d: d * 1000})
		maxD = math.Max(maxD, math.Abs(d)*1000)
	}
	// Chain order: shrunk (most negative first), base, grown.
	for _, bf := range bufs {
		if bf.d < 0 {
			chain = append(chain, bf.k)
		}
	}
	chain = append(chain, baseK)
	b.f.Members[baseK].Chain = chainRegion
	for _, bf := range bufs {
		if bf.d > 0 {
			chain = append(chain, bf.k)
		}
	}
	b.f.Chains[chainRegion] = chain
	reach := newReach(lats, lons, maxD)
	var abs []float64
	for _, bf := range bufs {
		abs = append(abs, math.Abs(bf.d))
	}
	cuts := sortedUnique(abs)
	for i := range bufs {
		bufs[i].cut = sort.SearchFloat64s(cuts, math.Abs(bufs[i].d))
	}
	baseRows := b.f.cells[baseK].rows
	b.distanceField(ix, reach, maxD, cuts, func(row int, near []rowRuns) {
		// A grown member is the base or within d of its boundary; a shrunk
		// one is the base minus the cells within |d|.
		for _, bf := range bufs {
			var r rowRuns
			if bf.d > 0 {
				r = union(nil, baseRows[row], near[bf.cut])
			} else {
				r = minus(nil, baseRows[row], near[bf.cut])
			}
			b.f.cells[bf.k].rows[row] = r
		}
	})
	return nil
}

// boundaryLonLat returns points along the boundary of s every cell side,
// as WGS84 latitude and longitude. Edges are densified as straight
// lines in the grid's CRS, the same edges Fill uses to decide which cells
// are inside, so distances are measured to the boundary that defines the
// region on the grid. Seam edges (see seamEdge) are left out.
func boundaryLonLat(g *Grid, s Shape) (lats, lons []float64) {
	// One cell side: the nearest sample is then within half a side of the
	// nearest boundary point, so a distance is overestimated by less than
	// half a cell diagonal, the margin within which a cell may fall either
	// side of a buffer edge.
	step := math.Min(g.GeoTransform[1], -g.GeoTransform[5])
	var xs, ys []float64
	for _, p := range s.Grid {
		for _, r := range p {
			for i := 1; i < len(r); i++ {
				a, b := r[i-1], r[i]
				if g.Geographic && seamEdge(a, b) {
					continue
				}
				n := int(math.Ceil(math.Hypot(b[0]-a[0], b[1]-a[1]) / step))
				n = max(n, 1)
				for k := 0; k < n; k++ {
					f := float64(k) / float64(n)
					xs = append(xs, a[0]+f*(b[0]-a[0]))
					ys = append(ys, a[1]+f*(b[1]-a[1]))
				}
				xs, ys = append(xs, b[0]), append(ys, b[1])
			}
		}
	}
	lons = make([]float64, len(xs))
	lats = make([]float64, len(ys))
	g.ToLonLat(xs, ys, lons, lats)
	k := 0
	for i := range lats {
		if !math.IsNaN(lats[i]) {
			lats[k], lons[k] = lats[i], lons[i]
			k++
		}
	}
	return lats[:k], lons[:k]
}

// seamEdge reports whether the edge a-b runs along the antimeridian or a
// pole line. Such edges are where a region was cut to fit longitude and
// latitude ranges, not its boundary on the Earth, so buffer distances are
// not measured to them: a region split in two at 180 degrees is buffered as
// the one region it is.
func seamEdge(a, b orb.Point) bool {
	anti := func(lon float64) bool { return math.Mod(math.Abs(lon), 360) == 180 }
	return anti(a[0]) && anti(b[0]) || math.Abs(a[1]) == 90 && a[1] == b[1]
}

// pointBuffers adds, for each radius, the union of geodesic discs around pts.
func (b *builder) pointBuffers(pts []LonLat, which string, ds []float64) error {
	ds = sortedUnique(ds)
	lats, lons := splitLL(pts)
	ix, err := geodesy.NewIndex(lats, lons)
	if err != nil {
		return fmt.Errorf("extent: point buffers: %w", err)
	}
	var members []int
	var dm []float64
	maxD := 0.0
	for _, d := range ds {
		if d <= 0 {
			return fmt.Errorf("extent: point buffer distance %g km must be positive", d)
		}
		k, err := b.add(Member{ID: "points_" + kmID(d), Kind: KindPointBuffer, Params: fmt.Sprintf("d_km=%g; around=%s", d, which), DistanceKm: d, Chain: chainPoints})
		if err != nil {
			return err
		}
		b.f.Chains[chainPoints] = append(b.f.Chains[chainPoints], k)
		members = append(members, k)
		dm = append(dm, d*1000)
		maxD = math.Max(maxD, d*1000)
	}
	reach := newReach(lats, lons, maxD)
	// ds is sorted and unique, so dm is the cut list itself.
	b.distanceField(ix, reach, maxD, dm, func(row int, near []rowRuns) {
		for j, k := range members {
			b.f.cells[k].rows[row] = near[j]
		}
	})
	return nil
}

// tileSide is the side, in cells, of the tiles distanceField classifies
// with one query when no cut passes through them.
const tileSide = 16

// distanceField calls rowDone(row, near) once for every row of the grid,
// from several goroutines (never twice for a row): near[j] holds the runs
// of the row's cells whose geodesic distance from the cell centre to the
// nearest site of ix is at most cuts[j]. cuts are metres, ascending,
// unique and all <= maxD; the slices in near are the callee's to keep.
//
// Only the class of each cell matters: which of the cut distances the
// distance lies below. Each worker holds the distances of one band of
// tileSide rows at a time, never the whole grid. The distance
// function is 1-Lipschitz, which saves most queries:
//
//   - a tile of tileSide x tileSide cells gets one query at its centre cell,
//     D, and rho, the largest distance from that centre to a corner cell
//     (times a small safety factor); when every cut is farther than rho
//     from D, or D - rho > maxD, every cell of the tile is in D's class and
//     receives D; otherwise the tile is split in four and each quarter tried
//     the same way;
//   - tiles of two cells or fewer a side have their rows walked: after an
//     exact query at distance D, the following cells whose summed
//     centre-to-centre steps stay below the gap between D and the nearest
//     cut receive D.
//
// The cost so stays near the buffers' edges instead of over their area.
func (b *builder) distanceField(ix *geodesy.Index, reach reachBox, maxD float64, cuts []float64, rowDone func(row int, near []rowRuns)) {
	g := b.g
	gap := func(lo, hi float64) float64 { return intervalGap(cuts, lo, hi) }
	bands := make(chan int)
	var wg sync.WaitGroup
	for w := 0; w < runtime.GOMAXPROCS(0); w++ {
		wg.Add(1)
		go func() {
			defer wg.Done()
			lons := make([][]float64, tileSide)
			lats := make([][]float64, tileSide)
			steps := make([]float64, tileSide)
			for k := range lons {
				lons[k] = make([]float64, g.Width)
				lats[k] = make([]float64, g.Width)
			}
			dist := make([]float64, tileSide*g.Width)
			open := make([]int32, len(cuts))
			rhos := map[[3]int]float64{}
			for r0 := range bands {
				clear(rhos)
				off := r0 * g.Width
				set := func(i int, d float64) { dist[i-off] = d }
				r1 := min(r0+tileSide, g.Height)
				for r := r0; r < r1; r++ {
					k := r - r0
					g.RowLonLat(r, lons[k], lats[k])
					// On latitude-longitude grids the step between
					// neighbouring centres is the same along the row.
					steps[k] = -1
					if g.Geographic && g.Width > 1 {
						steps[k] = geodesy.Distance(lats[k][0], lons[k][0], lats[k][1], lons[k][1])
					}
				}
				var classify func(t0, t1, c0, c1 int)
				classify = func(t0, t1, c0, c1 int) {
					if t1-t0 > 2 && c1-c0 > 2 {
						if b.wholeTile(ix, maxD, gap, set, lons, lats, r0, t0, t1, c0, c1, rhos) {
							return
						}
						tm, cm := (t0+t1)/2, (c0+c1)/2
						classify(t0, tm, c0, cm)
						classify(t0, tm, cm, c1)
						classify(tm, t1, c0, cm)
						classify(tm, t1, cm, c1)
						return
					}
					for r := t0; r < t1; r++ {
						k := r - r0
						walkRow(ix, reach, maxD, gap, set, lons[k], lats[k], steps[k], r*g.Width, c0, c1)
					}
				}
				for c0 := 0; c0 < g.Width; c0 += tileSide {
					classify(r0, r1, c0, min(c0+tileSide, g.Width))
				}
				for r := r0; r < r1; r++ {
					k := r - r0
					rowDone(r, cutRuns(dist[k*g.Width:(k+1)*g.Width], cuts, open))
				}
			}
		}()
	}
	for r0 := 0; r0 < g.Height; r0 += tileSide {
		bands <- r0
	}
	close(bands)
	wg.Wait()
}

// cutRuns returns, for each cut j (ascending), the runs of the cells of a
// row whose distance is at most cuts[j]. Cut runs nest, so one scan
// tracking each cell's class (the first cut at or above its distance)
// opens and closes them; open is scratch of len(cuts).
func cutRuns(dist []float64, cuts []float64, open []int32) []rowRuns {
	m := len(cuts)
	near := make([]rowRuns, m)
	prev, lastD := m, math.NaN()
	for c, d := range dist {
		if d == lastD {
			continue
		}
		lastD = d
		cls := sort.SearchFloat64s(cuts, d)
		if cls == prev {
			continue
		}
		if cls < prev {
			for j := cls; j < prev; j++ {
				open[j] = int32(c)
			}
		} else {
			for j := prev; j < cls; j++ {
				near[j] = append(near[j], open[j], int32(c))
			}
		}
		prev = cls
	}
	for j := prev; j < m; j++ {
		near[j] = append(near[j], open[j], int32(len(dist)))
	}
	return near
}

// intervalGap is how far the interval [lo, hi] lies from the nearest cut:
// min over cuts c of lo - c (c < lo) or c - hi (c >= hi), and 0 when a cut
// lies in [lo, hi). For lo = hi = d it is min |d - c|. A distance within
// the gap of the interval is in the same class as every point of it.
func intervalGap(cuts []float64, lo, hi float64) float64 {
	// cuts are ascending: the first at or above lo, and the one before it.
	i := sort.SearchFloat64s(cuts, lo)
	m := math.Inf(1)
	if i < len(cuts) {
		if cuts[i] < hi {
			return 0
		}
		m = cuts[i] - hi
	}
	if i > 0 {
		m = math.Min(m, lo-cuts[i-1])
	}
	return m
}

// wholeTile classifies the tile of rows [r0,r1) and columns [c0,c1) with
// one query when it can, and reports whether it did. lons and lats hold
// the rows of the band starting at row band.
func (b *builder) wholeTile(ix *geodesy.Index, maxD float64, gap func(lo, hi float64) float64, set func(int, float64),
	lons, lats [][]float64, band, r0, r1, c0, c1 int, rhos map[[3]int]float64) bool {
	g := b.g
	kc, cc := (r0+r1)/2-band, (c0+c1)/2
	clat, clon := lats[kc][cc], lons[kc][cc]
	if math.IsNaN(clat) {
		return false
	}
	// On latitude-longitude grids, tiles of one shape in one band have the
	// same radius (to rounding far inside the margin below): it is
	// computed once per band and shape.
	key := [3]int{r0 - band, r1 - band, c1 - c0}
	rho, known := rhos[key]
	if !known {
		for _, k := range []int{r0 - band, r1 - 1 - band} {
			for _, c := range []int{c0, c1 - 1} {
				if math.IsNaN(lats[k][c]) {
					return false
				}
				rho = math.Max(rho, sphereDistance(clat, clon, lats[k][c], lons[k][c]))
			}
		}
		// Corner cells are the farthest from the centre cell on these
		// small, convex tiles. The great-circle distance on a sphere of the
		// equatorial radius is within 0.35% of the geodesic (the
		// ellipsoid's radii of curvature lie between b^2/a and a^2/b); the
		// factor covers that and the curvature of the tile's edges.
		rho = rho*1.02 + 1
		if g.Geographic {
			rhos[key] = rho
		}
	}
	// Bounds from the chord stage settle most tiles without a geodesic;
	// any value in [lo, hi] is then in the class of every cell.
	d := math.Inf(1)
	if lo, hi := ix.NearestBounds(clat, clon, maxD+rho); !math.IsInf(hi, 1) && !(lo-rho > maxD) {
		if gap(lo, hi) > rho {
			d = lo
		} else {
			_, d = ix.Nearest(clat, clon, maxD+rho)
			if !(d-rho > maxD) && !(gap(d, d) > rho) {
				return false
			}
		}
	}
	for r := r0; r < r1; r++ {
		base := r * g.Width
		for c := c0; c < c1; c++ {
			set(base+c, d)
		}
	}
	return true
}

// sphereDistance is the great-circle distance in metres between two points
// on a sphere of WGS84's equatorial radius (haversine formula; Sinnott
// 1984, Sky & Telescope 68:159). It bounds tile radii cheaply, with no call
// into PROJ.
func sphereDistance(lat1, lon1, lat2, lon2 float64) float64 {
	const rad = math.Pi / 180
	dlat, dlon := (lat2-lat1)*rad, (lon2-lon1)*rad
	h := math.Sin(dlat/2)*math.Sin(dlat/2) + math.Cos(lat1*rad)*math.Cos(lat2*rad)*math.Sin(dlon/2)*math.Sin(dlon/2)
	return 2 * geodesy.SemiMajor * math.Asin(math.Min(1, math.Sqrt(h)))
}

// walkRow classifies cells [c0,c1) of one row (cells base+c), querying
// where needed and skipping ahead while the class cannot change.
func walkRow(ix *geodesy.Index, reach reachBox, maxD float64, gap func(lo, hi float64) float64, set func(int, float64),
	lons, lats []float64, rowStep float64, base, c0, c1 int) {
	for c := c0; c < c1; c++ {
		if math.IsNaN(lats[c]) || !reach.has(lons[c], lats[c]) {
			set(base+c, math.Inf(1))
			continue
		}
		// Bounds first; the exact distance only when a cut lies between
		// them. Any value in [lo, hi] is then in the cell's class.
		lo, hi := ix.NearestBounds(lats[c], lons[c], maxD)
		if math.IsInf(hi, 1) {
			set(base+c, hi)
			continue
		}
		d, room := lo, gap(lo, hi)
		if !(room > 0) {
			_, d = ix.Nearest(lats[c], lons[c], maxD)
			if math.IsInf(d, 1) {
				set(base+c, d)
				continue
			}
			room = gap(d, d)
		}
		set(base+c, d)
		for c+1 < c1 && !math.IsNaN(lats[c+1]) {
			if rowStep >= 0 {
				room -= rowStep
			} else {
				room -= geodesy.Distance(lats[c], lons[c], lats[c+1], lons[c+1])
			}
			if room <= 0 || !reach.has(lons[c+1], lats[c+1]) {
				break
			}
			c++
			set(base+c, d)
		}
	}
}

// reachBox is a conservative longitude/latitude box around sites expanded
// by a distance: cells outside it are certainly farther than the distance.
type reachBox struct {
	south, north float64
	lonC, lonH   float64 // centre and half-width of the longitude span; lonH >= 180 means all
}

func newReach(lats, lons []float64, maxD float64) reachBox {
	south, north := 90.0, -90.0
	for _, la := range lats {
		south = math.Min(south, la)
		north = math.Max(north, la)
	}
	// 1 degree of latitude is at least 110.57 km on WGS84 (at the equator).
	dlat := maxD/110000 + 1e-9
	rb := reachBox{south: south - dlat, north: north + dlat}
	polar := math.Max(math.Abs(rb.south), math.Abs(rb.north))
	if polar >= 89 {
		rb.lonH = 360
		return rb
	}
	// Smallest longitude arc holding all sites: sort and find the largest gap.
	ls := append([]float64(nil), lons...)
	for i := range ls {
		ls[i] = math.Mod(math.Mod(ls[i], 360)+360, 360)
	}
	sort.Float64s(ls)
	gap, at := 360-ls[len(ls)-1]+ls[0], len(ls)-1
	for i := 1; i < len(ls); i++ {
		if d := ls[i] - ls[i-1]; d > gap {
			gap, at = d, i-1
		}
	}
	start := ls[(at+1)%len(ls)]
	span := 360 - gap
	// One degree of longitude at latitude phi is at least
	// 111.0 km * cos(phi) on WGS84 (the prime-vertical radius exceeds the
	// equatorial-sphere value times 0.9966 only near the poles, which are
	// excluded above).
	dlon := maxD/(110000*math.Cos(polar*math.Pi/180)) + 1e-9
	rb.lonC = start + span/2
	rb.lonH = span/2 + dlon
	return rb
}

func (r reachBox) has(lon, lat float64) bool {
	if lat < r.south || lat > r.north {
		return false
	}
	if r.lonH >= 180 {
		return true
	}
	d := math.Mod(math.Abs(lon-r.lonC), 360)
	if d > 180 {
		d = 360 - d
	}
	return d <= r.lonH
}

func splitLL(pts []LonLat) (lats, lons []float64) {
	lats = make([]float64, len(pts))
	lons = make([]float64, len(pts))
	for i, p := range pts {
		lats[i], lons[i] = p.Lat, p.Lon
	}
	return lats, lons
}

func sortedUnique(ds []float64) []float64 {
	out := append([]float64(nil), ds...)
	sort.Float64s(out)
	k := 0
	for i, d := range out {
		if i == 0 || d != out[k-1] {
			out[k] = d
			k++
		}
	}
	return out[:k]
}

// ecoregions adds the union of units holding at least k training points,
// the variant adding units that touch them, and optionally both clipped to
// the base region.
func (b *builder) ecoregions(spec Spec, baseK int, trainCells []int) error {
	if spec.EcoregionField == "" {
		return fmt.Errorf("extent: --ecoregions %s needs --ecoregion-field NAME (the unit id field)", spec.Ecoregions)
	}
	k := spec.EcoregionMinPoints
	if k < 1 {
		k = 1
	}
	units, warns, err := ReadUnits(spec.Ecoregions, spec.EcoregionField, b.g)
	b.f.Warnings = append(b.f.Warnings, warns...)
	if err != nil {
		return err
	}
	// Training points in grid CRS.
	lats, lons := splitLL(spec.Train)
	xs := make([]float64, len(lons))
	ys := make([]float64, len(lats))
	b.g.FromLonLat(lons, lats, xs, ys)
	counts := make([]int, len(units))
	for i, u := range units {
		for j := range xs {
			if !math.IsNaN(xs[j]) && Contains(b.g, u.Shape.Grid, xs[j], ys[j]) {
				counts[i]++
			}
		}
	}
	var selected, touching []int
	var sel *godal.Geometry
	for i, c := range counts {
		if c >= k {
			selected = append(selected, i)
			if sel == nil {
				sel = units[i].geom
			} else if sel, err = sel.Union(units[i].geom); err != nil {
				return fmt.Errorf("extent: %s: union of units failed (%s); check the unit geometries in a GIS", spec.Ecoregions, gdalmsg.Cause(err.Error()))
			}
		}
	}
	if len(selected) == 0 {
		b.f.Warnings = append(b.f.Warnings, fmt.Sprintf("no unit of %s holds %d or more training points; no ecoregion extents", spec.Ecoregions, k))
		return nil
	}
	for i := range units {
		if counts[i] >= k {
			continue
		}
		hit, err := units[i].geom.Intersects(sel)
		if err != nil {
			return fmt.Errorf("extent: %s unit %q: the touching test failed (%s); check the unit geometries in a GIS", spec.Ecoregions, units[i].ID, gdalmsg.Cause(err.Error()))
		}
		if hit {
			touching = append(touching, i)
		}
	}
	ids := func(ix []int) string {
		s := ""
		for n, i := range ix {
			if n > 0 {
				s += ","
			}
			s += units[i].ID
		}
		return s
	}
	type variant struct {
		id, params string
		units      []int
		clip       bool
	}
	name := fmt.Sprintf("ecoregions_k%d", k)
	vs := []variant{
		{name, fmt.Sprintf("min_points=%d; units=%s", k, ids(selected)), selected, false},
		{name + "_touching", fmt.Sprintf("min_points=%d; plus touching units=%s", k, ids(touching)), append(append([]int{}, selected...), touching...), false},
	}
	if spec.EcoregionClip {
		vs = append(vs, variant{vs[0].id + "_clipped", vs[0].params + "; clipped to base", selected, true},
			variant{vs[1].id + "_clipped", vs[1].params + "; clipped to base", vs[1].units, true})
	}
	for _, v := range vs {
		chain := chainEcoregions
		if v.clip {
			chain = chainEcoregions + "_clipped"
		}
		k, err := b.add(Member{ID: v.id, Kind: KindEcoregions, Params: v.params, Chain: chain})
		if err != nil {
			return err
		}
		b.f.Chains[chain] = append(b.f.Chains[chain], k)
		rows := b.f.cells[k].rows
		for _, ui := range v.units {
			Fill(b.g, units[ui].Shape.Grid, func(row, c0, c1 int) {
				rows[row] = append(rows[row], int32(c0), int32(c1))
			})
		}
		baseRows := b.f.cells[baseK].rows
		for r := range rows {
			rows[r] = canonical(rows[r])
			if v.clip {
				rows[r] = intersect(nil, rows[r], baseRows[r])
			}
		}
	}
	return nil
}

// Clip restricts the family to the valid cells and measures it again:
// cells, areas, shares and points inside, members that became empty or
// equal to another, and chain nesting. Members already empty or duplicate
// stay so.
func (f *Family) Clip(valid Valid, trainCells, testCells []int) {
	for k := range f.Members {
		m := &f.Members[k]
		m.Cells, m.AreaKm2, m.Share, m.TrainPoints, m.TestPoints = 0, 0, 0, 0, 0
	}
	b := &builder{g: f.Grid, valid: valid, f: f}
	b.finish(trainCells, testCells)
}

// finish clips every member to the valid cells, measures it, counts
// points, marks empty and duplicate members, and checks chain nesting.
// Members whose Status is not ok keep it and are not reported again.
//
// Members are independent, so they are clipped and measured in parallel;
// each member's area is still summed cell by cell in cell order (the same
// float64 sum whatever the number of cores).
func (b *builder) finish(trainCells, testCells []int) {
	f, g := b.f, b.g
	n := len(f.Members)
	cells := make([]int64, n)
	area := make([]float64, n)
	total := 0.0
	// Without the valid cells the family is not yet clipped: Clip will
	// measure it, so areas are not summed twice.
	measure := b.valid != nil
	var wg sync.WaitGroup
	if measure {
		wg.Add(1)
		go func() {
			defer wg.Done()
			total = b.validArea()
		}()
	}
	var next atomic.Int64
	for w := 0; w < runtime.GOMAXPROCS(0); w++ {
		wg.Add(1)
		go func() {
			defer wg.Done()
			var areas []float64
			for {
				k := int(next.Add(1) - 1)
				if k >= n {
					return
				}
				rows := f.cells[k].rows
				for row, r := range rows {
					if b.valid != nil && len(r) > 0 {
						r = clipValid(nil, r, b.valid, row*g.Width)
						rows[row] = r
					}
					cells[k] += r.cells()
					if !measure || len(r) == 0 {
						continue
					}
					// One float64 sum per member, cell after cell in cell
					// order; in rows of equal cells repeatAdd gives that
					// sum without doing each addition.
					a := area[k]
					if same, ok := g.rowArea(row); ok {
						for i := 0; i < len(r); i += 2 {
							a = repeatAdd(a, same, int(r[i+1]-r[i]))
						}
					} else {
						for i := 0; i < len(r); i += 2 {
							areas = g.RowAreasRange(row, int(r[i]), int(r[i+1]), areas)
							for _, x := range areas {
								a += x
							}
						}
					}
					area[k] = a
				}
			}
		}()
	}
	wg.Wait()
	for k := range f.Members {
		f.Members[k].Cells = cells[k]
		f.Members[k].AreaKm2 = area[k]
		if total > 0 {
			f.Members[k].Share = area[k] / total
		}
	}
	for k := range f.Members {
		m := &f.Members[k]
		if m.Status != StatusOK {
			continue
		}
		if m.Cells == 0 {
			m.Status = StatusEmpty
			f.Warnings = append(f.Warnings, fmt.Sprintf("extent %s covers no valid cell; not scored", m.ID))
			continue
		}
		for j := 0; j < k; j++ {
			if f.Members[j].Status == StatusOK && cells[j] == cells[k] && b.sameCells(j, k) {
				m.Status = StatusDuplicate
				m.DuplicateOf = f.Members[j].ID
				f.Warnings = append(f.Warnings, fmt.Sprintf("extent %s has exactly the cells of %s; scored once, under %s", m.ID, f.Members[j].ID, f.Members[j].ID))
				break
			}
		}
	}
	// Members that are not ok hold no cell.
	for k := range f.Members {
		if f.Members[k].Status != StatusOK {
			f.cells[k] = cellRuns{rows: make([]rowRuns, g.Height)}
		}
	}
	for _, ci := range trainCells {
		if ci >= 0 {
			for k := range f.Members {
				if f.Has(k, ci) {
					f.Members[k].TrainPoints++
				}
			}
		}
	}
	for _, ci := range testCells {
		if ci >= 0 {
			for k := range f.Members {
				if f.Has(k, ci) {
					f.Members[k].TestPoints++
				}
			}
		}
	}
	// Chains: keep only members with Status ok, and check nesting.
	names := make([]string, 0, len(f.Chains))
	for name := range f.Chains {
		names = append(names, name)
	}
	sort.Strings(names)
	for _, name := range names {
		var kept []int
		for _, k := range f.Chains[name] {
			if f.Members[k].Status == StatusOK {
				kept = append(kept, k)
			}
		}
		for i := 1; i < len(kept); i++ {
			if !f.nested(kept[i-1], kept[i]) {
				f.Warnings = append(f.Warnings, fmt.Sprintf("extent %s is not inside %s; the %s chain is cut there", f.Members[kept[i-1]].ID, f.Members[kept[i]].ID, name))
				kept = kept[:i]
				break
			}
		}
		if len(kept) < 2 {
			delete(f.Chains, name)
			continue
		}
		f.Chains[name] = kept
		for _, k := range kept {
			f.Members[k].Chain = name
		}
	}
	for k := range f.Members {
		if f.Members[k].Chain != "" {
			if _, ok := f.Chains[f.Members[k].Chain]; !ok {
				f.Members[k].Chain = ""
			}
		}
	}
}

// validArea is the area of all valid cells (every cell when valid is nil),
// summed cell by cell in cell order.
func (b *builder) validArea() float64 {
	g := b.g
	total := 0.0
	areas := make([]float64, g.Width)
	for row := 0; row < g.Height; row++ {
		areas = g.RowAreas(row, areas)
		base := row * g.Width
		for c, a := range areas {
			if b.valid.Has(base + c) {
				total += a
			}
		}
	}
	return total
}

// sameCells reports whether members j and k hold the same cells. Runs are
// canonical, so equal cells mean equal runs row by row.
func (b *builder) sameCells(j, k int) bool {
	rj, rk := b.f.cells[j].rows, b.f.cells[k].rows
	for row := range rj {
		if !slices.Equal(rj[row], rk[row]) {
			return false
		}
	}
	return true
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
type SpanScratch struct{ a, b, out []int32 }

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
			if used[k] || f.Members[k].Status != StatusOK {
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
		if !used[k] && m.Status == StatusOK {
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
