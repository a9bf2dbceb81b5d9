package pipeline

import (
	"context"
	"errors"
	"fmt"
	"math"
	"path/filepath"
	"slices"
	"strings"
	"time"

	"areasweep/cmd/internal/fault"
	"areasweep/cmd/internal/pass"
	"areasweep/extent"
	"areasweep/extent/vocab"
	"areasweep/metrics"
	"areasweep/report"
)

// Passes lists the run's passes in order: each model, each raster null,
// then the distance-only null unless Options.NoDistanceNull. Pass i scores
// Passes()[i].
func (s *Study) Passes() []report.Model {
	var ps []report.Model
	for _, m := range s.models {
		r := report.Model{Name: m.Name, Path: s.recordedPath(m.Path), Role: report.RoleModel}
		if m.Null {
			r.Role, r.NullKind = report.RoleNull, report.NullRaster
		}
		ps = append(ps, r)
	}
	if !s.o.NoDistanceNull {
		ps = append(ps, report.Model{Name: report.DistanceNullName, Role: report.RoleNull, NullKind: report.NullDistance})
	}
	return ps
}

// minBoyceSpan is the narrowest value range across which the Boyce
// index's histogram (histBins bins) lays its (histBins-1)/2 bins: they are
// never narrower than 2^-1022 (the grid floor of package metrics).
const minBoyceSpan = (histBins - 1) / 2 * 0x1p-1022

// Pass runs pass i: its plan, its sums (one streaming pass over the
// cells, or what SetSums gave), the clip of the family to the valid cells
// after the first pass, and the scores.
func (s *Study) Pass(ctx context.Context, i int) error {
	p, err := s.Plan(i)
	if err != nil || p == nil {
		return err
	}
	defer p.Close()
	sums, err := s.sums(s, ctx, p)
	if err != nil {
		return err
	}
	if vals, ok := sums.Stats.Values.Values(); ok && len(vals) > 0 && p.Model.NullKind != report.NullDistance {
		// A raster of few values: its Boyce windows count each
		// histogram bin holding one of them at that value.
		for _, a := range sums.Accs {
			a.SetModelValues(vals)
		}
	}
	if !sums.Stats.AnyValid && p.Model.NullKind != report.NullDistance {
		// Found by the pass itself (in a merge, by every shard's rows
		// together): no read before the pass looks for it.
		return fault.BadInput(fmt.Errorf("%s: %w: every cell of %s is no data (the band's nodata value, NaN or infinite); check the file, or its nodata setting (gdalinfo)", modelWho(p.Model), pass.ErrNoData, p.Model.Path))
	}
	if st := sums.Stats; st.Area > 0 && math.IsInf(st.Max-st.Min, 0) {
		// Each value is finite, but no number holds their range: the
		// report's axes and colour bars are drawn over it.
		return fault.BadInput(fmt.Errorf("%s: the values of %s run from %g to %g, whose difference is beyond the largest number a float64 holds; divide the values by a large number (e.g. gdal_calc.py -A %s --outfile=%s --calc=\"A/1e300\") and give that file",
			modelWho(p.Model), p.Model.Path, st.Min, st.Max, shellArg(p.Model.Path), shellArg(strings.TrimSuffix(p.Model.Path, filepath.Ext(p.Model.Path))+"_scaled.tif")))
	}
	if st := sums.Stats; st.Area > 0 && st.Min < st.Max && st.Max-st.Min < minBoyceSpan {
		// The Boyce index's histogram has no bin narrower than 2^-1022
		// (metrics' grid floor): across a narrower range it has fewer
		// bins than stated, and its window areas are read from them.
		s.warn(fmt.Sprintf("%s: the values of %s run from %g to %g, within %.2g of each other, closer than the Boyce index's histogram resolves (its bins are never narrower than about 2.2e-308, so fewer than 2,047 lie across this range): that index is approximate, the other scores are not; multiply the values by a large number (e.g. gdal_calc.py -A %s --outfile=%s --calc=\"A*1e300\") and give that file",
			modelWho(p.Model), p.Model.Path, st.Min, st.Max, st.Max-st.Min, shellArg(p.Model.Path), shellArg(strings.TrimSuffix(p.Model.Path, filepath.Ext(p.Model.Path))+"_scaled.tif")))
	}
	if st := sums.Stats; st.Area > 0 && st.Min == st.Max {
		s.warn(fmt.Sprintf("%s has the same value (%g) on every cell with data inside the extents; it ranks nothing, so it is not scored on any extent (every cell ties with every test point): check that this is the file you meant", modelWho(p.Model), st.Min))
	} else if r, ok := p.src.(*pass.Raster); ok && st.Area > 0 && noDataMarker(st.Min) {
		declared := "declares no nodata value"
		if nd := r.NoDataText(); nd != "" {
			declared = "declares the nodata value " + nd
		}
		s.warn(fmt.Sprintf("%s (%s) %s, and its lowest value, %g, on %.4g%% of the extents' area, is one that tools write for cells without data: those cells are scored as data; if they mean no data, declare it (e.g. gdal_translate -a_nodata %g %s %s) and give that file",
			modelWho(p.Model), p.Model.Path, declared, st.Min, 100*float64(st.FloorArea)/float64(st.Area), st.Min, shellArg(p.Model.Path), shellArg(strings.TrimSuffix(p.Model.Path, filepath.Ext(p.Model.Path))+"_nodata.tif")))
	}
	if r, ok := p.src.(*pass.Raster); ok && sums.Stats.Area > 0 {
		if st, held := sums.Stats, r.NoDataUnheld(); held != "" {
			nd := r.NoDataText()
			s.warn(fmt.Sprintf("%s (%s) declares the nodata value %s, which its %s cannot hold, so no cell is no data and every cell is scored as data (its lowest value, %g, on %.4g%% of the extents' area); if its cells without data hold another value (gdal_translate -ot turns a value beyond the type's range into the nearest it holds), declare that one (e.g. gdal_translate -a_nodata %g %s %s) and give that file",
				modelWho(p.Model), p.Model.Path, nd, held, st.Min, 100*float64(st.FloorArea)/float64(st.Area), st.Min, shellArg(p.Model.Path), shellArg(strings.TrimSuffix(p.Model.Path, filepath.Ext(p.Model.Path))+"_nodata.tif")))
		}
	}
	if sums.Valid != nil {
		// The extents are final only once the first model has been read.
		if err := s.timed("family clipped to the valid cells", func() error { return s.Clip(sums.Valid) }); err != nil {
			return err
		}
	}
	if p.Index > 0 && p.Model.NullKind != report.NullDistance {
		s.warnFewerCells(p.Model, sums.Accs)
	}
	return s.Score(p, sums)
}

