package extent

import (
	"fmt"
	"math"
	"strconv"
	"strings"

	"github.com/airbusgeo/godal"
	"github.com/paulmach/orb"
	"github.com/paulmach/orb/encoding/wkb"
	"github.com/paulmach/orb/project"

	"areasweep/extent/gdalmsg"
	"areasweep/extent/vocab"
)

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
		return fmt.Errorf("ecoregions: %w", err)
	}
	counts := b.trainCounts(units, spec.Train)
	selected := selectUnits(counts, k)
	if len(selected) == 0 {
		b.f.Warnings = append(b.f.Warnings, fmt.Sprintf("no unit of %s holds %d or more training points; no ecoregion extents", spec.Ecoregions, k))
		return nil
	}
	touching, err := b.touchingUnits(units, counts, k, selected, spec.Ecoregions)
	if err != nil {
		return err
	}
	return b.addEcoregions(spec, baseK, k, units, selected, touching)
}

// trainCounts counts the training points (train, longitude-latitude)
// inside each unit.
func (b *builder) trainCounts(units []Unit, train []LonLat) []int {
	// Training points in grid CRS.
	lats, lons := splitLL(train)
	xs := make([]float64, len(lons))
	ys := make([]float64, len(lats))
	b.g.FromLonLat(lons, lats, xs, ys)
	counts := make([]int, len(units))
	for i, u := range units {
		box, ok := containsBox(u.Shape.Grid)
		for j := range xs {
			if math.IsNaN(xs[j]) || ok && !boxHolds(box, b.g, xs[j], ys[j]) {
				continue
			}
			if Contains(b.g, u.Shape.Grid, xs[j], ys[j]) {
				counts[i]++
			}
		}
	}
	return counts
}

// containsBox returns the bounding box of mp (orb's Bound), for a test
// that spares Contains' walk of every edge for the points far from it (a
// layer of 2,000 units of 500 vertices and 17,000 training points took
// over 300 s without it); ok is false when some ring is not closed, for
// which the reasoning in boxHolds does not hold.
func containsBox(mp orb.MultiPolygon) (orb.Bound, bool) {
	for _, p := range mp {
		for _, r := range p {
			if len(r) > 0 && !r.Closed() {
				return orb.Bound{}, false
			}
		}
	}
	return mp.Bound(), true
}

// boxHolds reports whether Contains(g, mp, x, y) can be true for b, the
// box of mp: false for a point more than a cell outside it. Contains
// counts the edges whose half-open span of rows holds the point's and
// whose crossing lies at or left of it: a point above or below every edge
// meets none; one left of every vertex by a cell sees no crossing at or
// left of it (a crossing lies between its edge's ends, to rounding far
// below a cell); one right of every vertex by a cell counts every edge its
// row meets, an even number on closed rings. So Contains is false there,
// exactly as it computes it.
func boxHolds(b orb.Bound, g *Grid, x, y float64) bool {
	dx, dy := math.Abs(g.GeoTransform[1]), math.Abs(g.GeoTransform[5])
	return x >= b.Min[0]-dx && x <= b.Max[0]+dx && y >= b.Min[1]-dy && y <= b.Max[1]+dy
}

// selectUnits returns the units with at least k training points (counts).
func selectUnits(counts []int, k int) (selected []int) {
	for i, c := range counts {
		if c >= k {
			selected = append(selected, i)
		}
	}
	return selected
}

