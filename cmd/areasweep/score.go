package main

import (
	"encoding/base64"
	"errors"
	"fmt"
	"math"
	"sort"
	"time"

	"areasweep/cmd/internal/pass"
	"areasweep/extent"
	"areasweep/extent/geodesy"
	"areasweep/metrics"
	"areasweep/report"
)

// modelPoints are one model's values at the scored points where it has
// data, by role, with the test points' ids in the same order.
type modelPoints struct {
	train, test []float64
	testIDs     []int
}

// split sorts the model's values at the points (vals, valid from Sample)
// into training and test values of the scored points it has data at.
func (s *session) split(vals []float64, valid []bool) modelPoints {
	var mp modelPoints
	for j, p := range s.points {
		if p.Status != report.PointScored || !valid[j] {
			continue
		}
		if p.Role == "train" {
			mp.train = append(mp.train, vals[j])
		} else {
			mp.test = append(mp.test, vals[j])
			mp.testIDs = append(mp.testIDs, p.ID)
		}
	}
	return mp
}

// scoreModel samples model i at the points, streams it once through the
// family's accumulators and scores every extent.
func (s *session) scoreModel(i int, m namedPath) error {
	r, err := pass.Open(m.Path)
	if err != nil {
		return badInput(err)
	}
	defer r.Close()
	role := report.Model{Name: m.Name, Path: s.recordedPath(m.Path), Role: report.RoleModel}
	if m.Null {
		role.Role, role.NullKind = report.RoleNull, report.NullRaster
	}
	return s.scoreSource(i, role, r, nil)
}

// source is a model the pass can score: a raster or a computed field.
type source interface {
	Sample(g *extent.Grid, cells []int) ([]float64, []bool, error)
	Blocks() int
	Score(g *extent.Grid, fam *extent.Family, layout *metrics.Layout, opt pass.Options) ([]*metrics.Accumulator, pass.Stats, error)
}