// warnFewerCells warns when a later model or raster null lacks data on
// cells of the extents (cells with data in the first model): it is then
// scored on each such extent against its own cells only, a smaller
// background than the first model's, and its scores and its paired
// differences from the other models there compare unlike backgrounds
// (the same values, with no data over ground the test points do not
// reach, would read as a worse model beyond noise).
func (s *Study) warnFewerCells(m report.Model, accs []*metrics.Accumulator) {
	var ids []string
	worst, worstID := 0.0, ""
	for k, mem := range s.fam.Members {
		if mem.Status != vocab.StatusOK || k >= len(accs) || mem.Cells <= 0 {
			continue
		}
		missing := mem.Cells - accs[k].Cells()
		if missing <= 0 {
			continue
		}
		ids = append(ids, mem.ID)
		if share := float64(missing) / float64(mem.Cells); share > worst {
			worst, worstID = share, mem.ID
		}
	}
	if len(ids) == 0 {
		return
	}
	first := s.models[0].Name
	named := firstOf(ids, 5)
	s.warn(fmt.Sprintf("%s has no data on cells where the first model (%s) has data, inside %d extent(s) (%s; up to %.1f%% of an extent's cells, on %s): there it is scored against its own cells with data only, a smaller background than %s's, so its scores on those extents and its differences from the other models there do not compare like with like; give it data on every cell %s has data on, or give first (--model) the model with the fewest cells with data",
		modelWho(m), first, len(ids), named, 100*worst, worstID, first, first))
}

// noDataMarker reports whether v is a value that tools write into cells
// without data: -9999 and its longer cousins, the lowest Int16 and Int32,
// and the lowest float32 or float64 (or a value near them, as printed
// with fewer digits). A suitability model does not hold such a value as
// its lowest: a raster without a nodata value whose minimum is one has
// most likely lost its declaration.
func noDataMarker(v float64) bool {
	switch v {
	case -9999, -99999, -999999, -32768, -2147483648:
		return true
	}
	return v <= -1e38
}

