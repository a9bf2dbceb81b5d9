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
	valid Valid
	f     *Family
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
func Build(g *Grid, valid Valid, spec Spec, trainCells, testCells []int) (*Family, error) {
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
	baseK, err := b.add(Member{ID: vocab.BaseID, Kind: vocab.KindBase, Params: "file=" + baseName(spec.Region)})
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