// touchingUnits returns the units with fewer than k training points
// (counts) that touch a selected unit (selected); path names the layer in
// errors. A unit touches the selection when it intersects the union of
// the selected units grown by tol (below), that is when it intersects one
// of them grown by tol: each unit is tested against the selected units
// whose envelopes, grown by tol, meet its own, with no union of the
// selection (which took most of the time on a layer of 2,000 units, as
// testing every pair would).
func (b *builder) touchingUnits(units []Unit, counts []int, k int, selected []int, path string) ([]int, error) {
	// On a latitude-longitude grid the units keep their longitudes as
	// written for this test, while each is filled where it meets the grid
	// (moved by whole turns): units on either side of 180 degrees, written
	// in -180..180, meet only one turn apart. The selection is also tried
	// one turn west and east.
	// Units that share an edge often do not share it to the last bit:
	// two units whose edge was computed twice (-40 - 2 x 5/3 is
	// -43.333333333333336, -41.666666666666664 - 5/3 is
	// -43.33333333333333) leave a gap of 1e-14 degrees, and GEOS's exact
	// test calls them apart. The selection is grown by a millionth of a
	// cell side, far below anything the grid can show.
	tol := 1e-6 * math.Min(math.Abs(b.g.GeoTransform[1]), math.Abs(b.g.GeoTransform[5]))
	shifts := []float64{0}
	if b.g.Geographic {
		shifts = append(shifts, -360, 360)
	}
	type grownUnit struct {
		env   [4]float64
		moved []*godal.Geometry // grown, per shift (made when first needed)
	}
	sel := make([]grownUnit, len(selected))
	defer func() {
		for _, g := range sel {
			for _, m := range g.moved {
				if m != nil {
					m.Close()
				}
			}
		}
	}()
	for j, i := range selected {
		env, err := units[i].geom.Bounds()
		if err != nil {
			return nil, fmt.Errorf("extent: %s unit %q: its envelope cannot be taken (%s); check the unit geometries in a GIS", path, units[i].ID, gdalmsg.Cause(err.Error()))
		}
		// A margin of twice tol and of the coordinates' rounding: the
		// envelope only spares tests, never decides one.
		m := 2*tol + 1e-9*math.Max(math.Max(math.Abs(env[0]), math.Abs(env[2])), math.Max(math.Abs(env[1]), math.Abs(env[3])))
		sel[j] = grownUnit{env: [4]float64{env[0] - m, env[1] - m, env[2] + m, env[3] + m}, moved: make([]*godal.Geometry, len(shifts))}
	}
	grown := func(j, s int) (*godal.Geometry, error) {
		if g := sel[j].moved[s]; g != nil {
			return g, nil
		}
		u := units[selected[j]]
		g, err := u.geom.Buffer(tol, 2)
		if err != nil {
			return nil, fmt.Errorf("extent: %s unit %q: it cannot be grown by %g for the touching test (%s); check the unit geometries in a GIS", path, u.ID, tol, gdalmsg.Cause(err.Error()))
		}
		if d := shifts[s]; d != 0 {
			moved, err := shiftLon(g, d, b.g.srs)
			g.Close()
			if err != nil {
				return nil, fmt.Errorf("extent: %s unit %q: it cannot be moved by %g degrees (%s)", path, u.ID, d, gdalmsg.Cause(err.Error()))
			}
			g = moved
		}
		sel[j].moved[s] = g
		return g, nil
	}
	var touching []int
	for i := range units {
		if counts[i] >= k {
			continue
		}
		env, err := units[i].geom.Bounds()
		if err != nil {
			return nil, fmt.Errorf("extent: %s unit %q: its envelope cannot be taken (%s); check the unit geometries in a GIS", path, units[i].ID, gdalmsg.Cause(err.Error()))
		}
		hit := false
		for j := 0; j < len(sel) && !hit; j++ {
			for s, d := range shifts {
				e := sel[j].env
				if env[0] > e[2]+d || env[2] < e[0]+d || env[1] > e[3] || env[3] < e[1] {
					continue
				}
				g, err := grown(j, s)
				if err != nil {
					return nil, err
				}
				if hit, err = units[i].geom.Intersects(g); err != nil {
					return nil, fmt.Errorf("extent: %s unit %q: the touching test failed (%s); check the unit geometries in a GIS", path, units[i].ID, gdalmsg.Cause(err.Error()))
				}
				if hit {
					break
				}
			}
		}
		if hit {
			touching = append(touching, i)
		}
	}
	return touching, nil
}

// addEcoregions adds the ecoregion members: the selected units (at least
// k training points), the same plus the touching units, and with
// --ecoregion-clip both clipped to the base extent (member baseK), each
// chain in order.
func (b *builder) addEcoregions(spec Spec, baseK, k int, units []Unit, selected, touching []int) error {
	ids := func(ix []int) string {
		names := make([]string, len(ix))
		for n, i := range ix {
			names[n] = units[i].ID
		}
		return unitList(names)
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
		k, err := b.add(Member{ID: v.id, Kind: vocab.KindEcoregions, Params: v.params, Chain: chain})
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

// unitList writes unit ids for a member's params, separated by commas.
// An id that would blur the list (holding a comma, a semicolon, which
// separates the params, a double quote, or a space at either end, as ids
// told apart only by such spaces are) is written quoted, in Go's quoting
// (as JSON's for these): "Forest, dry" and "Steppe" read as one unit "Forest"
// and two others when written bare.
func unitList(ids []string) string {
	out := make([]string, len(ids))
	for n, id := range ids {
		out[n] = id
		if strings.ContainsAny(id, ",;\"") || strings.TrimSpace(id) != id {
			out[n] = strconv.Quote(id)
		}
	}
	return strings.Join(out, ",")
}

// shiftLon returns a copy of g with every longitude moved by dlon degrees.
func shiftLon(g *godal.Geometry, dlon float64, srs *godal.SpatialRef) (*godal.Geometry, error) {
	b, err := g.WKB()
	if err != nil {
		return nil, err
	}
	og, err := wkb.Unmarshal(b)
	if err != nil {
		return nil, err
	}
	moved := project.Geometry(og, func(p orb.Point) orb.Point { return orb.Point{p[0] + dlon, p[1]} })
	if b, err = wkb.Marshal(moved); err != nil {
		return nil, err
	}
	return godal.NewGeometryFromWKB(b, srs)
}
