package pipeline

import (
	"fmt"
	"math"
	"time"

	"areasweep/cmd/internal/pass"
	"areasweep/extent"
	"areasweep/extent/geodesy"
	"areasweep/extent/nullmodel"
	"areasweep/extent/vocab"
	"areasweep/metrics"
	"areasweep/report"
)

// distanceNull is what the distance-only null's pass keeps besides its
// sums: the training points' index and each extent's distance tally.
type distanceNull struct {
	ix *geodesy.Index
	bg nullmodel.Background
}

// planDistanceNull plans the distance-only null as the run's i-th pass
// (never the first: it needs the valid cells the first pass finds),
// scored through the same path as a model raster; the same pass tallies
// each extent's distances for its spatial sorting bias. Without scored
// training points the pass is skipped (nil) with a warning.
func (s *Study) planDistanceNull(i int) (*Plan, error) {
	train, _, _ := s.scoredPoints(vocab.RoleTrain)
	if len(train) == 0 {
		s.warn("no training point is scored, so the distance-only null cannot be computed")
		return nil, nil
	}
	lats, lons := nullSites(train)
	ix, err := geodesy.NewIndex(lats, lons)
	if err != nil {
		return nil, fmt.Errorf("distance-only null: %w", err)
	}
	g := s.grid
	field := pass.DistanceNull(g, ix)
	dn := &distanceNull{ix: ix}
	// The sorting-bias tally of every ok member, made by the pass.
	src := pass.NewVirtual(g, field)
	src.Tally(s.fam, &dn.bg)
	p := &Plan{Index: i, Model: s.Passes()[i], src: src, null: dn}
	// The null's fine histogram (Boyce) never goes below the floor grid of
	// about far/histBins, so the bounds of a cell can be checked against
	// every histogram edge before the pass (pass.DistanceNullFloor).
	if err := s.layout(p, metrics.WithHistFloor(pass.DistanceNullFloor(field, g, histBins))); err != nil {
		return nil, err
	}
	return p, nil
}

// nullSites returns the coordinates of the distance-only null's sites:
// the training points, each place once (the first point there), in their
// order. Points at one place (--no-thin keeps them all) give every cell
// the same nearest distance as one of them would, but each copy is a
// separate candidate site: above nullmodel's 16 candidates a super-tile
// is computed cell by cell, each cell measuring every copy, which made
// 20 copies of one point take 17 s on 800,000 cells instead of 0.4 s.
func nullSites(train []extent.LonLat) (lats, lons []float64) {
	seen := make(map[[2]uint64]bool, len(train))
	for _, p := range train {
		k := [2]uint64{math.Float64bits(p.Lat), math.Float64bits(p.Lon)}
		if seen[k] {
			continue
		}
		seen[k] = true
		lats, lons = append(lats, p.Lat), append(lons, p.Lon)
	}
	return lats, lons
}

// sortingBiases computes every scored extent's spatial sorting bias: the
// test points' geodesic distances to the nearest training point (from
// their own coordinates, as nearest_train_km) against the extent's cells'
// (bg); nil for a member not scored. It only reads the study and bg (the
// pass is over), so it runs beside the null's scoring (Score), which
// leaves the extents alone; recordSortingBias records the results.
func (s *Study) sortingBiases(ix *geodesy.Index, bg *nullmodel.Background) []*nullmodel.SortingBias {
	dist := make([]float64, len(s.points))
	for j, p := range s.points {
		if p.Status == vocab.PointScored && p.Role == vocab.RoleTest {
			_, dist[j] = ix.Nearest(s.lonlat[j].Lat, s.lonlat[j].Lon, 0)
		}
	}
	out := make([]*nullmodel.SortingBias, len(s.fam.Members))
	for k, mem := range s.fam.Members {
		if k >= len(s.res.Extents) || mem.Status != vocab.StatusOK {
			continue
		}
		var test []float64
		for j, p := range s.points {
			if p.Status == vocab.PointScored && p.Role == vocab.RoleTest && s.fam.Has(k, s.cell[j]) {
				test = append(test, dist[j])
			}
		}
		sb := bg.SortingBias(k, test)
		out[k] = &sb
	}
	return out
}

// recordSortingBias records the sorting biases of sortingBiases (sbs, in
// member order) into the extents and logs them, with the time d they took.
func (s *Study) recordSortingBias(sbs []*nullmodel.SortingBias, d time.Duration) {
	for k, sb := range sbs {
		if sb == nil {
			continue
		}
		mem := s.fam.Members[k]
		s.res.Extents[k].SortingBias = &report.SortingBias{Defined: sb.Defined, Reason: sb.Reason, TestPoints: sb.TestN,
			TestMeanKm: sb.TestMeanM / 1000, TestMedianKm: sb.TestMedianM / 1000,
			BackgroundMeanKm: sb.BackgroundMeanM / 1000, BackgroundMedianKm: sb.BackgroundMedianM / 1000,
			RatioMean: sb.RatioMean, RatioMedian: sb.RatioMedian}
		if sb.Defined {
			s.logf("sorting bias on %s: test mean %.1f km, background mean %.1f km, ratio %.3f (medians %.3f)", mem.ID,
				sb.TestMeanM/1000, sb.BackgroundMeanM/1000, sb.RatioMean, sb.RatioMedian)
		}
	}
	s.logf("sorting bias on %d extents in %.1f s", len(s.fam.Members), d.Seconds())
}
