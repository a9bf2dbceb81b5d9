package pipeline

import (
	"errors"
	"fmt"
	"strings"
	"time"

	"areasweep/cmd/internal/fault"
	"areasweep/cmd/internal/inputs"
	"areasweep/extent"
	"areasweep/extent/vocab"
	"areasweep/report"

	"github.com/paulmach/orb"
)

// buildFamily builds the extent family and fills Results.Extents.
func (s *Study) buildFamily() error {
	o := s.o
	train, trainCells, _ := s.scoredPoints(vocab.RoleTrain)
	test, testCells, _ := s.scoredPoints(vocab.RoleTest)
	spec := extent.Spec{
		Region:             o.Region,
		RegionBuffersKm:    o.RegionBuffers,
		Train:              train,
		Test:               test,
		PointBuffersAll:    o.PointBuffersAll,
		Ecoregions:         o.Ecoregions,
		EcoregionField:     o.EcoregionField,
		EcoregionMinPoints: o.EcoregionMinPoints,
		EcoregionClip:      o.EcoregionClip,
	}
	for _, p := range s.points {
		if p.Role == vocab.RoleTrain && p.Status == vocab.PointThinned {
			spec.ThinnedTrain++
		}
	}
	if len(train) > 0 {
		spec.PointBuffersKm = o.PointBuffers
		spec.HullBuffersKm = o.HullBuffers
	} else {
		spec.Ecoregions = ""
	}
	for _, m := range o.Extra {
		name, path, _ := inputs.ParseNamedPath(m)
		spec.Extra = append(spec.Extra, extent.Named{Name: name, Path: path})
	}
	s.logf("building the extent family")
	t0 := time.Now()
	fam, err := extent.Build(s.grid, s.valid, spec, trainCells, testCells)
	if errors.Is(err, extent.ErrTooManyMembers) {
		// Name what asked for them: extra layers as much as buffers.
		parts := []string{"base and whole raster 2"}
		for _, c := range []struct {
			what string
			n    int
		}{{"region buffers", len(sortedUniqueNonZero(o.RegionBuffers))}, {"point buffers", len(o.PointBuffers)}, {"hull and hull buffers", len(o.HullBuffers)}, {"--extra layers", len(o.Extra)}} {
			if c.n > 0 {
				parts = append(parts, fmt.Sprintf("%s %d", c.what, c.n))
			}
		}
		if o.Ecoregions != "" {
			parts = append(parts, "ecoregion extents up to 4")
		}
		return fault.BadInput(fmt.Errorf("the settings ask for more extents than the %d a run holds (%s, up to %d in all): give fewer buffer distances or --extra layers, or split them over several runs",
			extent.MaxMembers, strings.Join(parts, ", "), o.requestedExtents()))
	}
	if err != nil {
		// Every failure here comes from the region, point or polygon inputs.
		return fault.BadInput(err)
	}
	s.logf("extent family: %d members built in %.2f s", len(fam.Members), time.Since(t0).Seconds())
	s.fam = fam
	if fam.Members[0].Cells == 0 {
		// Refused before the warnings: the empty members' warnings would
		// only repeat the refusal.
		return fault.BadInput(s.noOverlap(""))
	}
	for _, w := range fam.Warnings {
		s.warn(w)
	}
	s.nWarn = len(fam.Warnings)
	if s.valid != nil {
		if err := s.recordExtents(); err != nil {
			return err
		}
	}
	s.res.Settings = report.Settings{
		RegionBuffersKm: nonNil(o.RegionBuffers), PointBuffersKm: nonNil(spec.PointBuffersKm), PointBufferAll: o.PointBuffersAll,
		HullBuffersKm: nonNil(spec.HullBuffersKm), EcoregionMinPoints: o.EcoregionMinPoints, EcoregionField: o.EcoregionField,
		E: nonNil(o.E), Iterations: o.Iterations, ResampleFraction: o.Fraction, FixedThresholds: nonNil(o.Thresholds),
		ThinPerCell: !o.NoThin, BoyceWindow: 0.1, BoyceSteps: 100, PairedResamples: o.Iterations,
		ToleranceAUC: o.ToleranceAUC, TolerancePartialROC: o.TolerancePartialROC, ToleranceOmission: o.ToleranceOmission, ToleranceBoyce: o.ToleranceBoyce,
		EcoregionClip: o.EcoregionClip, OccurrencesCRS: o.OccurrencesCRS, Extra: []string{},
	}
	for _, m := range o.Extra {
		name, path, _ := inputs.ParseNamedPath(m)
		s.res.Settings.Extra = append(s.res.Settings.Extra, name+"="+s.recordedPath(path))
	}
	return nil
}

