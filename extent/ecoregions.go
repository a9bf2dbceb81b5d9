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
	selected, sel, err := selectUnits(units, counts, k, spec.Ecoregions)
	if err != nil {
		return err
	}
	if len(selected) == 0 {
		b.f.Warnings = append(b.f.Warnings, fmt.Sprintf("no unit of %s holds %d or more training points; no ecoregion extents", spec.Ecoregions, k))
		return nil
	}
	touching, err := b.touchingUnits(units, counts, k, sel, spec.Ecoregions)
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
		for j := range xs {
			if !math.IsNaN(xs[j]) && Contains(b.g, u.Shape.Grid, xs[j], ys[j]) {
				counts[i]++
			}
		}
	}
	return counts
}

// selectUnits returns the units with at least k training points (counts)
// and their union (nil with none); path names the layer in errors.
func selectUnits(units []Unit, counts []int, k int, path string) (selected []int, sel *godal.Geometry, err error) {
	for i, c := range counts {
		if c >= k {
			selected = append(selected, i)
			if sel == nil {
				sel = units[i].geom
			} else if sel, err = sel.Union(units[i].geom); err != nil {
				return nil, nil, fmt.Errorf("extent: %s: union of units failed (%s); check the unit geometries in a GIS", path, gdalmsg.Cause(err.Error()))
			}
		}
	}
	return selected, sel, nil
}

// touchingUnits returns the units with fewer than k training points
// (counts) that touch sel, the union of the selected units; path names
// the layer in errors.
func (b *builder) touchingUnits(units []Unit, counts []int, k int, sel *godal.Geometry, path string) ([]int, error) {
	var touching []int
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
	grown, err := sel.Buffer(tol, 2)
	if err != nil {
		return nil, fmt.Errorf("extent: %s: the selected units cannot be grown by %g for the touching test (%s); check the unit geometries in a GIS", path, tol, gdalmsg.Cause(err.Error()))
	}
	defer grown.Close()
	sel = grown
	sels := []*godal.Geometry{sel}
	if b.g.Geographic {
		for _, d := range []float64{-360, 360} {
			moved, err := shiftLon(sel, d, b.g.srs)
			if err != nil {
				return nil, fmt.Errorf("extent: %s: the selected units cannot be moved by %g degrees (%s)", path, d, gdalmsg.Cause(err.Error()))
			}
			defer moved.Close()
			sels = append(sels, moved)
		}
	}
	for i := range units {
		if counts[i] >= k {
			continue
		}
		for _, s := range sels {
			hit, err := units[i].geom.Intersects(s)
			if err != nil {
				return nil, fmt.Errorf("extent: %s unit %q: the touching test failed (%s); check the unit geometries in a GIS", path, units[i].ID, gdalmsg.Cause(err.Error()))
			}
			if hit {
				touching = append(touching, i)
				break
			}
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