// scoreSource scores model m (name, path and role filled) from src, the
// i-th pass of the run: values at the points, the layout (no value range
// needed: each extent's fine histogram follows its own cells), one pass,
// and every metric on every extent. rows, when set, sees every row of the
// pass.
func (s *session) scoreSource(i int, m report.Model, src source, rows func(int, int, []float64, []int64)) error {
	g, fam := s.grid, s.fam
	vals, valid, err := src.Sample(g, s.cell)
	if err != nil {
		return badInput(err)
	}
	var layoutVals []float64
	var missing []string
	for k, p := range s.points {
		if p.Status != report.PointScored {
			continue
		}
		if !valid[k] {
			missing = append(missing, fmt.Sprintf("line %d", p.ID))
			continue
		}
		layoutVals = append(layoutVals, vals[k])
	}
	if len(missing) > 0 {
		s.warn(fmt.Sprintf("model %s has no data at %d scored point(s), which it is not scored on: %s", m.Name, len(missing), listSome(missing, 10)))
	}
	layoutVals = append(layoutVals, s.o.Thresholds...)
	layout, err := metrics.NewLayout(layoutVals, histBins)
	if err != nil {
		return internal(fmt.Errorf("model %s: %w", m.Name, err))
	}
	var pv *pass.Preview
	if i == 0 {
		pv = pass.NewPreview(g, previewSide)
	}
	opt := pass.Options{Workers: s.o.Workers, Preview: pv, Rows: rows}
	if s.valid == nil {
		// The first pass also finds the valid cells the family is clipped to.
		opt.Valid = extent.NewValid(g.Cells())
	}
	t0 := time.Now()
	bar := s.progress("scoring "+m.Name, src.Blocks())
	opt.Progress = bar.update
	accs, stats, err := src.Score(g, fam, layout, opt)
	bar.finish()
	if err != nil {
		var ie *pass.InternalError
		if errors.As(err, &ie) {
			return internal(err)
		}
		return badInput(fmt.Errorf("model %s: %w", m.Name, err))
	}
	if !stats.AnyValid {
		return badInput(fmt.Errorf("model %s: %w: every cell of %s is no data (the band's nodata value, NaN or infinite); check the file, or its nodata setting (gdalinfo)", m.Name, pass.ErrNoData, m.Path))
	}
	how := "read once"
	if m.NullKind == report.NullDistance {
		how = "computed cell by cell (no file read)"
	}
	s.logf("%s: %s, block by block (%d blocks), and added to the sums of all %d extents in %.2f s", m.Name, how, src.Blocks(), len(fam.Members), time.Since(t0).Seconds())
	if stats.Area > 0 && stats.Min == stats.Max {
		s.warn(fmt.Sprintf("model %s has the same value (%g) on every cell with data inside the extents; it ranks nothing, so its AUC is 0.5 and its thresholds say nothing: check that this is the file you meant", m.Name, stats.Min))
	}
	if opt.Valid != nil {
		if err := s.timed("family clipped to the valid cells", func() error { return s.clip(opt.Valid) }); err != nil {
			return err
		}
	}
	t0 = time.Now()
	floor := 0.0
	if stats.Area > 0 {
		floor = float64(stats.FloorArea) / float64(stats.Area)
	}
	m.ValueMin, m.ValueMax, m.FloorShare = stats.Min, stats.Max, floor
	s.res.Models = append(s.res.Models, m)
	if pv != nil {
		s.res.Preview = s.preview(pv, stats)
	}
	set := metrics.Settings{E: s.o.E, Iterations: s.o.Iterations, Fraction: s.o.Fraction, FixedThresholds: s.o.Thresholds}
	// Training-presence thresholds come from all of the model's scored
	// training points, so they are the same on every extent (as the
	// omission lists are); AUCTrain uses the training points inside each.
	mp := s.split(vals, valid)
	set.ThresholdTrain = append([]float64{}, mp.train...)
	// Presence values per extent: only points inside the extent count.
	presence := func(k int, role string) []float64 {
		var out []float64
		for j, p := range s.points {
			if p.Status == report.PointScored && p.Role == role && valid[j] && fam.Has(k, s.cell[j]) {
				out = append(out, vals[j])
			}
		}
		return out
	}
	nTest := len(mp.test)
	gidx := s.globalTest()
	testIDs := func(k int) (global, ids []int) {
		for j, p := range s.points {
			if p.Status == report.PointScored && p.Role == "test" && valid[j] && fam.Has(k, s.cell[j]) {
				global, ids = append(global, gidx[j]), append(ids, p.ID)
			}
		}
		return global, ids
	}
	for k, mem := range fam.Members {
		sc := report.Score{Model: m.Name, Extent: mem.ID, PartialROC: []report.PartialROC{}, Thresholds: []report.Threshold{}}
		switch mem.Status {
		case extent.StatusEmpty:
			sc.NotScored = "extent covers no valid cell"
			s.res.Scores = append(s.res.Scores, sc)
			continue
		case extent.StatusDuplicate:
			sc.NotScored = "same cells as " + mem.DuplicateOf
			s.res.Scores = append(s.res.Scores, sc)
			continue
		}
		train, test := presence(k, "train"), presence(k, "test")
		sc.TestOutside, sc.TrainOutside = nTest-len(test), len(set.ThresholdTrain)-len(train)
		set.Seed = deriveSeed(s.o.Seed, m.Name, mem.ID)
		out, err := metrics.Score(accs[k], train, test, set)
		if err != nil {
			return fmt.Errorf("model %s extent %s: %w", m.Name, mem.ID, err)
		}
		sc.Cells, sc.AreaKm2 = out.Cells, float64(out.Area)/pass.AreaUnitsPerKm2
		sc.TestPoints, sc.TrainPoints = out.TestN, out.TrainN
		if !out.Scored {
			sc.NotScored = out.NotScored
			if out.TestN == 0 {
				sc.NotScored = "no test points inside this extent"
			}
			s.res.Scores = append(s.res.Scores, sc)
			continue
		}
		sc.Scored = true
		sc.AUC, sc.AUCUnweighted, sc.AUCTrain, sc.AUCSE = out.AUC, out.AUCUnweighted, out.AUCTrain, out.AUCSE
		sc.AUCUnweightedSEDeLong = math.Sqrt(out.AUCUnweightedVarDeLong)
		global, ids := testIDs(k)
		sc.TestPointIDs, sc.Placements, sc.PlacementsUnweighted = ids, out.Placements, out.PlacementsUnweighted
		for _, p := range out.PartialROC {
			sc.PartialROC = append(sc.PartialROC, report.PartialROC{E: p.E, Defined: p.Formed, Reason: p.Reason, XE: p.XE,
				TiedAtCrossing: p.TiedAtCrossing, DiscreteDefined: p.DiscreteFormed, DiscreteXE: p.DiscreteXE, DiscreteRatio: p.DiscreteRatio,
				Ratio: p.Ratio, RatioMean: p.RatioMean, RatioSD: p.RatioSD,
				CILow: p.CILow, CIHigh: p.CIHigh, PValue: p.PValue, Iterations: p.Iterations, NotFormed: p.NotFormed})
		}
		if sc.AUCBootSD, err = s.evaluator(m.Name, mem.ID, accs[k], test, global, out, set); err != nil {
			return fmt.Errorf("model %s extent %s: %w", m.Name, mem.ID, err)
		}
		for _, t := range out.Thresholds {
			sc.Thresholds = append(sc.Thresholds, report.Threshold{Name: t.Name, Value: t.Value, Omission: t.Omission,
				AreaFraction: t.AreaFraction, Successes: t.Successes, N: t.N, PBinomial: t.PBinomial})
		}
		if out.Boyce.Defined {
			sc.Boyce = &report.Boyce{Index: out.Boyce.Index, Windows: out.Boyce.Windows, Used: out.Boyce.Used, Mid: out.Boyce.Mid, Ratio: out.Boyce.Ratio}
		}
		cv := report.Curve{Model: m.Name, Extent: mem.ID}
		for _, pt := range out.Curve {
			cv.X = append(cv.X, pt.X)
			cv.Y = append(cv.Y, pt.Y)
		}
		s.res.Curves = append(s.res.Curves, cv)
		s.res.Scores = append(s.res.Scores, sc)
		s.logf("%s on %s: AUC %.4f  partial ROC(E=%g) %s", m.Name, mem.ID, sc.AUC, s.o.E[0], firstRatio(sc))
	}
	s.logf("%s: scores on %d extents (bootstraps included) in %.2f s", m.Name, len(fam.Members), time.Since(t0).Seconds())
	if err := s.rings(m.Name, accs, presence); err != nil {
		return err
	}
	s.omissions(m.Name, mp)
	return nil
}