// Clip restricts the family to valid, the cells with data the first pass
// found (Sums.Valid), and records it in the results: from then on the
// extents are final. Pass calls it after the first pass.
func (s *Study) Clip(valid *extent.Valid) error {
	_, trainCells, _ := s.scoredPoints(vocab.RoleTrain)
	_, testCells, _ := s.scoredPoints(vocab.RoleTest)
	s.valid = valid
	s.fam.Clip(valid, trainCells, testCells)
	if s.fam.Members[0].Cells == 0 {
		return fault.BadInput(s.noOverlap("valid "))
	}
	for _, w := range s.fam.Warnings[s.nWarn:] {
		s.warn(w)
	}
	s.nWarn = len(s.fam.Warnings)
	return s.recordExtents()
}

// noOverlap explains a base region that holds no cell (valid: "valid "
// when the cells without data were left out): a region lying over the
// raster that holds cells' centres (the rule of Fill) holds cells without
// data only; one that holds none is smaller or thinner than a cell; one
// elsewhere is in another area or CRS; one whose outlines hold centres
// that its holes all take has the raster in a hole. Whether it holds centres is asked
// of the region itself: extents knows the cells with data before it
// builds, so its base comes out empty either way.
func (s *Study) noOverlap(valid string) error {
	g, b := s.grid, s.fam.Base.Grid.Bound()
	gb := g.Bounds()
	if len(s.fam.Base.Grid) > 0 && b.Max[0] > gb[0] && b.Min[0] < gb[2] && b.Max[1] > gb[1] && b.Min[1] < gb[3] {
		if holdsCentre(g, s.fam.Base.Grid) {
			return fmt.Errorf("%w: %s covers no cell with data of %s (it lies over cells without data only); check that this is the region you meant", extent.ErrNoOverlap, s.o.Region, s.models[0].Path)
		}
		var outer orb.MultiPolygon
		for _, p := range s.fam.Base.Grid {
			if len(p) > 0 {
				outer = append(outer, orb.Polygon{p[0]})
			}
		}
		if holdsCentre(g, outer) {
			// Its outlines hold cells' centres, its holes take them all.
			return fmt.Errorf("%w: %s lies over %s but every cell's centre it surrounds lies in one of its holes (interior rings): the raster lies inside a hole of the region; check that this is the region you meant", extent.ErrNoOverlap, s.o.Region, s.models[0].Path)
		}
		return fmt.Errorf("%w: %s lies over %s but holds no cell's centre (a cell belongs to a polygon when its centre does): it is smaller or thinner than the cells of %g x %g; draw the region larger than a cell", extent.ErrNoOverlap, s.o.Region, s.models[0].Path, g.GeoTransform[1], -g.GeoTransform[5])
	}
	return fmt.Errorf("%w: %s covers no %scell of %s; check that both are in the same area and CRS", extent.ErrNoOverlap, s.o.Region, valid, s.models[0].Path)
}

// holdsCentre reports whether the polygons mp (in g's CRS) hold the centre
// of any cell of g, with or without data.
func holdsCentre(g *extent.Grid, mp orb.MultiPolygon) bool {
	found := false
	extent.Fill(g, mp, func(row, c0, c1 int) { found = found || c1 > c0 })
	return found
}

// recordExtents copies the (clipped) family into Results.Extents.
func (s *Study) recordExtents() error {
	fam := s.fam
	if fam.Members[0].Cells == 0 {
		return fault.BadInput(s.noOverlap("valid "))
	}
	if base := fam.Members[0]; base.TestPoints == 0 {
		// Not an error (the report then compares the extents with another
		// reference), but the study's own extent goes unscored: said here,
		// where it is learnt, not only in the report.
		s.warn(fmt.Sprintf("no scored test point lies in the base region (%s): the base extent is not scored, so no extent is compared with it (the report takes another extent as the reference); check that the region and the occurrences cover the same area", s.o.Region))
	}
	s.res.Extents = s.res.Extents[:0]
	for _, m := range fam.Members {
		s.res.Extents = append(s.res.Extents, report.Extent{
			ID: m.ID, Kind: m.Kind, Params: m.Params, Cells: m.Cells, AreaKm2: m.AreaKm2,
			TrainPoints: m.TrainPoints, TestPoints: m.TestPoints, ShareOfRaster: m.Share,
			Status: m.Status, DuplicateOf: m.DuplicateOf, Chain: m.Chain,
		})
		s.logf("extent %-28s %-14s %10d cells %14.1f km2  train %4d  test %4d  %s", m.ID, m.Kind, m.Cells, m.AreaKm2, m.TrainPoints, m.TestPoints, m.Status)
	}
	return nil
}

func nonNil(v []float64) []float64 {
	if v == nil {
		return []float64{}
	}
	return v
}