// Plan is one pass ready to run: the model, the source of its cells, its
// values at the points and the layout of its accumulators.
type Plan struct {
	// Index is the pass's place in Passes.
	Index int
	// Model names the model or null (path and role filled).
	Model report.Model
	// Layout holds the exact bins of the pass's accumulators.
	Layout *metrics.Layout

	src   Source
	vals  []float64 // per point
	valid []bool    // per point: the model has data there
	rows  func(row, c0 int, vals []float64, w []int64)
	null  *distanceNull
	close func()
}

// Source is the pass's source of cells.
func (p *Plan) Source() Source { return p.src }

// Close releases the pass's source.
func (p *Plan) Close() {
	if p.close != nil {
		p.close()
		p.close = nil
	}
}

// Sums are what a pass adds up over the cells.
type Sums struct {
	// Accs holds one accumulator per family member, in the plan's layout.
	Accs []*metrics.Accumulator
	// Stats are the pass's value range and areas.
	Stats pass.Stats
	// Valid is set by the first pass only: the cells with data, to which
	// the family is then clipped.
	Valid *extent.Valid
	// Preview is set by the first pass only: the coarse map copy.
	Preview *pass.Preview
}

// SumsFunc gives the sums of the pass p of s.
type SumsFunc func(s *Study, ctx context.Context, p *Plan) (*Sums, error)

// SetSums replaces where a pass's sums come from (Stream by default), for
// example by sums read back from files.
func (s *Study) SetSums(f SumsFunc) {
	s.sums, s.streams = f, false
	if s.first != nil {
		s.first.KeepBlocks(0, nil) // no pass will read the first model's blocks
	}
}

// Source is a model the pass can score: a raster (pass.Raster) or a
// computed field (pass.Virtual).
type Source interface {
	Sample(g *extent.Grid, cells []int) ([]float64, []bool, error)
	Blocks() int
	BlocksIn(rows *pass.RowRange) int
	Score(g *extent.Grid, fam *extent.Family, layout *metrics.Layout, opt pass.Options) ([]*metrics.Accumulator, pass.Stats, error)
}

// Plan prepares pass i: opens its source, reads its values at the points
// and sets the layout (presence values and fixed thresholds; no value
// range: each extent's fine histogram follows its own cells, so no model
// is read before its pass). It returns nil, nil for a pass that is skipped
// (the distance-only null without training points, with a warning).
func (s *Study) Plan(i int) (*Plan, error) {
	if i < len(s.models) {
		return s.planModel(i, s.models[i])
	}
	return s.planDistanceNull(i)
}

// keptBlockBytes is the budget of decoded blocks a model's sampling at the
// points keeps for its pass (pass.Raster.KeepBlocks), which then does not
// decode them again; blocks beyond it are decoded twice. 128 MiB holds 512
// blocks of 256 x 256 Float32 cells: every block the 1,000 points of the
// benchmark study touch at 27 and 100 million cells (139 and 347 blocks,
// 35 and 87 MiB) and 512 of the 838 at a billion, while a billion-cell
// run stays far below 1 GiB (536 MiB without). One model's blocks are
// held at a time, from its sampling to its pass.
const keptBlockBytes = 128 << 20

// planModel opens model m's raster (the first model's is open since its
// points were sampled) and sets its layout.
func (s *Study) planModel(i int, m namedPath) (*Plan, error) {
	var r *pass.Raster
	if i == 0 && s.first != nil {
		r, s.first = s.first, nil
	} else {
		var err error
		if r, err = pass.Open(m.Path); err != nil {
			return nil, fault.BadInput(fmt.Errorf("%s: %w", m.who(), err))
		}
		if s.streams {
			r.KeepBlocks(keptBlockBytes, s.rows)
		}
	}
	p := &Plan{Index: i, Model: s.Passes()[i], src: r, close: func() { r.Close() }}
	if err := s.layout(p); err != nil {
		p.Close()
		return nil, err
	}
	return p, nil
}