func firstRatio(sc report.Score) string {
	if len(sc.PartialROC) == 0 || !sc.PartialROC[0].Defined {
		return "undefined"
	}
	return fmt.Sprintf("%.4f", sc.PartialROC[0].Ratio)
}

// aucOf is the area-weighted Mann-Whitney AUC of presence values against
// the background in a:
//
//	sum_p [W(< v_p) + W(= v_p)/2] / (n W)
//
// with exact areas from the accumulator's bins (Hanley & McNeil 1982).
func aucOf(a *metrics.Accumulator, vals []float64) (float64, bool) {
	return a.AUCAgainst(vals)
}

// rings decomposes each nested chain: for consecutive members A inside B,
// the ring R = B minus A is scored against the test presences of B, and
//
//	AUC_B = (W_A AUC_A' + W_R AUC_R) / (W_A + W_R)
//
// holds exactly, where AUC_A' is the AUC of B's presences against A's cells.
func (s *session) rings(model string, accs []*metrics.Accumulator, presence func(int, string) []float64) error {
	for _, name := range s.fam.ChainNames() {
		chain := s.fam.Chain(name)
		var rs []report.Ring
		for i := 1; i < len(chain); i++ {
			a, b := chain[i-1], chain[i]
			ring, err := accs[b].Sub(accs[a])
			if err != nil {
				return fmt.Errorf("ring %s-%s: %w", s.fam.Members[b].ID, s.fam.Members[a].ID, err)
			}
			test := presence(b, "test")
			aIn, ok1 := aucOf(accs[a], test)
			aRing, ok2 := aucOf(ring, test)
			aOut, ok3 := aucOf(accs[b], test)
			if !ok1 || !ok3 {
				continue
			}
			if !ok2 {
				aRing = 0
			}
			rs = append(rs, report.Ring{Chain: name, Model: model, Inner: s.fam.Members[a].ID, Outer: s.fam.Members[b].ID,
				InnerAreaKm2: float64(accs[a].Area()) / pass.AreaUnitsPerKm2, RingAreaKm2: float64(ring.Area()) / pass.AreaUnitsPerKm2,
				RingCells: ring.Cells(), AUCInner: aIn, AUCRing: aRing, AUCOuter: aOut})
		}
		if len(rs) == 0 {
			continue
		}
		total := rs[len(rs)-1].AUCOuter - rs[0].AUCInner
		for i := range rs {
			if total != 0 {
				rs[i].ShareOfChange = (rs[i].AUCOuter - rs[i].AUCInner) / total
			}
		}
		s.res.Rings = append(s.res.Rings, rs...)
	}
	return nil
}

