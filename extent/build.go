package extent

import (
	"errors"
	"fmt"
	"math"
	"sort"
	"strconv"

	"github.com/paulmach/orb"

	"areasweep/extent/vocab"
)

// builder accumulates members while the family is built.
type builder struct {
	g     *Grid
	valid *Valid
	f     *Family
	// windowCols, when positive, is the width of the distance fields' windows
	// instead of fieldWindow (tests: many windows on a small grid).
	windowCols int
}

// add appends a member with no cells and returns its index.
func (b *builder) add(m Member) (int, error) {
	if len(b.f.Members) >= MaxMembers {
		return 0, ErrTooManyMembers
	}
	m.Status = vocab.StatusOK
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
func Build(g *Grid, valid *Valid, spec Spec, trainCells, testCells []int) (*Family, error) {
	f := &Family{Grid: g, Chains: map[string][]int{}}
	b := &builder{g: g, valid: valid, f: f}
	if spec.Region == "" {
		return nil, errors.New("extent: no base region given (--region FILE)")
	}
	base, warns, err := ReadShape(spec.Region, g)
	f.Warnings = append(f.Warnings, warns...)
	if err != nil {
		return nil, fmt.Errorf("region: %w", err)
	}
	f.Base = base
	if w := beyondRaster(g, base.Grid, spec.Region); w != "" {
		f.Warnings = append(f.Warnings, w)
	}
	baseK, err := b.add(Member{ID: vocab.BaseID, Kind: vocab.KindBase, Params: "file=" + baseName(spec.Region)})
	if err != nil {
		return nil, err
	}
	b.fillRuns(baseK, base.Grid)
	if err := b.regionBuffers(spec.Region, base, baseK, spec.RegionBuffersKm); err != nil {
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
		if err := b.hull(spec.Train, spec.HullBuffersKm, spec.ThinnedTrain); err != nil {
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
			return nil, fmt.Errorf("extra %s: %w", x.Name, err)
		}
		k, err := b.add(Member{ID: "user_" + x.Name, Kind: vocab.KindUser, Params: "file=" + baseName(x.Path)})
		if err != nil {
			return nil, err
		}
		b.fillRuns(k, s.Grid)
	}
	wholeK, err := b.add(Member{ID: vocab.WholeRasterID, Kind: vocab.KindWholeRaster, Params: "all valid cells"})
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

// beyondRaster words a warning when the base region mp (in the grid's CRS)
// reaches more than half a cell beyond an edge of the raster, naming the
// edges: the extents hold only its cells on the raster, so the base extent
// is smaller than the region given (its area, and "the study region as
// given" in the methods text, are those of its part on the raster), and
// the shrunk buffers shrink from the region's own boundary, not from the
// raster's edge. A polygon's bounds are reached at its vertices, so a
// region beyond these bounds has a part beyond the raster. A geographic
// grid that spans the globe has no east or west edge to reach beyond.
func beyondRaster(g *Grid, mp orb.MultiPolygon, path string) string {
	if len(mp) == 0 {
		return ""
	}
	bb := mp.Bound()
	r := g.Bounds() // west, south, east, north
	hx, hy := math.Abs(g.GeoTransform[1])/2, math.Abs(g.GeoTransform[5])/2
	global := g.Geographic && float64(g.Width)*math.Abs(g.GeoTransform[1]) >= 360-1e-9
	var sides []string
	for _, c := range []struct {
		name        string
		over        bool
		region, edg float64
	}{
		{"west", !global && bb.Min[0] < r[0]-hx, bb.Min[0], r[0]},
		{"east", !global && bb.Max[0] > r[2]+hx, bb.Max[0], r[2]},
		{"south", bb.Min[1] < r[1]-hy, bb.Min[1], r[1]},
		{"north", bb.Max[1] > r[3]+hy, bb.Max[1], r[3]},
	} {
		if c.over {
			sides = append(sides, fmt.Sprintf("%s (to %s, the raster's edge is at %s)", c.name, strconv.FormatFloat(c.region, 'g', 8, 64), strconv.FormatFloat(c.edg, 'g', 8, 64)))
		}
	}
	if len(sides) == 0 {
		return ""
	}
	return fmt.Sprintf("the base region (%s) reaches beyond the raster to the %s, in the raster's CRS: the extents hold only its cells on the raster, so base is smaller than the region given and the shrunk region buffers are not shrunk from the raster's edge; give models that cover the whole region, or clip the region to the raster (e.g. ogr2ogr -clipdst %s %s %s %s CLIPPED.gpkg %s, with the raster's bounds in the region's CRS if it is another)",
		baseName(path), joinSides(sides), fmtBound(r[0]), fmtBound(r[1]), fmtBound(r[2]), fmtBound(r[3]), path)
}

func fmtBound(v float64) string { return strconv.FormatFloat(v, 'g', 10, 64) }

// joinSides joins "a", "a and b", "a, b and c".
func joinSides(s []string) string {
	if len(s) == 1 {
		return s[0]
	}
	out := s[0]
	for _, x := range s[1 : len(s)-1] {
		out += ", " + x
	}
	return out + " and " + s[len(s)-1]
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