// layout samples p's source at the points and sets p.Layout: its bins at
// the scored points' values and the fixed thresholds, with opts (the
// distance-only null's histogram floor).
func (s *Study) layout(p *Plan, opts ...metrics.LayoutOption) error {
	m := p.Model
	var vals []float64
	var valid []bool
	var err error
	if p.Index == 0 && s.firstVals != nil {
		// Read when the points were placed.
		vals, valid = slices.Clone(s.firstVals), slices.Clone(s.firstValid)
	} else if vals, valid, err = p.src.Sample(s.grid, s.cell); err != nil {
		return fault.BadInput(fmt.Errorf("%s: %w", modelWho(m), err))
	}
	p.vals, p.valid = vals, valid
	var layoutVals []float64
	var missing []string
	for k, pt := range s.points {
		if pt.Status != vocab.PointScored {
			continue
		}
		if !valid[k] {
			missing = append(missing, fmt.Sprintf("line %d", pt.ID))
			continue
		}
		layoutVals = append(layoutVals, vals[k])
	}
	if len(missing) > 0 {
		s.warn(fmt.Sprintf("%s has no data at %d scored point(s), which it is not scored on: %s", modelWho(m), len(missing), listSome(missing, 10)))
	}
	layoutVals = append(layoutVals, s.o.Thresholds...)
	p.Layout, err = metrics.NewLayout(layoutVals, histBins, opts...)
	if err != nil {
		return fault.Internal(fmt.Errorf("%s: %w", modelWho(m), err))
	}
	return nil
}

// Stream is the default source of a pass's sums: one block-by-block pass
// over the model's cells on the workers, into one accumulator per member.
// The first pass also finds the valid cells and the preview.
func (s *Study) Stream(ctx context.Context, p *Plan) (*Sums, error) {
	if err := ctx.Err(); err != nil {
		return nil, err
	}
	g, fam, m := s.grid, s.fam, p.Model
	opt := s.PassOptions(p)
	t0 := time.Now()
	bar := s.progress("scoring "+m.Name, p.src.Blocks())
	opt.Progress = bar.update
	accs, stats, err := p.src.Score(g, fam, p.Layout, opt)
	bar.finish()
	if err != nil {
		var ie *pass.InternalError
		if errors.As(err, &ie) {
			return nil, fault.Internal(err)
		}
		return nil, fault.BadInput(fmt.Errorf("%s: %w", modelWho(m), err))
	}
	how := "read once"
	if m.NullKind == report.NullDistance {
		how = "computed cell by cell (no file read)"
	}
	if s.rows != nil {
		how += fmt.Sprintf(" in grid rows %d to %d only", s.rows.First, s.rows.End-1)
	}
	n := p.src.BlocksIn(s.rows) // a shard's pass reads only the blocks meeting its rows
	blocks := blocksText(n, 0)
	if r, ok := p.src.(*pass.Raster); ok && r.Strips(s.rows) != "" {
		blocks = r.Strips(s.rows)
	} else if ok && r.Reused() > 0 {
		blocks = blocksText(n, r.Reused())
	}
	s.logf("%s: %s, %s, and added to the sums of %s in %.2f s", m.Name, how, blocks, allExtentsText(len(fam.Members)), time.Since(t0).Seconds())
	return &Sums{Accs: accs, Stats: stats, Valid: opt.Valid, Preview: opt.Preview}, nil
}

// PassOptions are the options of pass p's streaming read: the workers,
// the preview (first pass), the row callback (the distance-only null's
// tally) and, while the family waits for its clip, a bitset for the valid
// cells. A source of sums other than Stream that reads cells uses them.
func (s *Study) PassOptions(p *Plan) pass.Options {
	opt := pass.Options{Workers: s.o.Workers, Rows: p.rows, RowRange: s.rows}
	if p.Index == 0 {
		opt.Preview = pass.NewPreview(s.grid, previewSide)
	}
	if s.valid == nil {
		// The first pass also finds the valid cells the family is clipped to.
		opt.Valid = extent.NewValid(s.grid.Width, s.grid.Height)
	}
	return opt
}

// Grid is the run's grid.
func (s *Study) Grid() *extent.Grid { return s.grid }

// Family is the run's extent family (clipped after the first pass).
func (s *Study) Family() *extent.Family { return s.fam }

// blocksText says how a pass read its source: "block by block (10
// blocks, 7 of them decoded when the points were sampled)", "(1 block)"
// for one ("1 blocks" was logged for the distance-only null of a small
// grid).
func blocksText(n, reused int) string {
	out := fmt.Sprintf("block by block (%d block%s", n, report.Plural(n))
	if reused > 0 {
		out += fmt.Sprintf(", %d of them decoded when the points were sampled", reused)
	}
	return out + ")"
}

// allExtentsText is "all 12 extents", or "its 1 extent".
func allExtentsText(n int) string {
	if n == 1 {
		return "its 1 extent"
	}
	return fmt.Sprintf("all %d extents", n)
}