// omissions lists, per threshold, the test points the model omits. The
// thresholds come from the training presences and fixed values only, so
// the lists do not depend on the extent.
func (s *session) omissions(model string, mp modelPoints) {
	train, test, testIDs := mp.train, mp.test, mp.testIDs
	type th struct {
		name metrics.ThresholdRule
		v    float64
	}
	var ths []th
	if len(train) > 0 {
		sorted := append([]float64(nil), train...)
		sort.Float64s(sorted)
		ths = append(ths, th{metrics.ThresholdMTP, sorted[0]}, th{metrics.ThresholdP10, sorted[metrics.P10Index(len(sorted))]})
	}
	for _, v := range s.o.Thresholds {
		ths = append(ths, th{metrics.ThresholdFixed, v})
	}
	for _, t := range ths {
		om := report.Omission{Model: model, Threshold: t.name, Value: t.v, Omitted: []int{}}
		for k, v := range test {
			if v < t.v {
				om.Omitted = append(om.Omitted, testIDs[k])
			}
		}
		s.res.Omissions = append(s.res.Omissions, om)
	}
}

// preview packs the pass's coarse copy and the extents' masks.
func (s *session) preview(pv *pass.Preview, st pass.Stats) *report.Preview {
	g, fam := s.grid, s.fam
	lo, hi := st.Min, st.Max
	vals := make([]byte, len(pv.Values))
	for i, v := range pv.Values {
		switch {
		case math.IsNaN(v):
			vals[i] = 255
		case hi > lo:
			vals[i] = byte(math.Round(math.Max(0, math.Min(1, (v-lo)/(hi-lo))) * 254))
		}
	}
	p := &report.Preview{Width: pv.Width, Height: pv.Height, Bounds: g.Bounds(), ValueMin: lo, ValueMax: hi,
		Values: base64.StdEncoding.EncodeToString(vals)}
	for k := range fam.Members {
		bits := make([]byte, (len(pv.Values)+7)/8)
		for i := range pv.Values {
			if fam.Has(k, pv.SourceCell(g, i)) {
				bits[i/8] |= 1 << uint(i%8)
			}
		}
		p.Masks = append(p.Masks, base64.StdEncoding.EncodeToString(bits))
	}
	return p
}

// finishResults adds distances between test and training points and the
// sensitivity analysis.
func (s *session) finishResults() error {
	train, _, _ := s.scoredPoints("train")
	if len(train) > 0 {
		lats := make([]float64, len(train))
		lons := make([]float64, len(train))
		for i, p := range train {
			lats[i], lons[i] = p.Lat, p.Lon
		}
		ix, err := geodesy.NewIndex(lats, lons)
		if err != nil {
			return err
		}
		for i := range s.points {
			p := &s.points[i]
			if p.Status == report.PointScored && p.Role == "test" {
				_, d := ix.Nearest(s.lonlat[i].Lat, s.lonlat[i].Lon, 0)
				p.NearestTrainKm = math.Round(d) / 1000
			}
		}
	}
	s.res.Points = s.points
	if s.res.Rings == nil {
		s.res.Rings = []report.Ring{}
	}
	if s.res.Omissions == nil {
		s.res.Omissions = []report.Omission{}
	}
	if s.res.Curves == nil {
		s.res.Curves = []report.Curve{}
	}
	if err := s.paired(); err != nil {
		return err
	}
	return report.Analyze(s.res)
}
